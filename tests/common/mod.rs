//! Shared proptest generators and test-side reference models (independent of the library's).
#![allow(dead_code)]

pub mod tables;

pub use tables::hex_table;

use proptest::prelude::*;

/// A test-side expression: rendered to text for the spec, evaluated on its own.
#[derive(Clone, Debug)]
pub enum TExpr {
    Var(usize),
    Const(bool),
    Not(Box<TExpr>, bool),
    Bin(char, Box<TExpr>, Box<TExpr>),
}

impl TExpr {
    pub fn render(&self, names: &[String]) -> String {
        match self {
            TExpr::Var(j) => names[*j].clone(),
            TExpr::Const(b) => (*b as u8).to_string(),
            TExpr::Not(e, tilde) => {
                format!("{}{}", if *tilde { "~" } else { "!" }, e.render_atom(names))
            }
            TExpr::Bin(op, a, b) => format!("({} {op} {})", a.render(names), b.render(names)),
        }
    }

    fn render_atom(&self, names: &[String]) -> String {
        match self {
            TExpr::Bin(..) => self.render(names),
            TExpr::Not(..) => format!("({})", self.render(names)),
            _ => self.render(names),
        }
    }

    pub fn eval(&self, x: u64) -> bool {
        match self {
            TExpr::Var(j) => (x >> j) & 1 == 1,
            TExpr::Const(b) => *b,
            TExpr::Not(e, _) => !e.eval(x),
            TExpr::Bin('&', a, b) => a.eval(x) && b.eval(x),
            TExpr::Bin('|', a, b) => a.eval(x) || b.eval(x),
            TExpr::Bin(_, a, b) => a.eval(x) ^ b.eval(x),
        }
    }
}

pub fn arb_expr(vars: usize) -> impl Strategy<Value = TExpr> {
    let leaf = prop_oneof![
        6 => (0..vars).prop_map(TExpr::Var),
        1 => any::<bool>().prop_map(TExpr::Const),
    ];
    leaf.prop_recursive(5, 24, 2, |inner| {
        prop_oneof![
            (inner.clone(), any::<bool>()).prop_map(|(e, t)| TExpr::Not(Box::new(e), t)),
            (
                prop::sample::select(vec!['&', '|', '^']),
                inner.clone(),
                inner
            )
                .prop_map(|(op, a, b)| TExpr::Bin(op, Box::new(a), Box::new(b))),
        ]
    })
}

#[derive(Clone, Debug)]
pub enum TOutput {
    Table(Vec<bool>),
    Expr(TExpr),
}

/// A random multi-output function, written as a spec by [`TFunction::to_toml`].
#[derive(Clone, Debug)]
pub struct TFunction {
    pub inputs: usize,
    pub outputs: Vec<TOutput>,
}

pub fn input_names(n: usize) -> Vec<String> {
    (0..n).map(|i| format!("in{i}")).collect()
}

impl TFunction {
    pub fn eval(&self, x: u64) -> Vec<bool> {
        self.outputs
            .iter()
            .map(|o| match o {
                TOutput::Table(bits) => bits[x as usize],
                TOutput::Expr(e) => e.eval(x),
            })
            .collect()
    }

    pub fn to_toml(&self) -> String {
        let names = input_names(self.inputs);
        let quoted: Vec<String> = names.iter().map(|n| format!("\"{n}\"")).collect();
        let outs: Vec<String> = (0..self.outputs.len())
            .map(|j| format!("\"out{j}\""))
            .collect();
        let mut s = format!(
            "kind = \"function\"\nname = \"random\"\ninputs = [{}]\noutputs = [{}]\n",
            quoted.join(", "),
            outs.join(", ")
        );
        s.push_str("[table]\n");
        for (j, o) in self.outputs.iter().enumerate() {
            if let TOutput::Table(bits) = o {
                s.push_str(&format!("out{j} = \"{}\"\n", hex_table(bits)));
            }
        }
        s.push_str("[expr]\n");
        for (j, o) in self.outputs.iter().enumerate() {
            if let TOutput::Expr(e) = o {
                s.push_str(&format!("out{j} = \"{}\"\n", e.render(&names)));
            }
        }
        s
    }
}

pub fn arb_function(max_inputs: usize, max_outputs: usize) -> impl Strategy<Value = TFunction> {
    (1..=max_inputs, 1..=max_outputs).prop_flat_map(|(n, m)| {
        let out = prop_oneof![
            prop::collection::vec(any::<bool>(), 1 << n).prop_map(TOutput::Table),
            arb_expr(n).prop_map(TOutput::Expr),
        ];
        prop::collection::vec(out, m).prop_map(move |outputs| TFunction { inputs: n, outputs })
    })
}

/// A random permutation of `0..2^w` for `w` in `1..=max_width`.
pub fn arb_permutation(max_width: usize) -> impl Strategy<Value = (usize, Vec<u64>)> {
    (1..=max_width).prop_flat_map(|w| {
        Just((0..1u64 << w).collect::<Vec<u64>>())
            .prop_shuffle()
            .prop_map(move |images| (w, images))
    })
}

pub fn permutation_toml(width: usize, images: &[u64]) -> String {
    let list: Vec<String> = images.iter().map(|v| v.to_string()).collect();
    format!(
        "kind = \"permutation\"\nwidth = {width}\nimages = [{}]\n",
        list.join(", ")
    )
}

/// Simulates an OpenQASM 2 text with the `qasmsim` crate (an outside simulator)
/// on one basis state: `set` lists the qubits (register, index) to flip from
/// |0>, and the result maps each register to its measured value.
pub fn qasmsim_run(qasm: &str, set: &[(String, usize)]) -> std::collections::HashMap<String, u64> {
    let mut header = String::new();
    let mut body = String::new();
    let mut regs = Vec::new();
    for line in qasm.lines() {
        if let Some(rest) = line.strip_prefix("qreg ") {
            let name = rest.split('[').next().unwrap().to_string();
            let size: usize = rest
                .split('[')
                .nth(1)
                .unwrap()
                .trim_end_matches("];")
                .parse()
                .unwrap();
            regs.push((name, size));
            header.push_str(line);
            header.push('\n');
        } else if regs.is_empty() {
            header.push_str(line);
            header.push('\n');
        } else {
            body.push_str(line);
            body.push('\n');
        }
    }
    let mut src = header;
    for (name, size) in &regs {
        src.push_str(&format!("creg c_{name}[{size}];\n"));
    }
    for (name, i) in set {
        src.push_str(&format!("x {name}[{i}];\n"));
    }
    src.push_str(&body);
    for (name, _) in &regs {
        src.push_str(&format!("measure {name} -> c_{name};\n"));
    }
    let run = qasmsim::run(&src, Some(1)).expect("qasmsim runs the file");
    regs.iter()
        .map(|(name, _)| (name.clone(), run.memory()[&format!("c_{name}")]))
        .collect()
}

/// A plain per-state simulator for circuits of any width: sets registers from
/// `inputs` (ancillae and unnamed registers at 0), runs every gate, and returns
/// every register's value (registers up to 128 bits).
pub fn run_registers(
    c: &oraculum::Circuit,
    inputs: &[(&str, u128)],
) -> std::collections::HashMap<String, u128> {
    let mut v = vec![false; c.width()];
    for (i, l) in c.lines().iter().enumerate() {
        if let Some((_, val)) = inputs.iter().find(|(n, _)| *n == l.register) {
            v[i] = l.index < 128 && (val >> l.index) & 1 == 1;
        }
    }
    for g in c.gates() {
        if g.controls()
            .iter()
            .all(|ctl| v[ctl.line.index()] == ctl.positive)
        {
            let t = g.target().index();
            v[t] = !v[t];
        }
    }
    let mut out = std::collections::HashMap::new();
    for (i, l) in c.lines().iter().enumerate() {
        let e = out.entry(l.register.clone()).or_insert(0u128);
        if v[i] && l.index < 128 {
            *e |= 1u128 << l.index;
        }
    }
    out
}

/// A one-output function spec `f = expr` over `names` as TOML text.
pub fn expr_toml(names: &[String], expr: &str) -> String {
    let quoted: Vec<String> = names.iter().map(|n| format!("\"{n}\"")).collect();
    format!(
        "kind = \"function\"\ninputs = [{}]\noutputs = [\"f\"]\n[expr]\nf = \"{expr}\"\n",
        quoted.join(", ")
    )
}

/// An arithmetic spec as TOML text.
pub fn arith_toml(op: &str, width: usize, extra: &str) -> String {
    format!("kind = \"arithmetic\"\nop = \"{op}\"\nwidth = {width}\n{extra}\n")
}

/// A random circuit of MCT gates with mixed polarities on `lines` lines.
pub fn arb_circuit(lines: usize, gates: usize) -> impl Strategy<Value = oraculum::Circuit> {
    let gate = (
        0..lines as u32,
        prop::collection::vec((0..lines as u32, any::<bool>()), 0..4),
    )
        .prop_filter_map("distinct lines", |(t, cs)| {
            let controls: Vec<oraculum::Control> = cs
                .into_iter()
                .map(|(l, p)| oraculum::Control {
                    line: oraculum::Line(l),
                    positive: p,
                })
                .collect();
            oraculum::Gate::new(controls, oraculum::Line(t))
        });
    prop::collection::vec(gate, 0..=gates).prop_map(move |gs| {
        let info = (0..lines)
            .map(|i| oraculum::LineInfo {
                register: "x".into(),
                index: i as u32,
                role: oraculum::Role::Data,
                label: String::new(),
            })
            .collect();
        oraculum::Circuit::from_parts(info, gs).unwrap()
    })
}

/// The repository's root folder.
pub fn repo() -> std::path::PathBuf {
    std::path::PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// The fields of the cost report in JSON (docs/json.md).
pub const COST_FIELDS: [&str; 11] = [
    "qubits",
    "mct",
    "toffoli",
    "temporary_and",
    "measured",
    "toffoli_equivalent",
    "cnot",
    "not",
    "depth",
    "toffoli_depth",
    "t_count",
];

/// Runs the real binary in `dir`, with the exact-synthesis cache in a
/// temporary folder rather than the user's home.
pub fn run_in(dir: &std::path::Path, args: &[&str]) -> std::process::Output {
    std::process::Command::new(env!("CARGO_BIN_EXE_oraculum"))
        .current_dir(dir)
        .env(
            "ORACULUM_CACHE",
            std::env::temp_dir().join("oraculum-test-cache"),
        )
        .args(args)
        .output()
        .expect("the binary runs")
}

/// Standard output and standard error as text.
pub fn text(o: &std::process::Output) -> (String, String) {
    (
        String::from_utf8_lossy(&o.stdout).into_owned(),
        String::from_utf8_lossy(&o.stderr).into_owned(),
    )
}

/// A temporary folder holding a copy of `specs/`, like a fresh clone.
pub fn workspace() -> tempfile::TempDir {
    let dir = tempfile::tempdir().unwrap();
    std::fs::create_dir(dir.path().join("specs")).unwrap();
    for e in std::fs::read_dir(repo().join("specs")).unwrap() {
        let e = e.unwrap();
        std::fs::copy(e.path(), dir.path().join("specs").join(e.file_name())).unwrap();
    }
    dir
}

/// Installs, once per test binary, a table handle whose 4-line tables live
/// in the build's temporary folder (built there once, then read), the way the
/// binary keeps them in the user's cache. A test that runs before any other
/// asks for a table may call it; calling it later is harmless.
pub fn tables() {
    static ONCE: std::sync::Once = std::sync::Once::new();
    ONCE.call_once(|| {
        let dir = std::path::PathBuf::from(env!("CARGO_TARGET_TMPDIR")).join("tables");
        let _ = oraculum::Tables::stored(dir).install();
    });
}
