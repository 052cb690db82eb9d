//! Fuzz the spec reader, and the pipeline under small limits for whatever parses.
#![no_main]

use libfuzzer_sys::fuzz_target;
use oraculum::{parse_spec, BuildOptions, SynthLimits, VerifyOptions};

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    if let Ok(spec) = parse_spec("fuzz.toml", text) {
        let opts = BuildOptions {
            method: None,
            limits: SynthLimits { max_table_inputs: 8, max_gates: 2_000, exact_seconds: 0.05, ..SynthLimits::default() },
            verify: Some(VerifyOptions { max_states: 1 << 12, sat_seconds: 0.2, ..VerifyOptions::default() }),
        };
        let _ = oraculum::build(&spec, &opts);
    }
});
