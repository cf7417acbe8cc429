//! Function files (formats.md §2): JSON and the `.fn` text form, with errors located at
//! line and column.
//!
//! JSON: `{"vars": [...], "on": [...], "dc": [...], "transitions": [{"start": S, "end":
//! E}, ...]}`, or `{"vars": [...], "outputs": {"NAME": {"on": ..., "dc": ...,
//! "transitions": ...}, ...}}`. Entries of `on` and `dc` are minterm numbers (`vars[0]`
//! is the most significant bit); a cube string such as `"1-0-"` is also accepted there.
//! A single function is named `f`.
//!
//! Text: a `vars` line, then `on` and `dc` lines of minterm numbers (ranges `4..7`
//! inclusive), `change START END` lines, `#` comments. Several outputs: an
//! `output NAME` line opens each output's section (our extension of the text form).
//!
//! ```
//! let mf = stillpoint_cover::file::parse_text("vars a b c\non 1 3 6..7\nchange 3 7\n")?;
//! assert_eq!(mf.vars, ["a", "b", "c"]);
//! assert_eq!(mf.outputs[0].1.value(6), Some(true));
//! # Ok::<(), Box<dyn std::error::Error>>(())
//! ```

use crate::cube::Cube;
use crate::function::{Function, MultiFunction, Transition};
use crate::CoverError;
use std::fmt;
use stillpoint_json::{Kind, Pos, Value};

/// A malformed function file: `LINE:COL: message` (1-based).
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("{line}:{col}: {message}")]
pub struct FileError {
    /// The line.
    pub line: usize,
    /// The column.
    pub col: usize,
    /// What is wrong.
    pub message: String,
}

impl FileError {
    fn at(pos: Pos, message: impl fmt::Display) -> FileError {
        FileError {
            line: pos.line,
            col: pos.col,
            message: message.to_string(),
        }
    }
    fn lc(line: usize, col: usize, message: impl fmt::Display) -> FileError {
        FileError {
            line,
            col,
            message: message.to_string(),
        }
    }
}

/// Parses either form: JSON when `is_json`, else text.
pub fn parse(src: &str, is_json: bool) -> Result<MultiFunction, FileError> {
    if is_json {
        parse_json(src)
    } else {
        parse_text(src)
    }
}

/// One output as read, with positions for later messages.
struct RawOutput {
    name: String,
    pos: Pos,
    on: Vec<(Entry, Pos)>,
    dc: Vec<(Entry, Pos)>,
    transitions: Vec<(Transition, Pos)>,
}

#[derive(Clone, Copy)]
enum Entry {
    Minterm(u64),
    Cube(Cube),
}

/// Parses the JSON form.
pub fn parse_json(src: &str) -> Result<MultiFunction, FileError> {
    let root = stillpoint_json::parse(src).map_err(|e| FileError::at(e.pos, e.message))?;
    let members = root.as_object().ok_or_else(|| {
        FileError::at(
            root.pos,
            format!("expected an object, found {}", root.type_name()),
        )
    })?;
    check_keys(
        members,
        &["vars", "on", "dc", "transitions", "outputs", "name"],
    )?;
    let vars_v = root
        .get("vars")
        .ok_or_else(|| FileError::at(root.pos, "missing key \"vars\""))?;
    let vars = json_vars(vars_v)?;
    let n = vars.len();
    let mut raws = Vec::new();
    if let Some(outs) = root.get("outputs") {
        for key in ["on", "dc", "transitions", "name"] {
            if let Some(m) = members.iter().find(|m| m.key == key) {
                return Err(FileError::at(
                    m.key_pos,
                    format!("\"{key}\" belongs inside an output when \"outputs\" is given"),
                ));
            }
        }
        let om = outs.as_object().ok_or_else(|| {
            FileError::at(
                outs.pos,
                format!("expected an object of outputs, found {}", outs.type_name()),
            )
        })?;
        if om.is_empty() {
            return Err(FileError::at(outs.pos, "expected at least one output"));
        }
        for (i, m) in om.iter().enumerate() {
            if om[..i].iter().any(|o| o.key == m.key) {
                return Err(FileError::at(
                    m.key_pos,
                    format!("output {:?} is given twice", m.key),
                ));
            }
            if m.key.is_empty() {
                return Err(FileError::at(m.key_pos, "an output name must not be empty"));
            }
            let obj = m.value.as_object().ok_or_else(|| {
                FileError::at(
                    m.value.pos,
                    format!("expected an object, found {}", m.value.type_name()),
                )
            })?;
            check_keys(obj, &["on", "dc", "transitions"])?;
            raws.push(json_output(m.key.clone(), m.key_pos, &m.value, n)?);
        }
    } else {
        let name = match root.get("name") {
            Some(v) => v.as_str().map(str::to_string).ok_or_else(|| {
                FileError::at(v.pos, format!("expected a string, found {}", v.type_name()))
            })?,
            None => "f".to_string(),
        };
        raws.push(json_output(name, root.pos, &root, n)?);
    }
    build(vars, raws)
}

fn check_keys(members: &[stillpoint_json::Member], allowed: &[&str]) -> Result<(), FileError> {
    for (i, m) in members.iter().enumerate() {
        if !allowed.contains(&m.key.as_str()) {
            return Err(FileError::at(
                m.key_pos,
                format!(
                    "unknown key {:?} (expected one of {})",
                    m.key,
                    allowed.join(", ")
                ),
            ));
        }
        if members[..i].iter().any(|o| o.key == m.key) {
            return Err(FileError::at(
                m.key_pos,
                format!("key {:?} is given twice", m.key),
            ));
        }
    }
    Ok(())
}

fn json_vars(v: &Value) -> Result<Vec<String>, FileError> {
    let arr = v.as_array().ok_or_else(|| {
        FileError::at(
            v.pos,
            format!(
                "expected an array of variable names, found {}",
                v.type_name()
            ),
        )
    })?;
    if arr.is_empty() {
        return Err(FileError::at(v.pos, "expected at least one variable"));
    }
    if arr.len() > crate::MAX_VARS {
        return Err(FileError::at(
            v.pos,
            format!("{} variables: at most 64 are supported", arr.len()),
        ));
    }
    let mut out: Vec<String> = Vec::new();
    for e in arr {
        let s = e.as_str().ok_or_else(|| {
            FileError::at(
                e.pos,
                format!("expected a variable name (string), found {}", e.type_name()),
            )
        })?;
        check_var_name(s).map_err(|m| FileError::at(e.pos, m))?;
        if out.iter().any(|o| o == s) {
            return Err(FileError::at(
                e.pos,
                format!("variable {s:?} is named twice"),
            ));
        }
        out.push(s.to_string());
    }
    Ok(out)
}

fn check_var_name(s: &str) -> Result<(), String> {
    if s.is_empty()
        || s.chars()
            .any(|c| c.is_whitespace() || c == '\'' || c == '+')
    {
        return Err(format!(
            "bad variable name {s:?}: expected a non-empty name without spaces, quotes or '+'"
        ));
    }
    Ok(())
}

fn json_output(name: String, pos: Pos, obj: &Value, n: usize) -> Result<RawOutput, FileError> {
    let mut raw = RawOutput {
        name,
        pos,
        on: Vec::new(),
        dc: Vec::new(),
        transitions: Vec::new(),
    };
    for (key, list) in [("on", &mut raw.on), ("dc", &mut raw.dc)] {
        let Some(v) = obj.get(key) else { continue };
        let arr = v.as_array().ok_or_else(|| {
            FileError::at(v.pos, format!("expected an array, found {}", v.type_name()))
        })?;
        for e in arr {
            let entry = match &e.kind {
                Kind::Number(_) => {
                    let m = e.as_u64().ok_or_else(|| {
                        FileError::at(e.pos, "expected a minterm number (a non-negative integer)")
                    })?;
                    check_range(m, n).map_err(|msg| FileError::at(e.pos, msg))?;
                    Entry::Minterm(m)
                }
                Kind::String(s) => {
                    let c = Cube::parse(s).map_err(|err| FileError::at(e.pos, err))?;
                    if s.chars().count() != n {
                        return Err(FileError::at(
                            e.pos,
                            format!(
                                "cube {s:?} has {} characters, expected {n} (one per variable)",
                                s.chars().count()
                            ),
                        ));
                    }
                    Entry::Cube(c)
                }
                _ => {
                    return Err(FileError::at(
                        e.pos,
                        format!(
                            "expected a minterm number or a cube string, found {}",
                            e.type_name()
                        ),
                    ))
                }
            };
            list.push((entry, e.pos));
        }
    }
    if let Some(v) = obj.get("transitions") {
        let arr = v.as_array().ok_or_else(|| {
            FileError::at(
                v.pos,
                format!("expected an array of transitions, found {}", v.type_name()),
            )
        })?;
        for e in arr {
            let members = e.as_object().ok_or_else(|| {
                FileError::at(
                    e.pos,
                    format!(
                        "expected a transition object {{\"start\": S, \"end\": E}}, found {}",
                        e.type_name()
                    ),
                )
            })?;
            check_keys(members, &["start", "end"])?;
            let mut ends = [0u64; 2];
            for (k, key) in ["start", "end"].iter().enumerate() {
                let x = e
                    .get(key)
                    .ok_or_else(|| FileError::at(e.pos, format!("missing key \"{key}\"")))?;
                let m = x.as_u64().ok_or_else(|| {
                    FileError::at(
                        x.pos,
                        format!("expected a minterm number, found {}", x.type_name()),
                    )
                })?;
                check_range(m, n).map_err(|msg| FileError::at(x.pos, msg))?;
                ends[k] = m;
            }
            raw.transitions.push((
                Transition {
                    start: ends[0],
                    end: ends[1],
                },
                e.pos,
            ));
        }
    }
    Ok(raw)
}

fn check_range(m: u64, n: usize) -> Result<(), String> {
    if n < 64 && m >> n != 0 {
        return Err(format!(
            "minterm {m} does not exist with {n} variables (largest is {})",
            (1u64 << n) - 1
        ));
    }
    Ok(())
}

fn build(vars: Vec<String>, raws: Vec<RawOutput>) -> Result<MultiFunction, FileError> {
    let n = vars.len();
    let mut outputs = Vec::new();
    for raw in raws {
        // Overlap of on and dc, located at the don't-care entry.
        let as_cube = |e: &Entry| match e {
            Entry::Minterm(m) => Cube::minterm(n, *m),
            Entry::Cube(c) => *c,
        };
        let all_minterms = raw
            .on
            .iter()
            .chain(&raw.dc)
            .all(|(e, _)| matches!(e, Entry::Minterm(_)));
        if all_minterms {
            let mut on: Vec<u64> = raw
                .on
                .iter()
                .map(|(e, _)| if let Entry::Minterm(m) = e { *m } else { 0 })
                .collect();
            on.sort_unstable();
            for (e, p) in &raw.dc {
                if let Entry::Minterm(m) = e {
                    if on.binary_search(m).is_ok() {
                        return Err(FileError::at(
                            *p,
                            format!("minterm {m} is listed in both \"on\" and \"dc\""),
                        ));
                    }
                }
            }
        } else {
            for (d, p) in &raw.dc {
                let dc = as_cube(d);
                if let Some((_, q)) = raw.on.iter().find(|(o, _)| as_cube(o).intersects(&dc)) {
                    return Err(FileError::at(
                        *p,
                        format!(
                            "this don't-care entry overlaps the on-set entry at {}:{} (a point in both \"on\" and \"dc\")",
                            q.line, q.col
                        ),
                    ));
                }
            }
        }
        let ts: Vec<Transition> = raw.transitions.iter().map(|(t, _)| *t).collect();
        let built = if all_minterms {
            let num = |e: &Entry| if let Entry::Minterm(m) = e { *m } else { 0 };
            let on: Vec<u64> = raw.on.iter().map(|(e, _)| num(e)).collect();
            let dc: Vec<u64> = raw.dc.iter().map(|(e, _)| num(e)).collect();
            Function::from_minterms(n, &on, &dc, ts)
        } else {
            let on: Vec<Cube> = raw.on.iter().map(|(e, _)| as_cube(e)).collect();
            let dc: Vec<Cube> = raw.dc.iter().map(|(e, _)| as_cube(e)).collect();
            Function::from_cubes(n, on, dc, ts)
        };
        let f = built.map_err(|e| match &e {
            CoverError::BadTransition { transition, .. } => {
                let pos = raw
                    .transitions
                    .iter()
                    .find(|(t, _)| t == transition)
                    .map(|(_, p)| *p)
                    .unwrap_or(raw.pos);
                FileError::at(pos, e)
            }
            _ => FileError::at(raw.pos, e),
        })?;
        outputs.push((raw.name, f));
    }
    Ok(MultiFunction { vars, outputs })
}

/// Parses the `.fn` text form.
pub fn parse_text(src: &str) -> Result<MultiFunction, FileError> {
    let mut vars: Option<Vec<String>> = None;
    let mut raws: Vec<RawOutput> = Vec::new();
    let mut default_used = false;
    let mut last_line = 1;
    for (ln, line) in src.lines().enumerate() {
        let ln = ln + 1;
        last_line = ln;
        let body = match line.find('#') {
            Some(i) => &line[..i],
            None => line,
        };
        let toks = tokens(body);
        let Some(&(kw_col, kw)) = toks.first() else {
            continue;
        };
        let pos = Pos {
            line: ln,
            col: kw_col,
        };
        match kw {
            "vars" => {
                if vars.is_some() {
                    return Err(FileError::at(pos, "a second \"vars\" line"));
                }
                if toks.len() < 2 {
                    return Err(FileError::at(
                        pos,
                        "expected at least one variable name after \"vars\"",
                    ));
                }
                if toks.len() - 1 > crate::MAX_VARS {
                    return Err(FileError::at(
                        pos,
                        format!("{} variables: at most 64 are supported", toks.len() - 1),
                    ));
                }
                let mut vs: Vec<String> = Vec::new();
                for &(c, t) in &toks[1..] {
                    check_var_name(t).map_err(|m| FileError::lc(ln, c, m))?;
                    if vs.iter().any(|v| v == t) {
                        return Err(FileError::lc(
                            ln,
                            c,
                            format!("variable {t:?} is named twice"),
                        ));
                    }
                    vs.push(t.to_string());
                }
                vars = Some(vs);
            }
            "output" => {
                let n_ok = vars
                    .as_ref()
                    .ok_or_else(|| FileError::at(pos, "expected the \"vars\" line first"))?;
                let _ = n_ok;
                if default_used {
                    return Err(FileError::at(
                        pos,
                        "\"on\", \"dc\" or \"change\" lines come before the first \"output\" line",
                    ));
                }
                if toks.len() != 2 {
                    return Err(FileError::at(pos, "expected \"output NAME\""));
                }
                let (c, name) = toks[1];
                if raws.iter().any(|r| r.name == name) {
                    return Err(FileError::lc(
                        ln,
                        c,
                        format!("output {name:?} is given twice"),
                    ));
                }
                raws.push(RawOutput {
                    name: name.to_string(),
                    pos,
                    on: Vec::new(),
                    dc: Vec::new(),
                    transitions: Vec::new(),
                });
            }
            "on" | "dc" | "change" => {
                let n = vars
                    .as_ref()
                    .ok_or_else(|| FileError::at(pos, "expected the \"vars\" line first"))?
                    .len();
                if raws.is_empty() {
                    default_used = true;
                    raws.push(RawOutput {
                        name: "f".into(),
                        pos: Pos { line: 1, col: 1 },
                        on: Vec::new(),
                        dc: Vec::new(),
                        transitions: Vec::new(),
                    });
                }
                let raw = raws.last_mut().expect("an output");
                if kw == "change" {
                    if toks.len() != 3 {
                        return Err(FileError::at(
                            pos,
                            "expected \"change START END\" (two minterm numbers)",
                        ));
                    }
                    let s = number(toks[1], n, ln)?;
                    let e = number(toks[2], n, ln)?;
                    raw.transitions.push((Transition { start: s, end: e }, pos));
                    continue;
                }
                for &(c, t) in &toks[1..] {
                    let tp = Pos { line: ln, col: c };
                    if let Some((a, b)) = t.split_once("..") {
                        let lo = number((c, a), n, ln)?;
                        let hi = number((c + a.len() + 2, b), n, ln)?;
                        if lo > hi {
                            return Err(FileError::lc(
                                ln,
                                c,
                                format!("empty range {t}: {lo} is above {hi}"),
                            ));
                        }
                        if hi - lo >= (1 << 20) {
                            return Err(FileError::lc(
                                ln,
                                c,
                                format!("range {t} is too long (more than 2^20 minterms; give cubes in the JSON form instead)"),
                            ));
                        }
                        let list = if kw == "on" { &mut raw.on } else { &mut raw.dc };
                        if hi - lo < RANGE_AS_MINTERMS {
                            for m in lo..=hi {
                                list.push((Entry::Minterm(m), tp));
                            }
                        } else {
                            // A long range as aligned blocks (at most 2n cubes).
                            list.extend(
                                range_cubes(lo, hi, n)
                                    .into_iter()
                                    .map(|c| (Entry::Cube(c), tp)),
                            );
                        }
                    } else {
                        let m = number((c, t), n, ln)?;
                        let list = if kw == "on" { &mut raw.on } else { &mut raw.dc };
                        list.push((Entry::Minterm(m), tp));
                    }
                }
            }
            other => {
                return Err(FileError::at(
                    pos,
                    format!("unknown line {other:?} (expected vars, on, dc, change or output)"),
                ));
            }
        }
    }
    let vars = vars.ok_or_else(|| FileError::lc(last_line, 1, "missing the \"vars\" line"))?;
    if raws.is_empty() {
        raws.push(RawOutput {
            name: "f".into(),
            pos: Pos { line: 1, col: 1 },
            on: Vec::new(),
            dc: Vec::new(),
            transitions: Vec::new(),
        });
    }
    build(vars, raws)
}

/// Ranges of up to this many minterms are kept as minterms; longer ones as cubes.
const RANGE_AS_MINTERMS: u64 = 64;

/// The minterms `lo..=hi` over `n` variables as aligned blocks: each block of `2^k`
/// minterms starting at a multiple of `2^k` is one cube with the last `k` variables
/// free (`vars[0]` is the most significant bit).
fn range_cubes(lo: u64, hi: u64, n: usize) -> Vec<Cube> {
    let mut out = Vec::new();
    let mut m = lo;
    loop {
        let mut k = 0u32;
        while k < 63
            && m % (1u64 << (k + 1)) == 0
            && m.checked_add((1u64 << (k + 1)) - 1)
                .is_some_and(|e| e <= hi)
        {
            k += 1;
        }
        let mut c = Cube::minterm(n, m);
        for j in 0..k as usize {
            c = c.with_literal(n - 1 - j, None);
        }
        out.push(c);
        match m.checked_add(1u64 << k) {
            Some(next) if next <= hi => m = next,
            _ => break,
        }
    }
    out
}

/// Whitespace-separated tokens with their 1-based columns (in characters).
fn tokens(line: &str) -> Vec<(usize, &str)> {
    let mut out = Vec::new();
    let mut start: Option<(usize, usize)> = None; // (byte, col)
    let mut col = 0;
    for (b, ch) in line.char_indices() {
        col += 1;
        if ch.is_whitespace() {
            if let Some((sb, sc)) = start.take() {
                out.push((sc, &line[sb..b]));
            }
        } else if start.is_none() {
            start = Some((b, col));
        }
    }
    if let Some((sb, sc)) = start {
        out.push((sc, &line[sb..]));
    }
    out
}

fn number((col, t): (usize, &str), n: usize, ln: usize) -> Result<u64, FileError> {
    let m: u64 = t
        .parse()
        .map_err(|_| FileError::lc(ln, col, format!("expected a minterm number, found {t:?}")))?;
    check_range(m, n).map_err(|msg| FileError::lc(ln, col, msg))?;
    Ok(m)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn json_single_and_errors() {
        let src = r#"{"vars": ["a","b","c","d"], "on": [1,3,5,7,13], "dc": [15],
            "transitions": [{"start": 5, "end": 7}, {"start": 13, "end": 1}]}"#;
        let mf = parse_json(src).unwrap();
        assert_eq!(mf.outputs[0].1.transitions().len(), 2);
        let e = parse_json(r#"{"vars": ["a","b"], "on": [1, 9]}"#).unwrap_err();
        assert_eq!((e.line, e.col), (1, 31));
        let e = parse_json("{\"vars\": [\"a\"],\n \"on\": [1], \"dc\": [1]}").unwrap_err();
        assert_eq!((e.line, e.col), (2, 20));
        let e = parse_json(r#"{"vars": ["a"], "bogus": 1}"#).unwrap_err();
        assert!(e.message.contains("unknown key"));
        let e = parse_json(
            r#"{"vars": ["a","b"], "on": [1], "transitions": [{"start": 1, "end": 1}]}"#,
        )
        .unwrap_err();
        assert_eq!((e.line, e.col), (1, 48));
    }

    #[test]
    fn text_form() {
        let mf =
            parse_text("# demo\nvars a b c d\non 1 3 5 7 13\ndc 15\nchange 5 7\nchange 13 1\n")
                .unwrap();
        assert_eq!(mf.outputs[0].1.transitions().len(), 2);
        let mf = parse_text("vars a b c\noutput f\non 0..3\noutput g\non 7\n").unwrap();
        assert_eq!(mf.outputs.len(), 2);
        let e = parse_text("vars a b\non 1 x\n").unwrap_err();
        assert_eq!((e.line, e.col), (2, 6));
        let e = parse_text("vars a b\non 1..9\n").unwrap_err();
        assert_eq!((e.line, e.col), (2, 7));
        let e = parse_text("on 1\n").unwrap_err();
        assert_eq!((e.line, e.col), (1, 1));
    }

    #[test]
    fn long_ranges_are_kept_as_cubes() {
        for (lo, hi) in [(0u64, 255u64), (3, 200), (100, 230), (1, 254)] {
            let mf = parse_text(&format!("vars a b c d e f g h\non {lo}..{hi}\n")).unwrap();
            let f = &mf.outputs[0].1;
            assert!(
                f.on_cubes().len() <= 16,
                "{lo}..{hi}: {} cubes",
                f.on_cubes().len()
            );
            for m in 0..256u64 {
                assert_eq!(
                    f.value(m),
                    Some((lo..=hi).contains(&m)),
                    "{lo}..{hi} at {m}"
                );
            }
        }
        // Thirty variables, 2^20 minterms: one cube.
        let vars: Vec<String> = (0..30).map(|i| format!("v{i}")).collect();
        let mf = parse_text(&format!("vars {}\non 0..1048575\n", vars.join(" "))).unwrap();
        assert_eq!(mf.outputs[0].1.on_cubes().len(), 1);
        // An overlap with a long range is located at the don't-care entry.
        let e = parse_text("vars a b c d e f g\non 0..100\ndc 7\n").unwrap_err();
        assert_eq!((e.line, e.col), (3, 4));
        assert!(e.message.contains("both"), "{}", e.message);
    }
}
