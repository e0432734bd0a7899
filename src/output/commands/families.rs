//! `families`: the catalogue of reflexive polygons.

use super::Outcome;
use crate::lattice::catalogue;
use crate::output::records::{families_document, pretty};
use crate::output::tables::families_table;
use std::time::Instant;

/// The catalogue: 15 strip families and the one excluded, as JSON and as a table.
pub fn families() -> Outcome {
    let start = Instant::now();
    let all = catalogue::all();
    let text = families_table(all);
    let elapsed = start.elapsed().as_secs_f64();
    Outcome::printed(pretty(&families_document(all, elapsed)), text, elapsed)
}
