//! Runs every lower bound on the public instances in `../shared/instances`
//! and prints, per set and per bound, the average ratio bound / best known
//! (from `reference.csv`), how often the bound equals the best known value,
//! and the time of the slowest bound on the largest egl instance; then the
//! cutting-plane LP bound ([`arcwright::bounds::lp`]) per set: ratio to the
//! best known value, instances equal to it (and to the published lower
//! bound), time per instance.
//!
//! ```text
//! cargo run --release --example bound_report                  # everything
//! cargo run --release --example bound_report -- --lp-only --secs 10 --set egl
//! ```
//!
//! `--scenario FILE` runs only the LP bound on one JSON scenario (e.g. a
//! town made by `make_town`) and prints each improvement.
//! `--secs S` is the LP bound's time budget per instance (default 10),
//! `--set NAME` limits the LP part to one set, `--lp-only` skips the
//! combinatorial bounds, `--verbose` prints one line per instance.

use std::collections::BTreeMap;
use std::path::Path;
use std::time::{Duration, Instant};

use arcwright::bounds::{all_bounds, bound};
use arcwright::io::dat::read_dat_file;
use arcwright::io::read_reference;
use arcwright::paths::Distances;
use arcwright::postman::rural::{rural_lower_bound, rural_tour};

/// Time taken by each bound, by name.
type Timings = Vec<(&'static str, Duration)>;

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let flag = |f: &str| args.iter().any(|a| a == f);
    let value = |f: &str| {
        args.iter()
            .position(|a| a == f)
            .and_then(|i| args.get(i + 1).cloned())
    };
    let secs: f64 = value("--secs").map_or(10.0, |v| v.parse().expect("--secs S"));
    let only_set = value("--set");
    if let Some(file) = value("--scenario") {
        scenario_report(&file, secs);
        return;
    }
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("../shared/instances");
    if !flag("--lp-only") {
        combinatorial(&root);
    }
    lp_report(&root, secs, only_set.as_deref(), flag("--verbose"));
}

/// The LP bound on one scenario, printing every improvement.
fn scenario_report(file: &str, secs: f64) {
    use arcwright::bounds::lp::LpBound;
    let inst = arcwright::io::scenario::read_scenario_file(file).expect("readable scenario");
    println!(
        "{file}: {} junctions, {} links, {} tasks; service cost {}",
        inst.network().len(),
        inst.network().links.len(),
        inst.tasks().len(),
        inst.total_service_cost()
    );
    let dist = Distances::new(&inst).expect("distances");
    let t = Instant::now();
    let comb = bound(&inst, &dist);
    println!(
        "best combinatorial bound {} ({}) in {:.2} s",
        comb.value,
        comb.by,
        t.elapsed().as_secs_f64()
    );
    let res = LpBound::new(&inst)
        .expect("the LP bound applies")
        .time_limit(Duration::from_secs_f64(secs))
        .on_progress(|p| {
            println!(
                "  {:>8.2} s  round {:>3}  cuts {:>6}  bound {}",
                p.elapsed.as_secs_f64(),
                p.round,
                p.cuts,
                p.bound
            )
        })
        .run();
    println!(
        "LP bound {} (lp value {:.2}) after {} rounds, {} cuts, {:.2} s{}",
        res.bound,
        res.lp_value,
        res.rounds,
        res.cuts,
        res.elapsed.as_secs_f64(),
        if res.finished { "" } else { " (not finished)" }
    );
}

/// The LP bound on every instance (of `only_set`), `secs` seconds each.
fn lp_report(root: &Path, secs: f64, only_set: Option<&str>, verbose: bool) {
    use arcwright::bounds::lp::LpBound;
    let Ok(refs) = read_reference(root.join("reference.csv")) else {
        println!("skipped: {} not found", root.display());
        return;
    };
    // set -> (sum of ratios, count, equal to best known, equal to published
    // lower bound, finished, total seconds, slowest seconds)
    type Row = (f64, usize, usize, usize, usize, f64, f64);
    let mut stats: BTreeMap<String, Row> = BTreeMap::new();
    for r in refs.iter().filter(|r| only_set.is_none_or(|s| s == r.set)) {
        let dat = read_dat_file(root.join(&r.file)).expect("readable instance");
        let lp = LpBound::new(&dat.instance)
            .expect("the LP bound applies")
            .time_limit(Duration::from_secs_f64(secs));
        let res = lp.run();
        assert!(
            res.bound <= r.best_known,
            "{}: LP bound {} > best known {}",
            r.instance,
            res.bound,
            r.best_known
        );
        let t = res.elapsed.as_secs_f64();
        if verbose {
            println!(
                "{:<5} {:<10} lp {:>7} (lp value {:>10.2}) best {:>7} lb {:>7} ratio {:.4} rounds {:>3} cuts {:>5} {:>7.2} s{}",
                r.set,
                r.instance,
                res.bound,
                res.lp_value,
                r.best_known,
                r.lower_bound,
                res.bound as f64 / r.best_known as f64,
                res.rounds,
                res.cuts,
                t,
                if res.finished { "" } else { " (not finished)" }
            );
        }
        let e = stats.entry(r.set.clone()).or_default();
        e.0 += res.bound as f64 / r.best_known as f64;
        e.1 += 1;
        e.2 += usize::from(res.bound == r.best_known);
        e.3 += usize::from(res.bound >= r.lower_bound);
        e.4 += usize::from(res.finished);
        e.5 += t;
        e.6 = e.6.max(t);
    }
    println!("\nLP bound (one-index formulation with cuts), budget {secs} s per instance");
    println!(
        "{:<5} {:>8} {:>8} {:>8} {:>9} {:>9} {:>9} {:>5}",
        "set", "lp/best", "= best", ">= lb", "finished", "mean s", "max s", "of"
    );
    for (set, (sum, n, eq, lb, fin, tsum, tmax)) in &stats {
        println!(
            "{:<5} {:>8.4} {:>8} {:>8} {:>9} {:>9.2} {:>9.2} {:>5}",
            set,
            sum / *n as f64,
            eq,
            lb,
            fin,
            tsum / *n as f64,
            tmax,
            n
        );
    }
}

/// The combinatorial bounds of `arcwright::bounds::all_bounds`.
fn combinatorial(root: &Path) {
    let refs = match read_reference(root.join("reference.csv")) {
        Ok(refs) => refs,
        Err(arcwright::Error::Io { .. }) => {
            println!("skipped: {} not found", root.display());
            return;
        }
        Err(e) => panic!("{e}"),
    };
    // (set, bound) -> (sum of ratios, count, equal to best known)
    let mut stats: BTreeMap<(String, &'static str), (f64, usize, usize)> = BTreeMap::new();
    // set -> (sum of tour / bound, count, equal)
    let mut rural: BTreeMap<String, (f64, usize, usize)> = BTreeMap::new();
    let mut largest: Option<(usize, String, Timings)> = None;
    for r in &refs {
        let (set, name, file, best) = (&r.set, &r.instance, &r.file, r.best_known);
        let dat = read_dat_file(root.join(file)).expect("readable instance");
        let inst = dat.instance;
        let dist = Distances::new(&inst).expect("distances");
        let all = all_bounds(&inst, &dist);
        let tour = rural_tour(&inst).expect("rural tour");
        let lb = rural_lower_bound(&inst).expect("rural bound");
        let e = rural.entry(set.to_string()).or_default();
        e.0 += tour.cost as f64 / lb as f64;
        e.1 += 1;
        e.2 += usize::from(tour.cost == lb);
        let best_of = bound(&inst, &dist);
        for b in all
            .iter()
            .chain(std::iter::once(&arcwright::bounds::LowerBound {
                value: best_of.value,
                by: "best of all (bound())",
            }))
        {
            assert!(
                b.value <= best,
                "{name}: {} = {} > best known {best}",
                b.by,
                b.value
            );
            let e = stats.entry((set.to_string(), b.by)).or_default();
            e.0 += b.value as f64 / best as f64;
            e.1 += 1;
            e.2 += usize::from(b.value == best);
        }
        if set == "egl" {
            let size = (inst.network().links.len() * 1000 + inst.tasks().len()) * 1000
                + arcwright::bounds::min_vehicles(&inst);
            if largest.as_ref().is_none_or(|l| size > l.0) {
                // Time each bound on its own (median of 5 runs).
                let times = time_each(&inst, &dist);
                largest = Some((size, name.to_string(), times));
            }
        }
    }
    println!(
        "{:<5} {:<24} {:>8} {:>10} {:>6}",
        "set", "bound", "ratio", "= best", "of"
    );
    for ((set, by), (sum, n, eq)) in &stats {
        println!(
            "{:<5} {:<24} {:>8.4} {:>10} {:>6}",
            set,
            by,
            sum / *n as f64,
            eq,
            n
        );
    }
    println!("\nrural postman tour (one truck) / rural lower bound");
    for (set, (sum, n, eq)) in &rural {
        println!(
            "{:<5} {:>8.4}  tour = bound on {} of {}",
            set,
            sum / *n as f64,
            eq,
            n
        );
    }
    if let Some((_, name, times)) = largest {
        println!("\nlargest egl instance: {name}");
        for (by, t) in &times {
            println!("  {:<24} {:>10.3} ms", by, t.as_secs_f64() * 1e3);
        }
        let slow = times
            .iter()
            .filter(|x| x.0 != "all_bounds")
            .max_by_key(|x| x.1)
            .unwrap();
        println!("  slowest: {} {:.3} ms", slow.0, slow.1.as_secs_f64() * 1e3);
    }
}

/// Median of 5 runs of `f`.
fn median_time(mut f: impl FnMut()) -> Duration {
    let mut v: Vec<Duration> = (0..5)
        .map(|_| {
            let t = Instant::now();
            f();
            t.elapsed()
        })
        .collect();
    v.sort();
    v[2]
}

fn time_each(inst: &arcwright::model::Instance, dist: &Distances) -> Timings {
    use arcwright::bounds::*;
    use arcwright::postman::DenseBlossom;
    vec![
        (
            ODD_MATCHING,
            median_time(|| {
                let _ = odd_matching_bound(inst, &DenseBlossom);
            }),
        ),
        (
            CONNECTION,
            median_time(|| {
                connection_bound(inst);
            }),
        ),
        (
            IMBALANCE_FLOW,
            median_time(|| {
                let _ = imbalance_flow_bound(inst, dist);
            }),
        ),
        (
            DEPOT_DEGREE,
            median_time(|| {
                let _ = depot_degree_bound(inst, &DenseBlossom);
            }),
        ),
        (
            DEPOT_CUTS,
            median_time(|| {
                depot_cut_bound(inst);
            }),
        ),
        (
            BLENDED,
            median_time(|| {
                let _ = blended_bound(inst, &DenseBlossom);
            }),
        ),
        (
            "all_bounds",
            median_time(|| {
                all_bounds(inst, dist);
            }),
        ),
    ]
}
