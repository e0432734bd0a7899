//! Shared by the development examples: the family and the level named on the command line.

/// `(id, φ, level)` from the arguments `ID LEVEL` (defaults when absent).
pub fn family_and_level(
    default_id: &str,
    default_level: usize,
) -> (String, regwave::curve::laurent::Laurent, usize) {
    let id = std::env::args().nth(1).unwrap_or_else(|| default_id.into());
    let level: usize = std::env::args()
        .nth(2)
        .and_then(|s| s.parse().ok())
        .unwrap_or(default_level);
    let family = regwave::lattice::catalogue::by_id(&id).expect("a catalogue id");
    let laurent = regwave::curve::laurent::Laurent::tempered(&family.polygon());
    (id, laurent, level)
}
