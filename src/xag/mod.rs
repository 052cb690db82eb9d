//! XOR-AND graphs with the fewest AND gates: the small XAG form, its exact
//! synthesis for up to 6 inputs, the complete 4-input database, cut
//! rewriting of whole logic networks with it, and multi-level networks
//! built from truth tables (`decompose`).
//!
//! In a Toffoli circuit an AND costs a Toffoli (4 T gates) and an XOR a free
//! CNOT, so the count that matters is the number of AND nodes, the
//! multiplicative complexity. Cut rewriting looks up a cut's function here and
//! replaces the cut when the answer has fewer AND gates. Everything is pure:
//! no file, no global state; the database is a value the caller builds once.

mod database;
mod decompose;
mod exact;
mod form;
mod rewrite;
#[cfg(test)]
mod tests;

pub use database::{AffineTransform4, Xag4Database};
pub use decompose::{tables_into, DECOMPOSE_MAX_INPUTS};
pub use exact::{algebraic_degree, exact_xag, multiplicative_lower_bound, ExactXag, SearchBudget};
pub use form::{Affine, SmallXag, XagError, XAG_MAX_ANDS, XAG_MAX_INPUTS, XAG_MAX_OUTPUTS};
pub use rewrite::{and_count, minimize_ands, RewriteReport, CUTS_PER_NODE, MAX_ROUNDS};
