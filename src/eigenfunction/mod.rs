//! The eigenfunction from the regulator: construction on the cover, normalization and phase,
//! sampled profiles.

pub mod construction;
pub mod profile;
