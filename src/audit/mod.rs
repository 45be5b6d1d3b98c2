//! Records an auditor can act on: the manifest each run writes and the comparison
//! `slopewise verify` makes with a fresh rerun ([`manifest`]), approvals signed with
//! Ed25519 keys ([`keys`], [`approval`]), and the self-test that runs the reference
//! datasets inside the binary ([`selftest`]).
//!
//! Pure: the command layer reads the files, the clock and the environment and hands
//! their values in. The self-test is the one part of this stage that calls the fit
//! and the analysis, since proving they compute correctly is its purpose.

pub mod approval;
pub mod keys;
pub mod manifest;
pub mod selftest;
pub mod time;

pub use manifest::{Difference, MANIFEST, Manifest, PLAN_COPY, differences};
