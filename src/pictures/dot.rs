//! The flow graph as Graphviz DOT text.
//!
//! Every identifier is a double-quoted string (`"` and `\` escaped, line breaks as
//! `\n`), so any state name is safe. Transitions are edges labelled with their merged
//! column list; stable entries are dotted self-loops labelled `stable: ...`; the reset
//! state has a double rim and an entry arrow from a point node. Names used by an entry
//! but missing from the state list are dashed nodes.

use super::graph::{loops, merged_edges, node_list};
use super::FlowGraph;
use std::fmt::Write as _;

/// Quote `s` as a DOT string identifier.
pub(super) fn quote(s: &str) -> String {
    let mut out = String::with_capacity(s.len() + 2);
    out.push('"');
    for ch in s.chars() {
        match ch {
            '"' => out.push_str("\\\""),
            '\\' => out.push_str("\\\\"),
            '\n' => out.push_str("\\n"),
            '\r' => {}
            c => out.push(c),
        }
    }
    out.push('"');
    out
}

/// The flow graph `g` as DOT text (a `digraph`), for `dot -Tsvg` and friends.
///
/// ```
/// use stillpoint::pictures::{flow_graph_dot, FlowGraph};
/// let g = FlowGraph {
///     name: "one".into(),
///     states: vec!["A \"x\"".into()],
///     reset: None,
///     edges: vec![],
///     stable: vec![("A \"x\"".into(), "0".into())],
/// };
/// let dot = flow_graph_dot(&g);
/// assert!(dot.contains(r#""A \"x\"" -> "A \"x\"""#));
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn flow_graph_dot(g: &FlowGraph) -> String {
    let nodes = node_list(g);
    let mut out = String::new();
    let _ = writeln!(out, "digraph {} {{", quote(&g.name));
    let _ = writeln!(
        out,
        "  graph [label={}, labelloc=\"t\", fontname=\"sans-serif\"];",
        quote(&format!("Flow graph: {}", g.name))
    );
    let _ = writeln!(out, "  node [shape=\"circle\", fontname=\"sans-serif\"];");
    let _ = writeln!(out, "  edge [fontname=\"sans-serif\", fontsize=\"10\"];");
    for (name, extra) in &nodes {
        let is_reset = g.reset.as_deref() == Some(name.as_str());
        let mut attrs: Vec<String> = Vec::new();
        if is_reset {
            attrs.push("shape=\"doublecircle\"".into());
        }
        if *extra {
            attrs.push("style=\"dashed\"".into());
            attrs.push("tooltip=\"not in the state list\"".into());
        }
        if attrs.is_empty() {
            let _ = writeln!(out, "  {};", quote(name));
        } else {
            let _ = writeln!(out, "  {} [{}];", quote(name), attrs.join(", "));
        }
    }
    if let Some(r) = &g.reset {
        // A point node for the entry arrow, named so it cannot clash with a state.
        let mut id = "reset".to_string();
        while nodes.iter().any(|(n, _)| *n == id) {
            id.push('_');
        }
        let _ = writeln!(out, "  {} [shape=\"point\", label=\"\"];", quote(&id));
        let _ = writeln!(
            out,
            "  {} -> {} [label=\"reset\", penwidth=\"2\"];",
            quote(&id),
            quote(r)
        );
    }
    for (a, b, cols) in merged_edges(g) {
        let _ = writeln!(
            out,
            "  {} -> {} [label={}];",
            quote(&a),
            quote(&b),
            quote(&cols.join(", "))
        );
    }
    for (name, _) in &nodes {
        let cols = loops(g, name);
        if !cols.is_empty() {
            let _ = writeln!(
                out,
                "  {} -> {} [label={}, style=\"dotted\"];",
                quote(name),
                quote(name),
                quote(&format!("stable: {}", cols.join(", ")))
            );
        }
    }
    out.push_str("}\n");
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn quoting() {
        assert_eq!(quote("a"), "\"a\"");
        assert_eq!(quote("a\"b\\c"), "\"a\\\"b\\\\c\"");
        assert_eq!(quote("x\ny"), "\"x\\ny\"");
    }

    #[test]
    fn reset_point_does_not_clash() {
        let g = FlowGraph {
            name: "g".into(),
            states: vec!["reset".into()],
            reset: Some("reset".into()),
            edges: vec![],
            stable: vec![],
        };
        let d = flow_graph_dot(&g);
        assert!(d.contains("\"reset_\" [shape=\"point\""));
        assert!(d.contains("\"reset_\" -> \"reset\""));
    }
}
