//! The JSON scenario format: a hand-written file reads as written, and
//! read -> write -> read gives an equal instance, for that file and for every
//! public benchmark instance in ../shared/instances.

use std::path::Path;

use arcwright::io::{read_dat_file, read_scenario, read_scenario_file, write_scenario};
use arcwright::model::{Dir, ServeDirection};

#[test]
fn tiny_scenario_reads_as_written() {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/tiny.json");
    let inst = read_scenario_file(&path).unwrap();
    assert_eq!(inst.name, "tiny town");
    let net = inst.network();
    assert_eq!(
        net.junctions.iter().map(|j| j.id).collect::<Vec<_>>(),
        [101, 102, 103, 104]
    );
    assert_eq!(net.junctions[2].y, Some(-80.25));
    assert_eq!(net.junctions[3].x, None);
    assert_eq!(net.links.len(), 5);
    let l1 = &net.links[1];
    assert_eq!(
        (l1.from, l1.to, l1.oneway, l1.cost, l1.time),
        (1, 2, true, 4, Some(5))
    );
    assert_eq!(net.links[0].name.as_deref(), Some("Mill Lane"));
    let s0 = net.links[0].service.as_ref().unwrap();
    assert_eq!((s0.demand, s0.cost, s0.time), (2, 4, Some(6)));
    assert_eq!(s0.direction, ServeDirection::Either);
    assert!(net.links[4].service.is_none());
    assert_eq!(inst.depot(), 0);
    assert_eq!(inst.fleet().capacity, 10);
    assert_eq!(inst.fleet().shift_limit, Some(480));
    assert_eq!(inst.fleet().max_vehicles, Some(2));
    // Four tasks: only Mill Lane may be served both ways; the two sides of
    // Station Road are separate forward-only tasks.
    let t = inst.tasks();
    assert_eq!(t.len(), 4);
    assert_eq!(
        t.iter().map(|t| t.either).collect::<Vec<_>>(),
        [true, false, false, false]
    );
    assert_eq!(t[0].time, 6);
    assert_eq!(t[1].time, 4, "service time defaults to service cost");
    assert_eq!(t[2].ends(Dir::Forward), (2, 0));
    assert_eq!(t[3].ends(Dir::Forward), (0, 2));

    let text = write_scenario(&inst);
    let again = read_scenario(&text, "written.json").unwrap();
    assert_eq!(again, inst);
    assert_eq!(write_scenario(&again), text, "writing is deterministic");
    // A leading byte-order mark is accepted.
    let bom = format!("\u{feff}{text}");
    assert_eq!(read_scenario(&bom, "bom.json").unwrap(), inst);
}

#[test]
fn public_instances_round_trip() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("../shared/instances");
    if !root.is_dir() {
        println!("SKIPPED: {} is absent", root.display());
        return;
    }
    let mut n = 0;
    for set in ["gdb", "val", "egl"] {
        let mut files: Vec<_> = std::fs::read_dir(root.join(set))
            .unwrap()
            .map(|e| e.unwrap().path())
            .filter(|p| p.extension().is_some_and(|x| x == "dat"))
            .collect();
        files.sort();
        for f in files {
            let inst = read_dat_file(&f).unwrap().instance;
            let text = write_scenario(&inst);
            let again = read_scenario(&text, &f.display().to_string()).unwrap();
            assert_eq!(again, inst, "{}", f.display());
            n += 1;
        }
    }
    println!("{n} instances written and read back equal");
    assert_eq!(n, 81);
}

mod random {
    use arcwright::io::{read_scenario, write_scenario};
    use arcwright::model::{
        Fleet, Instance, Junction, Link, Network, ServeDirection, ServiceSpec, TurnRestriction,
    };
    use proptest::prelude::*;

    fn opt<T: std::fmt::Debug + Clone>(
        s: impl Strategy<Value = T>,
    ) -> impl Strategy<Value = Option<T>> {
        prop_oneof![Just(None), s.prop_map(Some)]
    }

    fn link(n: usize) -> impl Strategy<Value = Link> {
        let service = opt(
            (0..=5i64, 0..=50i64, opt(0..=80i64), any::<bool>()).prop_map(
                |(demand, cost, time, fwd)| ServiceSpec {
                    demand,
                    cost,
                    time,
                    direction: if fwd {
                        ServeDirection::Forward
                    } else {
                        ServeDirection::Either
                    },
                },
            ),
        );
        (
            0..n,
            0..n,
            any::<bool>(),
            0..=1_000_000i64,
            opt(0..=1_000_000i64),
            service,
            opt("[ -~]{0,12}|Straße [0-9]{1,3}|\"quoted\\\\\""),
            prop::collection::vec([-1e7..1e7f64, -1e7..1e7f64], 0..4),
            opt("residential|primary|service"),
        )
            .prop_map(
                |(from, to, oneway, cost, time, service, name, geometry, class)| Link {
                    from,
                    to,
                    oneway,
                    cost,
                    time,
                    service,
                    name,
                    geometry,
                    class,
                },
            )
    }

    /// Random valid instances: a two-way ring through all junctions keeps every
    /// task reachable; extra links are arbitrary.
    fn instance() -> impl Strategy<Value = Instance> {
        (2..12usize).prop_flat_map(|n| {
            (
                prop::collection::vec(
                    (
                        any::<u64>(),
                        opt(any::<f64>().prop_filter("finite", |x| x.is_finite())),
                        opt(-1e7..1e7f64),
                    ),
                    n,
                ),
                prop::collection::vec(link(n), 0..20),
                0..n,
                (5..=20i64, opt(0..=10_000i64), opt(1..10usize)),
                "[a-z ]{0,10}",
                prop::collection::vec((0..n, 0..n), 0..3),
            )
                .prop_filter_map(
                    "distinct ids, valid",
                    move |(js, extra, depot, (capacity, shift, max), name, turns)| {
                        let mut ids: Vec<u64> = js.iter().map(|j| j.0).collect();
                        ids.sort_unstable();
                        ids.dedup();
                        if ids.len() != n {
                            return None;
                        }
                        let mut net = Network {
                            junctions: js.iter().map(|&(id, x, y)| Junction { id, x, y }).collect(),
                            ..Network::default()
                        };
                        for v in 0..n {
                            net.add_edge(v, (v + 1) % n, 1);
                        }
                        net.links.extend(extra);
                        // Turn restrictions between the ring's links.
                        for (k, &(a, b)) in turns.iter().enumerate() {
                            let (from, to) = (a % n, b % n);
                            net.turn_restrictions.push(TurnRestriction {
                                rule: if k % 2 == 0 {
                                    "no_left_turn"
                                } else {
                                    "only_straight_on"
                                }
                                .into(),
                                from,
                                via: (from + 1) % n,
                                to,
                            });
                        }
                        let fleet = Fleet {
                            capacity,
                            shift_limit: shift,
                            max_vehicles: max,
                        };
                        Instance::new(name, net, fleet, depot).ok()
                    },
                )
        })
    }

    proptest! {
        #![proptest_config(ProptestConfig { cases: 300, ..ProptestConfig::default() })]
        #[test]
        fn random_instances_round_trip(inst in instance()) {
            let text = write_scenario(&inst);
            let again = read_scenario(&text, "random.json").map_err(|e| TestCaseError::fail(e.to_string()))?;
            prop_assert_eq!(again, inst);
        }
    }
}
