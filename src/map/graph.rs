//! From ways to segments: which ways trucks may drive (profile, access and
//! one-way rules) and where ways are split (rules 1 to 4 of [`crate::map`]).

use std::collections::HashMap;

use super::profile::Profile;
use super::raw::{Overrides, RawMap, RawWay};

/// What a street inherits from its way.
#[derive(Clone, Debug, PartialEq)]
pub(crate) struct WayAttr {
    pub class: String,
    pub name: Option<String>,
    pub one_way: bool,
    /// Drawn against the driving direction (`oneway=-1`).
    pub reversed: bool,
    pub overrides: Overrides,
}

impl WayAttr {
    /// Whether two segments may be joined into one street (rule 6, apart
    /// from the direction check).
    pub fn joins(&self, other: &WayAttr) -> bool {
        self.class == other.class
            && self.name == other.name
            && self.one_way == other.one_way
            && self.overrides == other.overrides
    }
}

/// Direction of a way: `Some((one_way, reversed))`, `None` when not drivable.
fn direction(w: &RawWay) -> Option<(bool, bool)> {
    if let Some(one_way) = w.overrides.one_way {
        return Some((one_way, false));
    }
    match w.tag("oneway") {
        Some("yes" | "true" | "1") => Some((true, false)),
        Some("-1" | "reverse") => Some((true, true)),
        Some("no" | "false" | "0") => Some((false, false)),
        Some("reversible" | "alternating") => None,
        None => {
            let implied = matches!(w.tag("junction"), Some("roundabout" | "circular"))
                || w.tag("highway") == Some("motorway");
            Some((implied, false))
        }
        Some(_) => Some((false, false)),
    }
}

/// Why a way is not a street.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum Skip {
    /// Its class is not one the profile drives.
    Class,
    /// Closed: access, service kind, area, reversible.
    Closed,
}

/// The street attributes of a way, or why it is not a street (rule 1, 2).
pub(crate) fn accept(w: &RawWay, profile: &Profile) -> Result<WayAttr, Skip> {
    let class = w.tag("highway").unwrap_or("");
    if !profile.classes.contains_key(class) {
        return Err(Skip::Class);
    }
    let closed = |key: &str| {
        w.tag(key)
            .is_some_and(|v| profile.closed_access.iter().any(|c| c == v))
    };
    if w.tag("area") == Some("yes")
        || ["access", "vehicle", "motor_vehicle", "hgv"]
            .iter()
            .any(|k| closed(k))
        || w.tag("service")
            .is_some_and(|v| profile.closed_service.iter().any(|c| c == v))
    {
        return Err(Skip::Closed);
    }
    let (one_way, reversed) = direction(w).ok_or(Skip::Closed)?;
    let name = w.tag("name").or_else(|| w.tag("ref")).map(str::to_string);
    Ok(WayAttr {
        class: class.to_string(),
        name,
        one_way,
        reversed,
        overrides: w.overrides.clone(),
    })
}

/// A piece of one way between two split nodes, in driving direction for
/// one-way streets.
#[derive(Clone, Debug, PartialEq)]
pub(crate) struct Segment {
    /// Index into [`RawMap::ways`].
    pub way: usize,
    /// Node ids, at least two.
    pub nodes: Vec<i64>,
}

impl Segment {
    pub fn first(&self) -> i64 {
        self.nodes[0]
    }
    pub fn last(&self) -> i64 {
        self.nodes[self.nodes.len() - 1]
    }
}

/// Counts of what the filter saw.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub(crate) struct FilterStats {
    pub ways_other_class: usize,
    pub ways_closed: usize,
    pub ways_driven: usize,
    pub missing_node_refs: usize,
}

/// Rule 3: runs of nodes the map holds, without repeats.
fn pieces(nodes: &[i64], map: &RawMap, missing: &mut usize) -> Vec<Vec<i64>> {
    let mut out = Vec::new();
    let mut cur: Vec<i64> = Vec::new();
    let mut last = None;
    for &n in nodes {
        if last == Some(n) {
            continue;
        }
        last = Some(n);
        if !map.nodes.contains_key(&n) {
            *missing += 1;
            if cur.len() >= 2 {
                out.push(std::mem::take(&mut cur));
            }
            cur.clear();
            continue;
        }
        cur.push(n);
    }
    if cur.len() >= 2 {
        out.push(cur);
    }
    out
}

/// The segments of the drivable ways (rules 1 to 4), with the attributes of
/// every way (`None` for ways that are not streets). `split_also` is a node
/// that must end segments too (a yard given by node id).
pub(crate) fn segments(
    map: &RawMap,
    profile: &Profile,
    split_also: Option<i64>,
) -> (Vec<Segment>, Vec<Option<WayAttr>>, FilterStats) {
    let mut stats = FilterStats::default();
    let mut attrs = Vec::with_capacity(map.ways.len());
    let mut runs: Vec<(usize, Vec<i64>)> = Vec::new();
    for (i, w) in map.ways.iter().enumerate() {
        match accept(w, profile) {
            Ok(a) => {
                stats.ways_driven += 1;
                for mut p in pieces(&w.nodes, map, &mut stats.missing_node_refs) {
                    if a.reversed {
                        p.reverse();
                    }
                    runs.push((i, p));
                }
                attrs.push(Some(a));
            }
            Err(Skip::Class) => {
                stats.ways_other_class += 1;
                attrs.push(None);
            }
            Err(Skip::Closed) => {
                stats.ways_closed += 1;
                attrs.push(None);
            }
        }
    }
    // Rule 4: split nodes end a run or are used twice or more.
    let mut uses: HashMap<i64, u32> = HashMap::new();
    for (_, p) in &runs {
        for (k, &n) in p.iter().enumerate() {
            let bump = if k == 0 || k + 1 == p.len() { 2 } else { 1 };
            *uses.entry(n).or_default() += bump;
        }
    }
    if let Some(n) = split_also {
        if let Some(u) = uses.get_mut(&n) {
            *u += 2;
        }
    }
    let mut segs = Vec::new();
    for (way, p) in runs {
        let mut start = 0;
        for k in 1..p.len() {
            if uses[&p[k]] >= 2 {
                segs.push(Segment {
                    way,
                    nodes: p[start..=k].to_vec(),
                });
                start = k;
            }
        }
    }
    (segs, attrs, stats)
}
