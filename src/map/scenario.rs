//! From the street graph to a validated [`Instance`]: costs, times and
//! demands as exact integers, one or two required links per served street.

use super::build::{Street, StreetGraph};
use super::error::{Element, MapError};
use super::profile::{Profile, Serve};
use crate::model::{
    Coordinates, Cost, Fleet, Instance, Junction, Link, ModelError, Network, ServeDirection,
    ServiceSpec, TurnRestriction, Units,
};
use crate::turns::TurnTable;

/// Whole metres (the unit of costs).
fn cost_m(length_m: f64) -> Cost {
    length_m.round() as Cost
}

/// Whole seconds to drive `length_m` at `kmh`.
fn seconds(length_m: f64, kmh: u32) -> Cost {
    (length_m * 3.6 / f64::from(kmh)).round() as Cost
}

/// Load of `kerbs` kerbs of `length_m` at `per_km`.
fn load(length_m: f64, per_km: u32, kerbs: f64) -> Cost {
    (length_m * f64::from(per_km) * kerbs / 1000.0).round() as Cost
}

/// The links of one street (two for a street served one side at a time).
/// `by_address`: demand is counted per address point.
fn links_of(s: &Street, profile: &Profile, by_address: bool) -> Vec<Link> {
    let rule = &profile.classes[&s.class];
    let cost = cost_m(s.length_m);
    let base = Link {
        from: s.from,
        to: s.to,
        oneway: s.one_way,
        cost,
        time: Some(seconds(s.length_m, rule.drive_kmh)),
        service: None,
        name: s.name.clone(),
        length: Some(cost),
        geometry: s.geometry.clone(),
        class: Some(s.class.clone()),
    };
    let per_address = match (by_address, s.demand_per_km, profile.demand_per_address) {
        (true, None, Some(p)) => Some(Cost::from(p)),
        _ => None,
    };
    // Counted by address, a served street without an address is only
    // driven (unless the map itself requires it).
    let nothing_there = per_address.is_some() && s.addresses == 0 && s.required != Some(true);
    let required = s.required.unwrap_or(rule.serve != Serve::No) && !nothing_there;
    if !required {
        return vec![base];
    }
    let per_km = s.demand_per_km.unwrap_or(profile.demand_per_km_of_kerb);
    let serve_kmh = rule.serve_kmh.unwrap_or(rule.drive_kmh);
    let n = Cost::from(s.addresses);
    // `kerbs`: 2.0 for both sides, 1.0 / -1.0 for the first / second pass.
    let spec = |kerbs: f64, direction| ServiceSpec {
        demand: match per_address {
            Some(p) if kerbs > 1.5 => p * n,
            Some(p) if kerbs > 0.0 => p * (n - n / 2),
            Some(p) => p * (n / 2),
            None => load(s.length_m, per_km, kerbs.abs()),
        },
        cost,
        time: Some(seconds(s.length_m, serve_kmh)),
        direction,
    };
    match rule.serve {
        // A street required by the map itself in a class the profile does
        // not serve is served both sides in one pass.
        Serve::BothSides | Serve::No => vec![Link {
            service: Some(spec(2.0, ServeDirection::Either)),
            ..base
        }],
        Serve::EachSide => {
            let mut back = Link {
                service: Some(spec(-1.0, ServeDirection::Forward)),
                ..base.clone()
            };
            if !s.one_way {
                std::mem::swap(&mut back.from, &mut back.to);
                back.geometry.reverse();
            }
            vec![
                Link {
                    service: Some(spec(1.0, ServeDirection::Forward)),
                    ..base
                },
                back,
            ]
        }
    }
}

/// The instance of a street graph under a profile, with the street of each
/// link (index into `graph.streets`) and, when the profile has turn rules,
/// the streets to serve that the rules cut off from the yard
/// ([`crate::turns::unservable`]): they are driven, not served.
///
/// # Errors
///
/// [`MapError::Model`] when the network is not a valid scenario, such as a
/// street whose demand exceeds a truck's capacity (the street is named).
pub fn to_instance(
    graph: &StreetGraph,
    profile: &Profile,
    name: &str,
    file: &str,
) -> Result<(Instance, Vec<usize>, Vec<String>), MapError> {
    let junctions = graph
        .junctions
        .iter()
        .map(|j| Junction {
            id: j.node as u64,
            x: Some(j.at[0]),
            y: Some(j.at[1]),
        })
        .collect();
    let mut links = Vec::new();
    let mut street_of = Vec::new();
    let mut first_link = Vec::with_capacity(graph.streets.len());
    for (i, s) in graph.streets.iter().enumerate() {
        first_link.push(links.len());
        for l in links_of(s, profile, graph.addresses_snapped.is_some()) {
            links.push(l);
            street_of.push(i);
        }
    }
    // A turn arrives along the link of the from street that ends at via, and
    // leaves along the link of the to street that starts there.
    let pick = |street: usize, at_end: bool, via: usize| {
        let range = first_link[street]..first_link.get(street + 1).copied().unwrap_or(links.len());
        range
            .clone()
            .find(|&l| {
                if at_end {
                    links[l].to == via
                } else {
                    links[l].from == via
                }
            })
            .unwrap_or(range.start)
    };
    let turn_restrictions = graph
        .turns
        .iter()
        .map(|t| TurnRestriction {
            rule: t.rule.clone(),
            from: pick(t.from, true, t.via),
            via: t.via,
            to: pick(t.to, false, t.via),
        })
        .collect();
    let network = Network {
        junctions,
        links,
        turn_restrictions,
    };
    let fleet = Fleet {
        capacity: profile.truck.capacity,
        shift_limit: profile.truck.shift,
        max_vehicles: profile.truck.max_trucks,
    };
    let mut network = network;
    let cut_off = match &profile.turn_rules {
        Some(rules) => {
            let plain = Instance::new(name, network.clone(), fleet.clone(), graph.yard.0)
                .map_err(|e| model_error(graph, &street_of, file, e))?;
            unserve_cut_off(&plain, rules, &mut network, file)?
        }
        None => Vec::new(),
    };
    let inst = Instance::new(name, network, fleet, graph.yard.0)
        .map_err(|e| model_error(graph, &street_of, file, e))?;
    let units = Units {
        cost: Some("m".into()),
        length: Some("m".into()),
        time: Some("s".into()),
        load: Some(profile.load_unit.clone()),
    };
    let inst = inst
        .with_units(units)
        .with_coordinates(Coordinates::Wgs84)
        .map_err(|(j, e)| MapError::Element {
            file: file.to_string(),
            element: Element::Node(graph.junctions[j].node),
            problem: e.to_string(),
        })?
        .with_turn_rules(profile.turn_rules)
        .map_err(|all| MapError::TurnRules {
            file: file.to_string(),
            problems: all.iter().map(|e| e.to_string()).collect(),
        })?;
    Ok((inst, street_of, cut_off))
}

/// Streets the turn rules cut off from the yard ([`crate::turns::unservable`])
/// made driven, not served, in `network`; returns their labels.
fn unserve_cut_off(
    plain: &Instance,
    rules: &crate::turns::TurnRules,
    network: &mut Network,
    file: &str,
) -> Result<Vec<String>, MapError> {
    let table =
        TurnTable::without_ways_out_check(plain, rules).map_err(|all| MapError::TurnRules {
            file: file.to_string(),
            problems: all.iter().map(|e| e.to_string()).collect(),
        })?;
    Ok(crate::turns::unservable(plain, &table)
        .into_iter()
        .map(|t| {
            let link = plain.tasks()[t].link;
            network.links[link].service = None;
            network.street_label(link)
        })
        .collect())
}

fn model_error(graph: &StreetGraph, street_of: &[usize], file: &str, e: ModelError) -> MapError {
    let problem = match e.link().and_then(|l| street_of.get(l)) {
        Some(&s) => {
            let st = &graph.streets[s];
            let what = match &e {
                ModelError::DemandExceedsCapacity {
                    demand, capacity, ..
                } => format!("its demand {demand} exceeds a truck's capacity {capacity} (raise the capacity or lower the demand per km)"),
                ModelError::Unreachable { .. } => {
                    "it cannot be reached from the yard and back".to_string()
                }
                other => other.to_string(),
            };
            format!(
                "street {} (way {}, {:.0} m): {what}",
                st.name.as_deref().unwrap_or("without a name"),
                st.end_ways.0,
                st.length_m
            )
        }
        None => e.to_string(),
    };
    MapError::Model {
        file: file.to_string(),
        problem,
        source: e,
    }
}
