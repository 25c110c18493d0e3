//! Driving directions: one manoeuvre per street of a walk, in words a
//! driver follows ("left onto Mill Lane", "straight on", "U-turn at the
//! dead end of Quarry Close"), and the turns of each route counted.
//!
//! Streets are named by their names where the scenario (or the map) has
//! them, otherwise by junction: "left at junction 14 toward junction 20".
//! The side served is the kerb on the driving side for a street whose two
//! sides are served one at a time (a two-way street served in one direction
//! only); "both sides" for a two-way street served in one pass.

use crate::model::{Instance, ServeDirection};
use crate::plan::Step;
use crate::turns::{DrivingSide, Turn, TurnKind, TurnWalk};

/// How many turns of each kind a route makes.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct TurnCounts {
    /// Left turns.
    pub left: usize,
    /// Right turns.
    pub right: usize,
    /// Straight on.
    pub straight: usize,
    /// U-turns, wherever made.
    pub u_turns: usize,
    /// U-turns made at a dead end (a junction with one street).
    pub u_turns_at_dead_ends: usize,
    /// Turns whose kind is unknown (no coordinates).
    pub unknown: usize,
}

impl TurnCounts {
    /// Adds another route's counts.
    pub fn add(&mut self, o: &TurnCounts) {
        self.left += o.left;
        self.right += o.right;
        self.straight += o.straight;
        self.u_turns += o.u_turns;
        self.u_turns_at_dead_ends += o.u_turns_at_dead_ends;
        self.unknown += o.unknown;
    }
}

/// Whether each junction is a dead end: exactly one street (loops aside) meets there.
pub fn dead_ends(inst: &Instance) -> Vec<bool> {
    let net = inst.network();
    let mut streets = vec![0usize; net.junctions.len()];
    for l in &net.links {
        if l.from != l.to {
            streets[l.from] += 1;
            streets[l.to] += 1;
        }
    }
    streets.into_iter().map(|n| n == 1).collect()
}

/// The turns of a walk counted by kind.
pub fn turn_counts(walk: &TurnWalk, dead_ends: &[bool]) -> TurnCounts {
    let mut c = TurnCounts::default();
    for (k, t) in walk.turns.iter().enumerate() {
        match t.kind {
            TurnKind::Left => c.left += 1,
            TurnKind::Right => c.right += 1,
            TurnKind::Straight => c.straight += 1,
            TurnKind::Unknown => c.unknown += 1,
            TurnKind::UTurn => {
                c.u_turns += 1;
                let via = walk.steps[k].to;
                if dead_ends.get(via).copied().unwrap_or(false) {
                    c.u_turns_at_dead_ends += 1;
                }
            }
        }
    }
    c
}

/// The name of link `link`, if it has one.
fn name(inst: &Instance, link: usize) -> Option<&str> {
    inst.network().links[link]
        .name
        .as_deref()
        .map(str::trim)
        .filter(|n| !n.is_empty())
}

/// The manoeuvre that starts step `step` of a walk, after `prev` (none for
/// the first step, which leaves the yard) with the turn `turn` between them,
/// and, for a served step, what is served.
pub fn manoeuvre(
    inst: &Instance,
    dead_ends: &[bool],
    prev: Option<&Step>,
    step: &Step,
    turn: Option<Turn>,
) -> String {
    let net = inst.network();
    let id = |j: usize| net.junctions[j].id;
    let onto = match name(inst, step.link) {
        Some(n) => format!("onto {n}"),
        None => format!(
            "at junction {} toward junction {}",
            id(step.from),
            id(step.to)
        ),
    };
    let same_name = prev.is_some_and(|p| {
        name(inst, p.link).is_some() && name(inst, p.link) == name(inst, step.link)
    });
    let mut text = match (prev, turn.map(|t| t.kind)) {
        (None, _) | (_, None) => match name(inst, step.link) {
            Some(n) => format!("leave the yard along {n}"),
            None => format!(
                "leave the yard at junction {} toward junction {}",
                id(step.from),
                id(step.to)
            ),
        },
        (Some(p), Some(TurnKind::UTurn)) => {
            let on = name(inst, p.link).map_or_else(
                || format!("the street from junction {}", id(p.from)),
                str::to_string,
            );
            if dead_ends.get(p.to).copied().unwrap_or(false) {
                format!("U-turn at the dead end of {on} (junction {})", id(p.to))
            } else {
                format!("U-turn on {on} at junction {}", id(p.to))
            }
        }
        (Some(_), Some(TurnKind::Straight)) if same_name => "straight on".to_string(),
        (Some(_), Some(TurnKind::Straight)) => format!("straight on {onto}"),
        (Some(_), Some(TurnKind::Left)) => format!("left {onto}"),
        (Some(_), Some(TurnKind::Right)) => format!("right {onto}"),
        (Some(_), Some(TurnKind::Unknown)) if same_name => "carry on".to_string(),
        (Some(_), Some(TurnKind::Unknown)) => format!("carry on {onto}"),
    };
    if step.serve {
        text.push_str(", ");
        text.push_str(&serve_text(inst, step));
    }
    text
}

/// "serve both sides", "serve the right side", or "serve" (one-way streets).
fn serve_text(inst: &Instance, step: &Step) -> String {
    let l = &inst.network().links[step.link];
    let one_side = l
        .service
        .as_ref()
        .is_some_and(|s| s.direction == ServeDirection::Forward);
    let side = match inst.turn_rules().map(|r| r.driving_side) {
        Some(DrivingSide::Left) => "left",
        _ => "right",
    };
    match (l.oneway, one_side) {
        (true, _) => "serve".to_string(),
        (false, true) => format!("serve the {side} side"),
        (false, false) => "serve both sides".to_string(),
    }
}
