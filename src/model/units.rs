//! The units a scenario declares for its numbers, and how outputs label them.
//!
//! Nothing is assumed: a number whose unit the scenario does not declare is
//! shown as `cost units`, `time units`, `length units` or `load units`.
//! Times are shown as hours and minutes only when the time unit is one the
//! crate knows: `s` (then `h:mm:ss` follows), `min` (then `h:mm`).

use serde::{Deserialize, Serialize};

use super::Cost;

/// Units of a scenario's numbers; each is free text such as `m`, `s`,
/// `min`, `bins`, `kg`, `EUR`, or `None` when not declared.
#[derive(Clone, Debug, Default, PartialEq, Eq, Hash, Serialize, Deserialize)]
pub struct Units {
    /// Unit of every `cost` (the figure a plan minimises): street cost,
    /// service cost, plan and route costs.
    pub cost: Option<String>,
    /// Unit of street lengths.
    pub length: Option<String>,
    /// Unit of drive times, service times and the shift limit.
    pub time: Option<String>,
    /// Unit of demands and of the truck capacity.
    pub load: Option<String>,
}

/// Longest unit text accepted.
pub const MAX_UNIT_LEN: usize = 24;

fn label(unit: &Option<String>, undeclared: &'static str) -> String {
    match unit {
        Some(u) => u.clone(),
        None => undeclared.to_string(),
    }
}

impl Units {
    /// Whether `text` is acceptable as a unit: 1 to [`MAX_UNIT_LEN`]
    /// characters, no control characters, not only blanks.
    pub fn valid_unit(text: &str) -> bool {
        !text.trim().is_empty()
            && text.chars().count() <= MAX_UNIT_LEN
            && !text.chars().any(char::is_control)
    }

    /// The cost unit, or `cost units`.
    pub fn cost_label(&self) -> String {
        label(&self.cost, "cost units")
    }

    /// The length unit, or `length units`.
    pub fn length_label(&self) -> String {
        label(&self.length, "length units")
    }

    /// The time unit, or `time units`.
    pub fn time_label(&self) -> String {
        label(&self.time, "time units")
    }

    /// The load unit, or `load units`.
    pub fn load_label(&self) -> String {
        label(&self.load, "load units")
    }

    /// A cost with its unit: `316 m`, `316 cost units`.
    pub fn cost_text(&self, v: Cost) -> String {
        format!("{v} {}", self.cost_label())
    }

    /// A length with its unit.
    pub fn length_text(&self, v: Cost) -> String {
        format!("{v} {}", self.length_label())
    }

    /// A load with its unit: `40 bins`.
    pub fn load_text(&self, v: Cost) -> String {
        format!("{v} {}", self.load_label())
    }

    /// A time with its unit, and as hours and minutes when the unit is
    /// seconds (`3661 s (1:01:01)`) or minutes (`480 min (8:00 h)`).
    ///
    /// ```
    /// use arcwright::model::Units;
    /// let mut u = Units::default();
    /// assert_eq!(u.time_text(480), "480 time units");
    /// u.time = Some("min".into());
    /// assert_eq!(u.time_text(480), "480 min (8:00 h)");
    /// u.time = Some("s".into());
    /// assert_eq!(u.time_text(3661), "3661 s (1:01:01)");
    /// ```
    pub fn time_text(&self, v: Cost) -> String {
        match self.clock(v) {
            Some(c) => format!("{v} {} ({c})", self.time_label()),
            None => format!("{v} {}", self.time_label()),
        }
    }

    /// The time as a clock reading when the unit allows it: `h:mm:ss` for
    /// seconds, `h:mm h` for minutes; `None` otherwise.
    pub fn clock(&self, v: Cost) -> Option<String> {
        let sign = if v < 0 { "-" } else { "" };
        let a = v.unsigned_abs();
        match self.time.as_deref().map(str::trim) {
            Some("s" | "sec" | "second" | "seconds") => Some(format!(
                "{sign}{}:{:02}:{:02}",
                a / 3600,
                a / 60 % 60,
                a % 60
            )),
            Some("min" | "minute" | "minutes") => Some(format!("{sign}{}:{:02} h", a / 60, a % 60)),
            _ => None,
        }
    }
}
