//! Builds the scenario of a map file and prints what was built, with the
//! read and build times: `cargo run --release --example map_build -- MAP
//! [--profile refuse|gritting|FILE.toml] [--yard LON,LAT|node:ID] [--save OUT.json]`.
//!
//! MAP is an OpenStreetMap extract (`.osm.pbf`, `.osm`) or a GeoJSON file of
//! street lines (`.geojson`). Nothing is written unless the build succeeds.

use std::process::ExitCode;
use std::time::Instant;

use arcwright::io::write_scenario;
use arcwright::map::{build_scenario, read_map, MapOptions, Profile, YardChoice};

fn run() -> Result<(), String> {
    let mut args = std::env::args().skip(1);
    let mut map = None;
    let mut opts = MapOptions::default();
    let mut save = None;
    while let Some(a) = args.next() {
        let mut value = |name: &str| args.next().ok_or(format!("{name} needs a value"));
        match a.as_str() {
            "--profile" => {
                opts.profile =
                    Profile::named_or_file(&value("--profile")?).map_err(|e| e.to_string())?
            }
            "--yard" => {
                opts.yard = Some(
                    value("--yard")?
                        .parse::<YardChoice>()
                        .map_err(|e| e.to_string())?,
                )
            }
            "--save" => save = Some(value("--save")?),
            _ if map.is_none() && !a.starts_with("--") => map = Some(a),
            _ => return Err(format!("unexpected argument {a}")),
        }
    }
    let map =
        map.ok_or("usage: map_build MAP [--profile P] [--yard LON,LAT|node:ID] [--save OUT.json]")?;
    let t0 = Instant::now();
    let raw = read_map(map.as_ref()).map_err(|e| e.to_string())?;
    let t1 = Instant::now();
    let built = build_scenario(&raw, &opts).map_err(|e| e.to_string())?;
    let t2 = Instant::now();
    println!("{}", built.report);
    println!(
        "read {:.1} ms, build {:.1} ms",
        (t1 - t0).as_secs_f64() * 1e3,
        (t2 - t1).as_secs_f64() * 1e3
    );
    if let Some(out) = save {
        std::fs::write(&out, write_scenario(&built.instance)).map_err(|e| format!("{out}: {e}"))?;
        println!("scenario written to {out}");
    }
    Ok(())
}

fn main() -> ExitCode {
    match run() {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("error: {e}");
            ExitCode::FAILURE
        }
    }
}
