//! The user's first five minutes: drawings, JSON from every command,
//! completions and the manual, and the README walkthrough run as written.

mod common;

use common::{repo, run_in, COST_FIELDS};

/// The demo specs and the small drawing example, in a temporary folder.
fn workspace() -> tempfile::TempDir {
    let dir = common::workspace();
    std::fs::copy(
        repo().join("tests/data/small.qasm"),
        dir.path().join("small.qasm"),
    )
    .unwrap();
    dir
}

#[test]
fn terminal_drawing_matches_the_stored_one() {
    let dir = workspace();
    let o = run_in(dir.path(), &["draw", "small.qasm", "--width", "80"]);
    assert_eq!(o.status.code(), Some(0));
    let got = String::from_utf8(o.stdout).unwrap();
    let got: String = got.lines().skip(1).map(|l| format!("{l}\n")).collect();
    let want = std::fs::read_to_string(repo().join("tests/data/small.draw.txt")).unwrap();
    assert_eq!(got, want, "\n--- got ---\n{got}--- want ---\n{want}");
    // Narrow terminals wrap into labelled sections, each line within the width.
    let o = run_in(
        dir.path(),
        &["draw", "specs/shift-rota.toml", "--width", "40"],
    );
    let text = String::from_utf8(o.stdout).unwrap();
    assert!(text.contains("gates 1-"), "{text}");
    assert!(text.lines().all(|l| l.chars().count() <= 40), "{text}");
}

#[test]
fn svg_is_xml_with_one_element_per_gate() {
    let dir = workspace();
    for (input, lowered) in [
        ("small.qasm", false),
        ("specs/greenhouse.toml", false),
        ("specs/greenhouse.toml", true),
    ] {
        let mut args = vec!["draw", input, "--svg", "out.svg"];
        if lowered {
            args.push("--lowered");
        }
        let o = run_in(dir.path(), &args);
        assert_eq!(o.status.code(), Some(0), "{o:?}");
        let svg = std::fs::read_to_string(dir.path().join("out.svg")).unwrap();
        let doc = roxmltree::Document::parse(&svg).expect("the SVG parses as XML");
        let gates = doc
            .descendants()
            .filter(|n| n.has_tag_name("g") && n.attribute("class") == Some("gate"))
            .count();
        let mut json_args = vec!["draw", input, "--json"];
        if lowered {
            json_args.push("--lowered");
        }
        let o = run_in(dir.path(), &json_args);
        let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
        assert_eq!(gates, v["gates"].as_array().unwrap().len(), "{input}");
        assert!(gates > 0);
    }
}

/// The SVG layout puts gates on disjoint lines in one column and ends with
/// a legend of the symbols it uses; `draw` of a file the tool wrote takes the
/// line names from its header comments and draws the phase wrapper.
#[test]
fn svg_columns_legend_and_header_names() {
    let dir = workspace();
    std::fs::write(
        dir.path().join("pairs.qasm"),
        "OPENQASM 2.0;\ninclude \"qelib1.inc\";\nqreg q[4];\ncx q[0],q[1];\ncx q[2],q[3];\ncx q[1],q[2];\n",
    )
    .unwrap();
    let o = run_in(dir.path(), &["draw", "pairs.qasm", "--svg", "p.svg"]);
    assert_eq!(o.status.code(), Some(0), "{o:?}");
    let svg = std::fs::read_to_string(dir.path().join("p.svg")).unwrap();
    let doc = roxmltree::Document::parse(&svg).unwrap();
    let x_of: Vec<String> = doc
        .descendants()
        .filter(|n| n.attribute("class") == Some("gate"))
        .map(|g| {
            g.descendants()
                .find(|n| n.has_tag_name("circle"))
                .and_then(|c| c.attribute("cx"))
                .unwrap()
                .to_string()
        })
        .collect();
    assert_eq!(x_of.len(), 3);
    assert_eq!(x_of[0], x_of[1], "disjoint gates share a column");
    assert_ne!(x_of[1], x_of[2], "a gate on their lines comes after");
    let legend = doc
        .descendants()
        .find(|n| n.attribute("class") == Some("legend"))
        .expect("a legend");
    let words: String = legend
        .descendants()
        .filter_map(|n| n.text())
        .collect::<Vec<_>>()
        .join(" ");
    assert!(
        words.contains("control on 1") && words.contains("target"),
        "{words}"
    );
    assert!(!words.contains("phase wrapper"), "{words}");
    // A phase oracle written by synth: names from the header, and the wrapper.
    let o = run_in(
        dir.path(),
        &["synth", "specs/vault-phase.toml", "-o", "vault.qasm"],
    );
    assert_eq!(o.status.code(), Some(0), "{o:?}");
    let o = run_in(dir.path(), &["draw", "vault.qasm", "--width", "400"]);
    let text = String::from_utf8(o.stdout).unwrap();
    let phase_row = text
        .lines()
        .find(|l| l.starts_with("y[0] open"))
        .unwrap_or_else(|| panic!("the header names y[0] 'open':\n{text}"));
    assert!(phase_row.contains("─X──H──"), "{phase_row}");
    assert!(phase_row.trim_end().ends_with("─H──X─"), "{phase_row}");
    assert!(text.contains("x[0] a0"), "{text}");
    let o = run_in(dir.path(), &["draw", "vault.qasm", "--svg", "v.svg"]);
    assert_eq!(o.status.code(), Some(0));
    let svg = std::fs::read_to_string(dir.path().join("v.svg")).unwrap();
    let doc = roxmltree::Document::parse(&svg).unwrap();
    let wraps = doc
        .descendants()
        .filter(|n| n.attribute("class") == Some("wrap"))
        .count();
    assert_eq!(wraps, 4, "x, h before and h, x after");
    assert!(svg.contains("phase wrapper"));
}

#[test]
fn every_command_speaks_json() {
    let dir = workspace();
    let json = |args: &[&str]| -> serde_json::Value {
        let o = run_in(dir.path(), args);
        serde_json::from_slice(&o.stdout).unwrap_or_else(|e| panic!("{args:?}: {e}: {o:?}"))
    };
    let v = json(&["synth", "specs/greenhouse.toml", "-o", "g.qasm", "--json"]);
    for f in [
        "name",
        "method",
        "cost",
        "verification",
        "seconds",
        "notes",
        "output",
    ] {
        assert!(v.get(f).is_some(), "synth: {f}");
    }
    let v = json(&[
        "verify",
        "g.qasm",
        "--spec",
        "specs/greenhouse.toml",
        "--json",
    ]);
    for f in [
        "verdict",
        "by",
        "free_bits",
        "states",
        "circuit",
        "spec",
        "seconds",
    ] {
        assert!(v.get(f).is_some(), "verify: {f}");
    }
    let v = json(&["cost", "g.qasm", "--json"]);
    for f in COST_FIELDS {
        assert!(v.get(f).is_some(), "cost: {f}");
    }
    let v = json(&["compare", "specs/greenhouse.toml", "--json"]);
    for f in ["spec", "name", "methods", "best", "tradeoff"] {
        assert!(v.get(f).is_some(), "compare: {f}");
    }
    let v = json(&["methods", "--json"]);
    assert!(v["methods"].as_array().unwrap().len() >= 8);
    let v = json(&["draw", "small.qasm", "--json"]);
    assert_eq!(v["lines"].as_array().unwrap().len(), 5);
    let o = run_in(
        dir.path(),
        &[
            "verify",
            "g.qasm",
            "--spec",
            "specs/greenhouse.toml",
            "--shard",
            "0/1",
            "-o",
            "s.json",
        ],
    );
    assert_eq!(o.status.code(), Some(0));
    let v = json(&[
        "merge",
        "--circuit",
        "g.qasm",
        "--spec",
        "specs/greenhouse.toml",
        "s.json",
        "--json",
    ]);
    assert_eq!(v["verdict"], "proven");
}

#[test]
fn completions_and_manual() {
    let dir = workspace();
    for shell in ["bash", "zsh", "fish"] {
        let o = run_in(dir.path(), &["completions", shell]);
        assert_eq!(o.status.code(), Some(0));
        let text = String::from_utf8(o.stdout).unwrap();
        assert!(
            text.contains("synth") && text.contains("compare") && text.contains("max-qubits"),
            "{shell}"
        );
    }
    let o = run_in(dir.path(), &["man"]);
    let text = String::from_utf8(o.stdout).unwrap();
    assert!(text.starts_with(".ie") || text.contains(".TH"), "roff");
    assert!(text.contains("oraculum"));
    // One page per subcommand, each with that subcommand's own options.
    let o = run_in(dir.path(), &["man", "--dir", "man/man1"]);
    assert_eq!(o.status.code(), Some(0), "{o:?}");
    for (page, option) in [
        ("oraculum", "synth"),
        ("oraculum-synth", "as\\-gate"),
        ("oraculum-verify", "registers"),
        ("oraculum-compare", "uncompute"),
        ("oraculum-draw", "svg"),
        ("oraculum-cost", "json"),
    ] {
        let t = std::fs::read_to_string(dir.path().join(format!("man/man1/{page}.1")))
            .unwrap_or_else(|e| panic!("{page}.1: {e}"));
        assert!(t.contains(".TH") && t.contains(option), "{page}: {t}");
    }
    let pages = std::fs::read_dir(dir.path().join("man/man1"))
        .unwrap()
        .count();
    let commands = String::from_utf8(run_in(dir.path(), &["--help"]).stdout)
        .unwrap()
        .lines()
        .skip_while(|l| !l.starts_with("Commands:"))
        .skip(1)
        .take_while(|l| l.starts_with("  "))
        .filter(|l| !l.trim_start().starts_with("help"))
        .count();
    assert_eq!(
        pages,
        commands + 1,
        "a page per subcommand and the main one"
    );
    let o = run_in(dir.path(), &["--version"]);
    assert!(String::from_utf8(o.stdout)
        .unwrap()
        .contains(env!("CARGO_PKG_VERSION")));
}

/// Every `$ oraculum ...` line of the README's walkthrough runs as written, in
/// order, in a fresh folder with the demo specs, and exits as the README says
/// (0 unless the line is followed by a `# exit N` comment); every line the
/// README shows under a command (up to the next command or the end of the
/// block) is a line of that command's real output, word for word.
#[test]
fn readme_walkthrough_runs_as_written() {
    let readme = std::fs::read_to_string(repo().join("README.md")).unwrap();
    let start = readme
        .find("## Walkthrough")
        .expect("the README has a walkthrough");
    let end = readme[start + 3..]
        .find("\n## ")
        .map_or(readme.len(), |e| start + 3 + e);
    let dir = workspace();
    let mut ran = 0;
    let mut shown = 0;
    let mut output: Option<(String, Vec<String>)> = None;
    for line in readme[start..end].lines() {
        if line.starts_with("```") {
            output = None;
            continue;
        }
        let Some(cmd) = line.trim().strip_prefix("$ oraculum ") else {
            if let Some((cmd, out)) = &output {
                let want = line.trim_end();
                assert!(
                    out.iter().any(|l| l.trim_end() == want),
                    "the README shows `{want}` under `oraculum {cmd}`; the output is:\n{}",
                    out.join("\n")
                );
                shown += 1;
            }
            continue;
        };
        let (cmd, want) = match cmd.split_once("# exit ") {
            Some((c, code)) => (c.trim(), code.trim().parse::<i32>().unwrap()),
            None => (cmd.trim(), 0),
        };
        let args: Vec<&str> = cmd.split_whitespace().collect();
        let o = run_in(dir.path(), &args);
        assert_eq!(o.status.code(), Some(want), "`oraculum {cmd}`: {o:?}");
        let (out, err) = common::text(&o);
        let lines = out.lines().chain(err.lines()).map(String::from).collect();
        output = Some((cmd.to_string(), lines));
        ran += 1;
    }
    assert!(ran >= 6, "the walkthrough has its commands ({ran})");
    assert!(
        shown >= 5,
        "the walkthrough shows real output ({shown} lines)"
    );
}
