//! `stillpoint check` and `stillpoint reduce`: one library call each, then printing.

use super::args::{CheckArgs, ReduceArgs};
use super::{print_json, read_input, write_file, CliError, CliResult};
use serde_json::{json, Value};
use std::time::Duration;
use stillpoint_table::{
    analyze, essential_hazards, parse_json, parse_text, reduce, FlowTable, ReduceConfig, StateId,
    TableError,
};

/// Reads and parses a flow table, text or JSON by its name; errors as `FILE:LINE:COL: message`.
pub fn load_table(path: &str) -> Result<FlowTable, CliError> {
    let input = read_input(path)?;
    let parsed = if input.is_json {
        parse_json(&input.text)
    } else {
        parse_text(&input.text)
    };
    parsed.map_err(|e| CliError::at(&input.name, e.line(), e.column(), e.message()))
}

fn names(t: &FlowTable, v: &[StateId]) -> Vec<String> {
    v.iter().map(|&s| t.state_name(s).to_string()).collect()
}

fn budget(secs: f64) -> Result<Duration, CliError> {
    Duration::try_from_secs_f64(secs).map_err(|_| {
        CliError::new(format!(
            "--budget {secs}: expected a non-negative number of seconds"
        ))
    })
}

fn plural(n: usize, one: &str, many: &str) -> String {
    format!("{n} {}", if n == 1 { one } else { many })
}

/// Runs `check`.
pub fn run_check(args: &CheckArgs) -> CliResult {
    let t = load_table(&args.table)?;
    let a = analyze(&t);
    let hazards = essential_hazards(&t);
    let col = |c| t.column_label(c).to_string();
    let code = if a.realizable { 0 } else { 1 };
    if args.common.json {
        let report = json!({
            "table": t.name(),
            "states": t.num_states(),
            "inputs": t.num_inputs(),
            "outputs": t.num_outputs(),
            "columns": t.num_columns(),
            "stable_entries": a.stable_entries,
            "realizable": a.realizable,
            "chains": a.chains.iter().map(|c| json!({
                "state": t.state_name(c.state), "column": col(c.column), "path": names(&t, &c.path)
            })).collect::<Vec<Value>>(),
            "oscillations": a.oscillations.iter().map(|o| json!({
                "state": t.state_name(o.state), "column": col(o.column), "cycle": names(&t, &o.cycle)
            })).collect::<Vec<Value>>(),
            "unreachable": names(&t, &a.unreachable),
            "essential_hazards": hazards.iter().map(|h| json!({
                "state": t.state_name(h.state), "column": col(h.column),
                "input": t.input_names()[h.input.index()],
                "one_change_ends_in": t.state_name(h.once), "three_changes_end_in": t.state_name(h.thrice)
            })).collect::<Vec<Value>>(),
            "columns_without_stable": a.columns_without_stable.iter().map(|&c| col(c)).collect::<Vec<_>>(),
            "rows_without_stable": names(&t, &a.rows_without_stable),
            "warnings": a.warnings,
        });
        print_json(&report);
        return Ok(code);
    }
    let mut s = String::new();
    let title = t
        .name()
        .map_or_else(|| "flow table".to_string(), |n| format!("flow table {n}"));
    s.push_str(&format!(
        "{title}: {}, {}, {}, {} listed, {}\n",
        plural(t.num_states(), "row", "rows"),
        plural(t.num_inputs(), "input", "inputs"),
        plural(t.num_outputs(), "output", "outputs"),
        plural(t.num_columns(), "column", "columns"),
        plural(a.stable_entries, "stable entry", "stable entries"),
    ));
    if a.realizable {
        s.push_str("fundamental mode: realizable, every chain of unstable entries settles\n");
    } else {
        s.push_str(&format!(
            "fundamental mode: NOT realizable, {} found\n",
            plural(a.oscillations.len(), "oscillation", "oscillations")
        ));
        for o in &a.oscillations {
            let mut cyc = names(&t, &o.cycle);
            cyc.push(t.state_name(o.state).to_string());
            s.push_str(&format!(
                "  column {}: {} never settles\n",
                col(o.column),
                cyc.join(" -> ")
            ));
        }
    }
    if !a.chains.is_empty() {
        s.push_str("multi-step transitions (synthesis makes them direct):\n");
        for c in &a.chains {
            s.push_str(&format!(
                "  column {}: {}\n",
                col(c.column),
                names(&t, &c.path).join(" -> ")
            ));
        }
    }
    if !hazards.is_empty() {
        s.push_str(
            "essential hazards (Unger's test; they call for delay in the feedback paths):\n",
        );
        for h in &hazards {
            s.push_str(&format!(
                "  {} stable in {}, {} changes: once ends in {}, three times in {}\n",
                t.state_name(h.state),
                col(h.column),
                t.input_names()[h.input.index()],
                t.state_name(h.once),
                t.state_name(h.thrice)
            ));
        }
    }
    if !a.warnings.is_empty() {
        s.push_str("warnings:\n");
        for w in &a.warnings {
            s.push_str(&format!("  - {w}\n"));
        }
    }
    print!("{s}");
    Ok(code)
}

/// Runs `reduce`.
pub fn run_reduce(args: &ReduceArgs) -> CliResult {
    let t = load_table(&args.table)?;
    let cfg = ReduceConfig::default().budget(budget(args.common.budget)?);
    let r = match reduce(&t, &cfg) {
        Ok(r) => r,
        Err(TableError::Oscillation(e)) => {
            if args.common.json {
                print_json(&json!({
                    "states_before": t.num_states(),
                    "realizable": false,
                    "error": e.to_string(),
                    "oscillation": {"state": e.state_name, "column": e.column_label, "cycle": names(&t, &e.cycle)},
                }));
            } else {
                println!("cannot reduce: {e}");
            }
            return Ok(1);
        }
        Err(e) => return Err(CliError::new(format!("{}: {e}", args.table))),
    };
    let u = &r.table;
    if let Some(out) = &args.output {
        let text = if out.ends_with(".json") {
            u.to_json()
        } else {
            u.to_text()
        };
        write_file(out, &text)?;
    }
    let classes: Vec<Vec<String>> = r.classes.iter().map(|c| names(&t, c)).collect();
    if args.common.json {
        let table: Value = serde_json::from_str(&u.to_json()).unwrap_or(Value::Null);
        print_json(&json!({
            "states_before": t.num_states(),
            "states_after": u.num_states(),
            "lower_bound": r.lower_bound,
            "optimal": r.optimal,
            "classes": classes,
            "names": u.state_names(),
            "table": table,
            "stats": {
                "compatible_pairs": r.stats.compatible_pairs,
                "maximal_compatibles": r.stats.maximal_compatibles,
                "compatibles": r.stats.compatibles,
                "primes": r.stats.primes,
                "nodes": r.stats.nodes,
                "stopped_by": r.stats.stopped_by,
            },
        }));
        return Ok(0);
    }
    let proof = if r.optimal {
        "proven minimum".to_string()
    } else {
        format!(
            "not proven minimum: stopped by {}; at least {} rows are needed",
            r.stats.stopped_by.as_deref().unwrap_or("a limit"),
            r.lower_bound
        )
    };
    println!(
        "{} -> {} ({proof})",
        plural(t.num_states(), "row", "rows"),
        plural(u.num_states(), "row", "rows")
    );
    for (i, c) in classes.iter().enumerate() {
        println!(
            "  {:<12} = {{{}}}",
            u.state_name(StateId::from_index(i)),
            c.join(", ")
        );
    }
    println!();
    print!("{}", u.to_text());
    Ok(0)
}
