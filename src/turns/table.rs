//! The allowed turns of a network and what each costs, precomputed.
//!
//! A *driving arc* is a street driven in one direction: arc `2·l` drives
//! link `l` from its `from` junction to its `to` junction, arc `2·l + 1` the
//! other way (only for two-way streets). [`TurnTable`] lists, for every arc,
//! the arcs a truck may go on with after it and the turn penalty of each,
//! in compressed rows: memory `O(Σ in·out)` over the junctions, a few bytes
//! per street on street networks.

use std::collections::{HashMap, HashSet};

use super::angle::turn_kind;
use super::rules::{TurnKind, TurnRules, UTurns};
use crate::model::{Cost, Dir, Instance, Network};

/// The driving arc of link `link` driven in direction `dir`.
#[inline]
pub fn arc_of(link: usize, dir: Dir) -> u32 {
    (2 * link + (dir == Dir::Backward) as usize) as u32
}

/// Why a scenario's turn rules cannot be used. Messages name streets as the
/// scenario does ([`Network::street_label`]) and junctions by their ids.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum TurnError {
    /// A turn restriction names two streets that do not both end at its junction.
    #[error("turn restriction {index}: {from} and {to} do not meet at junction {via}")]
    NotMeeting {
        /// Position in `turn_restrictions`.
        index: usize,
        /// The street the turn comes from.
        from: String,
        /// The junction id of the turn.
        via: u64,
        /// The street the turn goes into.
        to: String,
    },
    /// A turn penalty is negative.
    #[error("turn penalty `{which}` must not be negative, found {value}")]
    NegativePenalty {
        /// `straight`, `left`, `right` or `u_turn`.
        which: &'static str,
        /// The value found.
        value: Cost,
    },
    /// A street to serve can only be left by banned turns.
    #[error("{street} is to be served, but every turn out of it at junction {via} is banned (so a truck that serves it cannot leave)")]
    NoWayOut {
        /// Index of the street (`streets[link]`).
        link: usize,
        /// The street as messages name it.
        street: String,
        /// Junction id where it would have to be left.
        via: u64,
    },
}

/// Allowed turns and their penalties for every driving arc.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct TurnTable {
    /// Row starts: the turns after arc `a` are `start[a]..start[a + 1]`.
    start: Vec<u32>,
    /// The arc turned into.
    next: Vec<u32>,
    /// Its penalty.
    penalty: Vec<Cost>,
    /// Whether each arc may be driven (false for the backward arc of a one-way street).
    drivable: Vec<bool>,
}

impl TurnTable {
    /// Precomputes the allowed turns of `inst`'s network under `rules`.
    ///
    /// # Errors
    /// Every [`TurnError`] found: a negative penalty, a turn restriction
    /// whose streets do not meet at its junction, a street to serve that
    /// cannot be left in any allowed service direction.
    pub fn new(inst: &Instance, rules: &TurnRules) -> Result<TurnTable, Vec<TurnError>> {
        Self::build(inst, rules, true)
    }

    /// [`TurnTable::new`] without the check that every street to serve can
    /// be left (for finding the streets the rules cut off, [`super::unservable`]).
    ///
    /// # Errors
    /// A negative penalty, a turn restriction whose streets do not meet.
    pub fn without_ways_out_check(
        inst: &Instance,
        rules: &TurnRules,
    ) -> Result<TurnTable, Vec<TurnError>> {
        Self::build(inst, rules, false)
    }

    fn build(
        inst: &Instance,
        rules: &TurnRules,
        ways_out: bool,
    ) -> Result<TurnTable, Vec<TurnError>> {
        let net = inst.network();
        let mut problems = Vec::new();
        let p = &rules.penalties;
        for (which, value) in [
            ("straight", p.straight),
            ("right", p.right),
            ("left", p.left),
            ("u_turn", p.u_turn),
        ] {
            if value < 0 {
                problems.push(TurnError::NegativePenalty { which, value });
            }
        }
        let (banned, only) = restrictions(net, rules, &mut problems);
        let arcs = 2 * net.links.len();
        let drivable: Vec<bool> = (0..arcs)
            .map(|a| a % 2 == 0 || !net.links[a / 2].oneway)
            .collect();
        // Arcs leaving each junction, and distinct non-loop streets at each.
        let mut out: Vec<Vec<u32>> = vec![Vec::new(); net.len()];
        let mut streets_at: Vec<Vec<usize>> = vec![Vec::new(); net.len()];
        for (i, l) in net.links.iter().enumerate() {
            out[l.from].push(arc_of(i, Dir::Forward));
            if !l.oneway {
                out[l.to].push(arc_of(i, Dir::Backward));
            }
            if l.from != l.to {
                streets_at[l.from].push(i);
                streets_at[l.to].push(i);
            }
        }
        let dead_end = |v: usize| streets_at[v].len() == 1;
        let mut start = Vec::with_capacity(arcs + 1);
        let (mut next, mut penalty) = (Vec::new(), Vec::new());
        start.push(0u32);
        for (a, &can) in drivable.iter().enumerate() {
            if can {
                let (from, via) = (a / 2, head(net, a as u32));
                for &b in &out[via] {
                    let to = b as usize / 2;
                    let kind = turn_kind(net, inst.coordinates(), from, via, to);
                    let allowed = !banned.contains(&(from, via, to))
                        && only.get(&(from, via)).is_none_or(|s| s.contains(&to))
                        && (kind != TurnKind::UTurn
                            || rules.u_turns == UTurns::Allowed
                            || dead_end(via));
                    if allowed {
                        next.push(b);
                        penalty.push(rules.penalty(kind));
                    }
                }
            }
            start.push(next.len() as u32);
        }
        let table = TurnTable {
            start,
            next,
            penalty,
            drivable,
        };
        if ways_out {
            table.check_ways_out(inst, &mut problems);
        }
        if problems.is_empty() {
            Ok(table)
        } else {
            Err(problems)
        }
    }

    /// A street to serve must have an allowed service direction whose arc can be left.
    fn check_ways_out(&self, inst: &Instance, problems: &mut Vec<TurnError>) {
        let net = inst.network();
        for t in inst.tasks() {
            let dirs = [Dir::Forward, Dir::Backward]
                .into_iter()
                .filter(|&d| t.allows(d));
            let ends_at_yard = |a: u32| head(net, a) == inst.depot();
            if dirs.clone().any(|d| {
                let a = arc_of(t.link, d);
                !self.turns(a).is_empty() || ends_at_yard(a)
            }) {
                continue;
            }
            let mut dirs = dirs;
            let d = dirs.next_back().unwrap_or(Dir::Forward);
            problems.push(TurnError::NoWayOut {
                link: t.link,
                street: net.street_label(t.link),
                via: net.junctions[head(net, arc_of(t.link, d))].id,
            });
        }
    }

    /// Number of driving arcs (twice the number of links).
    pub fn arcs(&self) -> usize {
        self.drivable.len()
    }

    /// Whether arc `a` may be driven.
    pub fn drivable(&self, a: u32) -> bool {
        self.drivable[a as usize]
    }

    /// The allowed turns after arc `a`: the next arcs and their penalties.
    pub fn turns(&self, a: u32) -> TurnsFrom<'_> {
        let r = self.start[a as usize] as usize..self.start[a as usize + 1] as usize;
        TurnsFrom {
            next: &self.next[r.clone()],
            penalty: &self.penalty[r],
        }
    }

    /// The penalty of turning from arc `a` into arc `b`, `None` when banned
    /// (or when `b` does not leave the junction `a` arrives at).
    pub fn penalty(&self, a: u32, b: u32) -> Option<Cost> {
        let t = self.turns(a);
        t.next.iter().position(|&x| x == b).map(|i| t.penalty[i])
    }

    /// Bytes held by the table.
    pub fn bytes(&self) -> usize {
        4 * self.start.len() + 12 * self.next.len() + self.drivable.len()
    }
}

/// The allowed turns after one arc (see [`TurnTable::turns`]).
#[derive(Clone, Copy, Debug)]
pub struct TurnsFrom<'t> {
    /// The arcs one may go on with.
    pub next: &'t [u32],
    /// The penalty of each.
    pub penalty: &'t [Cost],
}

impl TurnsFrom<'_> {
    /// True when every turn is banned.
    pub fn is_empty(&self) -> bool {
        self.next.is_empty()
    }
}

/// The junction arc `a` ends at.
#[inline]
pub fn head(net: &Network, a: u32) -> usize {
    let l = &net.links[a as usize / 2];
    if a.is_multiple_of(2) {
        l.to
    } else {
        l.from
    }
}

/// The junction arc `a` starts at.
#[inline]
pub fn tail(net: &Network, a: u32) -> usize {
    head(net, a ^ 1)
}

type Banned = HashSet<(usize, usize, usize)>;
type Only = HashMap<(usize, usize), HashSet<usize>>;

/// The `no_*` turns and, per (street, junction), the `only_*` allowed ones.
fn restrictions(net: &Network, rules: &TurnRules, problems: &mut Vec<TurnError>) -> (Banned, Only) {
    let (mut banned, mut only) = (Banned::new(), Only::new());
    for (index, r) in net.turn_restrictions.iter().enumerate() {
        let meets = |l: usize| {
            l < net.links.len() && (net.links[l].from == r.via || net.links[l].to == r.via)
        };
        if r.via >= net.len() || !meets(r.from) || !meets(r.to) {
            let label = |l: usize| {
                if l < net.links.len() {
                    net.street_label(l)
                } else {
                    format!("street {l}")
                }
            };
            problems.push(TurnError::NotMeeting {
                index,
                from: label(r.from),
                via: net.junctions.get(r.via).map_or(r.via as u64, |j| j.id),
                to: label(r.to),
            });
            continue;
        }
        if !rules.obey_restrictions {
            continue;
        }
        if r.is_only() {
            only.entry((r.from, r.via)).or_default().insert(r.to);
        } else {
            banned.insert((r.from, r.via, r.to));
        }
    }
    (banned, only)
}
