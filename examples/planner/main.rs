//! The planner: plans the routes of a street-service fleet and writes the
//! plan, route sheets and maps into a folder.
//!
//! ```text
//! cargo run --release --example planner                       # the demo town
//! cargo run --release --example planner -- ../shared/instances/gdb/gdb1.dat --iterations 2000
//! cargo run --release --example planner -- check instances/demo-town.json out/plan.json
//! cargo run --release --example planner -- --help
//! ```
//!
//! A thin shell over the library: `cli` reads the command line (clap),
//! `run` calls the reader, solver, checker and report renderers, `output`
//! checks the output folder before the search and writes it atomically
//! after; this file adds the progress bar (indicatif) and the Ctrl-C
//! handler (ctrlc).

mod cli;
mod output;
mod run;

use std::path::PathBuf;
use std::process::ExitCode;
use std::sync::atomic::{AtomicBool, AtomicU8, Ordering};
use std::sync::Arc;
use std::time::{Duration, Instant};

use arcwright::Progress;
use clap::Parser;
use indicatif::{ProgressBar, ProgressStyle};

use cli::{Cli, PlanArgs, Sub};
use run::Hooks;

/// Why a run failed.
#[derive(Debug, thiserror::Error)]
pub enum AppError {
    /// The scenario or plan file could not be read.
    #[error("{0}")]
    Input(#[source] arcwright::Error),
    /// A map file could not be turned into a scenario.
    #[error("{0}")]
    Map(#[source] arcwright::map::MapError),
    /// The command line names files in a way that cannot be right.
    #[error("{0}")]
    Usage(String),
    /// The fleet options make the scenario invalid.
    #[error("the fleet options do not fit the scenario: {0}")]
    Fleet(#[source] arcwright::model::ModelError),
    /// Shortest paths could not be computed.
    #[error("{0}")]
    Distances(#[source] arcwright::paths::DistanceError),
    /// The solver found no plan.
    #[error("no plan: {0}")]
    Solve(#[source] arcwright::SolveError),
    /// The fleet solver found no plan (dump sites, yards, truck types).
    #[error("no plan: {0}")]
    FleetSolve(#[source] arcwright::fleet::FleetSolveError),
    /// The plan failed the independent checker and was not written.
    #[error("the plan failed the independent checker ({} problem(s)); nothing was written", .0.len())]
    Refused(Vec<String>),
    /// Something that should not happen (a bug): named, not hidden.
    #[error("internal error: {0}")]
    Internal(String),
    /// The scenario asks for something the planner's outputs cannot show yet.
    #[error("{0}")]
    Unsupported(String),
    /// The output folder cannot take the plan (checked before the search).
    #[error("cannot write the plan into {}: {reason}; nothing was searched", path.display())]
    OutFolder {
        /// The folder.
        path: PathBuf,
        /// Why.
        reason: String,
    },
    /// An output file could not be written.
    #[error("cannot write {}: {source}", path.display())]
    Write {
        /// The file.
        path: PathBuf,
        /// Why.
        #[source]
        source: std::io::Error,
    },
}

/// Options that only a planning run understands.
const PLAN_ONLY: [&str; 7] = [
    "--save-scenario",
    "--seed",
    "--time-limit",
    "--iterations",
    "--workers",
    "--out",
    "--quiet",
];

/// `planner check ... --seed 3`: an option that means nothing for `check`
/// gets a message that says so (clap alone would call it unexpected).
fn refuse_plan_options_for_check() -> Option<ExitCode> {
    let args: Vec<String> = std::env::args().skip(1).collect();
    if args.first().map(String::as_str) != Some("check") {
        return None;
    }
    let opt = args
        .iter()
        .take_while(|a| *a != "--")
        .map(|a| a.split('=').next().unwrap_or(a))
        .find(|a| PLAN_ONLY.contains(a))?;
    eprintln!(
        "planner: {opt} means nothing for `check`, which re-verifies a plan file without \
         searching or writing; check takes only --capacity, --shift-limit and --max-trucks"
    );
    Some(ExitCode::from(2))
}

fn main() -> ExitCode {
    if let Some(code) = refuse_plan_options_for_check() {
        return code;
    }
    let cli = match Cli::try_parse() {
        Ok(c) => c,
        Err(e) => {
            // clap prints help and version to stdout (exit 0) and usage
            // errors, with suggestions for misspelt options, to stderr.
            let _ = e.print();
            return if e.use_stderr() {
                ExitCode::from(2)
            } else {
                ExitCode::SUCCESS
            };
        }
    };
    match cli.command {
        Some(Sub::Check(k)) => check(&k),
        None => plan(&cli.plan),
    }
}

fn check(k: &cli::CheckArgs) -> ExitCode {
    match run::run_check(&k.scenario, &k.plan, &k.fleet, &k.map) {
        Ok(run) if run.problems.is_empty() => {
            println!(
                "{}: valid for {} ({} trucks, cost {}).",
                k.plan.display(),
                k.scenario.display(),
                run.trucks,
                run.cost_text
            );
            ExitCode::SUCCESS
        }
        Ok(run) => {
            println!(
                "{}: {} problem(s) against {}:",
                k.plan.display(),
                run.problems.len(),
                k.scenario.display()
            );
            for p in &run.problems {
                println!("  - {p}");
            }
            ExitCode::from(1)
        }
        Err(e) => fail(&e),
    }
}

fn fail(e: &AppError) -> ExitCode {
    eprintln!("planner: {e}");
    if let AppError::Refused(v) = e {
        for x in v {
            eprintln!("  - {x}");
        }
    }
    ExitCode::from(2)
}

/// Ctrl-C once: stop searching and write the best plan so far. Twice: quit.
fn ctrl_c_flag() -> Arc<AtomicBool> {
    let stop = Arc::new(AtomicBool::new(false));
    let presses = Arc::new(AtomicU8::new(0));
    let flag = stop.clone();
    let _ = ctrlc::set_handler(move || {
        if presses.fetch_add(1, Ordering::SeqCst) >= 1 {
            eprintln!("\nplanner: interrupted twice, quitting without writing");
            std::process::exit(130);
        }
        flag.store(true, Ordering::SeqCst);
    });
    stop
}

fn progress_bar(opts: &PlanArgs) -> ProgressBar {
    let limit = opts.effective_time_limit();
    if opts.quiet {
        return ProgressBar::hidden();
    }
    let template = if limit.is_some() {
        "{spinner} searching [{bar:30}] {elapsed_precise}  {msg}  (Ctrl-C: stop, keep the best)"
    } else {
        "{spinner} searching {elapsed_precise}  {msg}  (Ctrl-C: stop, keep the best)"
    };
    let b = ProgressBar::new(limit.map_or(1, |t| t.as_millis() as u64).max(1));
    b.set_style(
        ProgressStyle::with_template(template)
            .expect("valid template")
            .progress_chars("=> "),
    );
    b.set_message("building first plans...");
    b.enable_steady_tick(Duration::from_millis(120));
    b
}

fn plan(opts: &PlanArgs) -> ExitCode {
    let stop = ctrl_c_flag();
    let bar = progress_bar(opts);
    let start = Instant::now();
    let done = Arc::new(AtomicBool::new(false));
    let ticker = {
        let (bar, done) = (bar.clone(), done.clone());
        std::thread::spawn(move || {
            while !done.load(Ordering::Relaxed) {
                bar.set_position(start.elapsed().as_millis() as u64);
                std::thread::sleep(Duration::from_millis(100));
            }
        })
    };
    let on_progress = {
        let bar = bar.clone();
        move |p: &Progress| {
            let Some(best) = p.best_cost else {
                bar.set_message(format!("{:?}", p.phase).to_lowercase());
                return;
            };
            let gap = if p.lower_bound > 0 {
                100.0 * (best - p.lower_bound) as f64 / p.lower_bound as f64
            } else {
                0.0
            };
            let by = if p.bound_by == arcwright::bounds::lp::LP_CUTS {
                "LP"
            } else {
                "quick"
            };
            bar.set_message(format!(
                "{}  best {best}  bound {} ({by})  gap {gap:.2}%  iteration {}",
                format!("{:?}", p.phase).to_lowercase(),
                p.lower_bound,
                p.iteration
            ));
        }
    };
    let hooks = Hooks {
        on_progress: Some(Box::new(on_progress)),
        stop: Some(stop),
    };
    let result = run::run_plan(opts, hooks);
    done.store(true, Ordering::Relaxed);
    let _ = ticker.join();
    bar.finish_and_clear();
    match result {
        Ok(run) => {
            println!("Scenario: {}", run.source);
            if let Some(report) = &run.map_report {
                println!("{report}");
            }
            if let Some(saved) = &run.saved_scenario {
                println!("Scenario saved as {}", saved.display());
            }
            if run.stopped_early {
                println!("Stopped by Ctrl-C: writing the best plan found so far.");
            }
            println!();
            print!("{}", run.summary);
            println!();
            println!(
                "Every plan written passed the independent checker. Files in {}:",
                opts.out.display()
            );
            for f in &run.files {
                println!("  {}", f.display());
            }
            ExitCode::SUCCESS
        }
        Err(e) => fail(&e),
    }
}
