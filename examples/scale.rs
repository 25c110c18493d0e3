//! City-scale benchmark: one solver run on a large scenario, everything
//! included (reading, distances, bound, construction, search, checking),
//! with a timeline of phases and best costs and the peak memory.
//!
//! ```text
//! cargo run --release --example make_town -- --seed 7 --blocks 64 --out /tmp/town64.json
//! cargo run --release --example scale -- /tmp/town64.json --seconds 300 --workers 2
//! cargo run --release --example scale -- --glue ../shared/instances/val/val1A.dat --copies 40 --seconds 60
//! ```
//!
//! Options: `--seconds N` (default 60), `--workers N` (default 2), `--seed N`
//! (default 1), `--districts auto|off|STREETS` (default auto),
//! `--marks 30,60,300` (times at which the best cost is reported),
//! `--turns banned|trucks` (turn rules: `banned` bans U-turns except at dead
//! ends, no penalties; `trucks` also charges left 30, right 5, U-turn 60),
//! `--any-fleet` (drop the scenario's bound on the number of trucks: with
//! turn rules the town of `make_town --blocks 64` needs more routes than its
//! bound of 202 allows the constructions to find).
//!
//! **Glued references** (`--glue FILE --copies K`): `K` copies of a
//! research instance whose optimum is published, sharing only the yard
//! junction. With no fleet bound and no shift limit, a route of the glued
//! town that serves streets of several copies passes the yard between them
//! and can be cut there into routes of single copies at the same cost and
//! within capacity; so the optimum of the glued town is exactly `K` times the
//! optimum of one copy (and `K` copies of an optimal plan reach it). The
//! example prints that reference when `reference.csv` (beside the
//! instances) gives a proven optimum (lower bound equal to the best known).
//!
//! Peak memory is the process's `VmHWM` from `/proc/self/status` (Linux).

use std::path::{Path, PathBuf};
use std::sync::Mutex;
use std::time::{Duration, Instant};

use arcwright::check::check_plan;
use arcwright::demo::glued_copies;
use arcwright::io::{read_dat_file, read_reference, read_scenario_file};
use arcwright::model::Cost;
use arcwright::turns::{TurnPenalties, TurnRules};
use arcwright::{Decomposition, Progress, Solver};

/// The options, printed for `--help` and after a bad option (see the module docs).
const USAGE: &str = "usage: scale [SCENARIO | --glue FILE.dat --copies K] [--seconds N] \
[--workers N] [--seed N] [--districts auto|off|STREETS] [--marks 30,60,300] \
[--turns banned|trucks] [--any-fleet]";

struct Opts {
    file: Option<PathBuf>,
    glue: Option<PathBuf>,
    copies: usize,
    seconds: u64,
    workers: usize,
    seed: u64,
    districts: Decomposition,
    marks: Vec<u64>,
    turns: Option<TurnRules>,
    any_fleet: bool,
}

fn parse() -> Result<Opts, String> {
    let mut o = Opts {
        file: None,
        glue: None,
        copies: 10,
        seconds: 60,
        workers: 2,
        seed: 1,
        districts: Decomposition::Auto,
        marks: vec![10, 30, 60, 120, 300],
        turns: None,
        any_fleet: false,
    };
    let mut args = std::env::args().skip(1);
    while let Some(a) = args.next() {
        if !a.starts_with("--") {
            o.file = Some(a.into());
            continue;
        }
        if a == "--any-fleet" {
            o.any_fleet = true;
            continue;
        }
        let v = args.next().ok_or(format!("{a} needs a value"))?;
        let num = |v: &str| {
            v.parse::<u64>()
                .map_err(|_| format!("{a}: not a number: {v}"))
        };
        match a.as_str() {
            "--glue" => o.glue = Some(v.into()),
            "--copies" => o.copies = num(&v)?.max(1) as usize,
            "--seconds" => o.seconds = num(&v)?,
            "--workers" => o.workers = num(&v)?.max(1) as usize,
            "--seed" => o.seed = num(&v)?,
            "--marks" => {
                o.marks = v.split(',').map(num).collect::<Result<_, _>>()?;
            }
            "--turns" => {
                o.turns = Some(match v.as_str() {
                    "banned" => TurnRules::default(),
                    "trucks" => TurnRules::trucks(TurnPenalties {
                        left: 30,
                        right: 5,
                        u_turn: 60,
                        straight: 0,
                    }),
                    _ => return Err(format!("--turns: banned or trucks, not {v}")),
                })
            }
            "--districts" => {
                o.districts = match v.as_str() {
                    "auto" => Decomposition::Auto,
                    "off" => Decomposition::Off,
                    s => Decomposition::Districts {
                        streets: num(s)? as usize,
                    },
                }
            }
            _ => return Err(format!("unknown option {a}")),
        }
    }
    Ok(o)
}

/// The published optimum of `name`, when the reference file proves one.
fn optimum(file: &Path, name: &str) -> Option<Cost> {
    let csv = file.parent()?.parent()?.join("reference.csv");
    let rows = read_reference(csv).ok()?;
    let r = rows.into_iter().find(|r| r.instance == name)?;
    (r.proven_optimal || r.lower_bound == r.best_known).then_some(r.best_known)
}

fn peak_mib() -> Option<u64> {
    let s = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = s.lines().find(|l| l.starts_with("VmHWM:"))?;
    let kb: u64 = line.split_whitespace().nth(1)?.parse().ok()?;
    Some(kb / 1024)
}

fn main() {
    if std::env::args().any(|a| a == "--help" || a == "-h") {
        println!("{USAGE}");
        return;
    }
    let o = match parse() {
        Ok(o) => o,
        Err(e) => {
            eprintln!("scale: {e}\n{USAGE}");
            std::process::exit(2);
        }
    };
    let t0 = Instant::now();
    let (inst, reference) = match (&o.glue, &o.file) {
        (Some(g), _) => {
            let one = read_dat_file(g).unwrap_or_else(|e| panic!("{e}"));
            let opt = optimum(g, &one.instance.name).map(|v| v * o.copies as Cost);
            (
                glued_copies(&one.instance, o.copies).unwrap_or_else(|e| panic!("{e}")),
                opt,
            )
        }
        (None, Some(f)) => (
            read_scenario_file(f).unwrap_or_else(|e| panic!("{e}")),
            None,
        ),
        (None, None) => {
            eprintln!("scale: give a scenario file or --glue FILE");
            std::process::exit(2);
        }
    };
    let inst = if o.any_fleet {
        let mut fleet = inst.fleet().clone();
        fleet.max_vehicles = None;
        inst.with_fleet(fleet).unwrap_or_else(|e| panic!("{e}"))
    } else {
        inst
    };
    let inst = match o.turns {
        Some(rules) => inst.with_turn_rules(Some(rules)).unwrap_or_else(|e| {
            eprintln!("scale: turn rules: {e:?}");
            std::process::exit(2);
        }),
        None => inst,
    };
    println!(
        "{}: {} streets to serve, read in {:.1} s; {} workers, seed {}, limit {} s, {:?}, turns {}, at most {:?} trucks",
        inst.name,
        inst.tasks().len(),
        t0.elapsed().as_secs_f64(),
        o.workers,
        o.seed,
        o.seconds,
        o.districts,
        o.turns.as_ref().map_or("off".into(), |t| format!("{:?} U-turns, {:?}", t.u_turns, t.penalties)),
        inst.fleet().max_vehicles
    );
    let log: Mutex<Vec<(Duration, Option<Cost>)>> = Mutex::new(Vec::new());
    let offset = t0.elapsed();
    let sol = Solver::new(&inst)
        .seed(o.seed)
        .workers(o.workers)
        .decomposition(o.districts)
        .time_limit(Duration::from_secs(o.seconds).saturating_sub(offset))
        .on_progress(|p: &Progress| {
            let at = offset + p.elapsed;
            println!(
                "  {:>7.1} s  {:<12} best {:>10}  bound {}  iterations {}",
                at.as_secs_f64(),
                format!("{:?}", p.phase),
                p.best_cost.map_or("-".into(), |c| c.to_string()),
                p.lower_bound,
                p.iteration
            );
            log.lock().expect("log").push((at, p.best_cost));
        })
        .solve()
        .unwrap_or_else(|e| panic!("{e}"));
    let returned = t0.elapsed();
    let ok = check_plan(&inst, &sol.plan).is_ok();
    let total = t0.elapsed();
    let log = log.into_inner().expect("log");
    let first = log.iter().find(|x| x.1.is_some()).map(|x| x.0);
    println!(
        "first feasible plan at {}; solver returned at {:.1} s",
        first.map_or("-".into(), |t| format!("{:.1} s", t.as_secs_f64())),
        returned.as_secs_f64()
    );
    for &mark in &o.marks {
        let best = log
            .iter()
            .filter(|x| x.0 <= Duration::from_secs(mark))
            .filter_map(|x| x.1)
            .min();
        if let Some(b) = best {
            println!("best by {mark:>4} s: {b}");
        }
    }
    println!(
        "final {} (bound {}, checker {}), {} routes, {} iterations, total {:.1} s, peak {} MiB",
        sol.cost,
        sol.lower_bound.value,
        if ok { "ok" } else { "FAILED" },
        sol.plan.routes.len(),
        sol.stats.iterations,
        total.as_secs_f64(),
        peak_mib().map_or("?".into(), |m| m.to_string())
    );
    if let Some(r) = reference {
        println!(
            "reference optimum {r} (copies x published optimum): {:.2}% above",
            100.0 * (sol.cost - r) as f64 / r as f64
        );
    }
    if !ok {
        std::process::exit(1);
    }
}
