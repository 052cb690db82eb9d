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
