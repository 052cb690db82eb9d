//! One file per subcommand: each reads its inputs, calls the library, prints, and returns the exit code.

pub mod compare;
pub mod cost;
pub mod draw;
pub mod info;
pub mod synth;
pub mod table;
pub mod verify;
