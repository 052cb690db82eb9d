//! Exact synthesis of a minimum-AND XAG (multiplicative complexity) for one
//! function of at most 6 inputs, by SAT (CaDiCaL) with a proof of minimality.
//!
//! The question "is there an XAG of exactly `m` AND gates?" is encoded for
//! the solver and asked for `m = L, L + 1, ...` from a proven lower bound `L`;
//! the first yes is minimal because every smaller `m` was refuted (or is below
//! the bound). The bounds:
//! - the degree bound `deg(f) - 1` (so named in Calik, Turan and Peralta,
//!   "The multiplicative complexity of 6-variable Boolean functions",
//!   Cryptography and Communications 11, 2019);
//! - the dimension bound `ceil(dim(f) / 2)` (Calik, Turan and Peralta,
//!   "Boolean functions with multiplicative complexity 3 and 4", Cryptography
//!   and Communications 12, 2020), `dim(f)` being the number of inputs less the
//!   dimension of the space of linear structures (the `a` with
//!   `f(x ^ a) ^ f(x)` constant): each linear part of an AND operand cuts that
//!   space by at most one dimension;
//! - for 5 and 6 inputs, a plane-restriction bound (see `restriction_bound`;
//!   it needs the 4-input database).
//!
//! For 5 and 6 inputs each question is split by the first gate: its operands
//! are affine in the inputs alone and span a plane of linear forms (651 planes
//! for 6 inputs), and only a plane whose six hyperplane restrictions all admit
//! `m - 1` AND gates can start a circuit of `m`; one SAT call per such plane,
//! with the first gate fixed.
//!
//! Affine forms make the search space structured, and the encoding uses it:
//! - an AND of `(a ^ c)(b ^ d)` differs from `a b` by the affine `d a ^ c b ^
//!   c d` of earlier signals, which later forms absorb, so operands carry no
//!   constant, and every gate is 0 on the all-zero input row (one row fewer);
//! - `a b` depends, up to such affine terms, only on the plane spanned by `a`
//!   and `b` (`a (a ^ b) = a b ^ a`), so each gate's operand pair is the one
//!   reduced echelon basis of that plane (pivot = highest signal): `a` holds
//!   the highest signal, `b` lies wholly below it and `a` misses `b`'s pivot;
//! - two adjacent gates that do not feed each other can be swapped, so the
//!   highest signal of the gates never decreases along the circuit (a swap that
//!   breaks this makes the sequence of highest signals smaller, so a sorted form
//!   always exists);
//! - at the first `m` that can succeed the circuit is minimal, so every gate
//!   feeds a later gate or the output;
//! - the input part of an operand is linear in the row, so its value on row
//!   `r` is one XOR away from its value on `r` without its lowest bit.
//!
//! A budget (wall-clock time and optionally solver conflicts per SAT call)
//! stops the ascent; the answer is then the best circuit known (a Shannon
//! decomposition over the best hyperplane into database pieces, at most 7 AND
//! gates for 5 inputs and 15 for 6) with the lower bound proven so far, never a
//! silent non-minimal answer. Measured (`benches/xag.rs`): 4 inputs take
//! milliseconds, 5 inputs about a second; random 6-input functions are beyond
//! a two-minute budget (the question at the lower bound, 5, stays open), so
//! there the answer is the decomposition (typically 9 to 12 AND gates) with a
//! lower bound of 5.

use super::database::Xag4Database;
use super::form::{row_mask, Affine, SmallXag, XagError, PROJECTIONS, XAG_MAX_INPUTS};
use std::time::{Duration, Instant};

/// How long the exact search may run.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct SearchBudget {
    /// Wall-clock time for the whole search.
    pub time: Duration,
    /// Most solver conflicts per SAT call (one call per AND count, and for 5
    /// and 6 inputs per candidate first-gate plane); `None` for no limit.
    /// Unlike time, this gives the same answer on every machine.
    pub conflicts: Option<u32>,
}

impl Default for SearchBudget {
    /// Ten seconds, no conflict limit.
    fn default() -> Self {
        SearchBudget {
            time: Duration::from_secs(10),
            conflicts: None,
        }
    }
}

impl SearchBudget {
    /// No limit at all (for at most 4 inputs the search takes milliseconds).
    pub fn unlimited() -> Self {
        SearchBudget {
            time: Duration::MAX,
            conflicts: None,
        }
    }
}

/// What the exact search found.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct ExactXag {
    /// The best XAG found; one output, the function.
    pub circuit: SmallXag,
    /// A proven lower bound on the multiplicative complexity; equal to
    /// `circuit.and_count()` when the circuit is proven minimal.
    pub lower_bound: usize,
}

impl ExactXag {
    /// Whether the circuit is proven to have the fewest AND gates possible.
    pub fn is_minimal(&self) -> bool {
        self.lower_bound == self.circuit.and_count()
    }
}

fn check_table(inputs: usize, table: u64) -> Result<(), XagError> {
    if inputs > XAG_MAX_INPUTS {
        return Err(XagError::TooManyInputs { inputs });
    }
    if table & !row_mask(inputs) != 0 {
        return Err(XagError::TableTooWide {
            table,
            rows: 1 << inputs,
        });
    }
    Ok(())
}

/// The algebraic normal form (Reed-Muller coefficients) of a table over at
/// most 6 inputs: bit `s` is the coefficient of the monomial of input set `s`.
fn anf(inputs: usize, table: u64) -> u64 {
    let mut t = table;
    for (i, &p) in PROJECTIONS.iter().enumerate().take(inputs) {
        t ^= (t << (1 << i)) & p;
    }
    t & row_mask(inputs)
}

/// The algebraic degree of the function (the largest monomial of its
/// algebraic normal form; 0 for constants).
pub fn algebraic_degree(inputs: usize, table: u64) -> Result<usize, XagError> {
    check_table(inputs, table)?;
    let a = anf(inputs, table);
    Ok((0..1u64 << inputs)
        .filter(|s| a >> s & 1 == 1)
        .map(|s| s.count_ones() as usize)
        .max()
        .unwrap_or(0))
}

/// `table` with its rows relabelled `x -> x ^ e_i`.
fn translate(table: u64, i: usize) -> u64 {
    let s = 1 << i;
    ((table >> s) & !PROJECTIONS[i]) | ((table << s) & PROJECTIONS[i])
}

/// The dimension of the space of linear structures: the `a` with
/// `f(x ^ a) ^ f(x)` constant.
fn linear_structure_dimension(inputs: usize, table: u64) -> usize {
    let mask = row_mask(inputs);
    let count = (0..1usize << inputs)
        .filter(|&a| {
            let mut t = table;
            for i in 0..inputs {
                if a >> i & 1 == 1 {
                    t = translate(t, i);
                }
            }
            let d = (t ^ table) & mask;
            d == 0 || d == mask
        })
        .count();
    count.trailing_zeros() as usize
}

/// A proven lower bound on the multiplicative complexity: 0 for affine
/// functions, else the larger of the degree bound and the dimension bound
/// (see the module documentation).
pub fn multiplicative_lower_bound(inputs: usize, table: u64) -> Result<usize, XagError> {
    let degree = algebraic_degree(inputs, table)?;
    if degree <= 1 {
        return Ok(0);
    }
    let dim = inputs - linear_structure_dimension(inputs, table);
    Ok((degree - 1).max(dim.div_ceil(2)))
}

/// The affine form of an affine function's table.
fn affine_form(inputs: usize, table: u64) -> Affine {
    let a = anf(inputs, table);
    let lin = (0..inputs).fold(0u32, |m, i| m | ((a >> (1 << i) & 1) as u32) << i);
    Affine::from_parts(lin, 0, a & 1 == 1).expect("inputs checked")
}

/// A minimum-AND XAG for the function `table` of `inputs` inputs (at most
/// [`XAG_MAX_INPUTS`]; row `r` of the table is bit `r`), within `budget`.
///
/// For 5 and 6 inputs this first builds an [`Xag4Database`] (tens of
/// milliseconds); a caller with many queries keeps one and calls
/// [`Xag4Database::exact`]. For at most 4 inputs it solves directly.
pub fn exact_xag(inputs: usize, table: u64, budget: &SearchBudget) -> Result<ExactXag, XagError> {
    check_table(inputs, table)?;
    if inputs <= 4 {
        exact_small(inputs, table, budget)
    } else {
        exact_with_database(&Xag4Database::build(), inputs, table, budget)
    }
}

/// At most 4 inputs, without a database: one SAT question per AND count
/// from the lower bound up (milliseconds; the database build uses this).
pub(super) fn exact_small(
    inputs: usize,
    table: u64,
    budget: &SearchBudget,
) -> Result<ExactXag, XagError> {
    check_table(inputs, table)?;
    let mut lower = multiplicative_lower_bound(inputs, table)?;
    if lower == 0 {
        return affine_answer(inputs, table);
    }
    let start = Instant::now();
    let fallback = shannon_plain(inputs, table)?;
    while lower < fallback.and_count() {
        let left = budget.time.saturating_sub(start.elapsed());
        if left.is_zero() {
            break;
        }
        match solve(inputs, table, lower, left, budget.conflicts, None) {
            Answer::Found(circuit) => {
                return Ok(ExactXag {
                    circuit,
                    lower_bound: lower,
                })
            }
            Answer::Impossible => lower += 1,
            Answer::GaveUp => break,
        }
    }
    Ok(ExactXag {
        circuit: fallback,
        lower_bound: lower,
    })
}

fn affine_answer(inputs: usize, table: u64) -> Result<ExactXag, XagError> {
    Ok(ExactXag {
        circuit: SmallXag::affine(inputs, affine_form(inputs, table))?,
        lower_bound: 0,
    })
}

/// The search of [`Xag4Database::exact`]: for at most 4 inputs the table's
/// answer; for 5 and 6, the restriction bound, then one question per AND
/// count from it up, each split by the first gate's plane (only planes that
/// pass the restriction test can start a circuit of that size).
pub(super) fn exact_with_database(
    db: &Xag4Database,
    inputs: usize,
    table: u64,
    budget: &SearchBudget,
) -> Result<ExactXag, XagError> {
    check_table(inputs, table)?;
    if inputs <= 4 {
        let circuit = from_database(db, inputs, table)?;
        return Ok(ExactXag {
            lower_bound: circuit.and_count(),
            circuit,
        });
    }
    if multiplicative_lower_bound(inputs, table)? == 0 {
        return affine_answer(inputs, table);
    }
    let start = Instant::now();
    let fallback = shannon(db, inputs, table)?;
    let dirs = direction_bounds(db, inputs, table);
    let mut scored: Vec<(usize, [u32; 3])> = planes(inputs)
        .into_iter()
        .map(|p| (p.iter().map(|&w| dirs[w as usize]).max().unwrap_or(0), p))
        .collect();
    scored.sort_by_key(|&(score, p)| (score, p));
    let mut lower = restriction_bound(db, inputs, table);
    'ascent: while lower < fallback.and_count() {
        let m = lower;
        let candidates: Vec<[u32; 3]> = scored
            .iter()
            .filter(|&&(score, _)| score < m)
            .map(|&(_, p)| p)
            .collect();
        let mut gave_up = false;
        for (i, plane) in candidates.iter().enumerate() {
            let left = budget.time.saturating_sub(start.elapsed());
            if left.is_zero() {
                break 'ascent;
            }
            let share = left / (candidates.len() - i) as u32;
            match solve(
                inputs,
                table,
                m,
                share,
                budget.conflicts,
                Some(echelon_pair(plane)),
            ) {
                Answer::Found(circuit) => {
                    debug_assert_eq!(circuit.truth_tables(), vec![table]);
                    return Ok(ExactXag {
                        circuit,
                        lower_bound: m,
                    });
                }
                Answer::Impossible => {}
                Answer::GaveUp => gave_up = true,
            }
        }
        if gave_up {
            break;
        }
        lower += 1;
    }
    Ok(ExactXag {
        circuit: fallback,
        lower_bound: lower,
    })
}

/// The database's circuit for a function of at most 4 inputs, on `inputs`
/// inputs: the table is widened to 4 inputs (not depending on the extra
/// ones), and those inputs are then fed 0.
fn from_database(db: &Xag4Database, inputs: usize, table: u64) -> Result<SmallXag, XagError> {
    let c = db.circuit(widen(inputs, table));
    if inputs == 4 {
        return Ok(c);
    }
    let forms: Vec<Affine> = (0..4)
        .map(|i| {
            if i < inputs {
                Affine::input(i)
            } else {
                Affine::ZERO
            }
        })
        .collect();
    c.substitute_inputs(inputs, &forms)
}

/// A table of at most 4 inputs as a 4-input table.
fn widen(inputs: usize, table: u64) -> u16 {
    let mut t = table;
    for i in inputs..4 {
        t |= t << (1 << i);
    }
    t as u16
}

/// The restriction of `f` to the hyperplane `w.x = c`, as a function of the
/// other inputs in order (the lowest input of `w` is the one solved for).
fn restrict(inputs: usize, f: u64, w: u32, c: u32) -> u64 {
    let i = w.trailing_zeros();
    let low = (1u64 << i) - 1;
    (0..1u64 << (inputs - 1)).fold(0u64, |h, y| {
        let mut x = (y & low) | (y & !low) << 1;
        let bit = ((w as u64 & x).count_ones() & 1) ^ c;
        x |= (bit as u64) << i;
        h | (f >> x & 1) << y
    })
}

/// The planes (2-dimensional spaces of linear forms) over `inputs` inputs,
/// each as its three nonzero forms.
fn planes(inputs: usize) -> Vec<[u32; 3]> {
    let n = 1u32 << inputs;
    let mut v = Vec::new();
    for a in 1..n {
        for b in a + 1..n {
            if a ^ b > b {
                v.push([a, b, a ^ b]);
            }
        }
    }
    v
}

/// The reduced echelon operand pair (pivot = highest input) of a plane.
fn echelon_pair(plane: &[u32; 3]) -> [u32; 2] {
    let top = plane
        .iter()
        .map(|&w| 31 - w.leading_zeros())
        .max()
        .unwrap_or(0);
    let b = *plane
        .iter()
        .find(|&&w| w >> top & 1 == 0)
        .expect("one form misses the top");
    let pivot_b = 31 - b.leading_zeros();
    let a = *plane
        .iter()
        .find(|&&w| w >> top & 1 == 1 && w >> pivot_b & 1 == 0)
        .expect("one of the two others misses b's pivot");
    [a, b]
}

/// For every nonzero linear form `w` (index `w`): the larger lower bound of
/// the two restrictions of `f` to `w.x = 0` and `w.x = 1`.
fn direction_bounds(db: &Xag4Database, inputs: usize, f: u64) -> Vec<usize> {
    let mut dirs = vec![0usize; 1 << inputs];
    for w in 1..1u32 << inputs {
        dirs[w as usize] = (0..2)
            .map(|c| restriction_bound(db, inputs - 1, restrict(inputs, f, w, c)))
            .max()
            .unwrap_or(0);
    }
    dirs
}

/// A proven lower bound on the multiplicative complexity, exact for at most 4
/// inputs (the database). For more: the first AND gate `(u ^ a)(v ^ b)` of a
/// minimum circuit is affine on each of the six hyperplanes `w.x = c` with `w`
/// in the plane of `u` and `v`, so each restriction needs at most one AND
/// fewer; hence MC(f) >= 1 + the least, over planes, of the largest
/// restriction bound in the plane (a restriction argument worked out here, not
/// taken from a paper). Recursion depth at most 2.
pub(super) fn restriction_bound(db: &Xag4Database, inputs: usize, f: u64) -> usize {
    if inputs <= 4 {
        return db.and_count(widen(inputs, f));
    }
    let basic = multiplicative_lower_bound(inputs, f).expect("checked by the caller");
    if basic == 0 {
        return 0;
    }
    let dirs = direction_bounds(db, inputs, f);
    let best = planes(inputs)
        .iter()
        .map(|p| p.iter().map(|&w| dirs[w as usize]).max().unwrap_or(0))
        .min()
        .unwrap_or(0);
    basic.max(1 + best)
}

/// An upper bound: `f = h0 ^ (w.x)(h0 ^ h1)` over the best hyperplane
/// direction `w`, where `h0`, `h1` are the restrictions, down to 4-input
/// pieces from the database. At most 7 AND gates for 5 inputs and 15 for 6
/// (every 4-input function needs at most 3, Turan and Peralta 2014).
/// Recursion depth at most 2.
fn shannon(db: &Xag4Database, inputs: usize, f: u64) -> Result<SmallXag, XagError> {
    if inputs <= 4 {
        return from_database(db, inputs, f);
    }
    let cost = |h: u64| shannon_cost(db, inputs - 1, h);
    let (w, _) = (1..1u32 << inputs)
        .map(|w| {
            let h0 = restrict(inputs, f, w, 0);
            let d = h0 ^ restrict(inputs, f, w, 1);
            (w, cost(h0) + cost(d) + (d != 0) as usize)
        })
        .min_by_key(|&(w, c)| (c, w))
        .expect("at least one direction");
    let h0 = restrict(inputs, f, w, 0);
    let d = h0 ^ restrict(inputs, f, w, 1);
    let low = shannon(db, inputs - 1, h0)?;
    let diff = shannon(db, inputs - 1, d)?;
    let i = w.trailing_zeros() as usize;
    let ins: Vec<Affine> = (0..inputs).filter(|&j| j != i).map(Affine::input).collect();
    let wx = Affine::from_parts(w, 0, false).expect("w is over the inputs");
    let mut x = SmallXag::new(inputs)?;
    let o0 = x.append(&low, &ins)?[0];
    let od = x.append(&diff, &ins)?[0];
    let out = if od.is_constant() {
        if od.constant() {
            o0 ^ wx
        } else {
            o0
        }
    } else {
        o0 ^ x.add_and(wx, od)?
    };
    x.add_output(out)?;
    Ok(x)
}

/// The AND count [`shannon`] reaches, without building the circuit.
fn shannon_cost(db: &Xag4Database, inputs: usize, f: u64) -> usize {
    if inputs <= 4 {
        return db.and_count(widen(inputs, f));
    }
    (1..1u32 << inputs)
        .map(|w| {
            let h0 = restrict(inputs, f, w, 0);
            let d = h0 ^ restrict(inputs, f, w, 1);
            shannon_cost(db, inputs - 1, h0) + shannon_cost(db, inputs - 1, d) + (d != 0) as usize
        })
        .min()
        .unwrap_or(0)
}

/// `f = f0 ^ x_n (f0 ^ f1)` on the top input down to constants, without a
/// database: at most 7 AND gates for 4 inputs. Recursion depth at most 4.
fn shannon_plain(inputs: usize, table: u64) -> Result<SmallXag, XagError> {
    if inputs == 0 {
        return SmallXag::affine(
            0,
            if table & 1 == 1 {
                Affine::ONE
            } else {
                Affine::ZERO
            },
        );
    }
    let n = inputs - 1;
    let f0 = table & row_mask(n);
    let f1 = (table >> (1 << n)) & row_mask(n);
    let low = shannon_plain(n, f0)?;
    let diff = shannon_plain(n, f0 ^ f1)?;
    let mut x = SmallXag::new(inputs)?;
    let ins: Vec<Affine> = (0..n).map(Affine::input).collect();
    let o0 = x.append(&low, &ins)?[0];
    let od = x.append(&diff, &ins)?[0];
    let out = if od.is_constant() {
        if od.constant() {
            o0 ^ Affine::input(n)
        } else {
            o0
        }
    } else {
        o0 ^ x.add_and(Affine::input(n), od)?
    };
    x.add_output(out)?;
    Ok(x)
}

/// The answer to one SAT question.
pub(super) enum Answer {
    Found(SmallXag),
    Impossible,
    GaveUp,
}

/// Clauses and fresh variables for one SAT question.
struct Encoding {
    s: cadical::Solver<cadical::Timeout>,
    next: i32,
}

impl Encoding {
    fn var(&mut self) -> i32 {
        self.next += 1;
        self.next
    }

    fn xor(&mut self, a: i32, b: i32) -> i32 {
        let z = self.var();
        self.s.add_clause([-z, a, b]);
        self.s.add_clause([-z, -a, -b]);
        self.s.add_clause([z, -a, b]);
        self.s.add_clause([z, a, -b]);
        z
    }

    fn and(&mut self, a: i32, b: i32) -> i32 {
        let z = self.var();
        self.s.add_clause([-z, a]);
        self.s.add_clause([-z, b]);
        self.s.add_clause([z, -a, -b]);
        z
    }

    fn or(&mut self, a: i32, b: i32) -> i32 {
        let z = self.var();
        self.s.add_clause([z, -a]);
        self.s.add_clause([z, -b]);
        self.s.add_clause([-z, a, b]);
        z
    }

    /// `acc ^ b`, where `None` stands for the constant 0.
    fn xor_opt(&mut self, acc: Option<i32>, b: i32) -> Option<i32> {
        Some(match acc {
            None => b,
            Some(a) => self.xor(a, b),
        })
    }

    /// The value on every row `r >= 1` of the linear form of the inputs whose
    /// selectors are `sel`: one XOR per row, from the row without its lowest bit.
    fn linear_rows(&mut self, sel: &[i32], rows: usize) -> Vec<Option<i32>> {
        let mut v: Vec<Option<i32>> = vec![None; rows];
        for r in 1..rows {
            let low = r.trailing_zeros() as usize;
            v[r] = self.xor_opt(v[r & (r - 1)], sel[low]);
        }
        v
    }

    /// `hi[p]`: some selector at position `p` or above is set.
    fn at_or_above(&mut self, sel: &[i32]) -> Vec<i32> {
        let n = sel.len();
        let mut hi = vec![0i32; n];
        hi[n - 1] = sel[n - 1];
        for p in (0..n - 1).rev() {
            hi[p] = self.or(sel[p], hi[p + 1]);
        }
        hi
    }
}

/// Is there an XAG of exactly `m` AND gates for `table`, each gate in the
/// canonical form of the module documentation? With `first`, the first gate
/// is fixed to that operand pair (input sets, in reduced echelon form), and
/// the order of highest signals is kept from the second gate on only.
// Indices name the encoding's variables (gate j, signal p, row r).
#[allow(clippy::needless_range_loop)]
pub(super) fn solve(
    k: usize,
    table: u64,
    m: usize,
    time: Duration,
    conflicts: Option<u32>,
    first: Option<[u32; 2]>,
) -> Answer {
    let rows = 1usize << k;
    let mut e = Encoding {
        s: cadical::Solver::new(),
        next: 0,
    };
    e.s.set_callbacks(Some(cadical::Timeout::new(
        time.as_secs_f32().min(f32::MAX),
    )));
    if let Some(c) = conflicts {
        // Only fails for an unknown limit name.
        let _ = e.s.set_limit("conflicts", c.min(i32::MAX as u32) as i32);
    }
    // sel[j][0] = a, sel[j][1] = b: selectors over signals 0..k+j (inputs, then gates).
    let mut sel: Vec<[Vec<i32>; 2]> = Vec::with_capacity(m);
    let mut value: Vec<Vec<i32>> = Vec::with_capacity(m); // value[j][r], r >= 1
    let mut top: Vec<Vec<i32>> = Vec::with_capacity(m); // at_or_above of a
    for j in 0..m {
        let signals = k + j;
        let a: Vec<i32> = (0..signals).map(|_| e.var()).collect();
        let b: Vec<i32> = (0..signals).map(|_| e.var()).collect();
        let hi_a = e.at_or_above(&a);
        let hi_b = e.at_or_above(&b);
        for p in 0..signals {
            // b lies wholly below a's pivot ...
            if p + 1 < signals {
                e.s.add_clause([-b[p], hi_a[p + 1]]);
            } else {
                e.s.add_clause([-b[p]]);
            }
            // ... and a misses b's pivot.
            if p + 1 < signals {
                e.s.add_clause([-b[p], hi_b[p + 1], -a[p]]);
            } else {
                e.s.add_clause([-b[p], -a[p]]);
            }
        }
        e.s.add_clause([hi_b[0]]);
        if let (0, Some(pair)) = (j, first) {
            for (side, sel) in [&a, &b].into_iter().enumerate() {
                for (p, &v) in sel.iter().enumerate() {
                    e.s.add_clause([if pair[side] >> p & 1 == 1 { v } else { -v }]);
                }
            }
        }
        if j > 1 || (j == 1 && first.is_none()) {
            // The highest signal never decreases from gate to gate.
            for p in 0..signals - 1 {
                e.s.add_clause([-top[j - 1][p], hi_a[p]]);
            }
        }
        let mut ops: [Vec<Option<i32>>; 2] = [Vec::new(), Vec::new()];
        for (side, s) in [&a, &b].into_iter().enumerate() {
            let mut v = e.linear_rows(&s[..k], rows);
            for r in 1..rows {
                for i in 0..j {
                    let t = e.and(s[k + i], value[i][r]);
                    v[r] = e.xor_opt(v[r], t);
                }
            }
            ops[side] = v;
        }
        let mut val = vec![0i32; rows];
        for r in 1..rows {
            let (x, y) = (ops[0][r].expect("row >= 1"), ops[1][r].expect("row >= 1"));
            val[r] = e.and(x, y);
        }
        value.push(val);
        top.push(hi_a);
        sel.push([a, b]);
    }
    // The output: f(r) ^ f(0) = linear part ^ selected gates.
    let out_in: Vec<i32> = (0..k).map(|_| e.var()).collect();
    let out_g: Vec<i32> = (0..m).map(|_| e.var()).collect();
    let mut lin = e.linear_rows(&out_in, rows);
    let f0 = table & 1;
    for r in 1..rows {
        let mut acc = lin[r].take();
        for i in 0..m {
            let t = e.and(out_g[i], value[i][r]);
            acc = e.xor_opt(acc, t);
        }
        let want = (table >> r & 1) ^ f0 == 1;
        let lit = acc.expect("row >= 1");
        e.s.add_clause([if want { lit } else { -lit }]);
    }
    // Every gate feeds a later gate or the output.
    for j in 0..m {
        let mut uses = vec![out_g[j]];
        for l in j + 1..m {
            uses.push(sel[l][0][k + j]);
            uses.push(sel[l][1][k + j]);
        }
        e.s.add_clause(uses);
    }
    match e.s.solve() {
        None => Answer::GaveUp,
        Some(false) => Answer::Impossible,
        Some(true) => {
            let signal = |p: usize| {
                if p < k {
                    Affine::input(p)
                } else {
                    Affine::gate(p - k)
                }
            };
            let pick = |e: &Encoding, s: &[i32]| {
                s.iter().enumerate().fold(Affine::ZERO, |f, (p, &v)| {
                    if e.s.value(v).unwrap_or(false) {
                        f ^ signal(p)
                    } else {
                        f
                    }
                })
            };
            let mut x = SmallXag::new(k).expect("k checked");
            for [a, b] in &sel {
                let (a, b) = (pick(&e, a), pick(&e, b));
                x.add_and(a, b).expect("m is below XAG_MAX_ANDS");
            }
            let mut out = pick(&e, &out_in);
            for (i, &v) in out_g.iter().enumerate() {
                if e.s.value(v).unwrap_or(false) {
                    out ^= Affine::gate(i);
                }
            }
            if f0 == 1 {
                out = !out;
            }
            x.add_output(out).expect("one output");
            Answer::Found(x)
        }
    }
}
