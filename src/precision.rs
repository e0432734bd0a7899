//! precision
