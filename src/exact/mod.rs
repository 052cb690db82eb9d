//! Exact tables: optimal circuits on 3 lines, on 4 lines (symmetry-reduced,
//! meet in the middle) and minimum ESOPs of up to 4 inputs, and the one
//! handle through which the rest of the library reaches them.
//!
//! The tables are pure values built by breadth-first search. [`Tables`] builds
//! each on first request and keeps it; the 4-line tables can also be read
//! from and written to a folder the caller names ([`Tables::stored`]). This
//! module reads no environment variable: the command line resolves the cache
//! folder and installs a stored handle with [`Tables::install`]; a library
//! caller that installs nothing gets tables built in memory.

mod esop;
mod four;
mod three;

pub use esop::EsopTable;
pub use four::{
    BuildProgress, Exact4, Exact4Result, Level, DEFAULT_DEPTH, MAX_DEPTH, WINDOW_DEPTH,
};
pub use three::{library, Exact3};

use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::OnceLock;
use std::time::Instant;

/// The library's exact tables, each built (or read from the store) on first
/// request and kept for the life of the handle.
///
/// This is the only process-wide state of the library: one handle, set
/// explicitly with [`Tables::install`] before the first request, or an
/// in-memory handle made on the first request when none was installed.
pub struct Tables {
    store: Option<PathBuf>,
    three: [OnceLock<Exact3>; 3],
    esop: [OnceLock<EsopTable>; 4],
    window: OnceLock<Exact4>,
    four: OnceLock<(Exact4, String)>,
    told: AtomicBool,
}

static HANDLE: OnceLock<Tables> = OnceLock::new();

/// [`Tables::install`] came after a handle was already in place.
#[derive(Clone, Copy, Debug, PartialEq, Eq, thiserror::Error)]
#[error("the table handle is already in place; install it before the first request")]
pub struct AlreadyInstalled;

impl Tables {
    fn with_store(store: Option<PathBuf>) -> Self {
        Tables {
            store,
            three: Default::default(),
            esop: Default::default(),
            window: OnceLock::new(),
            four: OnceLock::new(),
            told: AtomicBool::new(false),
        }
    }

    /// Tables built in memory when first asked for; nothing is read or written.
    pub fn in_memory() -> Self {
        Tables::with_store(None)
    }

    /// Tables whose 4-line parts are read from `folder` when an intact file
    /// is there, and written there when built.
    pub fn stored(folder: impl Into<PathBuf>) -> Self {
        Tables::with_store(Some(folder.into()))
    }

    /// Makes `self` the process's handle. Fails when a handle is already in
    /// place, installed or made by an earlier request.
    pub fn install(self) -> Result<(), AlreadyInstalled> {
        HANDLE.set(self).map_err(|_| AlreadyInstalled)
    }

    /// The process's handle: the installed one, else an in-memory one made now.
    pub fn get() -> &'static Tables {
        HANDLE.get_or_init(Tables::in_memory)
    }

    /// The folder of the 4-line tables, if the handle has one.
    pub fn store(&self) -> Option<&Path> {
        self.store.as_deref()
    }

    /// The file of the 4-line table of `depth` in the store.
    pub fn file(&self, depth: u8) -> Option<PathBuf> {
        self.store
            .as_ref()
            .map(|d| d.join(Exact4::file_name(depth)))
    }

    /// The optimal circuits on `width` lines (1 to 3).
    pub fn exact3(&self, width: usize) -> &Exact3 {
        assert!((1..=3).contains(&width), "exact tables cover 1 to 3 lines");
        self.three[width - 1].get_or_init(|| Exact3::build(width as u32))
    }

    /// The minimum ESOPs of `vars` inputs (1 to 4).
    pub fn esop(&self, vars: usize) -> &EsopTable {
        assert!((1..=4).contains(&vars), "tables exist for 1 to 4 inputs");
        self.esop[vars - 1].get_or_init(|| EsopTable::build(vars))
    }

    /// The table the optimizer's 4-line windows use (depth [`WINDOW_DEPTH`]).
    pub fn window(&self) -> &Exact4 {
        self.window.get_or_init(|| match self.file(WINDOW_DEPTH) {
            Some(path) => Exact4::load_or_build(&path, WINDOW_DEPTH, &|_| {}).0,
            None => Exact4::build(WINDOW_DEPTH, &|_| {}),
        })
    }

    /// The 4-line table of exact synthesis: the deepest intact one of depth
    /// [`DEFAULT_DEPTH`] or more in the store, else one of [`DEFAULT_DEPTH`]
    /// built now (and stored). The text says which, on the first call only.
    pub fn four(&self, progress: &(dyn Fn(BuildProgress) + Sync)) -> (&Exact4, Option<String>) {
        let (t, how) = self.four.get_or_init(|| {
            let t0 = Instant::now();
            for d in (DEFAULT_DEPTH..=MAX_DEPTH).rev() {
                let Some(path) = self.file(d) else { break };
                if let Some(t) = Exact4::load(&path) {
                    let how = format!(
                        "exact: loaded the 4-line table of depth {d} from {} in {:.1} s",
                        path.display(),
                        t0.elapsed().as_secs_f64()
                    );
                    return (t, how);
                }
            }
            let t = Exact4::build(DEFAULT_DEPTH, progress);
            let saved = match self.file(DEFAULT_DEPTH) {
                Some(path) => match t.save(&path) {
                    Ok(()) => format!(" and cached it at {}", path.display()),
                    Err(e) => format!(" and could not cache it at {}: {e}", path.display()),
                },
                None => String::new(),
            };
            let how = format!(
                "exact: built the 4-line table of depth {DEFAULT_DEPTH} in {:.1} s{saved}",
                t0.elapsed().as_secs_f64()
            );
            (t, how)
        });
        let first = !self.told.swap(true, Ordering::Relaxed);
        (t, first.then(|| how.clone()))
    }
}
