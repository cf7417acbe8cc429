//! The thin command line: parse, call the library, print, map to exit codes.
//!
//! Each command lives in its own file and exposes `run(&Args) -> CliResult`.

pub mod args;
pub mod check;
pub mod minimize;
pub mod races;
pub mod synth;

use std::fmt;
use std::io::Read;

/// A failure that ends the command with exit status 2 (usage error or malformed input).
///
/// `message` is printed as one line on stderr; for input errors it is already in the
/// `FILE:LINE:COL: message` form.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct CliError {
    /// The one-line message.
    pub message: String,
}

impl CliError {
    /// A usage or input error with a ready message.
    pub fn new(message: impl Into<String>) -> Self {
        CliError {
            message: one_line(&message.into()),
        }
    }

    /// An error located in a file: `FILE:LINE:COL: message`.
    pub fn at(file: &str, line: usize, col: usize, message: impl fmt::Display) -> Self {
        CliError {
            message: one_line(&format!("{file}:{line}:{col}: {message}")),
        }
    }
}

/// The contract prints an error as one line: control characters that reached a message
/// (from names in the user's input) are shown escaped.
fn one_line(s: &str) -> String {
    s.chars()
        .map(|c| {
            if c.is_control() {
                c.escape_debug().to_string()
            } else {
                c.to_string()
            }
        })
        .collect()
}

impl fmt::Display for CliError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message)
    }
}

/// Exit status 0 (done) or 1 (well-formed input, but the job cannot be done as asked),
/// or a [`CliError`] (exit 2).
pub type CliResult = Result<u8, CliError>;

/// An input file read into memory, with the name to use in messages.
#[derive(Debug, Clone)]
pub struct Input {
    /// The name to report: the path, or `<stdin>` for `-`.
    pub name: String,
    /// Whether the file is read as JSON (its name ends `.json`).
    pub is_json: bool,
    /// The contents, as UTF-8 text.
    pub text: String,
}

/// Reads `path` (or stdin for `-`). Invalid UTF-8 is reported at its line and column.
pub fn read_input(path: &str) -> Result<Input, CliError> {
    let (name, bytes) = if path == "-" {
        let mut buf = Vec::new();
        std::io::stdin()
            .read_to_end(&mut buf)
            .map_err(|e| CliError::at("<stdin>", 1, 1, format!("cannot read: {e}")))?;
        ("<stdin>".to_string(), buf)
    } else {
        let bytes = std::fs::read(path)
            .map_err(|e| CliError::at(path, 1, 1, format!("cannot read file: {e}")))?;
        (path.to_string(), bytes)
    };
    let text = match String::from_utf8(bytes) {
        Ok(t) => t,
        Err(e) => {
            let good = &e.as_bytes()[..e.utf8_error().valid_up_to()];
            let line = 1 + good.iter().filter(|&&b| b == b'\n').count();
            let col = 1 + good.iter().rev().take_while(|&&b| b != b'\n').count();
            return Err(CliError::at(
                &name,
                line,
                col,
                "invalid UTF-8: expected text",
            ));
        }
    };
    Ok(Input {
        is_json: path.ends_with(".json"),
        name,
        text,
    })
}

/// Prints a JSON value on stdout, pretty and with a trailing newline.
pub fn print_json(value: &serde_json::Value) {
    println!(
        "{}",
        serde_json::to_string_pretty(value).unwrap_or_else(|_| "{}".into())
    );
}

/// Writes a file, mapping I/O failures to exit status 2.
pub fn write_file(path: &str, contents: &str) -> Result<(), CliError> {
    std::fs::write(path, contents)
        .map_err(|e| CliError::new(format!("{path}: cannot write file: {e}")))
}

/// The caution every report carries (one text, kept in the library's report module).
pub use stillpoint::report::CAUTION;
