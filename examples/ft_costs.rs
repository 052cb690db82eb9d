//! Toffoli and T counts in both uncompute modes for the adders, comparators,
//! controlled and modular adders, lookups and demo specs, as a Markdown
//! table for BENCHMARKS.md.
//! Run with `cargo run --release --example ft_costs`.

use oraculum::pipeline::build;
use oraculum::{parse_spec, BuildOptions, Cost, Spec, Uncompute, VerifyOptions};

fn cost(spec: &Spec, mode: Uncompute, verify: bool) -> Option<(Cost, bool)> {
    let o = build(
        spec,
        &BuildOptions {
            uncompute: mode,
            verify: verify.then(VerifyOptions::default),
            ..BuildOptions::default()
        },
    )
    .ok()?;
    Some((o.cost.clone(), o.verification.is_proven()))
}

fn row(name: &str, spec: &Spec, published: &str, verify: bool) {
    let (Some((t, tv)), Some((m, mv))) = (
        cost(spec, Uncompute::Toffoli, verify),
        cost(spec, Uncompute::Measure, verify),
    ) else {
        println!("| {name} | no circuit | | | | | | {published} |");
        return;
    };
    let v = match (verify, tv && mv) {
        (false, _) => "counts only",
        (true, true) => "both proven",
        (true, false) => "NOT proven",
    };
    println!(
        "| {name} | {} | {} | {} | {} | {} | {} | {published} | {v} |",
        t.toffoli, t.t_count, m.toffoli_equivalent, m.t_count, m.t_depth, m.qubits
    );
}

fn main() {
    println!("| circuit | toffoli mode: Toffoli | T | measure mode: Toffoli-eq. | T | T-depth | qubits | published (measure) | check |");
    println!("|---|---|---|---|---|---|---|---|---|");
    for n in [8usize, 16, 32, 64] {
        for carry in [false, true] {
            let text =
                format!("kind = \"arithmetic\"\nop = \"add\"\nwidth = {n}\ncarry_out = {carry}\n");
            let s = parse_spec("add", &text).unwrap();
            let want = if carry { n } else { n - 1 };
            row(
                &format!("add {n}{}", if carry { " + carry" } else { "" }),
                &s,
                &format!("{want} Toffoli, {} T (Gidney 2018)", 4 * want),
                n <= 16,
            );
        }
    }
    let arith = |text: String| parse_spec("arith", &text).unwrap();
    for n in [8usize, 16, 32, 64] {
        for ctrl in [false, true] {
            let s = arith(format!(
                "kind = \"arithmetic\"\nop = \"compare\"\nrelation = \"<\"\nwidth = {n}\ncontrolled = {ctrl}\n"
            ));
            let want = n + ctrl as usize;
            row(
                &format!(
                    "compare a < b, {n}{}",
                    if ctrl { ", controlled" } else { "" }
                ),
                &s,
                &format!(
                    "{want} Toffoli, {} T (Gidney 2018's chain with carry-out)",
                    4 * want
                ),
                n <= 16,
            );
        }
    }
    for n in [8usize, 16, 32, 64] {
        let s = arith(format!(
            "kind = \"arithmetic\"\nop = \"add\"\nwidth = {n}\ncontrolled = true\n"
        ));
        row(
            &format!("add {n}, controlled"),
            &s,
            &format!("8n + O(1) = {} + O(1) T (Gidney 2018)", 8 * n),
            n <= 16,
        );
    }
    for (op, n, m, ctrl) in [
        ("subtract", 8usize, "", true),
        ("add", 8, "251", false),
        ("add", 8, "251", true),
        ("subtract", 8, "251", false),
        ("add", 16, "65521", false),
        ("subtract", 16, "65521", false),
    ] {
        let modulus = if m.is_empty() {
            String::new()
        } else {
            format!("modulus = {m}\n")
        };
        let s = arith(format!(
            "kind = \"arithmetic\"\nop = \"{op}\"\nwidth = {n}\ncontrolled = {ctrl}\n{modulus}"
        ));
        let name = format!(
            "{op} {n}{}{}",
            if m.is_empty() {
                String::new()
            } else {
                format!(" mod {m}")
            },
            if ctrl { ", controlled" } else { "" }
        );
        let published = if m.is_empty() {
            format!("8n + O(1) = {} + O(1) T (Gidney 2018)", 8 * n)
        } else {
            String::new()
        };
        row(&name, &s, &published, n <= 8);
    }
    for n in [4usize, 8] {
        let s = arith(format!(
            "kind = \"arithmetic\"\nop = \"multiply\"\nwidth = {n}\n"
        ));
        row(&format!("multiply {n} x {n}"), &s, "", n <= 4);
    }
    for w in [3usize, 6, 8] {
        let l = 1usize << w;
        for ctrl in [false, true] {
            let data: Vec<String> = (0..l)
                .map(|x| ((x * 53 + 7) % 255 + 1).to_string())
                .collect();
            let text = format!(
                "kind = \"arithmetic\"\nop = \"lookup\"\nwidth = {w}\ndata_width = 8\ncontrolled = {ctrl}\ndata = [{}]\n",
                data.join(", ")
            );
            let s = parse_spec("lookup", &text).unwrap();
            let published = if ctrl {
                format!("{} Toffoli, {} T (Babbush et al. 2018)", l - 1, 4 * (l - 1))
            } else {
                format!("{} (L - 2, no control)", l - 2)
            };
            row(
                &format!("lookup L = {l}{}", if ctrl { ", controlled" } else { "" }),
                &s,
                &published,
                true,
            );
        }
    }
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/specs");
    let mut paths: Vec<_> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .collect();
    paths.sort();
    for p in paths {
        let s = parse_spec("s", &std::fs::read_to_string(&p).unwrap()).unwrap();
        let name = p.file_stem().unwrap().to_string_lossy().to_string();
        row(&format!("{name} (auto)"), &s, "", true);
    }
}
