//! The JSON form of flow tables (formats contract §1): reader with errors located at the
//! offending value (or at the object that lacks a key), and the printer.
//!
//! The printer lists every listed column in `"columns"` (also one whose entries are all
//! unspecified), so that text and JSON forms convert both ways without loss. In the
//! `"next"` and `"out"` maps it writes only specified entries: a column missing from a
//! state's map is unspecified.

use crate::error::show;
use crate::error::ParseError;
use crate::ids::StateId;
use crate::limits;
use crate::table::{is_valid_name, FlowTable, OutBit, Parts};
use std::collections::BTreeMap;
use stillpoint_json::{Kind, Member, Pos, Value};

fn at(pos: Pos, msg: impl Into<String>) -> ParseError {
    ParseError::new(pos.line, pos.col, msg)
}

fn members<'a>(v: &'a Value, what: &str) -> Result<&'a [Member], ParseError> {
    v.as_object().ok_or_else(|| {
        at(
            v.pos,
            format!("expected an object for {what}, found {}", v.type_name()),
        )
    })
}

fn required<'a>(obj: &'a Value, key: &str, what: &str) -> Result<&'a Value, ParseError> {
    obj.get(key)
        .ok_or_else(|| at(obj.pos, format!("missing key `{key}` ({what})")))
}

fn optional<'a>(obj: &'a Value, key: &str) -> Option<&'a Value> {
    obj.get(key).filter(|v| !v.is_null())
}

fn name_list(v: &Value, kind: &str, max: usize) -> Result<Vec<String>, ParseError> {
    let arr = v.as_array().ok_or_else(|| {
        at(
            v.pos,
            format!("expected an array of {kind} names, found {}", v.type_name()),
        )
    })?;
    let mut out: Vec<String> = Vec::with_capacity(arr.len().min(max));
    for e in arr {
        let s = e.as_str().ok_or_else(|| {
            at(
                e.pos,
                format!("expected a {kind} name (a string), found {}", e.type_name()),
            )
        })?;
        if !is_valid_name(s) {
            return Err(at(e.pos, format!("invalid {kind} name `{}`: expected a letter or `_` followed by letters, digits or `_`", show(s))));
        }
        if out.iter().any(|n| n == s) {
            return Err(at(e.pos, format!("duplicate {kind} name `{s}`")));
        }
        if out.len() == max {
            return Err(at(
                v.pos,
                format!("too many {kind}s: at most {max} are supported"),
            ));
        }
        out.push(s.to_string());
    }
    Ok(out)
}

fn no_duplicate_keys(ms: &[Member]) -> Result<(), ParseError> {
    let mut seen = BTreeMap::new();
    for m in ms {
        if seen.insert(m.key.as_str(), ()).is_some() {
            return Err(at(m.key_pos, format!("duplicate key `{}`", show(&m.key))));
        }
    }
    Ok(())
}

/// Parses the JSON form.
///
/// # Errors
/// A [`ParseError`] at the offending value (a wrong type, an unknown state or column, a
/// bad label or output), at the object that lacks a required key, or where the JSON
/// itself is malformed. Never panics.
///
/// # Example
/// ```
/// let t = stillpoint_table::parse_json(r#"{
///   "inputs": ["go"], "outputs": ["busy"], "states": ["idle", "run"],
///   "columns": ["0", "1"],
///   "next": {"idle": {"0": "idle", "1": "run"}, "run": {"0": "idle", "1": "run"}},
///   "out":  {"idle": {"0": "0"}, "run": {"1": "1"}}
/// }"#)?;
/// assert_eq!(t.num_states(), 2);
/// assert_eq!(stillpoint_table::parse_json(&t.to_json())?, t);
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn parse_json(src: &str) -> Result<FlowTable, ParseError> {
    let root = stillpoint_json::parse(src)
        .map_err(|e| ParseError::new(e.pos.line, e.pos.col, e.message))?;
    let top = members(&root, "the flow table")?;
    no_duplicate_keys(top)?;
    let name = match optional(&root, "name") {
        None => None,
        Some(v) => {
            let s = v.as_str().ok_or_else(|| {
                at(
                    v.pos,
                    format!(
                        "expected the table name (a string), found {}",
                        v.type_name()
                    ),
                )
            })?;
            if !is_valid_name(s) {
                return Err(at(v.pos, format!("invalid table name `{}`: expected a letter or `_` followed by letters, digits or `_`", show(s))));
            }
            Some(s.to_string())
        }
    };
    let iv = required(&root, "inputs", "the list of input names")?;
    let inputs = name_list(iv, "input", limits::MAX_INPUTS)?;
    if inputs.is_empty() {
        return Err(at(iv.pos, "expected at least one input name"));
    }
    let outputs = match optional(&root, "outputs") {
        None => Vec::new(),
        Some(v) => name_list(v, "output", limits::MAX_OUTPUTS)?,
    };
    let sv = required(&root, "states", "the list of state names")?;
    let states = name_list(sv, "state", limits::MAX_STATES)?;
    if states.is_empty() {
        return Err(at(sv.pos, "expected at least one state name"));
    }
    let sidx: BTreeMap<&str, usize> = states
        .iter()
        .enumerate()
        .map(|(i, s)| (s.as_str(), i))
        .collect();
    let cv = required(&root, "columns", "the list of column labels")?;
    let carr = cv.as_array().ok_or_else(|| {
        at(
            cv.pos,
            format!(
                "expected an array of column labels, found {}",
                cv.type_name()
            ),
        )
    })?;
    let n = inputs.len();
    let mut columns: Vec<u32> = Vec::new();
    let mut cidx: BTreeMap<&str, usize> = BTreeMap::new();
    for e in carr {
        let s = e.as_str().ok_or_else(|| {
            at(
                e.pos,
                format!(
                    "expected a column label (a string), found {}",
                    e.type_name()
                ),
            )
        })?;
        if s.is_empty() || !s.chars().all(|c| c == '0' || c == '1') {
            return Err(at(
                e.pos,
                format!(
                    "expected a column label of `0` and `1` (one per input), found `{}`",
                    show(s)
                ),
            ));
        }
        if s.len() != n {
            return Err(at(
                e.pos,
                format!(
                    "column label `{}` has {} characters, expected {n} (one per input)",
                    show(s),
                    s.len()
                ),
            ));
        }
        if cidx.insert(s, columns.len()).is_some() {
            return Err(at(e.pos, format!("duplicate column `{s}`")));
        }
        columns.push(crate::table::value_of(s).unwrap_or(0));
    }
    if columns.is_empty() {
        return Err(at(cv.pos, "expected at least one column label"));
    }
    let nc = columns.len();
    let ns = states.len();
    if ns.saturating_mul(nc) > limits::MAX_ENTRIES {
        return Err(at(
            cv.pos,
            format!(
                "too many entries: at most {} (states times columns) are supported",
                limits::MAX_ENTRIES
            ),
        ));
    }
    let k = outputs.len();
    let reset = match optional(&root, "reset") {
        None => None,
        Some(v) => {
            let s = v.as_str().ok_or_else(|| {
                at(
                    v.pos,
                    format!(
                        "expected the reset state's name (a string), found {}",
                        v.type_name()
                    ),
                )
            })?;
            match sidx.get(s) {
                Some(&i) => Some(StateId::from_index(i)),
                None => {
                    return Err(at(
                        v.pos,
                        format!(
                            "unknown state `{}` named by `reset`: expected one of `states`",
                            show(s)
                        ),
                    ))
                }
            }
        }
    };
    let mut next = vec![None; ns * nc];
    let nv = required(&root, "next", "the next-state map")?;
    // Walks a `{state: {column: value}}` map, calling `f(slot, value)` for non-null values.
    let walk = |map: &Value,
                what: &str,
                f: &mut dyn FnMut(usize, &Value) -> Result<(), ParseError>|
     -> Result<(), ParseError> {
        let ms = members(map, what)?;
        no_duplicate_keys(ms)?;
        for m in ms {
            let s = *sidx.get(m.key.as_str()).ok_or_else(|| {
                at(
                    m.key_pos,
                    format!("unknown state `{}`: expected one of `states`", show(&m.key)),
                )
            })?;
            let row = members(&m.value, &format!("the entries of state `{}`", m.key))?;
            no_duplicate_keys(row)?;
            for e in row {
                let c = *cidx.get(e.key.as_str()).ok_or_else(|| {
                    at(
                        e.key_pos,
                        format!(
                            "unknown column `{}`: expected one of `columns`",
                            show(&e.key)
                        ),
                    )
                })?;
                if !e.value.is_null() {
                    f(s * nc + c, &e.value)?;
                }
            }
        }
        Ok(())
    };
    walk(nv, "`next`", &mut |slot, v| {
        let s = v.as_str().ok_or_else(|| {
            at(
                v.pos,
                format!("expected a state name or null, found {}", v.type_name()),
            )
        })?;
        match sidx.get(s) {
            Some(&t) => {
                next[slot] = Some(StateId::from_index(t));
                Ok(())
            }
            None => Err(at(
                v.pos,
                format!("unknown state `{}`: expected one of `states`", show(s)),
            )),
        }
    })?;
    let mut out = vec![OutBit::Free; ns * nc * k];
    if let Some(ov) = optional(&root, "out") {
        walk(ov, "`out`", &mut |slot, v| {
            let s = v.as_str().ok_or_else(|| {
                at(
                    v.pos,
                    format!("expected an output string or null, found {}", v.type_name()),
                )
            })?;
            let len = s.chars().count();
            if len != k {
                return Err(at(
                    v.pos,
                    format!(
                        "output `{}` has {len} characters, expected {k} (one per output)",
                        show(s)
                    ),
                ));
            }
            for (j, ch) in s.chars().enumerate() {
                out[slot * k + j] = OutBit::from_char(ch).ok_or_else(|| {
                    at(
                        v.pos,
                        format!("output `{}`: expected only `0`, `1` or `-`", show(s)),
                    )
                })?;
            }
            Ok(())
        })?;
    }
    let _ = Kind::Null;
    FlowTable::from_parts(Parts {
        name,
        inputs,
        outputs,
        states,
        columns,
        next,
        out,
        reset,
    })
    .map_err(|e| at(root.pos, e.to_string()))
}

fn list(items: impl Iterator<Item = String>) -> String {
    let v: Vec<String> = items.map(|s| stillpoint_json::quote(&s)).collect();
    format!("[{}]", v.join(", "))
}

/// The JSON form, pretty-printed with a fixed key order.
pub fn print_json(t: &FlowTable) -> String {
    let q = stillpoint_json::quote;
    let mut s = String::from("{\n");
    if let Some(n) = t.name() {
        s.push_str(&format!("  \"name\": {},\n", q(n)));
    }
    s.push_str(&format!(
        "  \"inputs\": {},\n",
        list(t.input_names().iter().cloned())
    ));
    s.push_str(&format!(
        "  \"outputs\": {},\n",
        list(t.output_names().iter().cloned())
    ));
    s.push_str(&format!(
        "  \"states\": {},\n",
        list(t.state_names().iter().cloned())
    ));
    s.push_str(&format!(
        "  \"columns\": {},\n",
        list(t.columns().map(|c| t.column_label(c).to_string()))
    ));
    if let Some(r) = t.reset() {
        s.push_str(&format!("  \"reset\": {},\n", q(t.state_name(r))));
    }
    let map = |f: &dyn Fn(StateId, crate::ids::ColumnId) -> Option<String>| -> String {
        let rows: Vec<String> = t
            .states()
            .map(|st| {
                let es: Vec<String> = t
                    .columns()
                    .filter_map(|c| {
                        f(st, c).map(|v| format!("{}: {}", q(t.column_label(c)), q(&v)))
                    })
                    .collect();
                format!("    {}: {{{}}}", q(t.state_name(st)), es.join(", "))
            })
            .collect();
        format!("{{\n{}\n  }}", rows.join(",\n"))
    };
    s.push_str(&format!(
        "  \"next\": {}",
        map(&|st, c| t.next(st, c).map(|n| t.state_name(n).to_string()))
    ));
    if t.num_outputs() > 0 {
        s.push_str(&format!(
            ",\n  \"out\": {}",
            map(&|st, c| {
                if t.outputs(st, c).iter().all(|&b| b == OutBit::Free) {
                    None
                } else {
                    Some(t.output_string(st, c))
                }
            })
        ));
    }
    s.push_str("\n}\n");
    s
}

#[cfg(test)]
mod tests {
    use super::*;

    // The JSON example of the formats contract §1 (our own table).
    const LATCH: &str = r#"{
  "inputs": ["hit", "clr"],
  "outputs": ["seen"],
  "states": ["wait", "held"],
  "columns": ["00", "01", "10"],
  "reset": "wait",
  "next": {"wait": {"00": "wait", "01": "wait", "10": "held"},
           "held": {"00": "held", "01": "wait", "10": "held"}},
  "out":  {"wait": {"00": "0", "01": "0", "10": "-"},
           "held": {"00": "1", "01": "-", "10": "1"}}
}"#;

    fn e(src: &str) -> (usize, usize, String) {
        let x = parse_json(src).unwrap_err();
        (x.line(), x.column(), x.message().to_string())
    }

    #[test]
    fn contract_example_matches_the_text_form() {
        let j = parse_json(LATCH).unwrap();
        let t = crate::parse_text("inputs hit clr\noutputs seen\nreset wait\n   00 01 11 10\nwait (wait)/0 (wait)/0 - held/-\nheld (held)/1 wait/- - (held)/1\n").unwrap();
        assert!(j.same_behaviour(&t));
        assert_eq!(parse_json(&j.to_json()).unwrap(), j);
        assert_eq!(parse_json(&t.to_json()).unwrap(), t);
        assert_eq!(crate::parse_text(&j.to_text()).unwrap(), j);
    }

    #[test]
    fn located_errors() {
        let (l, c, m) = e("{\"inputs\": [\"a\"], \"states\": [\"p\"], \"columns\": [\"0\"]}");
        assert_eq!((l, c), (1, 1));
        assert!(m.contains("missing key `next`"), "{m}");
        let (l, c, m) = e("{\"inputs\": [\"a\"],\n \"states\": [\"p\"], \"columns\": [\"0\"],\n \"next\": {\"p\": {\"0\": \"q\"}}}");
        assert_eq!((l, c), (3, 22), "{m}");
        let (l, c, m) =
            e("{\"inputs\": [\"a\", 3], \"states\": [\"p\"], \"columns\": [\"0\"], \"next\": {}}");
        assert_eq!((l, c), (1, 18), "{m}");
        assert!(m.contains("number"));
        let (_, c, m) =
            e("{\"inputs\": [\"a\"], \"states\": [\"p\"], \"columns\": [\"00\"], \"next\": {}}");
        assert_eq!(c, 48, "{m}");
        let (_, c, m) = e("{\"inputs\": [\"a\"], \"states\": [\"p\"], \"columns\": [\"0\"], \"next\": {\"p\": {\"1\": null}}}");
        assert_eq!(c, 69, "{m}");
        let (_, _, m) = e("{\"inputs\": [\"a\"], \"outputs\": [\"z\"], \"states\": [\"p\"], \"columns\": [\"0\"], \"next\": {}, \"out\": {\"p\": {\"0\": \"01\"}}}");
        assert!(m.contains("expected 1"), "{m}");
        let (_, _, m) = e("[1]");
        assert!(m.contains("expected an object"), "{m}");
        let _ = e("{\"inputs\": [\"a\"], \"states\": [\"p\"], \"columns\": [\"0\"], \"next\": {\"p\": {}, \"p\": {}}}");
    }
}
