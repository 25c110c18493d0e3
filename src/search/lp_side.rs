//! The cutting-plane LP bound ([`crate::bounds::lp`]) run in a thread of its
//! own beside the search, for [`super::Solver::lp_bound`].
//!
//! The thread never touches the search: it only raises a shared best bound
//! that progress reports read, so plans stay exactly as deterministic as
//! without it. What it reports depends on its budget: a round limit alone
//! gives the same bound every run; a time limit gives whatever was reached.

use std::sync::atomic::{AtomicBool, AtomicI64, Ordering};
use std::sync::Arc;
use std::thread::JoinHandle;
use std::time::{Duration, Instant};

use crate::bounds::lp::{LpBound, LpResult, Why};
use crate::model::{Cost, Instance};

/// How much the LP bound may spend beside the search
/// ([`super::Solver::lp_bound`]). It always stops at the solver's time limit
/// and at its stop flag too, whichever comes first; with neither limit here
/// nor a solver time limit it runs until separation finds no more cuts.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct LpBudget {
    /// At most this many LP solves (deterministic: the same bound every run).
    pub max_rounds: Option<usize>,
    /// At most this long from the start of the solve.
    pub time_limit: Option<Duration>,
}

impl LpBudget {
    /// At most `n` LP solves, and otherwise the solver's limits.
    pub fn rounds(n: usize) -> Self {
        LpBudget {
            max_rounds: Some(n),
            time_limit: None,
        }
    }

    /// At most `t` of wall-clock time, and otherwise the solver's limits.
    pub fn time(t: Duration) -> Self {
        LpBudget {
            max_rounds: None,
            time_limit: Some(t),
        }
    }

    /// No limit of its own: the solver's time limit and stop flag, or until
    /// no cut is found.
    pub fn with_search() -> Self {
        LpBudget::default()
    }
}

/// What the LP bound did during a solve ([`super::Solution::lp`]).
#[derive(Clone, Debug, PartialEq)]
#[non_exhaustive]
pub enum LpOutcome {
    /// It ran; its result (the bound it reached, rounds, whether it finished).
    Ran(LpResult),
    /// It does not apply to the instance ([`crate::bounds::lp::applies`]):
    /// the combinatorial bound was used alone.
    DoesNotApply(Why),
    /// There was nothing to bound (no street to serve).
    NotNeeded,
    /// The bound's thread failed (a defect): the combinatorial bound was
    /// used alone.
    Failed,
}

/// The running bound thread.
pub(crate) struct LpSide {
    handle: JoinHandle<LpResult>,
    stop: Arc<AtomicBool>,
    best: Arc<AtomicI64>,
    /// The last progress report (what is known if the thread is left to end alone).
    last: Arc<std::sync::Mutex<Option<LpResult>>>,
    deadline: Option<Instant>,
    started: Instant,
}

/// How long [`LpSide::finish`] waits past the solver's deadline for the
/// LP solve under way before it leaves the thread to end by itself.
const GRACE: Duration = Duration::from_millis(500);

impl LpSide {
    /// Starts the bound of `inst` within `budget` and the solver's
    /// `deadline`; `Err` when the bound does not apply.
    pub(crate) fn start(
        inst: &Instance,
        budget: LpBudget,
        deadline: Option<Instant>,
    ) -> Result<LpSide, Why> {
        let stop = Arc::new(AtomicBool::new(false));
        let best = Arc::new(AtomicI64::new(0));
        let mut run = LpBound::new(inst)?.stop_flag(stop.clone());
        if let Some(n) = budget.max_rounds {
            run = run.max_rounds(n);
        }
        if let Some(t) = budget.time_limit {
            run = run.time_limit(t);
        }
        if let Some(d) = deadline {
            run = run.deadline(d);
        }
        let shared = best.clone();
        let last = Arc::new(std::sync::Mutex::new(None));
        let seen = last.clone();
        run = run.on_progress(move |p| {
            let now = shared.fetch_max(p.bound, Ordering::Relaxed).max(p.bound);
            if let Ok(mut l) = seen.lock() {
                *l = Some(LpResult {
                    bound: now,
                    lp_value: p.lp_value,
                    rounds: p.round,
                    cuts: p.cuts,
                    elapsed: p.elapsed,
                    finished: false,
                });
            }
        });
        let handle = std::thread::spawn(move || run.run());
        Ok(LpSide {
            handle,
            stop,
            best,
            last,
            deadline,
            started: Instant::now(),
        })
    }

    /// The best bound reached so far (0 before the first LP solve).
    pub(crate) fn current(&self) -> Cost {
        self.best.load(Ordering::Relaxed)
    }

    /// Waits for the bound to end within its budget, or stops it now
    /// (`stop_now`, at the solver's deadline, or as soon as `external` is
    /// set). A stopped bound ends after the LP solve or separation under
    /// way; when that takes longer than [`GRACE`], the bound reported so far
    /// is returned (not finished; 0 when no LP was solved yet) and the thread
    /// ends by itself. `None` if the thread panicked (a defect; the
    /// combinatorial bound is then used).
    pub(crate) fn finish(self, stop_now: bool, external: Option<&AtomicBool>) -> Option<LpResult> {
        if stop_now {
            self.stop.store(true, Ordering::Relaxed);
        }
        let mut stopped_at: Option<Instant> = stop_now.then(Instant::now);
        while !self.handle.is_finished() {
            let late = self.deadline.is_some_and(|d| Instant::now() >= d);
            if stopped_at.is_none() && (late || external.is_some_and(|f| f.load(Ordering::Relaxed)))
            {
                self.stop.store(true, Ordering::Relaxed);
                stopped_at = Some(Instant::now());
            }
            if stopped_at.is_some_and(|t| t.elapsed() >= GRACE) {
                // An LP solve of a large network can take long to notice the
                // stop: the run ends now with the bound reported so far, and
                // the thread ends by itself after that solve (detached).
                let mut r = self
                    .last
                    .lock()
                    .ok()
                    .and_then(|l| l.clone())
                    .unwrap_or(LpResult {
                        bound: 0,
                        lp_value: 0.0,
                        rounds: 0,
                        cuts: 0,
                        elapsed: Duration::ZERO,
                        finished: false,
                    });
                r.bound = r.bound.max(self.current());
                r.elapsed = self.started.elapsed();
                return Some(r);
            }
            std::thread::sleep(Duration::from_millis(2));
        }
        self.handle.join().ok()
    }
}
