//! Reports of a [`Design`]: the JSON object of the `synth` command and the markdown
//! human report.
//!
//! The JSON fields are the contract of `synth --json`: `states_before`, `states`,
//! `state_map`, `table`, `method`, `state_vars`, `codes`, `support`, `next_state`,
//! `outputs`, `cube_count`, `literal_count`, `essential_hazards`, `warnings`,
//! `verification` (`transitions`, `races`, `hazards`, `ok`), plus `equations`, `caution`,
//! `delay_model` and proof figures. Every cube string is as long as `support`.

use crate::synth::Design;
use serde_json::{json, Map, Value};
use std::fmt::Write as _;
use stillpoint_cover::{expression, Cube};

/// The caution every synthesis report and netlist carries (the same text as the CLI's).
pub const CAUTION: &str =
    "Caution: these equations assume fundamental-mode operation (inputs change only \
when the circuit is stable, one change at a time unless multiple changes were requested) and the \
delay model stated in the report (feedback delay at least the input-to-logic skew). They are \
verified by ternary simulation of the ideal gate network, not of your layout. Run timing analysis \
on the real netlist, and where the circuit sits in safety-relevant equipment, follow the \
applicable safety standards and licensed engineering practice.";

fn cubes(d: &Design, i: usize) -> Vec<String> {
    let n = d.encoding.support.len();
    d.solution.outputs[i]
        .cubes
        .iter()
        .map(|c| c.to_string(n))
        .collect()
}

fn readable(d: &Design, c: &[Cube]) -> String {
    if c.is_empty() {
        return "0".into();
    }
    expression(c, &d.encoding.support)
}

impl serde::Serialize for Design {
    /// Serialises as the `synth` JSON report ([`to_json`]).
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        to_json(self).serialize(s)
    }
}

/// The JSON report of `synth`.
pub fn to_json(d: &Design) -> Value {
    let k = d.encoding.width;
    let t = &d.table;
    let mut state_map = Map::new();
    for (a, b) in &d.state_map {
        state_map.insert(a.clone(), json!(b));
    }
    let mut codes = Map::new();
    for s in t.states() {
        codes.insert(
            t.state_name(s).to_string(),
            json!(d.assignment.codes.to_bits(s)),
        );
    }
    let mut next_state = Map::new();
    let mut outputs = Map::new();
    let mut equations = Map::new();
    for (i, oc) in d.solution.outputs.iter().enumerate() {
        equations.insert(oc.name.clone(), json!(readable(d, &oc.cubes)));
        if i < k {
            next_state.insert(oc.name.clone(), json!(cubes(d, i)));
        } else {
            outputs.insert(oc.name.clone(), json!(cubes(d, i)));
        }
    }
    let table_json: Value = serde_json::from_str(&t.to_json()).unwrap_or(Value::Null);
    let essential: Vec<Value> = d
        .essential_hazards
        .iter()
        .map(|h| {
            json!({
                "state": t.state_name(h.state),
                "column": t.column_label(h.column),
                "input": t.input_names()[h.input.index()],
            })
        })
        .collect();
    let v = &d.verification;
    json!({
        "states_before": d.original.num_states(),
        "states": t.num_states(),
        "state_map": state_map,
        "table": table_json,
        "method": d.assignment.method.name(),
        "state_vars": (1..=k).map(|i| format!("y{i}")).collect::<Vec<_>>(),
        "codes": codes,
        "support": d.encoding.support,
        "next_state": next_state,
        "outputs": outputs,
        "equations": equations,
        "cube_count": d.solution.cube_count,
        "literal_count": d.solution.literal_count,
        "logic_optimal": d.solution.optimal,
        "logic_lower_bound": d.solution.lower_bound,
        "assignment_optimal": d.assignment.optimal,
        "assignment_lower_bound": d.assignment.lower_bound,
        "essential_hazards": essential,
        "warnings": d.warnings,
        "verification": {
            "transitions": v.transitions,
            "races": v.races,
            "hazards": v.hazards,
            "ok": v.ok,
            "model": v.model,
            "failures": v.failures,
            "cover_violations": v.cover_violations,
        },
        "delay_model": v.model.describe(),
        "caution": CAUTION,
    })
}

/// The markdown human report.
pub fn to_markdown(d: &Design, fallback_name: &str) -> String {
    let t = &d.table;
    let k = d.encoding.width;
    let name = d.module_name(fallback_name);
    let mut o = String::new();
    let _ = writeln!(o, "# Synthesis report: {name}\n");
    let _ = writeln!(o, "> {CAUTION}\n");
    let _ = writeln!(o, "## Flow table\n");
    let _ = writeln!(
        o,
        "{} rows as given, {} after {}.\n",
        d.original.num_states(),
        t.num_states(),
        if d.reduction.is_some() {
            "reduction"
        } else {
            "collapsing chains (no reduction)"
        }
    );
    if d.reduction.is_some() && d.original.num_states() != t.num_states() {
        o.push_str("| row as given | coded row |\n| --- | --- |\n");
        for (a, b) in &d.state_map {
            let _ = writeln!(o, "| {a} | {b} |");
        }
        o.push('\n');
    }
    let _ = writeln!(o, "The table that was coded:\n\n```\n{}```\n", t.to_text());
    let _ = writeln!(o, "## State assignment\n");
    let opt = match d.assignment.optimal {
        Some(true) => "proven minimum".to_string(),
        Some(false) => format!("not proven minimum; at least {}", d.assignment.lower_bound),
        None => "two steps per transition".to_string(),
    };
    let _ = writeln!(
        o,
        "Method `{}`: {k} state variable(s) ({opt}).\n",
        d.assignment.method.name()
    );
    let vars: Vec<String> = (1..=k).map(|i| format!("y{i}")).collect();
    let _ = writeln!(o, "| state | {} |", vars.join(" "));
    o.push_str("| --- | --- |\n");
    for s in t.states() {
        let _ = writeln!(
            o,
            "| {} | {} |",
            t.state_name(s),
            d.assignment.codes.to_bits(s)
        );
    }
    let _ = writeln!(o, "\n## Equations\n");
    let _ = writeln!(o, "Support: {}.\n\n```", d.encoding.support.join(", "));
    for oc in &d.solution.outputs {
        let _ = writeln!(o, "{} = {}", oc.name, readable(d, &oc.cubes));
    }
    o.push_str("```\n\n");
    let _ = writeln!(
        o,
        "Cost: {} distinct products, {} literals ({}).\n",
        d.solution.cube_count,
        d.solution.literal_count,
        if d.solution.optimal {
            "product count proven minimum for hazard-free covers".to_string()
        } else {
            format!(
                "not proven minimum; at least {} products",
                d.solution.lower_bound
            )
        }
    );
    let v = &d.verification;
    let _ = writeln!(o, "## Verification\n");
    let _ = writeln!(o, "Delay model: {}.\n", v.model.describe());
    let _ = writeln!(
        o,
        "{} total-state transitions simulated (Eichelberger ternary simulation of the gate \
         network with its feedback); {} race(s), {} hazard(s): **{}**.\n",
        v.transitions,
        v.races,
        v.hazards,
        if v.ok { "verified" } else { "NOT verified" }
    );
    for f in &v.failures {
        let probs: Vec<String> = f.problems.iter().map(|p| p.to_string()).collect();
        let _ = writeln!(
            o,
            "- state {} column {} -> {} (to {}): {}",
            f.state,
            f.from,
            f.to,
            f.dest,
            probs.join("; ")
        );
    }
    for c in &v.cover_violations {
        let _ = writeln!(o, "- cover checker: {c}");
    }
    if !d.essential_hazards.is_empty() {
        let _ = writeln!(
            o,
            "\nEssential hazards (Unger's test; a property of the table):\n"
        );
        for h in &d.essential_hazards {
            let _ = writeln!(
                o,
                "- state {}, column {}, input {}: keep the feedback delay longer than the skew \
                 of `{}` across the logic",
                t.state_name(h.state),
                t.column_label(h.column),
                t.input_names()[h.input.index()],
                t.input_names()[h.input.index()]
            );
        }
    }
    if !d.warnings.is_empty() {
        let _ = writeln!(o, "\n## Warnings\n");
        for w in &d.warnings {
            let _ = writeln!(o, "- {w}");
        }
    }
    o
}
