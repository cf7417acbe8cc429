//! The code cube: state codes as corners of the `k`-cube, transitions as arrows.
//!
//! Layout for `k <= 6`: every corner is drawn; each variable moves a corner by a fixed
//! vector, so every cube edge is a translate of one of at most six vectors. The last
//! three variables span an inner cube (right, up, and back in oblique projection); a
//! fourth variable (counting from the end) places a second copy to the right, a fifth a
//! copy below, a sixth a copy of the whole further right. So `k = 1` is a segment, `2` a
//! square, `3` a cube, `4` two cubes, `5` four, `6` eight, and Hamming-distance-1 codes
//! are always joined by an edge. For `k > 6` only the used codes (and the codes passed
//! by a bad order) are drawn, in columns by the number of `1` bits; an edge joins two
//! drawn codes at Hamming distance 1, so unit-distance neighbours stay adjacent (they
//! are always in neighbouring columns); the order within a column comes from a few
//! barycentre sweeps, ties broken by code value.

use super::svg::{arrow_marker, esc, halo, palette, stroke, text_width, Svg};
use super::CodeCube;
use std::fmt::Write as _;

const UNIT: f64 = 150.0;
const MARGIN: f64 = 28.0;
const NODE_R: f64 = 7.0;
const EMPTY_R: f64 = 5.0;

/// Draw the code cube of `c` as SVG.
///
/// A state whose code is not a `k`-bit string, or a transition or bad-order code that
/// names neither a state nor a `k`-bit code, is not drawn but listed under the legend.
///
/// ```
/// use stillpoint::pictures::{code_cube_svg, CodeCube, CubeArrow};
/// let c = CodeCube {
///     vars: vec!["y1".into(), "y2".into()],
///     states: vec![("A".into(), "00".into()), ("B".into(), "11".into())],
///     transitions: vec![CubeArrow {
///         column: "1".into(),
///         from: "A".into(),
///         to: "B".into(),
///         critical_order: None,
///     }],
/// };
/// let svg = code_cube_svg(&c);
/// assert!(svg.contains("viewBox"));
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn code_cube_svg(c: &CodeCube) -> String {
    let k = c.vars.len();
    let mut notes: Vec<String> = Vec::new();

    // Codes of the states (value with vars[0] as the most significant bit).
    let parse = |s: &str| -> Option<u64> {
        if k > 63 || s.chars().count() != k || !s.chars().all(|ch| ch == '0' || ch == '1') {
            return None;
        }
        Some(
            s.chars()
                .fold(0u64, |a, ch| (a << 1) | u64::from(ch == '1')),
        )
    };
    let mut state_code: Vec<(String, u64)> = Vec::new();
    for (name, code) in &c.states {
        match parse(code) {
            Some(v) => state_code.push((name.clone(), v)),
            None => notes.push(format!(
                "not drawn: state {name} has code \"{code}\", not a {k}-bit code"
            )),
        }
    }
    let resolve = |s: &str| -> Option<u64> {
        state_code
            .iter()
            .find(|(n, _)| n == s)
            .map(|&(_, v)| v)
            .or_else(|| parse(s))
    };

    // Arrows grouped by (from, to); critical orders kept one by one.
    struct Group {
        from: u64,
        to: u64,
        columns: Vec<String>,
        critical: bool,
    }
    let mut groups: Vec<Group> = Vec::new();
    let mut orders: Vec<(String, Vec<u64>)> = Vec::new();
    for t in &c.transitions {
        let (Some(a), Some(b)) = (resolve(&t.from), resolve(&t.to)) else {
            notes.push(format!(
                "not drawn: column {}: {} -> {} (unknown state or code)",
                t.column, t.from, t.to
            ));
            continue;
        };
        if a == b {
            notes.push(format!(
                "not drawn: column {}: {} -> {} stays at code {}",
                t.column,
                t.from,
                t.to,
                bits(a, k)
            ));
            continue;
        }
        let critical = t.critical_order.is_some();
        match groups.iter_mut().find(|g| g.from == a && g.to == b) {
            Some(g) => {
                g.columns.push(t.column.clone());
                g.critical |= critical;
            }
            None => groups.push(Group {
                from: a,
                to: b,
                columns: vec![t.column.clone()],
                critical,
            }),
        }
        if let Some(order) = &t.critical_order {
            let mut path = vec![a];
            let mut ok = true;
            for code in order {
                match parse(code) {
                    Some(v) => {
                        if path.last() != Some(&v) {
                            path.push(v);
                        }
                    }
                    None => {
                        ok = false;
                        notes.push(format!(
                            "not drawn: bad order of column {} from {} passes \"{code}\", not a {k}-bit code",
                            t.column, t.from
                        ));
                    }
                }
            }
            if ok && path.len() > 1 {
                orders.push((t.column.clone(), path));
            }
        }
    }

    // Positions.
    let used: Vec<u64> = {
        let mut u: Vec<u64> = state_code.iter().map(|&(_, v)| v).collect();
        u.sort_unstable();
        u.dedup();
        u
    };
    let (points, edges, axis_text) = if k <= 6 {
        full_layout(k, &c.vars)
    } else {
        projected_layout(k, &used, &orders)
    };
    let pos = |v: u64| -> (f64, f64) {
        points
            .iter()
            .find(|p| p.0 == v)
            .map(|p| (p.1, p.2))
            .unwrap_or((0.0, 0.0))
    };

    // Canvas: shift so the drawing starts at the margin, leave room for labels.
    let (mut minx, mut miny, mut maxx, mut maxy) = (f64::MAX, f64::MAX, f64::MIN, f64::MIN);
    for &(_, x, y) in &points {
        minx = minx.min(x);
        miny = miny.min(y);
        maxx = maxx.max(x);
        maxy = maxy.max(y);
    }
    if points.is_empty() {
        (minx, miny, maxx, maxy) = (0.0, 0.0, 0.0, 0.0);
    }
    let title = if k == 0 {
        "Code cube: no state variables".to_string()
    } else {
        format!(
            "Code cube: {k} state variable{} ({})",
            if k == 1 { "" } else { "s" },
            c.vars.join(" ")
        )
    };
    let header = 48.0;
    let ox = MARGIN + 70.0 - minx;
    let oy = MARGIN + header + 34.0 - miny;
    let draw_w = maxx - minx + 60.0 + 90.0;
    let draw_h = maxy - miny + 24.0 + 52.0;

    let mut legend: Vec<(&'static str, String)> = vec![
        ("state", "state: name and code beside the corner".into()),
        (
            "empty",
            if k <= 6 {
                "unused code".into()
            } else {
                "unused code passed by a bad order".into()
            },
        ),
        (
            "arrow",
            "transition, labelled with its input columns".into(),
        ),
    ];
    if k <= 6 {
        legend.push(("shade", "sub-cube passed by a multi-bit transition".into()));
    }
    legend.push(("critical", "transition with a critical race".into()));
    legend.push(("order", "bad order of bit changes (codes passed)".into()));
    legend.push(("text", axis_text));
    for nt in &notes {
        legend.push(("text", nt.clone()));
    }
    let legend_w = legend
        .iter()
        .map(|(_, t)| 50.0 + text_width(t, 12.0))
        .fold(0.0, f64::max);
    let width = (2.0 * MARGIN + draw_w.max(legend_w).max(text_width(&title, 16.0))).max(260.0);
    let legend_top = MARGIN + header + draw_h + 16.0;
    let height = legend_top + 18.0 + legend.len() as f64 * 20.0 + MARGIN;

    let mut s = Svg::new();
    s.def(&arrow_marker("cube-arrow", palette::INK));
    s.def(&arrow_marker("cube-arrow-critical", palette::CRITICAL));
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
        &format!(
            "{} state{}, {} transition arrow{}",
            state_code.len(),
            plural(state_code.len()),
            groups.len(),
            plural(groups.len())
        ),
        &format!("fill=\"{}\"", palette::MUTED),
    );
    let at = |v: u64| -> (f64, f64) {
        let (x, y) = pos(v);
        (x + ox, y + oy)
    };

    // Sub-cube shading (only where every corner is drawn).
    if k <= 6 {
        s.raw("<g class=\"subcubes\">");
        for g in &groups {
            let diff = g.from ^ g.to;
            if diff.count_ones() < 2 {
                continue;
            }
            let pts: Vec<(f64, f64)> = subcube(g.from, diff).into_iter().map(at).collect();
            let hull = convex_hull(pts);
            s.polygon(&hull, &format!("fill=\"{}\" fill-opacity=\"0.55\" stroke=\"{}\" stroke-width=\"1\" stroke-opacity=\"0.8\"", palette::SHADE, palette::SHADE));
        }
        s.raw("</g>");
    }

    // Cube edges.
    s.raw(&format!(
        "<g class=\"edges\" {}>",
        stroke(palette::GRID, 1.2, "")
    ));
    for &(a, b) in &edges {
        let (x1, y1) = at(a);
        let (x2, y2) = at(b);
        let _ = writeln!(
            s.body_mut(),
            "<line class=\"edge\" data-a=\"{}\" data-b=\"{}\" x1=\"{}\" y1=\"{}\" x2=\"{}\" y2=\"{}\"{}/>",
            bits(a, k),
            bits(b, k),
            super::svg::n(x1),
            super::svg::n(y1),
            super::svg::n(x2),
            super::svg::n(y2),
            // An edge between two inner 3-cubes (a leading variable changes) is dashed.
            if k > 3 && k <= 6 && (a ^ b) >= 8 { " stroke-dasharray=\"3 4\" stroke-opacity=\"0.6\"" } else { "" }
        );
    }
    s.raw("</g>");

    // Bad orders, under the arrows.
    s.raw("<g class=\"orders\">");
    for (col, path) in &orders {
        let pts: Vec<(f64, f64)> = path.iter().map(|&v| at(v)).collect();
        let pts = shorten_last(&pts, NODE_R + 3.0);
        let codes: Vec<String> = path.iter().map(|&v| bits(v, k)).collect();
        let _ = writeln!(
            s.body_mut(),
            "<polyline class=\"order\" data-column=\"{}\" data-codes=\"{}\" points=\"{}\" fill=\"none\" {} stroke-linecap=\"round\" stroke-linejoin=\"round\" stroke-opacity=\"0.75\" marker-end=\"url(#cube-arrow-critical)\"/>",
            esc(col),
            codes.join(" "),
            super::svg::points(&pts),
            stroke(palette::CRITICAL, 4.0, "0.5 6")
        );
    }
    s.raw("</g>");

    // Arrows.
    s.raw("<g class=\"arrows\">");
    for g in &groups {
        let (x1, y1) = at(g.from);
        let (x2, y2) = at(g.to);
        let (dx, dy) = (x2 - x1, y2 - y1);
        let len = (dx * dx + dy * dy).sqrt();
        if len < 1e-6 {
            continue;
        }
        let (ux, uy) = (dx / len, dy / len);
        let (nx, ny) = (-uy * 4.0, ux * 4.0); // to the right, so opposite arrows part
        let pad = NODE_R + 3.0;
        let (ax, ay) = (x1 + ux * pad + nx, y1 + uy * pad + ny);
        let (bx, by) = (x2 - ux * pad + nx, y2 - uy * pad + ny);
        let (colr, w, dash, marker) = if g.critical {
            (
                palette::CRITICAL,
                2.6,
                palette::CRITICAL_DASH,
                "cube-arrow-critical",
            )
        } else {
            (palette::INK, 1.8, "", "cube-arrow")
        };
        let _ = writeln!(
            s.body_mut(),
            "<line class=\"arrow{}\" data-from=\"{}\" data-to=\"{}\" x1=\"{}\" y1=\"{}\" x2=\"{}\" y2=\"{}\" {} marker-end=\"url(#{marker})\"/>",
            if g.critical { " critical" } else { "" },
            bits(g.from, k),
            bits(g.to, k),
            super::svg::n(ax),
            super::svg::n(ay),
            super::svg::n(bx),
            super::svg::n(by),
            stroke(colr, w, dash)
        );
        // Label at the middle, on the arrow's right side, clear of the stroke.
        let label = g.columns.join(", ");
        let push = 6.0 + text_width(&label, 11.0) * 0.5 * uy.abs();
        let (lx, ly) = (
            (ax + bx) / 2.0 - uy * push,
            (ay + by) / 2.0 + ux * 9.0 + 4.0,
        );
        s.text(lx, ly, &label, &format!("class=\"arrowlab\" text-anchor=\"middle\" font-size=\"11\" font-style=\"italic\" fill=\"{colr}\" {}", halo()));
    }
    s.raw("</g>");

    // Corners, each labelled on the side facing away from the centre of its own
    // 3-cube, so labels fall outside the drawing rather than on its edges.
    let group_of = |v: u64| if k > 3 && k <= 6 { v >> 3 } else { 0 }; // a 3-cube, or all
    let mut centres: Vec<(u64, f64, f64, f64)> = Vec::new(); // group, sum x, sum y, count
    for &(v, x, y) in &points {
        let gk = group_of(v);
        match centres.iter_mut().find(|c| c.0 == gk) {
            Some(c) => {
                c.1 += x;
                c.2 += y;
                c.3 += 1.0;
            }
            None => centres.push((gk, x, y, 1.0)),
        }
    }
    s.raw("<g class=\"corners\">");
    for &(v, px, py) in &points {
        let (x, y) = at(v);
        let (ux, uy) = {
            let c = centres
                .iter()
                .find(|c| c.0 == group_of(v))
                .copied()
                .unwrap_or((0, px, py, 1.0));
            let (dx, dy) = (px - c.1 / c.3, py - c.2 / c.3);
            let len = (dx * dx + dy * dy).sqrt();
            if len < 1.0 {
                (0.0, -1.0)
            } else {
                (dx / len, dy / len)
            }
        };
        let anchor = if ux > 0.35 {
            "start"
        } else if ux < -0.35 {
            "end"
        } else {
            "middle"
        };
        let names: Vec<&str> = state_code
            .iter()
            .filter(|(_, c)| *c == v)
            .map(|(n, _)| n.as_str())
            .collect();
        let code = bits(v, k);
        if names.is_empty() {
            s.circle(
                x,
                y,
                EMPTY_R,
                &format!(
                    "class=\"empty\" data-code=\"{code}\" fill=\"{}\" {}",
                    palette::PAPER,
                    stroke(palette::MUTED, 1.3, "")
                ),
            );
            let (tx, ty) = (x + ux * 9.0, y + uy * 12.0 + 3.5);
            s.text(tx, ty, &code, &format!("class=\"code\" text-anchor=\"{anchor}\" font-size=\"9\" font-family=\"monospace\" fill=\"{}\" {}", palette::MUTED, halo()));
        } else {
            s.circle(
                x,
                y,
                NODE_R,
                &format!(
                    "class=\"state\" data-code=\"{code}\" fill=\"{}\"",
                    palette::INK
                ),
            );
            let d = 12.0 + 8.0 * uy.abs();
            let (tx, by) = (x + ux * 12.0, y + uy * d);
            s.text(tx, by - 1.0, &names.join(", "), &format!("class=\"name\" text-anchor=\"{anchor}\" font-size=\"13\" font-weight=\"bold\" fill=\"{}\" {}", palette::INK, halo()));
            s.text(tx, by + 11.0, &code, &format!("class=\"code\" text-anchor=\"{anchor}\" font-size=\"10\" font-family=\"monospace\" fill=\"{}\" {}", palette::INK, halo()));
        }
    }
    s.raw("</g>");

    // Legend.
    s.raw("<g class=\"legend\">");
    s.text(
        MARGIN,
        legend_top,
        "Legend",
        &format!("font-weight=\"bold\" fill=\"{}\"", palette::INK),
    );
    for (i, (kind, text)) in legend.iter().enumerate() {
        let y = legend_top + 18.0 + i as f64 * 20.0;
        let x = MARGIN;
        let mid = y - 4.0;
        match *kind {
            "state" => s.circle(x + 16.0, mid, NODE_R, &format!("fill=\"{}\"", palette::INK)),
            "empty" => s.circle(
                x + 16.0,
                mid,
                EMPTY_R,
                &format!(
                    "fill=\"{}\" {}",
                    palette::PAPER,
                    stroke(palette::MUTED, 1.3, "")
                ),
            ),
            "arrow" => s.line(
                x,
                mid,
                x + 34.0,
                mid,
                &format!(
                    "{} marker-end=\"url(#cube-arrow)\"",
                    stroke(palette::INK, 1.8, "")
                ),
            ),
            "shade" => s.rect(
                x,
                mid - 7.0,
                34.0,
                14.0,
                &format!(
                    "fill=\"{}\" fill-opacity=\"0.55\" stroke=\"{}\"",
                    palette::SHADE,
                    palette::SHADE
                ),
            ),
            "critical" => s.line(
                x,
                mid,
                x + 34.0,
                mid,
                &format!(
                    "{} marker-end=\"url(#cube-arrow-critical)\"",
                    stroke(palette::CRITICAL, 2.6, palette::CRITICAL_DASH)
                ),
            ),
            "order" => s.polyline(
                &[(x, mid + 5.0), (x + 12.0, mid - 5.0), (x + 30.0, mid - 5.0)],
                &format!(
                    "fill=\"none\" {} stroke-linecap=\"round\" stroke-opacity=\"0.75\"",
                    stroke(palette::CRITICAL, 4.0, "0.5 6")
                ),
            ),
            _ => {}
        }
        let tx = if *kind == "text" { x } else { x + 46.0 };
        s.text(tx, y, text, &format!("fill=\"{}\"", palette::INK));
    }
    s.raw("</g>");
    s.finish(width, height, &title)
}

fn plural(n: usize) -> &'static str {
    if n == 1 {
        ""
    } else {
        "s"
    }
}

/// `v` as `k` bits, the first variable leftmost.
fn bits(v: u64, k: usize) -> String {
    (0..k)
        .rev()
        .map(|b| if (v >> b) & 1 == 1 { '1' } else { '0' })
        .collect()
}

/// All codes of the sub-cube through `base` free in the bits of `diff`.
fn subcube(base: u64, diff: u64) -> Vec<u64> {
    let free: Vec<u32> = (0..64).filter(|b| (diff >> b) & 1 == 1).collect();
    (0..1u64 << free.len())
        .map(|m| {
            let mut v = base & !diff;
            for (i, &b) in free.iter().enumerate() {
                if (m >> i) & 1 == 1 {
                    v |= 1 << b;
                }
            }
            v
        })
        .collect()
}

/// Every corner of the `k`-cube (`k <= 6`) and every cube edge, with the axis key.
#[allow(clippy::type_complexity)]
fn full_layout(k: usize, vars: &[String]) -> (Vec<(u64, f64, f64)>, Vec<(u64, u64)>, String) {
    // Dimension vectors, inner first; SVG y grows downwards.
    let dims: [(f64, f64, &str); 6] = [
        (UNIT, 0.0, "right"),
        (0.0, -UNIT, "up"),
        (0.62 * UNIT, -0.42 * UNIT, "back (oblique)"),
        (2.2 * UNIT, 0.0, "to the cube on the right"),
        (0.0, 2.0 * UNIT, "to the cubes below"),
        (4.4 * UNIT, 0.0, "to the block on the right"),
    ];
    // Variable i (vars[0] = most significant) -> dimension.
    let dim_of = |i: usize| -> usize {
        let inner = k.min(3);
        let outer = k - inner;
        if i < outer {
            3 + (outer - 1 - i)
        } else {
            i - outer
        }
    };
    let mut points = Vec::with_capacity(1 << k);
    for v in 0..1u64 << k {
        let (mut x, mut y) = (0.0, 0.0);
        for i in 0..k {
            if (v >> (k - 1 - i)) & 1 == 1 {
                let d = dims[dim_of(i)];
                x += d.0;
                y += d.1;
            }
        }
        points.push((v, x, y));
    }
    let mut edges = Vec::new();
    for v in 0..1u64 << k {
        for b in 0..k {
            let w = v ^ (1 << b);
            if v < w {
                edges.push((v, w));
            }
        }
    }
    let key: Vec<String> = (0..k)
        .map(|i| format!("{} = 1: {}", vars[i], dims[dim_of(i)].2))
        .collect();
    let axis = if k == 0 {
        "no state variables: a single point".into()
    } else {
        format!(
            "axes: {}{}",
            key.join("; "),
            if k > 3 {
                "; dashed edges join the 3-cubes"
            } else {
                ""
            }
        )
    };
    (points, edges, axis)
}

/// For `k > 6`: the used codes and the codes passed by bad orders, in columns by weight.
#[allow(clippy::type_complexity)]
fn projected_layout(
    k: usize,
    used: &[u64],
    orders: &[(String, Vec<u64>)],
) -> (Vec<(u64, f64, f64)>, Vec<(u64, u64)>, String) {
    let mut codes: Vec<u64> = used.to_vec();
    for (_, p) in orders {
        codes.extend(p.iter().copied());
    }
    codes.sort_unstable();
    codes.dedup();
    let mut edges = Vec::new();
    for (i, &a) in codes.iter().enumerate() {
        for &b in &codes[i + 1..] {
            if (a ^ b).count_ones() == 1 {
                edges.push((a, b));
            }
        }
    }
    // Layers by weight; order within a layer by barycentre sweeps.
    let mut layers: Vec<Vec<u64>> = vec![Vec::new(); k + 1];
    for &c in &codes {
        layers[c.count_ones() as usize].push(c);
    }
    let index_of = |layers: &Vec<Vec<u64>>, c: u64| -> f64 {
        let l = &layers[c.count_ones() as usize];
        l.iter().position(|&x| x == c).unwrap_or(0) as f64
    };
    for sweep in 0..4 {
        let order: Vec<usize> = if sweep % 2 == 0 {
            (1..=k).collect()
        } else {
            (0..k).rev().collect()
        };
        for li in order {
            let nb = if sweep % 2 == 0 {
                li.wrapping_sub(1)
            } else {
                li + 1
            };
            if nb > k {
                continue;
            }
            let mut keyed: Vec<(f64, u64)> = layers[li]
                .iter()
                .map(|&c| {
                    let ns: Vec<f64> = layers[nb]
                        .iter()
                        .filter(|&&d| (c ^ d).count_ones() == 1)
                        .map(|&d| index_of(&layers, d))
                        .collect();
                    let bc = if ns.is_empty() {
                        index_of(&layers, c)
                    } else {
                        ns.iter().sum::<f64>() / ns.len() as f64
                    };
                    (bc, c)
                })
                .collect();
            keyed.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
            layers[li] = keyed.into_iter().map(|(_, c)| c).collect();
        }
    }
    let col_w = 130.0;
    let row_h = 64.0;
    let tallest = layers.iter().map(Vec::len).max().unwrap_or(0) as f64;
    let mut points = Vec::new();
    let mut x = 0.0;
    for (ci, layer) in layers.iter().filter(|l| !l.is_empty()).enumerate() {
        // Odd columns sit half a row lower, so a straight arrow that skips columns does
        // not run through the corners in between; a column of three or more codes bows
        // to the right on a circular arc, so an arrow inside the column (codes of equal
        // weight are never neighbours) does not run through the codes between its ends.
        let m = layer.len();
        let off = (tallest - m as f64) * row_h / 2.0 + if ci % 2 == 1 { row_h / 2.0 } else { 0.0 };
        let bulge = if m >= 3 {
            row_h * (m - 1) as f64 * 0.3
        } else {
            0.0
        };
        for (i, &c) in layer.iter().enumerate() {
            let t = if m > 1 {
                i as f64 / (m - 1) as f64
            } else {
                0.0
            };
            points.push((
                c,
                x + bulge * (std::f64::consts::PI * t).sin(),
                off + i as f64 * row_h,
            ));
        }
        x += col_w + bulge;
    }
    let axis = format!(
        "projection for {k} variables: used codes only, in columns by number of 1 bits; edges join codes at Hamming distance 1"
    );
    (points, edges, axis)
}

/// Cut the last segment of a polyline short by `by` (so an arrowhead meets a node rim).
fn shorten_last(pts: &[(f64, f64)], by: f64) -> Vec<(f64, f64)> {
    let mut out = pts.to_vec();
    if out.len() >= 2 {
        let (x1, y1) = out[out.len() - 2];
        let (x2, y2) = out[out.len() - 1];
        let (dx, dy) = (x2 - x1, y2 - y1);
        let len = (dx * dx + dy * dy).sqrt();
        if len > by {
            let last = out.len() - 1;
            out[last] = (x2 - dx / len * by, y2 - dy / len * by);
        }
    }
    out
}

/// Convex hull (Andrew's monotone chain), counter-clockwise, without repeated points.
fn convex_hull(mut pts: Vec<(f64, f64)>) -> Vec<(f64, f64)> {
    pts.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.total_cmp(&b.1)));
    pts.dedup();
    if pts.len() < 3 {
        return pts;
    }
    let cross = |o: (f64, f64), a: (f64, f64), b: (f64, f64)| {
        (a.0 - o.0) * (b.1 - o.1) - (a.1 - o.1) * (b.0 - o.0)
    };
    let mut lower: Vec<(f64, f64)> = Vec::new();
    for &p in &pts {
        while lower.len() >= 2 && cross(lower[lower.len() - 2], lower[lower.len() - 1], p) <= 0.0 {
            lower.pop();
        }
        lower.push(p);
    }
    let mut upper: Vec<(f64, f64)> = Vec::new();
    for &p in pts.iter().rev() {
        while upper.len() >= 2 && cross(upper[upper.len() - 2], upper[upper.len() - 1], p) <= 0.0 {
            upper.pop();
        }
        upper.push(p);
    }
    lower.pop();
    upper.pop();
    lower.extend(upper);
    lower
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::pictures::CubeArrow;

    #[test]
    fn full_layout_joins_exactly_unit_distance_pairs() {
        for k in 0..=6 {
            let vars: Vec<String> = (1..=k).map(|i| format!("y{i}")).collect();
            let (pts, edges, _) = full_layout(k, &vars);
            assert_eq!(pts.len(), 1 << k);
            // k-cube has k * 2^(k-1) edges: common practice, no source.
            assert_eq!(edges.len(), if k == 0 { 0 } else { k << (k - 1) });
            assert!(edges.iter().all(|&(a, b)| (a ^ b).count_ones() == 1));
            // Distinct corners get distinct positions.
            for (i, a) in pts.iter().enumerate() {
                for b in &pts[i + 1..] {
                    assert!((a.1 - b.1).abs() + (a.2 - b.2).abs() > 10.0, "k={k}");
                }
            }
        }
    }

    #[test]
    fn projection_keeps_neighbours_in_adjacent_columns() {
        let used = [0u64, 1, 3, 7, 0xff, 0x80];
        let (pts, edges, _) = projected_layout(8, &used, &[]);
        assert_eq!(pts.len(), used.len());
        // Columns are placed left to right by weight, and a neighbour pair differs in
        // weight by one, so its two codes sit in neighbouring columns.
        let xs = |c: u64| pts.iter().find(|p| p.0 == c).unwrap().1;
        for &(a, b) in &edges {
            let (lo, hi) = if a.count_ones() < b.count_ones() {
                (a, b)
            } else {
                (b, a)
            };
            assert_eq!(hi.count_ones(), lo.count_ones() + 1);
            assert!(xs(hi) > xs(lo));
            assert!(!pts
                .iter()
                .any(|p| p.0.count_ones() > lo.count_ones() && p.0.count_ones() < hi.count_ones()));
        }
        assert_eq!(edges.len(), 4); // 0-1, 1-3, 3-7, 0-80
    }

    #[test]
    fn hull_of_a_square() {
        let h = convex_hull(vec![
            (0.0, 0.0),
            (1.0, 0.0),
            (0.0, 1.0),
            (1.0, 1.0),
            (0.5, 0.5),
        ]);
        assert_eq!(h.len(), 4);
    }

    #[test]
    fn bad_input_is_listed_not_lost() {
        let c = CodeCube {
            vars: vec!["y1".into(), "y2".into()],
            states: vec![("A".into(), "0x".into()), ("B".into(), "01".into())],
            transitions: vec![CubeArrow {
                column: "c".into(),
                from: "Q".into(),
                to: "B".into(),
                critical_order: None,
            }],
        };
        let svg = code_cube_svg(&c);
        assert!(svg.contains("not drawn: state A has code &quot;0x&quot;"));
        assert!(svg.contains("not drawn: column c: Q -&gt; B"));
        let c = CodeCube {
            vars: vec!["y1".into()],
            states: vec![("A".into(), "1".into())],
            transitions: vec![CubeArrow {
                column: "c".into(),
                from: "A".into(),
                to: "1".into(),
                critical_order: None,
            }],
        };
        assert!(code_cube_svg(&c).contains("not drawn: column c: A -&gt; 1 stays at code 1"));
    }

    #[test]
    fn subcube_points() {
        let mut s = subcube(0b000, 0b101);
        s.sort_unstable();
        assert_eq!(s, vec![0b000, 0b001, 0b100, 0b101]);
    }
}
