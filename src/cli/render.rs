//! What the command line prints beside results: progress bars on a terminal,
//! and errors completed with the option that applies to the command at hand.

use super::{code, Failure};
use annotate_snippets::{AnnotationKind, Group, Level, Renderer, Snippet};
use indicatif::{ProgressBar, ProgressStyle};
use oraculum::source::{ErrorKind, SourceError};
use oraculum::{BuildError, Event, Limit, Progress, Stop, SynthError, VerifyError};
use std::io::IsTerminal;
use std::sync::Mutex;
use std::time::{Duration, Instant};

/// A located error as a report: the message, the file, line and column, the
/// line itself with its span marked, and the hint. Colour only on a terminal.
pub fn source_error<K: ErrorKind>(e: &SourceError<K>) -> String {
    let title = e.kind.to_string();
    let start = e.span.start - e.line_start;
    let end = (e.span.end - e.line_start).max(start + 1);
    // A marker past the end of the line (an error at the end of the file)
    // is an empty span there, drawn one column after the last character.
    let line = &e.line_text;
    let start = start.min(line.len());
    let end = if start == line.len() {
        start
    } else {
        end.min(line.len())
    };
    let mut report = vec![Level::ERROR.primary_title(&title).element(
        Snippet::source(line)
            .line_start(e.location.line)
            .path(&e.location.file)
            .annotation(AnnotationKind::Primary.span(start..end)),
    )];
    let hint = e.kind.hint();
    if let Some(h) = &hint {
        report.push(Group::with_title(Level::HELP.secondary_title(h)));
    }
    let renderer = if std::io::stderr().is_terminal() && std::env::var_os("NO_COLOR").is_none() {
        Renderer::styled()
    } else {
        Renderer::plain()
    };
    renderer.render(&report).to_string()
}

/// The command a message is for, so that advice names its options.
#[derive(Clone, Copy, PartialEq, Eq)]
pub enum Context {
    /// `synth`, `compare`, `draw`: the options of a build.
    Build,
    /// `verify`: the options of a verification.
    Verify,
}

/// The option that raises `limit` in `context`.
pub fn flag(limit: Limit, context: Context) -> &'static str {
    match (limit, context) {
        (Limit::TableInputs, _) => "--max-inputs",
        (Limit::Gates, _) => "--max-gates",
        (Limit::Qubits, _) => "--max-qubits",
        (Limit::SearchSeconds, _) => "--exact-seconds",
        (Limit::States, _) => "--max-states",
        (Limit::SatSeconds, _) => "--sat-seconds",
        (Limit::Clauses, _) => "--max-clauses",
    }
}

/// Advice for a verification stopped by a budget, naming this command's options.
fn verify_advice(e: &VerifyError, context: Context) -> String {
    match (e, context) {
        (VerifyError::TooLarge { .. }, Context::Build) => "; raise it with --max-states, prove it by SAT with --verify-method sat, or write the circuit unproven with --no-verify".into(),
        (VerifyError::TooLarge { .. }, Context::Verify) => {
            "; raise it with --max-states, or prove it by SAT with --method sat".into()
        }
        (VerifyError::SatTimeout(_), _) => "; raise it with --sat-seconds".into(),
        _ => String::new(),
    }
}

/// A failed build as an exit code and a message.
pub fn build_failure(e: BuildError) -> Failure {
    let advice = match &e {
        BuildError::Synth(SynthError::Limit { kind, .. }) => {
            format!("; raise it with {}", flag(*kind, Context::Build))
        }
        BuildError::Synth(SynthError::Budget { .. }) => " (--max-qubits)".into(),
        BuildError::Synth(SynthError::OutOfTime { .. }) => "; raise it with --exact-seconds".into(),
        BuildError::Verify(v) => verify_advice(v, Context::Build),
        _ => String::new(),
    };
    Failure::with_code(
        if e.is_limit() {
            code::LIMIT
        } else {
            code::BAD_INPUT
        },
        format!("{e}{advice}"),
    )
}

/// A verification that could not run, for the circuit at `circuit`.
pub fn verify_failure(circuit: &std::path::Path, e: VerifyError) -> Failure {
    let advice = verify_advice(&e, Context::Verify);
    Failure::with_code(
        if e.is_limit() {
            code::LIMIT
        } else {
            code::BAD_INPUT
        },
        format!("{}: {e}{advice}", circuit.display()),
    )
}

/// What to do about a search that stopped short.
pub fn stop_hint(stop: &Stop) -> String {
    match stop.limit {
        Some(l) => format!("raise {} to search further", flag(l, Context::Build)),
        None => format!(
            "a deeper table proves more: `oraculum table --depth {}`",
            oraculum::exact::MAX_DEPTH
        ),
    }
}

/// Progress bars on standard error, drawn only on a terminal and never with
/// `--json`. A stage gets a bar only once it has run for [`Bars::DELAY`], so
/// short work draws nothing.
pub struct Bars {
    show: bool,
    bar: Mutex<Slot>,
}

/// The stage being shown: its label, when it began, and its bar once drawn.
#[derive(Default)]
struct Slot {
    label: String,
    since: Option<Instant>,
    bar: Option<ProgressBar>,
}

impl Bars {
    /// How long a stage runs before its bar appears.
    const DELAY: Duration = Duration::from_millis(700);

    pub fn new(json: bool) -> Self {
        Bars {
            show: !json && std::io::stderr().is_terminal(),
            bar: Mutex::new(Slot::default()),
        }
    }

    fn set(&self, label: String, template: &str, done: u64, total: u64) {
        let mut slot = self.bar.lock().unwrap_or_else(|e| e.into_inner());
        if slot.since.is_none() || slot.label != label {
            if let Some(old) = slot.bar.take() {
                old.finish_and_clear();
            }
            *slot = Slot {
                label: label.clone(),
                since: Some(Instant::now()),
                bar: None,
            };
        }
        if total > 0 && done >= total {
            if let Some(b) = slot.bar.take() {
                b.finish_and_clear();
            }
            slot.since = None;
            return;
        }
        if slot.bar.is_none() && slot.since.is_some_and(|t| t.elapsed() >= Self::DELAY) {
            let b = if total == 0 {
                let b = ProgressBar::new_spinner();
                b.enable_steady_tick(Duration::from_millis(120));
                b
            } else {
                ProgressBar::new(total)
            };
            if let Ok(style) = ProgressStyle::with_template(template) {
                b.set_style(style);
            }
            b.set_message(label);
            slot.bar = Some(b);
        }
        if let Some(b) = slot.bar.as_ref() {
            b.set_position(done.max(b.position()));
        }
    }

    fn clear(&self) {
        let mut slot = self.bar.lock().unwrap_or_else(|e| e.into_inner());
        if let Some(old) = slot.bar.take() {
            old.finish_and_clear();
        }
        slot.since = None;
    }
}

impl Progress for Bars {
    fn event(&self, event: Event) {
        if !self.show {
            return;
        }
        match event {
            // Short runs get no bar.
            Event::Verify { total, .. } if total < 1 << 24 => {}
            Event::Verify { done, total } => self.set(
                "verifying".into(),
                "{msg} {bar:40} {percent}% of {len} basis states, {eta} left",
                done,
                total,
            ),
            Event::TableBuild(b) => self.set(
                format!("building the 4-line table: {} of {} gates", b.depth, b.of),
                "{msg} {bar:40} {percent}%, {eta} left",
                b.done,
                b.total,
            ),
            Event::Search { gates, fraction } => self.set(
                format!("exact: trying {gates} gates"),
                "{msg} {bar:40} {percent}%, {eta} left",
                (fraction * 1000.0) as u64,
                1000,
            ),
            Event::SearchDone => self.clear(),
            Event::Stage {
                task,
                done,
                total: 0,
            } => self.set(task.describe(), "{spinner} {msg}, {elapsed}", done, 0),
            Event::Stage { task, done, total } => self.set(
                task.describe(),
                "{msg} {bar:40} {pos} of {len}, {eta} left",
                done,
                total,
            ),
        }
    }
}
