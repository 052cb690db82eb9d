//! Growth of reading and Bennett synthesis with the network's size, for
//! BENCHMARKS.md: networks of our own of 10^3 to about 10^6 nodes in three
//! shapes (a chain, a balanced tree, a random DAG whose nodes reuse the last
//! eight signals), each read from spec text, synthesized by `bennett`,
//! lowered, and counted; then the peak memory of each row's process and its
//! bytes per lowered gate. Each row runs in a child process of its own, so the
//! peak (`VmHWM` of `/proc/self/status`, Linux) is that row's alone.
//!
//! Run with `cargo bench --bench scale` (all rows) or
//! `cargo bench --bench scale -- row dag 100000` (one row).

use oraculum::synth::synthesize;
use oraculum::{lower, parse_spec, Method, SynthLimits};
use std::time::Instant;

const INPUTS: usize = 16;

fn main() {
    let args: Vec<String> = std::env::args().collect();
    if let Some(i) = args.iter().position(|a| a == "row") {
        let shape = &args[i + 1];
        let n: usize = args[i + 2].parse().expect("row SHAPE NODES");
        row(shape, n);
        return;
    }
    println!(
        "a lowered gate: {} bytes (`size_of::<Gate>()`, controls inline up to 3)\n",
        std::mem::size_of::<oraculum::Gate>()
    );
    println!("| shape | definitions | network nodes | read | bennett | lower | Toffoli | qubits | peak memory | bytes per lowered gate |");
    println!("|---|---|---|---|---|---|---|---|---|---|");
    let exe = std::env::current_exe().expect("the bench's own path");
    for shape in ["chain", "tree", "dag"] {
        // The spec reader caps a network at 1,000,000 nodes, inputs included;
        // the reader makes about two nodes of each definition.
        for n in [1_000usize, 10_000, 100_000, 499_000] {
            let out = std::process::Command::new(&exe)
                .args(["row", shape, &n.to_string()])
                .output()
                .expect("run one row");
            print!("{}", String::from_utf8_lossy(&out.stdout));
            if !out.status.success() {
                println!(
                    "| {shape} | {n} | failed: {} | | | | | | | |",
                    String::from_utf8_lossy(&out.stderr).trim()
                );
            }
        }
    }
}

/// One row: build the text, read it, synthesize, lower, report.
fn row(shape: &str, n: usize) {
    let text = network(shape, n);
    let t = Instant::now();
    let spec = parse_spec(shape, &text).expect("the generated spec reads");
    let read = t.elapsed().as_secs_f64();
    let nodes = match &spec.body {
        oraculum::SpecBody::Function(f) => f.dag.len(),
        _ => unreachable!("a function spec"),
    };
    drop(text);
    let limits = SynthLimits {
        max_gates: 100_000_000,
        ..SynthLimits::default()
    };
    let t = Instant::now();
    let s = synthesize(&spec, Method::Bennett, &limits, &()).expect("bennett builds it");
    let synth = t.elapsed().as_secs_f64();
    let t = Instant::now();
    let low = lower(&s.circuit);
    let lowering = t.elapsed().as_secs_f64();
    let gates = low.gates().len();
    let cost = oraculum::Cost::measure(&s.circuit, &low);
    let toffoli = cost.toffoli;
    let peak = peak_bytes();
    println!(
        "| {shape} | {n} | {nodes} | {read:.3} s | {synth:.3} s | {lowering:.3} s | {toffoli} | {} | {} MB | {} |",
        low.width(),
        peak / 1_000_000,
        peak / gates.max(1) as u64
    );
}

/// The process's peak resident memory in bytes (Linux; 0 elsewhere).
fn peak_bytes() -> u64 {
    let status = std::fs::read_to_string("/proc/self/status").unwrap_or_default();
    status
        .lines()
        .find_map(|l| l.strip_prefix("VmHWM:"))
        .and_then(|v| v.trim().trim_end_matches("kB").trim().parse::<u64>().ok())
        .map_or(0, |kb| kb * 1024)
}

/// A function spec of our own with `n` definitions of one AND each (in the
/// DAG an AND XORed with a third signal, so the function stays balanced
/// instead of collapsing to a constant; the tree's leaves read inputs of
/// their own), one output.
fn network(shape: &str, n: usize) -> String {
    let mut inputs: Vec<String> = (0..INPUTS).map(|i| format!("\"i{i}\"")).collect();
    if shape == "tree" {
        inputs.extend((0..2 * n).map(|i| format!("\"t{i}\"")));
    }
    let mut text = format!(
        "kind = \"function\"\nname = \"{shape}\"\ninputs = [{}]\noutputs = [\"o\"]\n[let]\n",
        inputs.join(", ")
    );
    let mut state = 0x5eed ^ n as u64;
    let mut next = move || {
        state ^= state << 13;
        state ^= state >> 7;
        state ^= state << 17;
        state as usize
    };
    let signal = |k: usize| -> String {
        if k < INPUTS {
            format!("i{k}")
        } else {
            format!("n{}", k - INPUTS)
        }
    };
    for k in 0..n {
        let me = k + INPUTS;
        let line = match shape {
            // Each node reads the one before it and an input.
            "chain" => format!("{} & {}", signal(me - 1), signal(k % INPUTS)),
            // Once the first half is built, node k reads nodes 2k - n and
            // 2k - n + 1 (each node is read once); the first half reads inputs.
            "tree" if 2 * k >= n && 2 * k + 1 - n < k => {
                format!("n{} & n{}", 2 * k - n, 2 * k + 1 - n)
            }
            // The tree's leaves read inputs of their own: an AND of every input.
            "tree" => format!("t{} & t{}", 2 * k, 2 * k + 1),
            // Three distinct signals of the last eight, read again and again.
            _ => {
                let i = 1 + next() % 8;
                let j = 1 + (i + next() % 7) % 8;
                let l = (1..=8).find(|&l| l != i && l != j).expect("8 > 2");
                format!(
                    "{} & {} ^ {}",
                    signal(me - i),
                    signal(me - j),
                    signal(me - l)
                )
            }
        };
        text.push_str(&format!("n{k} = \"{line}\"\n"));
    }
    // The tree's root is its last internal node (the last definition is a leaf).
    let root = if shape == "tree" { n - 2 } else { n - 1 };
    text.push_str(&format!("[expr]\no = \"n{root}\"\n"));
    text
}
