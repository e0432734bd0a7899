//! Verification: the checks every eigenfunction carries, and audits of whole families.

pub mod audit;
pub mod residual;
pub mod verify;
