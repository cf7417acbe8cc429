//! The text form of flow tables (`.flow`), as in the formats contract §1: parser with
//! located errors, and the canonical printer.
//!
//! ```text
//! # comment
//! table   NAME            (optional)
//! inputs  a b             (required, at least one)
//! outputs z               (optional)
//! reset   idle            (optional)
//!
//!         00        01
//! idle    (idle)/0  busy/-
//! busy    idle/-    (busy)/1
//! ```

use crate::error::show;
use crate::error::ParseError;
use crate::ids::StateId;
use crate::limits;
use crate::table::{is_valid_name, FlowTable, OutBit, Parts};
use std::collections::BTreeMap;

#[derive(Clone, Copy)]
struct Tok<'a> {
    text: &'a str,
    line: usize,
    col: usize,
}

fn err(t: &Tok<'_>, msg: impl Into<String>) -> ParseError {
    ParseError::new(t.line, t.col, msg)
}

/// Splits a line into tokens with 1-based character columns, dropping a `#` comment.
fn tokens(line: &str, lno: usize) -> Vec<Tok<'_>> {
    let mut out = Vec::new();
    let mut start: Option<(usize, usize)> = None; // byte, col
    let mut col = 0usize;
    for (b, ch) in line.char_indices() {
        col += 1;
        if ch == '#' {
            if let Some((sb, sc)) = start.take() {
                out.push(Tok {
                    text: &line[sb..b],
                    line: lno,
                    col: sc,
                });
            }
            return out;
        }
        if ch.is_whitespace() {
            if let Some((sb, sc)) = start.take() {
                out.push(Tok {
                    text: &line[sb..b],
                    line: lno,
                    col: sc,
                });
            }
        } else if start.is_none() {
            start = Some((b, col));
        }
    }
    if let Some((sb, sc)) = start {
        out.push(Tok {
            text: &line[sb..],
            line: lno,
            col: sc,
        });
    }
    out
}

struct Pending<'a> {
    slot: usize,
    row: usize,
    tok: Tok<'a>,
    name: &'a str,
    circled: bool,
}

const DIRECTIVES: [&str; 4] = ["table", "inputs", "outputs", "reset"];

/// Parses the text form.
///
/// # Errors
/// A [`ParseError`] at the line and column of the first problem, saying what was expected.
/// Never panics, whatever the input.
///
/// # Example
/// ```
/// // a pulse catcher of our own: `p` pulses, `ack` clears
/// let src = "table catch\ninputs p ack\noutputs got\n\
///            \x20     00       10      01\n\
///            idle  (idle)/0 seen/-  (idle)/0\n\
///            seen  (seen)/1 (seen)/1 idle/-\n";
/// let t = stillpoint_table::parse_text(src)?;
/// assert_eq!(t.num_columns(), 3);
/// assert_eq!(stillpoint_table::parse_text(&t.to_text())?, t);
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn parse_text(src: &str) -> Result<FlowTable, ParseError> {
    let mut name: Option<String> = None;
    let mut inputs: Option<Vec<String>> = None;
    let mut outputs: Option<Vec<String>> = None;
    let mut reset: Option<Tok<'_>> = None;
    let mut columns: Option<Vec<u32>> = None;
    let mut states: Vec<String> = Vec::new();
    let mut state_idx: BTreeMap<&str, usize> = BTreeMap::new();
    let mut next_pending: Vec<Pending<'_>> = Vec::new();
    let mut out: Vec<OutBit> = Vec::new();
    let mut next_slots: Vec<Option<StateId>> = Vec::new();
    let mut last_line = 0usize;
    let mut last_len = 0usize;

    for (i, line) in src.lines().enumerate() {
        let lno = i + 1;
        last_line = lno;
        last_len = line.chars().count();
        let toks = tokens(line, lno);
        if toks.is_empty() {
            continue;
        }
        let first = toks[0];
        if columns.is_none() && DIRECTIVES.contains(&first.text) {
            let args = &toks[1..];
            match first.text {
                "table" => {
                    if name.is_some() {
                        return Err(err(&first, "`table` given twice"));
                    }
                    if args.len() != 1 {
                        let at = args.get(1).unwrap_or(&first);
                        return Err(err(at, "expected one table name after `table`"));
                    }
                    if !is_valid_name(args[0].text) {
                        return Err(err(&args[0], format!("invalid table name `{}`: expected a letter or `_` followed by letters, digits or `_`", show(args[0].text))));
                    }
                    name = Some(args[0].text.to_string());
                }
                "inputs" | "outputs" => {
                    let is_in = first.text == "inputs";
                    let slot = if is_in { &mut inputs } else { &mut outputs };
                    if slot.is_some() {
                        return Err(err(&first, format!("`{}` given twice", first.text)));
                    }
                    let kind = if is_in { "input" } else { "output" };
                    let max = if is_in {
                        limits::MAX_INPUTS
                    } else {
                        limits::MAX_OUTPUTS
                    };
                    if is_in && args.is_empty() {
                        return Err(err(
                            &first,
                            "expected at least one input name after `inputs`",
                        ));
                    }
                    let mut names: Vec<String> = Vec::new();
                    for a in args {
                        if !is_valid_name(a.text) {
                            return Err(err(a, format!("invalid {kind} name `{}`: expected a letter or `_` followed by letters, digits or `_`", show(a.text))));
                        }
                        if names.iter().any(|n| n == a.text) {
                            return Err(err(a, format!("duplicate {kind} name `{}`", a.text)));
                        }
                        if names.len() == max {
                            return Err(err(
                                &first,
                                format!("too many {kind}s: at most {max} are supported"),
                            ));
                        }
                        names.push(a.text.to_string());
                    }
                    *slot = Some(names);
                }
                _ => {
                    if reset.is_some() {
                        return Err(err(&first, "`reset` given twice"));
                    }
                    if args.len() != 1 {
                        let at = args.get(1).unwrap_or(&first);
                        return Err(err(at, "expected one state name after `reset`"));
                    }
                    reset = Some(args[0]);
                }
            }
            continue;
        }
        match &columns {
            None => {
                // the column header
                let n = match &inputs {
                    Some(v) => v.len(),
                    None => {
                        return Err(err(
                            &first,
                            "expected the `inputs` directive before the column header",
                        ))
                    }
                };
                let mut cols: Vec<u32> = Vec::with_capacity(toks.len());
                let mut seen: BTreeMap<u32, ()> = BTreeMap::new();
                for t in &toks {
                    if !t.text.chars().all(|c| c == '0' || c == '1') {
                        return Err(err(t, format!("expected a column label of `0` and `1` (one per input), found `{}`", show(t.text))));
                    }
                    let len = t.text.len();
                    if len != n {
                        return Err(err(t, format!("column label `{}` has {len} characters, expected {n} (one per input)", show(t.text))));
                    }
                    let v = crate::table::value_of(t.text).unwrap_or(0);
                    if seen.insert(v, ()).is_some() {
                        return Err(err(t, format!("duplicate column `{}`", t.text)));
                    }
                    cols.push(v);
                }
                columns = Some(cols);
            }
            Some(cols) => {
                let nc = cols.len();
                let k = outputs.as_ref().map_or(0, |o| o.len());
                if !is_valid_name(first.text) {
                    return Err(err(
                        &first,
                        format!(
                            "expected a state name at the start of the row, found `{}`",
                            show(first.text)
                        ),
                    ));
                }
                if state_idx.contains_key(first.text) {
                    return Err(err(
                        &first,
                        format!("duplicate state name `{}`", first.text),
                    ));
                }
                if states.len() == limits::MAX_STATES {
                    return Err(err(
                        &first,
                        format!(
                            "too many states: at most {} are supported",
                            limits::MAX_STATES
                        ),
                    ));
                }
                if (states.len() + 1).saturating_mul(nc) > limits::MAX_ENTRIES {
                    return Err(err(
                        &first,
                        format!(
                            "too many entries: at most {} (states times columns) are supported",
                            limits::MAX_ENTRIES
                        ),
                    ));
                }
                let entries = &toks[1..];
                let row = states.len();
                for e in entries.iter().take(nc) {
                    let (left, right) = match e.text.find('/') {
                        Some(p) => (&e.text[..p], Some(&e.text[p + 1..])),
                        None => (e.text, None),
                    };
                    let (nm, circled) = if left == "-" {
                        (None, false)
                    } else if left.len() >= 2 && left.starts_with('(') && left.ends_with(')') {
                        (Some(&left[1..left.len() - 1]), true)
                    } else {
                        (Some(left), false)
                    };
                    if left.starts_with('(') && !left.ends_with(')') {
                        return Err(ParseError::new(
                            e.line,
                            e.col,
                            "expected `)` to close the stable entry",
                        ));
                    }
                    match nm {
                        Some(n) if is_valid_name(n) => next_pending.push(Pending {
                            slot: next_slots.len(),
                            row,
                            tok: *e,
                            name: n,
                            circled,
                        }),
                        Some(_) => {
                            return Err(err(
                                e,
                                format!(
                                "expected an entry `NEXT`, `(NEXT)`, `NEXT/OUT` or `-`, found `{}`",
                                show(e.text)
                            ),
                            ))
                        }
                        None => {}
                    }
                    next_slots.push(None);
                    match right {
                        None => out.extend(std::iter::repeat(OutBit::Free).take(k)),
                        Some(o) => {
                            let ocol = e.col + left.chars().count() + 1;
                            let len = o.chars().count();
                            if len != k {
                                return Err(ParseError::new(e.line, ocol, format!("output `{}` has {len} characters, expected {k} (one per output)", show(o))));
                            }
                            for (j, ch) in o.chars().enumerate() {
                                match OutBit::from_char(ch) {
                                    Some(b) => out.push(b),
                                    None => {
                                        return Err(ParseError::new(
                                            e.line,
                                            ocol + j,
                                            format!(
                                            "expected an output bit `0`, `1` or `-`, found `{ch}`"
                                        ),
                                        ))
                                    }
                                }
                            }
                        }
                    }
                }
                if entries.len() != nc {
                    let hint = if DIRECTIVES.contains(&first.text) {
                        " (directives must come before the column header)"
                    } else {
                        ""
                    };
                    let last = toks[toks.len() - 1];
                    let (line, col) = if !hint.is_empty() {
                        (first.line, first.col)
                    } else if entries.len() > nc {
                        (entries[nc].line, entries[nc].col)
                    } else {
                        (last.line, last.col + last.text.chars().count())
                    };
                    return Err(ParseError::new(
                        line,
                        col,
                        format!(
                            "row `{}` has {} entries, expected {nc} (one per column){hint}",
                            show(first.text),
                            entries.len()
                        ),
                    ));
                }
                state_idx.insert(first.text, row);
                states.push(first.text.to_string());
            }
        }
    }
    let ends_nl = src.is_empty() || src.ends_with('\n');
    let eof = |msg: &str| {
        if ends_nl {
            ParseError::new(last_line + 1, 1, msg)
        } else {
            ParseError::new(last_line.max(1), last_len + 1, msg)
        }
    };
    let cols = match columns {
        Some(c) => c,
        None => {
            return Err(match inputs {
                None => eof("expected the `inputs` directive and a column header"),
                Some(_) => eof("expected a column header (one label per listed column)"),
            })
        }
    };
    if states.is_empty() {
        return Err(eof(
            "expected at least one state row after the column header",
        ));
    }
    for p in &next_pending {
        let t = match state_idx.get(p.name) {
            Some(&t) => t,
            None => {
                return Err(err(
                    &p.tok,
                    format!("unknown state `{}`: expected the name of a row", p.name),
                ))
            }
        };
        if p.circled && t != p.row {
            return Err(err(
                &p.tok,
                format!(
                    "parentheses mark a stable entry, but `{}` is not this row `{}`",
                    p.name, states[p.row]
                ),
            ));
        }
        next_slots[p.slot] = Some(StateId::from_index(t));
    }
    let reset_id = match reset {
        None => None,
        Some(r) => match state_idx.get(r.text) {
            Some(&t) => Some(StateId::from_index(t)),
            None => {
                return Err(err(
                    &r,
                    format!(
                        "unknown state `{}` named by `reset`: expected the name of a row",
                        show(r.text)
                    ),
                ))
            }
        },
    };
    FlowTable::from_parts(Parts {
        name,
        inputs: inputs.unwrap_or_default(),
        outputs: outputs.unwrap_or_default(),
        states,
        columns: cols,
        next: next_slots,
        out,
        reset: reset_id,
    })
    .map_err(|e| ParseError::new(1, 1, e.to_string()))
}

/// The canonical text form: directives, then the header and rows with aligned columns and
/// parentheses on stable entries. Entries with a next state carry `/OUT` whenever the
/// table has outputs; unspecified next states print as `-`.
pub fn print_text(t: &FlowTable) -> String {
    let mut s = String::new();
    if let Some(n) = t.name() {
        s.push_str(&format!("table   {n}\n"));
    }
    s.push_str(&format!("inputs  {}\n", t.input_names().join(" ")));
    if t.num_outputs() > 0 {
        s.push_str(&format!("outputs {}\n", t.output_names().join(" ")));
    }
    if let Some(r) = t.reset() {
        s.push_str(&format!("reset   {}\n", t.state_name(r)));
    }
    s.push('\n');
    let k = t.num_outputs();
    let cells: Vec<Vec<String>> = t
        .states()
        .map(|st| {
            t.columns()
                .map(|c| {
                    let o = t.output_string(st, c);
                    let any_out = t.outputs(st, c).iter().any(|&b| b != OutBit::Free);
                    match t.next(st, c) {
                        Some(n) if n == st => {
                            if k > 0 {
                                format!("({})/{o}", t.state_name(n))
                            } else {
                                format!("({})", t.state_name(n))
                            }
                        }
                        Some(n) => {
                            if k > 0 {
                                format!("{}/{o}", t.state_name(n))
                            } else {
                                t.state_name(n).to_string()
                            }
                        }
                        None if any_out => format!("-/{o}"),
                        None => "-".to_string(),
                    }
                })
                .collect()
        })
        .collect();
    let w0 = t.state_names().iter().map(|n| n.len()).max().unwrap_or(0);
    let widths: Vec<usize> = t
        .columns()
        .map(|c| {
            let h = t.column_label(c).len();
            cells
                .iter()
                .map(|r| r[c.index()].len())
                .max()
                .unwrap_or(0)
                .max(h)
        })
        .collect();
    let mut line = format!("{:w0$}", "");
    for c in t.columns() {
        line.push_str("  ");
        line.push_str(&format!("{:w$}", t.column_label(c), w = widths[c.index()]));
    }
    s.push_str(line.trim_end());
    s.push('\n');
    for st in t.states() {
        let mut line = format!("{:w0$}", t.state_name(st));
        for c in t.columns() {
            line.push_str("  ");
            line.push_str(&format!(
                "{:w$}",
                cells[st.index()][c.index()],
                w = widths[c.index()]
            ));
        }
        s.push_str(line.trim_end());
        s.push('\n');
    }
    s
}

#[cfg(test)]
mod tests {
    use super::*;

    // The example of the formats contract §1 (our own table).
    const LATCH: &str = "# A latch for a sensor pulse\ntable   hit_latch\ninputs  hit clr\noutputs seen\nreset   wait\n\n        00        01        11      10\nwait    (wait)/0  (wait)/0  -       held/-\nheld    (held)/1  wait/-    -       (held)/1\n";

    fn e(src: &str) -> (usize, usize, String) {
        let x = parse_text(src).unwrap_err();
        (x.line(), x.column(), x.message().to_string())
    }

    #[test]
    fn parses_the_contract_example() {
        let t = parse_text(LATCH).unwrap();
        assert_eq!(t.name(), Some("hit_latch"));
        assert_eq!(t.num_states(), 2);
        assert_eq!(t.num_columns(), 4);
        let wait = t.state_by_name("wait").unwrap();
        let held = t.state_by_name("held").unwrap();
        let c10 = t.column_by_value(0b10).unwrap();
        assert_eq!(t.column_label(c10), "10");
        assert_eq!(t.next(wait, c10), Some(held));
        assert_eq!(t.outputs(wait, c10), &[OutBit::Free]);
        assert!(t.is_stable(held, c10));
        assert_eq!(t.reset(), Some(wait));
        let again = parse_text(&t.to_text()).unwrap();
        assert_eq!(again, t);
    }

    #[test]
    fn located_errors() {
        let head = "inputs a b\noutputs z\n   00 01\n";
        assert_eq!(e(&format!("{head}p (p)/0\n")).0, 4);
        let (l, c, m) = e(&format!("{head}p (p)/0 q/1\n"));
        assert_eq!((l, c), (4, 9));
        assert!(m.contains("unknown state `q`"), "{m}");
        let (l, c, m) = e(&format!("{head}p (p)/0 (p)/1 -\n"));
        assert_eq!((l, c), (4, 15), "{m}");
        let (l, c, m) = e(&format!("{head}p (p)/01 -\n"));
        assert_eq!((l, c), (4, 7), "{m}");
        assert!(m.contains("expected 1"));
        let (l, c, m) = e(&format!("{head}p (p)/x -\n"));
        assert_eq!((l, c), (4, 7), "{m}");
        let (l, c, m) = e(&format!("{head}p (p) -\nq - -\nr (q) -\n"));
        assert_eq!((l, c), (6, 3), "{m}");
        assert!(m.contains("parentheses"));
        let (l, c, m) = e("inputs a b\n 00 0\np - -\n");
        assert_eq!((l, c), (2, 5), "{m}");
        let (l, c, m) = e("inputs a b\n 00 2x\np - -\n");
        assert_eq!((l, c), (2, 5), "{m}");
        let (l, c, m) = e("inputs a b\n 00 00\np - -\n");
        assert_eq!((l, c), (2, 5), "{m}");
        assert!(m.contains("duplicate column"));
        let (l, c, m) = e("inputs a b\n 00\np -\np -\n");
        assert_eq!((l, c), (4, 1), "{m}");
        let (l, c, m) = e("inputs a a\n 00\np -\n");
        assert_eq!((l, c), (1, 10), "{m}");
        let (l, _, m) = e("inputs a\n 0\n");
        assert_eq!(l, 3, "{m}"); // just past the end of the file
        let (l, c, m) = e("outputs z\n 0\np -\n");
        assert_eq!((l, c), (2, 2), "{m}");
        let (_, _, m) = e("inputs a\nreset x\n 0\np -\n");
        assert!(m.contains("unknown state `x` named by `reset`"), "{m}");
        let many: String = (0..17).map(|i| format!(" i{i}")).collect();
        let (l, c, m) = e(&format!("inputs{many}\n"));
        assert_eq!(l, 1);
        assert!(m.contains("at most 16"), "{m} {c}");
    }

    #[test]
    fn junk_never_panics() {
        for src in [
            "",
            "\0\0\u{1}",
            "inputs",
            "inputs a\n(",
            "inputs a\n0\n()",
            "inputs a\n0\np (",
            "inputs a\n0\np /",
            "inputs a\n0\np -/",
            "inputs a\n0\np (p)/",
            "inputs a\n0\np ()/0",
        ] {
            let _ = parse_text(src);
        }
    }

    #[test]
    fn no_outputs_and_empty_columns() {
        let t = parse_text("inputs a b\n  00 01 11\np (p) q -\nq p (q) -\n").unwrap();
        assert_eq!(t.num_outputs(), 0);
        assert_eq!(parse_text(&t.to_text()).unwrap(), t);
        assert_eq!(crate::parse_json(&t.to_json()).unwrap(), t);
        let u = parse_text("inputs a b\n  00 01\np (p) q\nq p (q)\n").unwrap();
        assert_ne!(t, u);
        assert!(t.same_behaviour(&u));
    }
}
