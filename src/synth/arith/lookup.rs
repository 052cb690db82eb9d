//! Table lookup by unary iteration (Babbush, Gidney, Berry, Wiebe, McClean,
//! Paler, Fowler, Neven, "Encoding electronic spectra in quantum circuits
//! with linear T complexity", PRX 8, 041015, 2018, Sec. III.A and Fig. 7):
//! `y ^= data[a]`.
//!
//! The address bits are walked as a binary tree from the top bit down. A
//! node's line holds "control AND the address bits so far match"; its left
//! child is computed as the temporary AND of it with `!a_j` into the level's
//! ancilla, the right child from the left by one CNOT from the parent
//! (`p & !a ^ p = p & a`), and the ancilla is uncomputed by measurement. At a
//! leaf the line is copied onto every `y` bit its word sets. Every node with
//! two children costs one AND: `L - 1` Toffoli-equivalents for `L` words with
//! a control, `L - 2` without one (the root's children are the literals of
//! the top address bit). Subtrees whose words are all zero are skipped. In
//! `toffoli` form each measured uncompute is a Toffoli: at most `2(L - 1)`.
//!
//! When `data` has fewer than `2^w` words, addresses past it are promised
//! not to occur (as in Babbush et al.): the tree is cut there, and the
//! circuit's action on those addresses is unspecified. Specs always give
//! `2^w` words.
//!
//! Qubits: one ancilla per address bit below the root (`w` with a control,
//! `w - 1` without). Gates: linear in `L` plus the set data bits.

use crate::circuit::{Circuit, Control, Gate, Line};

struct Walk<'a> {
    c: &'a mut Circuit,
    addr: &'a [Line],
    y: &'a [Line],
    data: &'a [u64],
    level: Vec<Option<Line>>,
    measure: bool,
}

fn lit(line: Line, positive: bool) -> Control {
    Control { line, positive }
}

impl Walk<'_> {
    fn any(&self, lo: usize, hi: usize) -> bool {
        let hi = hi.min(self.data.len());
        lo < hi && self.data[lo..hi].iter().any(|&w| w != 0)
    }

    /// `t ^= p` for a literal `p`.
    fn copy(&mut self, p: Control, t: Line) {
        self.c.push(Gate::cnot(p.line.0, t.0));
        if !p.positive {
            self.c.push(Gate::not(t.0));
        }
    }

    fn and(&mut self, p: Control, q: Control, t: Line) {
        let g = if self.measure {
            Gate::temporary_and(p, q, t)
        } else {
            Gate::new(vec![p, q], t)
        };
        self.c.push(g.expect("distinct lines"));
    }

    fn unand(&mut self, p: Control, q: Control, t: Line) {
        let g = if self.measure {
            Gate::measured(p, q, t)
        } else {
            Gate::new(vec![p, q], t)
        };
        self.c.push(g.expect("distinct lines"));
    }

    /// The words `lo .. lo + 2^bits`, with `p` holding the match so far
    /// (`None`: always, the uncontrolled root).
    fn node(&mut self, p: Option<Control>, bits: usize, lo: usize) {
        if bits == 0 {
            let word = self.data[lo];
            for (k, &t) in self.y.iter().enumerate() {
                if (word >> k) & 1 == 1 {
                    match p {
                        Some(p) => self.copy(p, t),
                        None => self.c.push(Gate::not(t.0)),
                    }
                }
            }
            return;
        }
        let j = bits - 1;
        let mid = lo + (1 << j);
        let (left, right) = (self.any(lo, mid), self.any(mid, lo + (2 << j)));
        if mid >= self.data.len() {
            // Promised: bit j is 0 here.
            return self.node(p, j, lo);
        }
        let a = self.addr[j];
        let Some(p) = p else {
            if left {
                self.node(Some(lit(a, false)), j, lo);
            }
            if right {
                self.node(Some(lit(a, true)), j, mid);
            }
            return;
        };
        if !left && !right {
            return;
        }
        let q = match self.level[j] {
            Some(q) => q,
            None => {
                let q = self.c.add_ancilla();
                self.level[j] = Some(q);
                q
            }
        };
        let here = lit(q, true);
        if left {
            self.and(p, lit(a, false), q);
            self.node(Some(here), j, lo);
            if right {
                self.copy(p, q);
                self.node(Some(here), j, mid);
                self.unand(p, lit(a, true), q);
            } else {
                self.unand(p, lit(a, false), q);
            }
        } else {
            self.and(p, lit(a, true), q);
            self.node(Some(here), j, mid);
            self.unand(p, lit(a, true), q);
        }
    }
}

/// Appends `y ^= data[addr]` (when `ctrl` is 1, if given) to `c` by unary
/// iteration; `data` has at most `2^addr.len()` words, each at most
/// `y.len()` bits (higher bits are ignored).
pub fn unary_lookup(
    c: &mut Circuit,
    ctrl: Option<Line>,
    addr: &[Line],
    y: &[Line],
    data: &[u64],
    measure: bool,
) {
    assert!(addr.len() < 64 && data.len() <= 1usize << addr.len());
    if data.is_empty() {
        return;
    }
    let mut w = Walk {
        c,
        addr,
        y,
        data,
        level: vec![None; addr.len()],
        measure,
    };
    w.node(ctrl.map(|l| lit(l, true)), addr.len(), 0);
}
