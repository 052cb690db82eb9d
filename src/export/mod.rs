//! Writers and readers: OpenQASM 2 and 3 (both ways), a plain text listing, drawings and the JSON reports.

pub mod clifford_t;
mod clifford_t_read;
mod draw;
mod gatedef;
pub mod json;
mod line_map;
mod qasm2;
mod qasm3;
mod qasm3_read;
mod text;

pub use clifford_t::{is_clifford_t, write_clifford_t};
pub use clifford_t_read::read_clifford_t_with;
pub use draw::{draw_svg, draw_text};
pub use gatedef::write_qasm_gate;
pub use line_map::with_header_labels;
pub use qasm2::{
    read_qasm, read_qasm_with, write_qasm, QasmHeader, ReadError, ReadLimits, WriteError,
    DEFAULT_MAX_GATES,
};
pub use qasm3::{qasm3_register_name, write_qasm3, Qasm3Options};
pub use qasm3_read::{is_qasm3, read_circuit_with, read_qasm3_with};
pub use text::listing;
