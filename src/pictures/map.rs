//! Karnaugh-style maps of one function over at most 6 variables.
//!
//! Layout: up to 4 variables form one map with the first `n/2` (rounded down) variables
//! on the rows and the rest on the columns, both in reflected Gray order (`00 01 11 10`),
//! so neighbouring cells (including across the wrap-around edges) differ in one
//! variable. With 5 variables the first selects one of two 4-variable sub-maps drawn
//! side by side; with 6 the first two select one of four sub-maps in a 2×2 grid (first
//! variable down, second across), so neighbouring sub-maps also differ in one variable.
//! A product that wraps around an edge is drawn as split rectangles whose wrapping
//! sides run past the edge of the map; a product free in a sub-map variable is outlined
//! in each sub-map it covers.

use super::svg::{esc, halo, palette, stroke, text_width, Svg};
use super::{KMap, PictureError};
use std::fmt::Write as _;

const CELL: f64 = 46.0;
const LEFT: f64 = 64.0; // room for row labels left of a grid
const TOP: f64 = 58.0; // room for column labels above a grid
const SUB_TITLE: f64 = 22.0; // sub-map title above its label area
const GAP: f64 = 34.0; // between sub-maps
const MARGIN: f64 = 18.0;
const HEADER: f64 = 50.0; // picture title and variable line

/// Draw `m` as an SVG map. Errors if `m.vars` has more than 6 variables, `m.values` does
/// not have `2^n` entries, or a product or required cube is not a cube string over
/// `m.vars`.
///
/// ```
/// use stillpoint::pictures::{kmap_svg, KMap};
/// let m = KMap {
///     name: "Y1".into(),
///     vars: vec!["x".into(), "y1".into()],
///     values: vec![Some(false), Some(true), None, Some(true)],
///     products: vec!["-1".into()],
///     required: vec!["-1".into()],
/// };
/// assert!(kmap_svg(&m)?.contains("Y1"));
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn kmap_svg(m: &KMap) -> Result<String, PictureError> {
    let nv = m.vars.len();
    if nv > super::MAX_MAP_VARS {
        return Err(PictureError::TooManyVars {
            name: m.name.clone(),
            vars: nv,
        });
    }
    let expected = 1usize << nv;
    if m.values.len() != expected {
        return Err(PictureError::ValueCount {
            name: m.name.clone(),
            vars: nv,
            expected,
            got: m.values.len(),
        });
    }
    let products = parse_cubes(m, &m.products, "product")?;
    let required = parse_cubes(m, &m.required, "required cube")?;

    // Split the variables: outer (sub-map selectors), row and column variables.
    let outer = nv.saturating_sub(4);
    let inner = nv - outer;
    let rb = inner / 2;
    let cb = inner - rb;
    let rows = 1usize << rb;
    let cols = 1usize << cb;
    let (grid_r, grid_c) = match outer {
        0 => (1, 1),
        1 => (1, 2),
        _ => (2, 2),
    };
    let block_w = LEFT + cols as f64 * CELL;
    let sub_title = if outer > 0 { SUB_TITLE } else { 0.0 };
    let block_h = sub_title + TOP + rows as f64 * CELL;
    let maps_w = grid_c as f64 * block_w + (grid_c - 1) as f64 * GAP;
    let maps_h = grid_r as f64 * block_h + (grid_r - 1) as f64 * GAP;

    // Legend lines (computed first, to size the canvas).
    let mut legend: Vec<LegendItem> = Vec::new();
    for (i, p) in m.products.iter().enumerate() {
        legend.push(LegendItem::Product(
            i,
            format!("{p}   {}", algebraic(&m.vars, p)),
        ));
    }
    for r in &m.required {
        legend.push(LegendItem::Required(format!(
            "{r}   {}",
            algebraic(&m.vars, r)
        )));
    }
    legend.push(LegendItem::Note(
        "cells: 1 on, 0 off, - don't care; small number = minterm".into(),
    ));
    let legend_w = legend
        .iter()
        .map(|l| 44.0 + text_width(l.text(), 12.0))
        .fold(0.0, f64::max);
    let title = format!("Map of {}", m.name);
    let varline = var_line(m, outer, rb);
    let width = (2.0 * MARGIN
        + maps_w
            .max(legend_w)
            .max(text_width(&title, 16.0))
            .max(text_width(&varline, 12.0)))
    .max(220.0);
    let legend_top = MARGIN + HEADER + maps_h + 30.0;
    let height = legend_top + 18.0 + legend.len() as f64 * 20.0 + MARGIN;

    let mut s = Svg::new();
    s.def(&format!(
        "<pattern id=\"kmap-hatch\" patternUnits=\"userSpaceOnUse\" width=\"6\" height=\"6\" patternTransform=\"rotate(45)\"><line x1=\"0\" y1=\"0\" x2=\"0\" y2=\"6\" stroke=\"{}\" stroke-width=\"1.6\"/></pattern>",
        palette::HATCH
    ));
    s.text(
        MARGIN,
        MARGIN + 16.0,
        &title,
        &format!(
            "class=\"title\" font-size=\"16\" font-weight=\"bold\" fill=\"{}\"",
            palette::INK
        ),
    );
    s.text(
        MARGIN,
        MARGIN + 36.0,
        &varline,
        &format!("fill=\"{}\"", palette::MUTED),
    );

    for sr in 0..grid_r {
        for sc in 0..grid_c {
            // Outer bits: with one outer variable it is the sub-map column; with two,
            // the first is the sub-map row and the second the column.
            let outer_bits: Vec<u8> = match outer {
                0 => vec![],
                1 => vec![sc as u8],
                _ => vec![sr as u8, sc as u8],
            };
            let bx = MARGIN + sc as f64 * (block_w + GAP);
            let by = MARGIN + HEADER + sr as f64 * (block_h + GAP);
            let gx = bx + LEFT;
            let gy = by + sub_title + TOP;
            let outer_str: String = outer_bits.iter().map(|b| char::from(b'0' + b)).collect();
            let _ = writeln!(
                s.body_mut(),
                "<g class=\"submap\" data-outer=\"{outer_str}\">"
            );
            if outer > 0 {
                let label: Vec<String> = (0..outer)
                    .map(|i| format!("{}={}", m.vars[i], outer_bits[i]))
                    .collect();
                s.text(
                    bx,
                    by + 14.0,
                    &label.join(", "),
                    &format!(
                        "class=\"sublab\" font-weight=\"bold\" fill=\"{}\"",
                        palette::INK
                    ),
                );
            }
            draw_grid(
                &mut s,
                m,
                outer,
                rb,
                cb,
                &outer_bits,
                gx,
                gy,
                &required,
                &products,
            );
            s.raw("</g>");
        }
    }

    // Legend.
    s.raw("<g class=\"legend\">");
    s.text(
        MARGIN,
        legend_top,
        "Legend",
        &format!("font-weight=\"bold\" fill=\"{}\"", palette::INK),
    );
    for (i, item) in legend.iter().enumerate() {
        let y = legend_top + 18.0 + i as f64 * 20.0;
        let sw_x = MARGIN;
        match item {
            LegendItem::Product(p, _) => {
                let (c, d, w) = product_style(*p);
                s.rect(
                    sw_x,
                    y - 11.0,
                    32.0,
                    14.0,
                    &format!("rx=\"5\" fill=\"none\" {}", stroke(c, w, d)),
                );
            }
            LegendItem::Required(_) => {
                s.rect(
                    sw_x,
                    y - 11.0,
                    32.0,
                    14.0,
                    &format!(
                        "fill=\"url(#kmap-hatch)\" {}",
                        stroke(palette::HATCH, 1.2, "2 2")
                    ),
                );
            }
            LegendItem::Note(_) => {}
        }
        let label = match item {
            LegendItem::Product(p, t) => format!("product {}: {t}", p + 1),
            LegendItem::Required(t) => format!("required transition cube: {t}"),
            LegendItem::Note(t) => t.clone(),
        };
        s.text(
            sw_x + 42.0,
            y,
            &label,
            &format!("fill=\"{}\"", palette::INK),
        );
    }
    s.raw("</g>");
    Ok(s.finish(width, height, &title))
}

enum LegendItem {
    Product(usize, String),
    Required(String),
    Note(String),
}

impl LegendItem {
    fn text(&self) -> &str {
        match self {
            LegendItem::Product(_, t) | LegendItem::Required(t) | LegendItem::Note(t) => t,
        }
    }
}

fn product_style(i: usize) -> (&'static str, &'static str, f64) {
    palette::PRODUCT_STYLES[i % palette::PRODUCT_STYLES.len()]
}

/// A cube as per-variable `Some(bit)` or `None` (free).
type Cube = Vec<Option<u8>>;

fn parse_cubes(m: &KMap, list: &[String], what: &'static str) -> Result<Vec<Cube>, PictureError> {
    let nv = m.vars.len();
    list.iter()
        .enumerate()
        .map(|(index, c)| {
            let bad = || PictureError::BadCube {
                name: m.name.clone(),
                what,
                index,
                cube: c.clone(),
                vars: nv,
            };
            if c.chars().count() != nv {
                return Err(bad());
            }
            c.chars()
                .map(|ch| match ch {
                    '0' => Ok(Some(0)),
                    '1' => Ok(Some(1)),
                    '-' => Ok(None),
                    _ => Err(bad()),
                })
                .collect()
        })
        .collect()
}

/// `x1·y2'` style product of a cube string; `1` for the all-free cube. Assumes the cube
/// was validated.
fn algebraic(vars: &[String], cube: &str) -> String {
    let lits: Vec<String> = cube
        .chars()
        .zip(vars)
        .filter_map(|(c, v)| match c {
            '1' => Some(v.clone()),
            '0' => Some(format!("{v}'")),
            _ => None,
        })
        .collect();
    if lits.is_empty() {
        "1".into()
    } else {
        lits.join("·")
    }
}

fn var_line(m: &KMap, outer: usize, rb: usize) -> String {
    let join = |r: std::ops::Range<usize>| -> String {
        if r.is_empty() {
            "none".into()
        } else {
            m.vars[r].join(" ")
        }
    };
    let nv = m.vars.len();
    let mut s = format!(
        "rows: {}   columns: {}",
        join(outer..outer + rb),
        join(outer + rb..nv)
    );
    if outer == 1 {
        let _ = write!(s, "   sub-maps: {}", m.vars[0]);
    } else if outer == 2 {
        let _ = write!(s, "   sub-maps: {} down, {} across", m.vars[0], m.vars[1]);
    }
    s
}

/// Reflected Gray code of `i`.
fn gray(i: usize) -> usize {
    i ^ (i >> 1)
}

/// `bits` low bits of `v`, most significant first.
fn bits_of(v: usize, bits: usize) -> Vec<u8> {
    (0..bits).rev().map(|b| ((v >> b) & 1) as u8).collect()
}

/// Gray positions (0..2^bits) whose code matches the sub-cube `c`.
fn matching_positions(c: &[Option<u8>], bits: usize) -> Vec<usize> {
    (0..1usize << bits)
        .filter(|&p| {
            let g = bits_of(gray(p), bits);
            g.iter().zip(c).all(|(b, cb)| cb.map_or(true, |v| v == *b))
        })
        .collect()
}

/// Split a cyclic interval of positions into linear runs `(start, end, open_start,
/// open_end)`: a run is open on a side where it wraps around the map edge.
fn runs(pos: &[usize], len: usize) -> Vec<(usize, usize, bool, bool)> {
    let mut out: Vec<(usize, usize, bool, bool)> = Vec::new();
    for &p in pos {
        match out.last_mut() {
            Some(r) if r.1 + 1 == p => r.1 = p,
            _ => out.push((p, p, false, false)),
        }
    }
    let full = pos.len() == len;
    if !full && pos.first() == Some(&0) && pos.last() == Some(&(len - 1)) && out.len() > 1 {
        out[0].2 = true;
        let last = out.len() - 1;
        out[last].3 = true;
    }
    out
}

#[allow(clippy::too_many_arguments)]
fn draw_grid(
    s: &mut Svg,
    m: &KMap,
    outer: usize,
    rb: usize,
    cb: usize,
    outer_bits: &[u8],
    gx: f64,
    gy: f64,
    required: &[Cube],
    products: &[Cube],
) {
    let rows = 1usize << rb;
    let cols = 1usize << cb;
    let gw = cols as f64 * CELL;
    let gh = rows as f64 * CELL;
    let row_vars = &m.vars[outer..outer + rb];
    let col_vars = &m.vars[outer + rb..];

    // Corner: diagonal with row variables below-left and column variables above-right.
    s.line(
        gx - LEFT + 6.0,
        gy - TOP + 8.0,
        gx,
        gy,
        &stroke(palette::GRID, 1.0, ""),
    );
    s.text(
        gx - LEFT + 6.0,
        gy - 6.0,
        &row_vars.join(" "),
        &format!(
            "class=\"rowvars\" font-style=\"italic\" fill=\"{}\"",
            palette::INK
        ),
    );
    s.text(
        gx - 4.0,
        gy - TOP + 12.0,
        &col_vars.join(" "),
        &format!(
            "class=\"colvars\" text-anchor=\"end\" font-style=\"italic\" fill=\"{}\"",
            palette::INK
        ),
    );

    // Gray labels.
    for c in 0..cols {
        let lab: String = bits_of(gray(c), cb)
            .iter()
            .map(|b| char::from(b'0' + b))
            .collect();
        let x = gx + (c as f64 + 0.5) * CELL;
        s.text(
            x,
            gy - 10.0,
            &lab,
            &format!(
                "class=\"collab\" text-anchor=\"middle\" font-family=\"monospace\" fill=\"{}\"",
                palette::MUTED
            ),
        );
    }
    for r in 0..rows {
        let lab: String = bits_of(gray(r), rb)
            .iter()
            .map(|b| char::from(b'0' + b))
            .collect();
        let y = gy + (r as f64 + 0.5) * CELL + 5.0;
        s.text(
            gx - 10.0,
            y,
            &lab,
            &format!(
                "class=\"rowlab\" text-anchor=\"end\" font-family=\"monospace\" fill=\"{}\"",
                palette::MUTED
            ),
        );
    }

    // Does a cube include this sub-map? Then its row and column runs.
    let pieces = |c: &Cube| -> Vec<(f64, f64, f64, f64, [bool; 4])> {
        if !c[..outer]
            .iter()
            .zip(outer_bits)
            .all(|(cb, b)| cb.map_or(true, |v| v == *b))
        {
            return Vec::new();
        }
        let rr = runs(&matching_positions(&c[outer..outer + rb], rb), rows);
        let cr = runs(&matching_positions(&c[outer + rb..], cb), cols);
        let mut out = Vec::new();
        for &(r0, r1, ro0, ro1) in &rr {
            for &(c0, c1, co0, co1) in &cr {
                out.push((
                    gx + c0 as f64 * CELL,
                    gy + r0 as f64 * CELL,
                    (c1 - c0 + 1) as f64 * CELL,
                    (r1 - r0 + 1) as f64 * CELL,
                    [co0, co1, ro0, ro1], // open: left, right, top, bottom
                ));
            }
        }
        out
    };

    // Required cubes under everything else: hatched fill and a dotted outline.
    for (i, c) in required.iter().enumerate() {
        let _ = writeln!(
            s.body_mut(),
            "<g class=\"required\" data-cube=\"{}\">",
            esc(&m.required[i])
        );
        for (x, y, w, h, _) in pieces(c) {
            s.rect(
                x + 2.0,
                y + 2.0,
                w - 4.0,
                h - 4.0,
                &format!(
                    "fill=\"url(#kmap-hatch)\" fill-opacity=\"0.55\" {}",
                    stroke(palette::HATCH, 1.2, "2 2")
                ),
            );
        }
        s.raw("</g>");
    }

    // Grid.
    for r in 0..=rows {
        let y = gy + r as f64 * CELL;
        let w = if r == 0 || r == rows { 1.6 } else { 1.0 };
        let col = if r == 0 || r == rows {
            palette::INK
        } else {
            palette::GRID
        };
        s.line(gx, y, gx + gw, y, &stroke(col, w, ""));
    }
    for c in 0..=cols {
        let x = gx + c as f64 * CELL;
        let w = if c == 0 || c == cols { 1.6 } else { 1.0 };
        let col = if c == 0 || c == cols {
            palette::INK
        } else {
            palette::GRID
        };
        s.line(x, gy, x, gy + gh, &stroke(col, w, ""));
    }

    // Cells.
    for r in 0..rows {
        for c in 0..cols {
            let mut bits: Vec<u8> = outer_bits.to_vec();
            bits.extend(bits_of(gray(r), rb));
            bits.extend(bits_of(gray(c), cb));
            let minterm = bits.iter().fold(0usize, |a, &b| (a << 1) | b as usize);
            let (txt, fill, weight) = match m.values[minterm] {
                Some(true) => ("1", palette::INK, "bold"),
                Some(false) => ("0", palette::MUTED, "normal"),
                None => ("-", palette::MUTED, "normal"),
            };
            let cx = gx + (c as f64 + 0.5) * CELL;
            let cy = gy + (r as f64 + 0.5) * CELL;
            s.text(
                cx - CELL / 2.0 + 3.0,
                cy - CELL / 2.0 + 10.0,
                &minterm.to_string(),
                &format!(
                    "class=\"minterm\" font-size=\"8\" fill=\"{}\"",
                    palette::MUTED
                ),
            );
            s.text(cx, cy + 5.0, txt, &format!("class=\"cell\" text-anchor=\"middle\" font-size=\"15\" font-weight=\"{weight}\" fill=\"{fill}\" {}", halo()));
        }
    }

    // Products: rounded outlines, inset by index so coinciding products stay apart.
    for (i, c) in products.iter().enumerate() {
        let (colr, dash, width) = product_style(i);
        let inset = 4.0 + (i % 4) as f64 * 3.0;
        let _ = writeln!(
            s.body_mut(),
            "<g class=\"product\" data-cube=\"{}\" fill=\"none\" {}>",
            esc(&m.products[i]),
            stroke(colr, width, dash)
        );
        for (x, y, w, h, open) in pieces(c) {
            let ext = inset + 8.0; // how far a wrapping side runs past the map edge
            let mut x0 = x + inset;
            let mut x1 = x + w - inset;
            let mut y0 = y + inset;
            let mut y1 = y + h - inset;
            if open[0] {
                x0 -= ext;
            }
            if open[1] {
                x1 += ext;
            }
            if open[2] {
                y0 -= ext;
            }
            if open[3] {
                y1 += ext;
            }
            s.rect(x0, y0, x1 - x0, y1 - y0, "rx=\"9\"");
        }
        s.raw("</g>");
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn map(nv: usize) -> KMap {
        KMap {
            name: "f".into(),
            vars: (0..nv).map(|i| format!("v{i}")).collect(),
            values: (0..1usize << nv).map(|i| Some(i % 3 == 0)).collect(),
            products: vec![],
            required: vec![],
        }
    }

    #[test]
    fn gray_order_is_reflected() {
        // Reflected binary code, common practice, no source.
        let g: Vec<usize> = (0..8).map(gray).collect();
        assert_eq!(g, vec![0, 1, 3, 2, 6, 7, 5, 4]);
    }

    #[test]
    fn wrapping_runs_are_split_and_open() {
        // Second of two Gray bits = 0: positions 0 (00) and 3 (10).
        let p = matching_positions(&[None, Some(0)], 2);
        assert_eq!(p, vec![0, 3]);
        assert_eq!(runs(&p, 4), vec![(0, 0, true, false), (3, 3, false, true)]);
        let q = matching_positions(&[None, Some(1)], 2);
        assert_eq!(runs(&q, 4), vec![(1, 2, false, false)]);
        let all = matching_positions(&[None, None], 2);
        assert_eq!(runs(&all, 4), vec![(0, 3, false, false)]);
    }

    #[test]
    fn errors_are_reported() {
        let mut m = map(7);
        assert!(matches!(
            kmap_svg(&m),
            Err(PictureError::TooManyVars { vars: 7, .. })
        ));
        m = map(3);
        m.values.pop();
        let e = kmap_svg(&m).unwrap_err();
        assert_eq!(
            e.to_string(),
            "map f: 7 values given, but 3 variables need 8"
        );
        m = map(3);
        m.products = vec!["1-".into()];
        assert!(matches!(
            kmap_svg(&m),
            Err(PictureError::BadCube { index: 0, .. })
        ));
        m.products = vec!["1-x".into()];
        assert!(kmap_svg(&m).is_err());
        m.products = vec![];
        m.required = vec!["---".into(), "0101".into()];
        assert!(matches!(
            kmap_svg(&m),
            Err(PictureError::BadCube {
                what: "required cube",
                index: 1,
                ..
            })
        ));
    }

    #[test]
    fn every_size_draws() {
        for nv in 0..=6 {
            let mut m = map(nv);
            m.products = vec!["-".repeat(nv)];
            let svg = kmap_svg(&m).unwrap();
            assert_eq!(svg.matches("class=\"cell\"").count(), 1 << nv, "{nv} vars");
        }
    }

    #[test]
    fn algebraic_form() {
        let v: Vec<String> = vec!["a".into(), "b".into(), "c".into()];
        assert_eq!(algebraic(&v, "1-0"), "a·c'");
        assert_eq!(algebraic(&v, "---"), "1");
    }
}
