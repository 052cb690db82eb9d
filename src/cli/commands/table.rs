//! `oraculum table`: builds or loads the 4-line exact table and prints its figures.

use crate::cli::render::Bars;
use crate::cli::{code, Failure};
use oraculum::exact::{Exact4, MAX_DEPTH};
use oraculum::export::json::TableReport;
use oraculum::{Event, Progress, Tables};
use std::time::Instant;

pub fn run(depth: u8, rebuild: bool, json: bool) -> Result<i32, Failure> {
    if !(1..=MAX_DEPTH).contains(&depth) {
        return Err(Failure::bad(format!(
            "--depth {depth}: the table covers 1 to {MAX_DEPTH} gates"
        )));
    }
    let path = Tables::get()
        .file(depth)
        .expect("the command line installs a stored handle");
    let t0 = Instant::now();
    let cached = if rebuild { None } else { Exact4::load(&path) };
    let (t, action) = match cached {
        Some(t) => (t, "loaded"),
        None => {
            let bars = Bars::new(json);
            let t = Exact4::build(depth, &|p| bars.event(Event::TableBuild(p)));
            t.save(&path).map_err(|e| {
                Failure::bad(format!("{}: cannot write the table: {e}", path.display()))
            })?;
            (t, "built")
        }
    };
    let seconds = t0.elapsed().as_secs_f64();
    if json {
        let report = TableReport {
            path: path.display().to_string(),
            action,
            seconds,
            depth: t.depth(),
            reach: t.reach(),
            levels: TableReport::levels(t.levels()),
        };
        outln!(
            "{}",
            serde_json::to_string_pretty(&report).unwrap_or_default()
        );
    } else {
        outln!(
            "{action} the 4-line table of depth {} in {seconds:.1} s: {}",
            t.depth(),
            path.display()
        );
        outln!(
            "exact proves minima of up to {} gates with it (longer searches are bounded by --exact-seconds)",
            t.reach()
        );
        outln!("{:>5} {:>12} {:>15}", "gates", "classes", "functions");
        for (k, l) in t.levels().iter().enumerate() {
            outln!("{k:>5} {:>12} {:>15}", l.classes, l.functions);
        }
    }
    Ok(code::DONE)
}
