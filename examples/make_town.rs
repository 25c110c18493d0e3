//! Writes an invented demo town as a JSON scenario.
//!
//! ```text
//! cargo run --release --example make_town                  # instances/demo-town.json
//! cargo run --release --example make_town -- --seed 5 --blocks 30 --rings 6 --out big-town.json
//! ```
//!
//! With no options it writes the committed demo town (`TownSpec::demo()`);
//! the test `demo_scenario_file_is_the_generated_town` keeps the two equal.

use std::process::ExitCode;

use arcwright::demo::{town, TownSpec};
use arcwright::io::write_scenario;

const HELP: &str = "make_town [--seed N] [--blocks N] [--rings N] [--cul-de-sacs N] \
                    [--capacity BINS] [--shift-limit SECS] [--out FILE]";

fn main() -> ExitCode {
    let mut spec = TownSpec::demo();
    let mut out = String::from("instances/demo-town.json");
    let mut args = std::env::args().skip(1);
    let (mut rings_given, mut sacs_given) = (false, false);
    while let Some(a) = args.next() {
        if a == "-h" || a == "--help" {
            println!("{HELP}");
            return ExitCode::SUCCESS;
        }
        let Some(v) = args.next() else {
            eprintln!("make_town: {a} needs a value");
            return ExitCode::from(2);
        };
        let n: Result<u64, String> = v
            .parse()
            .map_err(|_| format!("{a} expects a whole number, found `{v}`"));
        let r = match a.as_str() {
            "--seed" => n.map(|n| spec.seed = n),
            "--blocks" => n.map(|n| spec.blocks = n as usize),
            "--rings" => n.map(|n| {
                rings_given = true;
                spec.rings = n as usize
            }),
            "--cul-de-sacs" => n.map(|n| {
                sacs_given = true;
                spec.cul_de_sacs = n as usize
            }),
            "--capacity" => n.map(|n| spec.capacity = n as i64),
            "--shift-limit" => n.map(|n| spec.shift_limit = Some(n as i64)),
            "--out" => {
                out = v;
                Ok(())
            }
            _ => Err(format!("unknown option {a}\n{HELP}")),
        };
        if let Err(e) = r {
            eprintln!("make_town: {e}");
            return ExitCode::from(2);
        }
    }
    // Rings and cul-de-sacs follow the size unless given.
    let sized = TownSpec::new(spec.seed, spec.blocks);
    if !rings_given {
        spec.rings = sized.rings;
    }
    if !sacs_given {
        spec.cul_de_sacs = sized.cul_de_sacs;
    }
    let inst = match town(&spec) {
        Ok(i) => i,
        Err(e) => {
            eprintln!("make_town: {e}");
            return ExitCode::from(2);
        }
    };
    if let Some(dir) = std::path::Path::new(&out).parent() {
        if !dir.as_os_str().is_empty() {
            let _ = std::fs::create_dir_all(dir);
        }
    }
    if let Err(e) = std::fs::write(&out, write_scenario(&inst)) {
        eprintln!("make_town: cannot write {out}: {e}");
        return ExitCode::from(1);
    }
    let net = inst.network();
    println!(
        "{out}: {} junctions, {} streets ({} to serve), {} bins, at most {} trucks of {} bins",
        net.len(),
        net.links.len(),
        inst.tasks().len(),
        inst.total_demand(),
        inst.fleet().max_vehicles.unwrap_or(0),
        inst.fleet().capacity
    );
    ExitCode::SUCCESS
}
