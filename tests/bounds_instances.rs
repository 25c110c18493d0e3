//! Lower bounds and rural postman tours on the 81 public instances in
//! ../shared/instances (gdb, val, egl): every bound is at most the best known
//! value of `reference.csv` (CARPData.jl compilation, R. Martinelli 2021, of
//! Belenguer & Benavent 2003, Bode & Irnich 2012, Bartolini, Cordeau &
//! Laporte 2013 and the heuristic literature), and every rural postman tour
//! is a walk accepted by the independent checker, costing at least the
//! rural lower bound.

mod common;

use arcwright::bounds::{all_bounds, bound};
use arcwright::check::check_walks;
use arcwright::io::{read_dat_file, read_reference};
use arcwright::model::Fleet;
use arcwright::paths::Distances;
use arcwright::plan::walk_cost;
use arcwright::postman::rural::{rural_lower_bound, rural_tour};

#[test]
fn every_bound_is_at_most_best_known_and_rural_tours_check() {
    let Some(root) = common::shared_dir("bounds_instances") else {
        return;
    };
    let refs = read_reference(root.join("reference.csv")).unwrap();
    let mut count = 0;
    for r in &refs {
        let (name, file, best) = (&r.instance, &r.file, r.best_known);
        let inst = read_dat_file(root.join(file)).unwrap().instance;
        let dist = Distances::new(&inst).unwrap();
        let all = all_bounds(&inst, &dist);
        assert!(all.len() >= 5, "{name}: a bound is missing: {all:?}");
        for b in &all {
            assert!(
                b.value <= best,
                "{name}: {} = {} > best known {best}",
                b.by,
                b.value
            );
        }
        let top = bound(&inst, &dist);
        assert_eq!(top.value, all.iter().map(|b| b.value).max().unwrap());
        assert!(top.value >= inst.total_service_cost());

        let tour = rural_tour(&inst).unwrap();
        let one_truck = inst
            .with_fleet(Fleet::with_capacity(inst.total_demand().max(1)))
            .unwrap();
        check_walks(&one_truck, std::slice::from_ref(&tour.steps))
            .unwrap_or_else(|v| panic!("{name}: rural tour rejected: {v:?}"));
        assert_eq!(walk_cost(&inst, &tour.steps), tour.cost, "{name}");
        let lb = rural_lower_bound(&inst).unwrap();
        assert!(
            lb <= tour.cost,
            "{name}: rural bound {lb} > tour {}",
            tour.cost
        );
        if inst.tasks().len() == inst.network().links.len() {
            // All links required (gdb, val): the tour is a Chinese postman
            // tour and the bound is its exact value.
            assert_eq!(lb, tour.cost, "{name}");
        }
        count += 1;
    }
    assert_eq!(count, 81);
}
