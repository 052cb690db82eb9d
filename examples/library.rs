//! The library API: build a spec in code, synthesize, verify, export.
//! Run with `cargo run --release --example library`.

use oraculum::{build, parse_spec, BuildOptions, Verification, VerifyOptions};

fn main() {
    // A spec is TOML text; here it is built in code: a 3-of-5 vote.
    let voters = ["ann", "ben", "cat", "dan", "eve"];
    let names: Vec<String> = voters.iter().map(|v| format!("\"{v}\"")).collect();
    let mut terms = Vec::new();
    for i in 0..5 {
        for j in i + 1..5 {
            for k in j + 1..5 {
                terms.push(format!("{} & {} & {}", voters[i], voters[j], voters[k]));
            }
        }
    }
    let text = format!(
        "kind = \"function\"\nname = \"vote\"\ninputs = [{}]\noutputs = [\"passed\"]\n[expr]\npassed = \"{}\"\n",
        names.join(", "),
        terms.join(" | ")
    );
    let spec = parse_spec("vote (built in code)", &text).expect("a valid spec");

    // Synthesize with every cheap method, verify each, keep the fewest Toffolis.
    let out = build(
        &spec,
        &BuildOptions {
            verify: Some(VerifyOptions::default()),
            ..Default::default()
        },
    )
    .expect("the build runs");
    match &out.verification {
        Verification::Ran(v) => println!(
            "{}: method {}, {}",
            spec.name.as_deref().unwrap_or("?"),
            out.method,
            v.summary()
        ),
        Verification::Skipped { .. } => println!("not verified"),
    }
    println!("{}", out.cost);
    for n in &out.notes {
        println!("note: {n}");
    }

    // Export: OpenQASM 2 text, ready for a simulator or compiler.
    let qasm = out.qasm().expect("a lowered circuit exports");
    println!(
        "\n{}",
        qasm.lines()
            .filter(|l| !l.starts_with("//"))
            .take(12)
            .collect::<Vec<_>>()
            .join("\n")
    );
    println!("... ({} lines in all)", qasm.lines().count());
}
