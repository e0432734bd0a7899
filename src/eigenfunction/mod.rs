//! The eigenfunction from the regulator: its construction on the cover, its poles, normalization
//! and decay, phase conventions, and sampled profiles.

pub mod construction;
pub mod normalization;
pub mod phase;
pub mod poles;
pub mod profile;
