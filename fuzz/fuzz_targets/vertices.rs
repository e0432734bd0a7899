//! Any text given as vertices: the reader and the whole selection (hull, reflexivity, strip
//! form, catalogue) return a value or an error, never panic; a list that reads round-trips.
#![no_main]

use libfuzzer_sys::fuzz_target;
use regwave::input::selection;
use regwave::input::vertices::parse_vertices;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    if let Ok(points) = parse_vertices(text) {
        let again: Vec<String> = points.iter().map(|p| format!("({},{})", p[0], p[1])).collect();
        assert_eq!(parse_vertices(&again.join(",")).unwrap(), points);
    }
    let _ = selection::resolve(None, Some(text), None);
});
