//! Deadheads computed when asked, with a bounded cache: the distances of
//! networks too large for a square matrix.
//!
//! A search graph ([`StateGraph`]) is either the junction graph (plain
//! deadheads) or the street-to-street graph of turn rules. Questions come in
//! four kinds:
//! - one leg `u → v` ([`RowCache::leg`]): a lexicographic Dijkstra search
//!   from `u` settles states in order until `v` is settled and at least a
//!   minimum number of states are; the settled states are kept as the *row*
//!   of `u`. A later question about a state outside the row searches again
//!   with twice the minimum. Rows of the legs a local search asks about are
//!   small (the states near `u`);
//! - a block of legs among a set of states ([`settle`] with targets): one
//!   search per row state, stopped as soon as every target is settled. A
//!   district's targets are near each other, so each search settles a small
//!   part of the network;
//! - the nearest accepted target ([`nearest`]): one search that stops as
//!   soon as the least accepted leg is known exactly (Path-Scanning's
//!   nearest unserved street when a route's candidates are used up);
//! - a few legs from one state ([`Until::Among`]): one search stopped when
//!   all are settled (the legs between consecutive streets of a split).
//!
//! Values are exact (least cost, ties by least time, the same values as the
//! full matrices), so results never depend on what the cache holds. The
//! cache keeps at most [`CACHE_ENTRIES`] settled states in all rows; when a
//! new row would pass that, every row is dropped (memory stays bounded,
//! values stay the same).

use std::cmp::Reverse;
use std::collections::BinaryHeap;
use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::{Arc, RwLock};

use super::UNREACHABLE;
use crate::model::Cost;

/// Settled states kept in all cached rows together (20 bytes each: 320 MB).
pub const CACHE_ENTRIES: usize = 16 << 20;

/// States settled at least per new row.
const MIN_ROW: usize = 256;

/// States kept at most per row; a leg beyond the row is kept on its own.
const ROW_MAX: usize = 4096;

/// A graph searched state by state (junctions, or driving arcs with turns).
pub(crate) trait StateGraph: Send + Sync {
    /// Number of states.
    fn states(&self) -> usize;
    /// Calls `f(next, cost, time)` for every move out of state `s`.
    fn moves(&self, s: u32, f: &mut dyn FnMut(u32, Cost, Cost));
}

/// When a search may stop.
pub(crate) enum Until<'a> {
    /// Every state (the whole reachable graph).
    All,
    /// Every state marked true is settled.
    Targets(&'a [bool], usize),
    /// This state is settled and at least this many states are.
    Reach(u32, usize),
    /// Every state of this list is settled.
    Among(&'a [u32]),
    /// As the inner rule, or as soon as a state of value above this one
    /// (least cost, then least time) would be settled.
    Below(Box<Until<'a>>, (Cost, Cost)),
}

/// A graph whose state `skip` is a dead end: searches on it find the least
/// values over the ways that do not pass through `skip` (they may end there).
pub(crate) struct Avoiding<'g, G: ?Sized> {
    /// The graph.
    pub g: &'g G,
    /// The state not passed through.
    pub skip: u32,
}

impl<G: StateGraph + ?Sized> StateGraph for Avoiding<'_, G> {
    fn states(&self) -> usize {
        self.g.states()
    }

    fn moves(&self, s: u32, f: &mut dyn FnMut(u32, Cost, Cost)) {
        if s != self.skip {
            self.g.moves(s, f);
        }
    }
}

/// States settled by a search, in the order settled, with their (cost,
/// time); `complete` when the whole reachable graph was settled.
pub(crate) struct Settled {
    pub order: Vec<(u32, Cost, Cost)>,
    pub complete: bool,
}

/// Lexicographic Dijkstra (least cost, then least time) from the initial
/// states `init` (state, cost, time) until `until` holds.
pub(crate) fn settle<G: StateGraph + ?Sized>(
    g: &G,
    init: &[(u32, Cost, Cost)],
    until: Until<'_>,
) -> Settled {
    with_scratch(g.states(), |best, done, touched| {
        settle_in(g, init, until, best, done, touched)
    })
}

/// Runs `search` on this thread's search arrays, sized for `states`
/// states, and resets afterwards the states it touched.
fn with_scratch<T>(
    states: usize,
    search: impl FnOnce(&mut [(Cost, Cost)], &mut [bool], &mut Vec<u32>) -> T,
) -> T {
    SCRATCH.with(|cell| {
        let mut scratch = cell.borrow_mut();
        let Scratch {
            best,
            done,
            touched,
        } = &mut *scratch;
        if best.len() < states {
            best.resize(states, (UNREACHABLE, UNREACHABLE));
            done.resize(states, false);
        }
        let out = search(best, done, touched);
        for &v in touched.iter() {
            best[v as usize] = (UNREACHABLE, UNREACHABLE);
            done[v as usize] = false;
        }
        touched.clear();
        out
    })
}

/// Per-thread search arrays, reset after each search (only the states it
/// touched), so that a short search does not pay for the whole network.
#[derive(Default)]
struct Scratch {
    best: Vec<(Cost, Cost)>,
    done: Vec<bool>,
    touched: Vec<u32>,
}

thread_local! {
    static SCRATCH: std::cell::RefCell<Scratch> = std::cell::RefCell::new(Scratch::default());
}

fn settle_in<G: StateGraph + ?Sized>(
    g: &G,
    init: &[(u32, Cost, Cost)],
    until: Until<'_>,
    best: &mut [(Cost, Cost)],
    done: &mut [bool],
    touched: &mut Vec<u32>,
) -> Settled {
    let mut heap = BinaryHeap::new();
    for &(s, c, t) in init {
        if (c, t) < best[s as usize] {
            best[s as usize] = (c, t);
            touched.push(s);
            heap.push(Reverse((c, t, s)));
        }
    }
    let (until, cap) = match until {
        Until::Below(inner, cap) => (*inner, cap),
        u => (u, (Cost::MAX, Cost::MAX)),
    };
    let mut order = Vec::new();
    // The states of `Until::Among`, sorted for lookups.
    let mut among: Vec<u32> = Vec::new();
    let mut left = match until {
        Until::Targets(_, k) => k,
        Until::Among(list) => {
            among = list.to_vec();
            among.sort_unstable();
            among.dedup();
            among.len()
        }
        _ => usize::MAX,
    };
    let mut reached = false;
    while let Some(Reverse((c, t, s))) = heap.pop() {
        let si = s as usize;
        if done[si] || (c, t) != best[si] {
            continue;
        }
        if (c, t) > cap {
            return Settled {
                order,
                complete: false,
            };
        }
        done[si] = true;
        order.push((s, c, t));
        match until {
            Until::All | Until::Below(..) => {}
            Until::Targets(marks, _) => {
                if marks[si] {
                    left -= 1;
                }
                if left == 0 {
                    return Settled {
                        order,
                        complete: false,
                    };
                }
            }
            Until::Among(_) => {
                if among.binary_search(&s).is_ok() {
                    left -= 1;
                }
                if left == 0 {
                    return Settled {
                        order,
                        complete: false,
                    };
                }
            }
            Until::Reach(v, min) => {
                reached |= s == v;
                if reached && order.len() >= min {
                    return Settled {
                        order,
                        complete: false,
                    };
                }
            }
        }
        g.moves(s, &mut |w, dc, dt| {
            let nv = (c + dc, t + dt);
            if !done[w as usize] && nv < best[w as usize] {
                if best[w as usize].0 >= UNREACHABLE {
                    touched.push(w);
                }
                best[w as usize] = nv;
                heap.push(Reverse((nv.0, nv.1, w)));
            }
        });
    }
    Settled {
        order,
        complete: true,
    }
}

/// Targets of a [`nearest`] search in compressed rows: the targets at each
/// state (`items[start[s]..start[s + 1]]`).
#[derive(Clone, Debug, Default)]
pub(crate) struct Csr {
    start: Vec<u32>,
    items: Vec<u32>,
}

impl Csr {
    /// Rows `0..rows` holding each `item` at its `row`, items in input order.
    pub(crate) fn of(rows: usize, pairs: impl Iterator<Item = (usize, u32)> + Clone) -> Csr {
        let mut start = vec![0u32; rows + 1];
        for (r, _) in pairs.clone() {
            start[r + 1] += 1;
        }
        for r in 0..rows {
            start[r + 1] += start[r];
        }
        let mut fill = start.clone();
        let mut items = vec![0u32; start[rows] as usize];
        for (r, x) in pairs {
            items[fill[r] as usize] = x;
            fill[r] += 1;
        }
        Csr { start, items }
    }

    /// The items at row `r`.
    pub(crate) fn row(&self, r: u32) -> &[u32] {
        &self.items[self.start[r as usize] as usize..self.start[r as usize + 1] as usize]
    }
}

/// The nearest accepted targets from the initial states `init`: a
/// lexicographic Dijkstra search that stops as soon as the least accepted
/// leg is known exactly, instead of settling the whole graph.
///
/// The targets at state `s` are `at.row(s)`; the leg to such a target is
/// the value of `s` less `offset(s)` (zero for junctions; with turns, the
/// state is "has driven the target's street", whose own deadhead is
/// subtracted, as [`crate::turns`] does for its legs). `accept(target,
/// cost, time)` says whether a target at that exact leg qualifies (it may
/// be asked about tentative legs too; only exact answers are returned).
/// Returns every accepted target whose leg costs the least (with its leg),
/// or nothing when no target with a state value up to `limit` qualifies.
///
/// **Exactness.** A target's leg is the value of the state entered from
/// plus a move cost of at least the target state's offset (moves cost the
/// offset plus a non-negative turn), so once every state of value below `p`
/// is settled every leg below `p` is final. The search stops at the first
/// settled value `p` above the least accepted tentative leg, after
/// re-checking the legs below `p` (then final): the result equals the least
/// accepted legs over a full search.
pub(crate) fn nearest<G: StateGraph + ?Sized>(
    g: &G,
    init: &[(u32, Cost, Cost)],
    at: &Csr,
    offset: &dyn Fn(u32) -> (Cost, Cost),
    limit: Cost,
    accept: &mut dyn FnMut(u32, Cost, Cost) -> bool,
) -> Vec<(u32, Cost, Cost)> {
    with_scratch(g.states(), |best, done, touched| {
        nearest_in(g, init, at, offset, limit, accept, best, done, touched)
    })
}

#[allow(clippy::too_many_arguments)]
fn nearest_in<G: StateGraph + ?Sized>(
    g: &G,
    init: &[(u32, Cost, Cost)],
    at: &Csr,
    offset: &dyn Fn(u32) -> (Cost, Cost),
    limit: Cost,
    accept: &mut dyn FnMut(u32, Cost, Cost) -> bool,
    best: &mut [(Cost, Cost)],
    done: &mut [bool],
    touched: &mut Vec<u32>,
) -> Vec<(u32, Cost, Cost)> {
    // Target states with a tentative value, and the least accepted
    // tentative leg cost among them.
    let mut reached: Vec<u32> = Vec::new();
    let mut bound = Cost::MAX;
    let leg = |s: u32, (c, t): (Cost, Cost)| {
        let (oc, ot) = offset(s);
        (c - oc, t - ot)
    };
    // Records a new tentative value `v` of state `s`.
    let consider = |s: u32,
                    v: (Cost, Cost),
                    first: bool,
                    reached: &mut Vec<u32>,
                    bound: &mut Cost,
                    accept: &mut dyn FnMut(u32, Cost, Cost) -> bool| {
        let here = at.row(s);
        if here.is_empty() {
            return;
        }
        if first {
            reached.push(s);
        }
        let (lc, lt) = leg(s, v);
        if lc < *bound && here.iter().any(|&x| accept(x, lc, lt)) {
            *bound = lc;
        }
    };
    // The accepted targets of least leg among the legs below `p` (final).
    let finish = |p: Cost,
                  reached: &[u32],
                  best: &[(Cost, Cost)],
                  accept: &mut dyn FnMut(u32, Cost, Cost) -> bool|
     -> Vec<(u32, Cost, Cost)> {
        let mut out = Vec::new();
        let mut least = Cost::MAX;
        for &s in reached {
            let (lc, lt) = leg(s, best[s as usize]);
            if lc >= p || lc > least {
                continue;
            }
            for &x in at.row(s) {
                if accept(x, lc, lt) {
                    if lc < least {
                        least = lc;
                        out.clear();
                    }
                    out.push((x, lc, lt));
                }
            }
        }
        out
    };
    let mut heap = BinaryHeap::new();
    for &(s, c, t) in init {
        if (c, t) < best[s as usize] {
            let first = best[s as usize].0 >= UNREACHABLE;
            if first {
                touched.push(s);
            }
            best[s as usize] = (c, t);
            heap.push(Reverse((c, t, s)));
            consider(s, (c, t), first, &mut reached, &mut bound, accept);
        }
    }
    while let Some(Reverse((c, t, s))) = heap.pop() {
        let si = s as usize;
        if done[si] || (c, t) != best[si] {
            continue;
        }
        if c > bound {
            let out = finish(c, &reached, best, accept);
            if !out.is_empty() {
                return out;
            }
            // The tentative leg was not the final one (a cheaper way that
            // does not qualify): look again among the later legs.
            bound = Cost::MAX;
            for &r in &reached {
                let (lc, lt) = leg(r, best[r as usize]);
                if lc >= c && lc < bound && at.row(r).iter().any(|&x| accept(x, lc, lt)) {
                    bound = lc;
                }
            }
        }
        if c > limit {
            return finish(c, &reached, best, accept);
        }
        done[si] = true;
        g.moves(s, &mut |w, dc, dt| {
            let wi = w as usize;
            let nv = (c + dc, t + dt);
            if !done[wi] && nv < best[wi] {
                let first = best[wi].0 >= UNREACHABLE;
                if first {
                    touched.push(w);
                }
                best[wi] = nv;
                heap.push(Reverse((nv.0, nv.1, w)));
                consider(w, nv, first, &mut reached, &mut bound, accept);
            }
        });
    }
    finish(Cost::MAX, &reached, best, accept)
}

/// The settled states of one search, sorted by state for lookups.
#[derive(Debug)]
struct Row {
    ids: Vec<u32>,
    val: Vec<(Cost, Cost)>,
    complete: bool,
}

impl Row {
    fn of(s: Settled) -> Row {
        let mut order = s.order;
        order.sort_unstable_by_key(|x| x.0);
        Row {
            ids: order.iter().map(|x| x.0).collect(),
            val: order.iter().map(|x| (x.1, x.2)).collect(),
            complete: s.complete,
        }
    }

    /// `Some(value)` when the row answers for `v` (unreachable when the
    /// row is complete and `v` is not in it).
    fn get(&self, v: u32) -> Option<(Cost, Cost)> {
        match self.ids.binary_search(&v) {
            Ok(i) => Some(self.val[i]),
            Err(_) if self.complete => Some((UNREACHABLE, UNREACHABLE)),
            Err(_) => None,
        }
    }
}

/// Cached rows, one slot per source key.
#[derive(Debug)]
pub(crate) struct RowCache {
    rows: Vec<RwLock<Option<Arc<Row>>>>,
    /// Far legs (beyond a full row), by (source key, state).
    pairs: RwLock<std::collections::HashMap<(u32, u32), (Cost, Cost)>>,
    entries: AtomicUsize,
    /// Least states of a new row, most states kept per row, most entries.
    limits: (usize, usize, usize),
}

impl RowCache {
    /// An empty cache for `keys` sources.
    pub(crate) fn new(keys: usize) -> Self {
        RowCache {
            rows: (0..keys).map(|_| RwLock::new(None)).collect(),
            pairs: RwLock::new(std::collections::HashMap::new()),
            entries: AtomicUsize::new(0),
            limits: (MIN_ROW, ROW_MAX, CACHE_ENTRIES),
        }
    }

    /// The value from source `key` to state `v`; `search(v, min)` runs the
    /// search of the source until `v` and at least `min` states are settled.
    pub(crate) fn leg(
        &self,
        key: usize,
        v: u32,
        search: impl Fn(u32, usize) -> Settled,
    ) -> (Cost, Cost) {
        let old = {
            let slot = self.rows[key].read().expect("row cache");
            if let Some(r) = slot.as_ref() {
                if let Some(x) = r.get(v) {
                    return x;
                }
            }
            slot.as_ref().map_or(0, |r| r.ids.len())
        };
        if let Some(&x) = self.pairs.read().expect("pair cache").get(&(key as u32, v)) {
            return x;
        }
        let (min_row, row_max, cap) = self.limits;
        let min = (2 * old).max(min_row).min(row_max);
        let mut found = search(v, min);
        // The searched state is the last settled (or none: unreachable).
        let x = match found.order.iter().rev().find(|s| s.0 == v) {
            Some(&(_, c, t)) => (c, t),
            None => (UNREACHABLE, UNREACHABLE),
        };
        if found.order.len() > min {
            // A far leg (beyond the grown row): kept on its own; the row
            // grows only by legs near its start (a new row keeps its
            // nearest `min` states), so far questions do not fill the cache.
            let mut pairs = self.pairs.write().expect("pair cache");
            pairs.insert((key as u32, v), x);
            drop(pairs);
            self.entries.fetch_add(1, Ordering::Relaxed);
            if old > 0 {
                return x;
            }
            found.order.truncate(min);
            found.complete = false;
        }
        let row = Row::of(found);
        let added = row.ids.len();
        if self.entries.fetch_add(added, Ordering::Relaxed) + added > cap {
            self.clear();
            self.entries.fetch_add(added, Ordering::Relaxed);
        }
        let mut slot = self.rows[key].write().expect("row cache");
        if let Some(r) = slot.as_ref() {
            self.entries.fetch_sub(r.ids.len(), Ordering::Relaxed);
        }
        *slot = Some(Arc::new(row));
        x
    }

    /// The cached value from source `key` to state `v`, if any (no search).
    pub(crate) fn peek(&self, key: usize, v: u32) -> Option<(Cost, Cost)> {
        let slot = self.rows[key].read().expect("row cache");
        if let Some(x) = slot.as_ref().and_then(|r| r.get(v)) {
            return Some(x);
        }
        drop(slot);
        self.pairs
            .read()
            .expect("pair cache")
            .get(&(key as u32, v))
            .copied()
    }

    /// Drops every row.
    fn clear(&self) {
        let mut pairs = self.pairs.write().expect("pair cache");
        self.entries.fetch_sub(pairs.len(), Ordering::Relaxed);
        pairs.clear();
        drop(pairs);
        for r in &self.rows {
            let mut slot = r.write().expect("row cache");
            if let Some(r) = slot.take() {
                self.entries.fetch_sub(r.ids.len(), Ordering::Relaxed);
            }
        }
    }

    /// Bytes held by the cached rows (about).
    pub(crate) fn bytes(&self) -> usize {
        20 * self.entries.load(Ordering::Relaxed) + 16 * self.rows.len()
    }
}

/// Values of a search at every state (unreachable where not settled).
pub(crate) fn full_values(n: usize, s: &Settled) -> Vec<(Cost, Cost)> {
    let mut out = vec![(UNREACHABLE, UNREACHABLE); n];
    for &(v, c, t) in &s.order {
        out[v as usize] = (c, t);
    }
    out
}

/// Legs from each of `rows` (initial states of a search each) to each of
/// `cols` (states), one search per row stopped when every column is settled;
/// row-major. Rows are searched in parallel (rayon). `None` when `give_up`
/// answers true before a row's search (asked once per row).
pub(crate) fn block<G: StateGraph + ?Sized>(
    g: &G,
    rows: &[Vec<(u32, Cost, Cost)>],
    cols: &[u32],
    give_up: &(dyn Fn() -> bool + Sync),
) -> Option<Vec<(Cost, Cost)>> {
    use rayon::prelude::*;
    let mut marks = vec![false; g.states()];
    // Index of each column state among the distinct columns.
    let mut slot = vec![u32::MAX; g.states()];
    let mut distinct = 0;
    for &c in cols {
        if !marks[c as usize] {
            marks[c as usize] = true;
            slot[c as usize] = distinct as u32;
            distinct += 1;
        }
    }
    let out: Option<Vec<Vec<(Cost, Cost)>>> = rows
        .par_iter()
        .map(|init| {
            if give_up() {
                return None;
            }
            let s = settle(g, init, Until::Targets(&marks, distinct));
            let mut at = vec![(UNREACHABLE, UNREACHABLE); distinct];
            for &(v, c, t) in &s.order {
                let k = slot[v as usize];
                if k != u32::MAX {
                    at[k as usize] = (c, t);
                }
            }
            Some(
                cols.iter()
                    .map(|&c| at[slot[c as usize] as usize])
                    .collect(),
            )
        })
        .collect();
    Some(out?.into_iter().flatten().collect())
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A one-way ring of `n` states with a chord every 7 states; costs
    /// small so that ties (and the time tie-break) occur.
    struct Ring(u32);

    impl StateGraph for Ring {
        fn states(&self) -> usize {
            self.0 as usize
        }
        fn moves(&self, s: u32, f: &mut dyn FnMut(u32, Cost, Cost)) {
            f((s + 1) % self.0, 1 + (s % 3) as Cost, 2);
            if s.is_multiple_of(7) {
                f((s * 5 + 3) % self.0, 4, 1);
            }
        }
    }

    /// Rows that grow, rows cut at their limit with far legs kept on their
    /// own, and a cache cleared when full all give the values of full
    /// searches (computed here without the cache).
    #[test]
    fn cached_legs_equal_full_searches_under_every_limit() {
        let g = Ring(700);
        let full: Vec<Vec<(Cost, Cost)>> = (0..700)
            .map(|u| full_values(700, &settle(&g, &[(u, 0, 0)], Until::All)))
            .collect();
        for limits in [(16, 64, 500), (4, 700, 100_000), (256, 4096, 1 << 20)] {
            let mut cache = RowCache::new(700);
            cache.limits = limits;
            let mut x: u64 = 12345;
            for _ in 0..20_000 {
                x = x
                    .wrapping_mul(6364136223846793005)
                    .wrapping_add(1442695040888963407);
                let (u, v) = ((x >> 33) as u32 % 700, (x >> 13) as u32 % 700);
                let got = cache.leg(u as usize, v, |v, min| {
                    settle(&g, &[(u, 0, 0)], Until::Reach(v, min))
                });
                assert_eq!(
                    got, full[u as usize][v as usize],
                    "{u} -> {v} under {limits:?}"
                );
            }
        }
    }

    /// A block gives the values of full searches (repeated columns
    /// included), and nothing once told to give up.
    #[test]
    fn blocks_equal_full_searches_and_give_up() {
        let g = Ring(300);
        let rows: Vec<Vec<(u32, Cost, Cost)>> = [0u32, 17, 299, 150]
            .iter()
            .map(|&u| vec![(u, 0, 0)])
            .collect();
        let cols = [5u32, 299, 5, 0, 123];
        let got = block(&g, &rows, &cols, &|| false).expect("not given up");
        let mut k = 0;
        for init in &rows {
            let full = full_values(300, &settle(&g, init, Until::All));
            for &c in &cols {
                assert_eq!(got[k], full[c as usize], "{init:?} -> {c}");
                k += 1;
            }
        }
        assert!(block(&g, &rows, &cols, &|| true).is_none());
    }
}
