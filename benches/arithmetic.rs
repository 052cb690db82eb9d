//! Arithmetic cost table and generation time for BENCHMARKS.md.
//! Run with `cargo bench --bench arithmetic`; it prints Markdown.

use oraculum::{build, parse_spec, BuildOptions};
use std::time::Instant;

fn spec(op: &str, w: usize, extra: &str) -> String {
    format!("kind = \"arithmetic\"\nop = \"{op}\"\nwidth = {w}\n{extra}\n")
}

fn main() {
    println!("| op | n | Toffoli | CNOT | NOT | qubits | depth | published Toffoli |");
    println!("|---|---|---|---|---|---|---|---|");
    for w in [4usize, 8, 16, 32, 64] {
        let top = if w >= 64 { u64::MAX } else { (1u64 << w) - 1 };
        let k = 0xa5a5_a5a5_a5a5_a5a5 & top;
        let rows: Vec<(&str, String, String)> = vec![
            (
                "add",
                spec("add", w, ""),
                format!("{} (Cuccaro opt.), {} (Cuccaro)", 2 * w - 1, 2 * w),
            ),
            (
                "add, carry_out",
                spec("add", w, "carry_out = true"),
                format!("{} (Cuccaro)", 2 * w),
            ),
            (
                "add, controlled",
                spec("add", w, "controlled = true"),
                "-".into(),
            ),
            (
                "subtract",
                spec("subtract", w, ""),
                format!("{} (as add; common practice)", 2 * w),
            ),
            (
                "add, constant 0xa5..",
                spec("add", w, &format!("constant = \"{k:#x}\"")),
                "-".into(),
            ),
            (
                "compare <",
                spec("compare", w, "relation = \"<\""),
                format!("{} (carry of !a + b)", 2 * w),
            ),
            (
                "compare <, constant 0xa5..",
                spec(
                    "compare",
                    w,
                    &format!("relation = \"<\"\nconstant = \"{k:#x}\""),
                ),
                "-".into(),
            ),
            (
                "compare ==, constant 0xa5..",
                spec(
                    "compare",
                    w,
                    &format!("relation = \"==\"\nconstant = \"{k:#x}\""),
                ),
                format!("{} (common practice)", 2 * w - 3),
            ),
            (
                "add, constant 1, modulus 2^n - 3",
                spec(
                    "add",
                    w,
                    &format!("constant = 1\nmodulus = \"{}\"", top - 2),
                ),
                "-".into(),
            ),
            (
                "add, modulus 2^n - 3",
                spec("add", w, &format!("modulus = \"{}\"", top - 2)),
                "-".into(),
            ),
        ];
        for (label, text, published) in rows {
            let s = parse_spec("bench", &text).unwrap();
            let out = build(&s, &BuildOptions::default()).unwrap();
            let c = &out.cost;
            println!(
                "| {label} | {w} | {} | {} | {} | {} | {} | {published} |",
                c.toffoli, c.cnot, c.not, c.qubits, c.depth
            );
        }
    }
    // Generate, lower and write a 1024-bit adder with carry-out; best of 5.
    let s = parse_spec("bench", &spec("add", 1024, "carry_out = true")).unwrap();
    let mut best = f64::MAX;
    let mut bytes = 0;
    let dir = std::env::temp_dir().join(format!("oraculum-bench-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    for _ in 0..5 {
        let t = Instant::now();
        let out = build(&s, &BuildOptions::default()).unwrap();
        let text = out.qasm().unwrap();
        std::fs::write(dir.join("add1024.qasm"), &text).unwrap();
        best = best.min(t.elapsed().as_secs_f64());
        bytes = text.len();
    }
    std::fs::remove_dir_all(&dir).unwrap();
    println!();
    println!("1024-bit adder with carry-out: generate, lower, measure and write {bytes} bytes of OpenQASM in {best:.4} s (best of 5)");
}
