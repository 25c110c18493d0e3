//! The turn rules of a scenario: driving side, U-turn policy, penalties.

use serde::{Deserialize, Serialize};

use crate::model::Cost;

/// The side of the road traffic drives on. It decides which turn crosses
/// oncoming traffic (the left turn where traffic drives on the right), which
/// the sheets count.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum DrivingSide {
    /// Traffic keeps right (most of the world).
    #[default]
    Right,
    /// Traffic keeps left.
    Left,
}

/// Where a truck may turn back along the street it came on.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum UTurns {
    /// Only at a dead end, where there is no other way out (common practice
    /// for heavy vehicles: reversing and turning back in a street is avoided).
    #[default]
    DeadEndsOnly,
    /// Anywhere (still paying the `u_turn` penalty).
    Allowed,
}

/// What each kind of turn costs, in the scenario's cost unit, added to the
/// cost of a route each time the turn is made (not to its driving time).
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct TurnPenalties {
    /// Going on without turning (within ±30° of straight ahead).
    #[serde(default)]
    pub straight: Cost,
    /// A right turn.
    #[serde(default)]
    pub right: Cost,
    /// A left turn.
    #[serde(default)]
    pub left: Cost,
    /// Turning back along the same street (where allowed).
    #[serde(default)]
    pub u_turn: Cost,
}

/// The turn rules at every junction of a scenario.
///
/// In a scenario file this is the optional `turn_rules` object (see
/// [`crate::io::scenario`]); every field has a default, so `"turn_rules": {}`
/// means: traffic on the right, U-turns only at dead ends, no penalties, the
/// map's turn restrictions obeyed.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct TurnRules {
    /// The side traffic drives on.
    #[serde(default)]
    pub driving_side: DrivingSide,
    /// Where U-turns are allowed.
    #[serde(default)]
    pub u_turns: UTurns,
    /// What each kind of turn costs.
    #[serde(default)]
    pub penalties: TurnPenalties,
    /// Whether the network's turn restrictions (`turn_restrictions`, from the
    /// map or written in the scenario) are obeyed; default `true`.
    #[serde(default = "yes")]
    pub obey_restrictions: bool,
}

fn yes() -> bool {
    true
}

impl Default for TurnRules {
    /// The defaults of the scenario format: traffic on the right, U-turns
    /// only at dead ends, no penalties, restrictions obeyed.
    fn default() -> Self {
        TurnRules {
            driving_side: DrivingSide::Right,
            u_turns: UTurns::DeadEndsOnly,
            penalties: TurnPenalties::default(),
            obey_restrictions: true,
        }
    }
}

impl TurnRules {
    /// Rules that ban U-turns except at dead ends, with the given penalties,
    /// traffic on the right and restrictions obeyed.
    pub fn trucks(penalties: TurnPenalties) -> Self {
        TurnRules {
            penalties,
            ..TurnRules::default()
        }
    }

    /// The penalty of a turn of kind `kind`.
    pub fn penalty(&self, kind: TurnKind) -> Cost {
        match kind {
            TurnKind::Straight => self.penalties.straight,
            TurnKind::Right => self.penalties.right,
            TurnKind::Left => self.penalties.left,
            TurnKind::UTurn => self.penalties.u_turn,
            TurnKind::Unknown => 0,
        }
    }

    /// Whether a turn of kind `kind` crosses oncoming traffic.
    pub fn crosses_traffic(&self, kind: TurnKind) -> bool {
        match self.driving_side {
            DrivingSide::Right => kind == TurnKind::Left,
            DrivingSide::Left => kind == TurnKind::Right,
        }
    }
}

/// The kind of a turn from one street into the next at a junction.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum TurnKind {
    /// Within 30° of straight ahead.
    Straight,
    /// A right turn (more than 30° clockwise).
    Right,
    /// A left turn (more than 30° anticlockwise).
    Left,
    /// Back along the same street.
    UTurn,
    /// Onto another street where the angle cannot be computed (no
    /// coordinates, as in the public research sets): no penalty.
    Unknown,
}

impl std::fmt::Display for TurnKind {
    /// The word plan files and CSV sheets use: `straight`, `right`, `left`,
    /// `u_turn`, `unknown`.
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(match self {
            TurnKind::Straight => "straight",
            TurnKind::Right => "right",
            TurnKind::Left => "left",
            TurnKind::UTurn => "u_turn",
            TurnKind::Unknown => "unknown",
        })
    }
}
