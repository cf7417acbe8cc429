//! Fuzzes the flow-table JSON reader: any input gives a table or a located error (no
//! panic, no hang, no stack overflow on deep nesting), and an accepted table survives
//! both printers.
#![no_main]

use libfuzzer_sys::fuzz_target;
use stillpoint_table::{parse_json, parse_text};

fuzz_target!(|data: &[u8]| {
    let Ok(src) = std::str::from_utf8(data) else {
        return;
    };
    match parse_json(src) {
        Err(e) => {
            assert!(e.line() >= 1 && e.column() >= 1, "location is 1-based: {e}");
            assert!(!e.message().is_empty());
            assert!(!e.message().contains('\n'), "one-line message: {e:?}");
        }
        Ok(t) => {
            let json = t.to_json();
            let again = parse_json(&json).unwrap_or_else(|e| panic!("reparse json: {e}\n{json}"));
            assert_eq!(again, t, "json round trip\n{json}");
            let text = t.to_text();
            let again = parse_text(&text).unwrap_or_else(|e| panic!("reparse text: {e}\n{text}"));
            assert_eq!(again, t, "text round trip\n{text}");
        }
    }
});
