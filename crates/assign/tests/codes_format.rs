use stillpoint_assign::{AssignError, Codes};
use stillpoint_table::{parse_text, FlowTable, StateId};

fn table() -> FlowTable {
    parse_text("inputs x\n  0 1\nidle (idle) busy\nbusy idle (busy)\ndone - (done)\n").unwrap()
}

fn err(src: &str, json: bool) -> (usize, usize, String) {
    match Codes::parse(src, json, &table()) {
        Err(AssignError::Parse { line, col, message }) => (line, col, message),
        other => panic!("expected a parse error, got {other:?}"),
    }
}

#[test]
fn text_and_json_forms() {
    let t = table();
    let a = Codes::parse(
        "# ours\nidle 00\nbusy 01   # comment\n\ndone 11\n",
        false,
        &t,
    )
    .unwrap();
    let b = Codes::parse(
        "{\"idle\": \"00\", \"busy\": \"01\", \"done\": \"11\"}",
        true,
        &t,
    )
    .unwrap();
    assert_eq!(a, b);
    assert_eq!(a.width(), 2);
    assert_eq!(a.code(StateId::from_index(2)), 0b11);
    assert!(!a.bit(StateId::from_index(1), 0) && a.bit(StateId::from_index(1), 1));
    assert_eq!(a.to_bits(StateId::from_index(1)), "01");
    assert_eq!(Codes::parse(&a.to_text(&t), false, &t).unwrap(), a);
}

#[test]
fn located_errors() {
    assert_eq!(
        err("idle 00\nbusy 0x\ndone 11\n", false).0..=err("idle 00\nbusy 0x\ndone 11\n", false).1,
        2..=7
    );
    let (l, c, m) = err("idle 00\nnope 01\n", false);
    assert_eq!((l, c), (2, 1));
    assert!(m.contains("unknown state"));
    let (l, c, m) = err("idle 00\nbusy 011\ndone 11\n", false);
    assert_eq!((l, c), (2, 6));
    assert!(m.contains("bits"));
    let (l, _, m) = err("idle 00\nbusy 00\ndone 11\n", false);
    assert_eq!(l, 2);
    assert!(m.contains("same code"));
    let (_, _, m) = err("idle 00\nbusy 01\n", false);
    assert!(m.contains("`done` has no code"));
    let (l, c, m) = err("idle 00\nidle 01\n", false);
    assert_eq!((l, c), (2, 1));
    assert!(m.contains("twice"));
    let (l, c, _) = err("{\"idle\": \"00\",\n \"busy\": 1, \"done\": \"11\"}", true);
    assert_eq!((l, c), (2, 10));
    let (l, c, m) = err("{\"idle\": \"00\", \"busy\": \"01\"}", true);
    assert_eq!((l, c), (1, 1));
    assert!(m.contains("no code"));
    let (l, c, _) = err(
        "{\"idle\": \"0a\", \"busy\": \"01\", \"done\": \"11\"}",
        true,
    );
    assert_eq!((l, c), (1, 12));
    let (_, _, m) = err("[1, 2]", true);
    assert!(m.contains("object"));
    let (l, c, _) = err("{\"idle\": ", true);
    assert_eq!(l, 1);
    assert!(c >= 1);
}

#[test]
fn new_refuses_bad_codes() {
    assert!(Codes::new(2, vec![0, 0]).is_err());
    assert!(Codes::new(2, vec![0, 4]).is_err());
    assert!(Codes::new(65, vec![0]).is_err());
    assert!(Codes::new(64, vec![0, u64::MAX]).is_ok());
}
