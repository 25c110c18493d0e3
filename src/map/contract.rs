//! Rule 5 (keep the strongly connected part) and rule 6 (join chains of
//! segments through nodes where only they meet) of [`crate::map`].

use std::collections::{HashMap, HashSet};

use petgraph::algo::tarjan_scc;
use petgraph::graph::DiGraph;

use super::graph::{Segment, WayAttr};

/// Splits segments into those inside the chosen strongly connected component
/// and the rest. The component is the one holding `anchor` when given, else
/// the largest (most nodes; ties: the one with the smallest node id).
pub(crate) fn keep_strong(
    segs: Vec<Segment>,
    attrs: &[Option<WayAttr>],
    anchor: Option<i64>,
) -> (Vec<Segment>, Vec<Segment>) {
    let mut index: HashMap<i64, petgraph::graph::NodeIndex> = HashMap::new();
    let mut g: DiGraph<i64, ()> = DiGraph::new();
    let mut node =
        |g: &mut DiGraph<i64, ()>, n: i64| *index.entry(n).or_insert_with(|| g.add_node(n));
    for s in &segs {
        let (a, b) = (node(&mut g, s.first()), node(&mut g, s.last()));
        g.add_edge(a, b, ());
        if !attrs[s.way].as_ref().is_some_and(|a| a.one_way) {
            g.add_edge(b, a, ());
        }
    }
    let comps = tarjan_scc(&g);
    let ids = |c: &Vec<petgraph::graph::NodeIndex>| c.iter().map(|&i| g[i]).collect::<Vec<_>>();
    let chosen: HashSet<i64> = match anchor {
        Some(n) => comps
            .iter()
            .map(ids)
            .find(|c| c.contains(&n))
            .unwrap_or_default()
            .into_iter()
            .collect(),
        None => comps
            .iter()
            .map(ids)
            .min_by_key(|c| (std::cmp::Reverse(c.len()), c.iter().copied().min()))
            .unwrap_or_default()
            .into_iter()
            .collect(),
    };
    segs.into_iter()
        .partition(|s| chosen.contains(&s.first()) && chosen.contains(&s.last()))
}

/// A chain of segments: one street.
#[derive(Clone, Debug, PartialEq)]
pub(crate) struct Chain {
    /// Node ids from the first junction to the last.
    pub nodes: Vec<i64>,
    /// The way (index) of the first and of the last segment.
    pub end_ways: (usize, usize),
    /// The way whose attributes the street has (all its segments agree).
    pub way: usize,
}

/// Joins segments through removable nodes (rule 6). `keep` is a node that
/// stays a junction whatever its degree (the yard).
pub(crate) fn contract(
    segs: &[Segment],
    attrs: &[Option<WayAttr>],
    keep: Option<i64>,
) -> Vec<Chain> {
    let attr = |i: usize| {
        attrs[segs[i].way]
            .as_ref()
            .expect("segments come from streets")
    };
    let mut inc: HashMap<i64, Vec<usize>> = HashMap::new();
    for (i, s) in segs.iter().enumerate() {
        inc.entry(s.first()).or_default().push(i);
        inc.entry(s.last()).or_default().push(i);
    }
    let removable = |n: i64| -> bool {
        let e = &inc[&n];
        if Some(n) == keep || e.len() != 2 || e[0] == e[1] {
            return false;
        }
        let (a, b) = (attr(e[0]), attr(e[1]));
        if !a.joins(b) {
            return false;
        }
        if a.one_way {
            let arrive = e.iter().filter(|&&i| segs[i].last() == n).count();
            let leave = e.iter().filter(|&&i| segs[i].first() == n).count();
            return arrive == 1 && leave == 1;
        }
        true
    };
    let mut nodes: Vec<i64> = inc.keys().copied().collect();
    nodes.sort_unstable();
    let mut rem: HashSet<i64> = nodes.iter().copied().filter(|&n| removable(n)).collect();
    let mut used = vec![false; segs.len()];
    let mut chains = Vec::new();
    let walk = |start: i64, mut i: usize, used: &mut Vec<bool>, rem: &HashSet<i64>| {
        let mut out = vec![start];
        let first_way = segs[i].way;
        let mut cur = start;
        loop {
            used[i] = true;
            let s = &segs[i];
            if s.first() == cur {
                out.extend_from_slice(&s.nodes[1..]);
            } else {
                out.extend(s.nodes.iter().rev().skip(1));
            }
            cur = out[out.len() - 1];
            if !rem.contains(&cur) {
                break;
            }
            let e = &inc[&cur];
            let next = if e[0] == i { e[1] } else { e[0] };
            if used[next] {
                break;
            }
            i = next;
        }
        Chain {
            nodes: out,
            end_ways: (first_way, segs[i].way),
            way: segs[i].way,
        }
    };
    for &n in &nodes {
        if rem.contains(&n) {
            continue;
        }
        for &i in &inc[&n] {
            if used[i] || (attr(i).one_way && segs[i].first() != n) {
                continue;
            }
            chains.push(walk(n, i, &mut used, &rem));
        }
    }
    // Rings made only of removable nodes: start at the smallest node id.
    for i in 0..segs.len() {
        if used[i] {
            continue;
        }
        let ring = ring_nodes(segs, &inc, i);
        let start = ring.iter().copied().min().expect("a segment has nodes");
        let j = inc[&start]
            .iter()
            .copied()
            .find(|&j| !attr(j).one_way || segs[j].first() == start)
            .expect("a ring leaves each of its nodes");
        rem.remove(&start);
        chains.push(walk(start, j, &mut used, &rem));
    }
    chains
}

fn ring_nodes(segs: &[Segment], inc: &HashMap<i64, Vec<usize>>, i: usize) -> Vec<i64> {
    let mut seen = HashSet::from([i]);
    let mut stack = vec![i];
    let mut nodes = Vec::new();
    while let Some(k) = stack.pop() {
        for n in [segs[k].first(), segs[k].last()] {
            nodes.push(n);
            for &j in &inc[&n] {
                if seen.insert(j) {
                    stack.push(j);
                }
            }
        }
    }
    nodes
}
