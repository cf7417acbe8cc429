//! A JSON reader that keeps positions.
//!
//! [`parse`] turns JSON text into a [`Value`] tree in which every value and every object
//! key carries its 1-based line and column ([`Pos`]). Stillpoint's readers use those
//! positions to report semantic errors (an unknown state, a wrong type, a missing key)
//! as `FILE:LINE:COL: message`. Object members keep their file order and duplicates, so
//! a reader can refuse a duplicate key at its own position.
//!
//! The reader follows RFC 8259 (strings with escapes and surrogate pairs, numbers as
//! written), refuses trailing data, limits nesting to [`MAX_DEPTH`] so that hostile
//! input cannot overflow the stack, and never panics.
//!
//! # Example
//! ```
//! let v = stillpoint_json::parse("{\"states\": [\"idle\",\n 7]}")?;
//! let states = v.get("states").and_then(|s| s.as_array()).unwrap();
//! assert_eq!(states[0].as_str(), Some("idle"));
//! assert_eq!((states[1].pos.line, states[1].pos.col), (2, 2));
//! assert_eq!(states[1].type_name(), "number");
//! # Ok::<(), Box<dyn std::error::Error>>(())
//! ```
#![forbid(unsafe_code)]
#![deny(missing_docs)]

use std::fmt;

/// The deepest nesting of arrays and objects [`parse`] accepts.
pub const MAX_DEPTH: usize = 128;

/// A 1-based line and column (columns count characters, not bytes).
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Default)]
pub struct Pos {
    /// Line, from 1.
    pub line: usize,
    /// Column, from 1.
    pub col: usize,
}

/// A number as written in the file.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Number {
    /// The text of the number, e.g. `-12`, `3.5e2`.
    pub text: String,
}

impl Number {
    /// The value as a non-negative integer, if it is one that fits in `u64`.
    pub fn as_u64(&self) -> Option<u64> {
        self.text.parse().ok()
    }

    /// The value as a float, if it parses as one.
    pub fn as_f64(&self) -> Option<f64> {
        self.text.parse().ok()
    }
}

/// One `"key": value` member of an object.
#[derive(Debug, Clone, PartialEq)]
pub struct Member {
    /// The key, unescaped.
    pub key: String,
    /// Where the key's opening quote stands.
    pub key_pos: Pos,
    /// The member's value.
    pub value: Value,
}

/// What a value is.
#[derive(Debug, Clone, PartialEq)]
pub enum Kind {
    /// `null`.
    Null,
    /// `true` or `false`.
    Bool(bool),
    /// A number, kept as written.
    Number(Number),
    /// A string, unescaped.
    String(String),
    /// An array.
    Array(Vec<Value>),
    /// An object, members in file order (duplicates kept).
    Object(Vec<Member>),
}

/// A JSON value with the position of its first character.
#[derive(Debug, Clone, PartialEq)]
pub struct Value {
    /// Where the value starts.
    pub pos: Pos,
    /// The value itself.
    pub kind: Kind,
}

impl Value {
    /// The first member named `key`, if this is an object that has one.
    pub fn get(&self, key: &str) -> Option<&Value> {
        self.as_object()?
            .iter()
            .find(|m| m.key == key)
            .map(|m| &m.value)
    }

    /// The JSON type name: `null`, `boolean`, `number`, `string`, `array` or `object`.
    pub fn type_name(&self) -> &'static str {
        match self.kind {
            Kind::Null => "null",
            Kind::Bool(_) => "boolean",
            Kind::Number(_) => "number",
            Kind::String(_) => "string",
            Kind::Array(_) => "array",
            Kind::Object(_) => "object",
        }
    }

    /// Whether this is `null`.
    pub fn is_null(&self) -> bool {
        matches!(self.kind, Kind::Null)
    }

    /// The string, if this is one.
    pub fn as_str(&self) -> Option<&str> {
        match &self.kind {
            Kind::String(s) => Some(s),
            _ => None,
        }
    }

    /// The elements, if this is an array.
    pub fn as_array(&self) -> Option<&[Value]> {
        match &self.kind {
            Kind::Array(a) => Some(a),
            _ => None,
        }
    }

    /// The members, if this is an object.
    pub fn as_object(&self) -> Option<&[Member]> {
        match &self.kind {
            Kind::Object(o) => Some(o),
            _ => None,
        }
    }

    /// The value as a non-negative integer that fits in `u64`.
    pub fn as_u64(&self) -> Option<u64> {
        match &self.kind {
            Kind::Number(n) => n.as_u64(),
            _ => None,
        }
    }

    /// The boolean, if this is one.
    pub fn as_bool(&self) -> Option<bool> {
        match self.kind {
            Kind::Bool(b) => Some(b),
            _ => None,
        }
    }
}

/// A syntax error, at the character where the reader gave up.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("{}:{}: {message}", pos.line, pos.col)]
pub struct JsonError {
    /// Where the error is.
    pub pos: Pos,
    /// What was expected, as a lower-case sentence.
    pub message: String,
}

/// Parses one JSON document (surrounding whitespace allowed, nothing else after it).
///
/// # Errors
/// A [`JsonError`] at the first character that does not fit, saying what was expected.
pub fn parse(src: &str) -> Result<Value, JsonError> {
    let mut r = Reader {
        chars: src.chars().collect(),
        at: 0,
        line: 1,
        col: 1,
    };
    r.skip_ws();
    if r.peek().is_none() {
        return Err(r.error("empty input: expected a JSON value"));
    }
    let v = r.value(0)?;
    r.skip_ws();
    if r.peek().is_some() {
        return Err(r.error("unexpected text after the JSON value: expected end of input"));
    }
    Ok(v)
}

/// `s` as a JSON string literal, with the escapes JSON needs.
pub fn quote(s: &str) -> String {
    let mut out = String::with_capacity(s.len() + 2);
    out.push('"');
    for c in s.chars() {
        match c {
            '"' => out.push_str("\\\""),
            '\\' => out.push_str("\\\\"),
            '\n' => out.push_str("\\n"),
            '\r' => out.push_str("\\r"),
            '\t' => out.push_str("\\t"),
            c if (c as u32) < 0x20 => out.push_str(&format!("\\u{:04x}", c as u32)),
            c => out.push(c),
        }
    }
    out.push('"');
    out
}

struct Reader {
    chars: Vec<char>,
    at: usize,
    line: usize,
    col: usize,
}

impl Reader {
    fn pos(&self) -> Pos {
        Pos {
            line: self.line,
            col: self.col,
        }
    }

    /// An error at the current character; at the end of the text the message says so.
    fn error(&self, message: &str) -> JsonError {
        let message = if self.peek().is_none() && !message.starts_with("unexpected end") {
            format!("unexpected end of input: {message}")
        } else {
            message.to_string()
        };
        JsonError {
            pos: self.pos(),
            message,
        }
    }

    fn peek(&self) -> Option<char> {
        self.chars.get(self.at).copied()
    }

    fn bump(&mut self) -> Option<char> {
        let c = self.peek()?;
        self.at += 1;
        if c == '\n' {
            self.line += 1;
            self.col = 1;
        } else {
            self.col += 1;
        }
        Some(c)
    }

    fn skip_ws(&mut self) {
        while matches!(self.peek(), Some(' ' | '\t' | '\n' | '\r')) {
            self.bump();
        }
    }

    fn expect_word(&mut self, word: &str, kind: Kind) -> Result<Value, JsonError> {
        let pos = self.pos();
        for w in word.chars() {
            if self.peek() != Some(w) {
                return Err(self.error(&format!("expected `{word}`")));
            }
            self.bump();
        }
        Ok(Value { pos, kind })
    }

    fn value(&mut self, depth: usize) -> Result<Value, JsonError> {
        let pos = self.pos();
        match self.peek() {
            None => Err(self.error("unexpected end of input: expected a JSON value")),
            Some('{') => {
                if depth >= MAX_DEPTH {
                    return Err(self.error("nesting too deep"));
                }
                self.object(depth)
            }
            Some('[') => {
                if depth >= MAX_DEPTH {
                    return Err(self.error("nesting too deep"));
                }
                self.array(depth)
            }
            Some('"') => Ok(Value {
                pos,
                kind: Kind::String(self.string()?),
            }),
            Some('t') => self.expect_word("true", Kind::Bool(true)),
            Some('f') => self.expect_word("false", Kind::Bool(false)),
            Some('n') => self.expect_word("null", Kind::Null),
            Some(c) if c == '-' || c.is_ascii_digit() => self.number(),
            Some(_) => Err(self.error(
                "expected a JSON value (object, array, string, number, true, false or null)",
            )),
        }
    }

    fn object(&mut self, depth: usize) -> Result<Value, JsonError> {
        let pos = self.pos();
        self.bump();
        let mut members = Vec::new();
        self.skip_ws();
        if self.peek() == Some('}') {
            self.bump();
            return Ok(Value {
                pos,
                kind: Kind::Object(members),
            });
        }
        loop {
            self.skip_ws();
            if self.peek() != Some('"') {
                return Err(self.error("expected a string key in double quotes"));
            }
            let key_pos = self.pos();
            let key = self.string()?;
            self.skip_ws();
            if self.peek() != Some(':') {
                return Err(self.error("expected `:` after the object key"));
            }
            self.bump();
            self.skip_ws();
            let value = self.value(depth + 1)?;
            members.push(Member {
                key,
                key_pos,
                value,
            });
            self.skip_ws();
            match self.peek() {
                Some(',') => {
                    self.bump();
                }
                Some('}') => {
                    self.bump();
                    return Ok(Value {
                        pos,
                        kind: Kind::Object(members),
                    });
                }
                _ => return Err(self.error("expected `,` or `}` in the object")),
            }
        }
    }

    fn array(&mut self, depth: usize) -> Result<Value, JsonError> {
        let pos = self.pos();
        self.bump();
        let mut items = Vec::new();
        self.skip_ws();
        if self.peek() == Some(']') {
            self.bump();
            return Ok(Value {
                pos,
                kind: Kind::Array(items),
            });
        }
        loop {
            self.skip_ws();
            items.push(self.value(depth + 1)?);
            self.skip_ws();
            match self.peek() {
                Some(',') => {
                    self.bump();
                }
                Some(']') => {
                    self.bump();
                    return Ok(Value {
                        pos,
                        kind: Kind::Array(items),
                    });
                }
                _ => return Err(self.error("expected `,` or `]` in the array")),
            }
        }
    }

    fn hex4(&mut self) -> Result<u32, JsonError> {
        let mut v = 0u32;
        for _ in 0..4 {
            let d = self
                .peek()
                .and_then(|c| c.to_digit(16))
                .ok_or_else(|| self.error("expected four hexadecimal digits after `\\u`"))?;
            self.bump();
            v = v * 16 + d;
        }
        Ok(v)
    }

    fn string(&mut self) -> Result<String, JsonError> {
        self.bump(); // opening quote
        let mut s = String::new();
        loop {
            match self.peek() {
                None => return Err(self.error("unterminated string: expected `\"`")),
                Some('"') => {
                    self.bump();
                    return Ok(s);
                }
                Some('\\') => {
                    self.bump();
                    let c = match self.peek() {
                        Some('"') => '"',
                        Some('\\') => '\\',
                        Some('/') => '/',
                        Some('b') => '\u{8}',
                        Some('f') => '\u{c}',
                        Some('n') => '\n',
                        Some('r') => '\r',
                        Some('t') => '\t',
                        Some('u') => {
                            self.bump();
                            let hi = self.hex4()?;
                            let code = if (0xD800..0xDC00).contains(&hi) {
                                if self.peek() != Some('\\') {
                                    return Err(self.error("expected a low surrogate `\\uXXXX`"));
                                }
                                self.bump();
                                if self.peek() != Some('u') {
                                    return Err(self.error("expected a low surrogate `\\uXXXX`"));
                                }
                                self.bump();
                                let lo = self.hex4()?;
                                if !(0xDC00..0xE000).contains(&lo) {
                                    return Err(self.error("invalid low surrogate"));
                                }
                                0x10000 + ((hi - 0xD800) << 10) + (lo - 0xDC00)
                            } else {
                                hi
                            };
                            let c = char::from_u32(code)
                                .ok_or_else(|| self.error("invalid unicode escape"))?;
                            s.push(c);
                            continue;
                        }
                        _ => return Err(self.error(
                            "invalid escape: expected one of \\\" \\\\ \\/ \\b \\f \\n \\r \\t \\u",
                        )),
                    };
                    self.bump();
                    s.push(c);
                }
                Some(c) if (c as u32) < 0x20 => {
                    return Err(self.error("control character in string: expected it escaped"))
                }
                Some(c) => {
                    self.bump();
                    s.push(c);
                }
            }
        }
    }

    fn digits(&mut self, text: &mut String) -> usize {
        let mut n = 0;
        while let Some(c) = self.peek().filter(char::is_ascii_digit) {
            text.push(c);
            self.bump();
            n += 1;
        }
        n
    }

    fn number(&mut self) -> Result<Value, JsonError> {
        let pos = self.pos();
        let mut text = String::new();
        if self.peek() == Some('-') {
            text.push('-');
            self.bump();
        }
        match self.peek() {
            Some('0') => {
                text.push('0');
                self.bump();
            }
            Some(c) if c.is_ascii_digit() => {
                self.digits(&mut text);
            }
            _ => return Err(self.error("expected a digit")),
        }
        if self.peek() == Some('.') {
            text.push('.');
            self.bump();
            if self.digits(&mut text) == 0 {
                return Err(self.error("expected a digit after the decimal point"));
            }
        }
        if let Some(e @ ('e' | 'E')) = self.peek() {
            text.push(e);
            self.bump();
            if let Some(sign @ ('+' | '-')) = self.peek() {
                text.push(sign);
                self.bump();
            }
            if self.digits(&mut text) == 0 {
                return Err(self.error("expected a digit in the exponent"));
            }
        }
        Ok(Value {
            pos,
            kind: Kind::Number(Number { text }),
        })
    }
}

impl fmt::Display for Value {
    /// Writes the value back as compact JSON.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match &self.kind {
            Kind::Null => f.write_str("null"),
            Kind::Bool(b) => write!(f, "{b}"),
            Kind::Number(n) => f.write_str(&n.text),
            Kind::String(s) => f.write_str(&quote(s)),
            Kind::Array(a) => {
                f.write_str("[")?;
                for (i, v) in a.iter().enumerate() {
                    if i > 0 {
                        f.write_str(",")?;
                    }
                    write!(f, "{v}")?;
                }
                f.write_str("]")
            }
            Kind::Object(o) => {
                f.write_str("{")?;
                for (i, m) in o.iter().enumerate() {
                    if i > 0 {
                        f.write_str(",")?;
                    }
                    write!(f, "{}:{}", quote(&m.key), m.value)?;
                }
                f.write_str("}")
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    #[test]
    fn positions_of_values_and_keys() {
        let v = parse("{\n  \"a\": [1, true],\n  \"b\": null\n}").unwrap();
        let obj = v.as_object().unwrap();
        assert_eq!(obj[0].key_pos, Pos { line: 2, col: 3 });
        assert_eq!(obj[0].value.pos, Pos { line: 2, col: 8 });
        assert_eq!(
            obj[0].value.as_array().unwrap()[1].pos,
            Pos { line: 2, col: 12 }
        );
        assert!(obj[1].value.is_null());
    }

    #[test]
    fn errors_are_located() {
        let e = parse("{\"a\": [1,\n 2 3]}").unwrap_err();
        assert_eq!(e.pos, Pos { line: 2, col: 4 });
        assert_eq!(parse("").unwrap_err().pos, Pos { line: 1, col: 1 });
        assert!(parse("[1] x").is_err());
        assert!(parse("{\"a\": 1,")
            .unwrap_err()
            .message
            .starts_with("unexpected end of input"));
        assert!(parse("01").is_err());
        assert!(parse("\"\\ud800\"").is_err());
        assert_eq!(
            parse("\"\\ud83d\\ude00\"").unwrap().as_str(),
            Some("\u{1F600}")
        );
    }

    #[test]
    fn deep_nesting_is_refused_not_overflowed() {
        let deep = "[".repeat(100_000);
        assert!(parse(&deep).unwrap_err().message.contains("too deep"));
    }

    #[test]
    fn numbers_keep_their_text() {
        let v = parse("[0, -3, 2.5e-3, 18446744073709551616]").unwrap();
        let a = v.as_array().unwrap();
        assert_eq!(a[0].as_u64(), Some(0));
        assert_eq!(a[1].as_u64(), None);
        assert_eq!(a[3].as_u64(), None, "too big for u64");
    }

    proptest! {
        #[test]
        fn never_panics(s in "\\PC{0,40}") {
            let _ = parse(&s);
        }

        #[test]
        fn display_round_trips(s in "[a-z\"\\\\\n]{0,12}", n in 0u64..1000) {
            let src = format!("{{\"k\": [{}, {n}, null, false]}}", quote(&s));
            let v = parse(&src).unwrap();
            let again = parse(&v.to_string()).unwrap();
            prop_assert_eq!(again.get("k").unwrap().as_array().unwrap()[0].as_str(), Some(s.as_str()));
        }
    }
}
