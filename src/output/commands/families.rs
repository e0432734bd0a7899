//! `families`: the catalogue of reflexive polygons.

use super::Outcome;
use crate::lattice::catalogue;
use crate::output::records::{pretty, FamiliesRecord};
use crate::output::tables::families_table;

/// The catalogue: 15 strip families and the one excluded, as JSON and as a table.
pub fn families() -> Outcome {
    let all = catalogue::all();
    Outcome::printed(pretty(&FamiliesRecord::new(all)), families_table(all), 0.0)
}
