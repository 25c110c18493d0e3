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
//! A thin shell over [`arcwright::app`]: this file only adds the progress bar
//! (indicatif) and the Ctrl-C handler (ctrlc).

use std::process::ExitCode;
use std::sync::atomic::{AtomicBool, AtomicU8, Ordering};
use std::sync::Arc;
use std::time::{Duration, Instant};

use arcwright::app::{self, AppError, Command, Hooks, PlanOptions};
use arcwright::Progress;
use indicatif::{ProgressBar, ProgressStyle};

fn main() -> ExitCode {
    let cmd = match app::parse_args(std::env::args_os().skip(1)) {
        Ok(c) => c,
        Err(e) => {
            eprintln!("planner: {e}");
            return ExitCode::from(2);
        }
    };
    match cmd {
        Command::Help => {
            print!("{}", app::USAGE);
            ExitCode::SUCCESS
        }
        Command::Check {
            scenario,
            plan,
            fleet,
        } => match app::run_check(&scenario, &plan, &fleet) {
            Ok(run) if run.violations.is_empty() => {
                println!(
                    "{}: valid for {} ({} routes, cost {}).",
                    plan.display(),
                    scenario.display(),
                    run.plan.routes.len(),
                    run.plan.cost
                );
                ExitCode::SUCCESS
            }
            Ok(run) => {
                println!(
                    "{}: {} problem(s) against {}:",
                    plan.display(),
                    run.violations.len(),
                    scenario.display()
                );
                for v in &run.violations {
                    println!("  - {v}");
                }
                ExitCode::from(1)
            }
            Err(e) => fail(&e),
        },
        Command::Plan(opts) => plan(&opts),
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

fn plan(opts: &PlanOptions) -> ExitCode {
    // Ctrl-C once: stop searching and write the best plan so far. Twice: quit.
    let stop = Arc::new(AtomicBool::new(false));
    let presses = Arc::new(AtomicU8::new(0));
    {
        let (stop, presses) = (stop.clone(), presses.clone());
        let _ = ctrlc::set_handler(move || {
            if presses.fetch_add(1, Ordering::SeqCst) >= 1 {
                eprintln!("\nplanner: interrupted twice, quitting without writing");
                std::process::exit(130);
            }
            stop.store(true, Ordering::SeqCst);
        });
    }

    let limit = opts.effective_time_limit();
    let bar = if opts.quiet {
        ProgressBar::hidden()
    } else {
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
    };
    let start = Instant::now();
    let ticker = {
        let (bar, done) = (bar.clone(), Arc::new(AtomicBool::new(false)));
        let d = done.clone();
        let h = std::thread::spawn(move || {
            while !d.load(Ordering::Relaxed) {
                bar.set_position(start.elapsed().as_millis() as u64);
                std::thread::sleep(Duration::from_millis(100));
            }
        });
        (h, done)
    };
    let on_progress = {
        let bar = bar.clone();
        move |p: &Progress| {
            let gap = if p.lower_bound > 0 {
                100.0 * (p.best_cost - p.lower_bound) as f64 / p.lower_bound as f64
            } else {
                0.0
            };
            bar.set_message(format!(
                "best {}  gap {gap:.2}%  iteration {}",
                p.best_cost, p.iteration
            ));
        }
    };
    let hooks = Hooks {
        on_progress: Some(Box::new(on_progress)),
        stop: Some(stop),
    };
    let result = app::run_plan(opts, hooks);
    ticker.1.store(true, Ordering::Relaxed);
    let _ = ticker.0.join();
    bar.finish_and_clear();
    match result {
        Ok(run) => {
            println!("Scenario: {}", run.source);
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
