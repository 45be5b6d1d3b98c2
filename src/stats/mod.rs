//! Numerical building blocks: distributions and p-value adjustment.

pub mod adjust;
pub mod dist;
pub mod quantile;
