//! Readers and writers: the public research text format, our JSON scenario
//! format, plan files, and the table of published benchmark values.

pub mod dat;
pub mod plan_json;
pub mod reference;
pub mod scenario;

pub use dat::{read_dat, read_dat_file};
pub use plan_json::{read_plan, read_plan_as_written, write_plan};
pub use reference::{parse_reference, read_reference, Reference};
pub use scenario::{read_scenario, read_scenario_file, write_scenario};

/// Largest cost, time, demand or capacity the readers accept (2^40, about
/// 1.1 × 10^12). Sums over millions of links then stay far inside `i64`.
pub const MAX_NUMBER: crate::model::Cost = 1 << 40;

/// Largest number of junctions (vertices) the readers accept (2^24).
pub const MAX_JUNCTIONS: usize = 1 << 24;
