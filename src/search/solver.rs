//! The fleet solver: one entry point, [`Solver`].
//!
//! A population-based hybrid search in the spirit of the memetic algorithm
//! for the CARP (Lacomme, Prins & Ramdane-Chérif 2004) and of hybrid genetic
//! search (Vidal 2022): giant-tour order crossover, Ulusoy's split, local
//! search with neighbour lists, occasional Merge-Split (Tang, Mei & Yao 2009),
//! and survivor selection on biased fitness (cost rank plus diversity rank by
//! broken-pairs distance). All individuals are feasible.
//!
//! **Parallelism and determinism.** With `workers = W` the search runs `W`
//! independent islands on a rayon pool of `W` threads. Each island draws
//! from its own ChaCha stream (derived from the seed and the island index).
//! Islands run in epochs of a fixed number of offspring; at the barrier
//! between epochs every island receives the overall best solution (a
//! deterministic exchange). Hence for a given seed, worker count and
//! iteration limit the result is always the same; with a time limit the
//! clock decides when to stop (or the external stop flag does) and, in the
//! district search of large plans, the annealing temperature of each round
//! (it follows the share of the time limit spent).
//!
//! **Stopping during construction.** A plan is always returned, so the
//! first plan is built even past the time limit or a raised stop flag. Above
//! [`DISTRICTS_FROM`] streets the first plan is the cheapest of five
//! Path-Scanning rules (each split optimally); once one rule's plan exists
//! and the limit or the flag has passed, the rules still running give up
//! (they check between streets) and the cheapest finished plan is kept, so
//! the solver returns about as soon as the first rule is done. The plan
//! then depends on which rules finished in time.
//!
//! ```
//! use arcwright::model::{Fleet, Instance, Network};
//! use arcwright::Solver;
//! let mut net = Network::with_junctions(4);
//! net.add_required_edge(0, 1, 3, 2);
//! net.add_required_edge(1, 2, 4, 2);
//! net.add_required_edge(2, 3, 2, 2);
//! net.add_edge(3, 0, 5);
//! let inst = Instance::new("square", net, Fleet::with_capacity(4), 0).unwrap();
//! let sol = Solver::new(&inst).max_iterations(200).solve().unwrap();
//! assert_eq!(sol.plan.visits(), 3);
//! assert!(sol.cost >= sol.lower_bound.value);
//! ```

use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Arc;
use std::time::{Duration, Instant};

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha12Rng;
use rayon::prelude::*;

use crate::bounds::lp::LP_CUTS;
use crate::bounds::{bound, LowerBound};
use crate::construct::arcs::{ArcMatrix, BIG, MAX_LEG};
use crate::construct::candidates::candidate_lists;
use crate::construct::giant;
use crate::construct::path_scanning::{path_scan, path_scan_listed, Rule, RULES};
use crate::construct::split::{split, SplitFailure};
use crate::improve::local_search::{neighbour_lists, LocalSearch, DEFAULT_NEIGHBOURS, SCALE};
use crate::improve::merge_split::merge_split;
use crate::model::{Cost, Instance};
use crate::paths::{DistanceError, Distances};
use crate::plan::Plan;
use crate::search::crossover::order_crossover;
use crate::search::districts::{self, Limits};
use crate::search::lp_side::{LpBudget, LpOutcome, LpSide};
use crate::search::population::{Individual, Params, Population};
use crate::turns::{TurnDistances, TurnTable};

/// What the solver is doing (in [`Progress`]).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub enum Phase {
    /// Shortest deadhead paths between the junctions that matter.
    Distances,
    /// The lower bound.
    Bound,
    /// First plans (Path-Scanning, split).
    Construction,
    /// The island search on the whole plan.
    Search,
    /// District improvement of a large plan (see [`Decomposition`]).
    Districts,
}

/// How the search treats large instances.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub enum Decomposition {
    /// District improvement above [`DISTRICTS_FROM`] streets, in districts
    /// of about [`DISTRICT_STREETS`] streets; the island search on the
    /// whole plan below (the default).
    Auto,
    /// Always the island search on the whole plan.
    Off,
    /// District improvement whatever the size, in districts of about
    /// `streets` streets (at least 2).
    Districts {
        /// Target number of streets per district.
        streets: usize,
    },
}

/// Above this many streets to serve, [`Decomposition::Auto`] improves the
/// plan district by district.
pub const DISTRICTS_FROM: usize = 2048;

/// Streets per district under [`Decomposition::Auto`].
pub const DISTRICT_STREETS: usize = 1000;

/// Ruin-and-recreate moves per district and round, per street of the
/// district.
const DISTRICT_MOVES_PER_STREET: u64 = 10;

/// Annealing temperature of the district search at the start and at the end
/// of a run, in mean service costs of a district's streets.
/// Measured on the 4,420-street town of the README (60 s runs): starting
/// at 10 and ending at 0.1 beat 1 → 0.01, 3 → 0.03 and 0.3 → 0.003.
const HEAT_START: f64 = 10.0;
const HEAT_END: f64 = 0.1;

/// Above this many streets the construction and the neighbour lists use
/// network candidate lists instead of scanning every street.
const LISTED_FROM: usize = 2048;

/// Candidates per street for the listed construction.
const CANDIDATES: usize = 16;

/// The bound reported before any is known.
const NO_BOUND: (Cost, &str) = (0, "none yet");

/// Progress report, sent when a phase starts and when the best plan improves.
#[derive(Clone, Debug)]
pub struct Progress {
    /// The phase the solver is in.
    pub phase: Phase,
    /// Cost of the best plan so far (`None` before the first plan).
    pub best_cost: Option<Cost>,
    /// The best lower bound known at this moment (0 until the
    /// [`Phase::Bound`] phase ends): the combinatorial
    /// [`crate::bounds::bound`], raised by the LP bound as it improves when
    /// [`Solver::lp_bound`] is set.
    pub lower_bound: Cost,
    /// Which method gave `lower_bound` (a name from [`crate::bounds`] or
    /// [`crate::bounds::lp::LP_CUTS`]).
    pub bound_by: &'static str,
    /// Time since `solve` started.
    pub elapsed: Duration,
    /// Offspring generated so far (all workers), or ruin-and-recreate
    /// moves made in the district search.
    pub iteration: u64,
}

/// Run statistics.
#[derive(Clone, Debug)]
pub struct Stats {
    /// Offspring generated (all workers), or ruin-and-recreate moves in
    /// the district search.
    pub iterations: u64,
    /// Total time of `solve`.
    pub elapsed: Duration,
    /// Time at which the returned plan was first found.
    pub time_to_best: Duration,
    /// Number of workers (islands).
    pub workers: usize,
    /// The seed.
    pub seed: u64,
}

/// The solver's result.
#[derive(Clone, Debug)]
pub struct Solution {
    /// The best plan found (feasible).
    pub plan: Plan,
    /// Its cost.
    pub cost: Cost,
    /// The best lower bound available when the run ended: the combinatorial
    /// [`crate::bounds::bound`], or the LP bound ([`Solver::lp_bound`]) when
    /// that is higher (`by` says which). Never above `cost`.
    pub lower_bound: LowerBound,
    /// Percent above the lower bound: `100 (cost - bound) / bound` (0 when the bound is 0).
    pub gap: f64,
    /// What the LP bound did (`None` when [`Solver::lp_bound`] was not set).
    pub lp: Option<LpOutcome>,
    /// Statistics.
    pub stats: Stats,
}

/// Why no plan was produced.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum SolveError {
    /// Turn rules together with dump sites, several yards or truck types
    /// (not supported yet: refused rather than ignored).
    #[error("turn rules cannot yet be combined with dump sites, several yards or truck types")]
    TurnsWithOperations,
    /// The scenario's turn rules cannot be used.
    #[error("turn rules: {}", .0.iter().map(|e| e.to_string()).collect::<Vec<_>>().join("; "))]
    TurnRules(Vec<crate::turns::TurnError>),
    /// The shortest paths could not be computed or stored.
    #[error("shortest paths: {0}")]
    Distances(#[from] DistanceError),
    /// Distances given with [`Solver::distances`] were not built for this instance.
    #[error("the distances given to the solver were not built for scenario {instance:?} (they lack its yard, a street end or the driving times)")]
    DistancesMismatch {
        /// The instance's name.
        instance: String,
    },
    /// A deadhead is too long for the solver's 32-bit arc matrix.
    #[error("a deadhead costs {value}, more than the solver's limit of {limit} per leg")]
    MatrixOverflow {
        /// The offending value.
        value: Cost,
        /// The largest deadhead the solver stores.
        limit: Cost,
    },
    /// Costs or times so large that a route could exceed the solver's limit.
    #[error("a route could cost or take up to {bound} (all service plus one longest deadhead per leg), more than the solver's limit of {limit}; use smaller units")]
    RouteTooLong {
        /// The upper bound on a route's cost or time.
        bound: Cost,
        /// The limit (`2^40`).
        limit: Cost,
    },
    /// The total demand needs more trucks than the fleet bound allows.
    #[error("the fleet is too small: the total demand needs at least {needed_at_least} trucks, but at most {max_vehicles} may be used")]
    FleetTooSmall {
        /// `ceil(total demand / capacity)`.
        needed_at_least: usize,
        /// The fleet bound.
        max_vehicles: usize,
    },
    /// No plan within the fleet bound was found (none may exist).
    #[error("no plan with at most {max_vehicles} trucks was found (the fewest found uses {fewest_found})")]
    NoPlanWithinFleet {
        /// The fleet bound.
        max_vehicles: usize,
        /// Fewest routes of any plan the constructions found.
        fewest_found: usize,
    },
    /// The instance has dump sites, several yards, truck types or a balance
    /// setting ([`crate::model::Operations`]), which this solver does not
    /// know: use [`crate::fleet::FleetSolver`].
    #[error("the scenario has dump sites, several yards, truck types or balancing: plan it with the fleet solver")]
    NeedsFleetSolver,
    /// A task cannot be served on a route of its own within capacity and shift.
    #[error(
        "{street} cannot be served even on a route of its own within the capacity and shift limit"
    )]
    TaskAlone {
        /// The link of the task (index in the network's links).
        link: usize,
        /// The street, as [`crate::model::Network::street_label`] names it.
        street: String,
    },
}

type ProgressFn<'a> = Box<dyn Fn(&Progress) + Send + Sync + 'a>;

/// The fleet solver (builder style).
pub struct Solver<'a> {
    inst: &'a Instance,
    dist: Option<&'a Distances>,
    seed: u64,
    workers: usize,
    time_limit: Option<Duration>,
    max_iterations: Option<u64>,
    target: Option<Cost>,
    progress: Option<ProgressFn<'a>>,
    stop: Option<Arc<AtomicBool>>,
    epoch: u64,
    decomposition: Decomposition,
    lp: Option<LpBudget>,
}

impl<'a> Solver<'a> {
    /// A solver for `inst` with seed 1, one worker and no limit other than the
    /// lower bound. Set a time or iteration limit for anything but tiny instances.
    pub fn new(inst: &'a Instance) -> Self {
        Solver {
            inst,
            dist: None,
            seed: 1,
            workers: 1,
            time_limit: None,
            max_iterations: None,
            target: None,
            progress: None,
            stop: None,
            epoch: 500,
            decomposition: Decomposition::Auto,
            lp: None,
        }
    }

    /// Uses shortest paths the caller already has (built with
    /// [`Distances::new`] for this same instance) instead of computing them
    /// again. [`Solver::solve`] checks that they cover the instance's yard and
    /// street ends (and times, when the instance has them) and otherwise
    /// returns [`SolveError::DistancesMismatch`].
    ///
    /// ```
    /// use arcwright::model::{Fleet, Instance, Network};
    /// use arcwright::paths::Distances;
    /// use arcwright::Solver;
    /// let mut net = Network::with_junctions(3);
    /// net.add_required_edge(0, 1, 4, 2);
    /// net.add_required_edge(1, 2, 5, 3);
    /// net.add_edge(2, 0, 7);
    /// let inst = Instance::new("triangle", net, Fleet::with_capacity(10), 0).unwrap();
    /// let dist = Distances::new(&inst).unwrap();
    /// let sol = Solver::new(&inst).distances(&dist).max_iterations(50).solve().unwrap();
    /// assert_eq!(sol.cost, 16);
    /// ```
    pub fn distances(mut self, dist: &'a Distances) -> Self {
        self.dist = Some(dist);
        self
    }

    /// Random seed (default 1).
    pub fn seed(mut self, seed: u64) -> Self {
        self.seed = seed;
        self
    }

    /// Number of parallel workers (islands); default 1, at least 1.
    pub fn workers(mut self, n: usize) -> Self {
        self.workers = n.max(1);
        self
    }

    /// Stop after this much time (checked between offspring). A first
    /// plan is built even when the limit passes during its construction;
    /// above [`DISTRICTS_FROM`] streets the construction then stops at its
    /// first finished plan (see the module docs).
    pub fn time_limit(mut self, t: Duration) -> Self {
        self.time_limit = Some(t);
        self
    }

    /// Stop after this many offspring in total (all workers); in the
    /// district search ([`Decomposition`]) an iteration is one
    /// ruin-and-recreate move.
    pub fn max_iterations(mut self, n: u64) -> Self {
        self.max_iterations = Some(n);
        self
    }

    /// Stop as soon as a plan costing at most `cost` is found.
    pub fn target(mut self, cost: Cost) -> Self {
        self.target = Some(cost);
        self
    }

    /// Called (from the calling thread) whenever the best plan improves.
    pub fn on_progress(mut self, f: impl Fn(&Progress) + Send + Sync + 'a) -> Self {
        self.progress = Some(Box::new(f));
        self
    }

    /// External stop: when the flag becomes true the search ends soon and
    /// returns the best plan so far (the first plan, when raised during the
    /// construction, as soon as one exists; see the module docs).
    pub fn stop_flag(mut self, flag: Arc<AtomicBool>) -> Self {
        self.stop = Some(flag);
        self
    }

    /// Offspring per island between two exchanges (default 500).
    pub fn epoch(mut self, n: u64) -> Self {
        self.epoch = n.max(1);
        self
    }

    /// How large instances are searched (default [`Decomposition::Auto`]:
    /// district improvement above [`DISTRICTS_FROM`] streets).
    ///
    /// ```
    /// use arcwright::demo::{town, TownSpec};
    /// use arcwright::{check::check_plan, Decomposition, Solver};
    /// let inst = town(&TownSpec::new(3, 4)).unwrap();
    /// let sol = Solver::new(&inst)
    ///     .decomposition(Decomposition::Districts { streets: 30 })
    ///     .max_iterations(100)
    ///     .solve()
    ///     .unwrap();
    /// assert!(check_plan(&inst, &sol.plan).is_ok());
    /// ```
    pub fn decomposition(mut self, d: Decomposition) -> Self {
        self.decomposition = d;
        self
    }

    /// Also runs the cutting-plane LP bound ([`crate::bounds::lp`]) in a
    /// thread of its own beside the search, within `budget`, the solver's
    /// time limit and its stop flag (whichever ends first). The solution
    /// then reports the higher of the combinatorial and the LP bound, and
    /// progress reports carry the bound as it improves. It never changes the
    /// plan; without an iteration limit, a plan that reaches the LP bound
    /// ends the search early (it is proven optimal). When the search ends first, [`Solver::solve`] waits for the
    /// bound to use its budget, except when the plan already reached the
    /// combinatorial bound (it is then proven optimal). Where the LP bound
    /// does not apply ([`crate::bounds::lp::applies`]) the combinatorial
    /// bound is used alone and [`Solution::lp`] says why.
    ///
    /// Off by default: it takes one more thread than [`Solver::workers`]
    /// and, without a solver time limit, time of its own (up to about 2 s
    /// on the largest public instances; give `budget` a round limit for a
    /// run whose reported bound is the same every time).
    ///
    /// ```
    /// use arcwright::model::{Fleet, Instance, Network};
    /// use arcwright::{LpBudget, Solver};
    /// let mut net = Network::with_junctions(4);
    /// net.add_required_edge(0, 1, 10, 3);
    /// net.add_required_edge(1, 2, 12, 2);
    /// net.add_required_edge(2, 3, 10, 3);
    /// net.add_required_edge(3, 0, 12, 2);
    /// let inst = Instance::new("block", net, Fleet::with_capacity(5), 0).unwrap();
    /// let sol = Solver::new(&inst)
    ///     .max_iterations(200)
    ///     .lp_bound(LpBudget::rounds(20))
    ///     .solve()
    ///     .unwrap();
    /// assert!(sol.lower_bound.value <= sol.cost);
    /// assert!(sol.lp.is_some());
    /// ```
    pub fn lp_bound(mut self, budget: LpBudget) -> Self {
        self.lp = Some(budget);
        self
    }

    /// Runs the search. The plan returned passes [`crate::check::check_plan`],
    /// serves every self-loop (a street whose two ends are one junction)
    /// [`crate::model::Dir::Forward`] ([`Plan::self_loops_forward`]), and
    /// reads back equal after [`crate::io::write_plan`].
    ///
    /// # Errors
    /// [`SolveError`] when no plan can be made: the shortest paths or the
    /// solver's matrices cannot hold the instance's numbers, a street cannot
    /// be served on a route of its own, or the fleet bound is too small.
    ///
    /// # Complexity
    /// Shortest paths `O(K (V + E) log V)` for `K` key junctions (skipped
    /// with [`Solver::distances`]), arc matrices `O(n^2)` for `n` required
    /// streets (`O(K^2)` memory above 2,048 streets; no square matrix at all
    /// above [`crate::paths::FULL_MATRIX_KEYS`] key junctions, or above
    /// [`crate::turns::FULL_MATRIX_TASKS`] streets with turn rules: legs are
    /// then searched on demand and cached), then the limits set:
    /// each offspring costs one split `O(n^2)` at worst and local-search
    /// passes of `O(n k)` move evaluations (`k` = 8 neighbours).
    ///
    /// ```
    /// use arcwright::model::{Fleet, Instance, Network};
    /// use arcwright::{check::check_plan, SolveError, Solver};
    /// let mut net = Network::with_junctions(3);
    /// net.add_required_edge(0, 1, 4, 6);
    /// net.add_required_edge(1, 2, 5, 6);
    /// net.add_edge(2, 0, 7);
    /// let inst = Instance::new("triangle", net, Fleet::with_capacity(10), 0).unwrap();
    /// let sol = Solver::new(&inst).seed(7).max_iterations(100).solve().unwrap();
    /// assert!(check_plan(&inst, &sol.plan).is_ok());
    /// assert_eq!(sol.plan.routes.len(), 2); // 12 bins, trucks of 10
    /// assert!(sol.cost >= sol.lower_bound.value);
    /// ```
    pub fn solve(self) -> Result<Solution, SolveError> {
        let start = Instant::now();
        let inst = self.inst;
        if !inst.operations().is_plain(inst) {
            return Err(SolveError::NeedsFleetSolver);
        }
        let owned;
        self.announce(Phase::Distances, None, NO_BOUND, start, 0);
        let dist = match self.dist {
            Some(d) if d.serves(inst) => d,
            Some(_) => {
                return Err(SolveError::DistancesMismatch {
                    instance: inst.name.clone(),
                })
            }
            None => {
                owned = Distances::new(inst)?;
                &owned
            }
        };
        self.announce(Phase::Bound, None, NO_BOUND, start, 0);
        // The bound runs beside the district search (it only reports the
        // gap there); the island search waits for it (it stops at the bound).
        // Turn costs dropped is a relaxation (penalties are not negative and
        // bans only remove ways), so the bound without turns stays valid.
        let turned = match inst.turn_rules() {
            Some(rules) => {
                let table = TurnTable::new(inst, rules).map_err(SolveError::TurnRules)?;
                Some(TurnDistances::new(inst, &table))
            }
            None => None,
        };
        std::thread::scope(|scope| {
            let pending = scope.spawn(|| bound(inst, dist));
            let m = prepare(inst, dist, turned.as_ref())?;
            // With turn rules the districts' matrices are restricted from
            // the turn-aware one, so they price turns too.
            let districts = match self.decomposition {
                Decomposition::Auto => (m.n > DISTRICTS_FROM).then_some(DISTRICT_STREETS),
                Decomposition::Off => None,
                Decomposition::Districts { streets } => Some(streets.max(2)),
            };
            let join = |h: std::thread::ScopedJoinHandle<'_, LowerBound>| {
                h.join().expect("the bound's thread panicked")
            };
            let (lb_now, pending) = match districts {
                Some(_) if m.n > 0 => (None, Some(pending)),
                _ => (Some(join(pending)), None),
            };
            let known = lb_now.as_ref().map_or(0, |l| l.value);
            let quick = lb_now.as_ref().map_or(NO_BOUND, |l| (l.value, l.by));
            self.announce(Phase::Construction, None, quick, start, 0);
            let stats0 = |iterations, ttb| Stats {
                iterations,
                elapsed: start.elapsed(),
                time_to_best: ttb,
                workers: self.workers,
                seed: self.seed,
            };
            if m.n == 0 {
                let plan = Plan {
                    routes: Vec::new(),
                    cost: 0,
                };
                let lb = lb_now.expect("joined");
                let lp = self.lp.map(|_| LpOutcome::NotNeeded);
                return Ok(self.finish(plan, lb, lp, stats0(0, Duration::ZERO)));
            }
            let (cand, neigh) = candidates_and_neighbours(inst, &m);
            let deadline = self.time_limit.map(|t| start + t);
            let side = self.lp.map(|b| LpSide::start(inst, b, deadline));
            let ctx = Ctx {
                m: &m,
                neigh: &neigh,
                deadline,
                stop: self.stop.clone(),
                stop_at: self.target.unwrap_or(Cost::MIN).max(known),
                start,
            };
            let running = side.as_ref().and_then(|s| s.as_ref().ok());
            let bound_now = || match running.map(LpSide::current) {
                Some(v) if v > quick.0 => (v, LP_CUTS),
                _ => quick,
            };
            let result = match districts {
                Some(size) => self.by_districts(&ctx, &cand, size),
                None => self.evolve(&ctx, &bound_now),
            };
            let lb = match (lb_now, pending) {
                (Some(lb), _) => lb,
                (None, Some(h)) => join(h),
                (None, None) => unreachable!("the bound is joined or pending"),
            };
            // A plan at the combinatorial bound is proven optimal: the LP has nothing to add.
            let stop_now = result.as_ref().map_or(true, |b| b.0 <= lb.value);
            let lp = side.map(|s| match s {
                Ok(s) => s
                    .finish(stop_now, self.stop.as_deref())
                    .map_or(LpOutcome::Failed, LpOutcome::Ran),
                Err(why) => LpOutcome::DoesNotApply(why),
            });
            let (cost, routes, found_at, iterations) = result?;
            let plan = plan_of(inst, dist, turned.as_ref(), &routes, cost);
            Ok(self.finish(plan, lb, lp, stats0(iterations, found_at)))
        })
    }

    /// The islands' search: initial populations, then epochs until a limit,
    /// the target or the stop flag. Returns the best cost, its routes (task
    /// arcs), when it was found and the number of offspring.
    fn evolve(
        &self,
        ctx: &Ctx<'_>,
        bound_now: &dyn Fn() -> (Cost, &'static str),
    ) -> Result<Best, SolveError> {
        let m = ctx.m;
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(self.workers)
            .build()
            .expect("thread pool");
        let mut islands: Vec<Island> = (0..self.workers)
            .map(|k| {
                let mut rng = ChaCha12Rng::seed_from_u64(self.seed);
                rng.set_stream(k as u64 + 1);
                Island::new(rng, m)
            })
            .collect();
        pool.install(|| islands.par_iter_mut().for_each(|isl| isl.init(ctx)));
        let mut best: Option<(i64, Vec<Vec<u32>>, Duration)> = None;
        let mut fewest = usize::MAX;
        for isl in &islands {
            fewest = fewest.min(isl.fewest);
            if let Some(b) = &isl.best {
                if best.as_ref().is_none_or(|x| b.cost < x.0) {
                    best = Some((b.cost, b.routes.clone(), isl.best_time));
                }
            }
        }
        let Some(mut best) = best else {
            return Err(SolveError::NoPlanWithinFleet {
                max_vehicles: m.max_routes.unwrap_or(0),
                fewest_found: fewest,
            });
        };
        let w = self.workers as u64;
        let mut budget: Vec<u64> = (0..w)
            .map(|k| match self.max_iterations {
                Some(n) => n / w + u64::from(k < n % w),
                None => u64::MAX,
            })
            .collect();
        let mut iterations = 0u64;
        let reported = std::cell::Cell::new(Cost::MIN);
        let report = |best: &(i64, Vec<Vec<u32>>, Duration), iterations| {
            let bound = bound_now();
            reported.set(bound.0);
            self.announce(Phase::Search, Some(best.0), bound, ctx.start, iterations);
        };
        report(&best, 0);
        // Without an iteration limit, a plan at the LP bound is proven
        // optimal and ends the search (with one, the run's iteration count
        // stays independent of the bound thread's timing).
        let proven = |cost: Cost| self.max_iterations.is_none() && cost <= bound_now().0;
        while best.0 > ctx.stop_at
            && !proven(best.0)
            && !ctx.should_stop()
            && budget.iter().any(|&b| b > 0)
        {
            let epoch = self.epoch;
            pool.install(|| {
                islands
                    .par_iter_mut()
                    .zip(budget.par_iter_mut())
                    .for_each(|(isl, b)| {
                        let n = epoch.min(*b);
                        let done = isl.run(ctx, n);
                        // An island that can do no iteration (its population
                        // cannot reach two distinct plans: a tiny instance)
                        // never will; without this the loop would spin.
                        *b = if done == 0 { 0 } else { *b - done };
                    })
            });
            iterations = islands.iter().map(|i| i.iterations).sum();
            // Deterministic exchange: the best of all islands (lowest index on ties).
            let mut bi = usize::MAX;
            let mut bc = best.0;
            for (k, isl) in islands.iter().enumerate() {
                if let Some(b) = &isl.best {
                    if b.cost < bc {
                        bc = b.cost;
                        bi = k;
                    }
                }
            }
            if bi != usize::MAX {
                let b = islands[bi].best.as_ref().expect("best");
                best = (b.cost, b.routes.clone(), islands[bi].best_time);
            }
            for isl in islands.iter_mut() {
                isl.receive(&best.1, best.0);
            }
            if bi != usize::MAX || bound_now().0 > reported.get() {
                report(&best, iterations);
            }
        }
        Ok((best.0, best.1, best.2, iterations))
    }

    /// Sends a progress report, if anyone listens; `bound` is the lower
    /// bound known and the method that gave it.
    fn announce(
        &self,
        phase: Phase,
        best: Option<Cost>,
        bound: (Cost, &'static str),
        start: Instant,
        it: u64,
    ) {
        if let Some(f) = &self.progress {
            f(&Progress {
                phase,
                best_cost: best,
                lower_bound: bound.0,
                bound_by: bound.1,
                elapsed: start.elapsed(),
                iteration: it,
            });
        }
    }

    /// The first plan of the district search: every Path-Scanning rule (on
    /// candidate lists when `cand` is not empty), each split optimally
    /// (Ulusoy), the cheapest kept (first rule on ties).
    ///
    /// **Interruption.** Once one rule's plan is split and the deadline or
    /// the stop flag has passed, the rules still constructing give up (they
    /// check between tasks, see [`path_scan_listed`]) and the cheapest plan
    /// among the finished rules is kept; before any plan exists the
    /// construction goes on past the deadline, since a plan must be
    /// returned. Which rules finish then depends on timing; without an
    /// interruption every rule runs and the result is deterministic.
    fn first_plan(&self, ctx: &Ctx<'_>, cand: &[Vec<u32>]) -> Result<(i64, Routes), SolveError> {
        let m = ctx.m;
        let all: Vec<usize> = (0..m.n).collect();
        let have_plan = AtomicBool::new(false);
        let give_up = || have_plan.load(Ordering::Relaxed) && ctx.should_stop();
        let built: Vec<Result<(i64, Routes), usize>> = RULES
            .par_iter()
            .filter_map(|&rule| {
                let r = if cand.is_empty() {
                    path_scan::<ChaCha12Rng>(m, &all, rule, None, 0, false)
                } else {
                    path_scan_listed::<ChaCha12Rng>(m, cand, rule, None, &give_up)?
                };
                if give_up() {
                    return None;
                }
                Some(match split(m, &giant::of_routes(&r)) {
                    Ok(s) => {
                        have_plan.store(true, Ordering::Relaxed);
                        Ok((s.cost, s.routes))
                    }
                    Err(SplitFailure::TooFewVehicles { fewest }) => Err(fewest),
                    Err(SplitFailure::Infeasible) => Err(usize::MAX),
                })
            })
            .collect();
        let mut best: Option<(i64, Routes)> = None;
        let mut fewest = usize::MAX;
        for b in built {
            match b {
                Ok(p) if best.as_ref().is_none_or(|x| p.0 < x.0) => best = Some(p),
                Ok(_) => {}
                Err(f) => fewest = fewest.min(f),
            }
        }
        best.ok_or(SolveError::NoPlanWithinFleet {
            max_vehicles: m.max_routes.unwrap_or(0),
            fewest_found: fewest,
        })
    }

    /// The search of large instances: a first plan, then rounds of district
    /// improvement (module `districts`) until a limit, the target or the
    /// stop flag. Each district gets [`DISTRICT_MOVES_PER_STREET`] moves per
    /// street of the district size per round (fewer when an iteration
    /// limit is nearly spent) and the rounds end when the limit is spent.
    fn by_districts(
        &self,
        ctx: &Ctx<'_>,
        cand: &[Vec<u32>],
        size: usize,
    ) -> Result<Best, SolveError> {
        let lower_bound = NO_BOUND; // computed beside this search
        let m = ctx.m;
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(self.workers)
            .build()
            .expect("thread pool");
        let (mut cost, mut routes) = pool.install(|| self.first_plan(ctx, cand))?;
        let mut found_at = ctx.start.elapsed();
        self.announce(Phase::Districts, Some(cost), lower_bound, ctx.start, 0);
        {
            // One descent on the whole plan: moves across district borders.
            let mut ls = LocalSearch::new(m, ctx.neigh);
            ls.interrupt_at(ctx.deadline, ctx.stop.clone());
            let mut rng = ChaCha12Rng::seed_from_u64(self.seed);
            let d = ls.run(&routes, &mut rng);
            if d.feasible && d.cost < cost {
                cost = d.cost;
                routes = d.routes;
                found_at = ctx.start.elapsed();
                self.announce(Phase::Districts, Some(cost), lower_bound, ctx.start, 0);
            }
        }
        let limits = Limits {
            deadline: ctx.deadline,
            stop: ctx.stop.clone(),
        };
        let mut budget = self.max_iterations.unwrap_or(u64::MAX);
        let (mut iterations, mut k) = (0u64, 0u64);
        let search_start = Instant::now();
        while cost > ctx.stop_at && !ctx.should_stop() && budget > 0 {
            // Annealing heat falls with the share of the run spent: of the
            // time limit, else of the iteration limit, else of 100 rounds.
            let spent = match (ctx.deadline, self.max_iterations) {
                (Some(d), _) => {
                    let total = d.saturating_duration_since(search_start).as_secs_f64();
                    search_start.elapsed().as_secs_f64() / total.max(1e-9)
                }
                (None, Some(limit)) => iterations as f64 / limit.max(1) as f64,
                (None, None) => k as f64 / 100.0,
            };
            let heat = HEAT_START * (HEAT_END / HEAT_START).powf(spent.clamp(0.0, 1.0));
            let per = (DISTRICT_MOVES_PER_STREET * size as u64)
                .min((budget / (m.n.div_ceil(size).max(1) as u64)).max(1));
            let r = pool.install(|| {
                districts::round(
                    m,
                    ctx.neigh,
                    &mut routes,
                    size,
                    per,
                    heat,
                    self.seed,
                    k,
                    &limits,
                )
            });
            k += 1;
            iterations += r.iterations;
            budget = budget.saturating_sub(r.iterations.max(1));
            let now: i64 = routes.iter().map(|r| m.route_eval(r).0).sum();
            debug_assert!(now <= cost, "a district round made the plan worse");
            if now < cost {
                cost = now;
                found_at = ctx.start.elapsed();
                self.announce(
                    Phase::Districts,
                    Some(cost),
                    lower_bound,
                    ctx.start,
                    iterations,
                );
            }
            if r.iterations == 0 {
                break;
            }
        }
        Ok((cost, routes, found_at, iterations))
    }

    fn finish(
        &self,
        plan: Plan,
        mut lb: LowerBound,
        lp: Option<LpOutcome>,
        stats: Stats,
    ) -> Solution {
        if let Some(LpOutcome::Ran(r)) = &lp {
            if r.bound > lb.value {
                lb = r.lower_bound();
            }
        }
        debug_assert!(lb.value <= plan.cost, "bound {lb:?} above the plan's cost");
        let gap = if lb.value > 0 {
            100.0 * (plan.cost - lb.value) as f64 / lb.value as f64
        } else {
            0.0
        };
        Solution {
            cost: plan.cost,
            plan,
            lower_bound: lb,
            gap,
            lp,
            stats,
        }
    }
}

/// Routes as task arcs.
type Routes = Vec<Vec<u32>>;

/// Candidate lists for the listed construction (empty below
/// [`LISTED_FROM`] streets) and the local search's neighbour lists (the
/// first candidates when there are candidate lists).
fn candidates_and_neighbours(inst: &Instance, m: &ArcMatrix) -> (Routes, Routes) {
    let cand = if m.n > LISTED_FROM {
        candidate_lists(inst, m, CANDIDATES)
    } else {
        Vec::new()
    };
    let neigh = if cand.is_empty() {
        neighbour_lists(m, DEFAULT_NEIGHBOURS)
    } else {
        cand.iter()
            .map(|c| c[..c.len().min(DEFAULT_NEIGHBOURS)].to_vec())
            .collect()
    };
    (cand, neigh)
}

/// The plan of the search's routes (task arcs) of matrix cost `cost`,
/// priced with the turn-aware distances `turned` when the instance has turn
/// rules.
fn plan_of(
    inst: &Instance,
    dist: &Distances,
    turned: Option<&crate::turns::TurnDistances>,
    routes: &Routes,
    cost: i64,
) -> Plan {
    let visits: Vec<Vec<crate::plan::Visit>> = routes
        .iter()
        .map(|r| r.iter().map(|&a| ArcMatrix::visit(a)).collect())
        .collect();
    // A self-loop served either way is the same drive, but a plan file can
    // state only one direction for it: return the one it reads back as, so
    // every plan returned writes and reads back identically. With turn rules
    // the direction changes the turns, so it is kept.
    let plan = match turned {
        Some(td) => crate::turns::plan_from_visits(inst, td, visits),
        None => Plan::from_visits(inst, dist, visits).self_loops_forward(inst),
    };
    debug_assert_eq!(plan.cost, cost, "matrix and plan costs disagree");
    debug_assert!(
        crate::check::check_plan(inst, &plan).is_ok(),
        "the solver's plan fails the checker: {:?}",
        crate::check::check_plan(inst, &plan)
    );
    plan
}

/// Best cost, its routes (task arcs), when it was found, offspring made.
type Best = (i64, Vec<Vec<u32>>, Duration, u64);

/// The arc matrices, after the checks that make the search sound: entries
/// fit, no route can reach [`BIG`], every street fits a route of its own and
/// the fleet bound can carry the total demand.
fn prepare(
    inst: &Instance,
    dist: &Distances,
    turned: Option<&TurnDistances>,
) -> Result<ArcMatrix, SolveError> {
    let m = match turned {
        Some(td) => ArcMatrix::with_turns(inst, td),
        None => ArcMatrix::new(inst, dist),
    }
    .map_err(|e| SolveError::MatrixOverflow {
        value: e.value,
        limit: MAX_LEG,
    })?;
    // A route serves each street at most once and drives at most one
    // deadhead leg (each at most the longest) before each service and home.
    let (longest_d, longest_t) = m.longest_legs();
    let legs = m.n as i128 + 1;
    let service: i128 = inst.tasks().iter().map(|t| t.cost as i128).sum();
    let service_t: i128 = inst.tasks().iter().map(|t| t.time as i128).sum();
    let bound = (service + legs * longest_d as i128).max(service_t + legs * longest_t as i128);
    if bound >= BIG as i128 {
        return Err(SolveError::RouteTooLong {
            bound: bound.min(Cost::MAX as i128) as Cost,
            limit: BIG,
        });
    }
    for t in 0..m.n {
        let ok = [2 * t as u32, 2 * t as u32 + 1]
            .iter()
            .any(|&a| m.allowed[a as usize] && m.route_feasible(&[a]));
        if !ok {
            let link = inst.tasks()[t].link;
            return Err(SolveError::TaskAlone {
                link,
                street: inst.network().street_label(link),
            });
        }
    }
    if let Some(k) = m.max_routes {
        let needed = ((inst.total_demand() + m.capacity - 1) / m.capacity) as usize;
        if needed > k {
            return Err(SolveError::FleetTooSmall {
                needed_at_least: needed,
                max_vehicles: k,
            });
        }
    }
    Ok(m)
}

pub(super) struct Ctx<'c> {
    pub(super) m: &'c ArcMatrix,
    pub(super) neigh: &'c [Vec<u32>],
    pub(super) deadline: Option<Instant>,
    pub(super) stop: Option<Arc<AtomicBool>>,
    pub(super) stop_at: i64,
    pub(super) start: Instant,
}

impl Ctx<'_> {
    pub(super) fn should_stop(&self) -> bool {
        self.deadline.is_some_and(|d| Instant::now() >= d)
            || self
                .stop
                .as_ref()
                .is_some_and(|f| f.load(Ordering::Relaxed))
    }
}

/// Search parameters of one island.
const RESTART_AFTER: u64 = 3000;
const MS_RATE: f64 = 0.2;
const TARGET_FEASIBLE: f64 = 0.5;

pub(super) struct Island {
    rng: ChaCha12Rng,
    pop: Population,
    pub(super) best: Option<Individual>,
    best_time: Duration,
    fewest: usize,
    pub(super) iterations: u64,
    since_improvement: u64,
    initialised: bool,
    pen_load: f64,
    pen_time: f64,
    feasible_window: (u64, u64),
}

impl Island {
    pub(super) fn new(rng: ChaCha12Rng, m: &ArcMatrix) -> Self {
        let mut max_d = 1i64;
        // On demand, sampling far legs would search the whole network: the
        // cap (twice the longest yard leg) stands in for the longest leg.
        let sample = if m.is_on_demand() { 0 } else { m.arcs as u32 };
        if m.is_on_demand() {
            max_d = m.longest_legs().0.max(1);
        }
        for a in (0..sample).step_by(7) {
            for b in (0..m.arcs as u32).step_by(5) {
                let d = m.d(a, b);
                if d < BIG {
                    max_d = max_d.max(d);
                }
            }
        }
        let max_q = m.demand.iter().copied().max().unwrap_or(1).max(1);
        let w = (max_d as f64 / max_q as f64).clamp(0.1, 1000.0);
        Island {
            pen_load: w,
            pen_time: 1.0,
            feasible_window: (0, 0),
            rng,
            pop: Population::new(Params::default()),
            best: None,
            best_time: Duration::ZERO,
            fewest: usize::MAX,
            iterations: 0,
            since_improvement: 0,
            initialised: false,
        }
    }

    /// Split + local search with penalised excess (+ repair, + Merge-Split)
    /// of a giant tour; returns a feasible individual or `None`.
    fn educate(&mut self, ctx: &Ctx, tour: &[usize], ls: &mut LocalSearch) -> Option<Individual> {
        let s = match split(ctx.m, tour) {
            Ok(s) => s,
            Err(SplitFailure::TooFewVehicles { fewest }) => {
                self.fewest = self.fewest.min(fewest);
                return None;
            }
            Err(SplitFailure::Infeasible) => return None,
        };
        self.fewest = self.fewest.min(s.routes.len());
        let scaled = |w: f64| ((w * SCALE as f64).round() as i64).max(1);
        ls.set_penalties(scaled(self.pen_load), scaled(self.pen_time));
        let mut found = ls.run(&s.routes, &mut self.rng);
        self.feasible_window.0 += u64::from(found.feasible);
        self.feasible_window.1 += 1;
        let mut factor = 10.0;
        while !found.feasible && factor <= 10000.0 {
            ls.set_penalties(
                scaled(self.pen_load * factor),
                scaled(self.pen_time * factor),
            );
            found = ls.run(&found.routes, &mut self.rng);
            factor *= 10.0;
        }
        if !found.feasible {
            return None;
        }
        if self.rng.random_bool(MS_RATE) {
            let gain = merge_split(ctx.m, ctx.neigh, &mut found.routes, 3, &mut self.rng);
            if gain > 0 {
                ls.set_penalties(0, 0);
                let again = ls.run(&found.routes, &mut self.rng);
                found.routes = again.routes;
                found.cost = again.cost;
            }
        }
        Some(Individual::new(ctx.m.n, found.routes, found.cost))
    }

    /// Adapts the penalty weights towards the target share of feasible
    /// local-search outcomes (as in hybrid genetic search).
    fn adapt_penalties(&mut self) {
        let (f, t) = self.feasible_window;
        if t < 100 {
            return;
        }
        let share = f as f64 / t as f64;
        if share < TARGET_FEASIBLE - 0.05 {
            self.pen_load = (self.pen_load * 1.2).min(1e5);
            self.pen_time = (self.pen_time * 1.2).min(1e5);
        } else if share > TARGET_FEASIBLE + 0.05 {
            self.pen_load = (self.pen_load * 0.85).max(0.1);
            self.pen_time = (self.pen_time * 0.85).max(0.1);
        }
        self.feasible_window = (0, 0);
    }

    fn offer(&mut self, ctx: &Ctx, ind: Individual) {
        if self.best.as_ref().is_none_or(|b| ind.cost < b.cost) {
            self.best = Some(ind.clone());
            self.best_time = ctx.start.elapsed();
            self.since_improvement = 0;
        }
        if !self.pop.has_clone(&ind) {
            self.pop.add(ind);
        }
    }

    fn init(&mut self, ctx: &Ctx) {
        let m = ctx.m;
        let mut ls = LocalSearch::new(m, ctx.neigh);
        let all: Vec<usize> = (0..m.n).collect();
        let p = Params::default();
        let mut tours: Vec<Vec<usize>> = Vec::new();
        ls.interrupt_at(ctx.deadline, ctx.stop.clone());
        for rule in RULES {
            let r = path_scan::<ChaCha12Rng>(m, &all, rule, None, 0, false);
            self.fallback(m, &r);
            tours.push(giant::of_routes(&r));
            if ctx.should_stop() {
                break;
            }
        }
        for _ in 0..3 {
            if ctx.should_stop() {
                break;
            }
            let r = path_scan(m, &all, Rule::Random, Some(&mut self.rng), 10, false);
            tours.push(giant::of_routes(&r));
        }
        while tours.len() < p.mu + 8 {
            tours.push(giant::random(m.n, &mut self.rng));
        }
        for t in tours {
            if let Some(ind) = self.educate(ctx, &t, &mut ls) {
                self.offer(ctx, ind);
            }
            if ctx.should_stop() && self.best.is_some() {
                break;
            }
        }
        self.initialised = true;
    }

    /// Keeps a feasible construction as the best plan while there is none
    /// yet (so that a stop during the first local search still has a plan);
    /// the population itself only receives educated individuals.
    fn fallback(&mut self, m: &ArcMatrix, routes: &[Vec<u32>]) {
        if self.best.is_some() || !routes.iter().all(|r| m.route_feasible(r)) {
            return;
        }
        if m.max_routes.is_some_and(|k| routes.len() > k) {
            return;
        }
        let cost = routes.iter().map(|r| m.route_eval(r).0).sum();
        self.best = Some(Individual::new(m.n, routes.to_vec(), cost));
    }

    pub(super) fn receive(&mut self, routes: &[Vec<u32>], cost: i64) {
        if self.best.as_ref().is_none_or(|b| cost < b.cost) {
            let ind = Individual::new(self.pop_n(routes), routes.to_vec(), cost);
            if !self.pop.has_clone(&ind) {
                self.pop.add(ind.clone());
            }
            self.best = Some(ind);
            self.since_improvement = 0;
        }
    }

    fn pop_n(&self, routes: &[Vec<u32>]) -> usize {
        routes.iter().map(|r| r.len()).sum()
    }

    /// Runs up to `n` offspring; returns how many were made.
    pub(super) fn run(&mut self, ctx: &Ctx, n: u64) -> u64 {
        let m = ctx.m;
        let mut ls = LocalSearch::new(m, ctx.neigh);
        ls.interrupt_at(ctx.deadline, ctx.stop.clone());
        let mut done = 0;
        while done < n {
            if ctx.should_stop() || self.best.as_ref().is_some_and(|b| b.cost <= ctx.stop_at) {
                break;
            }
            if self.pop.len() < 2 {
                self.init(ctx);
                if self.pop.len() < 2 {
                    break;
                }
            }
            self.pop.update_fitness();
            let p1 = self.pop.select(&mut self.rng).tour.clone();
            let p2 = self.pop.select(&mut self.rng).tour.clone();
            let child = order_crossover(&p1, &p2, &mut self.rng);
            if let Some(ind) = self.educate(ctx, &child, &mut ls) {
                self.offer(ctx, ind);
            }
            done += 1;
            self.iterations += 1;
            self.adapt_penalties();
            self.since_improvement += 1;
            if self.since_improvement > RESTART_AFTER {
                let keep = self.best.clone();
                self.pop.clear();
                self.init(ctx);
                if let Some(b) = keep {
                    if !self.pop.has_clone(&b) {
                        self.pop.add(b);
                    }
                }
                self.since_improvement = 0;
            }
        }
        done
    }
}
