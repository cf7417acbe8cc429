//! Pictures (issue 8): every SVG parses as XML and renders with a real SVG renderer to a
//! pixmap of the declared size with ink on it; independent checkers read the maps and the
//! cube back from the SVG; golden files guard the layout; DOT parses back.
//!
//! Outside references: XML well-formedness is judged by the `roxmltree` crate, rendering
//! by the `resvg` crate, and DOT (when installed) by Graphviz's `dot` program. Gray code
//! adjacency of map cells and the edge count `k·2^(k-1)` of the `k`-cube are facts of the
//! trade (common practice, no source).
//!
//! Set `STILLPOINT_BLESS=1` to rewrite the golden files; set `STILLPOINT_PICTURES_PNG=DIR`
//! to also save every rendered picture as a PNG in DIR for a look.

use resvg::{tiny_skia, usvg};
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};
use std::sync::{Arc, OnceLock};
use stillpoint::pictures::{
    code_cube_svg, flow_graph_dot, flow_graph_svg, kmap_svg, write_all, CodeCube, CubeArrow,
    FlowGraph, KMap, PictureError,
};

// ---------------------------------------------------------------- fixtures (our own)

fn s(x: &str) -> String {
    x.to_string()
}

fn arrow(col: &str, from: &str, to: &str, order: Option<&[&str]>) -> CubeArrow {
    CubeArrow {
        column: s(col),
        from: s(from),
        to: s(to),
        critical_order: order.map(|o| o.iter().map(|c| s(c)).collect()),
    }
}

/// A 4-state ring on a square: each column moves one state on by one bit.
fn ring_cube() -> CodeCube {
    CodeCube {
        vars: vec![s("y1"), s("y2")],
        states: vec![
            (s("A"), s("00")),
            (s("B"), s("01")),
            (s("C"), s("11")),
            (s("D"), s("10")),
        ],
        transitions: vec![
            arrow("01", "A", "B", None),
            arrow("11", "B", "C", None),
            arrow("10", "C", "D", None),
            arrow("00", "D", "A", None),
            arrow("00", "B", "A", None),
        ],
    }
}

fn ring_graph() -> FlowGraph {
    FlowGraph {
        name: s("ring4"),
        states: vec![s("A"), s("B"), s("C"), s("D")],
        reset: Some(s("A")),
        edges: vec![
            (s("A"), s("B"), s("01")),
            (s("B"), s("C"), s("11")),
            (s("C"), s("D"), s("10")),
            (s("D"), s("A"), s("00")),
            (s("B"), s("A"), s("00")),
            (s("D"), s("A"), s("01")),
        ],
        stable: vec![
            (s("A"), s("00")),
            (s("B"), s("01")),
            (s("C"), s("11")),
            (s("D"), s("10")),
            (s("C"), s("01")),
        ],
    }
}

/// A 5-state controller on the 3-cube with a multi-bit transition and a critical race:
/// in column 11, Arm (001) heads for Hold (110) but changing y2 first reaches Fire (011),
/// which is stable there.
fn controller_cube() -> CodeCube {
    CodeCube {
        vars: vec![s("y1"), s("y2"), s("y3")],
        states: vec![
            (s("Idle"), s("000")),
            (s("Arm"), s("001")),
            (s("Fire"), s("011")),
            (s("Hold"), s("110")),
            (s("Done"), s("100")),
        ],
        transitions: vec![
            arrow("01", "Idle", "Arm", None),
            arrow("10", "Idle", "Fire", None),
            arrow("11", "Arm", "Hold", Some(&["001", "011"])),
            arrow("11", "Fire", "Hold", None),
            arrow("00", "Hold", "Done", None),
            arrow("00", "Done", "Idle", None),
            arrow("01", "Done", "Idle", None),
        ],
    }
}

fn controller_graph() -> FlowGraph {
    FlowGraph {
        name: s("controller <5> & co"),
        states: vec![s("Idle"), s("Arm"), s("Fire"), s("Hold"), s("Done")],
        reset: Some(s("Idle")),
        edges: vec![
            (s("Idle"), s("Arm"), s("01")),
            (s("Idle"), s("Fire"), s("10")),
            (s("Arm"), s("Hold"), s("11")),
            (s("Fire"), s("Hold"), s("11")),
            (s("Hold"), s("Done"), s("00")),
            (s("Done"), s("Idle"), s("00")),
            (s("Done"), s("Idle"), s("01")),
            (s("Arm"), s("Idle"), s("00")),
        ],
        stable: vec![
            (s("Idle"), s("00")),
            (s("Arm"), s("01")),
            (s("Fire"), s("10")),
            (s("Hold"), s("11")),
            (s("Hold"), s("10")),
            (s("Done"), s("10")),
        ],
    }
}

/// Ten states with longer names, each moving on by one or two places.
fn wide_graph() -> FlowGraph {
    let names: Vec<String> = (0..10).map(|i| format!("phase_{i}")).collect();
    let mut edges = Vec::new();
    let mut stable = Vec::new();
    for i in 0..10 {
        edges.push((names[i].clone(), names[(i + 1) % 10].clone(), s("01")));
        if i % 3 == 0 {
            edges.push((names[i].clone(), names[(i + 2) % 10].clone(), s("11")));
        }
        stable.push((names[i].clone(), s(if i % 2 == 0 { "00" } else { "10" })));
    }
    FlowGraph {
        name: s("ten phases"),
        states: names.clone(),
        reset: Some(names[3].clone()),
        edges,
        stable,
    }
}

fn vars(names: &[&str]) -> Vec<String> {
    names.iter().map(|v| s(v)).collect()
}

/// Does minterm `m` (vars[0] most significant, `n` variables) lie in `cube`?
fn in_cube(cube: &str, m: usize, nv: usize) -> bool {
    cube.chars().enumerate().all(|(i, c)| {
        let bit = (m >> (nv - 1 - i)) & 1;
        match c {
            '1' => bit == 1,
            '0' => bit == 0,
            _ => true,
        }
    })
}

/// A map whose ON-set is the union of `products`, with `dc` minterms as don't-cares.
fn map_of(name: &str, v: Vec<String>, products: &[&str], dc: &[usize], required: &[&str]) -> KMap {
    let nv = v.len();
    let values = (0..1usize << nv)
        .map(|m| {
            if dc.contains(&m) {
                None
            } else {
                Some(products.iter().any(|p| in_cube(p, m, nv)))
            }
        })
        .collect();
    KMap {
        name: s(name),
        vars: v,
        values,
        products: products.iter().map(|p| s(p)).collect(),
        required: required.iter().map(|p| s(p)).collect(),
    }
}

/// f = a·b + a'·c with the consensus b·c as a required transition cube: the classic
/// static-hazard example (CHECK HAZ-1 in methods.md, from memory).
fn map3() -> KMap {
    map_of("f", vars(&["a", "b", "c"]), &["11-", "0-1"], &[], &["-11"])
}

/// Four variables with wrap-around products: the four corners and a column pair.
fn map4() -> KMap {
    map_of(
        "Y1",
        vars(&["x1", "x2", "y1", "y2"]),
        &["-0-0", "01-1", "1--1"],
        &[5, 12],
        &["-0-0"],
    )
}

fn map5() -> KMap {
    map_of(
        "Y2",
        vars(&["x1", "x2", "y1", "y2", "y3"]),
        &["-1-0-", "1---1", "00110"],
        &[0, 17],
        &["-1-00"],
    )
}

fn map6() -> KMap {
    map_of(
        "z",
        vars(&["x1", "x2", "y1", "y2", "y3", "y4"]),
        &["--1-0-", "11---1", "0-0000", "-0-111"],
        &[33, 40],
        &["--1-00"],
    )
}

fn cube_k(k: usize) -> CodeCube {
    // States on a unit-distance chain with one multi-bit hop and one critical race.
    let vars: Vec<String> = (1..=k).map(|i| format!("y{i}")).collect();
    let code = |v: u64| -> String {
        (0..k)
            .rev()
            .map(|b| if (v >> b) & 1 == 1 { '1' } else { '0' })
            .collect()
    };
    let chain: Vec<u64> = vec![0, 1, 3, 7, (1 << k) - 1];
    let states: Vec<(String, String)> = chain
        .iter()
        .enumerate()
        .map(|(i, &v)| (format!("S{i}"), code(v)))
        .collect();
    let last = (1u64 << k) - 1;
    let mut transitions = vec![
        arrow("a", "S0", "S1", None),
        arrow("a", "S1", "S2", None),
        arrow("b", "S2", "S3", None),
        arrow("b", "S3", "S4", None),
    ];
    transitions.push(CubeArrow {
        column: s("c"),
        from: s("S4"),
        to: s("S0"),
        critical_order: Some(vec![code(last ^ 1), code(last ^ 3), code(3), code(1)]),
    });
    CodeCube {
        vars,
        states,
        transitions,
    }
}

// ---------------------------------------------------------------- helpers

fn fontdb() -> Arc<usvg::fontdb::Database> {
    static DB: OnceLock<Arc<usvg::fontdb::Database>> = OnceLock::new();
    DB.get_or_init(|| {
        let mut db = usvg::fontdb::Database::new();
        db.load_system_fonts();
        // The generic families default to faces that may be missing; point them at
        // whatever sans-serif and monospace faces this machine has.
        let family = |db: &usvg::fontdb::Database, want: &[&str]| -> Option<String> {
            want.iter()
                .find(|w| db.faces().any(|f| f.families.iter().any(|(n, _)| n == *w)))
                .map(|w| w.to_string())
        };
        if let Some(f) = family(
            &db,
            &["DejaVu Sans", "Liberation Sans", "Noto Sans", "FreeSans"],
        ) {
            db.set_sans_serif_family(f);
        }
        if let Some(f) = family(
            &db,
            &[
                "DejaVu Sans Mono",
                "Liberation Mono",
                "Noto Sans Mono",
                "FreeMono",
            ],
        ) {
            db.set_monospace_family(f);
        }
        Arc::new(db)
    })
    .clone()
}

/// Parse as XML, check the root, render, and return (width, height, ink pixels).
fn check_svg(svg: &str, png_name: &str) -> (u32, u32, usize) {
    let doc = roxmltree::Document::parse(svg).expect("well-formed XML");
    let root = doc.root_element();
    assert_eq!(root.tag_name().name(), "svg");
    assert_eq!(
        root.tag_name().namespace(),
        Some("http://www.w3.org/2000/svg")
    );
    let w: u32 = root
        .attribute("width")
        .expect("width")
        .parse()
        .expect("integer width");
    let h: u32 = root
        .attribute("height")
        .expect("height")
        .parse()
        .expect("integer height");
    assert_eq!(
        root.attribute("viewBox"),
        Some(format!("0 0 {w} {h}").as_str())
    );
    assert!(root
        .attribute("font-family")
        .unwrap_or("")
        .contains("sans-serif"));
    assert!(w >= 100 && h >= 100 && w < 4000 && h < 4000, "size {w}x{h}");

    let opt = usvg::Options {
        fontdb: fontdb(),
        ..Default::default()
    };
    let tree = usvg::Tree::from_str(svg, &opt).expect("resvg accepts the SVG");
    let size = tree.size().to_int_size();
    assert_eq!((size.width(), size.height()), (w, h));
    let mut pixmap = tiny_skia::Pixmap::new(w, h).expect("pixmap");
    resvg::render(&tree, tiny_skia::Transform::default(), &mut pixmap.as_mut());
    let ink = pixmap
        .pixels()
        .iter()
        .filter(|p| p.alpha() > 0 && (p.red() < 200 || p.green() < 200 || p.blue() < 200))
        .count();
    assert!(
        ink > (w * h) as usize / 200,
        "{png_name}: only {ink} ink pixels"
    );
    if let Ok(dir) = std::env::var("STILLPOINT_PICTURES_PNG") {
        std::fs::create_dir_all(&dir).unwrap();
        pixmap
            .save_png(Path::new(&dir).join(format!("{png_name}.png")))
            .unwrap();
        // And a greyscale copy, to judge the palette as a greyscale print would show it.
        let mut grey = pixmap.clone();
        for px in grey.pixels_mut() {
            let (r, g, b) = (
                f64::from(px.red()),
                f64::from(px.green()),
                f64::from(px.blue()),
            );
            let l = ((0.299 * r + 0.587 * g + 0.114 * b).round() as u8).min(px.alpha());
            *px = tiny_skia::PremultipliedColorU8::from_rgba(l, l, l, px.alpha()).unwrap();
        }
        grey.save_png(Path::new(&dir).join(format!("{png_name}_grey.png")))
            .unwrap();
    }
    (w, h, ink)
}

fn golden(name: &str, text: &str) {
    let path = PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/golden")
        .join(name);
    if std::env::var("STILLPOINT_BLESS").as_deref() == Ok("1") {
        std::fs::create_dir_all(path.parent().unwrap()).unwrap();
        std::fs::write(&path, text).unwrap();
        return;
    }
    let want = std::fs::read_to_string(&path).unwrap_or_else(|_| {
        panic!(
            "missing golden {}; run with STILLPOINT_BLESS=1",
            path.display()
        )
    });
    assert!(
        want == text,
        "{name} differs from its golden file; if the new layout is intended, rerun with STILLPOINT_BLESS=1"
    );
}

fn num(n: roxmltree::Node, a: &str) -> f64 {
    n.attribute(a)
        .unwrap_or_else(|| panic!("attribute {a}"))
        .parse()
        .unwrap()
}

fn has_class(n: &roxmltree::Node, c: &str) -> bool {
    n.attribute("class")
        .is_some_and(|v| v.split(' ').any(|x| x == c))
}

/// Independent reader of a map picture: from the Gray labels and the variable names a
/// reader sees, recompute each cell's minterm and compare the printed value with the
/// function; check that side-by-side cells differ in one variable (wrapping included);
/// and check that each product's outlines cover exactly the cells of its cube.
fn read_back_map(m: &KMap, svg: &str) {
    let doc = roxmltree::Document::parse(svg).unwrap();
    let nv = m.vars.len();
    let mut seen = vec![0usize; 1 << nv];
    for sub in doc.descendants().filter(|n| has_class(n, "submap")) {
        let outer = sub.attribute("data-outer").unwrap().to_string();
        let texts = |c: &str| -> Vec<roxmltree::Node> {
            sub.descendants().filter(|n| has_class(n, c)).collect()
        };
        let rowvars: Vec<String> = texts("rowvars")
            .first()
            .and_then(|n| n.text())
            .unwrap_or("")
            .split_whitespace()
            .map(String::from)
            .collect();
        let colvars: Vec<String> = texts("colvars")
            .first()
            .and_then(|n| n.text())
            .unwrap_or("")
            .split_whitespace()
            .map(String::from)
            .collect();
        // Sub-map title names the outer variables in order, e.g. "x1=0, x2=1".
        let mut order: Vec<String> = Vec::new();
        let mut outer_bits = String::new();
        if let Some(t) = texts("sublab").first().and_then(|n| n.text()) {
            for part in t.split(", ") {
                let (v, b) = part.split_once('=').unwrap();
                order.push(v.to_string());
                outer_bits.push_str(b);
            }
        }
        assert_eq!(outer_bits, outer);
        order.extend(rowvars.iter().cloned());
        order.extend(colvars.iter().cloned());
        assert_eq!(
            order, m.vars,
            "the labels name every variable once, in order"
        );
        let rows: Vec<(f64, String)> = texts("rowlab")
            .iter()
            .map(|n| (num(*n, "y"), n.text().unwrap_or("").to_string()))
            .collect();
        let cols: Vec<(f64, String)> = texts("collab")
            .iter()
            .map(|n| (num(*n, "x"), n.text().unwrap_or("").to_string()))
            .collect();
        let nr = rows.len().max(1);
        let nc = cols.len().max(1);
        let mut grid: BTreeMap<(usize, usize), usize> = BTreeMap::new();
        let mut centres: Vec<(f64, f64, usize)> = Vec::new();
        for cell in texts("cell") {
            let (x, y) = (num(cell, "x"), num(cell, "y"));
            let ri = rows.iter().position(|r| (r.0 - y).abs() < 0.05);
            let ci = cols.iter().position(|c| (c.0 - x).abs() < 0.05);
            let rbits = ri.map_or(String::new(), |i| rows[i].1.clone());
            let cbits = ci.map_or(String::new(), |i| cols[i].1.clone());
            let bits = format!("{outer}{rbits}{cbits}");
            assert_eq!(bits.len(), nv);
            let mt = usize::from_str_radix(if bits.is_empty() { "0" } else { &bits }, 2).unwrap();
            seen[mt] += 1;
            let want = match m.values[mt] {
                Some(true) => "1",
                Some(false) => "0",
                None => "-",
            };
            assert_eq!(cell.text(), Some(want), "minterm {mt}");
            grid.insert((ri.unwrap_or(0), ci.unwrap_or(0)), mt);
            centres.push((x, y - 5.0, mt));
        }
        // Gray adjacency, wrap-around included (common practice, no source).
        for (&(r, c), &mt) in &grid {
            for (dr, dc) in [(1, 0), (0, 1)] {
                let (r2, c2) = ((r + dr) % nr, (c + dc) % nc);
                if (r2, c2) == (r, c) || (dr == 1 && nr == 1) || (dc == 1 && nc == 1) {
                    continue;
                }
                let other = grid[&(r2, c2)];
                assert_eq!((mt ^ other).count_ones(), 1, "cells {mt} and {other}");
            }
        }
        for g in sub
            .descendants()
            .filter(|n| has_class(n, "product") || has_class(n, "required"))
        {
            let cube = g.attribute("data-cube").unwrap();
            let rects: Vec<(f64, f64, f64, f64)> = g
                .children()
                .filter(|n| n.has_tag_name("rect"))
                .map(|r| (num(r, "x"), num(r, "y"), num(r, "width"), num(r, "height")))
                .collect();
            for &(x, y, mt) in &centres {
                let inside = rects
                    .iter()
                    .any(|&(rx, ry, rw, rh)| x > rx && x < rx + rw && y > ry && y < ry + rh);
                assert_eq!(inside, in_cube(cube, mt, nv), "cube {cube}, minterm {mt}");
            }
        }
    }
    assert!(
        seen.iter().all(|&c| c == 1),
        "every minterm drawn exactly once"
    );
}

/// Independent reader of a cube picture (k <= 6): every corner once, every edge joins
/// two corners at Hamming distance 1 and sits on their centres, k·2^(k-1) edges, states
/// filled and the rest hollow.
fn read_back_cube(c: &CodeCube, svg: &str) {
    let doc = roxmltree::Document::parse(svg).unwrap();
    let k = c.vars.len();
    let mut at: BTreeMap<String, (f64, f64, bool)> = BTreeMap::new();
    for n in doc
        .descendants()
        .filter(|n| n.has_tag_name("circle") && n.attribute("data-code").is_some())
    {
        let code = n.attribute("data-code").unwrap().to_string();
        let prev = at.insert(code, (num(n, "cx"), num(n, "cy"), has_class(&n, "state")));
        assert!(prev.is_none(), "corner drawn twice");
    }
    if k <= 6 {
        assert_eq!(at.len(), 1 << k);
    }
    for (name, code) in &c.states {
        assert!(at[code].2, "state {name} is a filled corner");
    }
    let filled = at.values().filter(|v| v.2).count();
    assert_eq!(filled, c.states.len());
    let mut edges = 0;
    for e in doc.descendants().filter(|n| has_class(n, "edge")) {
        let (a, b) = (
            e.attribute("data-a").unwrap(),
            e.attribute("data-b").unwrap(),
        );
        let d = a.chars().zip(b.chars()).filter(|(x, y)| x != y).count();
        assert_eq!(d, 1, "edge {a}-{b}");
        assert!((at[a].0 - num(e, "x1")).abs() < 0.06 && (at[a].1 - num(e, "y1")).abs() < 0.06);
        assert!((at[b].0 - num(e, "x2")).abs() < 0.06 && (at[b].1 - num(e, "y2")).abs() < 0.06);
        edges += 1;
    }
    if (1..=6).contains(&k) {
        assert_eq!(edges, k << (k - 1));
    }
    let crit = c
        .transitions
        .iter()
        .filter(|t| t.critical_order.is_some())
        .count();
    assert_eq!(
        doc.descendants().filter(|n| has_class(n, "order")).count(),
        crit
    );
}

// ---------------------------------------------------------------- DOT reader

#[derive(Debug, PartialEq)]
enum Tok {
    Id(String),
    Sym(&'static str),
}

fn dot_tokens(src: &str) -> Vec<Tok> {
    let ch: Vec<char> = src.chars().collect();
    let mut i = 0;
    let mut out = Vec::new();
    while i < ch.len() {
        let c = ch[i];
        if c.is_whitespace() {
            i += 1;
        } else if c == '/' && ch.get(i + 1) == Some(&'/') || c == '#' {
            while i < ch.len() && ch[i] != '\n' {
                i += 1;
            }
        } else if c == '"' {
            let mut t = String::new();
            i += 1;
            loop {
                assert!(i < ch.len(), "unterminated string");
                match ch[i] {
                    '"' => break,
                    '\\' if matches!(ch.get(i + 1), Some('"') | Some('\\')) => {
                        t.push(ch[i + 1]);
                        i += 2;
                        continue;
                    }
                    '\n' => panic!("raw line break inside a string"),
                    x => t.push(x),
                }
                i += 1;
            }
            i += 1;
            out.push(Tok::Id(t));
        } else if c == '-' && ch.get(i + 1) == Some(&'>') {
            out.push(Tok::Sym("->"));
            i += 2;
        } else if "{}[];,=".contains(c) {
            out.push(Tok::Sym(match c {
                '{' => "{",
                '}' => "}",
                '[' => "[",
                ']' => "]",
                ';' => ";",
                ',' => ",",
                _ => "=",
            }));
            i += 1;
        } else if c.is_alphanumeric() || c == '_' || c == '.' {
            let st = i;
            while i < ch.len() && (ch[i].is_alphanumeric() || ch[i] == '_' || ch[i] == '.') {
                i += 1;
            }
            out.push(Tok::Id(ch[st..i].iter().collect()));
        } else {
            panic!("unexpected character {c:?} in DOT");
        }
    }
    out
}

type Attrs = BTreeMap<String, String>;

/// Parsed DOT: graph name, nodes (name -> attributes), edges (from, to, attributes).
struct Dot {
    name: String,
    nodes: BTreeMap<String, Attrs>,
    edges: Vec<(String, String, Attrs)>,
}

fn parse_dot(src: &str) -> Dot {
    let t = dot_tokens(src);
    let mut i = 0;
    let id = |i: &mut usize| -> String {
        match &t[*i] {
            Tok::Id(s) => {
                *i += 1;
                s.clone()
            }
            other => panic!("expected an identifier, found {other:?}"),
        }
    };
    assert_eq!(id(&mut i), "digraph");
    let name = id(&mut i);
    assert_eq!(t[i], Tok::Sym("{"));
    i += 1;
    let attrs = |i: &mut usize| -> Attrs {
        let mut a = Attrs::new();
        if t.get(*i) == Some(&Tok::Sym("[")) {
            *i += 1;
            while t[*i] != Tok::Sym("]") {
                let k = id(i);
                assert_eq!(t[*i], Tok::Sym("="));
                *i += 1;
                let v = id(i);
                a.insert(k, v);
                if t[*i] == Tok::Sym(",") || t[*i] == Tok::Sym(";") {
                    *i += 1;
                }
            }
            *i += 1;
        }
        a
    };
    let mut nodes = BTreeMap::new();
    let mut edges = Vec::new();
    while t[i] != Tok::Sym("}") {
        let first = id(&mut i);
        if ["graph", "node", "edge"].contains(&first.as_str()) && t[i] == Tok::Sym("[") {
            attrs(&mut i);
        } else if t[i] == Tok::Sym("->") {
            let mut chain = vec![first];
            while t[i] == Tok::Sym("->") {
                i += 1;
                chain.push(id(&mut i));
            }
            let a = attrs(&mut i);
            for w in chain.windows(2) {
                nodes.entry(w[0].clone()).or_insert_with(Attrs::new);
                nodes.entry(w[1].clone()).or_insert_with(Attrs::new);
                edges.push((w[0].clone(), w[1].clone(), a.clone()));
            }
        } else {
            let a = attrs(&mut i);
            nodes.entry(first).or_insert_with(Attrs::new).extend(a);
        }
        assert_eq!(t[i], Tok::Sym(";"), "statements end with ;");
        i += 1;
    }
    assert_eq!(i + 1, t.len(), "nothing after the closing brace");
    Dot { name, nodes, edges }
}

fn dot_program_accepts(dot: &str) {
    use std::io::Write;
    use std::process::{Command, Stdio};
    let Ok(mut child) = Command::new("dot")
        .arg("-Tsvg")
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
    else {
        eprintln!("graphviz `dot` not installed: skipping its check");
        return;
    };
    child
        .stdin
        .take()
        .unwrap()
        .write_all(dot.as_bytes())
        .unwrap();
    let out = child.wait_with_output().unwrap();
    assert!(
        out.status.success(),
        "dot -Tsvg refused: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    let svg = String::from_utf8(out.stdout).unwrap();
    let opt = roxmltree::ParsingOptions {
        allow_dtd: true,
        ..Default::default()
    };
    roxmltree::Document::parse_with_options(&svg, opt).expect("dot's SVG parses");
}

// ---------------------------------------------------------------- tests

#[test]
fn cube_pictures_parse_render_and_read_back() {
    for (name, c) in [
        ("cube_ring4", ring_cube()),
        ("cube_controller5", controller_cube()),
        (
            "cube_k1",
            CodeCube {
                vars: vec![s("y1")],
                states: vec![(s("P"), s("0")), (s("Q"), s("1"))],
                transitions: vec![arrow("1", "P", "Q", None)],
            },
        ),
        ("cube_k4", cube_k(4)),
        ("cube_k5", cube_k(5)),
        ("cube_k6", cube_k(6)),
    ] {
        let svg = code_cube_svg(&c);
        check_svg(&svg, name);
        read_back_cube(&c, &svg);
    }
}

#[test]
fn cube_projection_beyond_six_variables() {
    let c = cube_k(8);
    let svg = code_cube_svg(&c);
    check_svg(&svg, "cube_k8");
    let doc = roxmltree::Document::parse(&svg).unwrap();
    // Drawn: the 5 used codes and the codes of the bad order not already used.
    let corners: Vec<&str> = doc
        .descendants()
        .filter_map(|n| n.attribute("data-code"))
        .collect();
    assert_eq!(corners.len(), 5 + 2);
    for e in doc.descendants().filter(|n| has_class(n, "edge")) {
        let (a, b) = (
            e.attribute("data-a").unwrap(),
            e.attribute("data-b").unwrap(),
        );
        assert_eq!(a.chars().zip(b.chars()).filter(|(x, y)| x != y).count(), 1);
    }
    assert!(svg.contains("projection for 8 variables"));

    // One-hot codes for 8 states: one column of weight-1 codes, no unit-distance pairs.
    let one_hot = CodeCube {
        vars: (1..=8).map(|i| format!("y{i}")).collect(),
        states: (0..8)
            .map(|i| {
                (
                    format!("Q{i}"),
                    (0..8).map(|b| if b == i { '1' } else { '0' }).collect(),
                )
            })
            .collect(),
        transitions: (0..8)
            .map(|i| arrow("go", &format!("Q{i}"), &format!("Q{}", (i + 1) % 8), None))
            .collect(),
    };
    let svg = code_cube_svg(&one_hot);
    check_svg(&svg, "cube_onehot8");
    let doc = roxmltree::Document::parse(&svg).unwrap();
    assert_eq!(
        doc.descendants().filter(|n| has_class(n, "state")).count(),
        8
    );
    assert_eq!(
        doc.descendants().filter(|n| has_class(n, "edge")).count(),
        0
    );
}

#[test]
fn critical_race_is_highlighted_with_its_order() {
    let svg = code_cube_svg(&controller_cube());
    let doc = roxmltree::Document::parse(&svg).unwrap();
    let crit: Vec<_> = doc
        .descendants()
        .filter(|n| has_class(n, "critical"))
        .collect();
    assert_eq!(crit.len(), 1);
    assert_eq!(crit[0].attribute("data-from"), Some("001"));
    assert_eq!(crit[0].attribute("data-to"), Some("110"));
    assert!(crit[0].attribute("stroke-dasharray").is_some());
    let order = doc.descendants().find(|n| has_class(n, "order")).unwrap();
    assert_eq!(order.attribute("data-codes"), Some("001 011"));
    // The multi-bit transitions shade their sub-cubes: Idle->Fire 000->011, Fire->Hold
    // 011->110 (2 bits each) and Arm->Hold 001->110 (3 bits).
    let shades = doc
        .descendants()
        .find(|n| has_class(n, "subcubes"))
        .unwrap();
    assert_eq!(
        shades
            .children()
            .filter(|n| n.has_tag_name("polygon"))
            .count(),
        3
    );
}

#[test]
fn map_pictures_parse_render_and_read_back() {
    let one = map_of("g", vars(&["a"]), &["1"], &[], &[]);
    let two = map_of("h", vars(&["p", "q"]), &["-1"], &[2], &["-1"]);
    let zero = KMap {
        name: s("k"),
        vars: vec![],
        values: vec![Some(true)],
        products: vec![s("")],
        required: vec![],
    };
    for (name, m) in [
        ("map_0", zero),
        ("map_1", one),
        ("map_2", two),
        ("map_3", map3()),
        ("map_4", map4()),
        ("map_5", map5()),
        ("map_6", map6()),
    ] {
        let svg = kmap_svg(&m).unwrap();
        check_svg(&svg, name);
        read_back_map(&m, &svg);
    }
}

#[test]
fn map_errors_name_the_map() {
    let mut m = map3();
    m.vars.push(s("d"));
    m.vars.extend(vars(&["e", "f", "g"]));
    assert_eq!(
        kmap_svg(&m).unwrap_err(),
        PictureError::TooManyVars {
            name: s("f"),
            vars: 7
        }
    );
    let mut m = map3();
    m.products.push(s("1"));
    assert_eq!(
        kmap_svg(&m).unwrap_err().to_string(),
        "map f: product 2 \"1\" is not a cube over 3 variables (one of 0, 1, - per variable)"
    );
}

#[test]
fn flow_graph_pictures_parse_and_render() {
    for (name, g) in [
        ("flow_ring4", ring_graph()),
        ("flow_controller5", controller_graph()),
        ("flow_wide10", wide_graph()),
        (
            "flow_single",
            FlowGraph {
                name: s("one"),
                states: vec![s("S")],
                reset: None,
                edges: vec![],
                stable: vec![(s("S"), s("0"))],
            },
        ),
    ] {
        let svg = flow_graph_svg(&g);
        check_svg(&svg, name);
        let doc = roxmltree::Document::parse(&svg).unwrap();
        // Parallel edges merged: one path per (from, to) pair, labels list the columns.
        let mut pairs: Vec<(&str, &str)> = g
            .edges
            .iter()
            .filter(|e| e.0 != e.1)
            .map(|e| (e.0.as_str(), e.1.as_str()))
            .collect();
        pairs.sort_unstable();
        pairs.dedup();
        assert_eq!(
            doc.descendants().filter(|n| has_class(n, "edge")).count(),
            pairs.len()
        );
        for (a, b, col) in &g.edges {
            let path = doc
                .descendants()
                .find(|n| {
                    has_class(n, "edge")
                        && n.attribute("data-from") == Some(a)
                        && n.attribute("data-to") == Some(b)
                })
                .unwrap();
            let label = path.next_sibling_element().unwrap();
            assert!(label.text().unwrap().split(", ").any(|c| c == col));
        }
        let nodes = doc.descendants().filter(|n| has_class(n, "node")).count();
        assert_eq!(nodes, g.states.len());
        if let Some(r) = &g.reset {
            let reset = doc.descendants().find(|n| has_class(n, "reset")).unwrap();
            assert_eq!(reset.attribute("data-name"), Some(r.as_str()));
        }
    }
}

#[test]
fn names_are_escaped() {
    let g = controller_graph();
    let svg = flow_graph_svg(&g);
    assert!(svg.contains("controller &lt;5&gt; &amp; co"));
    roxmltree::Document::parse(&svg).unwrap();
    let c = CodeCube {
        vars: vec![s("y<1>"), s("y&2")],
        states: vec![(s("\"A\""), s("00")), (s("B'"), s("11"))],
        transitions: vec![arrow("x<y", "\"A\"", "B'", Some(&["01"]))],
    };
    check_svg(&code_cube_svg(&c), "cube_escaped");
    let m = map_of("Y<&>", vars(&["a\"", "b'"]), &["1-"], &[], &[]);
    check_svg(&kmap_svg(&m).unwrap(), "map_escaped");
}

#[test]
fn dot_output_parses_back() {
    for g in [ring_graph(), controller_graph()] {
        let text = flow_graph_dot(&g);
        let d = parse_dot(&text);
        assert_eq!(d.name, g.name);
        for st in &g.states {
            assert!(d.nodes.contains_key(st), "node {st}");
        }
        let reset = g.reset.as_ref().unwrap();
        assert_eq!(
            d.nodes[reset].get("shape").map(String::as_str),
            Some("doublecircle")
        );
        assert!(d
            .edges
            .iter()
            .any(|(a, b, at)| a == "reset" && b == reset && at["label"] == "reset"));
        for (a, b, col) in &g.edges {
            let e = d
                .edges
                .iter()
                .find(|(x, y, at)| x == a && y == b && !at.contains_key("style"))
                .unwrap();
            assert!(
                e.2["label"].split(", ").any(|c| c == col),
                "{a}->{b} in {col}"
            );
        }
        for (st, col) in &g.stable {
            let e = d
                .edges
                .iter()
                .find(|(x, y, at)| {
                    x == st && y == st && at.get("style").map(String::as_str) == Some("dotted")
                })
                .unwrap();
            assert!(e.2["label"]
                .trim_start_matches("stable: ")
                .split(", ")
                .any(|c| c == col));
        }
        dot_program_accepts(&text);
    }
}

#[test]
fn dot_quotes_awkward_names() {
    let g = FlowGraph {
        name: s("g \"q\""),
        states: vec![
            s("a\"b"),
            s("back\\slash"),
            s("two\nlines"),
            s("->"),
            s("{x}"),
        ],
        reset: None,
        edges: vec![
            (s("a\"b"), s("->"), s("0;1")),
            (s("{x}"), s("back\\slash"), s("]")),
        ],
        stable: vec![(s("two\nlines"), s("=")), (s("ghost"), s("1"))],
    };
    let text = flow_graph_dot(&g);
    let d = parse_dot(&text);
    assert_eq!(d.name, "g \"q\"");
    for st in ["a\"b", "back\\slash", "two\\nlines", "->", "{x}", "ghost"] {
        assert!(d.nodes.contains_key(st), "node {st:?} in {text}");
    }
    assert_eq!(
        d.nodes["ghost"].get("style").map(String::as_str),
        Some("dashed")
    );
    dot_program_accepts(&text);
}

#[test]
fn write_all_writes_one_file_per_picture() {
    let dir = tempfile::tempdir().unwrap();
    let maps = [
        map3(),
        map4(),
        map_of("Y1", vars(&["a"]), &["1"], &[], &[]),
        map_of("a/b", vars(&["a"]), &["0"], &[], &[]),
    ];
    let paths = write_all(dir.path(), &controller_cube(), &maps, &controller_graph()).unwrap();
    let names: Vec<String> = paths
        .iter()
        .map(|p| p.file_name().unwrap().to_string_lossy().into_owned())
        .collect();
    assert_eq!(
        names,
        [
            "cube.svg",
            "map_f.svg",
            "map_Y1.svg",
            "map_Y1_2.svg",
            "map_a_b.svg",
            "flow.svg",
            "flow.dot"
        ]
    );
    for p in &paths {
        let text = std::fs::read_to_string(p).unwrap();
        if p.extension().unwrap() == "svg" {
            roxmltree::Document::parse(&text).unwrap();
        } else {
            parse_dot(&text);
        }
    }
    let mut bad = map3();
    bad.values.clear();
    let e = write_all(dir.path(), &controller_cube(), &[bad], &controller_graph()).unwrap_err();
    assert_eq!(e.kind(), std::io::ErrorKind::InvalidInput);
    assert!(e.to_string().contains("map f"));
}

#[test]
fn output_is_deterministic() {
    assert_eq!(
        code_cube_svg(&controller_cube()),
        code_cube_svg(&controller_cube())
    );
    assert_eq!(kmap_svg(&map6()).unwrap(), kmap_svg(&map6()).unwrap());
    assert_eq!(
        flow_graph_svg(&controller_graph()),
        flow_graph_svg(&controller_graph())
    );
}

#[test]
fn golden_pictures() {
    golden("cube_ring4.svg", &code_cube_svg(&ring_cube()));
    golden("cube_controller5.svg", &code_cube_svg(&controller_cube()));
    golden("map_f.svg", &kmap_svg(&map3()).unwrap());
    golden("map_Y1.svg", &kmap_svg(&map4()).unwrap());
    golden("flow_ring4.svg", &flow_graph_svg(&ring_graph()));
    golden("flow_ring4.dot", &flow_graph_dot(&ring_graph()));
}
