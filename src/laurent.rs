//! laurent
