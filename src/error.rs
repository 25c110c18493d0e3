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
    Truncated { expected: String },
    /// A header count disagrees with what the file lists.
    #[error("header says {what} = {header}, but the file lists {found}")]
    CountMismatch {
        what: &'static str,
        header: usize,
        found: usize,
    },
    /// A vertex number outside `1..=vertices`.
    #[error("vertex {vertex} is not in 1..={max}")]
    UnknownVertex { vertex: i64, max: usize },
    /// A number was expected.
    #[error("expected {expected}, found `{found}`")]
    NotANumber {
        expected: &'static str,
        found: String,
    },
    /// A cost, demand or count that must not be negative.
    #[error("{what} must not be negative, found {value}")]
    Negative { what: &'static str, value: i64 },
    /// The depot was given twice.
    #[error("depot given twice (first on line {first_line})")]
    DuplicateDepot { first_line: usize },
    /// A header key appears twice.
    #[error("header key {key} given twice")]
    DuplicateKey { key: String },
    /// A required header key is absent.
    #[error("missing header key {key}")]
    MissingKey { key: &'static str },
    /// A line that fits nowhere in the format.
    #[error("unexpected line: expected {expected}, found `{found}`")]
    Unexpected {
        expected: &'static str,
        found: String,
    },
    /// JSON that does not match the schema (wrong type, missing field, bad syntax).
    #[error("{message}")]
    Json { message: String },
    /// The text read fine but the model it describes is invalid.
    #[error("{0}")]
    Model(ModelError),
    /// A problem at a place inside a structured (JSON) document, given as a
    /// path such as `streets[12].to`.
    #[error("at `{path}`: {problem}")]
    AtPath {
        path: String,
        problem: Box<ParseProblem>,
    },
    /// A junction id that no junction has.
    #[error("no junction has id {id}")]
    UnknownJunction { id: u64 },
    /// Two junctions with the same id.
    #[error("junction id {id} given twice (first at junctions[{first}])")]
    DuplicateJunction { id: u64, first: usize },
    /// A number beyond what the crate accepts (see [`crate::io::MAX_NUMBER`]).
    #[error("{what} {value} is too large (at most {max})")]
    TooLarge {
        what: &'static str,
        value: u64,
        max: u64,
    },
    /// A plan file serves a (from, to) pair that is not the required link it names.
    #[error("route {route}, service {position}: ({from}, {to}) with link {link} is not a required link of the instance in an allowed direction")]
    NotARequiredLink {
        route: usize,
        position: usize,
        from: u64,
        to: u64,
        link: i64,
    },
    /// A plan file serves the same required link twice.
    #[error("route {route}, service {position}: link {link} is already served earlier")]
    ServedTwice {
        route: usize,
        position: usize,
        link: usize,
    },
    /// A plan file is for another instance.
    #[error("the plan is for instance `{found}`, not `{expected}`")]
    WrongInstance { expected: String, found: String },
    /// Two fields that exclude each other are both given.
    #[error("`{given}` and `{other}` are both given; give one of them")]
    Conflict {
        given: &'static str,
        other: &'static str,
    },
    /// A name that refers to nothing (a truck type's yard, say).
    #[error("no {what} is named `{name}`")]
    UnknownName { what: &'static str, name: String },
    /// A junction coordinate that cannot be in the scenario's declared
    /// coordinate system (not finite, a latitude beyond ±90°, ...).
    #[error("{0}")]
    Coordinate(crate::model::CoordError),
    /// A cost or load stated in a plan file differs from the recomputed one.
    #[error("{what}: the file states {stated}, recomputed {computed}")]
    Mismatch {
        what: String,
        stated: i64,
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
        file: String,
        #[source]
        source: std::io::Error,
    },
    /// A text could be read but not understood.
    #[error("{at}: {problem}")]
    Parse { at: Location, problem: ParseProblem },
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

    /// The parse problem, if this is a parse error (handy in tests and tools).
    pub fn problem(&self) -> Option<&ParseProblem> {
        match self {
            Error::Parse { problem, .. } => Some(problem),
            Error::Io { .. } => None,
        }
    }

    /// The location of a parse error.
    pub fn location(&self) -> Option<&Location> {
        match self {
            Error::Parse { at, .. } => Some(at),
            Error::Io { .. } => None,
        }
    }
}

/// Shorthand for results of this crate's readers.
pub type Result<T, E = Error> = std::result::Result<T, E>;
