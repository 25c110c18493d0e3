//! The JSON scenario format: a hand-written file reads as written, and
//! read -> write -> read gives an equal instance, for that file and for every
//! public benchmark instance in ../shared/instances.

mod common;

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
    let Some(root) = common::shared_dir("scenario::public_instances_round_trip") else {
        return;
    };
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
            opt(0..=1_000_000i64),
            prop::collection::vec([-1e7..1e7f64, -1e7..1e7f64], 0..4),
            opt("residential|primary|service"),
        )
            .prop_map(
                |(from, to, oneway, cost, time, service, name, length, geometry, class)| Link {
                    from,
                    to,
                    oneway,
                    cost,
                    time,
                    service,
                    name,
                    length,
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
                        // Undeclared planar coordinates must stay within
                        // 40,000 km: tiny and large values, exactly kept.
                        opt(prop_oneof![-4e7..4e7f64, -1e-300..1e-300f64]),
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

/// A small scenario with `extra` fields after the name and the junction
/// coordinates given.
fn small(extra: &str, junctions: &str) -> String {
    format!(
        r#"{{
  "format": "arcwright-scenario",
  "version": 1,
  "name": "small"{extra},
  "junctions": {junctions},
  "streets": [
    {{ "from": 1, "to": 2, "cost": 4, "length": 120,
       "service": {{ "demand": 1, "cost": 5 }} }}
  ],
  "yard": 1,
  "fleet": {{ "capacity": 5 }}
}}"#
    )
}

const TWO: &str = r#"[ { "id": 1, "x": 24.9, "y": 60.1 }, { "id": 2, "x": 24.91, "y": 60.1 } ]"#;

/// Units, coordinate system and street lengths are read and written back.
#[test]
fn units_coordinates_and_lengths_round_trip() {
    use arcwright::model::{Coordinates, Units};
    let text = small(
        r#", "units": { "cost": "EUR", "length": "m", "time": "min", "load": "kg" },
  "coordinates": { "system": "planar", "origin": { "lon": 24.9, "lat": 60.1 } }"#,
        TWO,
    );
    let inst = read_scenario(&text, "small.json").unwrap();
    assert_eq!(
        inst.units(),
        &Units {
            cost: Some("EUR".into()),
            length: Some("m".into()),
            time: Some("min".into()),
            load: Some("kg".into()),
        }
    );
    assert_eq!(
        inst.coordinates(),
        Coordinates::Planar {
            origin: Some((24.9, 60.1))
        }
    );
    assert_eq!(inst.network().links[0].length, Some(120));
    let again = read_scenario(&write_scenario(&inst), "again.json").unwrap();
    assert_eq!(again, inst);
    assert_eq!(again.units(), inst.units());
    assert_eq!(again.coordinates(), inst.coordinates());
    // Older files without the fields still read: nothing declared.
    let old = read_scenario(&small("", TWO), "old.json").unwrap();
    assert_eq!(old.units(), &Units::default());
    assert_eq!(old.coordinates(), Coordinates::Undeclared);
}

/// Friction 2.7: impossible coordinates are refused when the file is read,
/// with a typed error at the junction's JSON path and line, never written
/// out as `null` later.
#[test]
fn impossible_coordinates_are_refused_when_read() {
    use arcwright::error::ParseProblem;
    let wgs = r#", "coordinates": { "system": "wgs84" }"#;
    let cases = [
        (
            wgs,
            r#"[ { "id": 1, "x": 24.9, "y": 60.1 },
  { "id": 2, "x": 24.9, "y": 8993.0 } ]"#,
            "junctions[1].y",
            "latitude",
        ),
        (
            wgs,
            r#"[ { "id": 1, "x": 190.5, "y": 60.1 }, { "id": 2, "x": 24.9, "y": 60.1 } ]"#,
            "junctions[0].x",
            "longitude",
        ),
        (
            "",
            r#"[ { "id": 1, "x": 1e308, "y": 0.0 }, { "id": 2, "x": 0.0, "y": 0.0 } ]"#,
            "junctions[0].x",
            "x",
        ),
        (
            r#", "coordinates": { "system": "planar", "origin": { "lon": 10.0, "lat": 95.0 } }"#,
            TWO,
            "coordinates.origin.lat",
            "latitude",
        ),
    ];
    for (extra, junctions, path, axis) in cases {
        let err = read_scenario(&small(extra, junctions), "bad.json").unwrap_err();
        let p = err.problem().unwrap();
        assert_eq!(p.path(), Some(path), "{err}");
        let ParseProblem::Coordinate(c) = p.innermost() else {
            panic!("{err}")
        };
        assert_eq!(c.axis, axis, "{err}");
        assert!(err.location().unwrap().line.is_some(), "{err}");
    }
    // An origin makes no sense for WGS 84, and units must be short names.
    let err = read_scenario(
        &small(
            r#", "coordinates": { "system": "wgs84", "origin": { "lon": 1.0, "lat": 2.0 } }"#,
            TWO,
        ),
        "x.json",
    )
    .unwrap_err();
    assert_eq!(err.problem().unwrap().path(), Some("coordinates.origin"));
    let err = read_scenario(&small(r#", "units": { "time": "" }"#, TWO), "x.json").unwrap_err();
    assert_eq!(err.problem().unwrap().path(), Some("units.time"));
    let err = read_scenario(
        &small(r#", "coordinates": { "system": "mercator" }"#, TWO),
        "x.json",
    )
    .unwrap_err();
    assert!(err.to_string().contains("mercator"), "{err}");
}

/// Friction 2.6/2.7: coordinate problems join the scenario's list of all
/// problems (up to `model::MAX_PROBLEMS`), one per bad junction, beside the
/// other problems of the file, instead of stopping at the first junction.
#[test]
fn every_bad_junction_coordinate_is_reported_with_the_other_problems() {
    use arcwright::error::{Error, ParseProblem};
    use arcwright::model::MAX_PROBLEMS;
    let wgs = r#", "coordinates": { "system": "wgs84" }"#;
    // Junctions 3 and 5 lie beyond the poles; junction id 2 is given twice.
    let junctions = r#"[ { "id": 1, "x": 24.9, "y": 60.1 }, { "id": 2, "x": 24.9, "y": 60.2 },
  { "id": 3, "x": 24.9, "y": 95.0 }, { "id": 2, "x": 24.9, "y": 60.3 },
  { "id": 5, "x": 24.9, "y": -91.0 } ]"#;
    let err = read_scenario(&small(wgs, junctions), "poles.json").unwrap_err();
    let paths: Vec<_> = err.problems().iter().map(|(_, p)| p.path()).collect();
    assert_eq!(
        paths,
        [
            Some("junctions[3].id"),
            Some("junctions[2].y"),
            Some("junctions[4].y"),
        ],
        "{err}"
    );
    for (at, p) in err.problems().into_iter().skip(1) {
        assert!(
            matches!(p.innermost(), ParseProblem::Coordinate(_)),
            "{err}"
        );
        assert!(at.line.is_some(), "{err}");
    }
    // Many bad junctions: the list stops at MAX_PROBLEMS and counts the rest.
    let extra = 5;
    let many: Vec<String> = (1..=MAX_PROBLEMS + extra + 2)
        .map(|id| {
            let y = if id <= 2 { 60.0 } else { 200.0 };
            format!(r#"{{ "id": {id}, "x": 24.9, "y": {y} }}"#)
        })
        .collect();
    let err =
        read_scenario(&small(wgs, &format!("[{}]", many.join(",\n"))), "many.json").unwrap_err();
    let Error::Several { problems, more, .. } = &err else {
        panic!("{err}")
    };
    assert_eq!(problems.len(), MAX_PROBLEMS);
    assert_eq!(*more, extra);
}
