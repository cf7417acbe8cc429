//! State codes: one bit string per state, all of one width.

use crate::AssignError;
use stillpoint_table::{FlowTable, StateId};

/// One distinct code of `width` bits per state (`width <= 64`).
///
/// Bit convention: a code is its bit string read as a binary number, so `y1`, the
/// leftmost character, is the most significant of the `width` bits.
///
/// # Example
/// ```
/// use stillpoint_assign::Codes;
/// use stillpoint_table::StateId;
/// let c = Codes::new(3, vec![0b000, 0b011, 0b101])?;
/// assert_eq!(c.to_bits(StateId::from_index(1)), "011");
/// assert!(c.bit(StateId::from_index(2), 0)); // y1 of the third state
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
#[derive(Debug, Clone, PartialEq, Eq, Hash, PartialOrd, Ord)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Codes {
    width: usize,
    codes: Vec<u64>,
}

/// The largest code width.
pub const MAX_WIDTH: usize = 64;

fn mask(width: usize) -> u64 {
    if width >= 64 {
        u64::MAX
    } else {
        (1u64 << width) - 1
    }
}

impl Codes {
    /// Codes from one value per state (index = [`StateId::index`]).
    ///
    /// # Errors
    /// [`AssignError::InvalidCodes`] when `width` is over 64, a value does not fit in
    /// `width` bits, or two states share a code.
    pub fn new(width: usize, codes: Vec<u64>) -> Result<Codes, AssignError> {
        if width > MAX_WIDTH {
            return Err(AssignError::InvalidCodes {
                message: format!("width {width} is over the limit of {MAX_WIDTH} bits"),
            });
        }
        for (i, &c) in codes.iter().enumerate() {
            if c & !mask(width) != 0 {
                return Err(AssignError::InvalidCodes {
                    message: format!("the code of state #{i} does not fit in {width} bits"),
                });
            }
        }
        let mut sorted: Vec<(u64, usize)> = codes.iter().copied().zip(0..).collect();
        sorted.sort_unstable();
        for w in sorted.windows(2) {
            if w[0].0 == w[1].0 {
                return Err(AssignError::InvalidCodes {
                    message: format!("states #{} and #{} share one code", w[0].1, w[1].1),
                });
            }
        }
        Ok(Codes { width, codes })
    }

    /// The number of state variables.
    pub fn width(&self) -> usize {
        self.width
    }

    /// The number of states.
    pub fn len(&self) -> usize {
        self.codes.len()
    }

    /// Whether there are no states.
    pub fn is_empty(&self) -> bool {
        self.codes.is_empty()
    }

    /// The code of a state (see the bit convention above).
    ///
    /// # Panics
    /// When the state is out of range.
    pub fn code(&self, s: StateId) -> u64 {
        self.codes[s.index()]
    }

    /// All codes, by state index.
    pub fn as_slice(&self) -> &[u64] {
        &self.codes
    }

    /// The value of variable `var` (0 = `y1`) in the code of `s`.
    ///
    /// # Panics
    /// When the state or the variable is out of range.
    pub fn bit(&self, s: StateId, var: usize) -> bool {
        assert!(var < self.width, "variable out of range");
        self.codes[s.index()] >> (self.width - 1 - var) & 1 == 1
    }

    /// The code of `s` as a bit string, `y1` first: `"011"`.
    pub fn to_bits(&self, s: StateId) -> String {
        bits_string(self.codes[s.index()], self.width)
    }

    /// The state whose code this is, if any.
    pub fn state_of(&self, code: u64) -> Option<StateId> {
        self.codes
            .iter()
            .position(|&c| c == code)
            .map(StateId::from_index)
    }

    /// The codes in the text form of formats.md §3, one `state bits` line per state.
    pub fn to_text(&self, table: &FlowTable) -> String {
        let mut out = String::new();
        for s in table.states() {
            out.push_str(table.state_name(s));
            out.push(' ');
            out.push_str(&self.to_bits(s));
            out.push('\n');
        }
        out
    }

    /// Parses codes in the JSON form (`{"wait": "01", ...}`) or the text form (`wait 01`
    /// lines; `#` starts a comment) of formats.md §3.
    ///
    /// # Errors
    /// [`AssignError::Parse`], located at the offending line and column: a malformed
    /// file, an unknown or repeated state, a character other than `0`/`1`, lengths that
    /// differ, two states with one code, a state left without a code, or a width over 64.
    ///
    /// # Example
    /// ```
    /// # use stillpoint_table::parse_text;
    /// use stillpoint_assign::Codes;
    /// let t = parse_text("inputs x\n  0 1\na (a) b\nb a (b)\n")?;
    /// let c = Codes::parse("a 0\nb 1\n", false, &t)?;
    /// assert_eq!(c.width(), 1);
    /// # Ok::<(), Box<dyn std::error::Error>>(())
    /// ```
    pub fn parse(src: &str, is_json: bool, table: &FlowTable) -> Result<Codes, AssignError> {
        let entries = if is_json {
            entries_json(src)?
        } else {
            entries_text(src)?
        };
        let n = table.num_states();
        let mut codes: Vec<Option<(u64, Loc)>> = vec![None; n];
        let mut width: Option<(usize, Loc)> = None;
        for e in &entries {
            let Some(s) = table.state_by_name(&e.name) else {
                return Err(perr(e.name_loc, format!("unknown state `{}`", e.name)));
            };
            if codes[s.index()].is_some() {
                return Err(perr(
                    e.name_loc,
                    format!("state `{}` is given a code twice", e.name),
                ));
            }
            if e.bits.is_empty() {
                return Err(perr(e.bits_loc, "expected a bit string of `0` and `1`"));
            }
            let mut v = 0u64;
            for (i, ch) in e.bits.chars().enumerate() {
                if ch != '0' && ch != '1' {
                    let loc = Loc {
                        line: e.bits_loc.line,
                        col: e.bits_loc.col + i + e.bits_shift,
                    };
                    return Err(perr(
                        loc,
                        format!("expected `0` or `1`, found `{}`", ch.escape_debug()),
                    ));
                }
                if i >= MAX_WIDTH {
                    return Err(perr(
                        e.bits_loc,
                        format!("a code may have at most {MAX_WIDTH} bits"),
                    ));
                }
                v = v << 1 | u64::from(ch == '1');
            }
            let len = e.bits.chars().count();
            match width {
                None => width = Some((len, e.bits_loc)),
                Some((w, first)) if w != len => {
                    return Err(perr(
                        e.bits_loc,
                        format!(
                            "code of `{}` has {len} bits, but the first code (line {}) has {w}",
                            e.name, first.line
                        ),
                    ))
                }
                _ => {}
            }
            if let Some(other) = codes.iter().position(|c| c.is_some_and(|(cv, _)| cv == v)) {
                return Err(perr(
                    e.bits_loc,
                    format!(
                        "state `{}` has the same code as state `{}`",
                        e.name,
                        table.state_name(StateId::from_index(other))
                    ),
                ));
            }
            codes[s.index()] = Some((v, e.bits_loc));
        }
        let end = end_loc(src, is_json, &entries);
        for s in table.states() {
            if codes[s.index()].is_none() {
                return Err(perr(
                    end,
                    format!("state `{}` has no code", table.state_name(s)),
                ));
            }
        }
        let width = width.map_or(0, |w| w.0);
        Codes::new(
            width,
            codes.into_iter().map(|c| c.map_or(0, |x| x.0)).collect(),
        )
    }
}

/// A code as a string of `width` bits, most significant first.
pub fn bits_string(code: u64, width: usize) -> String {
    (0..width)
        .map(|i| {
            if code >> (width - 1 - i) & 1 == 1 {
                '1'
            } else {
                '0'
            }
        })
        .collect()
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
struct Loc {
    line: usize,
    col: usize,
}

struct Entry {
    name: String,
    name_loc: Loc,
    bits: String,
    bits_loc: Loc,
    /// Offset from `bits_loc` to the first character (1 for a JSON string's quote).
    bits_shift: usize,
}

fn perr(loc: Loc, message: impl Into<String>) -> AssignError {
    AssignError::Parse {
        line: loc.line,
        col: loc.col,
        message: message.into(),
    }
}

fn entries_text(src: &str) -> Result<Vec<Entry>, AssignError> {
    let mut out = Vec::new();
    for (ln, line) in src.lines().enumerate() {
        let body = line.split('#').next().unwrap_or("");
        let mut words = Vec::new();
        let mut start = None;
        for (i, ch) in body
            .char_indices()
            .chain(std::iter::once((body.len(), ' ')))
        {
            if ch.is_whitespace() {
                if let Some(s) = start.take() {
                    words.push((s, &body[s..i]));
                }
            } else if start.is_none() {
                start = Some(i);
            }
        }
        if words.is_empty() {
            continue;
        }
        let col = |byte: usize| body[..byte].chars().count() + 1;
        let (s0, name) = words[0];
        let name_loc = Loc {
            line: ln + 1,
            col: col(s0),
        };
        let (bits, bits_loc) = match words.get(1) {
            Some(&(s1, b)) => (
                b.to_string(),
                Loc {
                    line: ln + 1,
                    col: col(s1),
                },
            ),
            None => (
                String::new(),
                Loc {
                    line: ln + 1,
                    col: body.chars().count() + 1,
                },
            ),
        };
        if let Some(&(s2, _)) = words.get(2) {
            return Err(perr(
                Loc {
                    line: ln + 1,
                    col: col(s2),
                },
                "expected one bit string after the state name",
            ));
        }
        let e = Entry {
            name: name.to_string(),
            name_loc,
            bits,
            bits_loc,
            bits_shift: 0,
        };
        out.push(e);
    }
    Ok(out)
}

fn entries_json(src: &str) -> Result<Vec<Entry>, AssignError> {
    let v = stillpoint_json::parse(src).map_err(|e| {
        perr(
            Loc {
                line: e.pos.line,
                col: e.pos.col,
            },
            e.message,
        )
    })?;
    let at = |p: stillpoint_json::Pos| Loc {
        line: p.line,
        col: p.col,
    };
    let Some(members) = v.as_object() else {
        return Err(perr(
            at(v.pos),
            format!("expected an object of state codes, found {}", v.type_name()),
        ));
    };
    let mut out = Vec::new();
    for m in members {
        let Some(bits) = m.value.as_str() else {
            return Err(perr(
                at(m.value.pos),
                format!("expected a bit string, found {}", m.value.type_name()),
            ));
        };
        out.push(Entry {
            name: m.key.clone(),
            name_loc: at(m.key_pos),
            bits: bits.to_string(),
            bits_loc: at(m.value.pos),
            bits_shift: 1,
        });
    }
    Ok(out)
}

fn end_loc(src: &str, is_json: bool, _entries: &[Entry]) -> Loc {
    if is_json {
        // The object that lacks the key.
        if let Ok(v) = stillpoint_json::parse(src) {
            return Loc {
                line: v.pos.line,
                col: v.pos.col,
            };
        }
    }
    let lines = src.lines().count();
    Loc {
        line: lines.max(1),
        col: 1,
    }
}
