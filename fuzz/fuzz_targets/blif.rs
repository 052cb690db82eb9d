//! Fuzz the BLIF reader, then evaluate and convert whatever it reads.
#![no_main]

use libfuzzer_sys::fuzz_target;
use oraculum::netlist::{read_blif, to_network, ReadLimits};

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    let limits = ReadLimits { max_nodes: 20_000, max_fanins: 80_000, max_inputs: 1_000 };
    if let Ok(n) = read_blif("fuzz.blif", text, &limits) {
        let _ = n.eval_words(&vec![0x5555_5555_5555_5555; n.input_count()]);
        let _ = to_network(&n);
    }
});
