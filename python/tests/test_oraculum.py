"""The Python package against facts from outside it: published values, the
command line's own output, and a simulator of OpenQASM written here."""

import os
import pathlib
import re
import signal
import subprocess
import threading
import time
import xml.etree.ElementTree as ET

import pytest

import oraculum

ROOT = pathlib.Path(__file__).resolve().parents[2]
SPECS = sorted((ROOT / "specs").glob("*.toml"))

MAJORITY = """
kind = "function"
name = "vote"
inputs = ["a", "b", "c"]
outputs = ["most"]

[table]
most = "0xe8"
"""


# ---------------------------------------------------------------- simulator
# A classical simulator of the OpenQASM subset the tool writes (x, cx, ccx on
# single qubits), written here from the OpenQASM 2 definitions of those gates,
# so that no check depends on the library it checks.


def parse_qasm(text):
    """Registers (name -> size, in order) and gates as lists of (reg, index)."""
    regs = {}
    gates = []
    for raw in text.splitlines():
        line = raw.split("//")[0].strip()
        if not line or line.startswith(("OPENQASM", "include")):
            continue
        for stmt in filter(None, (s.strip() for s in line.split(";"))):
            m = re.fullmatch(r"qreg\s+(\w+)\[(\d+)\]", stmt)
            if m:
                regs[m.group(1)] = int(m.group(2))
                continue
            op, _, args = stmt.partition(" ")
            qubits = [
                (r, int(i))
                for r, i in re.findall(r"(\w+)\[(\d+)\]", args)
            ]
            want = {"x": 1, "cx": 2, "ccx": 3}.get(op)
            if want is None or len(qubits) != want:
                raise ValueError(f"not in the simulated subset: {stmt!r}")
            gates.append(qubits)
    return regs, gates


def simulate(text, values):
    """Runs the circuit on register values (name -> int; others 0) and returns
    every register's value after it."""
    regs, gates = parse_qasm(text)
    bits = {
        (r, i): (values.get(r, 0) >> i) & 1 for r, n in regs.items() for i in range(n)
    }
    for g in gates:
        *controls, target = g
        if all(bits[c] for c in controls):
            bits[target] ^= 1
    return {r: sum(bits[(r, i)] << i for i in range(n)) for r, n in regs.items()}


def majority(a, b, c):
    return (a & b) | (a & c) | (b & c)


# ---------------------------------------------------------------- the CLI


def cli():
    """The command-line binary built by `cargo test --release` (or the one
    $ORACULUM_BIN names)."""
    given = os.environ.get("ORACULUM_BIN")
    if given:
        return given
    for profile in ("release", "debug"):
        p = ROOT / "target" / profile / "oraculum"
        if p.is_file():
            return str(p)
    pytest.skip("no oraculum binary: run cargo build --release or set ORACULUM_BIN")


# ---------------------------------------------------------------- tests


def test_majority_is_two_toffolis_and_simulates_right():
    # Majority of three is 0xe8 (common practice); a ^ (a ^ b)(a ^ c) has one
    # AND (its multiplicative complexity), computed and uncomputed: two
    # Toffolis, the crate's own doc example.
    o = oraculum.synthesize(MAJORITY)
    assert o.verified
    assert o.cost["toffoli"] == 2
    assert o.cost["t_count"] == 14  # 7 per Toffoli (Amy, Maslov, Mosca, Roetteler 2013)
    q = o.qasm()
    assert q.startswith("OPENQASM 2.0;")
    for i in range(8):
        a, b, c = i & 1, (i >> 1) & 1, (i >> 2) & 1
        for y in (0, 1):
            out = simulate(q, {"x": i, "y": y})
            assert out["x"] == i
            assert out["y"] == y ^ majority(a, b, c)
            assert out.get("anc", 0) == 0


def test_full_adder_simulates_right():
    # A full adder: sum = a ^ b ^ cin (0x96), carry = majority (0xe8)
    # (common practice).
    spec = {
        "kind": "function",
        "inputs": ["a", "b", "cin"],
        "outputs": ["sum", "carry"],
        "table": {"sum": "0x96", "carry": "0xe8"},
    }
    o = oraculum.synthesize(spec)
    assert o.verified
    q = o.qasm()
    for i in range(8):
        a, b, c = i & 1, (i >> 1) & 1, (i >> 2) & 1
        for y in range(4):
            out = simulate(q, {"x": i, "y": y})
            want = (a ^ b ^ c) | (majority(a, b, c) << 1)
            assert out["x"] == i and out["y"] == y ^ want
            assert out.get("anc", 0) == 0


def test_ripple_adder_meets_the_published_count_and_adds():
    # Cuccaro, Draper, Kutin, Moulton 2004: addition mod 2^n in 2n - 1
    # Toffolis at most (2n - 2 here, as in tests/arithmetic.rs).
    n = 4
    o = oraculum.synthesize({"kind": "arithmetic", "op": "add", "width": n})
    assert o.method == "structural"
    assert o.verified
    assert o.cost["toffoli"] == 2 * n - 2
    q = o.qasm()
    for a in range(1 << n):
        for b in range(1 << n):
            out = simulate(q, {"a": a, "b": b})
            assert out["a"] == a and out["b"] == (a + b) % (1 << n)
            assert out.get("anc", 0) == 0


def test_dict_string_and_path_give_the_same_circuit(tmp_path):
    path = tmp_path / "vote.toml"
    path.write_text(MAJORITY)
    as_dict = {
        "kind": "function",
        "name": "vote",
        "inputs": ["a", "b", "c"],
        "outputs": ["most"],
        "table": {"most": "0xe8"},
    }
    texts = {
        oraculum.synthesize(s).qasm()
        for s in (MAJORITY, str(path), path, as_dict)
    }
    assert len(texts) == 1


@pytest.mark.parametrize("spec", SPECS, ids=[p.stem for p in SPECS])
def test_every_demo_spec_gives_the_cli_circuit(spec):
    exe = cli()
    run = subprocess.run(
        [exe, "synth", str(spec)], capture_output=True, text=True, check=True
    )
    o = oraculum.synthesize(str(spec))
    assert o.verified
    assert o.qasm() == run.stdout


def test_from_function_majority_is_0xe8():
    # Majority of three is 0xe8 (common practice, docs/design.md).
    spec = oraculum.from_function(lambda a, b, c: a + b + c >= 2, ["a", "b", "c"], ["most"])
    assert spec["table"] == {"most": "0xe8"}
    assert spec["inputs"] == ["a", "b", "c"]


def test_from_function_bit_order_and_several_outputs():
    # The first input is bit 0: f(a, b) = a & !b is true at index 1 only, 0x2;
    # as a two-bit sum, a + b has low bit XOR (0x6) and high bit AND (0x8).
    spec = oraculum.from_function(lambda a, b: a and not b, 2, 1)
    assert spec["table"] == {"y0": "0x2"}
    spec = oraculum.from_function(lambda a, b: a + b, ["a", "b"], ["lo", "hi"])
    assert spec["table"] == {"lo": "0x6", "hi": "0x8"}
    spec = oraculum.from_function(lambda a, b: (a ^ b, a & b), ["a", "b"], ["lo", "hi"])
    assert spec["table"] == {"lo": "0x6", "hi": "0x8"}
    o = oraculum.synthesize(spec)
    for i in range(4):
        a, b = i & 1, i >> 1
        assert simulate(o.qasm(), {"x": i})["y"] == a + b


def test_from_function_refuses_what_is_not_a_bit():
    with pytest.raises(ValueError, match="returned 2"):
        oraculum.from_function(lambda a, b: 2, 2, 1)
    with pytest.raises(oraculum.LimitReached) as e:
        oraculum.from_function(lambda *x: 0, 21, 1)
    assert e.value.keyword == "max_inputs"


def test_spec_errors_carry_line_and_column():
    # The same places as tests/cli.rs gives for the command line.
    with pytest.raises(oraculum.SpecError) as e:
        oraculum.synthesize('kind = "function"\ncolour = "red"\n')
    assert (e.value.line, e.value.column) == (2, 1)
    assert "colour" in str(e.value)
    bad = 'kind = "function"\ninputs = ["a", "b", "c"]\noutputs = ["f"]\n[table]\nf = "0xe"\n'
    with pytest.raises(oraculum.SpecError) as e:
        oraculum.synthesize(bad)
    assert (e.value.line, e.value.column) == (5, 6)
    assert "2 hex digits" in str(e.value)


def test_spec_error_message_is_the_cli_message(tmp_path):
    exe = cli()
    path = tmp_path / "bad.toml"
    path.write_text('kind = "function"\ncolour = "red"\n')
    run = subprocess.run([exe, "synth", str(path)], capture_output=True, text=True)
    assert run.returncode == 2
    with pytest.raises(oraculum.SpecError) as e:
        oraculum.synthesize(str(path))
    assert e.value.file == str(path)
    assert e.value.text in run.stderr


def drop_gate(qasm, k):
    """The circuit without its k-th gate statement."""
    lines = qasm.splitlines(keepends=True)
    gate_lines = [i for i, l in enumerate(lines) if re.match(r"(x|cx|ccx) ", l)]
    del lines[gate_lines[k]]
    return "".join(lines)


def test_refuted_carries_a_counterexample_that_really_fails():
    good = oraculum.synthesize(MAJORITY).qasm()
    assert oraculum.verify(good, MAJORITY)["verdict"] == "proven"
    refuted = 0
    for k in range(len(parse_qasm(good)[1])):
        bad = drop_gate(good, k)
        try:
            oraculum.verify(bad, MAJORITY)
        except oraculum.Refuted as e:
            refuted += 1
            cx = e.value.counterexample if hasattr(e, "value") else e.counterexample
            x, y = cx["input"]["x"], cx["input"].get("y", 0)
            a, b, c = x & 1, (x >> 1) & 1, (x >> 2) & 1
            out = simulate(bad, {"x": x, "y": y})
            assert (out["x"], out["y"], out.get("anc", 0)) != (x, y ^ majority(a, b, c), 0)
            assert cx["actual"] != cx["expected"]
    # Every Toffoli of ab ^ ac ^ bc is needed: dropping any gate is caught.
    assert refuted == len(parse_qasm(good)[1])


def test_limits_raise_limit_reached_with_the_keyword():
    with pytest.raises(oraculum.LimitReached) as e:
        oraculum.synthesize(MAJORITY, max_states=2, verify_method="exhaustive")
    assert e.value.keyword == "max_states"
    assert "max_states=" in str(e.value)
    with pytest.raises(oraculum.LimitReached) as e:
        oraculum.synthesize(MAJORITY, method="bennett", max_qubits=2)
    assert e.value.keyword == "max_qubits"


def test_limit_message_is_the_cli_message(tmp_path):
    exe = cli()
    path = tmp_path / "vote.toml"
    path.write_text(MAJORITY)
    run = subprocess.run(
        [exe, "synth", str(path), "--max-states", "2", "--verify-method", "exhaustive"], capture_output=True, text=True
    )
    assert run.returncode == 3
    with pytest.raises(oraculum.LimitReached) as e:
        oraculum.synthesize(str(path), max_states=2, verify_method="exhaustive")
    message = str(e.value).split("; raise it with")[0]
    assert message in run.stderr


def test_lines_name_the_qasm_registers():
    o = oraculum.synthesize(MAJORITY)
    regs, _ = parse_qasm(o.qasm())
    assert [l["qubit"] for l in o.lines] == [
        f"{r}[{i}]" for r, n in regs.items() for i in range(n)
    ]
    assert [l["label"] for l in o.lines[:4]] == ["a", "b", "c", "most"]
    assert o.lines[0]["role"] == "input"


def test_drawing_is_svg():
    o = oraculum.synthesize(MAJORITY)
    root = ET.fromstring(o._repr_svg_())
    assert root.tag.endswith("svg")
    assert ET.fromstring(o.svg(lowered=True)).tag.endswith("svg")


def test_compare_rows_match_synthesize():
    rows = oraculum.compare(MAJORITY)
    assert [r["method"] for r in rows if r["best"]] == [oraculum.synthesize(MAJORITY).method]
    for r in rows:
        if r["error"] is None:
            assert r["verified"]
            o = oraculum.synthesize(MAJORITY, method=r["method"])
            assert r["toffoli"] == o.cost["toffoli"]
            assert r["qubits"] == o.cost["qubits"]
    # Majority has one AND (a ^ (a ^ b)(a ^ c), common practice): computed
    # and uncomputed, two Toffolis.
    best = min(r["toffoli"] for r in rows if r["verified"])
    assert best == 2


def test_a_long_verification_stops_on_interrupt():
    # A 31-bit adder checked exhaustively has 2^62 states: it does not end in
    # any time a test waits; Ctrl-C (SIGINT) must stop it and raise
    # KeyboardInterrupt.
    o = oraculum.synthesize(
        {"kind": "arithmetic", "op": "add", "width": 31}, verify=False
    )
    timer = threading.Timer(0.5, lambda: os.kill(os.getpid(), signal.SIGINT))
    timer.start()
    start = time.monotonic()
    with pytest.raises(KeyboardInterrupt):
        oraculum.verify(
            o.qasm(),
            {"kind": "arithmetic", "op": "add", "width": 31},
            verify_method="exhaustive",
            max_states=2**62,
        )
    timer.join()
    assert time.monotonic() - start >= 0.5


@pytest.mark.parametrize("spec", SPECS, ids=[p.stem for p in SPECS])
def test_inverse_and_gate_form_are_the_cli_files(spec):
    exe = cli()
    inverse = subprocess.run(
        [exe, "synth", str(spec), "--inverse"], capture_output=True, text=True, check=True
    )
    assert oraculum.synthesize(str(spec), inverse=True).qasm() == inverse.stdout
    gate = subprocess.run(
        [exe, "synth", str(spec), "--as-gate", "oracle"],
        capture_output=True,
        text=True,
        check=True,
    )
    assert oraculum.synthesize(str(spec), as_gate="oracle").qasm() == gate.stdout


def test_inverse_undoes_the_circuit():
    # The circuit then its inverse is the identity on every basis state
    # (common practice: a reversible circuit's gates in reverse order).
    o = oraculum.synthesize(MAJORITY)
    back = oraculum.synthesize(MAJORITY, inverse=True).qasm()
    regs, _ = parse_qasm(o.qasm())
    for i in range(8):
        for y in (0, 1):
            out = simulate(o.qasm(), {"x": i, "y": y})
            assert simulate(back, out) == {"x": i, "y": y, **{r: 0 for r in regs if r not in "xy"}}
    assert oraculum.verify(back, MAJORITY, inverse=True)["verdict"] == "proven"


RENAMED = MAJORITY + '\n[registers]\nx = "key"\ny = "flag"\n'


def test_own_register_names_are_written_and_verified(tmp_path):
    exe = cli()
    path = tmp_path / "vote.toml"
    path.write_text(RENAMED)
    run = subprocess.run([exe, "synth", str(path)], capture_output=True, text=True, check=True)
    o = oraculum.synthesize(RENAMED)
    assert o.qasm() == run.stdout
    regs, _ = parse_qasm(o.qasm())
    assert "key" in regs and "flag" in regs and "x" not in regs
    assert [l["register"] for l in o.lines[:4]] == ["key", "key", "key", "flag"]
    for i in range(8):
        a, b, c = i & 1, (i >> 1) & 1, (i >> 2) & 1
        assert simulate(o.qasm(), {"key": i})["flag"] == majority(a, b, c)
    assert oraculum.verify(o.qasm(), RENAMED)["verdict"] == "proven"


def test_the_readme_example_runs_as_written(monkeypatch):
    # The README's notebook example, run from the top folder; what its
    # comments say it shows is checked here.
    readme = (ROOT / "README.md").read_text()
    section = readme[readme.index("## From Python"):]
    block = section[section.index("```python\n") + 10:]
    block = block[: block.index("```")]
    monkeypatch.chdir(ROOT)
    ns = {}
    exec(compile(block, "README.md", "exec"), ns)
    vote = ns["vote"]
    assert (vote.verified, vote.method, vote.cost["toffoli"]) == (True, "bennett", 2)
    assert vote.lines[3]["qubit"] == "y[0]" and vote.lines[3]["label"] == "most"
    assert ns["spec"]["table"] == {"most": "0xe8"}
    assert ns["rows"] and all("method" in r for r in ns["rows"])
    assert oraculum.verify(vote.qasm(), ns["spec"])["verdict"] == "proven"


def test_uncompute_measure_keyword():
    # Gidney, "Halving the cost of quantum addition", Quantum 2, 74 (2018):
    # an n-bit adder mod 2^n with n - 1 Toffoli-equivalents (4 T each).
    add = {"kind": "arithmetic", "op": "add", "width": 6}
    o = oraculum.synthesize(add, uncompute="measure")
    assert o.verified
    assert o.cost["mode"] == "measure"
    assert o.cost["toffoli_equivalent"] == 5
    assert o.cost["t_count"] == 20
    assert oraculum.synthesize(add).cost["mode"] == "toffoli"
    # Majority's one AND, uncomputed by measurement: one Toffoli-equivalent.
    rows = oraculum.compare(MAJORITY, uncompute="measure")
    assert min(r["toffoli_equivalent"] for r in rows if r["verified"]) == 1
    assert all(r["mode"] == "measure" for r in rows if r["error"] is None)
    with pytest.raises(ValueError):
        oraculum.synthesize(add, uncompute="both")


def test_gate_form_with_measured_uncomputes_is_an_openqasm3_subroutine():
    # OpenQASM 3 (Cross et al., ACM TQC 2022): a gate body is unitary, a
    # subroutine may measure; OpenQASM 2 has no subroutines.
    add = {"kind": "arithmetic", "op": "add", "width": 4}
    o = oraculum.synthesize(add, uncompute="measure", as_gate="adder")
    assert o.verified
    text = o.qasm3()
    assert "def adder(qubit " in text and "bit m;" in text
    assert oraculum.verify(text, add)["verdict"] == "proven"
    with pytest.raises(ValueError, match="qasm3"):
        o.qasm()


def test_qasm3_is_the_cli_file_and_verifies(tmp_path):
    # .qasm3() is the text of `synth --format qasm3` (plain, gate form and
    # --keep-mct), and verify() proves OpenQASM 3 text as it proves OpenQASM 2.
    exe = cli()
    path = tmp_path / "vote.toml"
    path.write_text(MAJORITY)
    for extra, kwargs, keep in (
        ([], {}, False),
        (["--as-gate", "vote"], {"as_gate": "vote"}, False),
        (["--keep-mct"], {}, True),
    ):
        run = subprocess.run(
            [exe, "synth", str(path), "--format", "qasm3", *extra],
            capture_output=True, text=True, check=True,
        )
        o = oraculum.synthesize(str(path), **kwargs)
        text = o.qasm3(keep_mct=keep)
        assert text == run.stdout
        assert text.startswith('OPENQASM 3.0;\ninclude "stdgates.inc";\n')
        assert "qubit[3] x_;" in text
        assert oraculum.verify(text, MAJORITY)["verdict"] == "proven"


def test_power_of_period_finding_cycles_with_order_four():
    # 7^e mod 15 for e = 0..15 is 1, 7, 4, 13, 1, ... (common practice: the
    # textbook order-4 example of period finding).
    o = oraculum.synthesize(
        {
            "kind": "arithmetic",
            "op": "power",
            "constant": 7,
            "modulus": 15,
            "exponent_bits": 4,
        }
    )
    assert o.verified
    q = o.qasm()
    for e in range(16):
        out = simulate(q, {"e": e, "x": 1})
        assert out["x"] == [1, 7, 4, 13][e % 4]
        assert out["e"] == e


def test_compare_with_a_relation_and_the_old_name_refused():
    o = oraculum.synthesize(
        {"kind": "arithmetic", "op": "compare", "relation": ">=", "width": 4, "constant": 11}
    )
    assert o.verified
    q = o.qasm()
    for a in range(16):
        assert simulate(q, {"a": a})["y"] == int(a >= 11)
    with pytest.raises(oraculum.SpecError, match="compare"):
        oraculum.synthesize({"kind": "arithmetic", "op": "less_than", "width": 4})
