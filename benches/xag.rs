//! XAG figures: build time and query time of the 4-input database, and exact
//! synthesis time for random 5- and 6-input functions. Run with
//! `cargo bench --bench xag` (optional argument: the time budget in seconds
//! per 6-input function, default 60).

mod common;
use common::*;

use oraculum::xag::{SearchBudget, Xag4Database};
use std::time::{Duration, Instant};

fn main() {
    let six_seconds: u64 = std::env::args()
        .skip(1)
        .find_map(|a| a.parse().ok())
        .unwrap_or(60);

    // 1. The database.
    let mut builds = Vec::new();
    let mut db = None;
    for _ in 0..5 {
        let t = Instant::now();
        let d = Xag4Database::build();
        builds.push(t.elapsed().as_secs_f64() * 1e3);
        db = Some(d);
    }
    let db = db.expect("built");
    builds.sort_by(f64::total_cmp);
    println!(
        "4-input database: {} classes, functions per AND count {:?}, classes per AND count {:?}",
        db.class_count(),
        db.distribution(),
        db.class_distribution()
    );
    println!(
        "  build: median {:.1} ms, min {:.1} ms, max {:.1} ms (5 builds)",
        builds[2], builds[0], builds[4]
    );
    let t = Instant::now();
    let mut sink = 0usize;
    let rounds = 20;
    for _ in 0..rounds {
        for f in 0..=u16::MAX {
            sink += db.circuit(f).and_count();
        }
    }
    let per = t.elapsed().as_secs_f64() * 1e9 / (rounds as f64 * 65536.0);
    println!("  query circuit(): {per:.1} ns each (checksum {sink})");

    // 2. Exact synthesis of random functions.
    let mut rng = Mix(7);
    for (n, count, secs) in [(5usize, 40usize, 60u64), (6, 6, six_seconds)] {
        let budget = SearchBudget {
            time: Duration::from_secs(secs),
            conflicts: None,
        };
        let mask = if n == 6 { u64::MAX } else { (1 << 32) - 1 };
        let mut times = Vec::new();
        let mut hist = [0usize; 17];
        let (mut proven, mut above_bound) = (0, 0);
        for _ in 0..count {
            let f = rng.next() & mask;
            let lb = db.lower_bound(n, f).expect("valid");
            let t = Instant::now();
            let r = db.exact(n, f, &budget).expect("valid");
            let s = t.elapsed().as_secs_f64();
            assert_eq!(r.circuit.truth_tables(), vec![f]);
            times.push(s);
            if r.is_minimal() {
                proven += 1;
                hist[r.circuit.and_count()] += 1;
                above_bound += (r.circuit.and_count() > lb) as usize;
            }
            println!(
                "  {n} inputs {f:#018x}: {} ANDs, lower bound {} (start {lb}), {:.3} s{}",
                r.circuit.and_count(),
                r.lower_bound,
                s,
                if r.is_minimal() { "" } else { "  NOT PROVEN" }
            );
        }
        times.sort_by(f64::total_cmp);
        let total: f64 = times.iter().sum();
        println!(
            "{n} inputs, {count} random functions, budget {secs} s: {proven} proven minimal; minimum AND counts {:?}; {above_bound} above the starting bound; time median {:.3} s, mean {:.3} s, max {:.3} s",
            hist.iter().enumerate().filter(|(_, &c)| c > 0).map(|(k, &c)| (k, c)).collect::<Vec<_>>(),
            times[count / 2],
            total / count as f64,
            times[count - 1]
        );
    }
}
