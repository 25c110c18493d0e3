//! Readers and writers: the public research text format, our JSON scenario
//! format, plan files, and the table of published benchmark values.

pub mod dat;
pub mod fleet_plan;
pub mod plan_json;
pub mod reference;
pub mod scenario;

pub use dat::{read_dat, read_dat_file};
pub use fleet_plan::{read_fleet_plan, write_fleet_plan};
pub use plan_json::{read_plan, read_plan_as_written, write_plan};
pub use reference::{parse_reference, read_reference, Reference};
pub use scenario::{read_scenario, read_scenario_file, write_scenario};

/// Largest cost, time, demand or capacity the readers accept (2^40, about
/// 1.1 × 10^12). Sums over millions of links then stay far inside `i64`.
pub const MAX_NUMBER: crate::model::Cost = 1 << 40;

/// Largest number of junctions (vertices) the readers accept (2^24).
pub const MAX_JUNCTIONS: usize = 1 << 24;

/// Reads a whole text file; returns the name used in errors (the path as
/// given) and the text, or an [`crate::Error::Io`] naming the file.
pub fn read_text(path: &std::path::Path) -> crate::Result<(String, String)> {
    let name = path.display().to_string();
    match std::fs::read_to_string(path) {
        Ok(text) => Ok((name, text)),
        Err(source) => Err(crate::Error::Io { file: name, source }),
    }
}
