//! Shortest paths against Floyd–Warshall written here, on random mixed graphs
//! (one-way and two-way links, parallel links, loops, explicit drive times).
//! Floyd–Warshall runs on (cost, time) pairs ordered lexicographically, the
//! convention of `arcwright::paths`: least cost, ties broken by least time.

#![allow(clippy::needless_range_loop)] // index loops read like the recurrence itself

use arcwright::model::{Link, Network};
use arcwright::paths::{Distances, UNREACHABLE};
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;

const INF: (i64, i64) = (i64::MAX, i64::MAX);

fn random_network(rng: &mut ChaCha8Rng) -> Network {
    let n = rng.random_range(1..=12);
    let m = rng.random_range(0..=3 * n);
    let mut net = Network::with_junctions(n);
    for _ in 0..m {
        let from = rng.random_range(0..n);
        let to = rng.random_range(0..n);
        // Small costs make ties (and so the time tie-break) frequent.
        let cost = rng.random_range(0..=6);
        let time = if rng.random_bool(0.6) {
            Some(rng.random_range(0..=9))
        } else {
            None
        };
        net.add_link(Link {
            from,
            to,
            oneway: rng.random_bool(0.5),
            cost,
            time,
            service: None,
            name: None,
            ..Link::default()
        });
    }
    net
}

fn floyd(net: &Network, with_times: bool) -> Vec<Vec<(i64, i64)>> {
    let n = net.junctions.len();
    let mut d = vec![vec![INF; n]; n];
    for (v, row) in d.iter_mut().enumerate() {
        row[v] = (0, 0);
    }
    for l in &net.links {
        let t = if with_times {
            l.time.unwrap_or(l.cost)
        } else {
            l.cost
        };
        let w = (l.cost, t);
        let mut put = |a: usize, b: usize| {
            if w < d[a][b] {
                d[a][b] = w;
            }
        };
        put(l.from, l.to);
        if !l.oneway {
            put(l.to, l.from);
        }
    }
    for k in 0..n {
        for i in 0..n {
            if d[i][k] == INF {
                continue;
            }
            for j in 0..n {
                if d[k][j] == INF {
                    continue;
                }
                let via = (d[i][k].0 + d[k][j].0, d[i][k].1 + d[k][j].1);
                if via < d[i][j] {
                    d[i][j] = via;
                }
            }
        }
    }
    d
}

#[test]
fn distances_and_paths_agree_with_floyd_warshall() {
    let mut rng = ChaCha8Rng::seed_from_u64(20261202);
    let mut pairs = 0;
    let mut reachable = 0;
    for _ in 0..400 {
        let net = random_network(&mut rng);
        let n = net.len();
        let with_times = rng.random_bool(0.7);
        let fw = floyd(&net, with_times);
        let dist = Distances::between(&net, (0..n).collect(), with_times).unwrap();
        for u in 0..n {
            for v in 0..n {
                pairs += 1;
                let (fc, ft) = fw[u][v];
                let path = dist.path(u, v);
                if fc == i64::MAX {
                    assert_eq!(dist.cost(u, v), UNREACHABLE, "{u}->{v} in {net:?}");
                    assert!(path.is_none());
                    continue;
                }
                reachable += 1;
                assert_eq!(dist.cost(u, v), fc, "cost {u}->{v} in {net:?}");
                assert_eq!(dist.time(u, v), ft, "time {u}->{v} in {net:?}");
                let path = path.expect("a path where Floyd–Warshall finds one");
                let mut at = u;
                let (mut c, mut t) = (0, 0);
                for h in &path {
                    let l = &net.links[h.link];
                    assert_eq!(h.from, at, "hops connect");
                    let forward = (h.from, h.to) == (l.from, l.to);
                    let backward = (h.from, h.to) == (l.to, l.from);
                    assert!(forward || (backward && !l.oneway), "hop drivable: {h:?}");
                    c += l.cost;
                    t += l.time.unwrap_or(l.cost);
                    at = h.to;
                }
                assert_eq!(at, v);
                assert_eq!(c, fc, "path cost {u}->{v}");
                if with_times {
                    assert_eq!(t, ft, "path time {u}->{v}");
                }
            }
        }
    }
    println!("{pairs} pairs compared, {reachable} reachable");
    assert!(reachable > pairs / 3);
}

/// On-demand distances (searched when asked, cached rows that grow, blocks
/// of legs) equal Floyd–Warshall on random mixed instances, asked in a
/// random order so that rows are searched, found short and searched again.
#[test]
fn on_demand_distances_agree_with_floyd_warshall() {
    use arcwright::model::{Fleet, Instance, ServeDirection, ServiceSpec};
    let mut rng = ChaCha8Rng::seed_from_u64(20261203);
    let mut checked = 0;
    for _ in 0..300 {
        let mut net = random_network(&mut rng);
        let n = net.len();
        for l in net.links.iter_mut() {
            if rng.random_bool(0.4) {
                l.service = Some(ServiceSpec {
                    demand: 1,
                    cost: l.cost,
                    time: None,
                    direction: if l.oneway {
                        ServeDirection::Forward
                    } else {
                        ServeDirection::Either
                    },
                });
            }
        }
        let with_times = net.links.iter().any(|l| l.time.is_some());
        let depot = rng.random_range(0..n);
        let Ok(inst) = Instance::new("random", net.clone(), Fleet::with_capacity(1000), depot)
        else {
            continue;
        };
        let fw = floyd(&net, with_times || inst.has_times());
        let dist = Distances::on_demand(&inst);
        assert!(dist.is_on_demand());
        let keys = dist.keys().to_vec();
        let mut pairs: Vec<(usize, usize)> = keys
            .iter()
            .flat_map(|&u| keys.iter().map(move |&v| (u, v)))
            .collect();
        for i in (1..pairs.len()).rev() {
            pairs.swap(i, rng.random_range(0..=i));
        }
        for (u, v) in pairs {
            let (fc, ft) = fw[u][v];
            if fc == i64::MAX {
                assert_eq!(dist.cost(u, v), UNREACHABLE, "{u}->{v} in {net:?}");
            } else {
                assert_eq!(dist.leg(u, v), (fc, ft), "{u}->{v} in {net:?}");
            }
            checked += 1;
        }
    }
    assert!(checked > 2000, "only {checked} pairs");
}

/// On a town larger than a cached row (hundreds of junctions), on-demand
/// distances equal the full matrices (themselves equal to Floyd–Warshall
/// above) for every pair of key junctions, asked in a random order.
#[test]
fn on_demand_distances_equal_the_full_matrix_on_a_town() {
    use arcwright::demo::{town, TownSpec};
    let inst = town(&TownSpec::new(3, 14)).expect("town");
    let full = Distances::new(&inst).unwrap();
    assert!(!full.is_on_demand());
    let lazy = Distances::on_demand(&inst);
    let keys = full.keys().to_vec();
    assert!(keys.len() > 2 * 256, "{} keys", keys.len());
    let mut rng = ChaCha8Rng::seed_from_u64(7);
    for _ in 0..60_000 {
        let u = keys[rng.random_range(0..keys.len())];
        let v = keys[rng.random_range(0..keys.len())];
        assert_eq!(lazy.leg(u, v), full.leg(u, v), "{u}->{v}");
    }
}
