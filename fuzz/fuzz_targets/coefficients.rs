//! Any text given as coefficients of F0's square: the reader and the tempered-coefficient check
//! return a value or an error, never panic; a list that reads round-trips.
#![no_main]

use libfuzzer_sys::fuzz_target;
use regwave::input::coefficients::parse_coefficients;
use regwave::input::selection;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    if let Ok(terms) = parse_coefficients(text) {
        let again: Vec<String> = terms
            .iter()
            .map(|(p, c)| format!("({},{})={c}", p[0], p[1]))
            .collect();
        assert_eq!(parse_coefficients(&again.join(",")).unwrap(), terms);
    }
    let _ = selection::resolve(None, Some("(1,0),(0,1),(-1,0),(0,-1)"), Some(text));
});
