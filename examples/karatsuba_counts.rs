//! Toffoli counts (and qubits) of `multiply` of two registers, schoolbook
//! against Karatsuba from several crossover widths, by the counting builder.
//! The figures of BENCHMARKS.md, "Karatsuba multiplication against
//! schoolbook": `cargo run --release --example karatsuba_counts`.

use oraculum::synth::{arithmetic_tally_with, Choice};

fn main() {
    println!("| n | schoolbook | Karatsuba from 16 | from 32 (default) | from 64 |");
    for w in [8usize, 16, 24, 32, 64, 128, 256, 1024, 2048] {
        let text = format!("kind = \"arithmetic\"\nop = \"multiply\"\nwidth = {w}\n");
        let spec = oraculum::parse_spec("multiply.toml", &text).expect("a valid spec");
        let oraculum::SpecBody::Arithmetic(a) = &spec.body else {
            unreachable!("an arithmetic spec")
        };
        let mut row = format!("| {w} |");
        for from in [usize::MAX, 16, 32, 64] {
            let choice = Choice {
                karatsuba_from: Some(from),
                ..Default::default()
            };
            let (t, lines) = arithmetic_tally_with(a, &choice);
            row += &format!(" {} ({}) |", t.toffoli, lines);
        }
        println!("{row}");
    }
}
