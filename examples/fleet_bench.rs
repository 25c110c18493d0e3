//! The fleet model on derived instances of our own: writes them and prints
//! cost, trips, tips, shift times and their spread, with and without
//! balancing.
//!
//! ```text
//! cargo run --release --example fleet_bench [-- [OUT_DIR] [--demo-only | --egl-all]
//!     [--iterations N] [--rounds N]]
//! ```
//!
//! 1. *Demo town with a landfill*: `instances/demo-town.json` plus a
//!    landfill outside town (a new junction drawn 1.5 km east of the town
//!    junction farthest from the yard that is not only on lanes, joined to it
//!    by a winding 6,000 m road driven in 400 s), unloading
//!    15 min, and two truck types instead of the one fleet: `compact`
//!    (load 350, 3 trucks, cost factor 0.9) and `large` (load 700, 3 trucks,
//!    fixed cost 2,000 per truck used, cost factor 1.2, may not enter
//!    `living_street`s), both with the town's 4-hour shift. The town's
//!    streets get road classes from their names (our own rule for this
//!    invented town): lanes, walks, paths, closes, courts and ends are
//!    `living_street`, the streets served one side at a time `primary`, the
//!    rest `residential`; Landfill Road is `primary`.
//! 2. *egl with a dump site*: `egl-e1-A` and `egl-s1-A` of
//!    `../shared/instances/egl` (with `--egl-all`: all 24 egl files, and no
//!    demo town) plus a dump site at the junction farthest (least-cost path)
//!    from the depot, no unload time, unlimited trucks.
//!
//! Each is solved with least cost, then with `longest_shift_weight` 2
//! (total cost + 2 × longest shift), one worker, seed 1, with iteration
//! limits only (deterministic): `--iterations` of today's solver per
//! relaxation (default 200) and `--rounds` of iterated local search per
//! start (default 40). The derived scenarios are written to OUT_DIR
//! (default `target/fleet-bench`) so that anyone can re-run them.

use std::path::PathBuf;
use std::time::Instant;

use arcwright::check::fleet::check_fleet_plan;
use arcwright::fleet::FleetSolver;
use arcwright::io::{read_dat_file, read_scenario_file, write_scenario};
use arcwright::model::{
    Balance, DumpSite, Instance, Junction, Link, Network, Operations, TruckType,
};
use arcwright::paths::Distances;

fn main() {
    let root = PathBuf::from(env!("CARGO_MANIFEST_DIR"));
    let args: Vec<String> = std::env::args().skip(1).collect();
    let flag = |f: &str| args.iter().any(|a| a == f);
    let number = |f: &str, default: u64| match args.iter().position(|a| a == f) {
        Some(i) => args
            .get(i + 1)
            .and_then(|v| v.parse().ok())
            .unwrap_or_else(|| panic!("{f} needs a whole number")),
        None => default,
    };
    let (demo_only, egl_all) = (flag("--demo-only"), flag("--egl-all"));
    let (iterations, rounds) = (number("--iterations", 200), number("--rounds", 40));
    let out = args
        .iter()
        .enumerate()
        .find(|(i, a)| {
            !a.starts_with("--")
                && (*i == 0 || !matches!(args[i - 1].as_str(), "--iterations" | "--rounds"))
        })
        .map(|(_, a)| PathBuf::from(a))
        .unwrap_or_else(|| root.join("target/fleet-bench"));
    std::fs::create_dir_all(&out).expect("output folder");
    let mut cases = Vec::new();
    if !egl_all {
        cases.push(demo_with_landfill(&root));
    }
    let egl = root.join("../shared/instances/egl");
    if demo_only {
        // only the demo town
    } else if egl.exists() {
        for name in egl_names(&egl, egl_all) {
            cases.push(egl_with_dump(&egl.join(format!("{name}.dat"))));
        }
    } else {
        eprintln!("SKIPPED egl: ../shared/instances not found");
    }
    println!(
        "{iterations} iterations per relaxation, {rounds} rounds per start, one worker, seed 1\n"
    );
    if let Some(inst) = cases.first() {
        // One exact split of a whole order (the streets in file order),
        // which is what pricing a move cost before the route search.
        let tables = arcwright::fleet::Tables::new(inst).expect("tables");
        let order: Vec<usize> = (0..inst.tasks().len()).collect();
        let t = Instant::now();
        let s = arcwright::fleet::split::split(inst, &tables, &order).expect("a split");
        println!(
            "{}: one exact split of the whole order ({} streets, cost {}): {:.1} ms\n",
            inst.name,
            order.len(),
            s.cost,
            t.elapsed().as_secs_f64() * 1000.0
        );
    }
    println!("| instance | balance | cost | objective | routes | trips | tips | longest shift | shortest shift | spread | moves priced | seconds |");
    println!("|---|---|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|");
    for inst in cases {
        let file = out.join(format!("{}.json", inst.name.replace(' ', "-")));
        std::fs::write(&file, write_scenario(&inst)).expect("write scenario");
        for weight in [0, 2] {
            let mut ops = inst.operations().clone();
            ops.balance = if weight == 0 {
                Balance::LeastCost
            } else {
                Balance::LongestShift { weight }
            };
            let inst = inst.clone().with_operations(ops).expect("valid");
            let t = Instant::now();
            let sol = FleetSolver::new(&inst)
                .max_iterations(iterations)
                .moves(rounds)
                .solve()
                .expect("a plan");
            let secs = t.elapsed().as_secs_f64();
            assert!(check_fleet_plan(&inst, &sol.plan).is_ok());
            let (long, short) = sol.shift_spread;
            println!(
                "| {} | {} | {} | {} | {} | {} | {} | {} | {} | {} | {} | {:.1} |",
                inst.name,
                if weight == 0 {
                    "least cost".to_string()
                } else {
                    format!("cost + {weight} × longest")
                },
                sol.cost,
                sol.objective,
                sol.plan.routes.len(),
                sol.plan.trips(),
                sol.plan.tips(),
                long,
                short,
                long - short,
                sol.moves_priced,
                secs
            );
        }
    }
}

fn demo_with_landfill(root: &std::path::Path) -> Instance {
    let town = read_scenario_file(root.join("instances/demo-town.json")).expect("demo town");
    let dist = Distances::new(&town).expect("distances");
    let yard = town.depot();
    let far = dist
        .keys()
        .iter()
        .copied()
        .filter(|&v| dist.cost(yard, v) < arcwright::paths::UNREACHABLE)
        .filter(|&v| {
            // On a street that is not a lane: the large trucks must get there.
            town.network().links.iter().any(|l| {
                (l.from == v || l.to == v)
                    && class_of(l.name.as_deref().unwrap_or("")) != "living_street"
            })
        })
        .max_by_key(|&v| (dist.cost(yard, v), v))
        .expect("a junction");
    let mut net: Network = town.network().clone();
    for l in &mut net.links {
        l.class = Some(class_of(l.name.as_deref().unwrap_or("")).to_string());
    }
    let (x, y) = (net.junctions[far].x, net.junctions[far].y);
    let id = net.junctions.iter().map(|j| j.id).max().unwrap_or(0) + 1;
    net.junctions.push(Junction {
        id,
        // Drawn 1.5 km east of that junction so that the map keeps the
        // town readable; the road's cost and length are 6 km (it winds).
        x: x.map(|x| x + 1500.0),
        y,
    });
    let landfill = net.junctions.len() - 1;
    net.add_link(Link {
        from: far,
        to: landfill,
        oneway: false,
        cost: 6000,
        time: Some(400),
        service: None,
        name: Some("Landfill Road".into()),
        length: Some(6000),
        geometry: Vec::new(),
        class: Some("primary".into()),
    });
    let inst = Instance::new("demo town with landfill", net, town.fleet().clone(), yard)
        .expect("valid")
        .with_units(town.units().clone())
        .with_coordinates(town.coordinates())
        .expect("the town's coordinates");
    let ty = |name: &str, capacity, fixed_cost, cost_per_mille| TruckType {
        name: name.into(),
        count: Some(3),
        capacity,
        shift_limit: town.fleet().shift_limit,
        yard: 0,
        fixed_cost,
        cost_per_mille,
        no_entry: vec![],
        no_service: vec![],
        no_entry_classes: vec![],
        no_service_classes: vec![],
    };
    let mut large = ty("large", 700, 2000, 1200);
    large.no_entry_classes = vec!["living_street".into()];
    let ops = Operations {
        dump_sites: vec![DumpSite {
            name: Some("Landfill".into()),
            junction: landfill,
            unload_time: 900,
            unload_cost: 0,
            hours: None,
        }],
        truck_types: vec![ty("compact", 350, 0, 900), large],
        ..Operations::default()
    };
    inst.with_operations(ops).expect("valid operations")
}

/// The road class of a demo-town street from its name (see the module docs).
fn class_of(name: &str) -> &'static str {
    let base = name.split(" (").next().unwrap_or(name);
    if name.contains("bound side)") {
        return "primary";
    }
    match base.rsplit(' ').next().unwrap_or("") {
        "Lane" | "Walk" | "Path" | "Close" | "Court" | "End" => "living_street",
        _ => "residential",
    }
}

/// The egl files to run: `egl-e1-A` and `egl-s1-A`, or with `all` every
/// `egl-*.dat` in the folder, in name order.
fn egl_names(egl: &std::path::Path, all: bool) -> Vec<String> {
    if !all {
        return vec!["egl-e1-A".into(), "egl-s1-A".into()];
    }
    let mut names: Vec<String> = std::fs::read_dir(egl)
        .expect("the egl folder")
        .filter_map(|e| e.ok()?.file_name().into_string().ok())
        .filter_map(|n| n.strip_suffix(".dat").map(String::from))
        .filter(|n| n.starts_with("egl-"))
        .collect();
    names.sort();
    names
}

fn egl_with_dump(path: &std::path::Path) -> Instance {
    let inst = read_dat_file(path).expect("egl file").instance;
    let dist = Distances::new(&inst).expect("distances");
    let depot = inst.depot();
    let far = dist
        .keys()
        .iter()
        .copied()
        .max_by_key(|&v| (dist.cost(depot, v), v))
        .expect("a junction");
    // Named by the file: egl-e2-A.dat calls itself egl-e2-7 inside.
    let stem = path.file_stem().and_then(|s| s.to_str()).unwrap_or("egl");
    let name = format!("{stem} with dump site");
    let inst =
        Instance::new(name, inst.network().clone(), inst.fleet().clone(), depot).expect("valid");
    let mut ty = inst.operations().types_of(&inst)[0].clone();
    ty.count = None;
    let ops = Operations {
        dump_sites: vec![DumpSite {
            name: Some("farthest junction".into()),
            junction: far,
            unload_time: 0,
            unload_cost: 0,
            hours: None,
        }],
        truck_types: vec![ty],
        ..Operations::default()
    };
    inst.with_operations(ops).expect("valid operations")
}
