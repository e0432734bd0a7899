//! Documents, tables, reports and figures (pure formatting).

pub mod figures;
pub mod plot;
pub mod report;
