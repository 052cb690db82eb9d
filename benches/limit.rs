//! The machine's AND/XOR limit on one core, and the verifier's block kernels measured against it.
//!
//! Run with `cargo bench --bench limit`. Prints, each in gate x basis-state
//! evaluations per second (one `t ^= a & b` on one state is one) and as a
//! ratio to the limit: the limit itself (a `t ^= a & b` microkernel over rows
//! in L1, at every CPU level this machine runs); the gate program on random
//! Toffoli/CNOT circuits for rows of 64, 128 and 256 words and 10 to 64 lines;
//! the word program on a random 1,000-node DAG; the ripple-carry adder
//! reference; and the whole check (simulate, reference, compare) through the
//! public `verify` on one thread next to the same check built from the new
//! kernels.
//!
//! Each figure is the best of 300 rounds of about 1 ms (or one call, when a
//! call takes longer), and each ratio is to the limit's best over rounds of
//! the same length taken in turn with the figure's: the machine is shared,
//! and a round another process interrupts only runs slower.
//! Sections can be picked: `cargo bench --bench limit -- gates dag adder whole arith`.
//!
//! The kernels are compiled into this benchmark from their source files: they
//! use nothing from the rest of the crate.

#[path = "../src/verify/kernel.rs"]
mod kernel;
#[path = "../src/verify/program.rs"]
mod program;
// Bench targets see the files' test modules (with their tests cut), whose helpers go unused here.
#[allow(unused_imports)]
#[path = "../src/verify/ripple.rs"]
mod ripple;

mod common;
use common::*;

use kernel::{dispatched, Dispatch, GateProgram, Level, Literal};
use oraculum::logic::{Dag, Term};
use oraculum::pipeline::build_one;
use oraculum::spec::OutputDef;
use oraculum::synth::synthesize;
use oraculum::{
    lower, parse_spec, verify, BuildOptions, Circuit, Method, SpecBody, SynthLimits, Verdict,
    VerifyOptions,
};
use program::{Node, Scratch, WordProgram};
use std::hint::black_box;
use std::time::Instant;

/// Calls of `f` that take about 1 ms.
fn calibrate(f: &mut dyn FnMut()) -> u64 {
    let mut calls = 1u64;
    loop {
        let t = Instant::now();
        for _ in 0..calls {
            f();
        }
        let spent = t.elapsed().as_secs_f64();
        if spent > 2e-4 {
            return ((calls as f64 * 1e-3 / spent) as u64).max(1);
        }
        calls *= 2;
    }
}

/// Seconds of `calls` calls of `f`.
fn round(f: &mut dyn FnMut(), calls: u64) -> f64 {
    let t = Instant::now();
    for _ in 0..calls {
        f();
    }
    t.elapsed().as_secs_f64()
}

/// Rounds per figure. The machine is shared: a round that another process
/// interrupts or whose cache it spoils runs slow, so a figure is the fastest
/// of many short rounds, which is the speed of the code when it has the core.
const ROUNDS: usize = 300;

/// Best work per second of `f` (`work` per call) over [`ROUNDS`] rounds of about 1 ms.
fn rate(work: f64, mut f: impl FnMut()) -> f64 {
    let calls = calibrate(&mut f);
    let best = (0..ROUNDS)
        .map(|_| round(&mut f, calls))
        .fold(f64::MAX, f64::min);
    calls as f64 * work / best
}

/// The limit kernel, run in turn with each figure, so that both see the same machine.
struct Meter {
    limit: Box<dyn FnMut() + Send>,
    work: f64,
    calls: u64,
}

impl Meter {
    /// (best rate, its ratio to the best rate of the limit in the same rounds) of `f`, `work` per call.
    /// The limit's rounds are made as long as the figure's (a call of the
    /// whole check can take several ms): on a shared machine a longer round
    /// is more often interrupted, and rounds of unequal length would
    /// favour the shorter.
    fn measure(&mut self, work: f64, mut f: impl FnMut()) -> (f64, f64) {
        let calls = calibrate(&mut f);
        let figure = (0..3)
            .map(|_| round(&mut f, calls))
            .fold(f64::MAX, f64::min);
        let one = round(&mut self.limit, self.calls) / self.calls as f64;
        let limit_calls = self.calls.max((figure / one) as u64);
        let (mut limit, mut best) = (f64::MAX, f64::MAX);
        for _ in 0..ROUNDS {
            limit = limit.min(round(&mut self.limit, limit_calls));
            best = best.min(round(&mut f, calls));
        }
        let r = calls as f64 * work / best;
        (r, r / (limit_calls as f64 * self.work / limit))
    }
}

dispatched! {
    /// `passes` rounds of `t ^= a & b`: two source rows, eight target rows in turn.
    fn and_xor<const W: usize>(rows: &mut [[u64; W]], passes: usize) {
        let (sources, targets) = rows.split_at_mut(2);
        let (a, b) = (&sources[0], &sources[1]);
        for p in 0..passes {
            let t = &mut targets[p % 8];
            for k in 0..W {
                t[k] ^= a[k] & b[k];
            }
        }
    }
}

/// The limit kernel at `W` words a row: the call and its work in gate x states.
fn limit_kernel<const W: usize>(d: Dispatch) -> (Box<dyn FnMut() + Send>, f64) {
    let mut rng = Mix(1);
    let mut rows: Vec<[u64; W]> = (0..10)
        .map(|_| std::array::from_fn(|_| rng.next()))
        .collect();
    let passes = 512;
    let f = move || and_xor::<W>(d, black_box(&mut rows), passes);
    (Box::new(f), (passes * W * 64) as f64)
}

/// A random circuit of Toffoli (`toffoli` in 10) and CNOT gates with random polarities.
fn random_program(
    rng: &mut Mix,
    width: usize,
    gates: usize,
    toffoli: u64,
    mixed: bool,
    d: Dispatch,
) -> GateProgram {
    let mut p = GateProgram::new(width, d).unwrap();
    for _ in 0..gates {
        let t = (rng.next() % width as u64) as u32;
        let mut other = || loop {
            let l = (rng.next() % width as u64) as u32;
            if l != t {
                break l;
            }
        };
        let (a, b) = (other(), other());
        let r = rng.next();
        let lit = |l: u32, r: u64| Literal {
            line: l,
            positive: !mixed || r & 1 == 0,
        };
        if r % 10 < toffoli {
            p.push(t, &[lit(a, r >> 8), lit(b, r >> 9)]).unwrap();
        } else {
            p.push(t, &[lit(a, r >> 8)]).unwrap();
        }
    }
    p
}

/// (rate, ratio) of `p` on one block of `W` words, in gate x states.
fn gate_rate<const W: usize>(meter: &mut Meter, p: &GateProgram) -> (f64, f64) {
    let mut rng = Mix(2);
    let mut rows: Vec<[u64; W]> = (0..p.width())
        .map(|_| std::array::from_fn(|_| rng.next()))
        .collect();
    meter.measure((p.gates() * W * 64) as f64, || {
        p.run_block::<W>(black_box(&mut rows)).unwrap()
    })
}

fn random_dag(rng: &mut Mix, size: usize, vars: u32) -> Vec<Node> {
    let mut nodes: Vec<Node> = (0..vars).map(Node::Var).collect();
    while nodes.len() < size {
        let i = nodes.len();
        // Mostly recent nodes as children, as in expressions written by people.
        let k = 2 + (rng.next() % 3) as usize;
        let children: Vec<u32> = (0..k)
            .map(|_| {
                let reach = if rng.next() & 3 == 0 { i } else { i.min(16) };
                (i as u64 - 1 - rng.next() % reach as u64) as u32
            })
            .collect();
        nodes.push(match rng.next() % 7 {
            0 => Node::Not(children[0]),
            1..=2 => Node::And(children),
            3..=4 => Node::Xor(children),
            _ => Node::Or(children),
        });
    }
    nodes
}

/// Two-operand operations of a DAG as written (an `n`-operand AND counts `n - 1`).
fn binary_ops(nodes: &[Node]) -> usize {
    nodes
        .iter()
        .map(|n| match n {
            Node::And(v) | Node::Or(v) | Node::Xor(v) => v.len().saturating_sub(1),
            _ => 0,
        })
        .sum()
}

/// (rate, ratio, program) of `nodes` at `W` words, in DAG operations x states.
fn dag_rate<const W: usize>(
    meter: &mut Meter,
    nodes: &[Node],
    outputs: &[u32],
    d: Dispatch,
) -> (f64, f64, WordProgram) {
    let p = WordProgram::compile(nodes, outputs, W, d).unwrap();
    let mut scratch = Scratch::new();
    let mut out = vec![[0u64; W]; p.outputs()];
    let mut first = 0u64;
    let (r, q) = meter.measure((binary_ops(nodes) * W * 64) as f64, || {
        p.evaluate::<W>(first, &mut scratch, &mut out).unwrap();
        first += W as u64;
        black_box(&out);
    });
    (r, q, p)
}

/// The spec's expression graph as the kernel's nodes.
fn nodes_of(dag: &Dag) -> Vec<Node> {
    dag.terms()
        .iter()
        .map(|t| match *t {
            Term::Const(b) => Node::Const(b),
            Term::Var(j) => Node::Var(j),
            Term::Not(a) => Node::Not(a),
            Term::And(_) => Node::And(dag.operands(t).to_vec()),
            Term::Or(_) => Node::Or(dag.operands(t).to_vec()),
            Term::Xor(_) => Node::Xor(dag.operands(t).to_vec()),
        })
        .collect()
}

fn lines(c: &Circuit, register: &str) -> Vec<usize> {
    c.register(register).iter().map(|l| l.index()).collect()
}

fn gate_program(c: &Circuit, d: Dispatch) -> GateProgram {
    let mut p = GateProgram::new(c.width(), d).unwrap();
    for g in c.gates() {
        let controls: Vec<Literal> = g
            .controls()
            .iter()
            .map(|x| Literal {
                line: x.line.0,
                positive: x.positive,
            })
            .collect();
        p.push(g.target().0, &controls).unwrap();
    }
    p
}

/// One block of the new check of `|x>|y> -> |x>|y ^ f(x)>`: patterns in,
/// simulate, evaluate `f`, compare. Returns the OR of the wrong states' bits.
fn function_block<const W: usize>(
    p: &GateProgram,
    f: &WordProgram,
    (x, y, anc): (&[usize], usize, &[usize]),
    first: u64,
    rows: &mut [[u64; W]],
    scratch: &mut Scratch<W>,
    out: &mut [[u64; W]],
) -> u64 {
    for &l in anc {
        rows[l] = [0; W];
    }
    for (j, &l) in x.iter().enumerate() {
        program::pattern::<W>(&mut rows[l], j as u32, first);
    }
    let n = x.len() as u32;
    program::pattern::<W>(&mut rows[y], n, first);
    p.run_block::<W>(rows).unwrap();
    f.evaluate::<W>(first, scratch, out).unwrap();
    let mut bad = 0;
    for k in 0..W {
        bad |= rows[y][k] ^ program::pattern_word(n, first + k as u64) ^ out[0][k];
    }
    for (j, &l) in x.iter().enumerate() {
        for (k, v) in rows[l].iter().enumerate() {
            bad |= v ^ program::pattern_word(j as u32, first + k as u64);
        }
    }
    for &l in anc {
        for v in &rows[l] {
            bad |= v;
        }
    }
    bad
}

/// One block of the new check of `|a>|b>|c> -> |a>|a + b>|c ^ carry>`.
fn adder_block<const W: usize>(
    p: &GateProgram,
    d: Dispatch,
    (a, b, cout, anc): (&[usize], &[usize], usize, &[usize]),
    first: u64,
    rows: &mut [[u64; W]],
    inputs: &mut [[u64; W]],
    sum: &mut [[u64; W]],
) -> u64 {
    let w = a.len();
    for (j, r) in inputs.iter_mut().enumerate() {
        program::pattern::<W>(r, j as u32, first);
    }
    for (j, &l) in a.iter().chain(b).chain([&cout]).enumerate() {
        rows[l] = inputs[j];
    }
    for &l in anc {
        rows[l] = [0; W];
    }
    p.run_block::<W>(rows).unwrap();
    let mut carry = [0u64; W];
    ripple::add::<W>(d, &inputs[..w], &inputs[w..2 * w], sum, &mut carry).unwrap();
    let mut bad = 0;
    for k in 0..W {
        bad |= rows[cout][k] ^ inputs[2 * w][k] ^ carry[k];
    }
    for j in 0..w {
        for k in 0..W {
            bad |= (rows[a[j]][k] ^ inputs[j][k]) | (rows[b[j]][k] ^ sum[j][k]);
        }
    }
    for &l in anc {
        for v in &rows[l] {
            bad |= v;
        }
    }
    bad
}

/// The per-state reference of the present verifier for `add` with carry-out
/// (values unpacked per state into a new vector, the result scattered back
/// bit by bit), replicated here to time it: the expected words of one word of states.
fn per_state_adder_word(w: usize, word: u64, out: &mut Vec<u64>) {
    out.clear();
    out.resize(2 * w + 1, 0);
    let layout = [w, w, 1];
    #[allow(clippy::useless_vec)] // as the present verifier allocates it, once a word
    let mut values = vec![0u64; 3];
    for k in 0..64u64 {
        let s = word * 64 + k;
        let mut shift = 0;
        for (v, width) in values.iter_mut().zip(layout) {
            *v = (s >> shift) & ((1u64 << width) - 1);
            shift += width;
        }
        let mut result = values.to_vec();
        let (x, y) = (values[0] as u128, values[1] as u128);
        result[1] = ((x + y) & ((1 << w) - 1)) as u64;
        result[2] ^= ((x + y) >> w) as u64;
        let mut bit = 0;
        for (v, width) in result.iter().zip(layout) {
            for j in 0..width {
                out[bit] |= ((v >> j) & 1) << k;
                bit += 1;
            }
        }
    }
}

/// The structural circuit of an arithmetic spec, lowered, not verified.
fn arith_circuit(spec: &oraculum::Spec) -> Circuit {
    build_one(
        spec,
        Method::Structural,
        &BuildOptions {
            verify: None,
            ..Default::default()
        },
        &(),
    )
    .unwrap()
    .lowered
}

fn one_thread<T: Send>(f: impl FnOnce() -> T + Send) -> T {
    rayon::ThreadPoolBuilder::new()
        .num_threads(1)
        .build()
        .unwrap()
        .install(f)
}

fn main() {
    let best = Dispatch::best();
    println!(
        "levels this CPU runs: {}; best: {}. Rates are the best of {ROUNDS} rounds of about 1 ms on one thread; each ratio is to the limit's best in rounds taken in turn with it.",
        Dispatch::available()
            .iter()
            .map(|d| d.level().name())
            .collect::<Vec<_>>()
            .join(", "),
        best.level().name()
    );

    // 1. The limit: t ^= a & b, two source rows and eight targets in L1.
    let mut top = (0.0, 64usize);
    for d in Dispatch::available() {
        let mut line = format!("limit, {:8}:", d.level().name());
        for w in [64usize, 128, 256, 512] {
            let (mut f, work) = match w {
                64 => limit_kernel::<64>(d),
                128 => limit_kernel::<128>(d),
                256 => limit_kernel::<256>(d),
                _ => limit_kernel::<512>(d),
            };
            let r = rate(work, &mut f);
            line += &format!(" W={w} {r:.3e}");
            if d == best && r > top.0 {
                top = (r, w);
            }
        }
        println!("{line} gate x state/s");
    }
    let (limit, work) = match top.1 {
        64 => limit_kernel::<64>(best),
        128 => limit_kernel::<128>(best),
        256 => limit_kernel::<256>(best),
        _ => limit_kernel::<512>(best),
    };
    let mut calls_of = limit;
    let calls = calibrate(&mut calls_of);
    let mut meter = Meter {
        limit: calls_of,
        work,
        calls,
    };
    println!(
        "LIMIT: {} at W={}: {:.3e} gate x state/s",
        best.level().name(),
        top.1,
        top.0
    );

    // Sections named on the command line (`cargo bench --bench limit -- gates dag`), or all.
    let args: Vec<String> = std::env::args()
        .skip(1)
        .filter(|a| !a.starts_with('-'))
        .collect();
    let wants = |s: &str| args.is_empty() || args.iter().any(|a| a == s);
    let mut rng = Mix(3);
    const W: usize = 128;

    // 2. The gate program on random Toffoli/CNOT circuits.
    if wants("gates") {
        println!("\nrun_block, random circuits of 2,000 Toffoli/CNOT gates (60/40), random polarities, gate x state/s (ratio):");
        println!("lines  level     W=64              W=128             W=256");
        for width in [10usize, 16, 20, 25, 30, 40, 48, 64] {
            let base = random_program(&mut rng, width, 2000, 6, true, best);
            for d in Dispatch::available() {
                if d != best && width != 25 {
                    continue;
                }
                let p = base.clone().with_dispatch(d);
                let r = [
                    gate_rate::<64>(&mut meter, &p),
                    gate_rate::<128>(&mut meter, &p),
                    gate_rate::<256>(&mut meter, &p),
                ];
                println!(
                    "{width:5}  {:8}  {:.3e} ({:.2})  {:.3e} ({:.2})  {:.3e} ({:.2})",
                    d.level().name(),
                    r[0].0,
                    r[0].1,
                    r[1].0,
                    r[1].1,
                    r[2].0,
                    r[2].1
                );
            }
        }

        for (what, toffoli, mixed) in [
            ("Toffoli gates only, random polarities", 10, true),
            ("Toffoli/CNOT (60/40), positive controls", 6, false),
        ] {
            println!("{what}:");
            for width in [20usize, 25, 30] {
                let p = random_program(&mut rng, width, 2000, toffoli, mixed, best);
                let r = [
                    gate_rate::<64>(&mut meter, &p),
                    gate_rate::<128>(&mut meter, &p),
                    gate_rate::<256>(&mut meter, &p),
                ];
                println!(
                    "{width:5}  {:8}  {:.3e} ({:.2})  {:.3e} ({:.2})  {:.3e} ({:.2})",
                    best.level().name(),
                    r[0].0,
                    r[0].1,
                    r[1].0,
                    r[1].1,
                    r[2].0,
                    r[2].1
                );
            }
        }
    }

    // 3. The word program on a random 1,000-node DAG.
    if wants("dag") {
        let nodes = random_dag(&mut rng, 1000, 20);
        let outputs: Vec<u32> = (990..1000).collect();
        println!(
        "\nword program, random 1,000-node DAG over 20 variables, 10 outputs, {} two-operand operations; operation x state/s (ratio):",
        binary_ops(&nodes)
    );
        for d in Dispatch::available() {
            let (r16, q16, p16) = dag_rate::<16>(&mut meter, &nodes, &outputs, d);
            let (r64, q64, p64) = dag_rate::<64>(&mut meter, &nodes, &outputs, d);
            let (r128, q128, p128) = dag_rate::<128>(&mut meter, &nodes, &outputs, d);
            println!(
            "{:8}  W=16 {r16:.3e} ({q16:.2}), W=64 {r64:.3e} ({q64:.2}), W=128 {r128:.3e} ({q128:.2}); row passes {}/{}/{}, registers {}/{}/{}",
            d.level().name(),
            p16.row_passes(),
            p64.row_passes(),
            p128.row_passes(),
            p16.registers(),
            p64.registers(),
            p128.registers(),
        );
        }
    }

    // 4. The ripple-carry reference for a 16-bit add with carry-out.
    if wants("adder") {
        let n = 16;
        println!("\nadder reference, 16-bit a + b with carry-out, W={W}:");
        let mut inputs = vec![[0u64; W]; 2 * n];
        for (j, r) in inputs.iter_mut().enumerate() {
            program::pattern::<W>(r, j as u32, 5 * W as u64);
        }
        for d in Dispatch::available() {
            let mut sum = vec![[0u64; W]; n];
            let mut carry = [0u64; W];
            let (r, q) = meter.measure((n * W * 64) as f64, || {
                ripple::add::<W>(d, &inputs[..n], &inputs[n..], &mut sum, &mut carry).unwrap();
                black_box(&sum);
            });
            // One full adder bit is one pass over the rows, like one gate.
            println!(
                "{:8}  {:.3e} states/s = {r:.3e} bit x state/s ({q:.2} of the limit)",
                d.level().name(),
                r / n as f64,
            );
        }
        let mut out = Vec::new();
        let mut word = 0u64;
        let per_state = rate(64.0, || {
            per_state_adder_word(n, black_box(word), &mut out);
            black_box(&out);
            word = (word + 1) & ((1 << (2 * n + 1 - 6)) - 1);
        });
        println!(
            "per-state reference of the present verifier (replicated): {per_state:.3e} states/s"
        );
    }

    // 5. The whole check, present and new, one thread.
    if wants("whole") {
        let spec = parse_spec("bench", &xor_of_products(&mut Mix(7), 20, 200)).unwrap();
        let c = lower(
            &synthesize(&spec, Method::ReedMuller, &SynthLimits::default(), &())
                .unwrap()
                .circuit,
        );
        let states = 1u64 << 21;
        let work = states as f64 * c.gates().len() as f64;
        println!(
        "\nwhole check, 20-input function (xor of 200 products), {} lines, {} gates, {states} states, 1 thread, gate x state/s:",
        c.width(),
        c.gates().len()
    );
        let (old, q) = one_thread(|| {
            meter.measure(work, || {
                let v = verify(&c, &spec, &VerifyOptions::default()).unwrap();
                assert!(matches!(v, Verdict::Proven { .. }));
            })
        });
        println!("oraculum verify: {old:.3e} ({q:.2} of the limit)");
        let SpecBody::Function(f) = &spec.body else {
            unreachable!()
        };
        let OutputDef::Expr(top) = f.outputs[0].def else {
            unreachable!()
        };
        let nodes = nodes_of(&f.dag);
        let (x, y, anc) = (lines(&c, "x"), lines(&c, "y")[0], lines(&c, "anc"));
        for d in Dispatch::available() {
            let p = gate_program(&c, d);
            let fp = WordProgram::compile(&nodes, &[top], W, d).unwrap();
            let mut rows = vec![[0u64; W]; c.width()];
            let (mut scratch, mut out) = (Scratch::new(), vec![[0u64; W]; 1]);
            let (r, q) = meter.measure(work, || {
                let mut bad = 0;
                for b in 0..states / 64 / W as u64 {
                    let io = (&x[..], y, &anc[..]);
                    bad |= function_block::<W>(
                        &p,
                        &fp,
                        io,
                        b * W as u64,
                        &mut rows,
                        &mut scratch,
                        &mut out,
                    );
                }
                assert_eq!(bad, 0);
            });
            println!(
            "new kernels, {:8} (W={W}; {} gates with controls; {} expression operations in {} row passes, {} registers): {r:.3e} ({q:.2} of the limit, {:.1}x present)",
            d.level().name(),
            p.gates(),
            binary_ops(&nodes),
            fp.row_passes(),
            fp.registers(),
            r / old
        );
        }
    }

    // 6. Arithmetic specs through the public `verify` on one thread.
    if wants("arith") {
        println!("\nwhole check, arithmetic specs (structural circuits), 1 thread:");
        for (what, w, text) in [
            ("adder with carry-out", 10, "op = \"add\"\ncarry_out = true"),
            ("adder with carry-out", 12, "op = \"add\"\ncarry_out = true"),
            ("comparator a < b", 10, "op = \"compare\"\nrelation = \"<\""),
            ("comparator a < b", 12, "op = \"compare\"\nrelation = \"<\""),
            ("subtractor", 12, "op = \"subtract\""),
        ] {
            let spec = parse_spec(
                "arith",
                &format!("kind = \"arithmetic\"\nwidth = {w}\n{text}\n"),
            )
            .unwrap();
            let c = arith_circuit(&spec);
            let bits = oraculum::verify::free_lines(&c, &spec).unwrap();
            let states = 1u64 << bits;
            let work = states as f64 * c.gates().len() as f64;
            let (old, q) = one_thread(|| {
                meter.measure(work, || {
                    let v = verify(&c, &spec, &VerifyOptions::default()).unwrap();
                    assert!(matches!(v, Verdict::Proven { .. }));
                })
            });
            println!(
                "{w:2}-bit {what:20}: {bits} inputs, {} lines, {:3} gates: oraculum verify {:.3e} states/s, {old:.3e} gate x state/s ({q:.2} of the limit)",
                c.width(),
                c.gates().len(),
                old / c.gates().len() as f64
            );
        }

        // The materialized check of the 10-bit adder built from the kernels
        // (inputs, circuit, expected rows, comparison, each a pass over rows),
        // the route arithmetic specs took before the fused check.
        let w = 10;
        let spec = parse_spec(
            "add",
            &format!("kind = \"arithmetic\"\nop = \"add\"\nwidth = {w}\ncarry_out = true\n"),
        )
        .unwrap();
        let c = arith_circuit(&spec);
        let states = 1u64 << (2 * w + 1);
        let work = states as f64 * c.gates().len() as f64;
        let (a, b, cout, anc) = (
            lines(&c, "a"),
            lines(&c, "b"),
            lines(&c, "cout")[0],
            lines(&c, "anc"),
        );
        for d in Dispatch::available() {
            let p = gate_program(&c, d);
            let mut rows = vec![[0u64; W]; c.width()];
            let mut inputs = vec![[0u64; W]; 2 * w + 1];
            let mut sum = vec![[0u64; W]; w];
            let (r, q) = meter.measure(work, || {
                let mut bad = 0;
                for blk in 0..states / 64 / W as u64 {
                    let io = (&a[..], &b[..], cout, &anc[..]);
                    bad |= adder_block::<W>(
                        &p,
                        d,
                        io,
                        blk * W as u64,
                        &mut rows,
                        &mut inputs,
                        &mut sum,
                    );
                }
                assert_eq!(bad, 0);
            });
            println!(
                "materialized check, 10-bit adder, {:8}: {:.3e} states/s, {r:.3e} gate x state/s ({q:.2} of the limit)",
                d.level().name(),
                r / c.gates().len() as f64,
            );
        }
    }
    let _ = Level::ALL;
}
