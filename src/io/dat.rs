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

use std::path::Path;

use super::{MAX_JUNCTIONS, MAX_NUMBER};
use crate::error::{Error, ParseProblem, Result};
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
pub fn read_dat_file(path: impl AsRef<Path>) -> Result<DatInstance> {
    let path = path.as_ref();
    let name = path.display().to_string();
    let bytes = std::fs::read(path).map_err(|source| Error::Io {
        file: name.clone(),
        source,
    })?;
    let text = String::from_utf8_lossy(&bytes);
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
    Ok(Edge {
        u,
        v,
        cost,
        demand: if required { demand } else { None },
        line,
    })
}

/// Parses research-format text. `file` names the source in errors.
pub fn read_dat(text: &str, file: &str) -> Result<DatInstance> {
    let mut name: Option<String> = None;
    let mut header: std::collections::HashMap<String, (String, usize)> = Default::default();
    let mut section = Section::Header;
    let mut edges: Vec<Edge> = Vec::new();
    let mut n_req_listed = 0usize;
    let mut n_other_listed = 0usize;
    let mut depot: Option<(usize, usize)> = None;
    let mut n: Option<usize> = None;
    let mut last_line = 0;

    let get_usize = |header: &std::collections::HashMap<String, (String, usize)>,
                     key: &'static str|
     -> Result<Option<usize>> {
        match header.get(key) {
            None => Ok(None),
            Some((v, l)) => Ok(Some(nonneg(file, *l, v, key)? as usize)),
        }
    };

    let total_lines = text.lines().count();
    // A file cut off in the middle of its last line: a bad last line is then
    // reported as truncation.
    let cut = !text.ends_with('\n');
    for (idx, raw) in text.lines().enumerate() {
        let line = idx + 1;
        let cut_here = |e: Error| {
            if cut && line == total_lines {
                Error::parse(
                    file,
                    Some(line),
                    ParseProblem::Truncated {
                        expected: format!("the rest of line {line}"),
                    },
                )
            } else {
                e
            }
        };
        last_line = line;
        let s = raw.trim_matches(|c: char| c.is_whitespace() || c == '\u{feff}');
        if s.is_empty() {
            continue;
        }
        if s.starts_with('(') {
            let nv = match n {
                Some(nv) => nv,
                None => {
                    return Err(Error::parse(
                        file,
                        Some(line),
                        ParseProblem::MissingKey { key: "VERTICES" },
                    ))
                }
            };
            match section {
                Section::Header => {
                    return Err(Error::parse(
                        file,
                        Some(line),
                        ParseProblem::Unexpected {
                            expected: "LISTA_ARISTAS_REQ : before the edges",
                            found: s.to_string(),
                        },
                    ))
                }
                Section::Required => {
                    edges.push(parse_edge(file, line, s, true, nv).map_err(cut_here)?);
                    n_req_listed += 1;
                }
                Section::Other => {
                    edges.push(parse_edge(file, line, s, false, nv).map_err(cut_here)?);
                    n_other_listed += 1;
                }
            }
            continue;
        }
        let (key, value) = match s.split_once(':') {
            Some((k, v)) => (k.trim().to_ascii_uppercase(), v.trim().to_string()),
            None => {
                return Err(Error::parse(
                    file,
                    Some(line),
                    ParseProblem::Unexpected {
                        expected: "`KEY : value` or an edge `( u , v) coste C`",
                        found: s.to_string(),
                    },
                ))
            }
        };
        match key.as_str() {
            "LISTA_ARISTAS_REQ" => section = Section::Required,
            "LISTA_ARISTAS_NOREQ" => section = Section::Other,
            "DEPOSITO" => {
                if let Some((_, first)) = depot {
                    return Err(Error::parse(
                        file,
                        Some(line),
                        ParseProblem::DuplicateDepot { first_line: first },
                    ));
                }
                let nv = n.ok_or_else(|| {
                    Error::parse(
                        file,
                        Some(line),
                        ParseProblem::MissingKey { key: "VERTICES" },
                    )
                })?;
                let d = num(file, line, &value, "the depot vertex").map_err(cut_here)?;
                if d < 1 || d as usize > nv {
                    return Err(Error::parse(
                        file,
                        Some(line),
                        ParseProblem::UnknownVertex { vertex: d, max: nv },
                    ));
                }
                depot = Some((d as usize - 1, line));
                section = Section::Other;
            }
            _ => {
                if section != Section::Header {
                    return Err(Error::parse(
                        file,
                        Some(line),
                        ParseProblem::Unexpected {
                            expected: "an edge line or DEPOSITO",
                            found: s.to_string(),
                        },
                    ));
                }
                if header.contains_key(&key) {
                    return Err(Error::parse(
                        file,
                        Some(line),
                        ParseProblem::DuplicateKey { key },
                    ));
                }
                if key == "NOMBRE" {
                    name = Some(value.clone());
                }
                header.insert(key.clone(), (value, line));
                if key == "VERTICES" {
                    n = get_usize(&header, "VERTICES")?;
                    if let Some(v) = n.filter(|&v| v > MAX_JUNCTIONS) {
                        return Err(Error::parse(
                            file,
                            Some(line),
                            ParseProblem::TooLarge {
                                what: "VERTICES",
                                value: v as u64,
                                max: MAX_JUNCTIONS as u64,
                            },
                        ));
                    }
                }
            }
        }
    }

    let end = Some(last_line.max(1));
    let nv =
        n.ok_or_else(|| Error::parse(file, end, ParseProblem::MissingKey { key: "VERTICES" }))?;
    let n_req = get_usize(&header, "ARISTAS_REQ")?
        .ok_or_else(|| Error::parse(file, end, ParseProblem::MissingKey { key: "ARISTAS_REQ" }))?;
    let n_other = get_usize(&header, "ARISTAS_NOREQ")?.unwrap_or(0);
    let capacity = get_usize(&header, "CAPACIDAD")?
        .ok_or_else(|| Error::parse(file, end, ParseProblem::MissingKey { key: "CAPACIDAD" }))?;
    let vehicles = get_usize(&header, "VEHICULOS")?;
    let checksum = match header.get("COSTE_TOTAL_REQ") {
        Some((v, l)) => Some(nonneg(file, *l, v, "COSTE_TOTAL_REQ")?),
        None => None,
    };
    let header_line = |k: &str| header.get(k).map(|(_, l)| *l);

    // Counts: a short list is a truncated file when the file ends in it.
    if n_req_listed != n_req {
        if n_req_listed < n_req && depot.is_none() && n_other_listed == 0 {
            return Err(Error::parse(
                file,
                end,
                ParseProblem::Truncated {
                    expected: format!("{n_req} required edges, found {n_req_listed}"),
                },
            ));
        }
        return Err(Error::parse(
            file,
            header_line("ARISTAS_REQ"),
            ParseProblem::CountMismatch {
                what: "ARISTAS_REQ",
                header: n_req,
                found: n_req_listed,
            },
        ));
    }
    if n_other_listed != n_other {
        if n_other_listed < n_other && depot.is_none() {
            return Err(Error::parse(
                file,
                end,
                ParseProblem::Truncated {
                    expected: format!("{n_other} non-required edges, found {n_other_listed}"),
                },
            ));
        }
        return Err(Error::parse(
            file,
            header_line("ARISTAS_NOREQ"),
            ParseProblem::CountMismatch {
                what: "ARISTAS_NOREQ",
                header: n_other,
                found: n_other_listed,
            },
        ));
    }
    let (depot, _) = depot.ok_or_else(|| {
        Error::parse(
            file,
            end,
            ParseProblem::Truncated {
                expected: "DEPOSITO : d".to_string(),
            },
        )
    })?;
    let required_cost: Cost = edges
        .iter()
        .filter(|e| e.demand.is_some())
        .fold(0, |acc: Cost, e| acc.saturating_add(e.cost));

    let mut net = Network::with_junctions(nv);
    let mut link_lines = Vec::with_capacity(edges.len());
    for e in &edges {
        match e.demand {
            Some(d) => net.add_required_edge(e.u, e.v, e.cost, d),
            None => net.add_edge(e.u, e.v, e.cost),
        };
        link_lines.push(e.line);
    }
    let name = name.unwrap_or_else(|| {
        Path::new(file)
            .file_stem()
            .map(|s| s.to_string_lossy().into_owned())
            .unwrap_or_default()
    });
    let instance = Instance::new(name, net, Fleet::with_capacity(capacity as Cost), depot)
        .map_err(|m| {
            let line = m
                .link()
                .and_then(|l| link_lines.get(l).copied())
                .or(header_line("CAPACIDAD").filter(|_| m.link().is_none()));
            Error::parse(file, line, ParseProblem::Model(m))
        })?;
    Ok(DatInstance {
        instance,
        vehicles,
        checksum,
        required_cost,
        link_lines,
    })
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
