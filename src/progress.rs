//! Progress of long work, reported as events to a sink the caller supplies (the command line draws bars; a library caller may ignore them).

/// Something long under way.
#[derive(Clone, Copy, Debug)]
pub enum Event {
    /// Exhaustive verification: basis states done of all.
    Verify {
        /// States checked so far.
        done: u64,
        /// States in all.
        total: u64,
    },
    /// The 4-line exact table is being built.
    TableBuild(crate::exact::BuildProgress),
    /// The 4-line exact search past the table.
    Search {
        /// The gate count being tried.
        gates: usize,
        /// The part of that count's search done, from 0 to 1.
        fraction: f64,
    },
    /// The exact search is over (found, bounded or out of time).
    SearchDone,
    /// A stage of long work: `done` of `total` units, `total` 0 when the
    /// amount is unknown. A stage is over when `done` reaches `total` or
    /// another stage begins.
    Stage {
        /// What is under way.
        task: Task,
        /// Units done.
        done: u64,
        /// Units in all, or 0.
        total: u64,
    },
}

/// The long stages that report [`Event::Stage`].
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Task {
    /// `compare` running one method (its name) of all that apply.
    Compare(&'static str),
    /// `compare`'s qubit trade-off curve: qubits given up of those that can be.
    Curve,
    /// The SAT route's sweep: signal pairs settled.
    Sweep,
    /// The SAT route's final solve (no known total).
    Solve,
    /// ESOP synthesis: outputs done.
    Esop,
    /// Pebbling: budgets of the grid tried.
    Pebbling,
    /// Pebbling by SAT (no known total).
    PebblingBySat,
}

impl Task {
    /// A short description, for a progress bar.
    pub fn describe(&self) -> String {
        match self {
            Task::Compare(m) => format!("compare: {m}"),
            Task::Curve => "trade-off curve".into(),
            Task::Sweep => "SAT sweep".into(),
            Task::Solve => "SAT solve".into(),
            Task::Esop => "ESOP".into(),
            Task::Pebbling => "pebbling".into(),
            Task::PebblingBySat => "pebbling by SAT".into(),
        }
    }
}

/// Where events go. Calls may come from several threads at once.
pub trait Progress: Sync {
    /// One event.
    fn event(&self, event: Event);

    /// Whether the caller wants the work stopped (a notebook's interrupt):
    /// long searches and verifications poll it and end with a cancelled
    /// error, having claimed nothing.
    fn cancelled(&self) -> bool {
        false
    }
}

/// No progress reports.
impl Progress for () {
    fn event(&self, _: Event) {}
}

impl<F: Fn(Event) + Sync> Progress for F {
    fn event(&self, event: Event) {
        self(event)
    }
}
