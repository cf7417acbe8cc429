use proptest::prelude::*;
use stillpoint_table::testing::arb_table;
use stillpoint_table::{parse_json, parse_text};

proptest! {
    #[test]
    fn text_and_json_round_trip(t in arb_table(7, 4, 3)) {
        prop_assert_eq!(parse_text(&t.to_text()).unwrap(), t.clone());
        prop_assert_eq!(parse_json(&t.to_json()).unwrap(), t.clone());
        let via = parse_json(&parse_text(&t.to_text()).unwrap().to_json()).unwrap();
        prop_assert_eq!(via, t);
    }

    #[test]
    fn junk_never_panics(s in "\\PC{0,200}") {
        let _ = parse_text(&s);
        let _ = parse_json(&s);
    }
}
