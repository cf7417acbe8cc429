//! Fuzzes the state-codes reader (text and JSON) against a fixed three-row table, and the
//! race analysis of every accepted code: it must agree with Tracey's separation checker.
#![no_main]

use libfuzzer_sys::fuzz_target;
use std::sync::OnceLock;
use stillpoint_assign::{races, separation, AssignError, Codes};
use stillpoint_table::{parse_text, FlowTable};

/// The same table as tests/data/bad/base/codes-base.flow.
const TABLE: &str = "\
table   codes_base
inputs  a b
outputs z

        00      01      11      10
s1      (s1)/0  s2/0    -       s3/1
s2      s1/0    (s2)/0  (s2)/1  -
s3      s1/1    -       s2/1    (s3)/1
";

fn table() -> &'static FlowTable {
    static T: OnceLock<FlowTable> = OnceLock::new();
    T.get_or_init(|| parse_text(TABLE).expect("the fixed table parses"))
}

fuzz_target!(|data: &[u8]| {
    let Ok(src) = std::str::from_utf8(data) else {
        return;
    };
    let t = table();
    let is_json = src.trim_start().starts_with('{') || src.starts_with('[');
    let codes = match Codes::parse(src, is_json, t) {
        Err(AssignError::Parse { line, col, message }) => {
            assert!(line >= 1 && col >= 1, "1-based location");
            assert!(
                !message.is_empty() && !message.contains('\n'),
                "one line: {message:?}"
            );
            return;
        }
        Err(e) => panic!("a codes file error must be located: {e:?}"),
        Ok(c) => c,
    };
    assert_eq!(codes.len(), t.num_states(), "one code per state");
    let report = races::analyze(t, &codes).expect("the fixed table is normal");
    let separated = separation::check(t, &codes).is_ok();
    assert_eq!(
        report.critical.is_empty(),
        separated,
        "race analysis and separation checker disagree on {src:?}"
    );
    for r in &report.critical {
        assert!(
            r.order.len() >= 2,
            "a critical race passes at least two codes"
        );
        assert_ne!(r.ends_in, r.to, "a critical race ends elsewhere");
    }
});
