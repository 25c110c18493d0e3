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
