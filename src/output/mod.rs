//! Everything users receive: JSON documents built from typed records, text tables, Markdown
//! reports, CSV samples, figures, files written atomically, and the commands that run the
//! library and produce them (pure formatting apart from [`files`] and [`commands`]).
//!
//! - [`commands`]: what each `regwave` command runs and writes (the binary's library side).
//! - [`records`]: the JSON documents, typed; [`decimal`]: numbers with their supported digits.
//! - [`tables`], [`markdown`], [`csv`]: text for terminals, reports and data files; [`data`]:
//!   the tidy tables behind every figure.
//! - `figures` and `plot` (feature `figures`): the figures of audits and profiles.
//! - [`files`]: writing outputs whole or not at all.

pub mod commands;
pub mod csv;
pub mod data;
pub mod decimal;
#[cfg(feature = "figures")]
pub mod figures;
pub mod files;
pub mod markdown;
#[cfg(feature = "figures")]
pub mod plot;
pub mod records;
pub mod tables;
