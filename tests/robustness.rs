//! Robustness: the malformed-input corpus (`tests/data/bad/`), resource limits, deep
//! recursion, determinism across runs and thread counts, budgets, fuzz regressions.
//!
//! Everything here drives the built `stillpoint` binary as a user would, with a timeout
//! so that no input can hang the suite, and calls the library parsers directly inside
//! `catch_unwind` to be sure that they return a typed error instead of panicking.

use std::io::{Read, Write};
use std::path::PathBuf;
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

/// The generous ceiling for one run of the binary in these tests. A run that takes longer
/// is killed and the test fails: it means an input can hang the program.
const TIMEOUT: Duration = Duration::from_secs(60);

fn bin() -> &'static str {
    env!("CARGO_BIN_EXE_stillpoint")
}

fn repo() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn bad_dir() -> PathBuf {
    repo().join("tests/data/bad")
}

/// What one run of the binary gave.
#[derive(Debug)]
struct Outcome {
    /// The exit code (`None` if killed by a signal or by the timeout).
    code: Option<i32>,
    stdout: Vec<u8>,
    stderr: String,
    elapsed: Duration,
    timed_out: bool,
}

impl Outcome {
    fn stdout_text(&self) -> String {
        String::from_utf8_lossy(&self.stdout).into_owned()
    }

    /// Whether the command is still a stub in this build.
    fn not_implemented(&self) -> bool {
        self.stderr.contains("not implemented yet")
    }
}

/// Runs the binary with `args` (from the repository root), killing it after `timeout`.
fn run_env(args: &[&str], env: &[(&str, &str)], stdin: &[u8], timeout: Duration) -> Outcome {
    let start = Instant::now();
    let mut cmd = Command::new(bin());
    cmd.args(args)
        .current_dir(repo())
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped());
    for (k, v) in env {
        cmd.env(k, v);
    }
    let mut child = cmd.spawn().expect("spawn stillpoint");
    // Feed stdin and drain the pipes on threads so that a large output cannot block.
    let mut sin = child.stdin.take().expect("stdin");
    let input = stdin.to_vec();
    let feeder = std::thread::spawn(move || {
        let _ = sin.write_all(&input);
    });
    let mut sout = child.stdout.take().expect("stdout");
    let out_reader = std::thread::spawn(move || {
        let mut v = Vec::new();
        let _ = sout.read_to_end(&mut v);
        v
    });
    let mut serr = child.stderr.take().expect("stderr");
    let err_reader = std::thread::spawn(move || {
        let mut v = Vec::new();
        let _ = serr.read_to_end(&mut v);
        v
    });
    let mut timed_out = false;
    let status = loop {
        match child.try_wait().expect("wait") {
            Some(s) => break s,
            None if start.elapsed() > timeout => {
                timed_out = true;
                let _ = child.kill();
                break child.wait().expect("wait after kill");
            }
            None => std::thread::sleep(Duration::from_millis(5)),
        }
    };
    let _ = feeder.join();
    let stdout = out_reader.join().unwrap_or_default();
    let stderr = String::from_utf8_lossy(&err_reader.join().unwrap_or_default()).into_owned();
    Outcome {
        code: status.code(),
        stdout,
        stderr,
        elapsed: start.elapsed(),
        timed_out,
    }
}

fn run(args: &[&str]) -> Outcome {
    run_env(args, &[], b"", TIMEOUT)
}

/// Checks the exit-2 contract: status 2, stderr exactly one line `PATH:LINE:COL: message`.
/// Returns `(line, col, message)` or a description of what is wrong.
fn located_error(out: &Outcome, path: &str) -> Result<(usize, usize, String), String> {
    if out.timed_out {
        return Err(format!("timed out after {:?}", out.elapsed));
    }
    if out.code != Some(2) {
        return Err(format!(
            "exit status {:?}, expected 2; stderr: {}",
            out.code, out.stderr
        ));
    }
    let text = out.stderr.strip_suffix('\n').unwrap_or(&out.stderr);
    if text.is_empty() || text.contains('\n') {
        return Err(format!("stderr is not exactly one line: {:?}", out.stderr));
    }
    let rest = text
        .strip_prefix(path)
        .and_then(|r| r.strip_prefix(':'))
        .ok_or_else(|| format!("stderr does not start with `{path}:`: {text}"))?;
    let mut parts = rest.splitn(3, ':');
    let line = parts.next().and_then(|s| s.parse::<usize>().ok());
    let col = parts.next().and_then(|s| s.parse::<usize>().ok());
    let msg = parts.next().and_then(|s| s.strip_prefix(' '));
    match (line, col, msg) {
        (Some(l), Some(c), Some(m)) if l >= 1 && c >= 1 && !m.trim().is_empty() => {
            Ok((l, c, m.to_string()))
        }
        _ => Err(format!("stderr is not `{path}:LINE:COL: message`: {text}")),
    }
}

/// One row of `tests/data/bad/expect.txt`.
#[derive(Debug, Clone)]
struct Row {
    file: String,
    command: String,
    line: usize,
    col: usize,
    substring: String,
}

fn manifest() -> Vec<Row> {
    let text = std::fs::read_to_string(bad_dir().join("expect.txt")).expect("read expect.txt");
    let mut rows = Vec::new();
    for (i, raw) in text.lines().enumerate() {
        let l = raw.trim();
        if l.is_empty() || l.starts_with('#') {
            continue;
        }
        let mut it = l.splitn(4, char::is_whitespace).filter(|s| !s.is_empty());
        let file = it.next().expect("file").to_string();
        let rest = l[file.len()..].trim_start();
        let (command, rest) = rest.split_once(char::is_whitespace).expect("command");
        let rest = rest.trim_start();
        let (loc, substring) = rest.split_once(char::is_whitespace).unwrap_or((rest, ""));
        let (line, col) = loc
            .split_once(':')
            .unwrap_or_else(|| panic!("expect.txt:{}: bad location", i + 1));
        rows.push(Row {
            file,
            command: command.to_string(),
            line: line.parse().expect("line"),
            col: col.parse().expect("col"),
            substring: substring.trim().to_string(),
        });
    }
    rows
}

fn args_for(row: &Row, rel: &str) -> Vec<String> {
    match row.command.as_str() {
        "check" | "reduce" | "assign" | "minimize" | "synth" => {
            vec![row.command.clone(), rel.to_string(), "--json".into()]
        }
        "races" => vec![
            "races".into(),
            "tests/data/bad/base/codes-base.flow".into(),
            "--codes".into(),
            rel.to_string(),
            "--json".into(),
        ],
        other => panic!("expect.txt: unknown command `{other}` for {}", row.file),
    }
}

/// Every file of the corpus has a manifest row and every row a file.
#[test]
fn bad_corpus_manifest_is_complete() {
    let rows = manifest();
    let mut listed: Vec<String> = rows.iter().map(|r| r.file.clone()).collect();
    listed.sort();
    let mut dup = listed.clone();
    dup.dedup();
    assert_eq!(
        dup.len(),
        listed.len(),
        "a file is listed twice in expect.txt"
    );
    let mut files: Vec<String> = std::fs::read_dir(bad_dir())
        .expect("read bad/")
        .filter_map(|e| e.ok())
        .filter(|e| e.file_type().map(|t| t.is_file()).unwrap_or(false))
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .filter(|n| n != "expect.txt" && n != "README.md")
        .collect();
    files.sort();
    assert_eq!(
        listed, files,
        "expect.txt and the files of tests/data/bad/ differ"
    );
}

/// The binary refuses every corpus file with exit 2 and one located line on stderr.
#[test]
fn bad_corpus_through_the_binary() {
    let rows = manifest();
    let mut failures = Vec::new();
    let mut skipped = Vec::new();
    for row in &rows {
        let rel = format!("tests/data/bad/{}", row.file);
        let args = args_for(row, &rel);
        let argv: Vec<&str> = args.iter().map(String::as_str).collect();
        let out = run(&argv);
        if out.not_implemented() {
            skipped.push(format!("{} ({})", row.file, row.command));
            continue;
        }
        match located_error(&out, &rel) {
            Err(e) => failures.push(format!("{}: {e}", row.file)),
            Ok((line, col, msg)) => {
                if (line, col) != (row.line, row.col) {
                    failures.push(format!(
                        "{}: located at {line}:{col}, expected {}:{} ({msg})",
                        row.file, row.line, row.col
                    ));
                } else if !msg.to_lowercase().contains(&row.substring.to_lowercase()) {
                    failures.push(format!(
                        "{}: message `{msg}` lacks `{}`",
                        row.file, row.substring
                    ));
                }
            }
        }
    }
    if !skipped.is_empty() {
        eprintln!(
            "bad corpus: {} of {} rows skipped (command not implemented yet): {}",
            skipped.len(),
            rows.len(),
            skipped.join(", ")
        );
    }
    assert!(
        failures.is_empty(),
        "{} corpus failures:\n{}",
        failures.len(),
        failures.join("\n")
    );
}

/// Reads a corpus file as the library would get it (lossy for invalid UTF-8, which the
/// binary refuses before any parser sees it).
fn corpus_text(file: &str) -> Option<String> {
    let bytes = std::fs::read(bad_dir().join(file)).expect("read corpus file");
    String::from_utf8(bytes).ok()
}

/// Calls `f` and fails with `what` if it panics.
fn no_panic<T>(what: &str, f: impl FnOnce() -> T) -> T {
    match std::panic::catch_unwind(std::panic::AssertUnwindSafe(f)) {
        Ok(v) => v,
        Err(_) => panic!("{what}: the parser panicked"),
    }
}

/// Exit status is never 101 (a panic) on any corpus file, whatever the command.
#[test]
fn bad_corpus_never_panics_any_command() {
    let rows = manifest();
    for row in &rows {
        let rel = format!("tests/data/bad/{}", row.file);
        let cmds: &[&str] = match row.command.as_str() {
            "check" => &["check", "reduce", "assign"],
            "minimize" => &["minimize"],
            _ => &[],
        };
        for cmd in cmds {
            let out = run(&[cmd, &rel]);
            assert!(!out.timed_out, "{cmd} {rel}: timed out");
            assert_ne!(out.code, Some(101), "{cmd} {rel}: panicked: {}", out.stderr);
            assert!(
                out.code.is_some(),
                "{cmd} {rel}: killed by a signal: {}",
                out.stderr
            );
        }
    }
}

/// What a library parser said about a corpus file: `Some((line, col, message))` for a
/// located error, `None` when this parser has not landed or the file is not its kind.
type LibVerdict = Option<Result<(usize, usize, String), String>>;

/// Calls the library parser for `row` directly (inside `catch_unwind`).
fn library_verdict(row: &Row) -> LibVerdict {
    let Some(src) = corpus_text(&row.file) else {
        return None; // invalid UTF-8 never reaches a parser: the binary refuses it first
    };
    let json = row.file.ends_with(".json");
    match row.command.as_str() {
        "check" => {
            let r = no_panic(&row.file, || {
                if json {
                    stillpoint::table::parse_json(&src)
                } else {
                    stillpoint::table::parse_text(&src)
                }
            });
            Some(match r {
                Ok(t) => Err(format!("accepted: {} states", t.num_states())),
                Err(e) => Ok((e.line(), e.column(), e.message().to_string())),
            })
        }
        _ => None,
    }
}

/// The library parsers refuse every corpus file of their kind with a typed, located error
/// (and never panic), at the manifest's location.
#[test]
fn bad_corpus_through_the_library() {
    let rows = manifest();
    let mut failures = Vec::new();
    let mut checked = 0;
    for row in &rows {
        let Some(verdict) = library_verdict(row) else {
            continue;
        };
        checked += 1;
        match verdict {
            Err(e) => failures.push(format!("{}: {e}", row.file)),
            Ok((line, col, msg)) => {
                if (line, col) != (row.line, row.col) {
                    failures.push(format!(
                        "{}: located at {line}:{col}, expected {}:{} ({msg})",
                        row.file, row.line, row.col
                    ));
                } else if !msg.to_lowercase().contains(&row.substring.to_lowercase()) {
                    failures.push(format!(
                        "{}: message `{msg}` lacks `{}`",
                        row.file, row.substring
                    ));
                }
            }
        }
    }
    eprintln!(
        "bad corpus: {checked} of {} rows checked through the library",
        rows.len()
    );
    assert!(
        failures.is_empty(),
        "{} library failures:\n{}",
        failures.len(),
        failures.join("\n")
    );
}

// ---------------------------------------------------------------------------------------
// Determinism: byte-identical JSON across runs and across RAYON_NUM_THREADS=1 and 2.
// ---------------------------------------------------------------------------------------

/// Corpus tables (written by the table stage) that every determinism run uses.
const DETERMINISM_TABLES: &[&str] = &[
    "tests/data/toggle.flow",
    "tests/data/handshake.flow",
    "tests/data/redundant_rows.flow",
    "tests/data/lift_door.flow",
    "tests/data/valve_sequencer.json",
];

/// JSON keys whose values are wall-clock measurements: the one part of a report that may
/// differ between runs. Their values are blanked before comparing; everything else must be
/// byte-identical.
const TIMING_KEYS: &[&str] = &[
    "seconds",
    "milliseconds",
    "elapsed",
    "time_ms",
    "wall_seconds",
];

/// The stdout of a run with the values of [`TIMING_KEYS`] blanked (line by line, so the
/// comparison still sees every other byte, including key order and layout).
fn without_timings(stdout: &[u8]) -> String {
    let text = String::from_utf8_lossy(stdout);
    let mut out = String::with_capacity(text.len());
    for line in text.lines() {
        let t = line.trim_start();
        let timing = TIMING_KEYS
            .iter()
            .any(|k| t.starts_with(&format!("\"{k}\": ")));
        if timing {
            let (key, _) = line.split_once(": ").unwrap_or((line, ""));
            let comma = if line.trim_end().ends_with(',') {
                ","
            } else {
                ""
            };
            out.push_str(&format!("{key}: <time>{comma}"));
        } else {
            out.push_str(line);
        }
        out.push('\n');
    }
    out
}

/// Runs `args` three times (1 thread, 2 threads, 2 threads again) and asserts the same
/// stdout bytes and exit status each time. Returns `false` if the command is a stub.
fn assert_deterministic(args: &[&str]) -> bool {
    let mut first: Option<Outcome> = None;
    for threads in ["1", "2", "2"] {
        let out = run_env(args, &[("RAYON_NUM_THREADS", threads)], b"", TIMEOUT);
        if out.not_implemented() {
            return false;
        }
        assert!(!out.timed_out, "{args:?}: timed out");
        assert!(
            matches!(out.code, Some(0 | 1)),
            "{args:?}: exit {:?}: {}",
            out.code,
            out.stderr
        );
        match &first {
            None => first = Some(out),
            Some(f) => {
                assert_eq!(
                    f.code, out.code,
                    "{args:?}: exit status differs with {threads} threads"
                );
                assert!(
                    without_timings(&f.stdout) == without_timings(&out.stdout),
                    "{args:?}: stdout differs with RAYON_NUM_THREADS={threads}:\n{}\n---\n{}",
                    f.stdout_text(),
                    out.stdout_text()
                );
            }
        }
    }
    true
}

#[test]
fn same_bytes_whatever_the_thread_count() {
    let mut skipped = Vec::new();
    let mut ran = 0;
    for table in DETERMINISM_TABLES {
        let cmds: Vec<Vec<&str>> = vec![
            vec!["check", table, "--json"],
            vec!["reduce", table, "--json"],
            vec!["assign", table, "--json"],
            vec!["assign", table, "--json", "--method", "tracey-fast"],
            vec!["synth", table, "--json"],
        ];
        for args in cmds {
            if assert_deterministic(&args) {
                ran += 1;
            } else {
                skipped.push(args.join(" "));
            }
        }
    }
    eprintln!("determinism: {ran} commands compared; skipped (not implemented): {skipped:?}");
    assert!(ran > 0);
}
