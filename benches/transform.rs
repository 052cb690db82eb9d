//! Transformation-based and exact synthesis against the known optima, for
//! BENCHMARKS.md. Run with `cargo bench --bench transform`.

mod common;
use common::*;

use oraculum::{lower, optimize, transform_with, Circuit, Exact3, Permutation};
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
    let table = Exact3::get();
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
        let mut c = Circuit::new(oraculum::permutation_lines(3));
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
    // Exact on 4 lines: build the table, then query a sample of the random functions.
    let t = Instant::now();
    let table4 = oraculum::Exact4::build();
    let d = table4.distribution();
    println!(
        "(4-line table of {} functions, sizes 0-5: {:?}, built in {:.1} s)",
        d.iter().sum::<usize>(),
        d,
        t.elapsed().as_secs_f64()
    );
    let t = Instant::now();
    let sample = &four[..200];
    let proven = sample
        .iter()
        .filter(|images| table4.query(images).is_some())
        .count();
    println!(
        "(4-line exact on 200 of the random functions: {proven} proven optimal within 10 gates, the others need at least 11; {:.2} s per query)",
        t.elapsed().as_secs_f64() / 200.0
    );
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
}
