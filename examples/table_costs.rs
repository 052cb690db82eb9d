//! Toffoli counts of functions given as truth tables against the same
//! functions given as expressions (weight functions, multipliers), and of the
//! AES S-box as an xor oracle in both uncompute modes, as Markdown tables for
//! BENCHMARKS.md, and the S-box in place. Every circuit is verified.
//! Run with `cargo run --release --example table_costs`.

#[path = "../tests/common/tables.rs"]
#[allow(dead_code)]
mod tables;

use oraculum::pipeline::build;
use oraculum::{parse_spec, BuildOptions, Method, Uncompute, VerifyOptions};
use std::time::Instant;
use tables::*;

/// (Toffolis, Toffoli-equivalents, qubits, method, seconds) of `text`.
fn cost(text: &str, method: Option<Method>, mode: Uncompute) -> (usize, usize, usize, String, f64) {
    let spec = parse_spec("spec.toml", text).expect("a valid spec");
    let start = Instant::now();
    let o = build(
        &spec,
        &BuildOptions {
            method,
            uncompute: mode,
            verify: Some(VerifyOptions::default()),
            ..BuildOptions::default()
        },
    )
    .expect("a circuit");
    assert!(o.verification.is_proven(), "not proven");
    (
        o.cost.toffoli,
        o.cost.toffoli_equivalent,
        o.cost.qubits,
        o.method.name().to_string(),
        start.elapsed().as_secs_f64(),
    )
}

fn row(name: &str, table: &str, expr: &str) {
    let (t, _, tq, _, ts) = cost(table, Some(Method::Xag), Uncompute::Toffoli);
    let (e, _, eq, _, _) = cost(expr, Some(Method::Xag), Uncompute::Toffoli);
    let (a, _, _, am, _) = cost(table, None, Uncompute::Toffoli);
    println!(
        "| {name} | {t} ({tq}) | {a} ({am}) | {e} ({eq}) | {:.2} | {ts:.2} |",
        t as f64 / e as f64
    );
}

fn main() {
    println!("| function | table, xag: Toffoli (qubits) | table, auto: Toffoli (method) | expression, xag: Toffoli (qubits) | table / expression | seconds (table, xag) |");
    println!("|---|---|---|---|---|---|");
    for n in [8, 10, 12, 14, 16] {
        row(
            &format!("weight, {n} inputs"),
            &weight_table(n),
            &weight_expr(n),
        );
    }
    for w in 3..=6 {
        row(
            &format!("multiplier {w}x{w}"),
            &multiplier_table(w),
            &multiplier_expr(w),
        );
    }
    println!();
    println!(
        "| AES S-box, xor oracle | Toffoli | Toffoli-equivalent | qubits | method | seconds |"
    );
    println!("|---|---|---|---|---|---|");
    let s = aes_sbox_table();
    for (method, label) in [(Some(Method::Xag), "xag"), (None, "auto")] {
        for mode in [Uncompute::Toffoli, Uncompute::Measure] {
            let (t, te, q, m, secs) = cost(&s, method, mode);
            println!(
                "| {label}, {} uncompute | {t} | {te} | {q} | {m} | {secs:.2} |",
                mode.name()
            );
        }
    }
    println!();
    println!("| AES S-box, in place (permutation of 8 lines) | Toffoli | Toffoli-equivalent | qubits | method | seconds |");
    println!("|---|---|---|---|---|---|");
    let images: Vec<String> = aes_sbox().iter().map(|v| v.to_string()).collect();
    let perm = format!(
        "kind = \"permutation\"\nwidth = 8\nimages = [{}]\n",
        images.join(", ")
    );
    for (method, label) in [
        (Some(Method::Xag), "xag (out of place)"),
        (Some(Method::Transform), "transform"),
        (Some(Method::TransformBidir), "transform-bidir"),
        (None, "auto"),
    ] {
        for mode in [Uncompute::Toffoli, Uncompute::Measure] {
            let (t, te, q, m, secs) = cost(&perm, method, mode);
            println!(
                "| {label}, {} uncompute | {t} | {te} | {q} | {m} | {secs:.2} |",
                mode.name()
            );
        }
    }
}
