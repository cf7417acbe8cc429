//! `stillpoint assign` and `stillpoint races`: one library call each, then printing.

use super::args::{AssignArgs, RacesArgs};
use super::check::load_table;
use super::{print_json, read_input, CliError, CliResult};
use serde_json::{json, Map, Value};
use std::io::IsTerminal;
use std::time::Duration;
use stillpoint_assign::adjacent::NoEmbedding;
use stillpoint_assign::{
    assign, bits_string, one_hot, races, separation, AssignConfig, AssignError, Assignment, Codes,
    Method,
};
use stillpoint_table::{collapse_chains, CollapseError, FlowTable, StateId};

fn budget(secs: f64) -> Result<Duration, CliError> {
    Duration::try_from_secs_f64(secs).map_err(|_| {
        CliError::new(format!(
            "--budget {secs}: expected a non-negative number of seconds"
        ))
    })
}

/// The oscillation report (exit 1) shared by both commands.
fn oscillation(t: &FlowTable, e: &CollapseError, json_out: bool, extra: Value) -> CliResult {
    let cycle: Vec<&str> = e.cycle.iter().map(|&s| t.state_name(s)).collect();
    if json_out {
        let mut v = json!({
            "race_free": false,
            "oscillations": [{
                "state": t.state_name(e.state),
                "column": t.column_label(e.column),
                "cycle": cycle,
            }],
            "message": e.to_string(),
        });
        if let (Value::Object(m), Value::Object(x)) = (&mut v, extra) {
            m.extend(x);
        }
        print_json(&v);
    } else {
        println!(
            "No state code can be given: state {} oscillates in column {} ({}).",
            t.state_name(e.state),
            t.column_label(e.column),
            cycle.join(" -> ")
        );
    }
    Ok(1)
}

fn codes_json(t: &FlowTable, codes: &Codes) -> Value {
    let mut m = Map::new();
    for s in t.states() {
        m.insert(t.state_name(s).to_string(), Value::String(codes.to_bits(s)));
    }
    Value::Object(m)
}

fn checked_race_free(t: &FlowTable, a: &Assignment) -> bool {
    if a.multi_step {
        one_hot::check(t, &a.codes).is_ok()
    } else {
        separation::check(t, &a.codes).is_ok()
    }
}

/// Runs `assign`.
pub fn run_assign(args: &AssignArgs) -> CliResult {
    let given = load_table(&args.table)?;
    let m = Method::from(args.method);
    let t = match collapse_chains(&given) {
        Ok(t) => t,
        Err(e) => return oscillation(&given, &e, args.common.json, json!({ "method": m.name() })),
    };
    let cfg = AssignConfig::default()
        .method(m)
        .budget(budget(args.common.budget)?);
    let progress = m == Method::Tracey && std::io::stderr().is_terminal();
    if progress {
        eprint!("assign: exact search, budget {} s ...", args.common.budget);
    }
    let result = assign(&t, &cfg);
    if progress {
        eprint!("\r\x1b[2K");
    }
    let a = match result {
        Ok(a) => a,
        Err(AssignError::NoUnitDistance { tried, .. }) => {
            let message = refusals(&t, &tried);
            if args.common.json {
                print_json(&json!({
                    "method": m.name(),
                    "variables": Value::Null,
                    "codes": Value::Null,
                    "race_free": false,
                    "message": message,
                }));
            } else {
                println!("No unit-distance code: {message}.");
            }
            return Ok(1);
        }
        Err(e) => return Err(CliError::new(format!("{}: {e}", args.table))),
    };
    let race_free = checked_race_free(&t, &a);
    if args.common.json {
        print_json(&json!({
            "method": m.name(),
            "states": t.num_states(),
            "variables": a.codes.width(),
            "lower_bound": a.lower_bound,
            "optimal": a.optimal,
            "multi_step": a.multi_step,
            "codes": codes_json(&t, &a.codes),
            "race_free": race_free,
            "alternatives": a.alternatives.len(),
            "search_nodes": a.stats.nodes,
            "budget_exhausted": a.stats.budget_exhausted,
        }));
    } else {
        let width = a.codes.width();
        let proof = match a.optimal {
            Some(true) => "proven minimum".to_string(),
            Some(false) if a.stats.budget_exhausted => format!(
                "not proven minimum: the budget ran out; at least {} are needed",
                a.lower_bound
            ),
            Some(false) => format!("not proven minimum; at least {} are needed", a.lower_bound),
            None => format!(
                "two steps per transition; single-step codes need at least {}",
                a.lower_bound
            ),
        };
        println!(
            "{} state variable{} by {} ({proof}).",
            width,
            if width == 1 { "" } else { "s" },
            m.name()
        );
        let wide = t.states().map(|s| t.state_name(s).len()).max().unwrap_or(0);
        for s in t.states() {
            println!("  {:wide$}  {}", t.state_name(s), a.codes.to_bits(s));
        }
        println!(
            "{}",
            if race_free {
                "Checked: no critical race."
            } else {
                "Check FAILED: the code has a critical race."
            }
        );
    }
    Ok(if race_free { 0 } else { 1 })
}

/// Why no unit-distance code was found, with state names.
fn refusals(t: &FlowTable, tried: &[(usize, NoEmbedding)]) -> String {
    let name = |i: usize| t.state_name(StateId::from_index(i)).to_string();
    tried
        .iter()
        .map(|(m, r)| match r {
            NoEmbedding::OddCycle(c) => format!(
                "the transitions form an odd cycle ({} -> {}), and the code cube has none, \
                 so no number of variables works",
                c.iter().map(|&i| name(i)).collect::<Vec<_>>().join(" -> "),
                c.first().map_or_else(String::new, |&i| name(i))
            ),
            NoEmbedding::DegreeTooHigh { state, degree } => format!(
                "{m} variables: state {} has {degree} transition partners",
                name(*state)
            ),
            NoEmbedding::TooFewCodes => format!("{m} variables: fewer codes than states"),
            NoEmbedding::Exhausted => format!("{m} variables: none exists (exhaustive search)"),
            NoEmbedding::Budget => format!("{m} variables: the search budget ran out"),
        })
        .collect::<Vec<_>>()
        .join("; ")
}

/// Runs `races`.
pub fn run_races(args: &RacesArgs) -> CliResult {
    let given = load_table(&args.table)?;
    let input = read_input(&args.codes)?;
    let codes = Codes::parse(&input.text, input.is_json, &given).map_err(|e| match e {
        AssignError::Parse { line, col, message } => CliError::at(&input.name, line, col, message),
        other => CliError::new(format!("{}: {other}", input.name)),
    })?;
    let t = match collapse_chains(&given) {
        Ok(t) => t,
        Err(e) => return oscillation(&given, &e, args.common.json, json!({})),
    };
    let report =
        races::analyze(&t, &codes).map_err(|e| CliError::new(format!("{}: {e}", args.table)))?;
    let w = codes.width();
    let name = |s| t.state_name(s).to_string();
    if args.common.json {
        print_json(&json!({
            "race_free": report.race_free(),
            "variables": w,
            "critical": report.critical.iter().map(|c| json!({
                "state": name(c.state),
                "column": t.column_label(c.column),
                "to": name(c.to),
                "order": c.order.iter().map(|&p| bits_string(p, w)).collect::<Vec<_>>(),
                "ends_in": name(c.ends_in),
            })).collect::<Vec<Value>>(),
            "noncritical": report.noncritical.iter().map(|r| json!({
                "state": name(r.state),
                "column": t.column_label(r.column),
                "to": name(r.to),
            })).collect::<Vec<Value>>(),
        }));
    } else {
        if report.race_free() {
            println!("No critical race: every transition ends where the table says.");
        } else {
            println!("{} critical race(s):", report.critical.len());
            for c in &report.critical {
                let path: Vec<String> = c.order.iter().map(|&p| bits_string(p, w)).collect();
                println!(
                    "  {} -> {} in column {}: the bits may pass {} and settle in {}",
                    name(c.state),
                    name(c.to),
                    t.column_label(c.column),
                    path.join(" -> "),
                    name(c.ends_in)
                );
            }
        }
        if !report.noncritical.is_empty() {
            println!(
                "{} harmless race(s) (several bits change, every order ends right):",
                report.noncritical.len()
            );
            for r in &report.noncritical {
                println!(
                    "  {} -> {} in column {}",
                    name(r.state),
                    name(r.to),
                    t.column_label(r.column)
                );
            }
        }
    }
    Ok(if report.race_free() { 0 } else { 1 })
}
