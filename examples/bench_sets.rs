//! Benchmark harness: solves every research-format instance (`*.dat`) of one
//! or more folders and compares with the published values.
//!
//! ```text
//! cargo run --release --example bench_sets -- [--time SECS] [--seed N] [--workers W]
//!     [--out DIR] [--reference FILE] [--iterations N] [--lp-secs SECS] DIR...
//! ```
//!
//! `--lp-secs SECS` (default 5; 0 switches it off): budget of the LP lower
//! bound (`Solver::lp_bound`) that runs beside each search, also cut off by
//! the search's time limit; "our LB" is the higher of it and the
//! combinatorial bound, so the gap to our own bound can be read off.
//!
//! Defaults: 2 s per instance, seed 1, 2 workers, output `bench-out/`,
//! reference `../shared/instances/reference.csv` (relative to the crate root).
//! Writes `DIR_OUT/results.csv`, `DIR_OUT/results.md` (per-instance table and
//! per-set summary) and `DIR_OUT/plans/NAME.json` (each plan, in the schema of
//! `arcwright::io::plan_json`). Every plan is re-read from its JSON and
//! verified by `arcwright::check::check_plan` and by a second local check
//! (each task served once, loads within capacity, costs recomputed) before it
//! is counted.

use std::collections::HashMap;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};
use std::time::Duration;

use arcwright::io::{read_dat_file, read_plan, write_plan, Reference};
use arcwright::{LpBudget, Solver};

/// The published values by instance name; none when the file is absent.
fn read_reference(path: &Path) -> HashMap<String, Reference> {
    match arcwright::io::read_reference(path) {
        Ok(rows) => rows.into_iter().map(|r| (r.instance.clone(), r)).collect(),
        Err(arcwright::Error::Io { .. }) => {
            eprintln!("no reference file at {}", path.display());
            HashMap::new()
        }
        Err(e) => {
            eprintln!("{e}");
            std::process::exit(2);
        }
    }
}

struct Row {
    set: String,
    name: String,
    our_lb: i64,
    pub_lb: Option<i64>,
    best_known: Option<i64>,
    cost: i64,
    gap: Option<f64>,
    ttb: Duration,
    total: Duration,
    iterations: u64,
}

const USAGE: &str = "usage: bench_sets [--time SECS] [--seed N] [--workers W] [--out DIR] [--reference FILE] [--iterations N] [--lp-secs SECS] DIR...";

fn main() {
    let root = PathBuf::from(env!("CARGO_MANIFEST_DIR"));
    let mut time = 2.0f64;
    let mut seed = 1u64;
    let mut workers = 2usize;
    let mut iterations: Option<u64> = None;
    let mut lp_secs = 5.0f64;
    let mut out = PathBuf::from("bench-out");
    let mut reference = root.join("../shared/instances/reference.csv");
    let mut dirs: Vec<PathBuf> = Vec::new();
    let mut args = std::env::args().skip(1);
    while let Some(a) = args.next() {
        let mut val = || args.next().unwrap_or_else(|| panic!("{a} needs a value"));
        match a.as_str() {
            "--time" => time = val().parse().expect("--time SECS"),
            "--seed" => seed = val().parse().expect("--seed N"),
            "--workers" => workers = val().parse().expect("--workers N"),
            "--iterations" => iterations = Some(val().parse().expect("--iterations N")),
            "--lp-secs" => lp_secs = val().parse().expect("--lp-secs SECS"),
            "--out" => out = PathBuf::from(val()),
            "--reference" => reference = PathBuf::from(val()),
            "-h" | "--help" => {
                println!("{USAGE}");
                return;
            }
            s if s.starts_with('-') => {
                eprintln!("bench_sets: unknown option {s}\n{USAGE}");
                std::process::exit(2);
            }
            _ => dirs.push(PathBuf::from(a)),
        }
    }
    if dirs.is_empty() {
        eprintln!("{USAGE}");
        std::process::exit(2);
    }
    let refs = read_reference(&reference);
    std::fs::create_dir_all(out.join("plans")).expect("create output folder");
    let mut rows: Vec<Row> = Vec::new();
    for dir in &dirs {
        let mut files: Vec<PathBuf> = if dir.is_file() {
            vec![dir.clone()]
        } else {
            std::fs::read_dir(dir)
                .unwrap_or_else(|e| panic!("{}: {e}", dir.display()))
                .filter_map(|e| e.ok().map(|e| e.path()))
                .filter(|p| p.extension().is_some_and(|x| x == "dat"))
                .collect()
        };
        // Natural order: gdb2 before gdb10.
        files.sort_by_key(|p| {
            let s = p.file_stem().unwrap().to_string_lossy().to_string();
            let digits: String = s.chars().filter(|c| c.is_ascii_digit()).collect();
            let alpha: String = s.chars().filter(|c| !c.is_ascii_digit()).collect();
            (
                alpha.chars().take(3).collect::<String>(),
                digits.parse::<u64>().unwrap_or(0),
                s,
            )
        });
        let set_name = if dir.is_file() {
            dir.parent().and_then(|p| p.file_name())
        } else {
            dir.file_name()
        }
        .map_or("set".into(), |s| s.to_string_lossy().to_string());
        for f in files {
            let dat = match read_dat_file(&f) {
                Ok(d) => d,
                Err(e) => {
                    eprintln!("skipping {}: {e}", f.display());
                    continue;
                }
            };
            let inst = &dat.instance;
            let stem = f.file_stem().unwrap().to_string_lossy().to_string();
            let r = refs.get(&stem).or_else(|| refs.get(&inst.name));
            let mut solver = Solver::new(inst)
                .seed(seed)
                .workers(workers)
                .time_limit(Duration::from_secs_f64(time));
            if let Some(n) = iterations {
                solver = solver.max_iterations(n);
            }
            if lp_secs > 0.0 {
                solver = solver.lp_bound(LpBudget::time(Duration::from_secs_f64(lp_secs)));
            }
            if let Some(r) = r {
                // Stop early only at a proven optimum (the published lower bound
                // equals the best known value): nothing better exists.
                if r.lower_bound == r.best_known {
                    solver = solver.target(r.best_known);
                }
            }
            let sol = solver.solve().unwrap_or_else(|e| panic!("{stem}: {e}"));
            let json = write_plan(inst, &sol.plan, Some(sol.lower_bound.value));
            let jpath = out.join("plans").join(format!("{stem}.json"));
            std::fs::write(&jpath, &json).expect("write plan");
            let back = read_plan(&json, &jpath.display().to_string(), inst)
                .unwrap_or_else(|e| panic!("{stem}: plan does not read back: {e}"));
            if let Err(v) = arcwright::check::check_plan(inst, &back) {
                panic!("{stem}: the checker rejects the plan: {v:?}");
            }
            verify(inst, &back);
            assert_eq!(back.cost, sol.cost, "{stem}: cost changed on read-back");
            if let Some(r) = r {
                assert!(
                    sol.cost >= r.lower_bound,
                    "{stem}: cost {} below the published lower bound {}",
                    sol.cost,
                    r.lower_bound
                );
            }
            let row = Row {
                set: r.map_or(set_name.clone(), |r| r.set.clone()),
                name: stem.clone(),
                our_lb: sol.lower_bound.value,
                pub_lb: r.map(|r| r.lower_bound),
                best_known: r.map(|r| r.best_known),
                cost: sol.cost,
                gap: r.map(|r| 100.0 * (sol.cost - r.best_known) as f64 / r.best_known as f64),
                ttb: sol.stats.time_to_best,
                total: sol.stats.elapsed,
                iterations: sol.stats.iterations,
            };
            println!(
                "{:<10} cost {:>6} best known {:>6} gap {:>6.2}% ttb {:>7.2}s total {:>6.2}s it {}",
                row.name,
                row.cost,
                row.best_known.map_or("-".into(), |b| b.to_string()),
                row.gap.unwrap_or(f64::NAN),
                row.ttb.as_secs_f64(),
                row.total.as_secs_f64(),
                row.iterations
            );
            rows.push(row);
        }
    }
    let opt = |x: Option<i64>| x.map_or(String::new(), |v| v.to_string());
    let mut csv = String::from("set,instance,our_lower_bound,published_lower_bound,best_known,our_cost,gap_to_best_known_pct,time_to_best_s,total_time_s,iterations\n");
    let mut md = format!(
        "Measured with `bench_sets --time {time} --seed {seed} --workers {workers}`.\n\n| instance | our LB | published LB | best known | our cost | gap to BK % | time to best s | total s |\n|---|---:|---:|---:|---:|---:|---:|---:|\n"
    );
    for r in &rows {
        let gap = r.gap.map_or(String::new(), |g| format!("{g:.2}"));
        writeln!(
            csv,
            "{},{},{},{},{},{},{},{:.3},{:.3},{}",
            r.set,
            r.name,
            r.our_lb,
            opt(r.pub_lb),
            opt(r.best_known),
            r.cost,
            gap,
            r.ttb.as_secs_f64(),
            r.total.as_secs_f64(),
            r.iterations
        )
        .unwrap();
        writeln!(
            md,
            "| {} | {} | {} | {} | {} | {} | {:.2} | {:.2} |",
            r.name,
            r.our_lb,
            opt(r.pub_lb),
            opt(r.best_known),
            r.cost,
            gap,
            r.ttb.as_secs_f64(),
            r.total.as_secs_f64()
        )
        .unwrap();
    }
    md.push_str("\n| set | instances | average gap % | worst gap % | best known reached | gap to our own bound, average % |\n|---|---:|---:|---:|---:|---:|\n");
    let mut sets: Vec<String> = rows.iter().map(|r| r.set.clone()).collect();
    sets.dedup();
    for s in sets {
        let g: Vec<&Row> = rows.iter().filter(|r| r.set == s).collect();
        let gaps: Vec<f64> = g.iter().filter_map(|r| r.gap).collect();
        let avg = gaps.iter().sum::<f64>() / gaps.len().max(1) as f64;
        let worst = gaps.iter().cloned().fold(0.0, f64::max);
        let reached = g
            .iter()
            .filter(|r| r.best_known.is_some_and(|b| r.cost <= b))
            .count();
        let own: f64 = g
            .iter()
            .map(|r| 100.0 * (r.cost - r.our_lb) as f64 / r.our_lb.max(1) as f64)
            .sum::<f64>()
            / g.len().max(1) as f64;
        let line = format!(
            "| {s} | {} | {avg:.3} | {worst:.2} | {reached}/{} | {own:.2} |",
            g.len(),
            g.len()
        );
        println!("{line}");
        md.push_str(&line);
        md.push('\n');
    }
    std::fs::write(out.join("results.csv"), csv).expect("write csv");
    std::fs::write(out.join("results.md"), md).expect("write md");
}

/// Independent re-verification from the instance alone: every task once,
/// loads within capacity, stated loads correct.
fn verify(inst: &arcwright::model::Instance, plan: &arcwright::plan::Plan) {
    let mut seen = vec![0u32; inst.tasks().len()];
    for r in &plan.routes {
        let load: i64 = r.visits.iter().map(|v| inst.tasks()[v.task].demand).sum();
        assert_eq!(load, r.load);
        assert!(
            load <= inst.fleet().capacity,
            "{}: overloaded route",
            inst.name
        );
        for v in &r.visits {
            seen[v.task] += 1;
            assert!(inst.tasks()[v.task].allows(v.dir));
        }
    }
    assert!(
        seen.iter().all(|&c| c == 1),
        "{}: a task not served exactly once",
        inst.name
    );
    assert_eq!(plan.cost, plan.routes.iter().map(|r| r.cost).sum::<i64>());
}
