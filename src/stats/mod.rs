//! Numerical building blocks: distributions, p-value adjustment, quantiles of
//! streams, the assumption-check tests, the Welch–Satterthwaite df and a seeded
//! generator.

pub mod adjust;
pub mod bands;
pub mod brown_forsythe;
pub mod dist;
pub mod mvt;
pub mod nested_f;
pub mod noncentral_f;
pub mod quantile;
pub mod rng;
pub mod shapiro_wilk;
pub mod studentized_range;
pub mod welch;
