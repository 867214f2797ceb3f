//! Truth tables, NPN classification and the cell-function expression language.
//!
//! - [`table`]: [`TruthTable`] (a `u64` for up to six inputs, a bit vector
//!   beyond) and the word helpers the hot paths use directly;
//! - [`npn`]: canonical forms under input permutation (P), input negation
//!   (NP) and output negation (NPN), with the transformation that reaches
//!   them; exact up to six inputs, a table read up to four;
//! - [`expr`]: the expression language library files write cell functions in.
//!
//! Convention everywhere: bit r of a table is the value on row r; row r gives
//! input k the value of bit k of r (maj3 = 0xE8, xor3 = 0x96).

pub mod expr;
pub mod npn;
pub mod table;

pub use expr::{expression_truth, parse_expression, Expr, ExpressionError};
pub use npn::{np_canon, npn_canon, p_canon, NpnTransform};
pub use table::{parse_truth_word, TruthTable};
