//! Reader for the research community's CARP text format (the files of the
//! gdb, val and egl sets): Spanish header keys, CRLF or LF line ends,
//! irregular spacing.
//!
//! ```text
//!  NOMBRE : gdb1
//!  VERTICES : 12
//!  ARISTAS_REQ : 22
//!  ARISTAS_NOREQ : 0
//!  CAPACIDAD : 5
//!  COSTE_TOTAL_REQ : 252
//!  LISTA_ARISTAS_REQ :
//!  ( 1 , 2)  coste 13 demanda 1
//!  ...
//!  DEPOSITO :   1
//! ```
//!
//! Every edge is two-way and required edges may be served in either
//! direction, with service cost equal to deadhead cost (the convention of
//! the published values). The fleet read is unlimited: `VEHICULOS` is kept
//! in [`DatInstance::vehicles`] as information only.

use std::collections::HashMap;
use std::path::Path;

use super::{MAX_JUNCTIONS, MAX_NUMBER};
use crate::error::{Error, ParseProblem, Problems, Result};
use crate::model::{Cost, Fleet, Instance, Network};

/// An instance read from the research format, with the header's extra fields.
#[derive(Clone, Debug)]
pub struct DatInstance {
    /// The validated instance.
    pub instance: Instance,
    /// `VEHICULOS` from the header (a figure, not a constraint).
    pub vehicles: Option<usize>,
    /// `COSTE_TOTAL_REQ` from the header. It is *not* enforced: in the
    /// distributed val files (all 34) and in gdb12 it differs from the sum of
    /// the listed required costs, which is what the model uses; compare with
    /// [`DatInstance::required_cost`] to detect such files.
    pub checksum: Option<Cost>,
    /// Sum of the costs of the listed required edges.
    pub required_cost: Cost,
    /// Source line of each link, in link order.
    pub link_lines: Vec<usize>,
}

/// Reads a research-format file from disk.
///
/// # Errors
/// [`Error::Io`] when the file cannot be read, [`ParseProblem::NotUtf8`]
/// (with its line) when it is not UTF-8 text, and the errors of [`read_dat`].
pub fn read_dat_file(path: impl AsRef<Path>) -> Result<DatInstance> {
    let (name, text) = super::read_text(path.as_ref())?;
    read_dat(&text, &name)
}

#[derive(PartialEq)]
enum Section {
    Header,
    Required,
    Other,
}

struct Edge {
    u: usize,
    v: usize,
    cost: Cost,
    demand: Option<Cost>,
    line: usize,
}

fn num(file: &str, line: usize, tok: &str, expected: &'static str) -> Result<i64> {
    let t = tok.trim().trim_end_matches('.');
    t.parse::<i64>().map_err(|_| {
        Error::parse(
            file,
            Some(line),
            ParseProblem::NotANumber {
                expected,
                found: tok.trim().to_string(),
            },
        )
    })
}

fn nonneg(file: &str, line: usize, tok: &str, what: &'static str) -> Result<i64> {
    let v = num(file, line, tok, what)?;
    if v < 0 {
        return Err(Error::parse(
            file,
            Some(line),
            ParseProblem::Negative { what, value: v },
        ));
    }
    if v > MAX_NUMBER {
        return Err(Error::parse(
            file,
            Some(line),
            ParseProblem::TooLarge {
                what,
                value: v as u64,
                max: MAX_NUMBER as u64,
            },
        ));
    }
    Ok(v)
}

/// Parses `( u , v)  coste C [demanda D]`.
fn parse_edge(file: &str, line: usize, s: &str, required: bool, n: usize) -> Result<Edge> {
    let bad = |expected| {
        Error::parse(
            file,
            Some(line),
            ParseProblem::Unexpected {
                expected,
                found: s.trim().to_string(),
            },
        )
    };
    let s = s.trim();
    let rest = s.strip_prefix('(').ok_or_else(|| bad("`( u , v)`"))?;
    let close = rest
        .find(')')
        .ok_or_else(|| bad("`)` after the vertices"))?;
    let (pair, tail) = (&rest[..close], &rest[close + 1..]);
    let mut uv = pair.split(',');
    let (us, vs) = match (uv.next(), uv.next(), uv.next()) {
        (Some(a), Some(b), None) => (a, b),
        _ => return Err(bad("two vertices `( u , v)`")),
    };
    let vert = |t: &str| -> Result<usize> {
        let x = num(file, line, t, "a vertex number")?;
        if x < 1 || x as usize > n {
            return Err(Error::parse(
                file,
                Some(line),
                ParseProblem::UnknownVertex { vertex: x, max: n },
            ));
        }
        Ok(x as usize - 1)
    };
    let (u, v) = (vert(us)?, vert(vs)?);
    let toks: Vec<&str> = tail.split_whitespace().collect();
    let mut cost = None;
    let mut demand = None;
    let mut i = 0;
    while i < toks.len() {
        let key = toks[i].to_ascii_lowercase();
        let val = toks
            .get(i + 1)
            .ok_or_else(|| bad("a value after the key"))?;
        match key.as_str() {
            "coste" if cost.is_none() => cost = Some(nonneg(file, line, val, "cost")?),
            "demanda" if demand.is_none() => demand = Some(nonneg(file, line, val, "demand")?),
            _ => return Err(bad("`coste C` and, for required edges, `demanda D`")),
        }
        i += 2;
    }
    let cost = cost.ok_or_else(|| bad("`coste C`"))?;
    if required && demand.is_none() {
        return Err(bad("`demanda D` on a required edge"));
    }
    if !required && demand.is_some() {
        // Defect 3.6 of issue 8: this demand used to be dropped silently.
        return Err(Error::parse(
            file,
            Some(line),
            ParseProblem::DemandNotRequired,
        ));
    }
    Ok(Edge {
        u,
        v,
        cost,
        demand,
        line,
    })
}

/// Parses research-format text. `file` names the source in errors.
///
/// # Errors
/// [`Error::Parse`] with the file, the line and the problem in the format's
/// own words (vertex, edge, depot): a line that fits nowhere, a number
/// that does not parse or is out of range, a header count that the listed
/// edges do not match (or, for `VERTICES`, cannot back: more than twice the
/// edges plus one), a `demanda` on an edge under `LISTA_ARISTAS_NOREQ`, a
/// missing header key, a file that ends early, or an invalid instance
/// ([`ParseProblem::Model`], at the line of the edge concerned).
///
/// # Complexity
/// `O(L + V + E)` time and memory for `L` bytes of text, `V` vertices and
/// `E` edges; `V` is at most `2E + 1`, so the work is bounded by the text.
///
/// ```
/// let text = "NOMBRE : pair\nVERTICES : 2\nARISTAS_REQ : 1\nARISTAS_NOREQ : 0\n\
///             CAPACIDAD : 5\nLISTA_ARISTAS_REQ :\n( 1, 2) coste 3 demanda 2\nDEPOSITO : 1\n";
/// let d = arcwright::io::read_dat(text, "pair.dat").unwrap();
/// assert_eq!(d.instance.total_service_cost(), 3);
/// let bad = text.replace("demanda 2", "demanda x");
/// let e = arcwright::io::read_dat(&bad, "pair.dat").unwrap_err();
/// assert_eq!(e.to_string(), "pair.dat:7: expected demand, found `x`");
/// ```
pub fn read_dat(text: &str, file: &str) -> Result<DatInstance> {
    let total_lines = text.lines().count();
    let mut r = DatReader {
        file,
        name: None,
        header: HashMap::new(),
        section: Section::Header,
        edges: Vec::new(),
        n_req_listed: 0,
        n_other_listed: 0,
        depot: None,
        n: None,
        // A file cut off in the middle of its last line: a bad last line is
        // then reported as truncation.
        cut_line: (!text.ends_with('\n')).then_some(total_lines),
        first_list: None,
    };
    let mut last_line = 0;
    for (idx, raw) in text.lines().enumerate() {
        let line = idx + 1;
        last_line = line;
        let s = raw.trim_matches(|c: char| c.is_whitespace() || c == '\u{feff}');
        if s.is_empty() {
            continue;
        }
        if s.starts_with('(') {
            r.edge_line(line, s)?;
        } else {
            r.key_line(line, s)?;
        }
    }
    r.finish(last_line.max(1))
}

/// The reader's state while it goes through the lines.
struct DatReader<'f> {
    file: &'f str,
    name: Option<String>,
    header: HashMap<String, (String, usize)>,
    section: Section,
    edges: Vec<Edge>,
    n_req_listed: usize,
    n_other_listed: usize,
    /// Depot (0-based) and its line.
    depot: Option<(usize, usize)>,
    /// `VERTICES`, once read.
    n: Option<usize>,
    /// The last line, when the text ends without a line end.
    cut_line: Option<usize>,
    /// Line of the first `LISTA_ARISTAS_*` key (where the header ends).
    first_list: Option<usize>,
}

impl DatReader<'_> {
    fn err(&self, line: Option<usize>, problem: ParseProblem) -> Error {
        Error::parse(self.file, line, problem)
    }

    /// `e`, or a truncation when `line` is the cut last line.
    fn cut(&self, line: usize, e: Error) -> Error {
        if self.cut_line == Some(line) {
            self.err(
                Some(line),
                ParseProblem::Truncated {
                    expected: format!("the rest of line {line}"),
                },
            )
        } else {
            e
        }
    }

    fn vertices(&self, line: usize) -> Result<usize> {
        self.n
            .ok_or_else(|| self.err(Some(line), ParseProblem::MissingKey { key: "VERTICES" }))
    }

    fn header_usize(&self, key: &'static str) -> Result<Option<usize>> {
        match self.header.get(key) {
            None => Ok(None),
            Some((v, l)) => Ok(Some(nonneg(self.file, *l, v, key)? as usize)),
        }
    }

    fn header_line(&self, key: &str) -> Option<usize> {
        self.header.get(key).map(|(_, l)| *l)
    }

    /// An edge line `( u , v) coste C [demanda D]` in the current section.
    fn edge_line(&mut self, line: usize, s: &str) -> Result<()> {
        let nv = self.vertices(line)?;
        let required = match self.section {
            Section::Header => {
                return Err(self.err(
                    Some(line),
                    ParseProblem::Unexpected {
                        expected: "LISTA_ARISTAS_REQ : before the edges",
                        found: s.to_string(),
                    },
                ))
            }
            Section::Required => true,
            Section::Other => false,
        };
        let edge = parse_edge(self.file, line, s, required, nv).map_err(|e| self.cut(line, e))?;
        self.edges.push(edge);
        if required {
            self.n_req_listed += 1;
        } else {
            self.n_other_listed += 1;
        }
        Ok(())
    }

    /// A `KEY : value` line: a section start, the depot or a header key.
    fn key_line(&mut self, line: usize, s: &str) -> Result<()> {
        let Some((key, value)) = s.split_once(':') else {
            return Err(self.err(
                Some(line),
                ParseProblem::Unexpected {
                    expected: "`KEY : value` or an edge `( u , v) coste C`",
                    found: s.to_string(),
                },
            ));
        };
        let (key, value) = (key.trim().to_ascii_uppercase(), value.trim().to_string());
        match key.as_str() {
            "LISTA_ARISTAS_REQ" => {
                self.section = Section::Required;
                self.first_list.get_or_insert(line);
            }
            "LISTA_ARISTAS_NOREQ" => {
                self.section = Section::Other;
                self.first_list.get_or_insert(line);
            }
            "DEPOSITO" => {
                if let Some((_, first)) = self.depot {
                    return Err(self.err(
                        Some(line),
                        ParseProblem::DuplicateDepot { first_line: first },
                    ));
                }
                let nv = self.vertices(line)?;
                let d = num(self.file, line, &value, "the depot vertex")
                    .map_err(|e| self.cut(line, e))?;
                if d < 1 || d as usize > nv {
                    return Err(self.err(
                        Some(line),
                        ParseProblem::UnknownVertex { vertex: d, max: nv },
                    ));
                }
                self.depot = Some((d as usize - 1, line));
                self.section = Section::Other;
            }
            _ => self.header_key(line, s, key, value)?,
        }
        Ok(())
    }

    fn header_key(&mut self, line: usize, s: &str, key: String, value: String) -> Result<()> {
        if self.section != Section::Header {
            return Err(self.err(
                Some(line),
                ParseProblem::Unexpected {
                    expected: "an edge line or DEPOSITO",
                    found: s.to_string(),
                },
            ));
        }
        if self.header.contains_key(&key) {
            return Err(self.err(Some(line), ParseProblem::DuplicateKey { key }));
        }
        if key == "NOMBRE" {
            self.name = Some(value.clone());
        }
        let vertices = key == "VERTICES";
        self.header.insert(key, (value, line));
        if vertices {
            self.n = self.header_usize("VERTICES")?;
            if let Some(v) = self.n.filter(|&v| v > MAX_JUNCTIONS) {
                return Err(self.err(
                    Some(line),
                    ParseProblem::TooLarge {
                        what: "VERTICES",
                        value: v as u64,
                        max: MAX_JUNCTIONS as u64,
                    },
                ));
            }
        }
        Ok(())
    }

    /// A missing header key, reported at the line where the header ends
    /// (the first list), or at the end of the file.
    fn missing(&self, key: &'static str, end: usize) -> Error {
        let at = self.first_list.unwrap_or(end);
        self.err(Some(at), ParseProblem::MissingKey { key })
    }

    /// Header counts against the lists; `end` is the last line.
    fn check_counts(&self, end: usize) -> Result<()> {
        let n_req = self
            .header_usize("ARISTAS_REQ")?
            .ok_or_else(|| self.missing("ARISTAS_REQ", end))?;
        let n_other = self.header_usize("ARISTAS_NOREQ")?.unwrap_or(0);
        // A short list is a truncated file when the file ends in it.
        let lists = [
            (
                "ARISTAS_REQ",
                "required",
                n_req,
                self.n_req_listed,
                self.n_other_listed == 0,
            ),
            (
                "ARISTAS_NOREQ",
                "non-required",
                n_other,
                self.n_other_listed,
                true,
            ),
        ];
        for (key, kind, header, found, last_list) in lists {
            if found == header {
                continue;
            }
            if found < header && self.depot.is_none() && last_list {
                return Err(self.err(
                    Some(end),
                    ParseProblem::Truncated {
                        expected: format!("{header} {kind} edges, found {found}"),
                    },
                ));
            }
            return Err(self.err(
                self.header_line(key),
                ParseProblem::CountMismatch {
                    what: key,
                    header,
                    found,
                },
            ));
        }
        // Defect 3.5 of issue 8: a huge VERTICES in a tiny file made the
        // work follow the header. Each edge brings at most two vertices.
        let nv = self.n.unwrap_or(0);
        let most = 2 * self.edges.len() + 1;
        if nv > most {
            return Err(self.err(
                self.header_line("VERTICES"),
                ParseProblem::Unbacked {
                    what: "VERTICES",
                    header: nv,
                    most,
                },
            ));
        }
        Ok(())
    }

    fn finish(self, end: usize) -> Result<DatInstance> {
        let nv = self.n.ok_or_else(|| self.missing("VERTICES", end))?;
        self.check_counts(end)?;
        let capacity = self
            .header_usize("CAPACIDAD")?
            .ok_or_else(|| self.missing("CAPACIDAD", end))?;
        let vehicles = self.header_usize("VEHICULOS")?;
        let checksum = match self.header.get("COSTE_TOTAL_REQ") {
            Some((v, l)) => Some(nonneg(self.file, *l, v, "COSTE_TOTAL_REQ")?),
            None => None,
        };
        let (depot, _) = self.depot.ok_or_else(|| {
            self.err(
                Some(end),
                ParseProblem::Truncated {
                    expected: "DEPOSITO : d".to_string(),
                },
            )
        })?;
        let required_cost: Cost = self
            .edges
            .iter()
            .filter(|e| e.demand.is_some())
            .fold(0, |acc: Cost, e| acc.saturating_add(e.cost));
        let mut net = Network::with_junctions(nv);
        let mut link_lines = Vec::with_capacity(self.edges.len());
        for e in &self.edges {
            match e.demand {
                Some(d) => net.add_required_edge(e.u, e.v, e.cost, d),
                None => net.add_edge(e.u, e.v, e.cost),
            };
            link_lines.push(e.line);
        }
        let name = self.name.clone().unwrap_or_else(|| {
            Path::new(self.file)
                .file_stem()
                .map(|s| s.to_string_lossy().into_owned())
                .unwrap_or_default()
        });
        let fleet = Fleet::with_capacity(capacity as Cost);
        let instance = Instance::validate(name, net, fleet, depot).map_err(|all| {
            let mut problems = Problems::new(self.file);
            for m in all {
                let line = m
                    .link()
                    .and_then(|l| link_lines.get(l).copied())
                    .or(self.header_line("CAPACIDAD").filter(|_| m.link().is_none()));
                problems.push(self.err(line, ParseProblem::Model(m)));
            }
            problems.failed()
        })?;
        Ok(DatInstance {
            instance,
            vehicles,
            checksum,
            required_cost,
            link_lines,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const TINY: &str = " NOMBRE : tiny\r\n VERTICES : 3\r\n ARISTAS_REQ : 2\r\n ARISTAS_NOREQ : 1\r\n VEHICULOS : 1\r\n CAPACIDAD : 5\r\n COSTE_TOTAL_REQ : 7\r\n LISTA_ARISTAS_REQ :\r\n ( 1 , 2)  coste 3 demanda 1\r\n ( 2, 3)   coste 4   demanda 2 \r\n LISTA_ARISTAS_NOREQ :\r\n ( 3 , 1)  coste 9\r\n DEPOSITO :   1\r\n";

    #[test]
    fn reads_tiny() {
        let d = read_dat(TINY, "tiny.dat").unwrap();
        assert_eq!(d.instance.tasks().len(), 2);
        assert_eq!(d.instance.network().links.len(), 3);
        assert_eq!(d.instance.total_service_cost(), 7);
        assert_eq!(d.instance.depot(), 0);
        assert_eq!(d.link_lines, vec![9, 10, 12]);
    }

    #[test]
    fn names_line_of_unknown_vertex() {
        let bad = TINY.replace("( 2, 3)", "( 2, 9)");
        let e = read_dat(&bad, "x.dat").unwrap_err();
        assert_eq!(e.location().unwrap().line, Some(10));
        assert!(matches!(
            e.problem(),
            Some(ParseProblem::UnknownVertex { vertex: 9, .. })
        ));
    }
}
