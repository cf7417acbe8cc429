//! The flow graph as SVG: states on a circle, transitions as labelled arrows.
//!
//! Layout: the states go clockwise on one circle in the given order, starting at the top
//! with the first state, or with the reset state if there is one (the order is rotated,
//! so it stays the same cyclic order). The circle is just large
//! enough that neighbouring nodes keep 70 px between their rims. Parallel edges (same
//! source and destination) become one arrow labelled with the list of columns; an arrow
//! whose reverse also exists is bent to its right so the pair stays apart, other arrows
//! are straight. Stable entries are a dotted self-loop on the outside of the node,
//! labelled with the stable columns.

use super::svg::{arrow_marker, esc, halo, n, palette, stroke, text_width, Svg};
use super::FlowGraph;
use std::fmt::Write as _;

const MARGIN: f64 = 24.0;
const GAP: f64 = 70.0;

/// The nodes in placement order (given states first, then any name used by an edge, a
/// stable entry or the reset but missing from `states`), with a flag for the latter.
pub(super) fn node_list(g: &FlowGraph) -> Vec<(String, bool)> {
    let mut nodes: Vec<(String, bool)> = Vec::new();
    let mut push = |name: &str, extra: bool| {
        if !nodes.iter().any(|(n, _)| n == name) {
            nodes.push((name.to_string(), extra));
        }
    };
    for s in &g.states {
        push(s, false);
    }
    for (a, b, _) in &g.edges {
        push(a, true);
        push(b, true);
    }
    for (s, _) in &g.stable {
        push(s, true);
    }
    if let Some(r) = &g.reset {
        push(r, true);
    }
    nodes
}

/// Edges merged by (from, to), in order of first appearance; self-edges excluded.
pub(super) fn merged_edges(g: &FlowGraph) -> Vec<(String, String, Vec<String>)> {
    let mut out: Vec<(String, String, Vec<String>)> = Vec::new();
    for (a, b, c) in &g.edges {
        if a == b {
            continue;
        }
        match out.iter_mut().find(|(x, y, _)| x == a && y == b) {
            Some(e) => e.2.push(c.clone()),
            None => out.push((a.clone(), b.clone(), vec![c.clone()])),
        }
    }
    out
}

/// Columns in which each node has a self-loop: stable entries, plus any edge from a
/// state to itself.
pub(super) fn loops(g: &FlowGraph, name: &str) -> Vec<String> {
    let mut cols: Vec<String> = g
        .stable
        .iter()
        .filter(|(s, _)| s == name)
        .map(|(_, c)| c.clone())
        .collect();
    for (a, b, c) in &g.edges {
        if a == name && b == name && !cols.contains(c) {
            cols.push(c.clone());
        }
    }
    cols
}

/// Draw the flow graph `g` as SVG.
///
/// A name used by an edge, a stable entry or the reset but missing from `g.states` is
/// drawn as a dashed node (and said so in the legend) rather than dropped.
///
/// ```
/// use stillpoint::pictures::{flow_graph_svg, FlowGraph};
/// let g = FlowGraph {
///     name: "toggle".into(),
///     states: vec!["A".into(), "B".into()],
///     reset: Some("A".into()),
///     edges: vec![("A".into(), "B".into(), "1".into()), ("B".into(), "A".into(), "0".into())],
///     stable: vec![("A".into(), "0".into()), ("B".into(), "1".into())],
/// };
/// assert!(flow_graph_svg(&g).contains("toggle"));
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn flow_graph_svg(g: &FlowGraph) -> String {
    let mut nodes = node_list(g);
    if let Some(r) = &g.reset {
        // Rotate (not move) so the reset state is on top and the cyclic order is kept.
        if let Some(i) = nodes.iter().position(|(n, _)| n == r) {
            nodes.rotate_left(i);
        }
    }
    let count = nodes.len();
    let radii: Vec<f64> = nodes
        .iter()
        .map(|(name, _)| (text_width(name, 14.0) / 2.0 + 10.0).max(22.0))
        .collect();
    let rmax = radii.iter().copied().fold(22.0, f64::max);
    let ring = match count {
        0 | 1 => 0.0,
        _ => ((2.0 * rmax + GAP) / (2.0 * (std::f64::consts::PI / count as f64).sin())).max(90.0),
    };
    let angle = |i: usize| -> f64 {
        -std::f64::consts::FRAC_PI_2 + 2.0 * std::f64::consts::PI * i as f64 / count.max(1) as f64
    };
    let mut pos: Vec<(f64, f64)> = (0..count)
        .map(|i| (ring * angle(i).cos(), ring * angle(i).sin()))
        .collect();

    // Extent: node rims, loop labels, reset arrow.
    let mut ext: Vec<(f64, f64)> = Vec::new();
    let loop_cols: Vec<Vec<String>> = nodes.iter().map(|(name, _)| loops(g, name)).collect();
    for i in 0..count {
        let (x, y) = pos[i];
        let r = radii[i] + 58.0;
        ext.push((x - r, y - r));
        ext.push((x + r, y + r));
        if !loop_cols[i].is_empty() {
            let (lx, ly, anchor) = loop_label_at(x, y, radii[i], angle(i), count);
            let w = text_width(&loop_label(&loop_cols[i]), 11.0);
            let (x0, x1) = match anchor {
                "start" => (lx, lx + w),
                "end" => (lx - w, lx),
                _ => (lx - w / 2.0, lx + w / 2.0),
            };
            ext.push((x0, ly - 12.0));
            ext.push((x1, ly + 4.0));
        }
    }
    let edges = merged_edges(g);
    let index = |name: &str| nodes.iter().position(|(n, _)| n == name).unwrap_or(0);
    let geoms: Vec<EdgeGeom> = edges
        .iter()
        .map(|(a, b, cols)| {
            let (ia, ib) = (index(a), index(b));
            let bent = edges.iter().any(|(x, y, _)| x == b && y == a);
            edge_geom(
                pos[ia],
                radii[ia],
                pos[ib],
                radii[ib],
                bent,
                &cols.join(", "),
            )
        })
        .collect();
    for e in &geoms {
        let w = text_width(&e.label, 11.0);
        ext.push((e.lx - w / 2.0 - 4.0, e.ly - 12.0));
        ext.push((e.lx + w / 2.0 + 4.0, e.ly + 4.0));
    }
    let (mut minx, mut miny, mut maxx, mut maxy) = (0.0f64, 0.0f64, 0.0f64, 0.0f64);
    for &(x, y) in &ext {
        minx = minx.min(x);
        miny = miny.min(y);
        maxx = maxx.max(x);
        maxy = maxy.max(y);
    }
    let header = 48.0;
    let title = format!("Flow graph: {}", g.name);
    let mut legend: Vec<(&str, String)> = vec![
        ("node", "state".into()),
        ("reset", "reset state (double rim, entry arrow)".into()),
        (
            "arrow",
            "transition, labelled with its input columns".into(),
        ),
        (
            "loop",
            "stable: the state stays in the listed columns".into(),
        ),
    ];
    if nodes.iter().any(|(_, extra)| *extra) {
        legend.push((
            "extra",
            "named by an entry but not in the state list".into(),
        ));
    }
    let legend_w = legend
        .iter()
        .map(|(_, t)| 50.0 + text_width(t, 12.0))
        .fold(0.0, f64::max);
    let draw_w = maxx - minx;
    let width = (2.0 * MARGIN + draw_w.max(legend_w).max(text_width(&title, 16.0))).max(240.0);
    let ox = MARGIN - minx + (width - 2.0 * MARGIN - draw_w) / 2.0;
    let oy = MARGIN + header - miny;
    for p in &mut pos {
        p.0 += ox;
        p.1 += oy;
    }
    let legend_top = MARGIN + header + (maxy - miny) + 16.0;
    let height = legend_top + 18.0 + legend.len() as f64 * 22.0 + MARGIN;

    let mut s = Svg::new();
    s.def(&arrow_marker("flow-arrow", palette::INK));
    s.def(&arrow_marker("flow-stable", palette::STABLE));
    s.def(&arrow_marker("flow-reset", palette::RESET));
    s.text(
        MARGIN,
        MARGIN + 16.0,
        &title,
        &format!(
            "class=\"title\" font-size=\"16\" font-weight=\"bold\" fill=\"{}\"",
            palette::INK
        ),
    );
    let n_trans: usize = edges.iter().map(|e| e.2.len()).sum();
    s.text(
        MARGIN,
        MARGIN + 36.0,
        &format!(
            "{count} state{}, {n_trans} transition{}, {} stable entr{}",
            pl(count),
            pl(n_trans),
            g.stable.len(),
            if g.stable.len() == 1 { "y" } else { "ies" }
        ),
        &format!("fill=\"{}\"", palette::MUTED),
    );

    // Edges.
    s.raw("<g class=\"edges\">");
    for ((a, b, _), e) in edges.iter().zip(&geoms) {
        let _ = writeln!(
            s.body_mut(),
            "<path class=\"edge\" data-from=\"{}\" data-to=\"{}\" d=\"M{},{} Q{},{} {},{}\" fill=\"none\" {} marker-end=\"url(#flow-arrow)\"/>",
            esc(a),
            esc(b),
            n(e.p0.0 + ox),
            n(e.p0.1 + oy),
            n(e.c.0 + ox),
            n(e.c.1 + oy),
            n(e.p1.0 + ox),
            n(e.p1.1 + oy),
            stroke(palette::INK, 1.6, "")
        );
        s.text(e.lx + ox, e.ly + oy + 4.0, &e.label, &format!("class=\"edgelab\" text-anchor=\"middle\" font-size=\"11\" font-style=\"italic\" fill=\"{}\" {}", palette::INK, halo()));
    }
    s.raw("</g>");

    // Nodes, loops, reset.
    s.raw("<g class=\"nodes\">");
    for (i, (name, extra)) in nodes.iter().enumerate() {
        let (x, y) = pos[i];
        let r = radii[i];
        let th = if count == 1 {
            -std::f64::consts::FRAC_PI_2
        } else {
            angle(i)
        };
        if !loop_cols[i].is_empty() {
            let (a0, a1) = (th - 0.45, th + 0.45);
            let p0 = (x + r * a0.cos(), y + r * a0.sin());
            let p1 = (x + (r + 3.0) * a1.cos(), y + (r + 3.0) * a1.sin());
            let c0 = (
                x + (r + 48.0) * (th - 0.6).cos(),
                y + (r + 48.0) * (th - 0.6).sin(),
            );
            let c1 = (
                x + (r + 48.0) * (th + 0.6).cos(),
                y + (r + 48.0) * (th + 0.6).sin(),
            );
            let _ = writeln!(
                s.body_mut(),
                "<path class=\"loop\" data-node=\"{}\" d=\"M{},{} C{},{} {},{} {},{}\" fill=\"none\" {} marker-end=\"url(#flow-stable)\"/>",
                esc(name),
                n(p0.0),
                n(p0.1),
                n(c0.0),
                n(c0.1),
                n(c1.0),
                n(c1.1),
                n(p1.0),
                n(p1.1),
                stroke(palette::STABLE, 1.5, "2 2.5")
            );
            let (lx, ly, anchor) = loop_label_at(x, y, r, th, count);
            s.text(
                lx,
                ly,
                &loop_label(&loop_cols[i]),
                &format!(
                    "class=\"looplab\" text-anchor=\"{anchor}\" font-size=\"11\" fill=\"{}\" {}",
                    palette::STABLE,
                    halo()
                ),
            );
        }
        let is_reset = g.reset.as_deref() == Some(name.as_str());
        let _ = writeln!(
            s.body_mut(),
            "<g class=\"node{}\" data-name=\"{}\">",
            if is_reset { " reset" } else { "" },
            esc(name)
        );
        let rim = if *extra {
            stroke(palette::INK, 1.6, "5 3")
        } else {
            stroke(palette::INK, 1.8, "")
        };
        s.circle(x, y, r, &format!("fill=\"{}\" {rim}", palette::PAPER));
        if is_reset {
            s.circle(
                x,
                y,
                r - 4.0,
                &format!("fill=\"none\" {}", stroke(palette::RESET, 1.6, "")),
            );
            // Entry arrow from the upper left of the node.
            let a = th - 1.1;
            let from = (x + (r + 42.0) * a.cos(), y + (r + 42.0) * a.sin());
            let to = (x + (r + 2.0) * a.cos(), y + (r + 2.0) * a.sin());
            s.line(
                from.0,
                from.1,
                to.0,
                to.1,
                &format!(
                    "class=\"resetarrow\" {} marker-end=\"url(#flow-reset)\"",
                    stroke(palette::RESET, 2.2, "")
                ),
            );
            let anchor = if a.cos() < -0.2 {
                "end"
            } else if a.cos() > 0.2 {
                "start"
            } else {
                "middle"
            };
            s.text(
                from.0 - 2.0 * a.cos().signum(),
                from.1 - 4.0,
                "reset",
                &format!(
                    "text-anchor=\"{anchor}\" font-size=\"11\" font-weight=\"bold\" fill=\"{}\" {}",
                    palette::RESET,
                    halo()
                ),
            );
        }
        s.text(x, y + 5.0, name, &format!("class=\"name\" text-anchor=\"middle\" font-size=\"14\" font-weight=\"bold\" fill=\"{}\"", palette::INK));
        s.raw("</g>");
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
        let y = legend_top + 20.0 + i as f64 * 22.0;
        let mid = y - 4.0;
        let x = MARGIN;
        match *kind {
            "node" => s.circle(x + 17.0, mid, 8.0, &format!("fill=\"{}\" {}", palette::PAPER, stroke(palette::INK, 1.8, ""))),
            "reset" => {
                s.circle(x + 17.0, mid, 8.0, &format!("fill=\"{}\" {}", palette::PAPER, stroke(palette::INK, 1.8, "")));
                s.circle(x + 17.0, mid, 4.5, &format!("fill=\"none\" {}", stroke(palette::RESET, 1.4, "")));
            }
            "arrow" => s.line(x, mid, x + 34.0, mid, &format!("{} marker-end=\"url(#flow-arrow)\"", stroke(palette::INK, 1.6, ""))),
            "loop" => s.raw(&format!(
                "<path d=\"M{},{} C{},{} {},{} {},{}\" fill=\"none\" {} marker-end=\"url(#flow-stable)\"/>",
                n(x + 8.0), n(mid + 6.0), n(x + 2.0), n(mid - 12.0), n(x + 32.0), n(mid - 12.0), n(x + 26.0), n(mid + 6.0),
                stroke(palette::STABLE, 1.5, "2 2.5")
            )),
            "extra" => s.circle(x + 17.0, mid, 8.0, &format!("fill=\"{}\" {}", palette::PAPER, stroke(palette::INK, 1.6, "5 3"))),
            _ => {}
        }
        s.text(x + 46.0, y, text, &format!("fill=\"{}\"", palette::INK));
    }
    s.raw("</g>");
    s.finish(width, height, &title)
}

fn pl(n: usize) -> &'static str {
    if n == 1 {
        ""
    } else {
        "s"
    }
}

fn loop_label(cols: &[String]) -> String {
    format!("stable: {}", cols.join(", "))
}

/// Where the self-loop label of a node at angle `th` goes, and its text anchor.
fn loop_label_at(x: f64, y: f64, r: f64, th: f64, count: usize) -> (f64, f64, &'static str) {
    let th = if count == 1 {
        -std::f64::consts::FRAC_PI_2
    } else {
        th
    };
    let d = r + 40.0;
    let (lx, ly) = (x + d * th.cos(), y + d * th.sin());
    let anchor = if th.cos() > 0.35 {
        "start"
    } else if th.cos() < -0.35 {
        "end"
    } else {
        "middle"
    };
    let ly = if th.sin() < -0.5 {
        ly - 2.0
    } else if th.sin() > 0.5 {
        ly + 10.0
    } else {
        ly + 4.0
    };
    (lx, ly, anchor)
}

struct EdgeGeom {
    p0: (f64, f64),
    c: (f64, f64),
    p1: (f64, f64),
    lx: f64,
    ly: f64,
    label: String,
}

fn edge_geom(a: (f64, f64), ra: f64, b: (f64, f64), rb: f64, bent: bool, label: &str) -> EdgeGeom {
    let (dx, dy) = (b.0 - a.0, b.1 - a.1);
    let len = (dx * dx + dy * dy).sqrt().max(1e-6);
    let (ux, uy) = (dx / len, dy / len);
    let (nx, ny) = (-uy, ux); // right-hand normal in screen coordinates
    let bend = if bent { 0.16 * len } else { 0.0 };
    let c = ((a.0 + b.0) / 2.0 + nx * bend, (a.1 + b.1) / 2.0 + ny * bend);
    let toward = |from: (f64, f64), to: (f64, f64), r: f64| {
        let (ex, ey) = (to.0 - from.0, to.1 - from.1);
        let l = (ex * ex + ey * ey).sqrt().max(1e-6);
        (from.0 + ex / l * r, from.1 + ey / l * r)
    };
    let p0 = toward(a, c, ra);
    let p1 = toward(b, c, rb + 2.0);
    // Label at the curve's midpoint, nudged to the right side.
    let mx = 0.25 * p0.0 + 0.5 * c.0 + 0.25 * p1.0;
    let my = 0.25 * p0.1 + 0.5 * c.1 + 0.25 * p1.1;
    let push = 10.0 + text_width(label, 11.0) * 0.5 * nx.abs();
    EdgeGeom {
        p0,
        c,
        p1,
        lx: mx + nx * push,
        ly: my + ny * 10.0,
        label: label.to_string(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn ring() -> FlowGraph {
        FlowGraph {
            name: "ring".into(),
            states: vec!["A".into(), "B".into(), "C".into()],
            reset: Some("B".into()),
            edges: vec![
                ("A".into(), "B".into(), "01".into()),
                ("A".into(), "B".into(), "11".into()),
                ("B".into(), "A".into(), "00".into()),
                ("C".into(), "D".into(), "10".into()),
                ("C".into(), "C".into(), "11".into()),
            ],
            stable: vec![("A".into(), "00".into())],
        }
    }

    #[test]
    fn parallel_edges_merge() {
        let e = merged_edges(&ring());
        assert_eq!(e.len(), 3);
        assert_eq!(e[0].2, vec!["01".to_string(), "11".to_string()]);
    }

    #[test]
    fn unknown_names_become_marked_nodes() {
        let nodes = node_list(&ring());
        assert_eq!(nodes.last(), Some(&("D".to_string(), true)));
        let svg = flow_graph_svg(&ring());
        assert!(svg.contains("data-name=\"D\""));
        assert!(svg.contains("not in the state list"));
        assert!(svg.contains("stable: 11"));
    }

    #[test]
    fn empty_graph_draws() {
        let svg = flow_graph_svg(&FlowGraph::default());
        assert!(svg.starts_with("<?xml"));
    }
}
