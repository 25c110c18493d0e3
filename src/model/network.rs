use serde::{Deserialize, Serialize};

use super::Cost;

/// A junction (vertex) of the street network.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Junction {
    /// The junction's number in the source data (1-based in the public sets,
    /// node ids for map data). Plans written to files use this number.
    pub id: u64,
    /// Optional coordinates, in the system the instance declares
    /// ([`crate::model::Instance::coordinates`]); used for maps.
    pub x: Option<f64>,
    /// See `x`.
    pub y: Option<f64>,
}

/// In which directions a required link may be served.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize, Deserialize)]
pub enum ServeDirection {
    /// Either direction (the classic undirected CARP edge).
    Either,
    /// Only from `Link::from` to `Link::to` (a one-way street, or one side of
    /// a street whose sides are served separately).
    Forward,
}

/// What serving a required link involves.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct ServiceSpec {
    /// Demand collected (or salt spread, ...) when the link is served.
    pub demand: Cost,
    /// Cost of driving the link while serving it (counted in the plan's total).
    pub cost: Cost,
    /// Time taken to serve it; `None` means equal to `cost`.
    pub time: Option<Cost>,
    /// Allowed service directions.
    pub direction: ServeDirection,
}

/// A street segment between two junctions.
///
/// `Link::default()` is a zero-cost two-way link from junction 0 to itself
/// with no name, geometry or class: handy as `..Link::default()` in struct
/// literals.
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
pub struct Link {
    /// Index of the first junction in [`Network::junctions`].
    pub from: usize,
    /// Index of the second junction.
    pub to: usize,
    /// One-way: may only be driven from `from` to `to`.
    pub oneway: bool,
    /// Cost of driving the link without serving it (deadheading).
    pub cost: Cost,
    /// Driving time without serving; `None` means equal to `cost`.
    pub time: Option<Cost>,
    /// `Some` when the link is required.
    pub service: Option<ServiceSpec>,
    /// Street name, for route sheets.
    pub name: Option<String>,
    /// Length of the street, in the scenario's length unit, when known
    /// (reports only; costs decide the plan).
    pub length: Option<Cost>,
    /// The street's shape for maps: points `[x, y]` (lon/lat or planar, as
    /// the junctions) from the `from` junction to the `to` junction, both
    /// included. Empty: a straight line between the two junctions.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub geometry: Vec<[f64; 2]>,
    /// Road class, such as the OpenStreetMap `highway=*` value
    /// (`residential`, `primary`, ...), when known.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub class: Option<String>,
}

impl Link {
    /// Deadhead driving time (the cost when no time is given).
    pub fn drive_time(&self) -> Cost {
        self.time.unwrap_or(self.cost)
    }
}

/// A turn that is forbidden, or the only one allowed, when arriving at a
/// junction along a link (an OpenStreetMap `type=restriction` relation with a
/// via node). Obeyed by the solver and the checker when the scenario has turn
/// rules ([`crate::turns`]).
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct TurnRestriction {
    /// The OpenStreetMap value, such as `no_left_turn` or `only_straight_on`:
    /// `no_*` forbids the turn from `from` into `to`; `only_*` forbids every
    /// other turn out of `from` at `via`.
    pub rule: String,
    /// Index of the link arriving at `via`.
    pub from: usize,
    /// Index of the junction where the turn is made.
    pub via: usize,
    /// Index of the link leaving `via`.
    pub to: usize,
}

impl TurnRestriction {
    /// True for an `only_*` rule (the one turn allowed), false for `no_*`.
    pub fn is_only(&self) -> bool {
        self.rule.starts_with("only_")
    }
}

/// A mixed multigraph of junctions and links.
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
pub struct Network {
    /// The junctions; links refer to them by index.
    pub junctions: Vec<Junction>,
    /// The links.
    pub links: Vec<Link>,
    /// Turn restrictions, obeyed when the instance has turn rules.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub turn_restrictions: Vec<TurnRestriction>,
}

impl Network {
    /// A network of `n` junctions numbered `1..=n` without coordinates.
    pub fn with_junctions(n: usize) -> Self {
        Network {
            junctions: (1..=n as u64)
                .map(|id| Junction {
                    id,
                    x: None,
                    y: None,
                })
                .collect(),
            ..Network::default()
        }
    }

    /// Adds a link and returns its index.
    pub fn add_link(&mut self, link: Link) -> usize {
        self.links.push(link);
        self.links.len() - 1
    }

    /// Adds a two-way link that is required in either direction, with equal
    /// service and deadhead cost (the public sets' convention).
    pub fn add_required_edge(&mut self, from: usize, to: usize, cost: Cost, demand: Cost) -> usize {
        self.add_link(Link {
            from,
            to,
            oneway: false,
            cost,
            time: None,
            service: Some(ServiceSpec {
                demand,
                cost,
                time: None,
                direction: ServeDirection::Either,
            }),
            name: None,
            ..Link::default()
        })
    }

    /// Adds a two-way link that may only be deadheaded.
    pub fn add_edge(&mut self, from: usize, to: usize, cost: Cost) -> usize {
        self.add_link(Link {
            from,
            to,
            oneway: false,
            cost,
            time: None,
            service: None,
            name: None,
            ..Link::default()
        })
    }

    /// How messages name link `i`: by its street name when it has one, and
    /// always by the numbers of its end junctions as the input file gives
    /// them, e.g. `street "Elm Road" (junctions 4-7)` or `street 4-7`.
    ///
    /// # Panics
    /// If `i` is not a link index or an end is not a junction.
    pub fn street_label(&self, i: usize) -> String {
        let l = &self.links[i];
        let (a, b) = (self.junctions[l.from].id, self.junctions[l.to].id);
        match &l.name {
            Some(name) => format!("street {name:?} (junctions {a}-{b})"),
            None => format!("street {a}-{b}"),
        }
    }

    /// Number of junctions.
    pub fn len(&self) -> usize {
        self.junctions.len()
    }

    /// True when there are no junctions.
    pub fn is_empty(&self) -> bool {
        self.junctions.is_empty()
    }

    /// Whether any link has a length.
    pub fn has_lengths(&self) -> bool {
        self.links.iter().any(|l| l.length.is_some())
    }

    /// Whether any link carries an explicit time (then times may differ from costs).
    pub fn has_times(&self) -> bool {
        self.links.iter().any(|l| {
            l.time.is_some_and(|t| t != l.cost)
                || l.service
                    .as_ref()
                    .is_some_and(|s| s.time.is_some_and(|t| t != s.cost))
        })
    }
}
