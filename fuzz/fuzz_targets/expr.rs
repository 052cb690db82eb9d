//! Fuzz the expression parser.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    let names: Vec<String> = ["a", "b", "c", "hot", "x_1"].iter().map(|s| s.to_string()).collect();
    if let Ok((dag, root)) = oraculum::logic::parse_expr(text, &names) {
        let _ = dag.eval(root, 5);
    }
});
