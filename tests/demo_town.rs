//! The committed demo scenario is exactly what the generator makes, and it
//! reads back through our scenario reader to the same instance.

use arcwright::demo::{town, TownSpec};
use arcwright::io::{read_scenario_file, write_scenario};

#[test]
fn demo_scenario_file_is_the_generated_town() {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/instances/demo-town.json");
    let made = town(&TownSpec::demo()).unwrap();
    let committed = std::fs::read_to_string(path).unwrap();
    assert!(
        committed == write_scenario(&made),
        "instances/demo-town.json differs from the generator's output; \
         regenerate it with `cargo run --release --example make_town`"
    );
    assert_eq!(read_scenario_file(path).unwrap(), made);
}

#[test]
fn generator_is_deterministic_across_sizes() {
    for (seed, blocks) in [(1, 3), (99, 10)] {
        let a = write_scenario(&town(&TownSpec::new(seed, blocks)).unwrap());
        let b = write_scenario(&town(&TownSpec::new(seed, blocks)).unwrap());
        assert_eq!(a, b);
        let c = write_scenario(&town(&TownSpec::new(seed + 1, blocks)).unwrap());
        assert_ne!(a, c);
    }
}
