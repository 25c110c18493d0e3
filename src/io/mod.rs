//! Readers and writers: the public research text format, our JSON scenario
//! format, plan files, and the table of published benchmark values.

pub mod dat;
pub mod fleet_plan;
pub mod plan_json;
pub mod reference;
pub mod scenario;

pub use dat::{read_dat, read_dat_file};
pub use fleet_plan::{
    read_fleet_plan, read_fleet_plan_as_written, write_fleet_plan, WrittenFleetPlan,
};
pub use plan_json::{read_plan, read_plan_as_written, write_plan};
pub use reference::{parse_reference, read_reference, Reference};
pub use scenario::{read_scenario, read_scenario_file, write_scenario};

/// Largest cost, time, demand or capacity the readers accept (2^40, about
/// 1.1 × 10^12). Sums over millions of links then stay far inside `i64`.
pub const MAX_NUMBER: crate::model::Cost = 1 << 40;

/// Largest number of junctions (vertices) the readers accept (2^24).
pub const MAX_JUNCTIONS: usize = 1 << 24;

/// The two scenario formats the readers know.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Format {
    /// Our JSON scenario format ([`read_scenario`]).
    Scenario,
    /// The research community's text format ([`read_dat`]).
    Dat,
}

/// Which reader a scenario text needs: by the file name's extension
/// (`.json` or `.dat`, any case) when it has one of these, otherwise by the
/// content: a text whose first character other than a byte-order mark or
/// white space is `{` is JSON, anything else the research format.
///
/// ```
/// use arcwright::io::{detect_format, Format};
/// assert_eq!(detect_format("NOMBRE : gdb1", "gdb1.DAT"), Format::Dat);
/// assert_eq!(detect_format("\u{feff}{\"format\": 1}", "town.txt"), Format::Scenario);
/// assert_eq!(detect_format(" NOMBRE : x", "no-extension"), Format::Dat);
/// ```
pub fn detect_format(text: &str, name: &str) -> Format {
    let ext = std::path::Path::new(name)
        .extension()
        .map(|e| e.to_string_lossy().to_ascii_lowercase());
    match ext.as_deref() {
        Some("json") => Format::Scenario,
        Some("dat") => Format::Dat,
        _ => {
            let first = text
                .trim_start_matches(|c: char| c == '\u{feff}' || c.is_whitespace())
                .chars()
                .next();
            if first == Some('{') {
                Format::Scenario
            } else {
                Format::Dat
            }
        }
    }
}

/// Reads a whole text file; returns the name used in errors (the path as
/// given) and the text.
///
/// # Errors
/// [`crate::Error::Io`] naming the file when it cannot be read, and
/// [`crate::error::ParseProblem::NotUtf8`] with the line of the first byte
/// that is not UTF-8.
pub fn read_text(path: &std::path::Path) -> crate::Result<(String, String)> {
    let name = path.display().to_string();
    let bytes = match std::fs::read(path) {
        Ok(bytes) => bytes,
        Err(source) => return Err(crate::Error::Io { file: name, source }),
    };
    match String::from_utf8(bytes) {
        Ok(text) => Ok((name, text)),
        Err(e) => {
            let good = e.utf8_error().valid_up_to();
            let bytes = e.as_bytes();
            let line = 1 + bytes[..good].iter().filter(|&&b| b == b'\n').count();
            Err(crate::Error::parse(
                &name,
                Some(line),
                crate::error::ParseProblem::NotUtf8 { byte: good + 1 },
            ))
        }
    }
}
