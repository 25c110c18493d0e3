//! Reader of the table of published values that accompanies the public
//! benchmark sets (`../shared/instances/reference.csv`).
//!
//! The table is CSV with the header
//! `set,instance,file,lower_bound,best_known,proven_optimal,source`, one row
//! per instance. A field may be written in double quotes, and then may contain
//! commas; `""` inside quotes stands for one quote (the usual CSV convention,
//! RFC 4180). `proven_optimal` is `yes` or `no`. Empty lines are ignored and
//! CRLF line ends are accepted.
//!
//! ```
//! use arcwright::io::reference::parse_reference;
//!
//! let text = "set,instance,file,lower_bound,best_known,proven_optimal,source\n\
//!             gdb,gdb1,gdb/gdb1.dat,316,316,yes,\"a table, with a comma\"\n";
//! let rows = parse_reference(text, "<memory>").unwrap();
//! assert_eq!(rows[0].instance, "gdb1");
//! assert_eq!(rows[0].best_known, 316);
//! assert_eq!(rows[0].source, "a table, with a comma");
//! ```

use std::path::Path;

use crate::error::{Error, ParseProblem, Result};
use crate::model::Cost;

/// The columns of the table, in order.
const COLUMNS: [&str; 7] = [
    "set",
    "instance",
    "file",
    "lower_bound",
    "best_known",
    "proven_optimal",
    "source",
];

/// One row of the table of published values.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Reference {
    /// Benchmark set (`gdb`, `val`, `egl`, ...).
    pub set: String,
    /// Instance name, e.g. `gdb1`.
    pub instance: String,
    /// Instance file, relative to the folder holding the table.
    pub file: String,
    /// Published lower bound on the total cost.
    pub lower_bound: Cost,
    /// Best known total cost.
    pub best_known: Cost,
    /// True when the best known value is proven optimal.
    pub proven_optimal: bool,
    /// Where the values come from.
    pub source: String,
}

/// Reads the table from a file. The file name in errors is `path` as given.
///
/// # Errors
/// [`crate::Error::Io`] when the file cannot be read, and the errors of [`parse_reference`].
pub fn read_reference(path: impl AsRef<Path>) -> Result<Vec<Reference>> {
    let (name, text) = super::read_text(path.as_ref())?;
    parse_reference(&text, &name)
}

/// Parses the table from text; `file` names the text in errors.
///
/// # Errors
/// [`crate::Error::Parse`] with the line: a wrong header, a row with the wrong number of
/// columns, a number or yes/no that does not parse, an open quote.
pub fn parse_reference(text: &str, file: &str) -> Result<Vec<Reference>> {
    let mut rows = Vec::new();
    let mut header_seen = false;
    for (i, raw) in text.lines().enumerate() {
        let line_no = i + 1;
        let line = raw.strip_suffix('\r').unwrap_or(raw);
        if line.trim().is_empty() {
            continue;
        }
        let err = |problem| Error::parse(file, Some(line_no), problem);
        let fields = split_fields(line).ok_or_else(|| {
            err(ParseProblem::Unexpected {
                expected: "a closing double quote",
                found: line.to_string(),
            })
        })?;
        if fields.len() != COLUMNS.len() {
            return Err(err(ParseProblem::CountMismatch {
                what: "columns",
                header: COLUMNS.len(),
                found: fields.len(),
            }));
        }
        if !header_seen {
            if fields.iter().map(|f| f.trim()).ne(COLUMNS) {
                return Err(err(ParseProblem::Unexpected {
                    expected:
                        "the header set,instance,file,lower_bound,best_known,proven_optimal,source",
                    found: line.to_string(),
                }));
            }
            header_seen = true;
            continue;
        }
        let number = |s: &str, expected: &'static str| -> Result<Cost> {
            let v: Cost = s.trim().parse().map_err(|_| {
                err(ParseProblem::NotANumber {
                    expected,
                    found: s.to_string(),
                })
            })?;
            if v < 0 {
                return Err(err(ParseProblem::Negative {
                    what: expected,
                    value: v,
                }));
            }
            Ok(v)
        };
        let lower_bound = number(&fields[3], "a lower bound")?;
        let best_known = number(&fields[4], "a best known value")?;
        let proven_optimal = match fields[5].trim() {
            "yes" => true,
            "no" => false,
            other => {
                return Err(err(ParseProblem::Unexpected {
                    expected: "yes or no in proven_optimal",
                    found: other.to_string(),
                }))
            }
        };
        let text_of = |k: usize| fields[k].trim().to_string();
        rows.push(Reference {
            set: text_of(0),
            instance: text_of(1),
            file: text_of(2),
            lower_bound,
            best_known,
            proven_optimal,
            source: text_of(6),
        });
    }
    if !header_seen {
        return Err(Error::parse(
            file,
            None,
            ParseProblem::Truncated {
                expected: "the header line".to_string(),
            },
        ));
    }
    Ok(rows)
}

/// Splits one CSV line into fields; `None` when a quote is not closed.
fn split_fields(line: &str) -> Option<Vec<String>> {
    let mut fields = Vec::new();
    let mut field = String::new();
    let mut chars = line.chars().peekable();
    let mut quoted = false;
    while let Some(c) = chars.next() {
        if quoted {
            if c == '"' {
                if chars.peek() == Some(&'"') {
                    chars.next();
                    field.push('"');
                } else {
                    quoted = false;
                }
            } else {
                field.push(c);
            }
        } else if c == '"' {
            quoted = true;
        } else if c == ',' {
            fields.push(std::mem::take(&mut field));
        } else {
            field.push(c);
        }
    }
    if quoted {
        return None;
    }
    fields.push(field);
    Some(fields)
}

#[cfg(test)]
mod tests {
    use super::*;

    const HEADER: &str = "set,instance,file,lower_bound,best_known,proven_optimal,source\n";

    #[test]
    fn quoted_fields_keep_commas_and_doubled_quotes() {
        let text = format!(
            "{HEADER}egl,egl-e1-A,egl/egl-e1-A.dat,3548,3548,no,\"Smith, J. \"\"table 2\"\", 2001\"\r\n\n"
        );
        let rows = parse_reference(&text, "t.csv").unwrap();
        assert_eq!(
            rows,
            vec![Reference {
                set: "egl".into(),
                instance: "egl-e1-A".into(),
                file: "egl/egl-e1-A.dat".into(),
                lower_bound: 3548,
                best_known: 3548,
                proven_optimal: false,
                source: "Smith, J. \"table 2\", 2001".into(),
            }]
        );
    }

    #[test]
    fn malformed_lines_name_their_line() {
        let good = "gdb,gdb1,gdb/gdb1.dat,316,316,yes,\"x, y\"\n";
        let cases = [
            ("gdb,gdb2,gdb/gdb2.dat,33x,339,yes,src\n", "33x"),
            ("gdb,gdb2,gdb/gdb2.dat,339,339,yes\n", "columns"),
            ("gdb,gdb2,gdb/gdb2.dat,339,339,maybe,src\n", "maybe"),
            ("gdb,gdb2,gdb/gdb2.dat,339,339,yes,\"open\n", "quote"),
        ];
        for (bad, word) in cases {
            let text = format!("{HEADER}{good}{bad}");
            let e = parse_reference(&text, "t.csv").unwrap_err();
            assert_eq!(e.location().unwrap().line, Some(3), "{bad}");
            let msg = e.to_string();
            assert!(msg.starts_with("t.csv:3: ") && msg.contains(word), "{msg}");
        }
        let e = parse_reference("set,name\n", "t.csv").unwrap_err();
        assert_eq!(e.location().unwrap().line, Some(1));
    }

    #[test]
    fn a_missing_file_is_an_io_error() {
        let e = read_reference("/nonexistent/reference.csv").unwrap_err();
        assert!(matches!(e, Error::Io { .. }), "{e:?}");
    }
}
