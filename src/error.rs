//! Typed errors for everything that reads or validates input.
//!
//! Every error names where it came from: a file (or `<memory>` for text
//! handed in directly), a line where the format has lines, and what was
//! expected. Nothing in the readers panics on bad input.

use std::fmt;

use crate::model::ModelError;

/// Where a problem was found in an input text.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Location {
    /// The file name as given by the caller (`<memory>` for in-memory text).
    pub file: String,
    /// 1-based line number, when the format has a meaningful line.
    pub line: Option<usize>,
}

impl fmt::Display for Location {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self.line {
            Some(l) => write!(f, "{}:{}", self.file, l),
            None => write!(f, "{}", self.file),
        }
    }
}

/// What went wrong while reading a text format.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum ParseProblem {
    /// The text ended before the format was complete.
    #[error("file ends early: expected {expected}")]
    Truncated {
        /// What was expected.
        expected: String,
    },
    /// A header count disagrees with what the file lists.
    #[error("header says {what} = {header}, but the file lists {found}")]
    CountMismatch {
        /// The header key.
        what: &'static str,
        /// The count the header gives.
        header: usize,
        /// What the input has instead.
        found: usize,
    },
    /// A vertex number outside `1..=vertices`.
    #[error("vertex {vertex} is not in 1..={max}")]
    UnknownVertex {
        /// The vertex as the problem names it.
        vertex: i64,
        /// The largest value accepted.
        max: usize,
    },
    /// A number was expected.
    #[error("expected {expected}, found `{found}`")]
    NotANumber {
        /// What was expected.
        expected: &'static str,
        /// What the input has instead.
        found: String,
    },
    /// A cost, demand or count that must not be negative.
    #[error("{what} must not be negative, found {value}")]
    Negative {
        /// What the number is (cost, demand, ...).
        what: &'static str,
        /// The value found.
        value: i64,
    },
    /// The yard (the research format's `DEPOSITO`) was given twice.
    #[error("the yard (DEPOSITO) is given twice (first on line {first_line})")]
    DuplicateDepot {
        /// The line of the first one.
        first_line: usize,
    },
    /// A header key appears twice.
    #[error("header key {key} given twice")]
    DuplicateKey {
        /// The header key.
        key: String,
    },
    /// A required header key is absent.
    #[error("missing header key {key}")]
    MissingKey {
        /// The header key.
        key: &'static str,
    },
    /// A line that fits nowhere in the format.
    #[error("unexpected line: expected {expected}, found `{found}`")]
    Unexpected {
        /// What was expected.
        expected: &'static str,
        /// What the input has instead.
        found: String,
    },
    /// A header count larger than what the file lists can use.
    #[error("header says {what} = {header}, but the edges listed can use at most {most}")]
    Unbacked {
        /// The header key.
        what: &'static str,
        /// The count the header gives.
        header: usize,
        /// The most the listed edges can use.
        most: usize,
    },
    /// A `demanda` on an edge listed under `LISTA_ARISTAS_NOREQ`.
    #[error("an edge under LISTA_ARISTAS_NOREQ has a demand (`demanda`); list edges with a demand under LISTA_ARISTAS_REQ")]
    DemandNotRequired,
    /// Bytes that are not UTF-8 text.
    #[error("not UTF-8 text (byte {byte} of the file)")]
    NotUtf8 {
        /// The 1-based position of the first byte that is not UTF-8.
        byte: usize,
    },
    /// JSON that does not match the schema (wrong type, missing field, bad syntax).
    #[error("{message}")]
    Json {
        /// The JSON reader's message (the column included).
        message: String,
    },
    /// The text read fine but the model it describes is invalid.
    #[error("{0}")]
    Model(ModelError),
    /// The scenario's turn rules cannot be used.
    #[error("{0}")]
    Turn(crate::turns::TurnError),
    /// A problem at a place inside a structured (JSON) document, given as a
    /// path such as `streets[12].to`.
    #[error("at `{path}`: {problem}")]
    AtPath {
        /// The JSON path, such as `streets[12].to`.
        path: String,
        /// The problem at that place.
        problem: Box<ParseProblem>,
    },
    /// A junction id that no junction has.
    #[error("no junction has id {id}")]
    UnknownJunction {
        /// The junction id as the file gives it.
        id: u64,
    },
    /// Two junctions with the same id.
    #[error("junction id {id} given twice (first at junctions[{first}])")]
    DuplicateJunction {
        /// The junction id as the file gives it.
        id: u64,
        /// Index of the first junction with this id (`junctions[first]`).
        first: usize,
    },
    /// A number beyond what the crate accepts (see [`crate::io::MAX_NUMBER`]).
    #[error("{what} {value} is too large (at most {max})")]
    TooLarge {
        /// What the number is (cost, demand, ...).
        what: &'static str,
        /// The value found.
        value: u64,
        /// The largest value accepted.
        max: u64,
    },
    /// A plan file serves a (from, to) pair that is not the required street
    /// (`link`) it names. Shown with trucks and services numbered from 1.
    #[error("Truck {}, service {}: junctions {from} to {to} with `link` {link} is not a street to serve, in a direction it may be served", .route + 1, .position + 1)]
    NotARequiredLink {
        /// The route (0-based).
        route: usize,
        /// The service within the route (0-based).
        position: usize,
        /// The start junction as the file gives it.
        from: u64,
        /// The end junction as the file gives it.
        to: u64,
        /// The link index the file gives (may be out of range).
        link: i64,
    },
    /// A plan file serves the same required street twice. Shown with trucks
    /// and services numbered from 1.
    #[error("Truck {}, service {}: street #{link} is already served earlier", .route + 1, .position + 1)]
    ServedTwice {
        /// The route (0-based).
        route: usize,
        /// The service within the route (0-based).
        position: usize,
        /// Index of the link (street) in `Network::links` (for a scenario: `streets[link]`).
        link: usize,
    },
    /// A plan file is for another instance.
    #[error("the plan is for instance `{found}`, not `{expected}`")]
    WrongInstance {
        /// What was expected.
        expected: String,
        /// What the input has instead.
        found: String,
    },
    /// Two fields that exclude each other are both given.
    #[error("`{given}` and `{other}` are both given; give one of them")]
    Conflict {
        /// The field found.
        given: &'static str,
        /// The field it excludes.
        other: &'static str,
    },
    /// A name that refers to nothing (a truck type's yard, say).
    #[error("no {what} is named `{name}`")]
    UnknownName {
        /// What kind of thing was named ("yard", "truck type", "dump site").
        what: &'static str,
        /// The name given.
        name: String,
    },
    /// A junction coordinate that cannot be in the scenario's declared
    /// coordinate system (not finite, a latitude beyond ±90°, ...).
    #[error("{0}")]
    Coordinate(crate::model::CoordError),
    /// A cost or load stated in a plan file differs from the recomputed one.
    #[error("{what}: the file states {stated}, recomputed {computed}")]
    Mismatch {
        /// The figure (a route's cost, load, ...).
        what: String,
        /// The value the file states.
        stated: i64,
        /// The value recomputed from the instance.
        computed: i64,
    },
}

impl ParseProblem {
    /// The problem itself, with any [`ParseProblem::AtPath`] wrappers removed.
    pub fn innermost(&self) -> &ParseProblem {
        match self {
            ParseProblem::AtPath { problem, .. } => problem.innermost(),
            p => p,
        }
    }

    /// The JSON path of the problem, when it has one.
    pub fn path(&self) -> Option<&str> {
        match self {
            ParseProblem::AtPath { path, .. } => Some(path),
            _ => None,
        }
    }
}

/// The error type of the crate's readers and writers.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum Error {
    /// A file could not be opened, read or written.
    #[error("{file}: {source}")]
    Io {
        /// The file name as given by the caller.
        file: String,
        /// The underlying I/O error.
        #[source]
        source: std::io::Error,
    },
    /// A text could be read but not understood.
    #[error("{at}: {problem}")]
    Parse {
        /// Where in the file.
        at: Location,
        /// The problem at that place.
        problem: ParseProblem,
    },
    /// Several problems in one input, in the order found: validation goes
    /// on after the first and lists up to [`crate::model::MAX_PROBLEMS`];
    /// `more` counts those not listed. Each entry is an [`Error::Parse`].
    #[error("{file}: {} problems{}:{}", .problems.len() + .more, more_note(*.more), list(.problems))]
    Several {
        /// The file name as given by the caller.
        file: String,
        /// The problems listed, each an `Error::Parse`, in the order found.
        problems: Vec<Error>,
        /// How many more problems were found but not listed.
        more: usize,
    },
}

fn more_note(more: usize) -> String {
    if more > 0 {
        format!(" ({more} not listed)")
    } else {
        String::new()
    }
}

fn list(problems: &[Error]) -> String {
    problems.iter().map(|p| format!("\n  {p}")).collect()
}

/// Collects the problems of one input so that a reader can report them all
/// (up to [`crate::model::MAX_PROBLEMS`]) instead of stopping at the first.
pub(crate) struct Problems {
    file: String,
    found: Vec<Error>,
    more: usize,
}

impl Problems {
    pub(crate) fn new(file: &str) -> Self {
        Problems {
            file: file.to_string(),
            found: Vec::new(),
            more: 0,
        }
    }

    pub(crate) fn push(&mut self, e: Error) {
        if self.found.len() < crate::model::MAX_PROBLEMS {
            self.found.push(e);
        } else {
            self.more += 1;
        }
    }

    pub(crate) fn is_empty(&self) -> bool {
        self.found.is_empty()
    }

    /// The one error found, or [`Error::Several`]. Call it only after a
    /// problem was pushed (with none, it is an empty [`Error::Several`]).
    pub(crate) fn failed(mut self) -> Error {
        if self.found.len() == 1 && self.more == 0 {
            return self.found.remove(0);
        }
        Error::Several {
            file: self.file,
            problems: self.found,
            more: self.more,
        }
    }
}

impl Error {
    pub(crate) fn parse(file: &str, line: Option<usize>, problem: ParseProblem) -> Self {
        Error::Parse {
            at: Location {
                file: file.to_string(),
                line,
            },
            problem,
        }
    }

    /// A JSON syntax or schema error from `serde_json`, with its line in the
    /// location and its column in the message (each position given once).
    pub(crate) fn json(file: &str, e: &serde_json::Error) -> Self {
        let text = e.to_string();
        let message = match text.rfind(" at line ") {
            Some(k) if e.line() > 0 => format!("{} (column {})", &text[..k], e.column()),
            _ => text,
        };
        let line = (e.line() > 0).then_some(e.line());
        Error::parse(file, line, ParseProblem::Json { message })
    }

    /// The parse problem, if this is a parse error (the first one of
    /// [`Error::Several`]; handy in tests and tools).
    pub fn problem(&self) -> Option<&ParseProblem> {
        match self {
            Error::Parse { problem, .. } => Some(problem),
            Error::Several { problems, .. } => problems.first().and_then(Error::problem),
            Error::Io { .. } => None,
        }
    }

    /// The location of a parse error (the first one of [`Error::Several`]).
    pub fn location(&self) -> Option<&Location> {
        match self {
            Error::Parse { at, .. } => Some(at),
            Error::Several { problems, .. } => problems.first().and_then(Error::location),
            Error::Io { .. } => None,
        }
    }

    /// Every parse problem with its location: one for [`Error::Parse`], all
    /// listed ones for [`Error::Several`], none for [`Error::Io`].
    pub fn problems(&self) -> Vec<(&Location, &ParseProblem)> {
        match self {
            Error::Parse { at, problem } => vec![(at, problem)],
            Error::Several { problems, .. } => problems.iter().flat_map(Error::problems).collect(),
            Error::Io { .. } => Vec::new(),
        }
    }
}

/// Shorthand for results of this crate's readers.
pub type Result<T, E = Error> = std::result::Result<T, E>;
