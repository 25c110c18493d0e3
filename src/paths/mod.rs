//! Exact shortest deadhead paths between the junctions that matter.
//!
//! [`Distances`] holds the all-pairs shortest-path costs (and the driving
//! times along those same paths) between the *key* junctions: the depot and
//! the ends of every task. Paths are lexicographic shortest paths: least
//! cost first, then least time among equally cheap paths, so costs and times
//! are well defined and reproducible.
//!
//! **Memory.** With `K` key junctions the matrices take `4·K²` bytes (cost
//! only) or `8·K²` bytes (when times differ from costs), plus `O(N + M)` for
//! the adjacency of a network of `N` junctions and `M` links. A network whose
//! 20,000 junctions are all key junctions would need 1.6 GB (3.2 GB with
//! times): above [`FULL_MATRIX_KEYS`] key junctions [`Distances::new`]
//! therefore answers on demand ([`Distances::on_demand`]): the yard's row and
//! column in full, any other leg by a search from its start when first asked,
//! kept in a bounded cache (at most [`CACHE_ENTRIES`] entries of 20 bytes).
//! The values are the same either way. Paths are not stored: [`Distances::path`] re-runs one Dijkstra search to
//! write a deadhead out street by street, which is only needed for output.
//!
//! Sources are processed in parallel with rayon; the result does not depend
//! on the number of threads.

use std::cmp::Reverse;
use std::collections::BinaryHeap;
use std::sync::Arc;

use rayon::prelude::*;

pub(crate) mod on_demand;

pub use on_demand::CACHE_ENTRIES;

use on_demand::{Avoiding, RowCache, Settled, StateGraph, Until};

use crate::model::{Cost, Instance, Network};

/// Cost reported between junctions with no path.
pub const UNREACHABLE: Cost = Cost::MAX / 4;

const NONE: u32 = u32::MAX;

/// One link driven during a deadhead.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Hop {
    /// Link index.
    pub link: usize,
    /// Junction the hop starts at.
    pub from: usize,
    /// Junction the hop ends at.
    pub to: usize,
}

/// Compact forward adjacency (CSR) of the deadhead graph.
#[derive(Clone, Debug)]
struct Adjacency {
    start: Vec<u32>,
    to: Vec<u32>,
    cost: Vec<Cost>,
    time: Vec<Cost>,
    link: Vec<u32>,
}

impl StateGraph for Adjacency {
    fn states(&self) -> usize {
        self.start.len() - 1
    }

    fn moves(&self, s: u32, f: &mut dyn FnMut(u32, Cost, Cost)) {
        for p in self.start[s as usize] as usize..self.start[s as usize + 1] as usize {
            f(self.to[p], self.cost[p], self.time[p]);
        }
    }
}

impl Adjacency {
    fn new(net: &Network) -> Self {
        Self::build(net, false)
    }

    /// The adjacency of `net`, with every link turned round when `reversed`.
    fn build(net: &Network, reversed: bool) -> Self {
        let n = net.junctions.len();
        let mut deg = vec![0u32; n + 1];
        let ends = |l: &crate::model::Link| {
            if reversed {
                (l.to, l.from)
            } else {
                (l.from, l.to)
            }
        };
        for l in &net.links {
            deg[ends(l).0] += 1;
            if !l.oneway {
                deg[ends(l).1] += 1;
            }
        }
        let mut start = vec![0u32; n + 1];
        for v in 0..n {
            start[v + 1] = start[v] + deg[v];
        }
        let m = start[n] as usize;
        let mut fill = start.clone();
        let (mut to, mut cost, mut time, mut link) =
            (vec![0; m], vec![0; m], vec![0; m], vec![0; m]);
        for (i, l) in net.links.iter().enumerate() {
            let mut put = |a: usize, b: usize| {
                let p = fill[a] as usize;
                fill[a] += 1;
                to[p] = b as u32;
                cost[p] = l.cost;
                time[p] = l.drive_time();
                link[p] = i as u32;
            };
            let (a, b) = ends(l);
            put(a, b);
            if !l.oneway {
                put(b, a);
            }
        }
        Adjacency {
            start,
            to,
            cost,
            time,
            link,
        }
    }

    /// Lexicographic Dijkstra from `s`; returns (cost, time, predecessor arc).
    fn dijkstra(&self, s: usize, stop_at: Option<usize>) -> (Vec<Cost>, Vec<Cost>, Vec<u32>) {
        let n = self.start.len() - 1;
        let mut dc = vec![UNREACHABLE; n];
        let mut dt = vec![UNREACHABLE; n];
        let mut pred = vec![NONE; n];
        let mut heap = BinaryHeap::new();
        dc[s] = 0;
        dt[s] = 0;
        heap.push(Reverse((0, 0, s as u32)));
        while let Some(Reverse((c, t, v))) = heap.pop() {
            let v = v as usize;
            if (c, t) != (dc[v], dt[v]) {
                continue;
            }
            if stop_at == Some(v) {
                break;
            }
            for p in self.start[v] as usize..self.start[v + 1] as usize {
                let w = self.to[p] as usize;
                let (nc, nt) = (c + self.cost[p], t + self.time[p]);
                if (nc, nt) < (dc[w], dt[w]) {
                    dc[w] = nc;
                    dt[w] = nt;
                    pred[w] = p as u32;
                    heap.push(Reverse((nc, nt, w as u32)));
                }
            }
        }
        (dc, dt, pred)
    }
}

/// Why distances could not be computed.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
pub enum DistanceError {
    /// A shortest path is too long for the compact 32-bit matrix.
    #[error("a shortest path from junction {from} to {to} costs {value}, more than the 32-bit matrix holds")]
    Overflow {
        /// Index of the start junction.
        from: usize,
        /// Index of the end junction.
        to: usize,
        /// The path's cost.
        value: Cost,
    },
}

/// One source's rows of the cost and (optional) time matrices.
type Row<'a> = (usize, &'a mut [u32], Option<&'a mut [u32]>);

/// Above this many key junctions [`Distances::new`] answers on demand
/// ([`Distances::on_demand`]) instead of holding square matrices (which
/// would take more than 256 MiB, 512 MiB with times).
pub const FULL_MATRIX_KEYS: usize = 8192;

/// Shortest deadhead costs and times between key junctions: all pairs in
/// square matrices, or on demand with a cache for large networks.
#[derive(Clone, Debug)]
pub struct Distances {
    adj: Adjacency,
    keys: Vec<usize>,
    key_of: Vec<u32>,
    cost: Vec<u32>,
    time: Option<Vec<u32>>,
    lazy: Option<Arc<Lazy>>,
}

/// The on-demand side of [`Distances`]: the yard's row and column in full,
/// other legs searched when asked and cached ([`on_demand`]).
#[derive(Debug)]
struct Lazy {
    depot: usize,
    from_depot: Vec<(Cost, Cost)>,
    to_depot: Vec<(Cost, Cost)>,
    cache: RowCache,
    /// The network with every link turned round (searches into a junction).
    rev: Adjacency,
}

impl Distances {
    /// Computes distances between the depot and all task ends of `inst`.
    ///
    /// # Errors
    /// [`DistanceError::Overflow`] when a shortest path costs more than the 32-bit matrix holds
    /// (`u32::MAX - 1`).
    ///
    /// # Complexity
    /// One Dijkstra search `O((V + E) log V)` per key junction `K` (in
    /// parallel), `4·K²` bytes (`8·K²` with times); see the module docs.
    ///
    /// ```
    /// use arcwright::model::{Fleet, Instance, Network};
    /// use arcwright::paths::Distances;
    /// let mut net = Network::with_junctions(3);
    /// net.add_required_edge(1, 2, 4, 1);
    /// net.add_edge(0, 1, 3);
    /// net.add_edge(0, 2, 9);
    /// let inst = Instance::new("detour", net, Fleet::with_capacity(5), 0).unwrap();
    /// let dist = Distances::new(&inst).unwrap();
    /// assert_eq!(dist.cost(0, 2), 7); // 0 -> 1 -> 2 beats the direct 9
    /// ```
    pub fn new(inst: &Instance) -> Result<Self, DistanceError> {
        let keys = Self::keys_of(inst);
        if keys.len() > FULL_MATRIX_KEYS {
            return Ok(Self::on_demand(inst));
        }
        Self::between(inst.network(), keys, inst.has_times())
    }

    /// The yard and every street end of `inst`, sorted, without repeats.
    fn keys_of(inst: &Instance) -> Vec<usize> {
        let mut keys = vec![inst.depot()];
        for t in inst.tasks() {
            keys.push(t.tail);
            keys.push(t.head);
        }
        keys.sort_unstable();
        keys.dedup();
        keys
    }

    /// Distances of `inst` answered on demand: the yard's row and column are
    /// computed in full (two searches), any other leg by a search from its
    /// start when first asked, kept in a bounded cache: a row of the nearest
    /// junctions per start (grown when a leg falls outside it, up to 4,096
    /// junctions) and single far legs beyond; the whole cache is dropped
    /// when it would pass [`CACHE_ENTRIES`]. Values equal those of
    /// [`Distances::new`] with square matrices, and are not limited to 32
    /// bits. What [`Distances::new`] chooses above [`FULL_MATRIX_KEYS`] key
    /// junctions.
    ///
    /// # Complexity
    /// `O(V + E)` memory for the network and the yard's row and column, plus
    /// the cache (at most [`CACHE_ENTRIES`] entries); each
    /// question not in the cache costs one search that stops as soon as it
    /// reaches the asked junction (and a minimum number of others).
    ///
    /// ```
    /// use arcwright::model::{Fleet, Instance, Network};
    /// use arcwright::paths::Distances;
    /// let mut net = Network::with_junctions(3);
    /// net.add_required_edge(1, 2, 4, 1);
    /// net.add_edge(0, 1, 3);
    /// net.add_edge(0, 2, 9);
    /// let inst = Instance::new("detour", net, Fleet::with_capacity(5), 0).unwrap();
    /// let dist = Distances::on_demand(&inst);
    /// assert_eq!(dist.cost(0, 2), 7);
    /// assert_eq!(dist.cost(2, 1), 4);
    /// ```
    pub fn on_demand(inst: &Instance) -> Self {
        let net = inst.network();
        let keys = Self::keys_of(inst);
        let adj = Adjacency::new(net);
        let rev = Adjacency::build(net, true);
        let depot = inst.depot();
        let n = net.junctions.len();
        let mut key_of = vec![NONE; n];
        for (i, &v) in keys.iter().enumerate() {
            key_of[v] = i as u32;
        }
        let init = [(depot as u32, 0, 0)];
        let (from_depot, to_depot) = rayon::join(
            || on_demand::full_values(n, &on_demand::settle(&adj, &init, Until::All)),
            || on_demand::full_values(n, &on_demand::settle(&rev, &init, Until::All)),
        );
        Distances {
            adj,
            keys,
            key_of,
            cost: Vec::new(),
            time: None,
            lazy: Some(Arc::new(Lazy {
                depot,
                from_depot,
                to_depot,
                cache: RowCache::new(n),
                rev,
            })),
        }
    }

    /// Whether the legs are answered on demand (not held in matrices).
    pub fn is_on_demand(&self) -> bool {
        self.lazy.is_some()
    }

    /// The least cost from `u` to `v` and the time along that path
    /// ([`UNREACHABLE`] for both when there is none).
    ///
    /// # Panics
    /// If `u` or `v` is not a key junction (a programming error).
    pub fn leg(&self, u: usize, v: usize) -> (Cost, Cost) {
        match &self.lazy {
            None => (self.cost(u, v), self.time(u, v)),
            Some(z) => {
                let _ = self.idx(u, v);
                self.lazy_leg(z, u, v)
            }
        }
    }

    fn lazy_leg(&self, z: &Lazy, u: usize, v: usize) -> (Cost, Cost) {
        if u == z.depot {
            z.from_depot[v]
        } else if v == z.depot {
            z.to_depot[u]
        } else if u == v {
            (0, 0)
        } else {
            let init = [(u as u32, 0, 0)];
            z.cache.leg(u, v as u32, |v, min| -> Settled {
                on_demand::settle(&self.adj, &init, Until::Reach(v, min))
            })
        }
    }

    /// The legs between `u` and each of `targets` (junctions, key or not):
    /// from `u` to each target, or from each target to `u` when `into`;
    /// one search from `u` (on the reversed network when `into`) that does
    /// not pass through the yard, stopped as soon as every target is settled
    /// or no way left can beat the way through the yard (see
    /// `legs_via_yard`). The values are those of
    /// [`Distances::leg`] (the least cost, then least time, over the same
    /// paths). `None` unless on demand (the matrices answer directly).
    pub(crate) fn legs_between(
        &self,
        u: usize,
        targets: &[usize],
        into: bool,
    ) -> Option<Vec<(Cost, Cost)>> {
        let z = self.lazy.as_ref()?;
        let ts: Vec<u32> = targets.iter().map(|&t| t as u32).collect();
        Some(self.legs_via_yard(z, u, &ts, into))
    }

    /// The legs between `u` and each of `targets` (from `u`, or into `u`
    /// when `into`), exact: the least of the way through the yard (the
    /// yard's row and column, lexicographic sums are exact since a least
    /// way through the yard is a least way to it followed by a least way
    /// from it) and of one search from `u` that does not pass through the
    /// yard, stopped when every target is settled or the search passes the
    /// longest way through the yard. Where the yard joins otherwise
    /// separate parts of the network (glued copies), the search stays in
    /// `u`'s part instead of settling every part around the yard.
    fn legs_via_yard(&self, z: &Lazy, u: usize, targets: &[u32], into: bool) -> Vec<(Cost, Cost)> {
        let add = |a: (Cost, Cost), b: (Cost, Cost)| {
            if a.0 >= UNREACHABLE || b.0 >= UNREACHABLE {
                (UNREACHABLE, UNREACHABLE)
            } else {
                (a.0 + b.0, a.1 + b.1)
            }
        };
        let via = |v: usize| {
            if into {
                add(z.to_depot[v], z.from_depot[u])
            } else {
                add(z.to_depot[u], z.from_depot[v])
            }
        };
        if u == z.depot {
            let side = if into { &z.to_depot } else { &z.from_depot };
            return targets.iter().map(|&v| side[v as usize]).collect();
        }
        let mut marks = vec![false; self.key_of.len()];
        let mut k = 0;
        let mut cap = (0, 0);
        for &t in targets {
            k += usize::from(!marks[t as usize]);
            marks[t as usize] = true;
            let v = via(t as usize);
            cap = if v.0 >= UNREACHABLE {
                (Cost::MAX, Cost::MAX)
            } else {
                cap.max(v)
            };
        }
        let init = [(u as u32, 0, 0)];
        let graph: &Adjacency = if into { &z.rev } else { &self.adj };
        let avoid = Avoiding {
            g: graph,
            skip: z.depot as u32,
        };
        let until = Until::Below(Box::new(Until::Targets(&marks, k)), cap);
        let mut found = on_demand::settle(&avoid, &init, until).order;
        found.sort_unstable_by_key(|x| x.0);
        targets
            .iter()
            .map(|&t| {
                let direct = match found.binary_search_by_key(&t, |x| x.0) {
                    Ok(i) => (found[i].1, found[i].2),
                    Err(_) => (UNREACHABLE, UNREACHABLE),
                };
                direct.min(via(t as usize))
            })
            .collect()
    }

    /// The nearest targets from junction `u` (on demand only): targets are
    /// the items of `at` at each junction, `accept(target, cost, time)`
    /// filters them by their exact leg; returns every accepted target of
    /// least leg cost with its leg, searching only as far as needed (see
    /// [`on_demand::nearest`]); nothing when none within `limit` qualifies.
    pub(crate) fn nearest_from(
        &self,
        u: usize,
        at: &on_demand::Csr,
        limit: Cost,
        accept: &mut dyn FnMut(u32, Cost, Cost) -> bool,
    ) -> Vec<(u32, Cost, Cost)> {
        on_demand::nearest(
            &self.adj,
            &[(u as u32, 0, 0)],
            at,
            &|_| (0, 0),
            limit,
            accept,
        )
    }

    /// The legs from `u` to each of a few key junctions `vs`, the values of
    /// [`Distances::leg`]: from the cache or matrices when they hold them,
    /// else by one search from `u` stopped when every one of `vs` is
    /// settled (not cached), instead of one search per leg.
    pub(crate) fn legs_to(&self, u: usize, vs: &[usize]) -> Vec<(Cost, Cost)> {
        let Some(z) = &self.lazy else {
            return vs.iter().map(|&v| self.leg(u, v)).collect();
        };
        let quick = |v: usize| {
            if u == z.depot {
                Some(z.from_depot[v])
            } else if v == z.depot {
                Some(z.to_depot[u])
            } else if u == v {
                Some((0, 0))
            } else {
                z.cache.peek(u, v as u32)
            }
        };
        let mut out: Vec<Option<(Cost, Cost)>> = vs.iter().map(|&v| quick(v)).collect();
        let missing: Vec<u32> = vs
            .iter()
            .zip(&out)
            .filter(|(_, x)| x.is_none())
            .map(|(&v, _)| v as u32)
            .collect();
        if !missing.is_empty() {
            let mut found = self.legs_via_yard(z, u, &missing, false).into_iter();
            for x in out.iter_mut().filter(|x| x.is_none()) {
                *x = found.next();
            }
        }
        out.into_iter().map(|x| x.expect("every leg")).collect()
    }

    /// Legs from `u` to every junction (indexed by junction): one full
    /// search when on demand (not cached), the matrix row otherwise (key
    /// junctions only; others read unreachable).
    pub(crate) fn row(&self, u: usize) -> Vec<(Cost, Cost)> {
        match &self.lazy {
            Some(z) if u == z.depot => z.from_depot.clone(),
            Some(_) => {
                let n = self.key_of.len();
                on_demand::full_values(
                    n,
                    &on_demand::settle(&self.adj, &[(u as u32, 0, 0)], Until::All),
                )
            }
            None => {
                let mut out = vec![(UNREACHABLE, UNREACHABLE); self.key_of.len()];
                for &v in &self.keys {
                    out[v] = self.leg(u, v);
                }
                out
            }
        }
    }

    /// Legs from every junction of `rows` to every junction of `cols`
    /// (row-major): lookups in the matrices, or on demand one search per
    /// row that stops when every column is reached (not cached); `None`
    /// when `give_up` answers true before a row's search.
    pub(crate) fn block(
        &self,
        rows: &[usize],
        cols: &[usize],
        give_up: &(dyn Fn() -> bool + Sync),
    ) -> Option<Vec<(Cost, Cost)>> {
        let Some(z) = &self.lazy else {
            return Some(
                rows.iter()
                    .flat_map(|&u| cols.iter().map(move |&v| (u, v)))
                    .map(|(u, v)| self.leg(u, v))
                    .collect(),
            );
        };
        let mut uniq = rows.to_vec();
        uniq.sort_unstable();
        uniq.dedup();
        let inits: Vec<Vec<(u32, Cost, Cost)>> = uniq
            .iter()
            .map(|&u| {
                if u == z.depot {
                    Vec::new()
                } else {
                    vec![(u as u32, 0, 0)]
                }
            })
            .collect();
        let targets: Vec<u32> = cols
            .iter()
            .filter(|&&v| v != z.depot)
            .map(|&v| v as u32)
            .collect();
        let found = on_demand::block(&self.adj, &inits, &targets, give_up)?;
        let mut out = Vec::with_capacity(rows.len() * cols.len());
        for &u in rows {
            let i = uniq.binary_search(&u).expect("a row");
            let mut k = i * targets.len();
            for &v in cols {
                out.push(if u == z.depot {
                    z.from_depot[v]
                } else if v == z.depot {
                    z.to_depot[u]
                } else {
                    k += 1;
                    found[k - 1]
                });
            }
        }
        Some(out)
    }

    /// Computes distances between arbitrary junctions of a network.
    /// Duplicates in `keys` are removed; `with_times` keeps a time matrix too.
    ///
    /// # Errors
    /// [`DistanceError::Overflow`], as for [`Distances::new`].
    pub fn between(
        net: &Network,
        mut keys: Vec<usize>,
        with_times: bool,
    ) -> Result<Self, DistanceError> {
        keys.sort_unstable();
        keys.dedup();
        let n = net.junctions.len();
        let k = keys.len();
        let adj = Adjacency::new(net);
        let mut key_of = vec![NONE; n];
        for (i, &v) in keys.iter().enumerate() {
            key_of[v] = i as u32;
        }
        let mut cost = vec![0u32; k * k];
        let mut time = if with_times {
            vec![0u32; k * k]
        } else {
            Vec::new()
        };
        let rows: Vec<Row<'_>> = if with_times {
            cost.chunks_mut(k.max(1))
                .zip(time.chunks_mut(k.max(1)))
                .enumerate()
                .map(|(i, (c, t))| (i, c, Some(t)))
                .collect()
        } else {
            cost.chunks_mut(k.max(1))
                .enumerate()
                .map(|(i, c)| (i, c, None))
                .collect()
        };
        rows.into_par_iter()
            .try_for_each(|(i, crow, trow)| -> Result<(), DistanceError> {
                let (dc, dt, _) = adj.dijkstra(keys[i], None);
                let mut trow = trow;
                for (j, &w) in keys.iter().enumerate() {
                    let conv = |x: Cost| -> Result<u32, DistanceError> {
                        if x >= UNREACHABLE {
                            Ok(NONE)
                        } else if x >= NONE as Cost {
                            Err(DistanceError::Overflow {
                                from: keys[i],
                                to: w,
                                value: x,
                            })
                        } else {
                            Ok(x as u32)
                        }
                    };
                    crow[j] = conv(dc[w])?;
                    if let Some(t) = trow.as_deref_mut() {
                        t[j] = conv(dt[w])?;
                    }
                }
                Ok(())
            })?;
        Ok(Distances {
            adj,
            keys,
            key_of,
            cost,
            time: with_times.then_some(time),
            lazy: None,
        })
    }

    /// Whether these distances can serve `inst`: its yard and every street
    /// end are keys, the junction count matches and times are kept when the
    /// instance has them.
    pub(crate) fn serves(&self, inst: &Instance) -> bool {
        self.key_of.len() == inst.network().len()
            && (self.time.is_some() || self.lazy.is_some() || !inst.has_times())
            && self.key_index(inst.depot()).is_some()
            && inst
                .tasks()
                .iter()
                .all(|t| self.key_index(t.tail).is_some() && self.key_index(t.head).is_some())
    }

    /// The key junctions, sorted.
    pub fn keys(&self) -> &[usize] {
        &self.keys
    }

    /// Position of junction `v` among the keys.
    pub fn key_index(&self, v: usize) -> Option<usize> {
        self.key_of
            .get(v)
            .and_then(|&k| (k != NONE).then_some(k as usize))
    }

    fn idx(&self, u: usize, v: usize) -> usize {
        let (a, b) = (self.key_of[u], self.key_of[v]);
        assert!(
            a != NONE && b != NONE,
            "junction {u} or {v} is not a key junction"
        );
        a as usize * self.keys.len() + b as usize
    }

    /// Shortest deadhead cost from `u` to `v` ([`UNREACHABLE`] if none).
    ///
    /// # Panics
    /// If `u` or `v` is not a key junction (a programming error).
    pub fn cost(&self, u: usize, v: usize) -> Cost {
        if let Some(z) = &self.lazy {
            let _ = self.idx(u, v);
            return self.lazy_leg(z, u, v).0;
        }
        let x = self.cost[self.idx(u, v)];
        if x == NONE {
            UNREACHABLE
        } else {
            x as Cost
        }
    }

    /// Driving time along the shortest deadhead path from `u` to `v`.
    pub fn time(&self, u: usize, v: usize) -> Cost {
        if let Some(z) = &self.lazy {
            let _ = self.idx(u, v);
            return self.lazy_leg(z, u, v).1;
        }
        match &self.time {
            Some(t) => {
                let x = t[self.idx(u, v)];
                if x == NONE {
                    UNREACHABLE
                } else {
                    x as Cost
                }
            }
            None => self.cost(u, v),
        }
    }

    /// The shortest deadhead path from `u` to `v` as links driven (empty when
    /// `u == v`; `None` when unreachable). Any junctions may be given.
    pub fn path(&self, u: usize, v: usize) -> Option<Vec<Hop>> {
        let (dc, _, pred) = self.adj.dijkstra(u, Some(v));
        if dc[v] >= UNREACHABLE {
            return None;
        }
        let mut hops = Vec::new();
        let mut w = v;
        while w != u {
            let p = pred[w] as usize;
            // The arc p leaves some junction and enters w: find its tail.
            let from = self.arc_tail(p);
            hops.push(Hop {
                link: self.adj.link[p] as usize,
                from,
                to: w,
            });
            w = from;
        }
        hops.reverse();
        Some(hops)
    }

    fn arc_tail(&self, p: usize) -> usize {
        // `start` is non-decreasing: the tail is the last v with start[v] <= p.
        self.adj.start.partition_point(|&s| s as usize <= p) - 1
    }

    /// Bytes held by the matrices (for reports).
    pub fn matrix_bytes(&self) -> usize {
        let lazy = self.lazy.as_ref().map_or(0, |z| {
            z.cache.bytes() + 16 * (z.from_depot.len() + z.to_depot.len())
        });
        4 * (self.cost.len() + self.time.as_ref().map_or(0, |t| t.len())) + lazy
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::Network;

    #[test]
    fn path_follows_links() {
        let mut net = Network::with_junctions(4);
        net.add_edge(0, 1, 2);
        net.add_edge(1, 2, 2);
        net.add_edge(0, 2, 5);
        net.add_edge(2, 3, 1);
        let d = Distances::between(&net, vec![0, 3], false).unwrap();
        assert_eq!(d.cost(0, 3), 5);
        let p = d.path(0, 3).unwrap();
        assert_eq!(p.iter().map(|h| h.to).collect::<Vec<_>>(), vec![1, 2, 3]);
        assert_eq!(p[0].from, 0);
    }
}
