//! Runs every lower bound on the public instances in `../shared/instances`
//! and prints, per set and per bound, the average ratio bound / best known
//! (from `reference.csv`), how often the bound equals the best known value,
//! and the time of the slowest bound on the largest egl instance.
//!
//! ```text
//! cargo run --release --example bound_report
//! ```

#[path = "../tests/common/mod.rs"]
mod common;

use std::collections::BTreeMap;
use std::time::{Duration, Instant};

use arcwright::bounds::{all_bounds, bound};
use arcwright::io::dat::read_dat_file;
use arcwright::io::read_reference;
use arcwright::paths::Distances;
use arcwright::postman::rural::{rural_lower_bound, rural_tour};

/// Time taken by each bound, by name.
type Timings = Vec<(&'static str, Duration)>;

fn main() {
    let Some(root) = common::shared_dir("bound_report") else {
        return;
    };
    let refs = read_reference(root.join("reference.csv")).unwrap_or_else(|e| panic!("{e}"));
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
