//! The large-instance construction's searches against references: the
//! bounded nearest-street search, the batched legs of the split and the
//! candidate gaps, answered on demand (with and without turn rules), equal
//! scans of the full matrices (computed by other code: one complete search
//! per key junction or street) and, for plain deadheads, petgraph's
//! Dijkstra; Path-Scanning and the split give the same plans either way.

use petgraph::algo::dijkstra;
use petgraph::graph::{DiGraph, NodeIndex};
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha12Rng;

use super::arcs::{ArcMatrix, BIG};
use super::candidates::candidate_lists;
use super::giant;
use super::path_scanning::{path_scan_listed, RULES};
use super::split::split;
use crate::demo::{glued_copies, town, TownSpec};
use crate::model::{Dir, Instance};
use crate::paths::Distances;
use crate::turns::{TurnDistances, TurnPenalties, TurnRules, TurnTable};


/// The test instances: a town with shift limit and one-way streets, and
/// three copies of a smaller one glued at the yard (no shift limit).
fn instances() -> Vec<Instance> {
    let small = town(&TownSpec::new(11, 3)).expect("town");
    vec![town(&TownSpec::new(4, 6)).expect("town"), glued_copies(&small, 3).expect("copies")]
}

/// (what, reference with full matrices, answered on demand) for `inst`:
/// plain deadheads, and with turn rules (U-turns banned; with penalties).
fn matrices(inst: &Instance) -> Vec<(String, ArcMatrix, ArcMatrix)> {
    let full = ArcMatrix::new(inst, &Distances::new(inst).expect("paths")).expect("matrix");
    let lazy = ArcMatrix::new(inst, &Distances::on_demand(inst)).expect("matrix");
    let mut out = vec![("plain".to_string(), full, lazy)];
    for rules in [
        TurnRules::default(),
        TurnRules::trucks(TurnPenalties {
            straight: 0,
            right: 3,
            left: 11,
            u_turn: 40,
        }),
    ] {
        let table = TurnTable::new(inst, &rules).expect("turn table");
        let full = ArcMatrix::with_turns(inst, &TurnDistances::full(inst, &table)).expect("m");
        let lazy = ArcMatrix::with_turns(inst, &TurnDistances::on_demand(inst, &table)).expect("m");
        out.push((format!("{rules:?}"), full, lazy));
    }
    for (_, full, lazy) in &out {
        assert!(lazy.is_on_demand() && !full.is_on_demand());
    }
    out
}

/// The leg the on-demand matrix must give, from the full one: missing
/// ([`BIG`]) above its length cap, else the same (cost, time).
fn expected(full: &ArcMatrix, lazy: &ArcMatrix, a: u32, b: u32) -> (i64, i64) {
    let (cap, _) = lazy.longest_legs();
    let (d, t) = (full.d(a, b), full.t(a, b));
    if d >= BIG || d > cap || t > cap {
        (BIG, BIG)
    } else {
        (d, t)
    }
}

/// A random allowed task arc.
fn some_arc(m: &ArcMatrix, rng: &mut ChaCha12Rng) -> u32 {
    loop {
        let a = rng.random_range(0..2 * m.n as u32);
        if m.allowed[a as usize] {
            return a;
        }
    }
}

#[test]
fn bounded_nearest_search_equals_a_scan_of_the_full_matrices() {
    for inst in instances() {
        for (what, full, lazy) in matrices(&inst) {
            let mut rng = ChaCha12Rng::seed_from_u64(5);
            for trial in 0..120 {
                let a = some_arc(&lazy, &mut rng);
                // Few or many streets served; a capacity and a time budget
                // that reject some of the rest (exercising the re-checks).
                let p = [0.3, 0.9, 0.99][trial % 3];
                let served: Vec<bool> = (0..lazy.n).map(|_| rng.random_bool(p)).collect();
                let room = rng.random_range(1..40);
                let budget = rng.random_range(0..4000);
                let ok = |b: u32, t: i64| {
                    !served[ArcMatrix::task(b)]
                        && lazy.allowed[b as usize]
                        && lazy.demand[b as usize] <= room
                        && t + lazy.serve_time[b as usize] <= budget
                };
                let mut want: Vec<u32> = Vec::new();
                let mut least = i64::MAX;
                for b in 0..2 * lazy.n as u32 {
                    let (d, t) = expected(&full, &lazy, a, b);
                    let t = if lazy.timed() { t } else { d };
                    if d < BIG && d <= least && ok(b, t) {
                        if d < least {
                            least = d;
                            want.clear();
                        }
                        want.push(b);
                    }
                }
                let mut got = lazy.nearest_arcs(a, &mut |b, _, t| ok(b, t));
                got.sort_unstable();
                assert_eq!(got, want, "{} {what}: from {a} (trial {trial})", inst.name);
                // The dense matrix's scan agrees where no leg is capped.
                let mut dense = full.nearest_arcs(a, &mut |b, _, t| ok(b, t));
                dense.sort_unstable();
                if what == "plain" {
                    assert_eq!(dense, want, "{} dense: from {a}", inst.name);
                }
            }
        }
    }
}

/// The deadhead graph of `inst` for petgraph (links driven their allowed
/// ways, at their cost).
fn petgraph_of(inst: &Instance) -> DiGraph<(), i64> {
    let net = inst.network();
    let mut g = DiGraph::new();
    let nodes: Vec<NodeIndex> = (0..net.junctions.len()).map(|_| g.add_node(())).collect();
    for l in &net.links {
        g.add_edge(nodes[l.from], nodes[l.to], l.cost);
        if !l.oneway {
            g.add_edge(nodes[l.to], nodes[l.from], l.cost);
        }
    }
    g
}

/// Start and end junction of task arc `a`.
fn ends(inst: &Instance, a: u32) -> (usize, usize) {
    let dir = if a & 1 == 0 { Dir::Forward } else { Dir::Backward };
    inst.tasks()[ArcMatrix::task(a)].ends(dir)
}

#[test]
fn nearest_streets_and_batched_legs_cost_what_petgraph_finds() {
    for inst in instances() {
        let g = petgraph_of(&inst);
        let lazy = ArcMatrix::new(&inst, &Distances::on_demand(&inst)).expect("matrix");
        let mut rng = ChaCha12Rng::seed_from_u64(9);
        for _ in 0..60 {
            let a = some_arc(&lazy, &mut rng);
            let from = NodeIndex::new(ends(&inst, a).1);
            let dist = dijkstra(&g, from, None, |e| *e.weight());
            let cost = |b: u32| dist.get(&NodeIndex::new(ends(&inst, b).0)).copied();
            let served: Vec<bool> = (0..lazy.n).map(|_| rng.random_bool(0.8)).collect();
            let open = |b: u32| !served[ArcMatrix::task(b)] && lazy.allowed[b as usize];
            let least = (0..2 * lazy.n as u32)
                .filter(|&b| open(b))
                .filter_map(cost)
                .min();
            let got = lazy.nearest_arcs(a, &mut |b, _, _| open(b));
            let mut want: Vec<u32> = (0..2 * lazy.n as u32)
                .filter(|&b| open(b) && cost(b).is_some() && cost(b) == least)
                .collect();
            let mut got_sorted = got.clone();
            got_sorted.sort_unstable();
            want.sort_unstable();
            assert_eq!(got_sorted, want, "{}: from {a}", inst.name);
            // Legs to a few arcs, most of them far (other copies when glued).
            let bs: Vec<u32> = (0..3).map(|_| some_arc(&lazy, &mut rng)).collect();
            let legs = lazy.legs_from(a, &bs);
            for (&b, &(d, _)) in bs.iter().zip(&legs) {
                assert_eq!(Some(d), cost(b), "{}: {a} -> {b}", inst.name);
            }
        }
    }
}

#[test]
fn batched_legs_and_gaps_equal_the_full_matrices() {
    for inst in instances() {
        for (what, full, lazy) in matrices(&inst) {
            let mut rng = ChaCha12Rng::seed_from_u64(3);
            for _ in 0..80 {
                let a = some_arc(&lazy, &mut rng);
                let mut bs: Vec<u32> = (0..4).map(|_| some_arc(&lazy, &mut rng)).collect();
                bs.push(lazy.depot);
                let got = lazy.legs_from(a, &bs);
                for (&b, &leg) in bs.iter().zip(&got) {
                    let (d, t) = expected(&full, &lazy, a, b);
                    let want = (d, if lazy.timed() { t } else { d });
                    assert_eq!(leg, want, "{} {what}: {a} -> {b}", inst.name);
                }
                assert_eq!(lazy.legs_from(lazy.depot, &bs[..1])[0].0, full.d(lazy.depot, bs[0]));
            }
            let others: Vec<u32> = (0..lazy.n as u32).collect();
            for u in (0..lazy.n).step_by(5) {
                let gaps = lazy.task_gaps(u, &others);
                for (v, &g) in gaps.iter().enumerate() {
                    assert_eq!(g, lazy.task_gap(u, v), "{} {what}: gap {u} {v}", inst.name);
                    let f = full.task_gap(u, v);
                    if f <= lazy.longest_legs().0 {
                        assert_eq!(g, f, "{} {what}: gap {u} {v}", inst.name);
                    }
                }
            }
        }
    }
}

#[test]
fn listed_path_scanning_and_split_give_the_same_plans_on_demand() {
    for inst in instances() {
        for (what, full, lazy) in matrices(&inst) {
            let cand = candidate_lists(&inst, &full, 16);
            assert_eq!(cand, candidate_lists(&inst, &lazy, 16), "{what}");
            for rule in RULES {
                let never = || false;
                let a = path_scan_listed::<ChaCha12Rng>(&full, &cand, rule, None, &never);
                let b = path_scan_listed::<ChaCha12Rng>(&lazy, &cand, rule, None, &never);
                let (a, b) = (a.expect("ran"), b.expect("ran"));
                assert_eq!(a, b, "{} {what} {rule:?}", inst.name);
                let tour = giant::of_routes(&a);
                let (sa, sb) = (split(&full, &tour).expect("s"), split(&lazy, &tour).expect("s"));
                assert_eq!(sa.cost, sb.cost, "{} {what} {rule:?}", inst.name);
                assert_eq!(sa.routes, sb.routes, "{} {what} {rule:?}", inst.name);
                let sum: i64 = sb.routes.iter().map(|r| lazy.route_eval(r).0).sum();
                assert_eq!(sum, sb.cost);
                assert!(sb.routes.iter().all(|r| lazy.route_feasible(r)));
            }
        }
    }
}

#[test]
fn listed_path_scanning_gives_up_when_asked() {
    let inst = town(&TownSpec::new(4, 6)).expect("town");
    let m = ArcMatrix::new(&inst, &Distances::on_demand(&inst)).expect("matrix");
    let cand = candidate_lists(&inst, &m, 16);
    let asked = std::cell::Cell::new(0usize);
    let after_ten = || {
        asked.set(asked.get() + 1);
        asked.get() > 10
    };
    assert!(path_scan_listed::<ChaCha12Rng>(&m, &cand, RULES[0], None, &after_ten).is_none());
    assert_eq!(asked.get(), 11);
    let never = || false;
    assert!(path_scan_listed::<ChaCha12Rng>(&m, &cand, RULES[0], None, &never).is_some());
}
