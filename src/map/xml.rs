//! The OpenStreetMap XML reader (`.osm` files, the `quick-xml` crate).

use std::collections::BTreeMap;

use quick_xml::events::{BytesStart, Event};
use quick_xml::{Reader, XmlVersion};

use super::error::{Element, MapError};
use super::raw::{
    restriction_rule, street_tags, MapFormat, RawMap, RawRestriction, RawWay, ADDRESS_KEY,
};

/// The element being read.
enum Open {
    None,
    Node([f64; 2], bool),
    Way(i64, Vec<i64>, Vec<(String, String)>),
    Relation(i64, Vec<(String, i64, String)>, Vec<(String, String)>),
}

struct Ctx<'a> {
    file: &'a str,
    text: &'a str,
}

impl Ctx<'_> {
    fn line(&self, pos: u64) -> usize {
        let pos = (pos as usize).min(self.text.len());
        1 + self.text.as_bytes()[..pos]
            .iter()
            .filter(|&&b| b == b'\n')
            .count()
    }

    fn syntax(&self, pos: u64, problem: String) -> MapError {
        MapError::Syntax {
            file: self.file.to_string(),
            line: self.line(pos),
            problem,
        }
    }

    fn attrs(&self, e: &BytesStart, pos: u64) -> Result<Vec<(String, String)>, MapError> {
        let mut out = Vec::new();
        for a in e.attributes() {
            let a = a.map_err(|err| self.syntax(pos, err.to_string()))?;
            let key = a.key.as_ref().to_string();
            let value = a
                .normalized_value(XmlVersion::Implicit1_0)
                .map_err(|err| self.syntax(pos, err.to_string()))?
                .into_owned();
            out.push((key, value));
        }
        Ok(out)
    }
}

fn get<'a>(attrs: &'a [(String, String)], key: &str) -> Option<&'a str> {
    attrs
        .iter()
        .find(|(k, _)| k == key)
        .map(|(_, v)| v.as_str())
}

fn number<T: std::str::FromStr>(
    ctx: &Ctx,
    pos: u64,
    what: &str,
    attrs: &[(String, String)],
    key: &str,
) -> Result<T, MapError> {
    let v = get(attrs, key).ok_or_else(|| ctx.syntax(pos, format!("a {what} without `{key}`")))?;
    v.parse()
        .map_err(|_| ctx.syntax(pos, format!("{what}: `{key}` is `{v}`, not a number")))
}

/// Reads OpenStreetMap XML text. `file` names it in errors.
///
/// # Errors
///
/// [`MapError::Syntax`] (with the line) for XML that is not well formed or an
/// element without a usable `id`, `ref`, `lat` or `lon`;
/// [`MapError::Element`] for a node outside -180..180 / -90..90.
pub fn parse_osm_xml(text: &str, file: &str) -> Result<RawMap, MapError> {
    let ctx = Ctx { file, text };
    let mut map = RawMap::new(file, MapFormat::Xml);
    let mut reader = Reader::from_str(text);
    let mut open = Open::None;
    loop {
        let pos = reader.buffer_position();
        let ev = reader
            .read_event()
            .map_err(|e| ctx.syntax(reader.error_position(), e.to_string()))?;
        let (e, empty) = match ev {
            Event::Eof => break,
            Event::Start(e) => (e, false),
            Event::Empty(e) => (e, true),
            Event::End(e) => {
                if matches!(e.name().as_ref(), "node" | "way" | "relation") {
                    finish(&mut map, std::mem::replace(&mut open, Open::None));
                }
                continue;
            }
            _ => continue,
        };
        let attrs = ctx.attrs(&e, pos)?;
        match e.name().as_ref() {
            "node" => {
                map.elements += 1;
                let id: i64 = number(&ctx, pos, "node", &attrs, "id")?;
                let lat: f64 = number(&ctx, pos, "node", &attrs, "lat")?;
                let lon: f64 = number(&ctx, pos, "node", &attrs, "lon")?;
                if !(-180.0..=180.0).contains(&lon) || !(-90.0..=90.0).contains(&lat) {
                    return Err(MapError::Element {
                        file: file.to_string(),
                        element: Element::Node(id),
                        problem: format!("position {lon}, {lat} is not a longitude, latitude"),
                    });
                }
                map.nodes.insert(id, [lon, lat]);
                open = Open::Node([lon, lat], false);
            }
            "way" => {
                map.elements += 1;
                open = Open::Way(number(&ctx, pos, "way", &attrs, "id")?, vec![], vec![]);
            }
            "relation" => {
                map.elements += 1;
                open = Open::Relation(number(&ctx, pos, "relation", &attrs, "id")?, vec![], vec![]);
            }
            "nd" => {
                if let Open::Way(_, nodes, _) = &mut open {
                    nodes.push(number(&ctx, pos, "way node", &attrs, "ref")?);
                }
            }
            "member" => {
                if let Open::Relation(_, members, _) = &mut open {
                    let kind = get(&attrs, "type").unwrap_or("").to_string();
                    let r = number(&ctx, pos, "relation member", &attrs, "ref")?;
                    let role = get(&attrs, "role").unwrap_or("").to_string();
                    members.push((kind, r, role));
                }
            }
            "tag" => {
                let (k, v) = (get(&attrs, "k"), get(&attrs, "v"));
                match (k, v, &mut open) {
                    (Some(k), Some(v), Open::Way(_, _, tags) | Open::Relation(_, _, tags)) => {
                        tags.push((k.to_string(), v.to_string()))
                    }
                    (Some(ADDRESS_KEY), Some(_), Open::Node(_, address)) => *address = true,
                    _ => {}
                }
            }
            _ => {}
        }
        if empty && matches!(e.name().as_ref(), "node" | "way" | "relation") {
            finish(&mut map, std::mem::replace(&mut open, Open::None));
        }
    }
    let positions = map.nodes.clone();
    map.resolve_address_ways(&positions);
    Ok(map)
}

fn finish(map: &mut RawMap, open: Open) {
    match open {
        Open::Way(id, nodes, tags) => {
            if tags.iter().any(|(k, _)| k == ADDRESS_KEY) {
                map.address_ways.push(nodes.clone());
            }
            if let Some(tags) = street_tags(tags.iter().map(|(k, v)| (k.as_str(), v.as_str()))) {
                map.ways.push(RawWay {
                    id,
                    nodes,
                    tags: tags.into_iter().collect::<BTreeMap<_, _>>(),
                    overrides: Default::default(),
                });
            }
        }
        Open::Relation(id, members, tags) => {
            let Some(rule) = restriction_rule(tags.iter().map(|(k, v)| (k.as_str(), v.as_str())))
            else {
                return;
            };
            let mut rr = RawRestriction {
                id,
                rule,
                from: Vec::new(),
                via_nodes: Vec::new(),
                unusable: 0,
                to: Vec::new(),
            };
            for (kind, r, role) in members {
                match (role.as_str(), kind.as_str()) {
                    ("from", "way") => rr.from.push(r),
                    ("to", "way") => rr.to.push(r),
                    ("via", "node") => rr.via_nodes.push(r),
                    ("via" | "from" | "to", _) => rr.unusable += 1,
                    _ => {}
                }
            }
            map.restrictions.push(rr);
        }
        Open::Node(at, true) => map.addresses.push(at),
        Open::Node(..) | Open::None => {}
    }
}
