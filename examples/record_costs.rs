//! Prints the plan costs of today's solver (`Solver`) on a few public
//! instances at a fixed seed and iteration limit, as CSV. Run on a copy of
//! main without the fleet code to write `tests/fixtures/fleet_off_costs.csv`,
//! the reference that the fleet model with every feature off must reproduce
//! (when the solver's random streams change, record it again the same way):
//!
//! `cargo run --release --example record_costs > tests/fixtures/fleet_off_costs.csv`
//!
//! Reads `../shared/instances`; prints nothing when it is absent.

use std::path::PathBuf;

use arcwright::io::read_dat_file;
use arcwright::Solver;

/// (file, seed, iterations): kept in step with `tests/fleet_solver.rs`.
const RUNS: [(&str, u64, u64); 4] = [
    ("gdb/gdb1.dat", 3, 200),
    ("gdb/gdb8.dat", 5, 200),
    ("val/val1A.dat", 3, 100),
    ("val/val5C.dat", 7, 100),
];

fn main() {
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../shared/instances");
    if !dir.join("reference.csv").exists() {
        eprintln!("SKIPPED: ../shared/instances not found");
        return;
    }
    println!("file,seed,iterations,cost,routes");
    for (file, seed, iters) in RUNS {
        let dat = read_dat_file(dir.join(file)).expect("readable instance");
        let sol = Solver::new(&dat.instance)
            .seed(seed)
            .max_iterations(iters)
            .solve()
            .expect("a plan");
        println!(
            "{file},{seed},{iters},{},{}",
            sol.cost,
            sol.plan.routes.len()
        );
    }
}
