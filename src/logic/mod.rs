//! Boolean functions as the spec states them: truth tables, permutations, expressions.

mod esop;
mod expr;
mod network;
mod perm;
mod table;

pub use esop::{third, Cube, Esop, Literal};
pub use expr::{parse_expr, Expr, ExprError};
pub use network::{Lit, Network, Node};
pub use perm::{Permutation, PermutationError, MAX_PERMUTATION_WIDTH};
pub use table::{TableError, TruthTable, MAX_TABLE_VARS, VAR_PATTERN};
