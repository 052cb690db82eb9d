//! Multi-level XOR-AND networks from truth tables, with sharing across
//! outputs.
//!
//! A table reaches the network through a reduced ordered decision diagram
//! whose nodes are positive Davio expansions: on the top variable `x`,
//! `f = f0 ^ x & (f0 ^ f1)`, one AND, and none when `f0 ^ f1` is constant
//! (the step is an XOR) or `f` does not depend on `x`. Subfunctions are hashed
//! by their truth table up to complement (a complement is a free edge), so a
//! subfunction needed by several nodes or several outputs is built once, and
//! `x & g` is shared when `g` recurs under the same variable. A subfunction
//! that is the XOR of subfunctions already built on its level (found by
//! Gaussian elimination over GF(2) on their truth tables, at most
//! `SPAN_MAX` a level) is that XOR, at no AND: this halves the ANDs of the
//! AES S-box and of multipliers against hashing alone. A few variable
//! orders are tried and the one with the fewest ANDs kept (the order of an
//! ordered Davio diagram sets its size: Kebschull, Schubert, Rosenstiel,
//! "Multilevel logic synthesis based on functional decision diagrams",
//! EDAC 1992, the method's origin; from memory).
//!
//! A totally symmetric table (its value depends only on the number of ones
//! in the input) is built instead on the binary count of ones, computed by
//! full and half adders of one AND each, Boyar and Peralta's route to the
//! symmetric functions ("Tight bounds for the multiplicative complexity of
//! symmetric Boolean functions", TCS 396, 2008: the count of `n` bits takes
//! `n - popcount(n)` ANDs; from memory); the table then becomes a function
//! of the `log2(n + 1)` count bits, decomposed as above. Whichever of the two
//! has fewer ANDs is kept.
//!
//! Complexity: per order, `O(2^n)` to permute each table plus `O(2^n)` words
//! hashed over the diagram's levels; inputs are capped at
//! [`DECOMPOSE_MAX_INPUTS`] before any work.

use super::rewrite::and_count;
use crate::logic::{Lit, Network, TruthTable};
use std::collections::HashMap;

/// Most inputs a table may have to be decomposed (past it the caller keeps
/// its two-level form): `2^20` bits is 128 KiB per table and order.
pub const DECOMPOSE_MAX_INPUTS: usize = 20;

/// Most subfunctions of one level kept for finding XORs of built ones.
const SPAN_MAX: usize = 256;

/// A table's bits as words over `k` variables (bits past `2^k` are 0).
type Words = Vec<u64>;

fn mask(k: usize) -> u64 {
    if k >= 6 {
        u64::MAX
    } else {
        (1u64 << (1u32 << k)) - 1
    }
}

fn is_zero(t: &[u64]) -> bool {
    t.iter().all(|&w| w == 0)
}

fn complement(t: &[u64], k: usize) -> Words {
    t.iter().map(|&w| !w & mask(k)).collect()
}

/// The two cofactors on the top variable (variable `k - 1`).
fn halves(t: &[u64], k: usize) -> (Words, Words) {
    if k > 6 {
        let h = t.len() / 2;
        (t[..h].to_vec(), t[h..].to_vec())
    } else {
        let half = 1u32 << (k - 1);
        let m = mask(k - 1);
        (vec![t[0] & m], vec![(t[0] >> half) & m])
    }
}

/// One ordered Davio diagram under construction in `net`.
struct Builder<'a> {
    net: &'a mut Network,
    /// The literal of each level's variable: level `k` (a table over `k`
    /// variables) splits on `vars[k - 1]`.
    vars: Vec<Lit>,
    /// Per level, built subfunctions (normalized so bit 0 is 0).
    memo: Vec<HashMap<Words, Lit>>,
    /// Per level, built subfunctions in echelon form over GF(2): (pivot
    /// row, table, literal of the XOR it stands for).
    span: Vec<Vec<(usize, Words, Lit)>>,
}

impl Builder<'_> {
    fn new(net: &mut Network, vars: Vec<Lit>) -> Builder<'_> {
        let levels = vars.len() + 1;
        Builder {
            net,
            vars,
            memo: vec![HashMap::new(); levels],
            span: vec![Vec::new(); levels],
        }
    }

    /// The literal of the function `t` over `k` variables, if already known.
    fn known(&self, t: &[u64], k: usize) -> Option<Lit> {
        if is_zero(t) {
            return Some(Lit::FALSE);
        }
        if t[0] & 1 == 1 {
            let c = complement(t, k);
            if is_zero(&c) {
                return Some(Lit::TRUE);
            }
            self.memo[k].get(&c).map(|l| l.inverted())
        } else {
            self.memo[k].get(t).copied()
        }
    }

    /// `t` reduced by the level's echelon basis: the residual and the XOR
    /// of the literals used (built only when `build_lit`).
    fn reduce(&mut self, t: &[u64], k: usize, build_lit: bool) -> (Words, Lit) {
        let mut r = t.to_vec();
        let mut lit = Lit::FALSE;
        for i in 0..self.span[k].len() {
            let (pivot, ref table, l) = self.span[k][i];
            if (r[pivot / 64] >> (pivot % 64)) & 1 == 1 {
                for (a, b) in r.iter_mut().zip(table) {
                    *a ^= b;
                }
                if build_lit {
                    lit = self.net.xor(lit, l);
                }
            }
        }
        (r, lit)
    }

    /// The literal of `t` (normalized) as an XOR of subfunctions already
    /// built at level `k`, if it is one: an XOR costs no AND.
    fn in_span(&mut self, t: &[u64], k: usize) -> Option<Lit> {
        let (r, _) = self.reduce(t, k, false);
        if is_zero(&r) {
            Some(self.reduce(t, k, true).1)
        } else {
            None
        }
    }

    /// Adds the built subfunction `t` (literal `lit`) to the level's basis,
    /// up to `SPAN_MAX` entries a level so reduction stays cheap.
    fn add_to_span(&mut self, t: &[u64], k: usize, lit: Lit) {
        if self.span[k].len() >= SPAN_MAX {
            return;
        }
        let (r, combo) = self.reduce(t, k, true);
        if let Some(pivot) = r
            .iter()
            .enumerate()
            .find(|(_, &w)| w != 0)
            .map(|(i, w)| 64 * i + w.trailing_zeros() as usize)
        {
            let l = self.net.xor(lit, combo);
            self.span[k].push((pivot, r, l));
        }
    }

    /// Builds the function `t` over the first `k` variables. Recursion depth
    /// is at most `k`, itself at most [`DECOMPOSE_MAX_INPUTS`].
    fn build(&mut self, t: &[u64], k: usize) -> Lit {
        if let Some(l) = self.known(t, k) {
            return l;
        }
        let neg = t[0] & 1 == 1;
        let norm: Words = if neg { complement(t, k) } else { t.to_vec() };
        let (f0, f1) = halves(&norm, k);
        let lit = if let Some(l) = self.in_span(&norm, k) {
            l
        } else if f0 == f1 {
            self.build(&f0, k - 1)
        } else {
            let g: Words = f0.iter().zip(&f1).map(|(a, b)| a ^ b).collect();
            let x = self.vars[k - 1];
            let lg = self.build(&g, k - 1);
            let xg = self.net.and(x, lg);
            // f = f0 ^ x g = f1 ^ g ^ x g: start from whichever cofactor is
            // already built, f0 when neither is.
            let base = match (self.known(&f0, k - 1), self.known(&f1, k - 1)) {
                (Some(l0), _) => l0,
                (None, Some(l1)) => self.net.xor(l1, lg),
                (None, None) => self.build(&f0, k - 1),
            };
            self.net.xor(base, xg)
        };
        self.add_to_span(&norm, k, lit);
        self.memo[k].insert(norm, lit);
        if neg {
            lit.inverted()
        } else {
            lit
        }
    }
}

/// `t` (over `n` variables) with its variables renamed so that variable
/// `order[d]` becomes variable `n - 1 - d`: the diagram splits on `order[0]`
/// first.
fn permuted(t: &TruthTable, order: &[usize]) -> Words {
    let n = order.len();
    // The source row of a target row `y`, split in a low and a high half of
    // `y`'s bits so each half is a lookup.
    let lo_bits = n / 2;
    let src_of = |bits: std::ops::Range<usize>| -> Vec<u64> {
        let width = bits.len();
        (0..1u64 << width)
            .map(|part| {
                let mut x = 0u64;
                for (i, pos) in bits.clone().enumerate() {
                    if (part >> i) & 1 == 1 {
                        x |= 1 << order[n - 1 - pos];
                    }
                }
                x
            })
            .collect()
    };
    let lo = src_of(0..lo_bits);
    let hi = src_of(lo_bits..n);
    let words = t.words();
    let mut out = vec![0u64; ((1usize << n) / 64).max(1)];
    for y in 0..1usize << n {
        let x = (lo[y & ((1 << lo_bits) - 1)] | hi[y >> lo_bits]) as usize;
        if (words[x / 64] >> (x % 64)) & 1 == 1 {
            out[y / 64] |= 1 << (y % 64);
        }
    }
    out
}

/// The variable orders tried: as given, reversed, and the two halves
/// interleaved both ways (operands of arithmetic are usually the two halves
/// of the inputs, and their diagrams are small when bits of equal weight
/// are neighbours).
fn orders(n: usize) -> Vec<Vec<usize>> {
    let id: Vec<usize> = (0..n).collect();
    let rev: Vec<usize> = (0..n).rev().collect();
    // The first half is 0..h, the second h..n (as long or one shorter).
    let h = n.div_ceil(2);
    let mut inter = Vec::with_capacity(n);
    for i in 0..h {
        inter.push(i);
        if h + i < n {
            inter.push(h + i);
        }
    }
    let inter_rev: Vec<usize> = inter.iter().rev().copied().collect();
    let mut all = vec![id, rev, inter, inter_rev];
    all.dedup();
    all
}

/// Builds `tables` (each over `vars.len()` variables, variable `j` read from
/// `vars[j]`) into `net` by the ordered Davio diagram over `order`.
fn diagram_into(
    net: &mut Network,
    vars: &[Lit],
    tables: &[&TruthTable],
    order: &[usize],
) -> Vec<Lit> {
    let n = vars.len();
    // Level k splits on the variable order[n - k].
    let level_vars: Vec<Lit> = (1..=n).map(|k| vars[order[n - k]]).collect();
    let mut b = Builder::new(net, level_vars);
    tables
        .iter()
        .map(|t| {
            let p = permuted(t, order);
            b.build(&p, n)
        })
        .collect()
}

/// The best order for `tables` over `vars` (fewest ANDs, first on ties).
fn best_order(
    inputs: usize,
    vars_of: &dyn Fn(&mut Network) -> Vec<Lit>,
    tables: &[&TruthTable],
) -> Vec<usize> {
    let n = tables.first().map_or(0, |t| t.vars());
    let mut best: Option<(usize, Vec<usize>)> = None;
    for order in orders(n) {
        let mut net = Network::new(inputs);
        let vars = vars_of(&mut net);
        net.outputs = diagram_into(&mut net, &vars, tables, &order);
        let ands = and_count(&net);
        if best.as_ref().is_none_or(|(b, _)| ands < *b) {
            best = Some((ands, order));
        }
    }
    best.map(|(_, o)| o).unwrap_or_default()
}

/// Whether `t`'s value depends only on the number of ones of its row, and
/// if so its value for each count `0..=n`.
fn symmetric_profile(t: &TruthTable) -> Option<Vec<bool>> {
    let n = t.vars();
    let mut value: Vec<Option<bool>> = vec![None; n + 1];
    for x in 0..t.len() {
        let w = (x as u64).count_ones() as usize;
        let b = t.get(x);
        match value[w] {
            None => value[w] = Some(b),
            Some(v) if v != b => return None,
            _ => {}
        }
    }
    Some(value.into_iter().map(|v| v.unwrap_or(false)).collect())
}

/// Rows of the algebraic normal form (the XOR of AND monomials, Reed and
/// Muller) of a function of `k <= 5` variables given as one word: bit `m` of
/// the result is the coefficient of the monomial of the variables in `m`.
fn anf(mut w: u64, k: usize) -> u64 {
    // Bit i of the row index set: positions whose index has bit i.
    const HIGH: [u64; 5] = [
        0xaaaa_aaaa_aaaa_aaaa,
        0xcccc_cccc_cccc_cccc,
        0xf0f0_f0f0_f0f0_f0f0,
        0xff00_ff00_ff00_ff00,
        0xffff_0000_ffff_0000,
    ];
    for (i, high) in HIGH.iter().enumerate().take(k) {
        w ^= (w << (1 << i)) & high;
    }
    w & mask(k)
}

/// A symmetric function's value per count of ones (`p[w]`, `w <= n`) as a
/// word over the `k` count bits, the counts past `n` (which never occur)
/// filled so that its algebraic normal form has the lowest degree, then the
/// fewest monomials of degree 2 or more (each needs an AND); at most
/// `2^(2^k - n - 1)` fills, `2^15` for 16 inputs.
fn fill_counts(p: &[bool], k: usize) -> u64 {
    let base = p
        .iter()
        .enumerate()
        .fold(0u64, |w, (i, &b)| w | (b as u64) << i);
    let free: Vec<usize> = (p.len()..1 << k).collect();
    let cost = |w: u64| {
        let a = anf(w, k);
        let degree = (0..1u64 << k)
            .filter(|m| (a >> m) & 1 == 1)
            .map(|m| m.count_ones())
            .max()
            .unwrap_or(0);
        let nonlinear = (0..1u64 << k)
            .filter(|m| (a >> m) & 1 == 1 && m.count_ones() >= 2)
            .count();
        (degree, nonlinear)
    };
    let mut best = (cost(base), base);
    for fill in 1u64..1 << free.len() {
        let mut w = base;
        for (i, &row) in free.iter().enumerate() {
            w |= ((fill >> i) & 1) << row;
        }
        let c = cost(w);
        if c < best.0 {
            best = (c, w);
        }
    }
    best.1
}

/// The binary count of ones of `bits`, low bit first, by full adders (sum
/// `a ^ b ^ c`, carry `((a ^ c) & (b ^ c)) ^ c`: one AND) while a column holds
/// three bits and half adders (carry `a & b`) when it holds two.
fn count_ones(net: &mut Network, bits: &[Lit]) -> Vec<Lit> {
    let mut columns: Vec<std::collections::VecDeque<Lit>> = vec![bits.iter().copied().collect()];
    let mut out = Vec::new();
    let mut c = 0;
    while c < columns.len() {
        while columns[c].len() >= 2 {
            let a = columns[c].pop_front().expect("two bits");
            let b = columns[c].pop_front().expect("two bits");
            let (sum, carry) = if let Some(d) = columns[c].pop_front() {
                let ad = net.xor(a, d);
                let bd = net.xor(b, d);
                let m = net.and(ad, bd);
                let ab = net.xor(a, b);
                (net.xor(ab, d), net.xor(m, d))
            } else {
                (net.xor(a, b), net.and(a, b))
            };
            columns[c].push_back(sum);
            if columns.len() == c + 1 {
                columns.push(Default::default());
            }
            columns[c + 1].push_back(carry);
        }
        out.push(columns[c].pop_front().unwrap_or(Lit::FALSE));
        c += 1;
    }
    out
}

/// Builds `tables` (all over `net.inputs` variables, at most
/// [`DECOMPOSE_MAX_INPUTS`]) into `net`, one literal per table: the cheaper
/// in ANDs of the ordered Davio diagram over the best of a few orders and,
/// when some tables are totally symmetric, those tables on the count of
/// ones.
///
/// # Panics
/// If a table's variable count differs from `net.inputs` or exceeds
/// [`DECOMPOSE_MAX_INPUTS`]; callers check first.
pub fn tables_into(net: &mut Network, tables: &[&TruthTable]) -> Vec<Lit> {
    let n = net.inputs;
    assert!(n <= DECOMPOSE_MAX_INPUTS, "too many inputs to decompose");
    assert!(
        tables.iter().all(|t| t.vars() == n),
        "tables over the inputs"
    );
    if tables.is_empty() {
        return Vec::new();
    }
    let inputs_of = |net: &mut Network| (0..net.inputs).map(|j| net.input(j)).collect::<Vec<_>>();
    let plain = |net: &mut Network| {
        let order = best_order(n, &inputs_of, tables);
        let vars = inputs_of(net);
        diagram_into(net, &vars, tables, &order)
    };
    let profiles: Vec<Option<Vec<bool>>> = tables.iter().map(|t| symmetric_profile(t)).collect();
    if n < 3 || profiles.iter().all(Option::is_none) {
        return plain(net);
    }
    // The symmetric route on a scratch network, compared with the plain one.
    let symmetric = |net: &mut Network| -> Vec<Lit> {
        let bits = inputs_of(net);
        let count = count_ones(net, &bits);
        let k = count.len();
        debug_assert!(k <= 5, "the count of at most 31 bits");
        let (sym, rest): (Vec<usize>, Vec<usize>) =
            (0..tables.len()).partition(|&j| profiles[j].is_some());
        let on_count: Vec<TruthTable> = sym
            .iter()
            .map(|&j| {
                let word = fill_counts(profiles[j].as_ref().expect("symmetric"), k);
                TruthTable::from_fn(k, |w| (word >> w) & 1 == 1)
            })
            .collect();
        let on_refs: Vec<&TruthTable> = on_count.iter().collect();
        let order = best_order(
            n,
            &|net: &mut Network| {
                let bits = inputs_of(net);
                count_ones(net, &bits)
            },
            &on_refs,
        );
        let sym_lits = diagram_into(net, &count, &on_refs, &order);
        let rest_tables: Vec<&TruthTable> = rest.iter().map(|&j| tables[j]).collect();
        let rest_lits = if rest_tables.is_empty() {
            Vec::new()
        } else {
            let order = best_order(n, &inputs_of, &rest_tables);
            diagram_into(net, &bits, &rest_tables, &order)
        };
        let mut lits = vec![Lit::FALSE; tables.len()];
        for (j, l) in sym.iter().zip(sym_lits) {
            lits[*j] = l;
        }
        for (j, l) in rest.iter().zip(rest_lits) {
            lits[*j] = l;
        }
        lits
    };
    let mut a = Network::new(n);
    a.outputs = plain(&mut a);
    let mut b = Network::new(n);
    b.outputs = symmetric(&mut b);
    if and_count(&b) < and_count(&a) {
        symmetric(net)
    } else {
        plain(net)
    }
}

#[cfg(test)]
#[path = "decompose_tests.rs"]
mod tests;
