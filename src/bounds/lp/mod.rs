//! The cutting-plane lower bound of the one-index formulation of the CARP.
//!
//! Method: Belenguer & Benavent (2003, Computers & OR 30(5)), as used by
//! Bode & Irnich (2012, Operations Research 60(5)) to start their exact
//! method. One variable per junction pair counts the deadhead traversals
//! summed over all trucks ([`Formulation`]); the cuts are odd-cut and
//! capacity inequalities `x(δ(S)) ≥ max(2k(S) − r(S), r(S) mod 2)` for sets
//! `S` without the yard ([`Formulation::cut`]). The loop solves the LP,
//! separates violated cuts ([`separation`]: exact for odd cuts through a
//! Gomory–Hu tree up to [`separation::MAX_TREE_JUNCTIONS`] junctions,
//! heuristic for capacity cuts), adds them and solves again, until no cut is
//! found, a round limit, the time budget or a stop flag.
//!
//! **Soundness.** The reported bound is *service cost + ⌈L⌉* where `L` is
//! a Lagrangian value recomputed from the solver's duals in exact integer
//! arithmetic ([`rounding`]): it never exceeds the cost of the best plan,
//! whatever the floating-point error of the solver, which can only weaken
//! it. What the bound assumes per model feature is in [`applies`].
//!
//! **Cost.** Each round is one LP solve (interior point, from scratch: tens
//! of milliseconds at 200 columns and 500 rows, under a second at 4,500
//! columns and 1,500 rows) and one separation (two Gomory–Hu trees of
//! `n − 1` maximum flows each, skipped above
//! [`separation::MAX_TREE_JUNCTIONS`] junctions, and greedy growth capped at
//! [`separation::GROWTH_WORK`] steps). Slack cuts are dropped from LPs above
//! 1,000 rows. Measured (2 cores shared, `examples/bound_report.rs`): egl
//! instances finish in at most 1.4 s; a 4,463-street town improves for the
//! whole of a 60 s budget and stops within 0.1 s of it. It is not part of
//! [`crate::bounds::all_bounds`] (too slow for a default); run it with its
//! own budget, e.g. in a thread beside the search:
//!
//! ```
//! use std::sync::{atomic::AtomicBool, Arc};
//! use std::time::Duration;
//! use arcwright::bounds::lp::LpBound;
//! use arcwright::model::{Fleet, Instance, Network};
//!
//! // A square block, all four streets required, trucks of 5 bins.
//! let mut net = Network::with_junctions(4);
//! net.add_required_edge(0, 1, 10, 3);
//! net.add_required_edge(1, 2, 12, 2);
//! net.add_required_edge(2, 3, 10, 3);
//! net.add_required_edge(3, 0, 12, 2);
//! let inst = Instance::new("block", net, Fleet::with_capacity(5), 0).unwrap();
//!
//! let stop = Arc::new(AtomicBool::new(false));
//! let run = LpBound::new(&inst)
//!     .unwrap()
//!     .time_limit(Duration::from_secs(5))
//!     .stop_flag(stop.clone())
//!     .on_progress(|p| eprintln!("round {}: bound {}", p.round, p.bound));
//! let result = std::thread::spawn(move || run.run()).join().unwrap();
//! // 10 bins need two trucks. By hand: the plan 0→1→2 served then back
//! // 2→1→0, and 0→3→2 served then back 2→1→0, costs 88; every plan
//! // crosses the cut around junctions {1, 2, 3} at least 4 times, two of
//! // them deadheads on 0–1 or 0–3 (at least 20), so 44 + 20 ≤ bound ≤ 88.
//! assert!(result.bound >= 64 && result.bound <= 88);
//! ```

mod backend;
mod formulation;
mod growth;
mod guard;
mod mincut;
pub mod rounding;
pub mod separation;

pub use backend::{BackendError, ClarabelBackend, LpBackend, LpPoint};
pub use formulation::{Column, Cut, Formulation};
pub use guard::{applies, Why, MAX_COST};

use std::collections::HashSet;
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Arc;
use std::time::{Duration, Instant};

use crate::bounds::LowerBound;
use crate::model::{Cost, Instance};

/// Name of the LP bound in reports.
pub const LP_CUTS: &str = "one-index LP with cuts";

/// Progress of a running bound, passed to the callback whenever the bound
/// improves.
#[derive(Clone, Debug, PartialEq)]
pub struct LpProgress {
    /// The sound integer bound so far (service cost included).
    pub bound: Cost,
    /// The last LP value (service cost included; float, for display).
    pub lp_value: f64,
    /// LP solves so far.
    pub round: usize,
    /// Cuts in the LP.
    pub cuts: usize,
    /// Time since the start.
    pub elapsed: Duration,
}

/// The outcome of [`LpBound::run`].
#[derive(Clone, Debug, PartialEq)]
pub struct LpResult {
    /// The sound integer lower bound: service cost plus the ceiling of the
    /// exact Lagrangian deadhead value (the best over all rounds).
    pub bound: Cost,
    /// The last LP value, service cost included (float, for display only;
    /// from an interrupted solve when time ran out, so it may differ from
    /// `bound` either way).
    pub lp_value: f64,
    /// LP solves done.
    pub rounds: usize,
    /// Cuts in the final LP.
    pub cuts: usize,
    /// Wall-clock time used.
    pub elapsed: Duration,
    /// True when separation found no more violated cut (the bound is the
    /// full value of this method); false when stopped by the round limit,
    /// the time budget, the stop flag or an LP failure.
    pub finished: bool,
}

impl LpResult {
    /// The bound as a [`LowerBound`] named [`LP_CUTS`].
    pub fn lower_bound(&self) -> LowerBound {
        LowerBound {
            value: self.bound,
            by: LP_CUTS,
        }
    }
}

type ProgressFn = Box<dyn FnMut(&LpProgress) + Send>;

/// Builder and runner of the cutting-plane bound. Owns all its data, so it
/// can be moved to another thread (`LpBound: Send`).
pub struct LpBound {
    form: Formulation,
    time_limit: Option<Duration>,
    deadline: Option<Instant>,
    stop: Option<Arc<AtomicBool>>,
    progress: Option<ProgressFn>,
    max_rounds: usize,
    max_cuts: usize,
    backend: Box<dyn LpBackend>,
}

impl LpBound {
    /// Prepares the bound of `inst` (no limit on time or rounds yet; the
    /// default backend is [`ClarabelBackend`]).
    ///
    /// # Errors
    ///
    /// [`Why`] when the bound does not apply to the instance ([`applies`]).
    pub fn new(inst: &Instance) -> Result<LpBound, Why> {
        applies(inst)?;
        Ok(LpBound {
            form: Formulation::new(inst),
            time_limit: None,
            deadline: None,
            stop: None,
            progress: None,
            max_rounds: usize::MAX,
            max_cuts: 300,
            backend: Box::new(ClarabelBackend),
        })
    }

    /// Stops starting new rounds after `limit` from the start of [`Self::run`]
    /// (a running LP solve is also told the deadline).
    pub fn time_limit(mut self, limit: Duration) -> Self {
        self.time_limit = Some(limit);
        self
    }

    /// Stops at the instant `at` (whichever of this and
    /// [`Self::time_limit`] comes first).
    pub fn deadline(mut self, at: Instant) -> Self {
        self.deadline = Some(at);
        self
    }

    /// Stops between rounds once `flag` is set.
    pub fn stop_flag(mut self, flag: Arc<AtomicBool>) -> Self {
        self.stop = Some(flag);
        self
    }

    /// Called whenever the bound improves.
    pub fn on_progress(mut self, f: impl FnMut(&LpProgress) + Send + 'static) -> Self {
        self.progress = Some(Box::new(f));
        self
    }

    /// At most `rounds` LP solves (for tests: deterministic, unlike time).
    pub fn max_rounds(mut self, rounds: usize) -> Self {
        self.max_rounds = rounds;
        self
    }

    /// At most `cuts` cuts added per round (default 300).
    pub fn max_cuts_per_round(mut self, cuts: usize) -> Self {
        self.max_cuts = cuts.max(1);
        self
    }

    /// Another LP solver.
    pub fn backend(mut self, backend: impl LpBackend + 'static) -> Self {
        self.backend = Box::new(backend);
        self
    }

    /// The formulation the bound works on.
    pub fn formulation(&self) -> &Formulation {
        &self.form
    }

    /// Runs the cutting-plane loop. Never fails: on an LP failure it returns
    /// the best bound reached (at least the service cost) with
    /// `finished = false`.
    pub fn run(mut self) -> LpResult {
        let start = Instant::now();
        let deadline = match (self.deadline, self.time_limit) {
            (Some(d), Some(t)) => Some(d.min(start + t)),
            (d, t) => d.or(t.map(|t| start + t)),
        };
        let form = &self.form;
        let service = form.service_cost();
        let sep = separation::Separator::new(form);
        let mut seen = HashSet::new();
        let zero = vec![0.0; form.columns().len()];
        let mut limits = separation::Limits {
            max_cuts: self.max_cuts,
            round: 0,
            deadline,
        };
        let mut cuts = sep.level_cuts(form, &mut seen);
        cuts.extend(sep.separate(form, &zero, &limits, &mut seen));
        let mut best: Cost = 0;
        let mut lp_value = service as f64;
        let (mut rounds, mut finished) = (0, false);
        if cuts.is_empty() {
            // No cut at x = 0: the LP optimum is 0.
            finished = true;
        }
        while !finished {
            let stopped = self
                .stop
                .as_ref()
                .is_some_and(|s| s.load(Ordering::Relaxed));
            if stopped || deadline.is_some_and(|d| Instant::now() >= d) || rounds >= self.max_rounds
            {
                break;
            }
            let Ok((point, sound)) = solve_cuts(form, &cuts, self.backend.as_mut(), deadline)
            else {
                break;
            };
            rounds += 1;
            lp_value = service as f64 + point.objective;
            if sound > best {
                best = sound;
                if let Some(f) = self.progress.as_mut() {
                    f(&LpProgress {
                        bound: service + best,
                        lp_value,
                        round: rounds,
                        cuts: cuts.len(),
                        elapsed: start.elapsed(),
                    });
                }
            }
            limits.round = rounds;
            let new = sep.separate(form, &point.x, &limits, &mut seen);
            if new.is_empty() {
                finished = true;
            } else if cuts.len() > PURGE_ABOVE {
                purge(form, &mut cuts, &point, &mut seen);
            }
            cuts.extend(new);
        }
        LpResult {
            bound: service + best,
            lp_value,
            rounds,
            cuts: cuts.len(),
            elapsed: start.elapsed(),
            finished,
        }
    }
}

/// Drops the cuts that are slack at `point` with a zero dual (they may be
/// separated again later); keeps the LP small on large networks, where the
/// interior-point solve time grows with the rows.
fn purge(form: &Formulation, cuts: &mut Vec<Cut>, point: &LpPoint, seen: &mut HashSet<Vec<usize>>) {
    let top = point.duals.iter().fold(1.0f64, |a, &b| a.max(b));
    let mut i = 0;
    cuts.retain(|c| {
        let dual = point.duals.get(i).copied().unwrap_or(0.0);
        i += 1;
        let slack = form.lhs(c, &point.x) - c.rhs as f64;
        let keep = dual > PURGE_DUAL * top || slack <= PURGE_SLACK;
        if !keep {
            seen.remove(&c.set);
        }
        keep
    });
}

/// Cuts are purged only from LPs with more rows than this (measured: on
/// the public sets, with at most about 600 rows, purging makes the LP cycle
/// and lowers the bound; on a 4,463-street town it keeps each solve under a
/// second instead of growing to 9 s by round five).
const PURGE_ABOVE: usize = 1000;

/// A cut whose dual is at most this share of the largest dual ...
const PURGE_DUAL: f64 = 1e-7;
/// ... and whose slack exceeds this is dropped by [`purge`].
const PURGE_SLACK: f64 = 0.1;

/// Solves the LP of `form` with exactly the cuts `cuts` and returns the
/// solver's point and the sound deadhead bound ([`rounding`]) from its duals
/// (service cost not included).
///
/// # Errors
///
/// When the backend fails.
pub fn solve_cuts(
    form: &Formulation,
    cuts: &[Cut],
    backend: &mut dyn LpBackend,
    deadline: Option<Instant>,
) -> Result<(LpPoint, Cost), BackendError> {
    let costs: Vec<f64> = form.columns().iter().map(|c| c.cost as f64).collect();
    let rows: Vec<(&[u32], f64)> = cuts.iter().map(|c| (&c.cols[..], c.rhs as f64)).collect();
    let point = backend.solve(&costs, &rows, deadline)?;
    let icosts: Vec<i64> = form.columns().iter().map(|c| c.cost).collect();
    let irows: Vec<(&[u32], i64)> = cuts.iter().map(|c| (&c.cols[..], c.rhs)).collect();
    let sound =
        rounding::lagrangian_bound(&icosts, &irows, &point.duals, form.upper()).unwrap_or(0);
    Ok((point, sound))
}
