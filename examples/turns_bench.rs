//! What turn rules cost: each instance planned with free turns and with
//! truck rules (U-turns only at dead ends, left turns penalised), with the
//! same seed, workers and iteration limit; prints a Markdown table.
//!
//! ```text
//! cargo run --release --example turns_bench -- [--iterations N] [--workers W] [--seed S]
//!     [--left P] [--u-turn P] [--sets egl,demo,helsinki] [--only NAME]
//! ```
//!
//! Defaults: 2,000 iterations, 1 worker, seed 1, left-turn penalty 30 and
//! U-turn penalty 60 (cost units: metres on the demo town and the map), all
//! three sets. Sets:
//!
//! - `egl`: the 24 files of `../shared/instances/egl` (no coordinates, so
//!   only U-turns can be recognised: the left-turn penalty does not apply);
//! - `demo`: `instances/demo-town.json`;
//! - `helsinki`: `../shared/osm/helsinki.osm.pbf` with the built-in refuse
//!   profile, free turns against the same profile with `[turn_rules]` (the
//!   map's own turn restrictions obeyed). Streets the rules cut off from the
//!   yard are not served in the second run; the table says how many.
//!
//! Columns: the plan's cost with free turns and with the rules (turn
//! penalties included, and their part), the increase, the wall time of
//! each solve (distances included) and the overhead, and per plan the
//! U-turns (how many at dead ends) and left turns its walks make. The free
//! plan's turns are counted along its walk ([`arcwright::plan::walk`]) by
//! the angle of each turn ([`arcwright::turns::turn_kind`]). Every plan
//! passes the independent checker (walks and turns included).

use std::path::{Path, PathBuf};
use std::time::Instant;

use arcwright::check::{check_plan, check_turn_walks};
use arcwright::io::{read_dat_file, read_scenario_file};
use arcwright::map::{load_map, MapOptions, Profile};
use arcwright::model::Instance;
use arcwright::paths::Distances;
use arcwright::plan::{walk, Plan};
use arcwright::report::directions::{dead_ends, turn_counts, TurnCounts};
use arcwright::turns::{
    turn_kind, walks_with_turns, Turn, TurnPenalties, TurnRules, TurnTable, TurnWalk,
};
use arcwright::Solver;

struct Opts {
    iterations: u64,
    workers: usize,
    seed: u64,
    left: i64,
    u_turn: i64,
    sets: Vec<String>,
    only: Option<String>,
}

fn opts() -> Opts {
    let mut o = Opts {
        iterations: 2000,
        workers: 1,
        seed: 1,
        left: 30,
        u_turn: 60,
        sets: vec!["egl".into(), "demo".into(), "helsinki".into()],
        only: None,
    };
    let args: Vec<String> = std::env::args().skip(1).collect();
    let mut i = 0;
    while i < args.len() {
        let v = args.get(i + 1).cloned().unwrap_or_default();
        let num = |what: &str| -> u64 {
            v.parse()
                .unwrap_or_else(|_| panic!("{what} needs a number, got `{v}`"))
        };
        match args[i].as_str() {
            "--iterations" => o.iterations = num("--iterations"),
            "--workers" => o.workers = num("--workers") as usize,
            "--seed" => o.seed = num("--seed"),
            "--left" => o.left = num("--left") as i64,
            "--u-turn" => o.u_turn = num("--u-turn") as i64,
            "--sets" => o.sets = v.split(',').map(String::from).collect(),
            "--only" => o.only = Some(v.clone()),
            other => panic!("unknown option {other} (see the example's documentation)"),
        }
        i += 2;
    }
    o
}

/// One solve: the plan, its wall time, and the walks as driven.
struct Run {
    plan: Plan,
    secs: f64,
    counts: TurnCounts,
    turn_cost: i64,
}

fn solve(inst: &Instance, o: &Opts) -> Run {
    let t = Instant::now();
    let sol = Solver::new(inst)
        .seed(o.seed)
        .workers(o.workers)
        .max_iterations(o.iterations)
        .solve()
        .expect("a plan");
    let secs = t.elapsed().as_secs_f64();
    check_plan(inst, &sol.plan).expect("the checker accepts the plan");
    let ends = dead_ends(inst);
    let walks: Vec<TurnWalk> = match inst.turn_rules() {
        Some(rules) => {
            let table = TurnTable::new(inst, rules).expect("valid rules");
            let w = walks_with_turns(inst, &table, &sol.plan).expect("walks");
            check_turn_walks(inst, &sol.plan, &w).expect("the checker accepts the walks");
            w
        }
        None => {
            let dist = Distances::new(inst).expect("distances");
            sol.plan
                .routes
                .iter()
                .map(|r| free_walk(inst, &dist, &r.visits))
                .collect()
        }
    };
    let mut counts = TurnCounts::default();
    for w in &walks {
        counts.add(&turn_counts(w, &ends));
    }
    Run {
        turn_cost: walks.iter().map(TurnWalk::turn_cost).sum(),
        plan: sol.plan,
        secs,
        counts,
    }
}

/// The free plan's walk with each turn classified by its angle (no cost).
fn free_walk(inst: &Instance, dist: &Distances, visits: &[arcwright::plan::Visit]) -> TurnWalk {
    let steps = walk(inst, dist, visits);
    let turns = steps
        .windows(2)
        .map(|p| Turn {
            kind: turn_kind(
                inst.network(),
                inst.coordinates(),
                p[0].link,
                p[0].to,
                p[1].link,
            ),
            cost: 0,
        })
        .collect();
    TurnWalk { steps, turns }
}

fn rules(o: &Opts) -> TurnRules {
    TurnRules::trucks(TurnPenalties {
        left: o.left,
        u_turn: o.u_turn,
        ..TurnPenalties::default()
    })
}

fn u_text(c: &TurnCounts) -> String {
    format!("{} ({} at dead ends)", c.u_turns, c.u_turns_at_dead_ends)
}

fn row(name: &str, free: &Run, turned: &Run, note: &str) {
    let inc = 100.0 * (turned.plan.cost - free.plan.cost) as f64 / free.plan.cost as f64;
    let over = 100.0 * (turned.secs - free.secs) / free.secs;
    let left = |c: &TurnCounts| {
        if c.unknown > 0 && c.left == 0 && c.right == 0 {
            "n/a".to_string()
        } else {
            c.left.to_string()
        }
    };
    println!(
        "| {name} | {} | {} | {} | {inc:+.2}% | {:.1} | {:.1} | {over:+.0}% | {} | {} | {} | {} |{note}",
        free.plan.cost,
        turned.plan.cost,
        turned.turn_cost,
        free.secs,
        turned.secs,
        u_text(&free.counts),
        u_text(&turned.counts),
        left(&free.counts),
        left(&turned.counts),
    );
}

fn pair(name: &str, inst: Instance, o: &Opts) -> (f64, f64) {
    let free = solve(&inst, o);
    let turned_inst = inst.with_turn_rules(Some(rules(o))).expect("usable rules");
    let turned = solve(&turned_inst, o);
    row(name, &free, &turned, "");
    (
        (turned.plan.cost - free.plan.cost) as f64 / free.plan.cost as f64,
        (turned.secs - free.secs) / free.secs,
    )
}

fn main() {
    let o = opts();
    let root = PathBuf::from(env!("CARGO_MANIFEST_DIR"));
    println!(
        "{} iterations, {} worker(s), seed {}; rules: U-turns only at dead ends (penalty {}), left turns {}\n",
        o.iterations, o.workers, o.seed, o.u_turn, o.left
    );
    println!("| instance | cost, free turns | cost, truck rules | of which turns | increase | s, free | s, rules | time overhead | U-turns, free | U-turns, rules | left turns, free | left turns, rules |");
    println!("|---|---:|---:|---:|---:|---:|---:|---:|---|---|---:|---:|");
    let wanted = |n: &str| o.only.as_deref().is_none_or(|x| n.contains(x));
    if o.sets.iter().any(|s| s == "egl") {
        egl(&root, &o, &wanted);
    }
    if o.sets.iter().any(|s| s == "demo") && wanted("demo") {
        let inst = read_scenario_file(root.join("instances/demo-town.json")).expect("demo town");
        pair("demo town", inst, &o);
    }
    if o.sets.iter().any(|s| s == "helsinki") && wanted("helsinki") {
        helsinki(&root, &o);
    }
}

fn egl(root: &Path, o: &Opts, wanted: &dyn Fn(&str) -> bool) {
    let dir = root.join("../shared/instances/egl");
    let Ok(entries) = std::fs::read_dir(&dir) else {
        eprintln!("SKIPPED egl: {} not found", dir.display());
        return;
    };
    let mut files: Vec<PathBuf> = entries.filter_map(|e| Some(e.ok()?.path())).collect();
    files.sort();
    let (mut inc, mut over, mut n) = (0.0, 0.0, 0);
    for f in files {
        let name = f.file_stem().unwrap().to_string_lossy().into_owned();
        if !wanted(&name) {
            continue;
        }
        let inst = read_dat_file(&f).expect("egl file").instance;
        let (i, t) = pair(&name, inst, o);
        inc += i;
        over += t;
        n += 1;
    }
    if n > 0 {
        println!(
            "| egl average ({n}) | | | | {:+.2}% | | | {:+.0}% | | | | |",
            100.0 * inc / n as f64,
            100.0 * over / n as f64
        );
    }
}

fn helsinki(root: &Path, o: &Opts) {
    let pbf = root.join("../shared/osm/helsinki.osm.pbf");
    if !pbf.exists() {
        eprintln!("SKIPPED helsinki: {} not found", pbf.display());
        return;
    }
    let free = load_map(&pbf, &MapOptions::default()).expect("map");
    let mut profile = Profile::refuse();
    profile.turn_rules = Some(rules(o));
    let options = MapOptions {
        profile,
        ..MapOptions::default()
    };
    let turned = load_map(&pbf, &options).expect("map with turn rules");
    let a = solve(&free.instance, o);
    let b = solve(&turned.instance, o);
    let note = format!(
        "\n\nHelsinki: {} passes to serve free, {} with the rules ({} streets cut off by the rules and the map's {} restrictions).",
        free.instance.tasks().len(),
        turned.instance.tasks().len(),
        turned.report.cut_off_by_turns.len(),
        turned.report.restrictions
    );
    row("helsinki (refuse)", &a, &b, &note);
}
