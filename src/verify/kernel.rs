//! The verifier's compiled gate program and its bit-sliced block simulator, dispatched on CPU features.
//!
//! A block is `width` rows of `W` machine words: row `l` holds line `l` for
//! `64 W` basis states, one bit per state (the bit-slicing of Biham, "A fast
//! new DES implementation in software", FSE 1997). A gate is one pass over the
//! words of its rows: `target ^= AND of the (possibly complemented) controls`.
//!
//! The gate list is one flat `u32` array (no allocation per gate). NOT gates
//! cost no pass at all: they commute with every gate that targets their line,
//! so each is kept as a pending complement of its line, folded into the
//! polarity of every later control on that line, and applied once at the end
//! of [`GateProgram::run_block`].
//!
//! The inner loops are plain word loops over fixed-size arrays, which LLVM
//! vectorizes; each is compiled three times (portable, AVX2, AVX-512F) and
//! the [`Dispatch`] value picks one. A `Dispatch` is made only after the CPU
//! was asked, so holding one is the proof that its instructions exist.
//! Control polarities are XOR masks rather than branches: with mixed
//! polarities a branch per gate mispredicts, and the masks cost ALU slots
//! that the loads leave free.
//!
//! Measured (`benches/limit.rs`, AVX2): a Toffoli pass runs at the speed of
//! the bare `t ^= a & b` loop over rows in L1 for 64 and 128 words a row; rows
//! of 256 words lose 10-30 % once the block leaves L1. Keep
//! `width x W x 8` bytes within the L1 data cache where it matters: the
//! verifier's blocks are 128 words (`BLOCK_WORDS`) at every width, measured
//! best up to 32 lines and no slower at 48 and 64 (the whole check,
//! `cargo bench --bench limit`).
#![allow(dead_code)] // Some CPU levels and helpers serve only the benches and tests.

use std::fmt;

/// How the word loops are compiled.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Level {
    /// The target's baseline (SSE2 on x86-64): runs everywhere.
    Portable,
    /// 256-bit AVX2.
    Avx2,
    /// 512-bit AVX-512 Foundation.
    Avx512,
}

impl Level {
    /// Every level, slowest first.
    pub const ALL: [Level; 3] = [Level::Portable, Level::Avx2, Level::Avx512];

    /// The level's name in reports.
    pub fn name(self) -> &'static str {
        match self {
            Level::Portable => "portable",
            Level::Avx2 => "avx2",
            Level::Avx512 => "avx512",
        }
    }
}

/// A [`Level`] this CPU is known to run.
///
/// Only [`Dispatch::best`], [`Dispatch::force`] and [`Dispatch::available`]
/// make one, each after asking the CPU, which is what makes the
/// `target_feature` calls behind it sound. Ask once and keep the value in the
/// program that uses it.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct Dispatch {
    level: Level,
}

impl Dispatch {
    /// The widest level this CPU runs.
    pub fn best() -> Dispatch {
        Level::ALL
            .iter()
            .rev()
            .find_map(|&l| Dispatch::force(l))
            .unwrap_or(Dispatch {
                level: Level::Portable,
            })
    }

    /// `level`, if this CPU runs it.
    pub fn force(level: Level) -> Option<Dispatch> {
        let runs = match level {
            Level::Portable => true,
            #[cfg(target_arch = "x86_64")]
            Level::Avx2 => std::arch::is_x86_feature_detected!("avx2"),
            #[cfg(target_arch = "x86_64")]
            Level::Avx512 => std::arch::is_x86_feature_detected!("avx512f"),
            #[cfg(not(target_arch = "x86_64"))]
            _ => false,
        };
        runs.then_some(Dispatch { level })
    }

    /// Every level this CPU runs, slowest first.
    pub fn available() -> Vec<Dispatch> {
        Level::ALL
            .iter()
            .filter_map(|&l| Dispatch::force(l))
            .collect()
    }

    /// The level.
    pub fn level(self) -> Level {
        self.level
    }
}

/// Defines `fn NAME<const W: usize>(dispatch: Dispatch, params...)` whose body
/// is compiled for every [`Level`] and run at the one `dispatch` names.
/// Everything the body calls must be `#[inline(always)]`, or it runs at the
/// baseline level. The calling module must have `Dispatch` and `Level` in scope.
macro_rules! dispatched {
    ($(#[$meta:meta])* $vis:vis fn $name:ident<const $w:ident: usize>($($p:ident: $t:ty),* $(,)?) $body:block) => {
        $(#[$meta])*
        $vis fn $name<const $w: usize>(dispatch: Dispatch, $($p: $t),*) {
            #[inline(always)]
            fn body<const $w: usize>($($p: $t),*) $body

            #[cfg(target_arch = "x86_64")]
            #[target_feature(enable = "avx2")]
            unsafe fn avx2<const $w: usize>($($p: $t),*) {
                body::<$w>($($p),*)
            }

            #[cfg(target_arch = "x86_64")]
            #[target_feature(enable = "avx512f")]
            unsafe fn avx512<const $w: usize>($($p: $t),*) {
                body::<$w>($($p),*)
            }

            match dispatch.level() {
                #[cfg(target_arch = "x86_64")]
                // SAFETY: a Dispatch at Level::Avx512 exists only after
                // is_x86_feature_detected!("avx512f") answered yes on this CPU.
                Level::Avx512 => unsafe { avx512::<$w>($($p),*) },
                #[cfg(target_arch = "x86_64")]
                // SAFETY: a Dispatch at Level::Avx2 exists only after
                // is_x86_feature_detected!("avx2") answered yes on this CPU.
                Level::Avx2 => unsafe { avx2::<$w>($($p),*) },
                _ => body::<$w>($($p),*),
            }
        }
    };
}
pub(crate) use dispatched;

/// A control: a line and the value on which the gate fires.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct Literal {
    /// Line number.
    pub line: u32,
    /// `true`: the gate fires when the line is 1; `false`: when it is 0.
    pub positive: bool,
}

impl Literal {
    /// Fires on 1.
    pub fn pos(line: u32) -> Literal {
        Literal {
            line,
            positive: true,
        }
    }

    /// Fires on 0.
    pub fn neg(line: u32) -> Literal {
        Literal {
            line,
            positive: false,
        }
    }
}

/// Most lines a [`GateProgram`] may have: line numbers keep one bit for the polarity.
pub const MAX_LINES: usize = 1 << 31;

/// Why a gate or a block was refused.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
pub enum KernelError {
    /// More lines than [`MAX_LINES`].
    #[error("{0} lines is more than the gate program's limit of 2^31")]
    TooManyLines(usize),
    /// A target or control past the last line.
    #[error("gate {gate}: line {line} is not one of the program's {width} lines")]
    LineOutOfRange {
        /// Number of the gate in push order.
        gate: usize,
        /// The offending line.
        line: u32,
        /// Lines of the program.
        width: usize,
    },
    /// A control on the gate's own target.
    #[error("gate {gate}: line {line} is both target and control")]
    ControlOnTarget {
        /// Number of the gate in push order.
        gate: usize,
        /// The line.
        line: u32,
    },
    /// More controls than fit the program's format.
    #[error("gate {gate}: {controls} controls is more than 2^32 - 1")]
    TooManyControls {
        /// Number of the gate in push order.
        gate: usize,
        /// How many it had.
        controls: usize,
    },
    /// A program with measured uncomputes run without collecting their checks.
    #[error("the program holds measured uncomputes; run it with run_block_checked")]
    Unchecked,
    /// A measured uncompute without exactly two controls.
    #[error("gate {gate}: a measured uncompute takes two controls, found {controls}")]
    MeasuredShape {
        /// Number of the gate in push order.
        gate: usize,
        /// How many it had.
        controls: usize,
    },
    /// A block whose row count is not the program's width.
    #[error("the block has {rows} rows, the program has {width} lines")]
    BlockShape {
        /// Rows given.
        rows: usize,
        /// Lines of the program.
        width: usize,
    },
}

/// A reversible circuit of multi-controlled NOT gates compiled for [`GateProgram::run_block`].
///
/// Layout of `code`, gate after gate: the number of controls `n`, the target
/// line, then `n` controls as `line << 1 | fires_on_0`. Control polarities
/// already include the NOT gates pushed before (see the module docs). A
/// measured uncompute is [`MEASURED`], the target as `line << 1 |
/// complemented` (a NOT pending on it), and its two controls.
#[derive(Clone)]
pub struct GateProgram {
    width: usize,
    code: Vec<u32>,
    gates: usize,
    pushed: usize,
    measured: usize,
    /// Line `l` is complemented by NOT gates not yet applied.
    pending: Vec<bool>,
    dispatch: Dispatch,
}

impl fmt::Debug for GateProgram {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.debug_struct("GateProgram")
            .field("width", &self.width)
            .field("gates", &self.gates)
            .field("pushed", &self.pushed)
            .field("level", &self.dispatch.level())
            .finish()
    }
}

impl GateProgram {
    /// An empty program on `width` lines that runs at `dispatch`.
    pub fn new(width: usize, dispatch: Dispatch) -> Result<GateProgram, KernelError> {
        if width > MAX_LINES {
            return Err(KernelError::TooManyLines(width));
        }
        Ok(GateProgram {
            width,
            code: Vec::new(),
            gates: 0,
            pushed: 0,
            measured: 0,
            pending: vec![false; width],
            dispatch,
        })
    }

    /// Appends the gate "flip `target` when every control holds" (a NOT when
    /// `controls` is empty). Controls may repeat; none may be the target.
    /// O(number of controls); the gate is checked before anything is stored.
    pub fn push(&mut self, target: u32, controls: &[Literal]) -> Result<(), KernelError> {
        let gate = self.pushed;
        let width = self.width;
        let check = |line: u32| {
            if (line as usize) < width {
                Ok(())
            } else {
                Err(KernelError::LineOutOfRange { gate, line, width })
            }
        };
        check(target)?;
        for c in controls {
            check(c.line)?;
            if c.line == target {
                return Err(KernelError::ControlOnTarget { gate, line: target });
            }
        }
        let n = u32::try_from(controls.len()).map_err(|_| KernelError::TooManyControls {
            gate,
            controls: controls.len(),
        })?;
        self.pushed += 1;
        if controls.is_empty() {
            let p = &mut self.pending[target as usize];
            *p = !*p;
            return Ok(());
        }
        self.code.reserve(2 + controls.len());
        self.code.push(n);
        self.code.push(target);
        for c in controls {
            // A pending complement on the line flips which value fires.
            let fires_on_0 = c.positive == self.pending[c.line as usize];
            self.code.push(c.line << 1 | fires_on_0 as u32);
        }
        self.gates += 1;
        Ok(())
    }

    /// Appends a measured uncompute of the AND of `a` and `b` held by
    /// `target`: checked (the target must equal the AND on every state, see
    /// [`GateProgram::run_block_checked`]) and then set to 0.
    pub fn push_measured(&mut self, target: u32, controls: &[Literal]) -> Result<(), KernelError> {
        self.push_checked(MEASURED, target, controls)
    }

    /// Appends a temporary AND of `a` and `b` into `target`: checked (the
    /// target must be 0 on every state, see
    /// [`GateProgram::run_block_checked`]) and then flipped by the AND.
    pub fn push_and(&mut self, target: u32, controls: &[Literal]) -> Result<(), KernelError> {
        self.push_checked(AND, target, controls)
    }

    fn push_checked(
        &mut self,
        marker: u32,
        target: u32,
        controls: &[Literal],
    ) -> Result<(), KernelError> {
        let gate = self.pushed;
        if controls.len() != 2 {
            return Err(KernelError::MeasuredShape {
                gate,
                controls: controls.len(),
            });
        }
        let width = self.width;
        for &line in [target, controls[0].line, controls[1].line].iter() {
            if line as usize >= width {
                return Err(KernelError::LineOutOfRange { gate, line, width });
            }
        }
        if controls.iter().any(|c| c.line == target) {
            return Err(KernelError::ControlOnTarget { gate, line: target });
        }
        self.pushed += 1;
        self.code.push(marker);
        self.code
            .push(target << 1 | self.pending[target as usize] as u32);
        for c in controls {
            let fires_on_0 = c.positive == self.pending[c.line as usize];
            self.code.push(c.line << 1 | fires_on_0 as u32);
        }
        self.gates += 1;
        self.measured += 1;
        Ok(())
    }

    /// Measured uncomputes and temporary ANDs pushed.
    pub fn measured(&self) -> usize {
        self.measured
    }

    /// Lines.
    pub fn width(&self) -> usize {
        self.width
    }

    /// Gates with at least one control, each one pass over its rows.
    pub fn gates(&self) -> usize {
        self.gates
    }

    /// Gates pushed, NOT gates included.
    pub fn pushed(&self) -> usize {
        self.pushed
    }

    /// The level the program runs at.
    pub fn dispatch(&self) -> Dispatch {
        self.dispatch
    }

    /// The same program at another level.
    pub fn with_dispatch(mut self, dispatch: Dispatch) -> GateProgram {
        self.dispatch = dispatch;
        self
    }

    /// Runs the whole program on one block: `rows[l]` is line `l` for `64 W`
    /// basis states. Cost: one pass of `W` words per gate with controls, plus
    /// one per line left complemented by NOT gates. Any `W` works; see the
    /// module docs for the measured best.
    /// A program with measured uncomputes is refused ([`KernelError::Unchecked`]).
    pub fn run_block<const W: usize>(&self, rows: &mut [[u64; W]]) -> Result<(), KernelError> {
        if self.measured > 0 {
            return Err(KernelError::Unchecked);
        }
        let mut bad = [0u64; W];
        self.run_block_checked(rows, &mut bad)
    }

    /// [`GateProgram::run_block`] for any program: bit `k` of `bad[i]` is set
    /// for each state (word `i`, bit `k`) on which some measured uncompute
    /// found its target different from the AND of its controls, or some
    /// temporary AND found its target not 0.
    pub fn run_block_checked<const W: usize>(
        &self,
        rows: &mut [[u64; W]],
        bad: &mut [u64; W],
    ) -> Result<(), KernelError> {
        if rows.len() != self.width {
            return Err(KernelError::BlockShape {
                rows: rows.len(),
                width: self.width,
            });
        }
        run_gates::<W>(self.dispatch, &self.code, &self.pending, rows, bad);
        Ok(())
    }
}

/// The first word of a measured uncompute in a program's code.
const MEASURED: u32 = u32::MAX;
/// The first word of a temporary AND in a program's code.
const AND: u32 = u32::MAX - 1;

/// `rows` without row `t`, which is lent out mutably on its own.
struct Others<'a, const W: usize> {
    below: &'a [[u64; W]],
    above: &'a [[u64; W]],
    t: usize,
}

impl<'a, const W: usize> Others<'a, W> {
    #[inline(always)]
    fn split(rows: &'a mut [[u64; W]], t: usize) -> (&'a mut [u64; W], Others<'a, W>) {
        let (below, rest) = rows.split_at_mut(t);
        let (row, above) = rest
            .split_first_mut()
            .expect("row index checked when the program was built");
        (row, Others { below, above, t })
    }

    /// Row `l`, which is not `t`.
    #[inline(always)]
    fn get(&self, l: usize) -> &'a [u64; W] {
        if l < self.t {
            &self.below[l]
        } else {
            &self.above[l - self.t - 1]
        }
    }
}

/// `t ^= a ^ ma`: a CNOT, `ma` all-1 for a control on 0.
#[inline(always)]
fn cnot<const W: usize>(t: &mut [u64; W], a: &[u64; W], ma: u64) {
    for k in 0..W {
        t[k] ^= a[k] ^ ma;
    }
}

/// `t ^= (a ^ ma) & (b ^ mb)`: a Toffoli gate. The polarities are masks, not
/// branches: mixed polarities would mispredict, and the two XORs hide under
/// the loads.
#[inline(always)]
fn toffoli<const W: usize>(t: &mut [u64; W], a: &[u64; W], b: &[u64; W], ma: u64, mb: u64) {
    for k in 0..W {
        t[k] ^= (a[k] ^ ma) & (b[k] ^ mb);
    }
}

/// The mask that complements a row read through literal `lit`.
#[inline(always)]
fn flip(lit: u32) -> u64 {
    0u64.wrapping_sub((lit & 1) as u64)
}

/// `t ^= AND of three or more literals`.
#[inline(always)]
fn many<const W: usize>(t: &mut [u64; W], others: &Others<'_, W>, controls: &[u32]) {
    let (first, rest) = controls.split_at(2);
    let (last, middle) = rest.split_last().expect("at least three controls");
    let (a, ma) = (others.get((first[0] >> 1) as usize), flip(first[0]));
    let (b, mb) = (others.get((first[1] >> 1) as usize), flip(first[1]));
    let mut fire = [0u64; W];
    for k in 0..W {
        fire[k] = (a[k] ^ ma) & (b[k] ^ mb);
    }
    for &c in middle {
        let (r, m) = (others.get((c >> 1) as usize), flip(c));
        for k in 0..W {
            fire[k] &= r[k] ^ m;
        }
    }
    let (r, m) = (others.get((*last >> 1) as usize), flip(*last));
    for k in 0..W {
        t[k] ^= fire[k] & (r[k] ^ m);
    }
}

/// A measured uncompute: `bad |= (t ^ mt) ^ ((a ^ ma) & (b ^ mb))`, then
/// the target's value is 0 (its row is `mt`, the NOT still pending on it).
#[inline(always)]
#[allow(clippy::too_many_arguments)]
fn measured<const W: usize>(
    t: &mut [u64; W],
    a: &[u64; W],
    b: &[u64; W],
    mt: u64,
    ma: u64,
    mb: u64,
    bad: &mut [u64; W],
) {
    for k in 0..W {
        bad[k] |= t[k] ^ mt ^ ((a[k] ^ ma) & (b[k] ^ mb));
        t[k] = mt;
    }
}

/// A temporary AND: `bad |= t ^ mt` (the target's value is not 0), then
/// the target's value is `(a ^ ma) & (b ^ mb)` (its row that XOR `mt`).
#[inline(always)]
#[allow(clippy::too_many_arguments)]
fn temporary<const W: usize>(
    t: &mut [u64; W],
    a: &[u64; W],
    b: &[u64; W],
    mt: u64,
    ma: u64,
    mb: u64,
    bad: &mut [u64; W],
) {
    for k in 0..W {
        bad[k] |= t[k] ^ mt;
        t[k] = mt ^ ((a[k] ^ ma) & (b[k] ^ mb));
    }
}

dispatched! {
    /// Applies `code` (see [`GateProgram`]) and then the pending NOTs to `rows`.
    fn run_gates<const W: usize>(code: &[u32], pending: &[bool], rows: &mut [[u64; W]], bad: &mut [u64; W]) {
        let mut i = 0;
        while i + 1 < code.len() {
            if code[i] == MEASURED || code[i] == AND {
                let (t, a, b) = (code[i + 1], code[i + 2], code[i + 3]);
                let uncompute = code[i] == MEASURED;
                i += 4;
                let (row, others) = Others::split(rows, (t >> 1) as usize);
                let (ra, rb) = (others.get((a >> 1) as usize), others.get((b >> 1) as usize));
                if uncompute {
                    measured::<W>(row, ra, rb, flip(t), flip(a), flip(b), bad);
                } else {
                    temporary::<W>(row, ra, rb, flip(t), flip(a), flip(b), bad);
                }
                continue;
            }
            let n = code[i] as usize;
            let target = code[i + 1] as usize;
            let controls = &code[i + 2..i + 2 + n];
            i += 2 + n;
            let (t, others) = Others::split(rows, target);
            match *controls {
                [a] => cnot::<W>(t, others.get((a >> 1) as usize), flip(a)),
                [a, b] => {
                    let (ra, rb) = (others.get((a >> 1) as usize), others.get((b >> 1) as usize));
                    toffoli::<W>(t, ra, rb, flip(a), flip(b))
                }
                _ => many::<W>(t, &others, controls),
            }
        }
        for (row, &p) in rows.iter_mut().zip(pending) {
            if p {
                for v in row.iter_mut() {
                    *v = !*v;
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// SplitMix64 (Steele, Lea, Flood, "Fast splittable pseudorandom number
    /// generators", OOPSLA 2014): test inputs only.
    struct Mix(u64);
    impl Mix {
        fn next(&mut self) -> u64 {
            self.0 = self.0.wrapping_add(0x9e37_79b9_7f4a_7c15);
            let mut z = self.0;
            z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
            z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
            z ^ (z >> 31)
        }
        fn below(&mut self, n: usize) -> usize {
            (self.next() % n as u64) as usize
        }
    }

    type Gate = (u32, Vec<Literal>);

    fn random_gates(rng: &mut Mix, width: usize, count: usize) -> Vec<Gate> {
        (0..count)
            .map(|_| {
                let target = rng.below(width) as u32;
                // Mostly NOT, CNOT and Toffoli, sometimes up to 6 controls (repeats allowed).
                let n = match rng.below(10) {
                    0..=1 => 0,
                    2..=4 => 1,
                    5..=7 => 2,
                    _ => 3 + rng.below(4),
                };
                let controls = if width == 1 {
                    Vec::new()
                } else {
                    (0..n)
                        .map(|_| {
                            let mut l = rng.below(width - 1) as u32;
                            if l >= target {
                                l += 1;
                            }
                            Literal {
                                line: l,
                                positive: rng.next() & 1 == 0,
                            }
                        })
                        .collect()
                };
                (target, controls)
            })
            .collect()
    }

    /// The plain simulator: one basis state, one gate at a time, lines as bools.
    fn simulate_one(width: usize, gates: &[Gate], state: &mut [bool]) {
        assert_eq!(state.len(), width);
        for (t, cs) in gates {
            if cs.iter().all(|c| state[c.line as usize] == c.positive) {
                state[*t as usize] = !state[*t as usize];
            }
        }
    }

    fn check_random<const W: usize>(rng: &mut Mix, width: usize, dispatch: Dispatch) {
        let count = 1 + rng.below(120);
        let gates = random_gates(rng, width, count);
        let mut p = GateProgram::new(width, dispatch).unwrap();
        for (t, cs) in &gates {
            p.push(*t, cs).unwrap();
        }
        assert_eq!(p.pushed(), gates.len());
        let mut rows = vec![[0u64; W]; width];
        for row in rows.iter_mut() {
            for v in row.iter_mut() {
                *v = rng.next();
            }
        }
        let before = rows.clone();
        p.run_block::<W>(&mut rows).unwrap();
        // Every state of the block, or a sample of 300 when there are more.
        let states = 64 * W;
        let picks: Vec<usize> = if states <= 300 {
            (0..states).collect()
        } else {
            (0..300).map(|_| rng.below(states)).collect()
        };
        for s in picks {
            let (w, b) = (s / 64, s % 64);
            let mut v: Vec<bool> = before.iter().map(|r| (r[w] >> b) & 1 == 1).collect();
            simulate_one(width, &gates, &mut v);
            for (l, row) in rows.iter().enumerate() {
                assert_eq!(
                    (row[w] >> b) & 1 == 1,
                    v[l],
                    "width {width}, W {W}, {:?}, state {s}, line {l}",
                    dispatch.level()
                );
            }
        }
    }

    // A measured uncompute, per state: it fails where its target differs from
    // the AND of its two literals, and leaves the target at 0 (the meaning of
    // the gadget of Jones, PRA 87, 022328, 2013, Fig. 3, read classically).
    #[test]
    fn measured_uncomputes_and_temporary_ands_flag_exactly_the_states_they_do_not_fit() {
        let mut rng = Mix(7);
        for &d in &Dispatch::available() {
            for width in 3..=12usize {
                let count = 1 + rng.below(40);
                let mut gates = random_gates(&mut rng, width, count);
                // Measured uncomputes at random places, with random polarities.
                // 0: a flip, 1: a measured uncompute, 2: a temporary AND.
                let mut is_measured = vec![0u8; gates.len()];
                for _ in 0..1 + rng.below(6) {
                    let k = rng.below(gates.len());
                    let t = rng.below(width) as u32;
                    let others: Vec<u32> = (0..width as u32).filter(|&l| l != t).collect();
                    let a = others[rng.below(others.len())];
                    let rest: Vec<u32> = others.iter().copied().filter(|&l| l != a).collect();
                    let b = rest[rng.below(rest.len())];
                    let lit = |line, r: u64| Literal {
                        line,
                        positive: r & 1 == 0,
                    };
                    gates[k] = (t, vec![lit(a, rng.next()), lit(b, rng.next())]);
                    is_measured[k] = 1 + (rng.next() & 1) as u8;
                }
                let mut p = GateProgram::new(width, d).unwrap();
                for (k, (t, cs)) in gates.iter().enumerate() {
                    match is_measured[k] {
                        1 => p.push_measured(*t, cs).unwrap(),
                        2 => p.push_and(*t, cs).unwrap(),
                        _ => p.push(*t, cs).unwrap(),
                    }
                }
                let mut rows = vec![[0u64; 4]; width];
                for row in rows.iter_mut() {
                    for v in row.iter_mut() {
                        *v = rng.next();
                    }
                }
                let before = rows.clone();
                assert_eq!(
                    p.run_block::<4>(&mut rows.clone()),
                    Err(KernelError::Unchecked)
                );
                let mut bad = [0u64; 4];
                p.run_block_checked::<4>(&mut rows, &mut bad).unwrap();
                for s in 0..256 {
                    let (w, b) = (s / 64, s % 64);
                    let mut v: Vec<bool> = before.iter().map(|r| (r[w] >> b) & 1 == 1).collect();
                    let mut failed = false;
                    for (k, (t, cs)) in gates.iter().enumerate() {
                        let fire = cs.iter().all(|c| v[c.line as usize] == c.positive);
                        if is_measured[k] == 1 {
                            failed |= v[*t as usize] != fire;
                            v[*t as usize] = false;
                        } else if is_measured[k] == 2 {
                            failed |= v[*t as usize];
                            v[*t as usize] = fire;
                        } else if fire {
                            v[*t as usize] = !v[*t as usize];
                        }
                    }
                    assert_eq!((bad[w] >> b) & 1 == 1, failed, "width {width} state {s}");
                    for (l, row) in rows.iter().enumerate() {
                        assert_eq!(
                            (row[w] >> b) & 1 == 1,
                            v[l],
                            "width {width} state {s} line {l}"
                        );
                    }
                }
            }
        }
        let mut p = GateProgram::new(3, Dispatch::best()).unwrap();
        assert!(matches!(
            p.push_measured(2, &[Literal::pos(0)]),
            Err(KernelError::MeasuredShape { controls: 1, .. })
        ));
        assert!(matches!(
            p.push_measured(2, &[Literal::pos(0), Literal::pos(2)]),
            Err(KernelError::ControlOnTarget { .. })
        ));
    }

    #[test]
    fn run_block_matches_a_per_state_simulator_on_every_level() {
        let mut rng = Mix(1);
        let levels = Dispatch::available();
        assert!(levels.iter().any(|d| d.level() == Level::Portable));
        for &d in &levels {
            for width in 1..=70 {
                check_random::<1>(&mut rng, width, d);
                check_random::<3>(&mut rng, width, d);
                check_random::<64>(&mut rng, width, d);
            }
            for width in [10, 33, 64] {
                check_random::<128>(&mut rng, width, d);
                check_random::<256>(&mut rng, width, d);
            }
        }
    }

    #[test]
    fn forced_levels_are_those_the_cpu_reports() {
        // The answer comes from the CPU's own feature flags (CPUID), asked
        // independently of this module through std's detection macro.
        assert!(Dispatch::force(Level::Portable).is_some());
        #[cfg(target_arch = "x86_64")]
        {
            assert_eq!(
                Dispatch::force(Level::Avx2).is_some(),
                std::arch::is_x86_feature_detected!("avx2")
            );
            assert_eq!(
                Dispatch::force(Level::Avx512).is_some(),
                std::arch::is_x86_feature_detected!("avx512f")
            );
        }
        #[cfg(not(target_arch = "x86_64"))]
        assert_eq!(Dispatch::available().len(), 1);
        assert_eq!(
            Dispatch::best().level(),
            Dispatch::available().last().unwrap().level()
        );
    }

    #[test]
    fn a_toffoli_gate_realizes_its_truth_table() {
        // The Toffoli gate's truth table, common practice: (a, b, t) -> (a, b, t ^ ab),
        // and with a control on 0 it fires on a = 0.
        let d = Dispatch::force(Level::Portable).unwrap();
        let mut p = GateProgram::new(3, d).unwrap();
        p.push(2, &[Literal::pos(0), Literal::pos(1)]).unwrap();
        let mut q = GateProgram::new(3, d).unwrap();
        q.push(2, &[Literal::neg(0), Literal::pos(1)]).unwrap();
        let input = [0b1010_1010u64, 0b1100_1100, 0b1111_0000]; // states 0..8 as (a, b, t)
        let mut rows: Vec<[u64; 1]> = input.iter().map(|&v| [v]).collect();
        p.run_block::<1>(&mut rows).unwrap();
        assert_eq!(
            rows.iter().map(|r| r[0] & 0xff).collect::<Vec<_>>(),
            [0xaa, 0xcc, 0xf0 ^ 0x88]
        );
        let mut rows: Vec<[u64; 1]> = input.iter().map(|&v| [v]).collect();
        q.run_block::<1>(&mut rows).unwrap();
        assert_eq!(rows[2][0] & 0xff, 0xf0 ^ 0x44);
    }

    #[test]
    fn bad_gates_and_blocks_are_refused_with_a_reason() {
        let d = Dispatch::best();
        let mut p = GateProgram::new(4, d).unwrap();
        assert_eq!(
            p.push(4, &[]),
            Err(KernelError::LineOutOfRange {
                gate: 0,
                line: 4,
                width: 4
            })
        );
        assert_eq!(
            p.push(1, &[Literal::pos(1)]),
            Err(KernelError::ControlOnTarget { gate: 0, line: 1 })
        );
        assert_eq!(
            p.push(1, &[Literal::pos(9)]),
            Err(KernelError::LineOutOfRange {
                gate: 0,
                line: 9,
                width: 4
            })
        );
        assert_eq!(p.pushed(), 0);
        let mut rows = vec![[0u64; 8]; 3];
        assert_eq!(
            p.run_block::<8>(&mut rows),
            Err(KernelError::BlockShape { rows: 3, width: 4 })
        );
        let mut empty = GateProgram::new(0, d).unwrap();
        assert!(matches!(
            empty.push(0, &[]),
            Err(KernelError::LineOutOfRange { width: 0, .. })
        ));
        assert!(matches!(
            GateProgram::new(MAX_LINES + 1, d),
            Err(KernelError::TooManyLines(_))
        ));
    }
}
