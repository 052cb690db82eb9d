//! Boolean functions as the spec states them: truth tables, permutations, expressions.

mod esop;
mod expr;
mod network;
mod parse;
mod perm;
pub mod program;
mod table;

pub use esop::{third, Cube, Esop, Literal};
pub use expr::{Dag, NodeId, Operands, Term};
pub use network::{Lit, Network, Node};
pub use parse::{
    fmt_count, identifiers, list_names, parse_expr, parse_into, ExprError, Leaf, Names,
};
pub use perm::{Permutation, PermutationError, MAX_PERMUTATION_WIDTH};
pub use table::{TableError, TruthTable, MAX_TABLE_VARS, VAR_PATTERN};
