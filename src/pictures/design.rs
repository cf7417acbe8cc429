//! The pictures of a [`Design`]: its code cube, one map per function and its flow graph,
//! filled in from the pipeline's results.

use super::{CodeCube, CubeArrow, FlowGraph, KMap, MAX_MAP_VARS};
use crate::synth::Design;
use stillpoint_assign::{bits_string, races};
use stillpoint_table::column_transitions;

/// The pictures of a design: the code cube (with any critical race the race analysis
/// finds drawn with its bad order), one map per next-state and output function whose
/// support has at most [`MAX_MAP_VARS`] variables, and the flow graph of the coded table.
///
/// The second element lists the functions left out because their support is too large,
/// so the caller can say so.
pub fn design_pictures(d: &Design) -> (CodeCube, Vec<KMap>, Vec<String>, FlowGraph) {
    let table = &d.table;
    let codes = &d.assignment.codes;
    let width = codes.width();
    let critical = races::analyze(table, codes)
        .map(|r| r.critical)
        .unwrap_or_default();
    let mut transitions = Vec::new();
    for ct in column_transitions(table) {
        let column = table.column_label(ct.column).to_string();
        for &(s, t) in &ct.pairs {
            if s == t {
                continue;
            }
            let critical_order = critical
                .iter()
                .find(|r| r.state == s && r.column == ct.column)
                .map(|r| r.order.iter().map(|&c| bits_string(c, width)).collect());
            transitions.push(CubeArrow {
                column: column.clone(),
                from: table.state_name(s).to_string(),
                to: table.state_name(t).to_string(),
                critical_order,
            });
        }
    }
    let cube = CodeCube {
        vars: (1..=width).map(|i| format!("y{i}")).collect(),
        states: table
            .states()
            .map(|s| (table.state_name(s).to_string(), codes.to_bits(s)))
            .collect(),
        transitions,
    };

    let support = &d.encoding.support;
    let nvars = support.len();
    let mut maps = Vec::new();
    let mut left_out = Vec::new();
    for ((name, f), cover) in d.encoding.functions.outputs.iter().zip(&d.solution.outputs) {
        if nvars > MAX_MAP_VARS {
            left_out.push(name.clone());
            continue;
        }
        let required = f
            .transitions()
            .iter()
            .filter(|t| f.value(t.start) == Some(true) && f.value(t.end) == Some(true))
            .map(|t| t.cube(nvars).to_string(nvars))
            .collect();
        maps.push(KMap {
            name: name.clone(),
            vars: support.clone(),
            values: (0..1u64 << nvars).map(|m| f.value(m)).collect(),
            products: cover.cubes.iter().map(|c| c.to_string(nvars)).collect(),
            required,
        });
    }

    let mut edges = Vec::new();
    let mut stable = Vec::new();
    for s in table.states() {
        for c in table.columns() {
            let label = table.column_label(c).to_string();
            match table.next(s, c) {
                Some(t) if t == s => stable.push((table.state_name(s).to_string(), label)),
                Some(t) => edges.push((
                    table.state_name(s).to_string(),
                    table.state_name(t).to_string(),
                    label,
                )),
                None => {}
            }
        }
    }
    let graph = FlowGraph {
        name: table.name().unwrap_or("flow table").to_string(),
        states: table
            .states()
            .map(|s| table.state_name(s).to_string())
            .collect(),
        reset: table.reset().map(|s| table.state_name(s).to_string()),
        edges,
        stable,
    };
    (cube, maps, left_out, graph)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::synth::{synthesize, SynthConfig};

    #[test]
    fn a_demo_design_gives_every_picture() {
        let table = stillpoint_table::parse_text(include_str!("../../demos/handshake.flow"))
            .expect("the demo parses");
        let d = synthesize(&table, &SynthConfig::default()).expect("the demo synthesises");
        let (cube, maps, left_out, graph) = design_pictures(&d);
        assert_eq!(cube.states.len(), d.table.num_states());
        assert_eq!(maps.len() + left_out.len(), d.solution.outputs.len());
        assert_eq!(graph.states.len(), d.table.num_states());
        for m in &maps {
            let svg = super::super::kmap_svg(m).expect("maps of at most six variables draw");
            assert!(svg.starts_with("<svg") || svg.contains("<svg"));
        }
        assert!(super::super::code_cube_svg(&cube).contains("<svg"));
        assert!(super::super::flow_graph_dot(&graph).contains("->"));
    }
}
