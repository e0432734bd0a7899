//! Lattice polygons: reflexivity, GL₂(Z) normal forms, strip forms, and the catalogue of the
//! 16 reflexive classes.

pub mod catalogue;
pub mod polygon;
