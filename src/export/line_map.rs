//! The line map the writers put in a file's header comments
//! (`//   x[0] = a0 (input)`), read back for drawings. It is a comment: it
//! names lines and tells inputs from outputs, and never changes what a
//! circuit does, so nothing that proves or counts a circuit reads it.

use crate::circuit::layout::QASM_WORDS;
use crate::circuit::{Circuit, Role};

/// `c` with the labels and roles of the line map in `text`'s header
/// comments, where one names a line of `c` (an OpenQASM 3 register written
/// `x_` names the line `x`); lines the map does not name, and ancillae, are
/// left as read. Without a map, `c` as it is.
pub fn with_header_labels(c: &Circuit, text: &str) -> Circuit {
    let mut lines = c.lines().to_vec();
    let mut in_map = false;
    for l in text.lines().map(str::trim) {
        let Some(comment) = l.strip_prefix("//") else {
            if l.is_empty() {
                continue;
            }
            // The header ends at the first statement.
            if !l.starts_with("OPENQASM") && !l.starts_with("include") {
                break;
            }
            continue;
        };
        if comment.trim() == "lines:" {
            in_map = true;
            continue;
        }
        if !in_map {
            continue;
        }
        let Some(entry) = comment.strip_prefix("   ") else {
            in_map = false;
            continue;
        };
        let Some((qubit, label, role)) = entry_of(entry.trim()) else {
            continue;
        };
        let Some((register, index)) = qubit
            .strip_suffix(']')
            .and_then(|q| q.split_once('['))
            .and_then(|(r, i)| Some((r, i.parse::<u32>().ok()?)))
        else {
            continue;
        };
        let register = match register.strip_suffix('_') {
            Some(stem) if QASM_WORDS.contains(&stem) => stem,
            _ => register,
        };
        let Some(line) = lines
            .iter_mut()
            .find(|x| x.register == register && x.index == index)
        else {
            continue;
        };
        if line.role == Role::Ancilla {
            continue;
        }
        if let Some(label) = label {
            line.label = label.to_string();
        }
        line.role = match role {
            "input" => Role::Input,
            "output" => Role::Output,
            _ => line.role,
        };
    }
    let mut out = Circuit::from_parts(lines, c.gates().to_vec())
        .expect("the same lines and gates as a valid circuit");
    out.set_phase(c.phase());
    out
}

/// `x[0] = a0 (input)` as (`x[0]`, `Some("a0")`, `input`); `anc[0]
/// (ancilla, ...)` as (`anc[0]`, `None`, `ancilla, ...`).
fn entry_of(entry: &str) -> Option<(&str, Option<&str>, &str)> {
    let open = entry.rfind(" (")?;
    let role = entry[open + 2..].strip_suffix(')')?;
    let head = &entry[..open];
    Some(match head.split_once(" = ") {
        Some((q, label)) => (q.trim(), Some(label.trim()), role),
        None => (head.trim(), None, role),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::circuit::{Gate, LineInfo};

    fn line(register: &str, index: u32, role: Role) -> LineInfo {
        LineInfo {
            register: register.into(),
            index,
            role,
            label: format!("{register}[{index}]"),
        }
    }

    #[test]
    fn the_map_names_lines_and_leaves_the_rest() {
        let c = Circuit::from_parts(
            vec![
                line("x", 0, Role::Data),
                line("x", 1, Role::Data),
                line("anc", 0, Role::Ancilla),
            ],
            vec![Gate::cnot(0, 1)],
        )
        .unwrap();
        let text = "OPENQASM 3.0;\n// lines:\n//   x_[0] = frost (input)\n//   q[0] = gone (input)\n//   anc[0] (ancilla, starts and ends at 0)\n// after\n//   x_[1] = late (output)\nqubit[2] x_;\n";
        let d = with_header_labels(&c, text);
        assert_eq!(d.lines()[0].label, "frost");
        assert_eq!(d.lines()[0].role, Role::Input);
        // Past the end of the map, nothing more is read.
        assert_eq!(d.lines()[1].label, "x[1]");
        assert_eq!(d.lines()[1].role, Role::Data);
        assert_eq!(d.lines()[2].role, Role::Ancilla);
        assert_eq!(d.gates(), c.gates());
        assert_eq!(with_header_labels(&c, "no map").lines(), c.lines());
    }
}
