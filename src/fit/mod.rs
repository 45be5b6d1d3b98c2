//! Least squares for one covariate, from per-group centred moments.
//!
//! Every model the procedure needs (a line per group, parallel lines, one line for
//! all rows) has a closed form in each group's n, means and centred sums of squares
//! and products, so the fits cost O(groups) once the data pass has accumulated the
//! [`moments::Moments`]. [`qr`] fits the same models from the design matrix with a
//! Householder QR as an independent cross-check (tests only; never on the main path).

pub mod lines;
pub mod moments;
pub mod qr;
pub mod twofold;

pub use lines::{CommonSlopeFit, GroupLine, OneLineFit, SeparateFit};
pub use moments::Moments;
