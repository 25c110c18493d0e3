//! Readers and writers: the public research text format, our JSON scenario
//! format, and plan files.

pub mod dat;

pub use dat::{read_dat, read_dat_file};
pub mod plan_json;

pub use plan_json::{read_plan, write_plan};
