//! Fuzz the shard merge: arbitrary shard files, read and merged against a
//! fixed circuit and spec (a 3-bit adder with carry-out), never panic, and
//! never prove anything a genuine set does not.
#![no_main]

use libfuzzer_sys::fuzz_target;
use oraculum::verify::{merge_shards, ShardResult};

const SPEC: &str = "kind = \"arithmetic\"\nop = \"add\"\nwidth = 3\ncarry_out = true\n";

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    let spec = oraculum::parse_spec("fuzz.toml", SPEC).expect("a valid spec");
    let out = oraculum::build(&spec, &oraculum::BuildOptions::default()).expect("it builds");
    let qasm = out.qasm().expect("it exports");
    let circuit = oraculum::read_qasm("fuzz.qasm", &qasm).expect("it reads back");
    // Files separated by a line of three dashes.
    let mut results = Vec::new();
    for part in text.split("\n---\n") {
        match serde_json::from_str::<ShardResult>(part) {
            Ok(r) => results.push(r),
            Err(_) => return,
        }
    }
    if let Ok(oraculum::Verdict::Proven { states, .. }) =
        merge_shards(&results, &circuit, &spec, qasm.as_bytes(), SPEC.as_bytes())
    {
        // Only the whole space, checked, is ever proven.
        assert_eq!(states, 1 << 7);
    }
});
