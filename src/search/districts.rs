//! District improvement: a large plan improved piece by piece.
//!
//! After the decomposition phases of hybrid genetic search (Vidal 2022) and
//! the route-distance grouping of Mei, Li & Yao (2014), with our own
//! grouping rule:
//!
//! 1. **Grouping.** Two routes are linked as often as a street of one has a
//!    street of the other among its nearest streets (the solver's neighbour
//!    lists). A round draws a random order of the routes; the first route
//!    not yet in a district seeds one, which then takes, one at a time, the
//!    remaining route with the most links to the district until it holds
//!    about `size` streets (or no remaining route is linked to it).
//!    Different rounds draw different orders, so district borders move from
//!    round to round. (Until this version the routes were grouped by the
//!    deadhead between three representative streets of each route; groups by
//!    links are more compact, which makes both the district's matrix
//!    cheaper to search and its moves more useful.)
//! 2. **Improvement.** Each district is a plan of its own (its routes leave
//!    from and return to the same yard, so the cost of the whole plan is the
//!    sum over districts). Its tasks get a small by-arc matrix copied from
//!    the solver's ([`ArcMatrix::restrict`]) and ruin and recreate with
//!    simulated annealing (module `recreate`, after Christiaens & Vanden
//!    Berghe 2020) runs on it for a fixed number of moves, starting from the
//!    district's current routes, at a temperature the solver lowers from
//!    round to round. With a fleet bound a district keeps at most its
//!    number of routes, so the whole plan keeps within the bound.
//!
//!    (Until this version each district ran the island search of the whole
//!    solver for 100 offspring. That search starts from a population of
//!    new, mostly random, plans, so most of its effort went into finding
//!    again what the district already had: on the 4,420-street town of the
//!    README, 982,713 after 60 s against 926,641 with ruin and recreate.)
//! 3. **Reassembly.** A district's routes are replaced only by strictly
//!    cheaper feasible ones, so a round never makes the plan worse.
//!
//! Districts are improved in parallel (rayon), each with its own random
//! stream derived from the seed, the round and its index; with iteration
//! limits the result depends only on the seed (not even on the number of
//! workers). Memory per district is `4 (2s + 2)^2` bytes for `s` streets
//! (16 MiB for 1,000 streets; twice that with times). When the solver's
//! matrix answers on demand (city scale, with or without turn rules) a
//! district's matrix comes from one search per district junction, stopped
//! when the district's streets are reached; with turn rules it prices turns
//! like the whole plan. A district not started by the deadline or stop flag
//! is skipped, and so is one whose matrix is still being searched then.

use std::sync::atomic::AtomicBool;
use std::sync::Arc;
use std::time::Instant;

use rand::seq::SliceRandom;
use rand::SeedableRng;
use rand_chacha::ChaCha12Rng;
use rayon::prelude::*;

use super::recreate::{anneal, temperature_scale, Temperatures};
use crate::construct::arcs::ArcMatrix;
use crate::improve::local_search::neighbour_lists;

/// Nearest tasks listed per task for the ruin step.
const NEAR: usize = 32;

/// Temperature at the end of a district's run, as a share of its start.
const COOLING: f64 = 0.1;

/// Limits shared by all districts of a run.
pub(super) struct Limits {
    pub deadline: Option<Instant>,
    pub stop: Option<Arc<AtomicBool>>,
}

impl Limits {
    /// Whether the deadline has passed or the stop flag is set.
    fn reached(&self) -> bool {
        self.deadline.is_some_and(|d| Instant::now() >= d)
            || self
                .stop
                .as_ref()
                .is_some_and(|f| f.load(std::sync::atomic::Ordering::Relaxed))
    }
}

/// What one round did.
pub(super) struct RoundResult {
    /// Ruin-and-recreate moves made in all districts.
    pub iterations: u64,
    /// Districts whose routes were replaced.
    pub improved: usize,
}

/// One round of district improvement on `routes` (task arcs of `m`), in
/// place. `size` is the target number of streets per district, `iterations`
/// the ruin-and-recreate moves per district, `heat` the annealing
/// temperature at the start of each district's run, in mean service costs
/// of its streets. Never makes the total cost larger; every route stays
/// feasible.
#[allow(clippy::too_many_arguments)]
pub(super) fn round(
    m: &ArcMatrix,
    near: &[Vec<u32>],
    routes: &mut Vec<Vec<u32>>,
    size: usize,
    iterations: u64,
    heat: f64,
    seed: u64,
    round: u64,
    limits: &Limits,
) -> RoundResult {
    let mut rng = ChaCha12Rng::seed_from_u64(seed ^ 0x5eed_d157);
    rng.set_stream(round);
    let groups = group(routes, near, size, &mut rng);
    let results: Vec<(Option<Vec<Vec<u32>>>, u64)> = groups
        .par_iter()
        .enumerate()
        .map(|(k, g)| {
            if limits.reached() {
                return (None, 0);
            }
            let mut rng = ChaCha12Rng::seed_from_u64(seed ^ round.rotate_left(32));
            rng.set_stream(k as u64 + 1);
            let picked: Vec<&[u32]> = g.iter().map(|&r| routes[r].as_slice()).collect();
            improve(m, &picked, iterations, heat, rng, limits)
        })
        .collect();
    let mut out = RoundResult {
        iterations: results.iter().map(|r| r.1).sum(),
        improved: 0,
    };
    let mut next: Vec<Vec<u32>> = Vec::with_capacity(routes.len());
    for (g, (new, _)) in groups.iter().zip(results) {
        match new {
            Some(new) => {
                out.improved += 1;
                next.extend(new);
            }
            None => next.extend(g.iter().map(|&r| std::mem::take(&mut routes[r]))),
        }
    }
    *routes = next;
    out
}

/// Groups route indices into districts of about `size` streets (see the
/// module docs); `near[t]` lists each task's nearest tasks. Every route is
/// in exactly one district.
pub(super) fn group(
    routes: &[Vec<u32>],
    near: &[Vec<u32>],
    size: usize,
    rng: &mut ChaCha12Rng,
) -> Vec<Vec<usize>> {
    let mut route_of = vec![u32::MAX; near.len()];
    for (r, route) in routes.iter().enumerate() {
        for &a in route {
            route_of[ArcMatrix::task(a)] = r as u32;
        }
    }
    // Links between routes: pairs of nearest tasks, one in each.
    let links: Vec<Vec<(u32, u32)>> = routes
        .iter()
        .enumerate()
        .map(|(r, route)| {
            let mut to: Vec<u32> = route
                .iter()
                .flat_map(|&a| near[ArcMatrix::task(a)].iter())
                .map(|&v| route_of[v as usize])
                .filter(|&o| o != u32::MAX && o != r as u32)
                .collect();
            to.sort_unstable();
            to.chunk_by(|x, y| x == y)
                .map(|c| (c[0], c.len() as u32))
                .collect()
        })
        .collect();
    let mut order: Vec<usize> = (0..routes.len()).collect();
    order.shuffle(rng);
    let mut taken = vec![false; routes.len()];
    let mut score = vec![0u32; routes.len()];
    let mut out = Vec::new();
    for &seed in &order {
        if taken[seed] {
            continue;
        }
        let mut district = Vec::new();
        let mut frontier: Vec<usize> = Vec::new();
        let mut streets = 0;
        let mut next = Some(seed);
        while let Some(r) = next {
            taken[r] = true;
            district.push(r);
            streets += routes[r].len();
            if streets >= size {
                break;
            }
            for &(o, k) in &links[r] {
                let o = o as usize;
                if !taken[o] {
                    if score[o] == 0 {
                        frontier.push(o);
                    }
                    score[o] += k;
                }
            }
            // The most linked route of the frontier (lowest index on ties).
            frontier.retain(|&o| !taken[o]);
            next = frontier
                .iter()
                .copied()
                .max_by_key(|&o| (score[o], std::cmp::Reverse(o)));
        }
        for &o in &frontier {
            score[o] = 0;
        }
        out.push(district);
    }
    out
}

/// Runs ruin and recreate on one district (module `recreate`); returns
/// cheaper routes (task arcs of `m`) if it found some, and the iterations
/// made.
fn improve(
    m: &ArcMatrix,
    routes: &[&[u32]],
    iterations: u64,
    heat: f64,
    mut rng: ChaCha12Rng,
    limits: &Limits,
) -> (Option<Vec<Vec<u32>>>, u64) {
    let mut tasks: Vec<usize> = routes
        .iter()
        .flat_map(|r| r.iter().map(|&a| ArcMatrix::task(a)))
        .collect();
    tasks.sort_unstable();
    if tasks.len() < 2 {
        return (None, 0);
    }
    let local = |a: u32| -> u32 {
        let i = tasks
            .binary_search(&ArcMatrix::task(a))
            .expect("task of the district");
        2 * i as u32 + (a & 1)
    };
    let max_routes = m.max_routes.map(|_| routes.len());
    let Some(sub) = m.restrict_until(&tasks, max_routes, &|| limits.reached()) else {
        return (None, 0);
    };
    let near = neighbour_lists(&sub, NEAR);
    let mine: Vec<Vec<u32>> = routes
        .iter()
        .map(|r| r.iter().map(|&a| local(a)).collect())
        .collect();
    let scale = temperature_scale(&sub);
    let temps = Temperatures {
        hot: scale * heat,
        cold: scale * heat * COOLING,
    };
    let out = anneal(&sub, &near, &mine, iterations, temps, &mut rng, &|| {
        limits.reached()
    });
    let back = out.better.map(|(_, b)| {
        b.iter()
            .map(|r| {
                r.iter()
                    .map(|&a| 2 * tasks[ArcMatrix::task(a)] as u32 + (a & 1))
                    .collect()
            })
            .collect()
    });
    (back, out.iterations)
}
