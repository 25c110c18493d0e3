//! Malformed inputs in tests/fixtures/malformed/: each file must be rejected
//! with the right kind of error and the right line (never a panic).

use std::path::{Path, PathBuf};

use arcwright::error::ParseProblem as P;
use arcwright::io::{read_dat_file, read_scenario_file};
use arcwright::model::ModelError as M;
use arcwright::Error;

fn fixture(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/malformed")
        .join(name)
}

fn read(name: &str) -> Error {
    let path = fixture(name);
    let r = if name.ends_with(".json") {
        read_scenario_file(&path).map(|_| ())
    } else {
        read_dat_file(&path).map(|_| ())
    };
    let e = r.expect_err(name);
    println!("{e}");
    let loc = e.location().expect("a parse error");
    assert_eq!(loc.file, path.display().to_string(), "{name}: file named");
    e
}

/// Asserts the line and that `ok` accepts the (innermost) problem.
fn expect(name: &str, line: usize, ok: impl Fn(&P) -> bool) -> Error {
    let e = read(name);
    assert_eq!(
        e.location().unwrap().line,
        Some(line),
        "{name}: line of {e}"
    );
    let p = e.problem().unwrap();
    assert!(ok(p.innermost()), "{name}: unexpected problem {p:?}");
    e
}

#[test]
fn research_format_errors_name_kind_and_line() {
    expect("truncated.dat", 11, |p| matches!(p, P::Truncated { .. }));
    expect("truncated_mid_line.dat", 12, |p| {
        matches!(p, P::Truncated { .. })
    });
    expect("wrong_count.dat", 3, |p| {
        matches!(
            p,
            P::CountMismatch {
                what: "ARISTAS_REQ",
                header: 4,
                found: 3
            }
        )
    });
    // This one has CRLF line ends, like the distributed files.
    expect("unknown_vertex.dat", 11, |p| {
        matches!(p, P::UnknownVertex { vertex: 7, max: 4 })
    });
    expect("negative_cost.dat", 11, |p| {
        matches!(p, P::Negative { value: -4, .. })
    });
    expect(
        "non_numeric_cost.dat",
        11,
        |p| matches!(p, P::NotANumber { found, .. } if found == "four"),
    );
    expect("duplicate_depot.dat", 16, |p| {
        matches!(p, P::DuplicateDepot { first_line: 15 })
    });
    expect("unreachable.dat", 13, |p| {
        matches!(p, P::Model(M::Unreachable { link: 3, .. }))
    });
    expect("demand_over_capacity.dat", 11, |p| {
        matches!(
            p,
            P::Model(M::DemandExceedsCapacity {
                link: 1,
                demand: 11,
                capacity: 10,
                ..
            })
        )
    });
}

#[test]
fn scenario_errors_name_kind_path_and_line() {
    let e = expect("wrong_type.json", 20, |p| matches!(p, P::Json { .. }));
    assert!(e.to_string().contains("column"), "{e}");
    expect("truncated.json", 14, |p| matches!(p, P::Json { .. }));
    expect(
        "duplicate_yard.json",
        23,
        |p| matches!(p, P::Json { message } if message.contains("duplicate field `yard`")),
    );
    let path = |e: &Error| e.problem().unwrap().path().map(str::to_string);
    let e = expect("unknown_junction.json", 14, |p| {
        matches!(p, P::UnknownJunction { id: 109 })
    });
    assert_eq!(path(&e).as_deref(), Some("streets[1].to"));
    let e = expect("duplicate_junction.json", 9, |p| {
        matches!(p, P::DuplicateJunction { id: 103, first: 2 })
    });
    assert_eq!(path(&e).as_deref(), Some("junctions[3].id"));
    let e = expect("negative_cost.json", 16, |p| {
        matches!(
            p,
            P::Model(M::Negative {
                link: 2,
                what: "cost",
                value: -2,
                ..
            })
        )
    });
    assert_eq!(path(&e).as_deref(), Some("streets[2].cost"));
    let e = expect("demand_over_capacity.json", 15, |p| {
        matches!(
            p,
            P::Model(M::DemandExceedsCapacity {
                link: 1,
                demand: 12,
                capacity: 10,
                ..
            })
        )
    });
    assert_eq!(path(&e).as_deref(), Some("streets[1].service.demand"));
    let e = expect("unreachable.json", 22, |p| {
        matches!(p, P::Model(M::Unreachable { link: 5, .. }))
    });
    assert_eq!(path(&e).as_deref(), Some("streets[5]"));
    assert!(e.to_string().contains("streets[5]"), "{e}");
}

#[test]
fn every_fixture_is_covered() {
    // Each file in the folder is exercised by one of the tests above.
    let mut names: Vec<String> = std::fs::read_dir(fixture(""))
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    names.sort();
    let me = std::fs::read_to_string(file!()).unwrap();
    for n in names {
        assert!(me.contains(&format!("\"{n}\"")), "fixture {n} has no test");
    }
}
