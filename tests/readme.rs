//! The JSON example in README.md is a valid scenario and means what the
//! README says.

use arcwright::io::{read_scenario, write_scenario};

#[test]
fn readme_scenario_example_reads() {
    let readme = include_str!("../README.md");
    let start = readme.find("```json\n").expect("a json block in README.md") + 8;
    let len = readme[start..].find("```").unwrap();
    let text = &readme[start..start + len];
    let inst = read_scenario(text, "README.md").unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(inst.tasks().len(), 2, "two streets served");
    assert_eq!(
        inst.network().junctions[inst.depot()].id,
        1,
        "yard at junction 1"
    );
    assert!(inst.network().links[1].oneway);
    assert_eq!(inst.fleet().max_vehicles, Some(2));
    assert_eq!(
        read_scenario(&write_scenario(&inst), "again").unwrap(),
        inst
    );
}

/// Friction 2.1: the README's build command builds the example programs it
/// says it builds. A plain `cargo build` builds the library only; examples
/// need `--examples` (or `--example NAME`), per cargo's target selection.
#[test]
fn readme_build_command_builds_the_examples() {
    let readme = include_str!("../README.md");
    let builds: Vec<&str> = readme
        .lines()
        .filter(|l| l.trim_start().starts_with("cargo build"))
        .collect();
    assert!(!builds.is_empty());
    for l in builds {
        assert!(l.contains("--examples") || l.contains("--example "), "{l}");
    }
    assert!(readme.contains("builds the library and the example programs"));
}

/// The README's scenario example declares its units and coordinates, and
/// they mean what the README says.
#[test]
fn readme_scenario_declares_units_and_coordinates() {
    use arcwright::model::Coordinates;
    let readme = include_str!("../README.md");
    let start = readme.find("```json\n").unwrap() + 8;
    let len = readme[start..].find("```").unwrap();
    let inst = read_scenario(&readme[start..start + len], "README.md").unwrap();
    assert_eq!(inst.units().time.as_deref(), Some("min"));
    assert_eq!(inst.units().time_text(480), "480 min (8:00 h)");
    assert!(readme.contains("480 min (8:00 h)"));
    assert!(matches!(
        inst.coordinates(),
        Coordinates::Planar { origin: Some(_) }
    ));
    assert_eq!(inst.network().links[0].length, Some(250));
}
