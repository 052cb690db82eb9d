//! Toffoli counts of the arithmetic ops at widths 4 to 2048 (lookups to 16
//! address bits) by the counting builder, beside the published figure, as
//! the Markdown tables of BENCHMARKS.md ("Every op by the counting builder").
//! The counts are exact tallies, independent of the machine.
//! Run with `cargo run --release --example arith_sweep` (power to 1024 bits:
//! about a minute; the 2048-bit power is `oraculum cost`, BENCHMARKS.md).

use oraculum::synth::{arithmetic_tally, power_form, PowerForm};
use oraculum::{parse_spec, SpecBody};

const WIDTHS: [usize; 8] = [4, 8, 16, 32, 64, 256, 1024, 2048];

fn tally(text: &str) -> (u64, usize, Option<PowerForm>) {
    let spec = parse_spec("sweep.toml", text).unwrap_or_else(|e| panic!("{e}\n{text}"));
    let SpecBody::Arithmetic(a) = &spec.body else {
        unreachable!("an arithmetic spec")
    };
    let form = (a.op == oraculum::ArithOp::Power).then(|| power_form(a));
    let (t, lines) = arithmetic_tally(a);
    (t.toffoli, lines, form)
}

fn table(title: &str, published: &str, rows: impl Iterator<Item = (usize, String, String)>) {
    println!("\n**{title}** — published: {published}\n");
    println!("| n | Toffoli (ours, bound) | qubits | published |");
    println!("|---|---|---|---|");
    for (n, text, publ) in rows {
        let (t, q, _) = tally(&text);
        println!("| {n} | {t} | {q} | {publ} |");
    }
}

fn spec(op: &str, n: usize, extra: &str) -> String {
    format!("kind = \"arithmetic\"\nop = \"{op}\"\nwidth = {n}\n{extra}\n")
}

fn main() {
    table(
        "subtract",
        "2n - 1 as the adder it runs (Cuccaro et al. 2004, memory); n - 1 with measured uncompute (Gidney 2018)",
        WIDTHS
            .iter()
            .map(|&n| (n, spec("subtract", n, ""), format!("{}", 2 * n - 1))),
    );
    table(
        "compare <=, registers",
        "2n - 1 (carry-out of !a + b on the Cuccaro MAJ chain, one NOT to turn it around)",
        WIDTHS.iter().map(|&n| {
            (
                n,
                spec("compare", n, "relation = \"<=\""),
                format!("{}", 2 * n - 1),
            )
        }),
    );
    table(
        "compare ==, registers",
        "2n - 3 (b ^= a, then one n-control gate by the Barenco et al. 1995 ladder)",
        WIDTHS.iter().map(|&n| {
            (
                n,
                spec("compare", n, "relation = \"==\""),
                format!("{}", 2 * n - 3),
            )
        }),
    );
    table(
        "lookup, 2^n words of 8 bits (n address bits)",
        "2(L - 2) without a control, every uncompute a Toffoli / L - 2 with measured uncomputes (Babbush et al., PRX 8, 041015, 2018: L - 1 with a control)",
        [4usize, 6, 8, 10, 12, 14, 16].iter().map(|&n| {
            // Words 1 + (i * 37) mod 255: never zero, so no subtree is skipped.
            let words: Vec<String> = (0..1u64 << n).map(|i| (1 + i * 37 % 255).to_string()).collect();
            let text = spec(
                "lookup",
                n,
                &format!("data_width = 8\ndata = [{}]", words.join(", ")),
            );
            let l = 1u64 << n;
            (n, text, format!("{} / {}", 2 * (l - 2), l - 2))
        }),
    );
    table(
        "multiply (default: Karatsuba from 32 bits)",
        "schoolbook 6n^2 - 4 (ours, the baseline Gidney 2019 improves on); Karatsuba O(n^lg 3) (Gidney 2019, no table found)",
        WIDTHS
            .iter()
            .map(|&n| (n, spec("multiply", n, ""), format!("{} (schoolbook)", 6 * n * n - 4))),
    );
    println!("\n**power, n exponent bits, windowed (the cost model's windows)** — published: Gidney and Ekerå 2021 at the same windows, 2 n m / (we wm) lookup additions of 2n + 2^(we + wm) Toffolis (eq. 1 without the runway term; the per-addition count from memory)\n");
    println!("| n | windows | Toffoli (ours, bound) | qubits | Gidney-Ekerå | ratio |");
    println!("|---|---|---|---|---|---|");
    for n in [4usize, 8, 16, 32, 64, 256, 1024] {
        let modulus = if n < 64 {
            ((1u128 << n) - 5).to_string()
        } else {
            // 2^n - 5 written in hex: f...fb.
            format!("\"0x{}b\"", "f".repeat(n / 4 - 1))
        };
        let text = format!(
            "kind = \"arithmetic\"\nop = \"power\"\nconstant = 3\nmodulus = {modulus}\nexponent_bits = {n}\n"
        );
        let (t, q, form) = tally(&text);
        let (w, ge) = match form {
            Some(PowerForm::Windowed { exponent, factor }) => {
                let adds = 2.0 * (n * n) as f64 / (exponent * factor) as f64;
                let each = 2.0 * n as f64 + (1u64 << (exponent + factor)) as f64;
                (format!("{exponent}, {factor}"), adds * each)
            }
            _ => ("per bit".to_string(), f64::NAN),
        };
        println!(
            "| {n} | {w} | {t} | {q} | {ge:.3e} | {:.1} |",
            t as f64 / ge
        );
    }
}
