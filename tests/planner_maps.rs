//! The planner on street maps, driven as a user runs it: a GeoJSON export
//! and an OpenStreetMap extract of central Helsinki (© OpenStreetMap
//! contributors, ODbL 1.0) planned directly, the built scenario saved as
//! JSON, the plan checked by the independent checker against it, the map
//! outputs drawn along the real street shapes (GeoJSON read with the
//! `geojson` crate, SVG with `roxmltree`), and bad maps refused with nothing
//! written.

mod common;

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use arcwright::check::check_plan;
use arcwright::io::plan_json::read_plan;
use arcwright::io::read_scenario_file;

const ROOT: &str = env!("CARGO_MANIFEST_DIR");
const GEOJSON: &str = "tests/fixtures/osm/helsinki_streets.geojson";

/// The planner binary (built on first use; see `common::planner_exe`).
fn exe() -> &'static Path {
    common::planner_exe()
}

fn planner(args: &[&std::ffi::OsStr]) -> Output {
    Command::new(exe())
        .args(args)
        .current_dir(ROOT)
        .output()
        .unwrap()
}

fn text(o: &Output) -> (String, String) {
    (
        String::from_utf8_lossy(&o.stdout).into_owned(),
        String::from_utf8_lossy(&o.stderr).into_owned(),
    )
}

fn out_dir(name: &str) -> PathBuf {
    let d = Path::new(env!("CARGO_TARGET_TMPDIR")).join(name);
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

/// Plans a map and checks everything it wrote; returns stdout.
fn plan_map(map: &Path, extra: &[&str], dir: &Path) -> String {
    let out = dir.join("out");
    let saved = dir.join("built.json");
    let mut args: Vec<&std::ffi::OsStr> = vec![map.as_os_str()];
    args.extend(extra.iter().map(std::ffi::OsStr::new));
    args.extend([
        "--iterations".as_ref(),
        "20".as_ref(),
        "--seed".as_ref(),
        "3".as_ref(),
        "--quiet".as_ref(),
        "--out".as_ref(),
        out.as_os_str(),
        "--save-scenario".as_ref(),
        saved.as_os_str(),
    ]);
    let o = planner(&args);
    let (stdout, stderr) = text(&o);
    assert!(o.status.success(), "{stdout}\n{stderr}");
    // The saved scenario is the network planned: the plan passes the
    // independent checker against it.
    let inst = read_scenario_file(&saved).unwrap();
    let plan_text = std::fs::read_to_string(out.join("plan.json")).unwrap();
    let plan = read_plan(&plan_text, "plan.json", &inst).unwrap();
    check_plan(&inst, &plan).unwrap();
    assert_eq!(plan.visits(), inst.tasks().len());
    // Real shapes: served streets are drawn with their inner points.
    let gj: geojson::GeoJson = std::fs::read_to_string(out.join("plan.geojson"))
        .unwrap()
        .parse()
        .unwrap();
    let geojson::GeoJson::FeatureCollection(fc) = gj else {
        panic!("not a FeatureCollection")
    };
    let longest = fc
        .features
        .iter()
        .filter_map(|f| match &f.geometry.as_ref()?.value {
            geojson::Value::LineString(c) => Some(c.len()),
            _ => None,
        })
        .max()
        .unwrap();
    assert!(longest > 10, "longest line has {longest} points");
    let svg = std::fs::read_to_string(out.join("plan.svg")).unwrap();
    let doc = roxmltree::Document::parse(&svg).unwrap();
    let many = doc
        .descendants()
        .filter(|n| n.has_tag_name("polyline"))
        .filter(|n| n.attribute("points").unwrap_or("").split(' ').count() > 10)
        .count();
    assert!(many > 10, "{many} polylines with more than ten points");
    stdout
}

#[test]
fn geojson_map_is_planned_directly() {
    let dir = out_dir("map-geojson");
    let stdout = plan_map(&Path::new(ROOT).join(GEOJSON), &[], &dir);
    assert!(stdout.contains("366 streets"), "{stdout}");
    assert!(stdout.contains("no yard given"), "{stdout}");
    assert!(stdout.contains("Units: costs in m"), "{stdout}");
}

/// A profile with `[turn_rules]` plans the map under the rules and the
/// map's own turn restrictions: streets the rules cut off are reported, the
/// plan file carries the walks, and `check` re-verifies them turn by turn.
#[test]
fn osm_extract_is_planned_with_turn_rules_and_its_restrictions() {
    let Some(pbf) = common::shared_osm(
        "planner_maps::osm_extract_is_planned_with_turn_rules_and_its_restrictions",
    ) else {
        return;
    };
    let dir = out_dir("map-pbf-turns");
    let base =
        std::fs::read_to_string(Path::new(ROOT).join("src/map/profiles/refuse.toml")).unwrap();
    let profile = dir.join("refuse-turns.toml");
    std::fs::write(
        &profile,
        format!("{base}\n[turn_rules]\npenalties = {{ left = 30, u_turn = 60 }}\n"),
    )
    .unwrap();
    let p = profile.to_str().unwrap();
    let stdout = plan_map(&pbf, &["--profile", p], &dir);
    assert!(stdout.contains("31 turn restrictions"), "{stdout}");
    assert!(stdout.contains("cut off from the yard"), "{stdout}");
    assert!(stdout.contains("U-turns"), "{stdout}");
    let plan_text = std::fs::read_to_string(dir.join("out/plan.json")).unwrap();
    assert!(plan_text.contains("\"walk\""));
    // The GeoJSON steps carry their manoeuvres (read with the geojson crate).
    let gj: geojson::GeoJson = std::fs::read_to_string(dir.join("out/plan.geojson"))
        .unwrap()
        .parse()
        .unwrap();
    let geojson::GeoJson::FeatureCollection(fc) = gj else {
        panic!("not a FeatureCollection")
    };
    let said = fc
        .features
        .iter()
        .filter(|f| f.property("manoeuvre").is_some())
        .count();
    assert_eq!(said + 1, fc.features.len(), "every step but the yard");
    let plan = dir.join("out/plan.json");
    let o = planner(&[
        "check".as_ref(),
        pbf.as_os_str(),
        plan.as_os_str(),
        "--profile".as_ref(),
        p.as_ref(),
    ]);
    let (stdout, stderr) = text(&o);
    assert!(o.status.success(), "{stdout}\n{stderr}");
}

#[test]
fn osm_extract_is_planned_with_profile_and_yard_and_checked() {
    let Some(pbf) = common::shared_osm(
        "planner_maps::osm_extract_is_planned_with_profile_and_yard_and_checked",
    ) else {
        return;
    };
    let dir = out_dir("map-pbf");
    let stdout = plan_map(
        &pbf,
        &["--profile", "gritting", "--yard", "24.9402,60.1701"],
        &dir,
    );
    assert!(stdout.contains("gritting"), "{stdout}");
    assert!(stdout.contains("31 turn restrictions"), "{stdout}");
    assert!(stdout.contains("snapped"), "{stdout}");
    // OpenStreetMap data: every output for people carries its attribution.
    for f in ["plan.svg", "plan.geojson", "summary.txt", "sheets.md"] {
        let t = std::fs::read_to_string(dir.join("out").join(f)).unwrap();
        assert!(t.contains("© OpenStreetMap contributors"), "{f}");
    }
    // `check` rebuilds the same network from the map with the same options.
    let plan = dir.join("out/plan.json");
    let o = planner(&[
        "check".as_ref(),
        pbf.as_os_str(),
        plan.as_os_str(),
        "--profile".as_ref(),
        "gritting".as_ref(),
        "--yard".as_ref(),
        "24.9402,60.1701".as_ref(),
    ]);
    let (stdout, stderr) = text(&o);
    assert!(o.status.success(), "{stdout}\n{stderr}");
    assert!(stdout.contains("valid"), "{stdout}");
}

#[test]
fn bad_maps_are_refused_and_nothing_is_written() {
    let dir = out_dir("map-bad");
    let points = dir.join("bins.geojson");
    std::fs::write(
        &points,
        r#"{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Point","coordinates":[24.9,60.1]}}]}"#,
    )
    .unwrap();
    let bytes =
        std::fs::read(Path::new(ROOT).join("tests/fixtures/osm/no_highways.osm.pbf")).unwrap();
    let truncated = dir.join("cut.osm.pbf");
    std::fs::write(&truncated, &bytes[..bytes.len() - 40]).unwrap();
    let typo = dir.join("typo.toml");
    std::fs::write(
        &typo,
        "name = \"x\"\n[truck]\ncapacity = 100\n[demand]\nper_km_of_kerb = 1\n[classes]\nresidental = { drive_kmh = 20, serve = \"no\" }\n",
    )
    .unwrap();
    let map = Path::new(ROOT).join(GEOJSON);
    let no_highways = Path::new(ROOT).join("tests/fixtures/osm/no_highways.osm.pbf");
    let cases: Vec<(Vec<&std::ffi::OsStr>, &str)> = vec![
        (vec![points.as_os_str()], "bins.geojson"),
        (vec![truncated.as_os_str()], "cut.osm.pbf"),
        (vec![no_highways.as_os_str()], "no streets"),
        (
            vec![map.as_os_str(), "--yard".as_ref(), "10.0,50.0".as_ref()],
            "yard",
        ),
        (
            vec![map.as_os_str(), "--profile".as_ref(), typo.as_os_str()],
            "residental",
        ),
        (
            vec![map.as_os_str(), "--yard".as_ref(), "north gate".as_ref()],
            "north gate",
        ),
    ];
    let out = dir.join("out");
    let saved = dir.join("built.json");
    for (mut args, word) in cases {
        args.extend([
            "--iterations".as_ref(),
            "5".as_ref(),
            "--out".as_ref(),
            out.as_os_str(),
            "--save-scenario".as_ref(),
            saved.as_os_str(),
        ]);
        let o = planner(&args);
        let (_, stderr) = text(&o);
        assert_eq!(o.status.code(), Some(2), "{args:?}: {stderr}");
        assert!(stderr.contains(word), "{args:?}: {stderr}");
        assert!(
            !out.exists() && !saved.exists(),
            "{args:?}: something was written"
        );
    }
    // Map options on a scenario that is not a map are a usage error.
    let o = planner(&[
        "instances/demo-town.json".as_ref(),
        "--yard".as_ref(),
        "node:1".as_ref(),
        "--out".as_ref(),
        out.as_os_str(),
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(text(&o).1.contains("--yard"), "{}", text(&o).1);
}
