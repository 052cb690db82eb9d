//! The complete 4-input database: a minimum-AND XAG for each of the 65,536
//! functions of 4 inputs, through their affine equivalence classes.
//!
//! Two functions are affine equivalent when `g(x) = f(A x ^ b) ^ l.x ^ c` with
//! `A` invertible over GF(2); such a map costs no AND gate (its inverse
//! neither), so both have the same multiplicative complexity and a circuit of
//! one becomes a circuit of the other by substituting its inputs and XORing
//! its output. This is the classification behind the cut rewriting of Testa,
//! Soeken, Amarù and De Micheli, "Reducing the multiplicative complexity in
//! logic networks for cryptography and security applications" (DAC 2019), and
//! the counts in Turan and Peralta, "The multiplicative complexity of Boolean
//! functions on four and five variables" (LightSec 2014).
//!
//! Building: a breadth-first search over 21 generators of that group (the 12
//! transvections `x_i ^= x_j`, the 4 translations `x_i ^= 1`, the 4 output
//! additions `^ x_i` and the output complement), started from the smallest
//! function not yet reached, walks each class and records, for every member,
//! the map from the class's representative (its smallest truth table). Each
//! representative is then solved exactly by SAT (as in [`exact_xag`]). The build takes
//! milliseconds (see `benches/xag.rs`) and keeps 256 KB of maps.
//!
//! A query decodes the member's map and substitutes it into the
//! representative's circuit: a few dozen word operations, no allocation.

#[cfg(doc)]
use super::exact::exact_xag;
use super::exact::{exact_small, exact_with_database, restriction_bound, ExactXag, SearchBudget};
use super::form::XagError;
use super::form::{Affine, SmallXag, XAG_MAX_INPUTS};

/// The map from a class representative `r` to a member `f`:
/// `f(x) = r(y) ^ linear.x ^ constant`, where `y_p = rows[p].x ^ shift_p`.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct AffineTransform4 {
    /// Row `p` of the invertible matrix: the inputs (bit `i` for `x_i`) whose
    /// XOR feeds the representative's input `p`.
    pub rows: [u8; 4],
    /// Bit `p`: the constant XORed into the representative's input `p`.
    pub shift: u8,
    /// The inputs (bit `i` for `x_i`) XORed into the output.
    pub linear: u8,
    /// Whether the output is complemented.
    pub constant: bool,
}

impl AffineTransform4 {
    /// The identity map.
    pub const IDENTITY: AffineTransform4 = AffineTransform4 {
        rows: [1, 2, 4, 8],
        shift: 0,
        linear: 0,
        constant: false,
    };

    /// The member `f` that this map makes of the function `r` (row `x` of a
    /// table is bit `x`): evaluated row by row, independently of the search.
    pub fn apply(&self, r: u16) -> u16 {
        (0..16u32).fold(0u16, |t, x| {
            let y = (0..4).fold(0u32, |y, p| {
                let bit = (self.rows[p] as u32 & x).count_ones() & 1 ^ (self.shift as u32 >> p & 1);
                y | bit << p
            });
            let v = (r as u32 >> y & 1)
                ^ ((self.linear as u32 & x).count_ones() & 1)
                ^ self.constant as u32;
            t | (v as u16) << x
        })
    }

    fn pack(&self) -> u32 {
        let rows = (0..4).fold(0u32, |a, p| a | (self.rows[p] as u32 & 15) << (4 * p));
        rows | (self.shift as u32 & 15) << 16
            | (self.linear as u32 & 15) << 20
            | (self.constant as u32) << 24
    }

    fn unpack(v: u32) -> AffineTransform4 {
        AffineTransform4 {
            rows: [0, 1, 2, 3].map(|p| (v >> (4 * p) & 15) as u8),
            shift: (v >> 16 & 15) as u8,
            linear: (v >> 20 & 15) as u8,
            constant: v >> 24 & 1 == 1,
        }
    }
}

const CLASS_SHIFT: u32 = 25;
const UNSEEN: u32 = u32::MAX;

/// Exchanges the bits selected by `mask` with those `shift` places above.
fn delta_swap(t: u16, mask: u16, shift: u32) -> u16 {
    let d = ((t >> shift) ^ t) & mask;
    t ^ d ^ (d << shift)
}

/// Rows of a 4-input table where input `i` is 1.
const INPUT_ROWS: [u16; 4] = [0xaaaa, 0xcccc, 0xf0f0, 0xff00];

/// One generator of the affine group acting on 4-input functions.
#[derive(Clone, Copy)]
enum Generator {
    /// `x_i ^= x_j` on the inputs.
    Transvection(usize, usize),
    /// `x_i ^= 1` on the inputs.
    Translation(usize),
    /// `^ x_i` on the output.
    AddInput(usize),
    /// `^ 1` on the output.
    Complement,
}

impl Generator {
    fn all() -> Vec<Generator> {
        let mut v = Vec::with_capacity(21);
        for i in 0..4 {
            for j in 0..4 {
                if i != j {
                    v.push(Generator::Transvection(i, j));
                }
            }
        }
        v.extend((0..4).map(Generator::Translation));
        v.extend((0..4).map(Generator::AddInput));
        v.push(Generator::Complement);
        v
    }

    /// `g'(x) = g(E x)` and friends, on the table.
    fn table(self, t: u16) -> u16 {
        match self {
            Generator::Transvection(i, j) => delta_swap(t, INPUT_ROWS[j] & !INPUT_ROWS[i], 1 << i),
            Generator::Translation(i) => delta_swap(t, !INPUT_ROWS[i], 1 << i),
            Generator::AddInput(i) => t ^ INPUT_ROWS[i],
            Generator::Complement => !t,
        }
    }

    /// The map to `g'` from the map to `g`.
    fn transform(self, m: AffineTransform4) -> AffineTransform4 {
        let mut m = m;
        match self {
            Generator::Transvection(i, j) => {
                // A_p . (E x) = A_p . x ^ A_pi x_j.
                for r in m.rows.iter_mut() {
                    *r ^= (*r >> i & 1) << j;
                }
                m.linear ^= (m.linear >> i & 1) << j;
            }
            Generator::Translation(i) => {
                for p in 0..4 {
                    m.shift ^= (m.rows[p] >> i & 1) << p;
                }
                m.constant ^= m.linear >> i & 1 == 1;
            }
            Generator::AddInput(i) => m.linear ^= 1 << i,
            Generator::Complement => m.constant = !m.constant,
        }
        m
    }
}

/// One affine equivalence class.
#[derive(Clone, Copy, Debug)]
struct Class {
    representative: u16,
    size: u32,
    circuit: SmallXag,
}

/// Minimum-AND XAGs for all functions of 4 inputs (see the module
/// documentation). Build once with [`Xag4Database::build`] and keep it.
#[derive(Clone, Debug)]
pub struct Xag4Database {
    /// Per table: the class index (from bit 25) and the packed map from the
    /// representative.
    entries: Vec<u32>,
    classes: Vec<Class>,
}

impl Xag4Database {
    /// Classifies all 65,536 functions and solves each class representative
    /// exactly (without a budget: each takes milliseconds).
    pub fn build() -> Xag4Database {
        let generators = Generator::all();
        let mut entries = vec![UNSEEN; 1 << 16];
        let mut classes = Vec::new();
        let mut queue: Vec<u16> = Vec::with_capacity(1 << 16);
        for start in 0..=u16::MAX {
            if entries[start as usize] != UNSEEN {
                continue;
            }
            let class = classes.len() as u32;
            entries[start as usize] = class << CLASS_SHIFT | AffineTransform4::IDENTITY.pack();
            queue.clear();
            queue.push(start);
            let mut at = 0;
            while at < queue.len() {
                let t = queue[at];
                at += 1;
                let m = AffineTransform4::unpack(entries[t as usize]);
                for g in &generators {
                    let u = g.table(t);
                    if entries[u as usize] == UNSEEN {
                        entries[u as usize] = class << CLASS_SHIFT | g.transform(m).pack();
                        queue.push(u);
                    }
                }
            }
            let found = exact_small(4, start as u64, &SearchBudget::unlimited())
                .expect("a 4-input table is valid");
            assert!(found.is_minimal(), "an unlimited search ends proven");
            classes.push(Class {
                representative: start,
                size: queue.len() as u32,
                circuit: found.circuit,
            });
        }
        Xag4Database { entries, classes }
    }

    /// A minimum-AND XAG of the function with truth table `table` (row `x` is
    /// bit `x`; 4 inputs, one output).
    pub fn circuit(&self, table: u16) -> SmallXag {
        let e = self.entries[table as usize];
        let m = AffineTransform4::unpack(e);
        let mut c = self.classes[(e >> CLASS_SHIFT) as usize].circuit;
        let mut forms = [Affine::ZERO; XAG_MAX_INPUTS];
        for (p, (form, &row)) in forms.iter_mut().zip(&m.rows).enumerate() {
            *form =
                Affine::from_parts(row as u32, 0, m.shift >> p & 1 == 1).expect("4-bit input set");
        }
        c.replace_inputs(&forms);
        c.xor_output_unchecked(
            0,
            Affine::from_parts(m.linear as u32, 0, m.constant).expect("4-bit input set"),
        );
        c
    }

    /// The multiplicative complexity of the function (the AND count of
    /// [`Xag4Database::circuit`]).
    pub fn and_count(&self, table: u16) -> usize {
        self.classes[self.class_of(table)].circuit.and_count()
    }

    /// The index of the function's affine class (classes are numbered by
    /// their smallest member, increasing).
    pub fn class_of(&self, table: u16) -> usize {
        (self.entries[table as usize] >> CLASS_SHIFT) as usize
    }

    /// The smallest truth table in the function's class.
    pub fn representative(&self, table: u16) -> u16 {
        self.classes[self.class_of(table)].representative
    }

    /// The map that makes the function from its class representative:
    /// `transform(t).apply(representative(t)) == t`.
    pub fn transform(&self, table: u16) -> AffineTransform4 {
        AffineTransform4::unpack(self.entries[table as usize])
    }

    /// The number of affine classes.
    pub fn class_count(&self) -> usize {
        self.classes.len()
    }

    /// Class `class`'s representative, size and minimum circuit.
    pub fn class(&self, class: usize) -> Option<(u16, usize, &SmallXag)> {
        self.classes
            .get(class)
            .map(|c| (c.representative, c.size as usize, &c.circuit))
    }

    /// A minimum-AND XAG for a function of at most 6 inputs, within `budget`
    /// (see [`exact_xag`]); this database answers at most 4 inputs at once and
    /// gives the lower bounds and 4-input pieces for 5 and 6.
    pub fn exact(
        &self,
        inputs: usize,
        table: u64,
        budget: &SearchBudget,
    ) -> Result<ExactXag, XagError> {
        exact_with_database(self, inputs, table, budget)
    }

    /// A proven lower bound on the multiplicative complexity of a function of
    /// at most 6 inputs: exact up to 4 inputs; for 5 and 6 the largest of the
    /// degree, dimension and plane-restriction bounds (see [`exact_xag`]).
    /// Well under a millisecond.
    pub fn lower_bound(&self, inputs: usize, table: u64) -> Result<usize, XagError> {
        super::exact::multiplicative_lower_bound(inputs, table)?;
        Ok(restriction_bound(self, inputs, table))
    }

    /// How many functions need 0, 1, 2, ... AND gates.
    pub fn distribution(&self) -> Vec<usize> {
        let mut v = Vec::new();
        for c in &self.classes {
            let k = c.circuit.and_count();
            if v.len() <= k {
                v.resize(k + 1, 0);
            }
            v[k] += c.size as usize;
        }
        v
    }

    /// How many classes need 0, 1, 2, ... AND gates.
    pub fn class_distribution(&self) -> Vec<usize> {
        let mut v = Vec::new();
        for c in &self.classes {
            let k = c.circuit.and_count();
            if v.len() <= k {
                v.resize(k + 1, 0);
            }
            v[k] += 1;
        }
        v
    }
}
