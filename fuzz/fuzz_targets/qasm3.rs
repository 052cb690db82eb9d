//! Fuzz the OpenQASM 3 reader (gates, subroutines, the measured-uncompute
//! gadget, the phase wrapper), the cost report of whatever it reads, and
//! the drawing's reading of its header's line map.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    let limits = oraculum::export::ReadLimits {
        max_gates: 1 << 16,
        ..oraculum::export::ReadLimits::default()
    };
    if let Ok(c) = oraculum::export::read_qasm3_with("fuzz.qasm", text, &limits) {
        let _ = oraculum::Cost::measure(&c, &c);
        let _ = oraculum::export::with_header_labels(&c, text);
    }
});
