//! District improvement: a large plan improved piece by piece.
//!
//! After the decomposition phases of hybrid genetic search (Vidal 2022) and
//! the route-distance grouping of Mei, Li & Yao (2014), with our own
//! grouping rule:
//!
//! 1. **Grouping.** Each route is represented by three of its task arcs (at
//!    a quarter, half and three quarters of its length). The distance of
//!    two routes is the least deadhead between their representatives, either
//!    way. A round draws a random order of the routes; the first route not
//!    yet in a district seeds one, which takes the nearest remaining routes
//!    until it holds about `size` streets. Different rounds draw different
//!    orders, so district borders move from round to round.
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
//!    README, 982,713 after 60 s against 940,781 with ruin and recreate.)
//! 3. **Reassembly.** A district's routes are replaced only by strictly
//!    cheaper feasible ones, so a round never makes the plan worse.
//!
//! Districts are improved in parallel (rayon), each with its own random
//! stream derived from the seed, the round and its index; with iteration
//! limits the result depends only on the seed (not even on the number of
//! workers). Memory per district is `4 (2s + 2)^2` bytes for `s` streets
//! (16 MiB for 2,000 streets; twice that with times). When the solver's
//! matrix answers on demand (city scale, with or without turn rules) a
//! district's matrix comes from one search per district junction, stopped
//! when the district's streets are reached; with turn rules it prices turns
//! like the whole plan. A district not started by the deadline or stop flag
//! is skipped.

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
    let groups = group(m, routes, size, &mut rng);
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
/// module docs). Every route is in exactly one district.
pub(super) fn group(
    m: &ArcMatrix,
    routes: &[Vec<u32>],
    size: usize,
    rng: &mut ChaCha12Rng,
) -> Vec<Vec<usize>> {
    let reps: Vec<[u32; 3]> = routes
        .iter()
        .map(|r| {
            let at = |q: usize| r[(r.len() * q / 4).min(r.len() - 1)];
            [at(1), at(2), at(3)]
        })
        .collect();
    // On demand, far legs cost a search each: one full search per
    // representative gives its legs to every other one instead.
    let directed: Option<Vec<Vec<i64>>> = m.is_on_demand().then(|| {
        (0..routes.len())
            .into_par_iter()
            .map(|x| {
                let rows: Vec<Vec<(i64, i64)>> = reps[x].iter().map(|&a| m.row_from(a)).collect();
                reps.iter()
                    .map(|ry| {
                        ry.iter()
                            .flat_map(|&b| rows.iter().map(move |row| row[b as usize].0))
                            .min()
                            .unwrap_or(i64::MAX)
                    })
                    .collect()
            })
            .collect()
    });
    let gap = |x: usize, y: usize| -> i64 {
        if let Some(g) = &directed {
            return g[x][y].min(g[y][x]);
        }
        let mut best = i64::MAX;
        for &a in &reps[x] {
            for &b in &reps[y] {
                best = best.min(m.d(a, b)).min(m.d(b, a));
            }
        }
        best
    };
    let mut order: Vec<usize> = (0..routes.len()).collect();
    order.shuffle(rng);
    let mut taken = vec![false; routes.len()];
    let mut out = Vec::new();
    for &seed in &order {
        if taken[seed] {
            continue;
        }
        taken[seed] = true;
        let mut rest: Vec<(i64, usize)> = (0..routes.len())
            .filter(|&r| !taken[r])
            .map(|r| (gap(seed, r), r))
            .collect();
        rest.sort_unstable();
        let mut district = vec![seed];
        let mut streets = routes[seed].len();
        for (_, r) in rest {
            if streets >= size {
                break;
            }
            taken[r] = true;
            district.push(r);
            streets += routes[r].len();
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
    let sub = m.restrict(&tasks, m.max_routes.map(|_| routes.len()));
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
