//! Regression tests for the number limits and counts found by the fault test
//! of issue 8 (defects 3.2, 3.5, 3.6) and for `Solver::distances`.

use arcwright::check::check_plan;
use arcwright::model::{Fleet, Instance, Network};
use arcwright::paths::Distances;
use arcwright::{SolveError, Solver};

/// Defect 3.2: three services of 2e8 with one truck make one route of
/// 6e8 + deadheads (above the old 2^29 limit); it must be planned, not refused.
#[test]
fn a_route_above_two_to_the_29_is_planned() {
    let mut net = Network::with_junctions(3);
    net.add_required_edge(0, 1, 200_000_000, 1);
    net.add_required_edge(1, 2, 200_000_000, 1);
    net.add_required_edge(2, 0, 200_000_000, 1);
    let fleet = Fleet {
        max_vehicles: Some(1),
        ..Fleet::with_capacity(3)
    };
    let inst = Instance::new("big numbers", net, fleet, 0).unwrap();
    let sol = Solver::new(&inst).max_iterations(20).solve().unwrap();
    assert!(check_plan(&inst, &sol.plan).is_ok());
    assert_eq!(sol.plan.routes.len(), 1);
    // The triangle is served in one loop: 3 x 2e8, no deadhead.
    assert_eq!(sol.cost, 600_000_000);
    assert!(sol.cost > 1 << 29);
}

/// Beyond the solver's real limit (2^40 per route) the solve is refused with
/// the limit named, never answered with a wrong plan.
#[test]
fn routes_that_could_reach_two_to_the_40_are_refused_with_the_limit() {
    let mut net = Network::with_junctions(3);
    net.add_required_edge(0, 1, 1 << 39, 1);
    net.add_required_edge(1, 2, 1 << 39, 1);
    net.add_required_edge(2, 0, 1 << 39, 1);
    for l in &mut net.links {
        l.cost = 1; // cheap to drive, costly to serve: the deadheads fit 32 bits
    }
    let inst = Instance::new("huge numbers", net, Fleet::with_capacity(3), 0).unwrap();
    let err = Solver::new(&inst).max_iterations(20).solve().unwrap_err();
    match &err {
        SolveError::RouteTooLong { bound, limit } => {
            assert_eq!(*limit, 1 << 40);
            assert!(*bound >= 3 << 39);
        }
        other => panic!("expected RouteTooLong, got {other:?}"),
    }
    assert!(err.to_string().contains("1099511627776"), "{err}");
}

/// Distances built once are taken by the solver; the result is the same as
/// when the solver builds them itself. Distances of another instance are refused.
#[test]
fn solver_takes_the_callers_distances() {
    let mut net = Network::with_junctions(4);
    net.add_required_edge(0, 1, 10, 3);
    net.add_required_edge(1, 2, 12, 2);
    net.add_required_edge(2, 3, 10, 3);
    net.add_required_edge(3, 0, 12, 2);
    let inst = Instance::new("block", net, Fleet::with_capacity(5), 0).unwrap();
    let dist = Distances::new(&inst).unwrap();
    let own = Solver::new(&inst)
        .seed(3)
        .max_iterations(100)
        .solve()
        .unwrap();
    let given = Solver::new(&inst)
        .distances(&dist)
        .seed(3)
        .max_iterations(100)
        .solve()
        .unwrap();
    assert_eq!(own.plan, given.plan);

    let mut small = Network::with_junctions(2);
    small.add_required_edge(0, 1, 1, 1);
    let other = Instance::new("other", small, Fleet::with_capacity(5), 0).unwrap();
    let wrong = Distances::new(&other).unwrap();
    let err = Solver::new(&inst).distances(&wrong).solve().unwrap_err();
    assert!(
        matches!(err, SolveError::DistancesMismatch { .. }),
        "{err:?}"
    );
}

use arcwright::error::ParseProblem;
use arcwright::io::{detect_format, read_dat, read_scenario, Format};

const PAIR: &str = "NOMBRE : pair\nVERTICES : 2\nARISTAS_REQ : 1\nARISTAS_NOREQ : 1\n\
CAPACIDAD : 5\nLISTA_ARISTAS_REQ :\n( 1, 2) coste 3 demanda 2\nLISTA_ARISTAS_NOREQ :\n\
( 2, 1) coste 4\nDEPOSITO : 1\n";

/// Defect 3.5: `VERTICES : 16777216` in a file of a few hundred bytes made
/// the reader build 16 million junctions (23 s, 1.6 GB). The header count
/// must be backed by the edges listed (two vertices per edge, plus one).
#[test]
fn a_vertex_count_the_edges_cannot_use_is_refused_at_its_line() {
    assert!(read_dat(PAIR, "pair.dat").is_ok());
    let big = PAIR.replace("VERTICES : 2", "VERTICES : 16777216");
    let e = read_dat(&big, "pair.dat").unwrap_err();
    assert_eq!(e.location().unwrap().line, Some(2), "{e}");
    assert_eq!(
        e.problem(),
        Some(&ParseProblem::Unbacked {
            what: "VERTICES",
            header: 16_777_216,
            most: 5
        })
    );
    // Isolated vertices up to that bound still read (two edges: at most 5).
    let five = PAIR.replace("VERTICES : 2", "VERTICES : 5");
    assert_eq!(
        read_dat(&five, "pair.dat")
            .unwrap()
            .instance
            .network()
            .len(),
        5
    );
}

/// Defect 3.6: a `demanda` on an edge under LISTA_ARISTAS_NOREQ was dropped
/// silently; it is refused at its line (no public file has one: all 81 read,
/// tests/instances.rs).
#[test]
fn a_demand_on_a_non_required_edge_is_refused() {
    let bad = PAIR.replace("( 2, 1) coste 4", "( 2, 1) coste 4 demanda 1");
    let e = read_dat(&bad, "pair.dat").unwrap_err();
    assert_eq!(e.location().unwrap().line, Some(9), "{e}");
    assert_eq!(e.problem(), Some(&ParseProblem::DemandNotRequired));
    assert!(e.to_string().contains("LISTA_ARISTAS_NOREQ"), "{e}");
}

/// Friction 2.6: invalid UTF-8 gets a line; a missing header key gets the
/// line where the header should have had it.
#[test]
fn invalid_utf8_and_missing_keys_have_lines() {
    let dir = std::env::temp_dir().join(format!("arcwright-limits-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join("latin1.dat");
    let mut bytes = PAIR.as_bytes().to_vec();
    let at = PAIR.find("pair").unwrap();
    bytes[at + 1] = 0xE9; // `é` in Latin-1: not UTF-8, on line 1
    let second = PAIR.find("( 2, 1)").unwrap();
    bytes[second + 2] = 0xFF; // and on line 9
    std::fs::write(&path, &bytes).unwrap();
    let e = arcwright::io::read_dat_file(&path).unwrap_err();
    std::fs::remove_dir_all(&dir).unwrap();
    assert_eq!(e.location().unwrap().line, Some(1), "{e}");
    assert!(matches!(e.problem(), Some(ParseProblem::NotUtf8 { byte }) if *byte == at + 2));

    let no_cap = PAIR.replace("CAPACIDAD : 5\n", "");
    let e = read_dat(&no_cap, "pair.dat").unwrap_err();
    assert_eq!(
        e.problem(),
        Some(&ParseProblem::MissingKey { key: "CAPACIDAD" })
    );
    assert_eq!(e.location().unwrap().line, Some(5), "{e}"); // LISTA_ARISTAS_REQ
}

/// Friction 2.6: a JSON syntax error gives its position once (line in the
/// location, column in the message); a BOM before JSON is skipped and
/// `detect_format` takes such a text for JSON whatever its name.
#[test]
fn json_positions_once_and_bom_scenarios() {
    let e = read_scenario(
        "{\n  \"format\": \"arcwright-scenario\",\n  oops\n}",
        "s.txt",
    )
    .unwrap_err();
    let msg = e.to_string();
    assert_eq!(e.location().unwrap().line, Some(3));
    assert_eq!(msg.matches("line").count(), 0, "{msg}");
    assert_eq!(msg.matches("column").count(), 1, "{msg}");
    assert!(msg.starts_with("s.txt:3: "), "{msg}");

    let text = format!(
        "\u{feff}{}",
        arcwright::io::write_scenario(
            &Instance::new(
                "bom",
                {
                    let mut n = Network::with_junctions(2);
                    n.add_required_edge(0, 1, 3, 1);
                    n
                },
                Fleet::with_capacity(2),
                0
            )
            .unwrap()
        )
    );
    assert_eq!(detect_format(&text, "scenario"), Format::Scenario);
    assert_eq!(detect_format(&text, "scenario.txt"), Format::Scenario);
    assert_eq!(detect_format(PAIR, "pair"), Format::Dat);
    assert_eq!(detect_format(&text, "x.DAT"), Format::Dat);
    assert_eq!(read_scenario(&text, "scenario").unwrap().name, "bom");
}

/// Friction 2.6: scenario validation reports every problem (up to
/// `MAX_PROBLEMS`), each at its JSON path and line, and names streets.
#[test]
fn scenario_validation_reports_all_problems_with_lines() {
    let mut streets = String::new();
    for i in 0..25 {
        // Street i: demand 9 on trucks of 5, except three other faults.
        let (to, cost) = match i {
            3 => (77, 1), // unknown junction
            7 => (2, -1), // negative cost
            _ => (2, 1),
        };
        streets.push_str(&format!(
            "    {{\"from\": 1, \"to\": {to}, \"cost\": {cost}, \"name\": \"Lane {i}\", \"service\": {{\"demand\": 9, \"cost\": 1}}}},\n"
        ));
    }
    let streets = streets.trim_end().trim_end_matches(',');
    let text = format!(
        "{{\n  \"format\": \"arcwright-scenario\",\n  \"version\": 1,\n  \"name\": \"faults\",\n  \
         \"junctions\": [{{\"id\": 1}}, {{\"id\": 2}}],\n  \"streets\": [\n{streets}\n  ],\n  \
         \"yard\": 1,\n  \"fleet\": {{\"capacity\": 5}}\n}}\n"
    );
    let e = read_scenario(&text, "faults.json").unwrap_err();
    let all = e.problems();
    // Reading stops before the model when a street has an unknown end:
    // the two reader problems come first.
    assert_eq!(all.len(), 1, "{e}");
    assert!(matches!(
        all[0].1.innermost(),
        ParseProblem::UnknownJunction { id: 77 }
    ));
    assert_eq!(all[0].0.line, Some(10), "{e}");

    // Without the unknown junction, the model's problems: 24 demands over
    // capacity and one negative cost, of which 20 are listed.
    let text = text.replace("\"to\": 77", "\"to\": 2");
    let e = read_scenario(&text, "faults.json").unwrap_err();
    let all = e.problems();
    assert_eq!(all.len(), arcwright::model::MAX_PROBLEMS, "{e}");
    let msg = e.to_string();
    assert!(
        msg.starts_with("faults.json: 26 problems (6 not listed):"),
        "{msg}"
    );
    for (k, (at, _)) in all.iter().enumerate() {
        // Street i is on line 7 + i; street 7 has two problems.
        let street = if k <= 7 { k } else { k - 1 };
        assert_eq!(at.line, Some(7 + street), "{k}: {msg}");
    }
    assert!(
        msg.contains("street \"Lane 7\" (junctions 1-2): cost must not be negative"),
        "{msg}"
    );
    assert!(
        msg.contains("demand 9 exceeds the truck capacity 5"),
        "{msg}"
    );
}

/// Item 8 of issue 8: strongly connected components (petgraph) tell a street
/// a truck cannot leave from one it cannot reach, and name it.
#[test]
fn one_way_traps_and_unreachable_streets_are_named() {
    use arcwright::model::{Link, ModelError, Reach};
    let one_way = |from, to, name: &str, serve: bool| Link {
        from,
        to,
        oneway: true,
        cost: 1,
        time: None,
        service: serve.then_some(arcwright::model::ServiceSpec {
            demand: 1,
            cost: 1,
            time: None,
            direction: arcwright::model::ServeDirection::Forward,
        }),
        name: Some(name.to_string()),
        ..Link::default()
    };
    // Yard 0 <-> 1 two-way; 1 -> 2 one-way "Mill Lane" (a trap: 2 has no
    // way out); 3 -> 0 one-way "Quarry Road" (nothing leads to 3).
    let mut net = Network::with_junctions(4);
    net.add_required_edge(0, 1, 1, 1);
    net.add_link(one_way(1, 2, "Mill Lane", true));
    net.add_link(one_way(3, 0, "Quarry Road", true));
    let all = Instance::validate("traps", net, Fleet::with_capacity(5), 0).unwrap_err();
    assert_eq!(all.len(), 2, "{all:?}");
    assert!(matches!(
        &all[0],
        ModelError::Unreachable {
            link: 1,
            why: Reach::NoWayBack,
            ..
        }
    ));
    assert!(matches!(
        &all[1],
        ModelError::Unreachable {
            link: 2,
            why: Reach::NotFromYard,
            ..
        }
    ));
    assert_eq!(
        all[0].to_string(),
        "street \"Mill Lane\" (junctions 2-3) is to be served, but no way leads from it back \
         to the yard (a truck could enter it but not leave)"
    );
    assert_eq!(
        all[1].to_string(),
        "street \"Quarry Road\" (junctions 4-1) is to be served, but no way leads to it from the yard"
    );
}
