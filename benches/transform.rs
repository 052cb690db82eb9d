//! Transformation-based and exact synthesis against the known optima, for
//! BENCHMARKS.md. Run with `cargo bench --bench transform`.

mod common;
use common::*;

use oraculum::logic::Permutation;
use oraculum::opt::optimize;
use oraculum::synth::transform_with;
use oraculum::Tables;
use oraculum::{lower, Circuit};
use std::time::Instant;

fn all_perms(n: usize) -> Vec<Vec<u64>> {
    let mut out = Vec::new();
    let mut p: Vec<u64> = (0..n as u64).collect();
    fn rec(k: usize, p: &mut Vec<u64>, out: &mut Vec<Vec<u64>>) {
        if k == p.len() {
            out.push(p.clone());
            return;
        }
        for i in k..p.len() {
            p.swap(k, i);
            rec(k + 1, p, out);
            p.swap(k, i);
        }
    }
    rec(0, &mut p, &mut out);
    out
}

fn row(label: &str, perms: &[Vec<u64>], width: usize, f: impl Fn(&Permutation) -> Circuit) {
    let t = Instant::now();
    let mut total = 0usize;
    let mut circuits = Vec::with_capacity(perms.len());
    for images in perms {
        let p = Permutation::new(width, images.clone()).unwrap();
        let c = f(&p);
        total += c.gates().len();
        circuits.push(c);
    }
    let secs = t.elapsed().as_secs_f64();
    // Gates of NOT, CNOT and Toffoli only: negative controls become NOT pairs
    // and wider gates Toffoli chains on ancillae, as lowering writes them.
    let mut nct = 0usize;
    for (c, images) in circuits.iter().zip(perms) {
        assert!((0..images.len() as u64).all(|i| c.simulate(i) == images[i as usize]));
        nct += lower(c).gates().len();
    }
    println!(
        "| {label} | {} | {:.4} | {:.4} | {:.1} us |",
        perms.len(),
        total as f64 / perms.len() as f64,
        nct as f64 / perms.len() as f64,
        1e6 * secs / perms.len() as f64
    );
}

fn main() {
    let three = all_perms(8);
    println!("| method | functions | average gates (MCT, mixed polarity) | average gates after lowering (NOT, CNOT, Toffoli) | time per function |");
    println!("|---|---|---|---|---|");
    let t = Instant::now();
    let table = Tables::get().exact3(3);
    println!(
        "(3-line exact table built in {:.3} s)",
        t.elapsed().as_secs_f64()
    );
    row("3 lines: transform", &three, 3, |p| {
        transform_with(p, false)
    });
    row("3 lines: transform + optimizer", &three, 3, |p| {
        let mut c = transform_with(p, false);
        optimize(&mut c);
        c
    });
    row("3 lines: transform-bidir", &three, 3, |p| {
        transform_with(p, true)
    });
    row("3 lines: transform-bidir + optimizer", &three, 3, |p| {
        let mut c = transform_with(p, true);
        optimize(&mut c);
        c
    });
    row("3 lines: exact", &three, 3, |p| {
        let mut c = Circuit::new(oraculum::spec::permutation_layout(3).lines());
        for g in table.circuit(p.images()) {
            c.push(g);
        }
        c
    });
    let mut rng = Mix(4);
    let four: Vec<Vec<u64>> = (0..10_000)
        .map(|_| {
            let mut v: Vec<u64> = (0..16).collect();
            for i in (1..16).rev() {
                v.swap(i, (rng.next() % (i as u64 + 1)) as usize);
            }
            v
        })
        .collect();
    row("4 lines (10,000 random): transform", &four, 4, |p| {
        transform_with(p, false)
    });
    row("4 lines: transform + optimizer", &four, 4, |p| {
        let mut c = transform_with(p, false);
        optimize(&mut c);
        c
    });
    row("4 lines: transform-bidir", &four, 4, |p| {
        transform_with(p, true)
    });
    row("4 lines: transform-bidir + optimizer", &four, 4, |p| {
        let mut c = transform_with(p, true);
        optimize(&mut c);
        c
    });
    exact4(&four);
}

/// Exact synthesis on 4 lines: builds the table (depth from
/// `ORACULUM_BENCH_DEPTH`, default 7), then finds the optimum of the first
/// `ORACULUM_BENCH_SAMPLE` (default 1000) of the random functions.
fn exact4(four: &[Vec<u64>]) {
    let env = |name: &str, default: usize| {
        std::env::var(name)
            .ok()
            .and_then(|v| v.parse().ok())
            .unwrap_or(default)
    };
    let depth = env("ORACULUM_BENCH_DEPTH", 7) as u8;
    let n = env("ORACULUM_BENCH_SAMPLE", 1000).min(four.len());
    let t = Instant::now();
    let table = oraculum::exact::Exact4::build(depth, &|_| {});
    println!(
        "(4-line table of depth {depth} built in {:.1} s: classes per gate count {:?}, functions {:?})",
        t.elapsed().as_secs_f64(),
        table.levels().iter().map(|l| l.classes).collect::<Vec<_>>(),
        table.distribution()
    );
    let sample = &four[..n];
    let mut sizes = [0usize; 20];
    let mut secs_by_size = [(0.0f64, 0.0f64); 20];
    let (mut total, mut nct, mut open) = (0usize, 0usize, 0usize);
    let all = Instant::now();
    for images in sample {
        let t = Instant::now();
        let r = table.solve(images, std::time::Duration::from_secs(120));
        let secs = t.elapsed().as_secs_f64();
        if !r.minimal {
            open += 1;
            println!(
                "(not proven within the budget: {images:?}, at least {} gates)",
                r.lower_bound
            );
            continue;
        }
        let mut c = Circuit::new(oraculum::spec::permutation_layout(4).lines());
        for g in r.gates {
            c.push(g);
        }
        assert!((0..16u64).all(|i| c.simulate(i) == images[i as usize]));
        let k = c.gates().len();
        sizes[k] += 1;
        secs_by_size[k].0 += secs;
        secs_by_size[k].1 = secs_by_size[k].1.max(secs);
        total += k;
        nct += lower(&c).gates().len();
    }
    let proven = n - open;
    println!(
        "| 4 lines (first {n} of the random ones): exact, depth-{depth} table | {proven} | {:.4} | {:.4} | {:.1} ms |",
        total as f64 / proven as f64,
        nct as f64 / proven as f64,
        1e3 * all.elapsed().as_secs_f64() / n as f64
    );
    row(
        &format!("4 lines (first {n}): transform-bidir + optimizer"),
        sample,
        4,
        |p| {
            let mut c = transform_with(p, true);
            optimize(&mut c);
            c
        },
    );
    println!("(minimum sizes of the {n}: {} not proven)", open);
    for (k, &count) in sizes.iter().enumerate().filter(|(_, &c)| c > 0) {
        println!(
            "(  {k} gates: {count} functions, {:.3} s per query on average, {:.3} s at most)",
            secs_by_size[k].0 / count as f64,
            secs_by_size[k].1
        );
    }
}
