//! The logic of the `planner` example program, as a library so it can be
//! tested: argument parsing, loading a scenario with fleet overrides, writing
//! the output folder.
//!
//! The example itself (`examples/planner.rs`) only adds what needs its own
//! dependencies: the progress bar and the Ctrl-C handler.

use std::ffi::OsString;
use std::fmt;
use std::path::{Path, PathBuf};
use std::time::Duration;

use crate::model::{Cost, Fleet, Instance, ModelError};
use crate::report::OutputFile;

mod run;
pub use run::{
    load_scenario, render, resolve_scenario, run_check, run_plan, verify, CheckRun, Hooks, PlanRun,
    ProgressHook,
};

/// The scenario planned when the program is given no input file.
pub const DEFAULT_SCENARIO: &str = "instances/demo-town.json";

/// The program's help text.
pub const USAGE: &str = "\
planner: plan the routes of a street-service fleet

USAGE:
    planner [SCENARIO] [OPTIONS]        plan a scenario and write the reports
    planner check SCENARIO PLAN [FLEET OPTIONS]
                                        re-verify a plan file against a scenario:
                                        lists every problem found; exit code 0
                                        when valid, 1 on problems, 2 when a file
                                        cannot be read as a plan of the scenario

SCENARIO is our JSON scenario file or a research-format .dat file
(default: instances/demo-town.json).

OPTIONS:
    --time-limit SECS    stop searching after SECS seconds (default 10 when
                         no --iterations is given)
    --iterations N       stop searching after N iterations (with no time limit
                         the run then depends only on --seed and --workers)
    --seed N             random seed (default 1); same seed and workers, same plan
    --workers N          search threads (default: the cores available, at most 8)
    --out DIR            folder for the plan and reports (default out/)
    --quiet              no progress bar
    -h, --help           this text

FLEET OPTIONS (override the scenario's fleet):
    --capacity N         load limit of a truck
    --shift-limit N      time limit of a route, or 'none'
    --max-trucks N       largest number of trucks, or 'none'
";

/// Fleet settings given on the command line; `None` keeps the scenario's.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct FleetOverrides {
    /// New capacity.
    pub capacity: Option<Cost>,
    /// New shift limit (`Some(None)` removes it).
    pub shift_limit: Option<Option<Cost>>,
    /// New largest number of trucks (`Some(None)` removes it).
    pub max_trucks: Option<Option<usize>>,
}

impl FleetOverrides {
    /// True when nothing is overridden.
    pub fn is_empty(&self) -> bool {
        *self == FleetOverrides::default()
    }

    /// The instance with the overrides applied (revalidated).
    pub fn apply(&self, inst: Instance) -> Result<Instance, ModelError> {
        if self.is_empty() {
            return Ok(inst);
        }
        let f = inst.fleet();
        let fleet = Fleet {
            capacity: self.capacity.unwrap_or(f.capacity),
            shift_limit: self.shift_limit.unwrap_or(f.shift_limit),
            max_vehicles: self.max_trucks.unwrap_or(f.max_vehicles),
        };
        inst.with_fleet(fleet)
    }
}

/// Options of a planning run.
#[derive(Clone, Debug, PartialEq)]
pub struct PlanOptions {
    /// Scenario file; `None` plans the demo town.
    pub input: Option<PathBuf>,
    /// Search time limit; see [`PlanOptions::effective_time_limit`].
    pub time_limit: Option<Duration>,
    /// Iteration limit.
    pub iterations: Option<u64>,
    /// Random seed.
    pub seed: u64,
    /// Search threads.
    pub workers: usize,
    /// Fleet overrides.
    pub fleet: FleetOverrides,
    /// Output folder.
    pub out: PathBuf,
    /// No progress bar.
    pub quiet: bool,
}

/// The cores available to this process, at most 8 (at least 1).
pub fn default_workers() -> usize {
    std::thread::available_parallelism()
        .map_or(1, |n| n.get())
        .clamp(1, 8)
}

/// Time limit of a run given neither a time nor an iteration limit.
pub const DEFAULT_TIME_LIMIT: Duration = Duration::from_secs(10);

impl PlanOptions {
    /// The time limit in force: the one given, or [`DEFAULT_TIME_LIMIT`] when
    /// neither a time nor an iteration limit was given (an iteration limit
    /// alone gives a run that depends only on the seed and the workers).
    pub fn effective_time_limit(&self) -> Option<Duration> {
        match (self.time_limit, self.iterations) {
            (Some(t), _) => Some(t),
            (None, None) => Some(DEFAULT_TIME_LIMIT),
            (None, Some(_)) => None,
        }
    }
}

impl Default for PlanOptions {
    fn default() -> Self {
        PlanOptions {
            input: None,
            time_limit: None,
            iterations: None,
            seed: 1,
            workers: default_workers(),
            fleet: FleetOverrides::default(),
            out: PathBuf::from("out"),
            quiet: false,
        }
    }
}

/// What the command line asks for.
#[derive(Clone, Debug, PartialEq)]
pub enum Command {
    /// Plan a scenario.
    Plan(PlanOptions),
    /// Re-verify a plan file.
    Check {
        /// Scenario file.
        scenario: PathBuf,
        /// Plan file.
        plan: PathBuf,
        /// Fleet overrides the plan was made with.
        fleet: FleetOverrides,
    },
    /// Print the help text.
    Help,
}

/// A command line that cannot be understood.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct UsageError(pub String);

impl fmt::Display for UsageError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{} (try --help)", self.0)
    }
}

impl std::error::Error for UsageError {}

fn number<T: std::str::FromStr>(opt: &str, v: &str) -> Result<T, UsageError> {
    v.trim()
        .parse()
        .map_err(|_| UsageError(format!("{opt} expects a whole number, found `{v}`")))
}

fn positive(opt: &str, v: &str) -> Result<Cost, UsageError> {
    let n: Cost = number(opt, v)?;
    if n <= 0 {
        return Err(UsageError(format!("{opt} must be positive, found {n}")));
    }
    Ok(n)
}

fn is_none_word(v: &str) -> bool {
    matches!(v.trim(), "none" | "off" | "unlimited")
}

/// Parses the program's arguments (without the program name).
///
/// ```
/// use arcwright::app::{parse_args, Command};
/// let cmd = parse_args(["town.json", "--seed", "7", "--max-trucks", "none"]).unwrap();
/// let Command::Plan(o) = cmd else { panic!() };
/// assert_eq!(o.seed, 7);
/// assert_eq!(o.fleet.max_trucks, Some(None));
/// ```
pub fn parse_args<I, S>(args: I) -> Result<Command, UsageError>
where
    I: IntoIterator<Item = S>,
    S: Into<OsString>,
{
    let args: Vec<String> = args
        .into_iter()
        .map(|a| {
            a.into()
                .into_string()
                .map_err(|a| UsageError(format!("argument {a:?} is not valid text")))
        })
        .collect::<Result<_, _>>()?;
    let mut opts = PlanOptions::default();
    let mut positional: Vec<String> = Vec::new();
    let mut check = false;
    let mut i = 0;
    while i < args.len() {
        let a = args[i].as_str();
        // Accept both `--opt value` and `--opt=value`.
        let (name, inline) = match a.split_once('=') {
            Some((n, v)) if n.starts_with("--") => (n, Some(v.to_string())),
            _ => (a, None),
        };
        let takes_value = matches!(
            name,
            "--time-limit"
                | "--iterations"
                | "--seed"
                | "--workers"
                | "--capacity"
                | "--shift-limit"
                | "--max-trucks"
                | "--out"
        );
        let value = if takes_value {
            match inline {
                Some(v) => v,
                None => {
                    i += 1;
                    args.get(i)
                        .cloned()
                        .ok_or_else(|| UsageError(format!("{name} needs a value")))?
                }
            }
        } else {
            if inline.is_some() {
                return Err(UsageError(format!("{name} takes no value")));
            }
            String::new()
        };
        match name {
            "-h" | "--help" => return Ok(Command::Help),
            "--quiet" => opts.quiet = true,
            "--time-limit" => {
                let secs: f64 = value.trim().parse().map_err(|_| {
                    UsageError(format!("--time-limit expects seconds, found `{value}`"))
                })?;
                if !(secs.is_finite() && secs > 0.0 && secs < 1e9) {
                    return Err(UsageError(format!(
                        "--time-limit must be a positive number of seconds, found `{value}`"
                    )));
                }
                opts.time_limit = Some(Duration::from_secs_f64(secs));
            }
            "--iterations" => {
                let n: u64 = number(name, &value)?;
                if n == 0 {
                    return Err(UsageError("--iterations must be at least 1".into()));
                }
                opts.iterations = Some(n);
            }
            "--seed" => opts.seed = number(name, &value)?,
            "--workers" => {
                let n: usize = number(name, &value)?;
                if n == 0 {
                    return Err(UsageError("--workers must be at least 1".into()));
                }
                opts.workers = n;
            }
            "--capacity" => opts.fleet.capacity = Some(positive(name, &value)?),
            "--shift-limit" => {
                opts.fleet.shift_limit = Some(if is_none_word(&value) {
                    None
                } else {
                    Some(positive(name, &value)?)
                })
            }
            "--max-trucks" => {
                opts.fleet.max_trucks = Some(if is_none_word(&value) {
                    None
                } else {
                    Some(positive(name, &value)? as usize)
                })
            }
            "--out" => opts.out = PathBuf::from(value),
            _ if name.starts_with('-') && name.len() > 1 => {
                return Err(UsageError(format!("unknown option {name}")))
            }
            "check" if positional.is_empty() && !check => check = true,
            _ => positional.push(a.to_string()),
        }
        i += 1;
    }
    if check {
        if positional.len() != 2 {
            return Err(UsageError(
                "check needs a scenario file and a plan file".into(),
            ));
        }
        let plan = PathBuf::from(positional.pop().expect("two arguments"));
        let scenario = PathBuf::from(positional.pop().expect("two arguments"));
        return Ok(Command::Check {
            scenario,
            plan,
            fleet: opts.fleet,
        });
    }
    if positional.len() > 1 {
        return Err(UsageError(format!(
            "one scenario file at a time, found {}",
            positional.len()
        )));
    }
    opts.input = positional.pop().map(PathBuf::from);
    Ok(Command::Plan(opts))
}

/// Why a run failed.
#[derive(Debug)]
#[non_exhaustive]
pub enum AppError {
    /// The scenario or plan file could not be read.
    Input(crate::Error),
    /// The fleet overrides make the scenario invalid.
    Fleet(ModelError),
    /// Shortest paths could not be computed.
    Distances(crate::paths::DistanceError),
    /// The solver found no plan.
    Solve(crate::search::SolveError),
    /// The plan failed the independent checker and was not written.
    Refused(Vec<crate::check::Violation>),
    /// Something that should not happen (a bug): named, not hidden.
    Internal(String),
    /// An output file could not be written.
    Write {
        /// The file.
        path: PathBuf,
        /// Why.
        source: std::io::Error,
    },
}

impl fmt::Display for AppError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            AppError::Input(e) => write!(f, "{e}"),
            AppError::Fleet(e) => write!(f, "the fleet options do not fit the scenario: {e}"),
            AppError::Distances(e) => write!(f, "{e}"),
            AppError::Solve(e) => write!(f, "no plan: {e}"),
            AppError::Refused(v) => write!(
                f,
                "the plan failed the independent checker ({} problem(s)); nothing was written",
                v.len()
            ),
            AppError::Internal(m) => write!(f, "internal error: {m}"),
            AppError::Write { path, source } => {
                write!(f, "cannot write {}: {source}", path.display())
            }
        }
    }
}

impl std::error::Error for AppError {}

/// Whether `name` is one of the files the planner writes (so that a new
/// run may replace it): `plan.json`, `plan.geojson`, `plan.svg`,
/// `sheets.md`, `summary.txt` and `truck-N.csv`.
pub fn is_planner_output(name: &str) -> bool {
    matches!(
        name,
        "plan.json" | "plan.geojson" | "plan.svg" | "sheets.md" | "summary.txt"
    ) || name
        .strip_prefix("truck-")
        .and_then(|r| r.strip_suffix(".csv"))
        .is_some_and(|n| !n.is_empty() && n.bytes().all(|b| b.is_ascii_digit()))
}

/// Writes `files` into `dir` (created if needed) and returns their paths.
/// Outputs of an earlier run in `dir` ([`is_planner_output`]) are removed
/// first, so that no truck sheet or map of another plan is left beside the
/// new one; other files are left alone.
pub fn write_files(dir: &Path, files: &[OutputFile]) -> Result<Vec<PathBuf>, AppError> {
    std::fs::create_dir_all(dir).map_err(|source| AppError::Write {
        path: dir.to_path_buf(),
        source,
    })?;
    let entries = std::fs::read_dir(dir).map_err(|source| AppError::Write {
        path: dir.to_path_buf(),
        source,
    })?;
    for e in entries.flatten() {
        let name = e.file_name();
        let is_file = e.file_type().is_ok_and(|t| t.is_file());
        if is_file && name.to_str().is_some_and(is_planner_output) {
            let path = e.path();
            std::fs::remove_file(&path).map_err(|source| AppError::Write { path, source })?;
        }
    }
    let mut written = Vec::new();
    for f in files {
        let path = dir.join(&f.name);
        std::fs::write(&path, &f.contents).map_err(|source| AppError::Write {
            path: path.clone(),
            source,
        })?;
        written.push(path);
    }
    Ok(written)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn plan(args: &[&str]) -> PlanOptions {
        match parse_args(args.iter().copied()).unwrap() {
            Command::Plan(o) => o,
            other => panic!("{other:?}"),
        }
    }

    #[test]
    fn no_arguments_plan_the_demo_with_defaults() {
        let o = plan(&[]);
        assert_eq!(o, PlanOptions::default());
        assert_eq!(o.effective_time_limit(), Some(DEFAULT_TIME_LIMIT));
        assert_eq!(plan(&["--iterations", "5"]).effective_time_limit(), None);
    }

    #[test]
    fn options_are_read_in_both_spellings() {
        let o = plan(&[
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
        ]);
        assert_eq!(o.input, Some(PathBuf::from("gdb1.dat")));
        assert_eq!(o.time_limit, Some(Duration::from_millis(2500)));
        assert_eq!(o.effective_time_limit(), o.time_limit);
        assert_eq!(o.iterations, Some(300));
        assert_eq!((o.seed, o.workers), (9, 2));
        assert_eq!(
            o.fleet,
            FleetOverrides {
                capacity: Some(40),
                shift_limit: Some(None),
                max_trucks: Some(Some(3)),
            }
        );
        assert_eq!(o.out, PathBuf::from("results"));
        assert!(o.quiet);
    }

    #[test]
    fn check_takes_a_scenario_and_a_plan() {
        assert_eq!(
            parse_args(["check", "a.json", "out/plan.json", "--capacity", "9"]).unwrap(),
            Command::Check {
                scenario: "a.json".into(),
                plan: "out/plan.json".into(),
                fleet: FleetOverrides {
                    capacity: Some(9),
                    ..Default::default()
                },
            }
        );
        assert!(parse_args(["check", "a.json"]).is_err());
    }

    #[test]
    fn a_new_run_replaces_only_planner_outputs() {
        for n in [
            "plan.json",
            "plan.svg",
            "truck-1.csv",
            "truck-007.csv",
            "sheets.md",
        ] {
            assert!(is_planner_output(n), "{n}");
        }
        for n in [
            "notes.txt",
            "truck-.csv",
            "truck-a.csv",
            "plan.json.bak",
            "my-plan.json",
        ] {
            assert!(!is_planner_output(n), "{n}");
        }
        let dir = std::env::temp_dir().join(format!("arcwright-app-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&dir);
        std::fs::create_dir_all(&dir).unwrap();
        for n in ["truck-9.csv", "plan.svg", "notes.txt"] {
            std::fs::write(dir.join(n), "old").unwrap();
        }
        let new = [OutputFile {
            name: "truck-1.csv".into(),
            contents: "new".into(),
        }];
        let written = write_files(&dir, &new).unwrap();
        assert_eq!(written, vec![dir.join("truck-1.csv")]);
        let mut left: Vec<String> = std::fs::read_dir(&dir)
            .unwrap()
            .map(|e| e.unwrap().file_name().into_string().unwrap())
            .collect();
        left.sort();
        assert_eq!(left, ["notes.txt", "truck-1.csv"]);
        std::fs::remove_dir_all(&dir).unwrap();
    }

    #[test]
    fn bad_command_lines_say_what_is_wrong() {
        let err = |args: &[&str]| parse_args(args.iter().copied()).unwrap_err().0;
        assert!(err(&["--seed"]).contains("--seed needs a value"));
        assert!(err(&["--seed", "x"]).contains("whole number"));
        assert!(err(&["--capacity", "0"]).contains("positive"));
        assert!(err(&["--time-limit", "-1"]).contains("positive"));
        assert!(err(&["--colour"]).contains("unknown option --colour"));
        assert!(err(&["a.json", "b.json"]).contains("one scenario"));
        assert!(err(&["--quiet=yes"]).contains("takes no value"));
        assert_eq!(parse_args(["-h"]).unwrap(), Command::Help);
    }
}
