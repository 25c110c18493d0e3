//! The fleet checker rejects what breaks the rules of dump sites, yards and
//! truck types, each with its own violation. The instance is small enough to
//! compute every number by hand (in the comments).

use arcwright::check::fleet::{check_fleet_plan, FleetViolation};
use arcwright::fleet::{FleetPlan, FleetRoute, Tables, Tip};
use arcwright::model::{
    Dir, DumpSite, Fleet, Hours, Instance, Network, Operations, TruckType, Yard,
};
use arcwright::plan::Visit;

/// A path 0 - 1 - 2 - 3 of required streets (cost 4 each, demand 3 each),
/// a landfill at junction 4 reached from 3 (cost 10), yard at 0 and a
/// second yard at 3. Types: `small` (capacity 5, one truck, yard 0, factor
/// 1000, fixed 10) and `big` (capacity 9, yard 1 = junction 3, may not
/// serve street 0).
fn instance() -> Instance {
    let mut net = Network::with_junctions(5);
    net.add_required_edge(0, 1, 4, 3);
    net.add_required_edge(1, 2, 4, 3);
    net.add_required_edge(2, 3, 4, 3);
    net.add_edge(3, 4, 10);
    let inst = Instance::new("path", net, Fleet::with_capacity(9), 0).unwrap();
    let ty = |name: &str, capacity, count, yard| TruckType {
        name: name.into(),
        count,
        capacity,
        shift_limit: Some(100),
        yard,
        fixed_cost: 10,
        cost_per_mille: 1000,
        no_entry: vec![],
        no_service: vec![],
        no_entry_classes: vec![],
        no_service_classes: vec![],
    };
    let mut big = ty("big", 9, None, 1);
    big.no_service = vec![0];
    let ops = Operations {
        dump_sites: vec![DumpSite {
            name: Some("landfill".into()),
            junction: 4,
            unload_time: 5,
            unload_cost: 3,
            hours: Some(Hours {
                opens: 30,
                closes: 60,
            }),
        }],
        return_empty: true,
        yards: vec![
            Yard {
                name: "west".into(),
                junction: 0,
            },
            Yard {
                name: "east".into(),
                junction: 3,
            },
        ],
        truck_types: vec![ty("small", 5, Some(1), 0), big],
        balance: Default::default(),
    };
    inst.with_operations(ops).unwrap()
}

fn fw(t: usize) -> Visit {
    Visit::new(t, Dir::Forward)
}

#[test]
fn a_good_plan_and_its_numbers() {
    let inst = instance();
    let tables = Tables::new(&inst).unwrap();
    // small: 0->1 (4), 1->2 (4): load 6 > 5, so tip after the first street:
    // serve 0->1 (t=4), drive 1->4 (4+4+10=18, arrive 22, wait to 30,
    // unload to 35), back 4->1 (18, t=53) serve 1->2 (t=57), 2->4 (14, t=71
    // > closes 60): infeasible. So small serves street 0 alone and tips:
    // 4 + 18 (to the landfill, arrive 22, wait, done 35) + 22 home (t=57).
    // Cost 10 + 44 + 3 = 57.
    let small = FleetRoute::new(
        &inst,
        &tables,
        0,
        vec![fw(0)],
        vec![Tip { after: 1, site: 0 }],
    )
    .unwrap();
    assert_eq!((small.cost, small.time, small.driven), (57, 57, 44));
    // big from junction 3: 3->1 (8) serve 1->2, 2->3 (8, t=16, load 6),
    // 3->4 (10, arrive 26, wait to 30, done 35), home 4->3 (10, t=45).
    // Cost 10 + 36 + 3 = 49.
    let big = FleetRoute::new(
        &inst,
        &tables,
        1,
        vec![fw(1), fw(2)],
        vec![Tip { after: 2, site: 0 }],
    )
    .unwrap();
    assert_eq!((big.cost, big.time, big.driven), (49, 45, 36));
    let plan = FleetPlan::new(vec![small, big]);
    assert_eq!(plan.cost, 106);
    assert!(check_fleet_plan(&inst, &plan).is_ok());
}

#[test]
fn each_broken_rule_is_reported() {
    let inst = instance();
    let tables = Tables::new(&inst).unwrap();
    let route = |k, visits, tips| FleetRoute::new(&inst, &tables, k, visits, tips).unwrap();
    let tip = |after| Tip { after, site: 0 };
    let has = |plan: &FleetPlan, want: &dyn Fn(&FleetViolation) -> bool| {
        let v = check_fleet_plan(&inst, plan).unwrap_err();
        assert!(v.iter().any(want), "{v:?}");
    };
    // Overloaded trip (6 > 5) of the small truck, and street 2 not served.
    let p = FleetPlan::new(vec![route(0, vec![fw(0), fw(1)], vec![tip(2)])]);
    has(&p, &|v| {
        matches!(
            v,
            FleetViolation::Overloaded {
                trip: 0,
                load: 6,
                capacity: 5,
                ..
            }
        )
    });
    has(&p, &|v| {
        matches!(
            v,
            FleetViolation::ServedTimes {
                street: 2,
                times: 0
            }
        )
    });
    // Returning loaded.
    let p = FleetPlan::new(vec![
        route(0, vec![fw(0)], vec![]),
        route(1, vec![fw(1), fw(2)], vec![tip(2)]),
    ]);
    has(&p, &|v| {
        matches!(v, FleetViolation::ReturnsLoaded { route: 0, load: 3 })
    });
    // The big truck may not serve street 0.
    // (FleetRoute::new refuses it, so the visit is added by hand.)
    let mut r = route(1, vec![fw(1), fw(2)], vec![tip(2)]);
    r.visits.insert(0, fw(0));
    r.tips[0].after = 3;
    let p = FleetPlan::new(vec![r]);
    has(&p, &|v| {
        matches!(v, FleetViolation::TypeMayNotServe { street: 0, .. })
    });
    // Two small trucks, but only one exists.
    let p = FleetPlan::new(vec![
        route(0, vec![fw(0)], vec![tip(1)]),
        route(0, vec![fw(1)], vec![tip(1)]),
        route(1, vec![fw(2)], vec![tip(1)]),
    ]);
    has(&p, &|v| {
        matches!(
            v,
            FleetViolation::TooManyTrucks {
                used: 2,
                count: 1,
                ..
            }
        )
    });
    // Arriving after closing time (see above: 71 > 60), over the shift too.
    // (FleetRoute::new refuses it, so the second street and tip are added by hand.)
    let mut r = route(0, vec![fw(0)], vec![tip(1)]);
    r.visits.push(fw(1));
    r.tips.push(tip(2));
    let p = FleetPlan::new(vec![r, route(1, vec![fw(2)], vec![tip(1)])]);
    has(&p, &|v| {
        matches!(
            v,
            FleetViolation::SiteClosed {
                tip: 1,
                arrival: 71,
                closes: 60,
                ..
            }
        )
    });
    // Stated numbers that differ, a wrong yard, a tip at the start.
    let mut r = route(0, vec![fw(0)], vec![tip(1)]);
    r.cost -= 1;
    r.yard = 1;
    r.tips.insert(0, tip(0));
    let p = FleetPlan::new(vec![r, route(1, vec![fw(1), fw(2)], vec![tip(2)])]);
    has(&p, &|v| {
        matches!(v, FleetViolation::Mismatch { what: "cost", .. })
    });
    has(&p, &|v| {
        matches!(
            v,
            FleetViolation::WrongYard {
                yard: 1,
                home: 0,
                ..
            }
        )
    });
    has(&p, &|v| matches!(v, FleetViolation::BadTip { tip: 0, .. }));
    let mut p = FleetPlan::new(vec![
        route(0, vec![fw(0)], vec![tip(1)]),
        route(1, vec![fw(1), fw(2)], vec![tip(2)]),
    ]);
    p.cost += 5;
    has(&p, &|v| matches!(v, FleetViolation::WrongTotal { .. }));
    assert!(p.routes.iter().all(|r| r.feasible(&tables)));
}
