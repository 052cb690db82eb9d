//! Fuzz the OpenQASM 2 reader, and the cost report of whatever it reads.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    if let Ok(c) = oraculum::read_qasm("fuzz.qasm", text) {
        let _ = oraculum::Cost::measure(&c, &c);
    }
});
