//! operator
