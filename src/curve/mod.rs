//! The family of elliptic curves `φ(x, y) + a = 0`: the tempered Laurent polynomial, its
//! constant terms, the double cover over the z-plane, periods and regulator periods, and the
//! attractor moduli.

pub mod asymptotics;
pub mod attractor;
pub mod constant_terms;
pub mod continuation;
pub mod cover;
pub mod cycles;
pub mod laurent;
pub mod periods;
pub mod picard_fuchs;
pub mod series_periods;
