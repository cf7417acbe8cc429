//! `stillpoint synth` and `stillpoint demo`.

use super::args::{Changes, DemoArgs, Method, SynthArgs};
use super::CAUTION;
use super::{print_json, read_input, write_file, CliError, CliResult, Input};
use std::time::Duration;
use stillpoint::report::{to_json, to_markdown};
use stillpoint::sim::DelayModel;
use stillpoint::synth::{synthesize, Design, SynthConfig};
use stillpoint::table::{parse_json, parse_text, ChangeMode, FlowTable};
use stillpoint::verilog::{self, Header, VerilogError};

/// The bundled demonstration table.
const DEMO: &str = include_str!("../../demos/interlock.flow");

/// The library settings for what the user typed.
fn config(args: &SynthArgs) -> SynthConfig {
    let budget = if args.common.budget.is_finite() && args.common.budget >= 0.0 {
        Duration::from_secs_f64(args.common.budget.min(1e9))
    } else {
        Duration::from_secs(60)
    };
    SynthConfig::default()
        .method(args.method.into())
        .reduce(!args.no_reduce)
        .changes(match args.changes {
            Changes::Single => ChangeMode::Single,
            Changes::Multiple => ChangeMode::Multiple,
        })
        .delay_model(if args.strict {
            DelayModel::Unbounded
        } else {
            DelayModel::FeedbackDelay
        })
        .budget(budget)
}

fn parse(input: &Input) -> Result<FlowTable, CliError> {
    let r = if input.is_json {
        parse_json(&input.text)
    } else {
        parse_text(&input.text)
    };
    r.map_err(|e| CliError::at(&input.name, e.line(), e.column(), e.message()))
}

/// The module name: the table's name, else the file stem.
fn stem(name: &str) -> String {
    let base = name.rsplit('/').next().unwrap_or(name);
    let stem = base.split('.').next().unwrap_or(base);
    let s: String = stem
        .chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || c == '_' {
                c
            } else {
                '_'
            }
        })
        .collect();
    match s.chars().next() {
        Some(c) if c.is_ascii_alphabetic() || c == '_' => s,
        _ => format!("m_{s}"),
    }
}

/// Locates a name the netlist refuses in the table file: the first whole-word occurrence
/// outside comments (text), or the first quoted occurrence (JSON).
fn locate(input: &Input, name: &str) -> (usize, usize) {
    for (i, line) in input.text.lines().enumerate() {
        let code = if input.is_json {
            line
        } else {
            line.split('#').next().unwrap_or("")
        };
        let mut from = 0;
        while let Some(p) = code[from..].find(name) {
            let at = from + p;
            let before = code[..at].chars().next_back();
            let after = code[at + name.len()..].chars().next();
            let word = |c: Option<char>| c.is_some_and(|c| c.is_ascii_alphanumeric() || c == '_');
            let ok = if input.is_json {
                before == Some('"') && after == Some('"')
            } else {
                !word(before) && !word(after)
            };
            if ok {
                let col = code[..at].chars().count() + 1 - usize::from(input.is_json);
                return (i + 1, col);
            }
            from = at + name.len();
        }
    }
    (1, 1)
}

fn header(d: &Design, what: &str) -> Header {
    Header {
        title: format!(
            "{what} for flow table `{}`, written by stillpoint {}",
            d.module_name("?"),
            env!("CARGO_PKG_VERSION")
        ),
        paragraphs: vec![
            CAUTION.to_string(),
            format!("Delay model: {}.", d.verification.model.describe()),
            "Ports: the table's inputs and outputs, then the state variables y1..yk. The \
             feedback nets are y1..yk: force and release them to start the design in any state."
                .to_string(),
        ],
    }
}

fn verilog_err(input: &Input, e: VerilogError) -> CliError {
    let (line, col) = locate(input, e.name());
    CliError::at(&input.name, line, col, e)
}

fn run(input: &Input, args: &SynthArgs, human: bool) -> CliResult {
    let table = parse(input)?;
    let fallback = stem(&input.name);
    let module = table
        .name()
        .map(str::to_string)
        .unwrap_or_else(|| fallback.clone());
    // Refuse names the netlist cannot carry before any work is done.
    if args.verilog.is_some() || args.testbench.is_some() {
        verilog::check_names(&module, table.input_names(), table.output_names())
            .map_err(|e| verilog_err(input, e))?;
    }
    let design = match synthesize(&table, &config(args)) {
        Ok(d) => d,
        Err(e) => {
            if args.common.json {
                print_json(&serde_json::json!({
                    "states_before": table.num_states(),
                    "error": e.to_string(),
                    "warnings": [],
                    "verification": {"transitions": 0, "races": 0, "hazards": 0, "ok": false},
                }));
            }
            eprintln!("{}: {e}", input.name);
            return Ok(1);
        }
    };
    if let Some(path) = &args.verilog {
        let v = verilog::netlist(
            &design.network,
            &module,
            &header(&design, "Structural netlist"),
        )
        .map_err(|e| verilog_err(input, e))?;
        write_file(path, &v)?;
    }
    if let Some(path) = &args.testbench {
        let tb = verilog::testbench(
            &design.network,
            &module,
            &design.checks(),
            &header(&design, "Self-checking test bench"),
        )
        .map_err(|e| verilog_err(input, e))?;
        write_file(path, &tb)?;
    }
    let written = match &args.pictures {
        Some(dir) => write_pictures(&design, dir)?,
        None => Vec::new(),
    };
    let mut md = to_markdown(&design, &fallback);
    if !written.is_empty() {
        let base = args
            .report
            .as_deref()
            .map(std::path::Path::new)
            .and_then(|p| p.parent());
        md.push_str(&pictures_section(&written, base));
    }
    if let Some(path) = &args.report {
        write_file(path, &md)?;
    }
    if args.common.json {
        print_json(&to_json(&design));
    } else if human {
        print!("{md}");
    }
    Ok(if design.verification.ok { 0 } else { 1 })
}

/// Writes the design's pictures (code cube, maps, flow graph as SVG and DOT) into `dir`
/// and returns the files written.
fn write_pictures(design: &Design, dir: &str) -> Result<Vec<std::path::PathBuf>, CliError> {
    let (cube, maps, left_out, graph) = stillpoint::pictures::design_pictures(design);
    let written = stillpoint::pictures::write_all(std::path::Path::new(dir), &cube, &maps, &graph)
        .map_err(|e| CliError::new(format!("{dir}: cannot write pictures: {e}")))?;
    if !left_out.is_empty() {
        eprintln!(
            "note: no map for {} (more than {} variables)",
            left_out.join(", "),
            stillpoint::pictures::MAX_MAP_VARS
        );
    }
    Ok(written)
}

/// The report's section embedding the pictures, linked relative to the report's folder
/// when the pictures lie inside it (else by the path as written).
fn pictures_section(
    written: &[std::path::PathBuf],
    report_dir: Option<&std::path::Path>,
) -> String {
    let mut out = String::from("\n## Pictures\n\n");
    for p in written {
        let link = report_dir
            .filter(|d| !d.as_os_str().is_empty())
            .and_then(|d| p.strip_prefix(d).ok())
            .unwrap_or(p);
        let link = link.to_string_lossy().replace('\\', "/");
        let stem = p
            .file_stem()
            .map(|s| s.to_string_lossy().into_owned())
            .unwrap_or_default();
        if p.extension().is_some_and(|e| e == "svg") {
            out.push_str(&format!("![{stem}]({link})\n\n"));
        } else {
            out.push_str(&format!("- [{stem} (Graphviz DOT)]({link})\n"));
        }
    }
    out
}

/// Runs `synth`.
pub fn run_synth(args: &SynthArgs) -> CliResult {
    let input = read_input(&args.table)?;
    run(&input, args, true)
}

/// Runs `demo`.
pub fn run_demo(args: &DemoArgs) -> CliResult {
    let input = Input {
        name: "interlock.flow".into(),
        is_json: false,
        text: DEMO.to_string(),
    };
    let synth = SynthArgs {
        table: input.name.clone(),
        method: Method::Tracey,
        no_reduce: false,
        changes: Changes::Single,
        strict: false,
        verilog: None,
        testbench: None,
        pictures: None,
        report: None,
        common: args.common.clone(),
    };
    run(&input, &synth, true)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn pictures_are_linked_relative_to_the_report() {
        let written = [
            std::path::PathBuf::from("out/pics/cube.svg"),
            std::path::PathBuf::from("out/pics/flow.dot"),
        ];
        let md = pictures_section(&written, Some(std::path::Path::new("out")));
        assert!(md.contains("![cube](pics/cube.svg)"), "{md}");
        assert!(md.contains("[flow (Graphviz DOT)](pics/flow.dot)"), "{md}");
        let md = pictures_section(&written, Some(std::path::Path::new("elsewhere")));
        assert!(md.contains("![cube](out/pics/cube.svg)"), "{md}");
    }

    #[test]
    fn names_are_located() {
        let input = Input {
            name: "t.flow".into(),
            is_json: false,
            text: "# wire here is a comment\ninputs a wire\n  00\n".into(),
        };
        assert_eq!(locate(&input, "wire"), (2, 10));
        assert_eq!(stem("dir/my-table.flow"), "my_table");
    }

    #[test]
    fn the_demo_table_parses() {
        assert!(parse_text(DEMO).is_ok());
    }
}
