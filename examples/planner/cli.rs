//! The command line, read with clap (derive): options, their checks and
//! defaults, and the fleet overrides.

use std::path::PathBuf;
use std::time::Duration;

use arcwright::model::{Cost, Fleet, Instance, ModelError};
use arcwright::LpBudget;
use clap::{Args, Parser, Subcommand};

/// The scenario planned when the program is given no input file.
pub const DEFAULT_SCENARIO: &str = "instances/demo-town.json";

/// Time limit of a run given neither a time nor an iteration limit.
pub const DEFAULT_TIME_LIMIT: Duration = Duration::from_secs(10);

/// planner: plan the routes of a street-service fleet and write the plan,
/// route sheets and maps into a folder.
#[derive(Debug, Parser)]
#[command(
    name = "planner",
    version,
    args_conflicts_with_subcommands = true,
    allow_negative_numbers = true,
    after_help = "SCENARIO is our JSON scenario file, a research-format .dat file, \
                  or a street map: an OpenStreetMap extract (.osm.pbf, .osm) or GeoJSON \
                  street lines (.geojson), built with --profile and --yard \
                  (default: instances/demo-town.json).\n\
                  `planner check SCENARIO PLAN` re-verifies a plan file (plain or fleet, with tips): it lists every \
                  problem found; exit code 0 when valid, 1 on problems, 2 when a file \
                  cannot be read as a plan of the scenario."
)]
pub struct Cli {
    /// Re-verify a plan file instead of planning.
    #[command(subcommand)]
    pub command: Option<Sub>,
    /// Options of a planning run.
    #[command(flatten)]
    pub plan: PlanArgs,
}

/// Subcommands.
#[derive(Debug, Subcommand)]
pub enum Sub {
    /// Re-verify a plan file against its scenario (the scenario first).
    Check(CheckArgs),
}

/// `planner check SCENARIO PLAN [FLEET OPTIONS]`.
#[derive(Debug, Args)]
pub struct CheckArgs {
    /// The scenario the plan was made for.
    pub scenario: PathBuf,
    /// The plan file (plan.json).
    pub plan: PathBuf,
    /// The fleet options the plan was made with.
    #[command(flatten)]
    pub fleet: FleetArgs,
    /// The map options the plan was made with (map scenarios only).
    #[command(flatten)]
    pub map: MapArgs,
}

/// How a map file (`.osm.pbf`, `.osm`, `.geojson`) becomes a scenario.
#[derive(Clone, Debug, Default, PartialEq, Eq, Args)]
pub struct MapArgs {
    /// Service profile for a map: `refuse` (default), `gritting` or a TOML file (its `[turn_rules]` table, if any, applies turn rules with the map's restrictions).
    #[arg(long, value_name = "NAME|FILE")]
    pub profile: Option<String>,
    /// Yard of a map scenario: `LON,LAT` (snapped to the nearest drivable
    /// junction) or `node:ID`; default: the junction nearest the map's centre.
    #[arg(long, value_name = "LON,LAT|node:ID")]
    pub yard: Option<String>,
}

/// Options of a planning run.
#[derive(Debug, Args)]
pub struct PlanArgs {
    /// Scenario file (JSON scenario, .dat, or a map: .osm.pbf, .osm, .geojson); default: the demo town.
    pub scenario: Option<PathBuf>,
    /// Stop searching after SECS seconds (default 10 when no --iterations is given).
    #[arg(long, value_name = "SECS", value_parser = parse_seconds)]
    pub time_limit: Option<Duration>,
    /// Stop searching after N iterations (alone: the run depends only on --seed and --workers).
    /// An iteration is one offspring, or one ruin-and-recreate move when a large plan is improved by districts.
    #[arg(long, value_name = "N", value_parser = clap::value_parser!(u64).range(1..))]
    pub iterations: Option<u64>,
    /// Random seed; same seed and workers, same plan.
    #[arg(long, value_name = "N", default_value_t = 1)]
    pub seed: u64,
    /// Search threads (default: the cores available, at most 8).
    #[arg(long, value_name = "N", value_parser = clap::value_parser!(u64).range(1..=1024))]
    pub workers: Option<u64>,
    /// Folder for the plan and reports.
    #[arg(long, value_name = "DIR", default_value = "out")]
    pub out: PathBuf,
    /// No progress bar.
    #[arg(long)]
    pub quiet: bool,
    /// Skip the LP lower bound that otherwise runs beside the search, and
    /// report the gap against the quick combinatorial bound only.
    #[arg(long)]
    pub quick_bound: bool,
    /// Fleet overrides.
    #[command(flatten)]
    pub fleet: FleetArgs,
    /// Map options.
    #[command(flatten)]
    pub map: MapArgs,
    /// Also save the scenario as read (a map's built network, with fleet
    /// overrides) as our JSON scenario, for editing or `planner check`.
    #[arg(long, value_name = "FILE")]
    pub save_scenario: Option<PathBuf>,
}

/// Fleet settings given on the command line; `None` keeps the scenario's.
#[derive(Clone, Debug, Default, PartialEq, Eq, Args)]
pub struct FleetArgs {
    /// Load limit of a truck (overrides the scenario's).
    #[arg(long, value_name = "N", value_parser = parse_positive)]
    pub capacity: Option<Cost>,
    /// Time limit of a route in the scenario's time unit, or 'none'.
    #[arg(long, value_name = "N|none", value_parser = parse_limit)]
    pub shift_limit: Option<Limit>,
    /// Largest number of trucks, or 'none'.
    #[arg(long, value_name = "N|none", value_parser = parse_limit)]
    pub max_trucks: Option<Limit>,
}

/// A positive whole number or no limit at all.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Limit(pub Option<Cost>);

fn parse_seconds(v: &str) -> Result<Duration, String> {
    let secs: f64 = v
        .trim()
        .parse()
        .map_err(|_| format!("expects seconds, found `{v}`"))?;
    if !(secs.is_finite() && secs > 0.0 && secs < 1e9) {
        return Err(format!("must be a positive number of seconds, found `{v}`"));
    }
    Ok(Duration::from_secs_f64(secs))
}

fn parse_positive(v: &str) -> Result<Cost, String> {
    let n: Cost = v
        .trim()
        .parse()
        .map_err(|_| format!("expects a whole number, found `{v}`"))?;
    if n <= 0 {
        return Err(format!("must be positive, found {n}"));
    }
    if n > arcwright::io::MAX_NUMBER {
        return Err(format!(
            "must be at most {}, found {n}",
            arcwright::io::MAX_NUMBER
        ));
    }
    Ok(n)
}

fn parse_limit(v: &str) -> Result<Limit, String> {
    if matches!(v.trim(), "none" | "off" | "unlimited") {
        return Ok(Limit(None));
    }
    parse_positive(v).map(|n| Limit(Some(n)))
}

impl FleetArgs {
    /// True when nothing is overridden.
    pub fn is_empty(&self) -> bool {
        *self == FleetArgs::default()
    }

    /// The instance with the overrides applied (revalidated).
    pub fn apply(&self, inst: Instance) -> Result<Instance, ModelError> {
        if self.is_empty() {
            return Ok(inst);
        }
        let f = inst.fleet();
        let fleet = Fleet {
            capacity: self.capacity.unwrap_or(f.capacity),
            shift_limit: self.shift_limit.map_or(f.shift_limit, |l| l.0),
            max_vehicles: self
                .max_trucks
                .map_or(f.max_vehicles, |l| l.0.map(|n| n as usize)),
        };
        inst.with_fleet(fleet)
    }
}

/// LP solves of the bound in a run limited by iterations alone: enough for
/// every public instance (measured with `examples/bound_report.rs`: at most
/// a few dozen rounds on gdb, val and egl), while a large town stops early
/// with the value reached.
pub const LP_ROUNDS: usize = 100;

impl PlanArgs {
    /// The time limit in force: the one given, or [`DEFAULT_TIME_LIMIT`]
    /// when neither a time nor an iteration limit was given (an iteration
    /// limit alone gives a run that depends only on the seed and workers).
    pub fn effective_time_limit(&self) -> Option<Duration> {
        match (self.time_limit, self.iterations) {
            (Some(t), _) => Some(t),
            (None, None) => Some(DEFAULT_TIME_LIMIT),
            (None, Some(_)) => None,
        }
    }

    /// The LP bound's budget, `None` with `--quick-bound`: the run's time
    /// limit when it has one; with an iteration limit alone,
    /// [`LP_ROUNDS`] LP solves (so the run still depends only on the seed
    /// and workers).
    pub fn lp_budget(&self) -> Option<LpBudget> {
        match (self.quick_bound, self.effective_time_limit()) {
            (true, _) => None,
            (false, Some(_)) => Some(LpBudget::with_search()),
            (false, None) => Some(LpBudget::rounds(LP_ROUNDS)),
        }
    }

    /// The search threads: the ones given, or the cores available (1..=8).
    pub fn effective_workers(&self) -> usize {
        match self.workers {
            Some(n) => n as usize,
            None => std::thread::available_parallelism()
                .map_or(1, |n| n.get())
                .clamp(1, 8),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use clap::error::ErrorKind;

    fn parse(args: &[&str]) -> Result<Cli, clap::Error> {
        Cli::try_parse_from(std::iter::once("planner").chain(args.iter().copied()))
    }

    #[test]
    fn no_arguments_plan_the_demo_with_defaults() {
        let c = parse(&[]).unwrap();
        assert!(c.command.is_none());
        assert_eq!(c.plan.scenario, None);
        assert_eq!(c.plan.seed, 1);
        assert_eq!(c.plan.out, PathBuf::from("out"));
        assert_eq!(c.plan.effective_time_limit(), Some(DEFAULT_TIME_LIMIT));
        let c = parse(&["--iterations", "5"]).unwrap();
        assert_eq!(c.plan.effective_time_limit(), None);
    }

    #[test]
    fn options_are_read_in_both_spellings() {
        let c = parse(&[
            "gdb1.dat",
            "--time-limit=2.5",
            "--iterations",
            "300",
            "--seed",
            "9",
            "--workers=2",
            "--capacity",
            "40",
            "--shift-limit",
            "none",
            "--max-trucks",
            "3",
            "--out",
            "results",
            "--quiet",
        ])
        .unwrap();
        let o = c.plan;
        assert_eq!(o.scenario, Some(PathBuf::from("gdb1.dat")));
        assert_eq!(o.time_limit, Some(Duration::from_millis(2500)));
        assert_eq!(o.iterations, Some(300));
        assert_eq!((o.seed, o.effective_workers()), (9, 2));
        assert_eq!(
            o.fleet,
            FleetArgs {
                capacity: Some(40),
                shift_limit: Some(Limit(None)),
                max_trucks: Some(Limit(Some(3))),
            }
        );
        assert_eq!(o.out, PathBuf::from("results"));
        assert!(o.quiet);
        let c = parse(&[
            "town.osm.pbf",
            "--profile",
            "gritting",
            "--yard",
            "24.94,60.17",
            "--save-scenario",
            "town.json",
        ])
        .unwrap();
        assert_eq!(c.plan.map.profile.as_deref(), Some("gritting"));
        assert_eq!(c.plan.map.yard.as_deref(), Some("24.94,60.17"));
        assert_eq!(c.plan.save_scenario, Some(PathBuf::from("town.json")));
    }

    #[test]
    fn check_takes_a_scenario_and_a_plan_and_fleet_options_only() {
        let c = parse(&["check", "a.json", "out/plan.json", "--capacity", "9"]).unwrap();
        let Some(Sub::Check(k)) = c.command else {
            panic!("not check")
        };
        assert_eq!(k.scenario, PathBuf::from("a.json"));
        assert_eq!(k.plan, PathBuf::from("out/plan.json"));
        assert_eq!(k.fleet.capacity, Some(9));
        assert!(parse(&["check", "a.json"]).is_err());
        // Options of a planning run mean nothing to `check`: refused.
        for opt in [["--seed", "3"], ["--out", "x"], ["--iterations", "5"]] {
            let mut args = vec!["check", "a.json", "p.json"];
            args.extend(opt);
            let e = parse(&args).unwrap_err();
            assert_eq!(e.kind(), ErrorKind::UnknownArgument, "{opt:?}");
        }
    }

    #[test]
    fn bad_command_lines_say_what_is_wrong() {
        let err = |args: &[&str]| parse(args).unwrap_err().to_string();
        assert!(err(&["--seed"]).contains("--seed"));
        assert!(err(&["--seed", "x"]).contains("invalid value"));
        assert!(err(&["--capacity", "0"]).contains("positive"));
        assert!(err(&["--time-limit", "-1"]).contains("positive"));
        assert!(err(&["--workers", "0"]).contains("--workers"));
        assert!(err(&["a.json", "b.json"]).contains("b.json"));
        assert!(err(&["--quiet=yes"]).contains("--quiet"));
        // A misspelt option gets a suggestion.
        assert!(
            err(&["--iteration", "5"]).contains("--iterations"),
            "{}",
            err(&["--iteration", "5"])
        );
        assert_eq!(
            parse(&["--version"]).unwrap_err().kind(),
            ErrorKind::DisplayVersion
        );
        assert_eq!(parse(&["-h"]).unwrap_err().kind(), ErrorKind::DisplayHelp);
    }
}
