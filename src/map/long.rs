//! Streets too heavy for one truck are cut at their inner nodes.
//!
//! A required street whose demand (one pass) would exceed a truck's capacity
//! could not be served at all. Such chains are cut at inner nodes into pieces
//! of at most 90 % of the longest length a truck can serve in one pass (the
//! margin keeps rounding from tipping a piece over). Short streets, and
//! streets that are only driven, are left whole.

use std::collections::HashMap;

use super::contract::Chain;
use super::graph::WayAttr;
use super::length::metres;
use super::profile::{Profile, Serve};

/// The longest street, in metres, one truck can serve in one pass, for a way
/// with these attributes; `None` when there is no limit.
fn max_len_m(a: &WayAttr, profile: &Profile) -> Option<f64> {
    let rule = &profile.classes[&a.class];
    if !a.overrides.required.unwrap_or(rule.serve != Serve::No) {
        return None;
    }
    let per_km = a
        .overrides
        .demand_per_km
        .unwrap_or(profile.demand_per_km_of_kerb);
    let kerbs = if rule.serve == Serve::EachSide {
        1.0
    } else {
        2.0
    };
    (per_km > 0).then(|| 0.9 * profile.truck.capacity as f64 * 1000.0 / (f64::from(per_km) * kerbs))
}

/// Cuts the chains that are too long; returns how many cuts were made.
pub(crate) fn cut_long(
    chains: Vec<Chain>,
    attrs: &[Option<WayAttr>],
    nodes: &HashMap<i64, [f64; 2]>,
    profile: &Profile,
) -> (Vec<Chain>, usize) {
    let mut out = Vec::with_capacity(chains.len());
    let mut cuts = 0;
    for c in chains {
        let a = attrs[c.way].as_ref().expect("chains come from streets");
        let Some(max) = max_len_m(a, profile) else {
            out.push(c);
            continue;
        };
        let mut start = 0;
        let mut run = 0.0;
        for k in 1..c.nodes.len() {
            let step = metres(nodes[&c.nodes[k - 1]], nodes[&c.nodes[k]]);
            if run > 0.0 && run + step > max {
                out.push(Chain {
                    nodes: c.nodes[start..k].to_vec(),
                    end_ways: (if start == 0 { c.end_ways.0 } else { c.way }, c.way),
                    way: c.way,
                });
                cuts += 1;
                start = k - 1;
                run = 0.0;
            }
            run += step;
        }
        if start == 0 {
            out.push(c);
        } else {
            out.push(Chain {
                nodes: c.nodes[start..].to_vec(),
                end_ways: (c.way, c.end_ways.1),
                way: c.way,
            });
        }
    }
    (out, cuts)
}
