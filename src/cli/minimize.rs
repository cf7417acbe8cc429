//! `stillpoint minimize`: read a function file, one call into the cover crate, print.

use super::args::{Effort as ArgEffort, Hazards, MinimizeArgs};
use super::{print_json, read_input, CliError, CliResult};
use serde_json::{json, Map, Value};
use std::io::IsTerminal;
use std::time::Duration;
use stillpoint_cover::{
    expression, file, minimize, verify, Config, CoverError, Cube, Effort, HazardMode,
    MultiFunction, Solution,
};

/// Reads and parses a function file (JSON by its name, else the `.fn` text form).
pub fn load_function(path: &str) -> Result<MultiFunction, CliError> {
    let input = read_input(path)?;
    file::parse(&input.text, input.is_json)
        .map_err(|e| CliError::at(&input.name, e.line, e.col, e.message))
}

/// What the user asked, as library settings.
fn config(args: &MinimizeArgs, f: &MultiFunction) -> Result<(Config, HazardMode), CliError> {
    let lists = f.outputs.iter().any(|(_, g)| !g.transitions().is_empty());
    let mode = match args.hazards {
        Some(Hazards::None) => HazardMode::None,
        Some(Hazards::Static) => HazardMode::Static,
        Some(Hazards::Full) => HazardMode::Full,
        None if lists => HazardMode::Full,
        None => HazardMode::Static,
    };
    let effort = match args.effort {
        ArgEffort::Exact => Effort::Exact,
        ArgEffort::Fast => Effort::Fast,
    };
    let secs = args.common.budget;
    let budget = Duration::try_from_secs_f64(secs).map_err(|_| {
        CliError::new(format!(
            "--budget {secs}: expected a non-negative number of seconds"
        ))
    })?;
    Ok((
        Config::default()
            .hazards(mode)
            .effort(effort)
            .budget(budget),
        mode,
    ))
}

fn cube_strings(cubes: &[Cube], n: usize) -> Vec<String> {
    cubes.iter().map(|c| c.to_string(n)).collect()
}

/// Runs `minimize`.
pub fn run_minimize(args: &MinimizeArgs) -> CliResult {
    let f = load_function(&args.function)?;
    let (cfg, mode) = config(args, &f)?;
    // The criterion behind `hazard_free`: the default mode's (full when transitions are
    // listed, else static), so a plain cover shows whether it happens to be safe.
    let lists = f.outputs.iter().any(|(_, g)| !g.transitions().is_empty());
    let judge = if mode == HazardMode::None {
        if lists {
            HazardMode::Full
        } else {
            HazardMode::Static
        }
    } else {
        mode
    };
    // A progress line while an exact search may run long (only on a terminal).
    let progress = cfg.effort_level() == Effort::Exact && std::io::stderr().is_terminal();
    if progress {
        eprint!(
            "minimising {} ({} variables, exact, budget {} s)...",
            if f.outputs.len() == 1 {
                "1 output".to_string()
            } else {
                format!("{} outputs", f.outputs.len())
            },
            f.vars.len(),
            args.common.budget
        );
    }
    let result = minimize(&f, &cfg);
    if progress {
        eprint!("\r\x1b[2K");
    }
    match result {
        Ok(sol) => {
            let checked = verify::check(&f, &sol, judge);
            report(args, &f, &sol, mode, judge, &checked);
            Ok(0)
        }
        Err(e) => refuse(args, &f, mode, &e),
    }
}

fn refuse(args: &MinimizeArgs, f: &MultiFunction, mode: HazardMode, e: &CoverError) -> CliResult {
    let n = f.vars.len();
    if let CoverError::BudgetExhausted { output, .. } = e {
        // cli.md: a budget that ran out before any valid answer is exit 1, not malformed
        // input.
        if args.common.json {
            print_json(&json!({
                "vars": f.vars,
                "hazards": mode.name(),
                "error": "budget_exhausted",
                "message": e.to_string(),
                "output": output,
                "hazard_free": false,
            }));
        } else {
            eprintln!("{}: {e}", args.function);
        }
        return Ok(1);
    }
    let (output, transition) = match e {
        CoverError::FunctionHazard {
            output, transition, ..
        }
        | CoverError::NoHazardFreeCover {
            output, transition, ..
        } => (output.clone(), *transition),
        other => return Err(CliError::new(format!("{}: {other}", args.function))),
    };
    let kind = match e {
        CoverError::FunctionHazard { .. } => "function_hazard",
        _ => "no_hazard_free_cover",
    };
    if args.common.json {
        print_json(&json!({
            "vars": f.vars,
            "hazards": mode.name(),
            "error": kind,
            "message": e.to_string(),
            "output": output,
            "transition": {
                "start": transition.start,
                "end": transition.end,
                "from": Cube::minterm(n, transition.start).to_string(n),
                "to": Cube::minterm(n, transition.end).to_string(n),
            },
            "hazard_free": false,
        }));
    } else {
        eprintln!("{}: {e}", args.function);
    }
    Ok(1)
}

fn report(
    args: &MinimizeArgs,
    f: &MultiFunction,
    sol: &Solution,
    mode: HazardMode,
    judge: HazardMode,
    checked: &Result<(), Vec<verify::Violation>>,
) {
    let n = f.vars.len();
    let hazard_free_of = |name: &str| match checked {
        Ok(()) => true,
        Err(v) => !v.iter().any(|x| x.output == name),
    };
    let effort = match args.effort {
        ArgEffort::Exact => "exact",
        ArgEffort::Fast => "fast",
    };
    if args.common.json {
        let mut top = Map::new();
        top.insert("vars".into(), json!(f.vars));
        top.insert("hazards".into(), json!(mode.name()));
        top.insert("effort".into(), json!(effort));
        top.insert("cubes".into(), json!(cube_strings(&sol.products, n)));
        top.insert("cube_count".into(), json!(sol.cube_count));
        top.insert("literal_count".into(), json!(sol.literal_count));
        top.insert("hazard_free".into(), json!(checked.is_ok()));
        top.insert("optimal".into(), json!(sol.optimal));
        // ours, beyond the contract: the literal count is minimum among covers of the
        // proven product count too
        top.insert("literals_optimal".into(), json!(sol.literals_optimal));
        top.insert("lower_bound".into(), json!(sol.lower_bound));
        if f.outputs.len() > 1 {
            let mut outs = Map::new();
            for o in &sol.outputs {
                outs.insert(
                    o.name.clone(),
                    json!({
                        "cubes": cube_strings(&o.cubes, n),
                        "cube_count": o.cubes.len(),
                        "literal_count": o.literal_count(),
                        "hazard_free": hazard_free_of(&o.name),
                        "optimal": o.optimal,
                        "lower_bound": o.lower_bound,
                    }),
                );
            }
            top.insert("outputs".into(), Value::Object(outs));
        }
        if let Err(v) = checked {
            top.insert(
                "violations".into(),
                json!(v
                    .iter()
                    .take(50)
                    .map(|x| format!("{}: {}", x.output, x.message))
                    .collect::<Vec<_>>()),
            );
        }
        print_json(&Value::Object(top));
        return;
    }
    let mut s = String::new();
    for o in &sol.outputs {
        s.push_str(&format!("{} = {}\n", o.name, expression(&o.cubes, &f.vars)));
    }
    let plural =
        |k: usize, one: &str, many: &str| format!("{k} {}", if k == 1 { one } else { many });
    let shared = if f.outputs.len() > 1 {
        " (distinct, shared between outputs)"
    } else {
        ""
    };
    s.push_str(&format!(
        "{}, {}{shared}; hazards: {}, effort: {effort}\n",
        plural(sol.cube_count, "product", "products"),
        plural(sol.literal_count, "literal", "literals"),
        mode.name()
    ));
    if sol.optimal && sol.literals_optimal {
        s.push_str(
            "the product count is proven minimum, and the literal count among covers of that \
             many products\n",
        );
    } else if sol.optimal {
        s.push_str(
            "the product count is proven minimum (the literal count was not proven minimum \
             within the budget)\n",
        );
    } else if sol.stats.heuristic {
        s.push_str(&format!(
            "heuristic result: at least {} needed, so at most {} above the minimum\n",
            plural(sol.lower_bound, "product is", "products are"),
            sol.cube_count.saturating_sub(sol.lower_bound)
        ));
    } else {
        s.push_str(&format!(
            "the budget ran out: best found, proven lower bound {}\n",
            plural(sol.lower_bound, "product", "products")
        ));
    }
    match checked {
        Ok(()) => s.push_str(&format!(
            "checked independently: covers the function{}\n",
            match judge {
                HazardMode::Full => ", every listed transition free of logic hazards",
                HazardMode::Static => ", no static-1 hazard for any single-variable change",
                HazardMode::None => "",
            }
        )),
        Err(v) => {
            s.push_str(&format!(
                "not hazard-free under the {} criterion ({}):\n",
                judge.name(),
                plural(v.len(), "finding", "findings")
            ));
            for x in v.iter().take(10) {
                s.push_str(&format!("  {}: {}\n", x.output, x.message));
            }
        }
    }
    s.push_str("products:\n");
    for c in &sol.products {
        s.push_str(&format!("  {}\n", c.to_string(n)));
    }
    print!("{s}");
}
