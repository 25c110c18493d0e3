//! Dump sites, several yards, truck types and the balance setting: how a
//! refuse fleet really runs, on top of the plain model of one yard and one
//! kind of truck.
//!
//! An [`Operations`] value is attached to an [`Instance`] with
//! [`Instance::with_operations`]; the default (no dump sites, no yards, no
//! truck types, [`Balance::LeastCost`]) means *every feature off*: the plain
//! model of [`Instance::new`], solved exactly as before.
//!
//! **Trips and tips.** A truck leaves its home yard at time 0, serves
//! streets, and may *tip* at any dump site between two streets (or after the
//! last one). The load limit holds for each *trip*, the streets served
//! between two tips (or between the yard and the first tip, or the last tip
//! and the yard). With [`Operations::return_empty`] the truck must tip after
//! its last street whenever that trip carried a positive load. Without dump
//! sites a route is one trip, as in the plain model.
//!
//! **Time.** The shift time of a route is everything from leaving the yard
//! to coming back: driving, serving, waiting for a dump site to open, and
//! unloading. A dump site with opening hours accepts a truck that arrives
//! between `opens` and `closes` (inclusive, in time units since the start of
//! the shift); a truck arriving early waits until `opens`.
//!
//! **Cost.** Every number is an exact integer. A route of a truck of type
//! `k` that drives (serving or not) links of total cost `d` and tips at sites
//! of total unload cost `u` costs
//!
//! `fixed_cost(k) + ceil(cost_per_mille(k) · d / 1000) + u`,
//!
//! the cost factor being given in thousandths (`1000` = the link costs as
//! they are, `1250` = a quarter more). With the defaults (fixed cost 0,
//! factor 1000, no unload cost) this is today's route cost.
//!
//! **Restrictions.** A truck type may list streets it must not drive on
//! (`no_entry`: it may neither drive nor serve them) and streets it must not
//! serve (`no_service`: it may still drive along them). Streets are given by
//! link index ([`crate::model::Network::links`], the position in the
//! scenario's `streets` array) or by road class ([`crate::model::Link::class`],
//! the OpenStreetMap `highway=*` value on maps): `no_entry_classes` and
//! `no_service_classes` bar every street of those classes. A street without
//! a class is never barred by a class. [`TruckType::no_entry_links`] and
//! [`TruckType::no_service_links`] give the streets barred either way.

use std::collections::VecDeque;

use serde::{Deserialize, Serialize};

use super::{Cost, Dir, Instance, Network};

/// A place where trucks unload: a landfill, a transfer station, an
/// incinerator.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct DumpSite {
    /// A name for reports (`None`: "dump site N").
    pub name: Option<String>,
    /// Junction index (into [`crate::model::Network::junctions`]).
    pub junction: usize,
    /// Time to unload, in time units.
    pub unload_time: Cost,
    /// Cost of each unloading (a gate fee), in cost units; 0 when free.
    pub unload_cost: Cost,
    /// Opening hours, when not always open.
    pub hours: Option<Hours>,
}

/// Opening hours of a dump site, in time units since the start of the shift.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Hours {
    /// Earliest arrival accepted; an earlier truck waits.
    pub opens: Cost,
    /// Latest arrival accepted.
    pub closes: Cost,
}

impl Hours {
    /// The time unloading starts for a truck arriving at `arrival`, or `None`
    /// when the site is already closed.
    pub fn start(&self, arrival: Cost) -> Option<Cost> {
        (arrival <= self.closes).then(|| arrival.max(self.opens))
    }
}

/// A yard trucks leave from and return to.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Yard {
    /// The yard's name (truck types refer to it).
    pub name: String,
    /// Junction index.
    pub junction: usize,
}

/// A kind of truck.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct TruckType {
    /// The type's name.
    pub name: String,
    /// How many trucks of this type are available (`None`: as many as needed).
    pub count: Option<usize>,
    /// Load limit of one trip.
    pub capacity: Cost,
    /// Shift limit of one route (driving, serving, waiting, unloading).
    pub shift_limit: Option<Cost>,
    /// Index of the home yard in [`Operations::yards`] (0 when the instance
    /// has only its own depot as yard).
    pub yard: usize,
    /// Cost of using one truck of this type (paid once per route).
    pub fixed_cost: Cost,
    /// Cost factor per unit driven, in thousandths (1000 = plain link costs).
    pub cost_per_mille: Cost,
    /// Links the type must not drive on (nor serve).
    pub no_entry: Vec<usize>,
    /// Links the type must not serve (it may drive along them).
    pub no_service: Vec<usize>,
    /// Road classes the type must not drive on (nor serve): every link whose
    /// [`crate::model::Link::class`] is one of them.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub no_entry_classes: Vec<String>,
    /// Road classes the type must not serve (it may drive along them).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub no_service_classes: Vec<String>,
}

impl TruckType {
    /// A type of `capacity` from yard 0 with every other setting at its
    /// default: as many trucks as needed, no shift limit, no fixed cost,
    /// factor 1000, no restrictions.
    pub fn new(name: impl Into<String>, capacity: Cost) -> TruckType {
        TruckType {
            name: name.into(),
            count: None,
            capacity,
            shift_limit: None,
            yard: 0,
            fixed_cost: 0,
            cost_per_mille: 1000,
            no_entry: Vec::new(),
            no_service: Vec::new(),
            no_entry_classes: Vec::new(),
            no_service_classes: Vec::new(),
        }
    }

    /// Whether the type has any street or road-class restriction.
    pub fn is_restricted(&self) -> bool {
        !(self.no_entry.is_empty()
            && self.no_service.is_empty()
            && self.no_entry_classes.is_empty()
            && self.no_service_classes.is_empty())
    }

    /// The links of `net` the type may not drive on: `no_entry` and every
    /// link of a class in `no_entry_classes`, sorted, without repeats.
    pub fn no_entry_links(&self, net: &Network) -> Vec<usize> {
        barred(net, &self.no_entry, &self.no_entry_classes)
    }

    /// The links of `net` the type may not serve: those it may not enter,
    /// `no_service`, and every link of a class in `no_service_classes`;
    /// sorted, without repeats.
    pub fn no_service_links(&self, net: &Network) -> Vec<usize> {
        let mut v = barred(net, &self.no_service, &self.no_service_classes);
        v.extend(self.no_entry_links(net));
        v.sort_unstable();
        v.dedup();
        v
    }
}

/// `links` plus every link of `net` whose class is in `classes`, sorted and
/// without repeats.
fn barred(net: &Network, links: &[usize], classes: &[String]) -> Vec<usize> {
    let mut v = links.to_vec();
    if !classes.is_empty() {
        v.extend(net.links.iter().enumerate().filter_map(|(i, l)| {
            l.class
                .as_ref()
                .is_some_and(|c| classes.iter().any(|x| x == c))
                .then_some(i)
        }));
    }
    v.sort_unstable();
    v.dedup();
    v
}

/// Whether `class` may be named in a truck type's restrictions on `net`: some
/// street of the network has it, or it is an OpenStreetMap road class
/// arcwright knows ([`crate::map::ROAD_CLASSES`]).
pub fn known_class(net: &Network, class: &str) -> bool {
    crate::map::ROAD_CLASSES.contains(&class)
        || net.links.iter().any(|l| l.class.as_deref() == Some(class))
}

/// The balance setting: what the solver minimises.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize)]
pub enum Balance {
    /// Least total cost (the default).
    #[default]
    LeastCost,
    /// Least `total cost + weight × longest shift time`: the weight says how
    /// many cost units one time unit of the longest shift is worth (an exact
    /// integer weighted sum; weight 0 is [`Balance::LeastCost`]).
    LongestShift {
        /// Cost units per time unit of the longest shift.
        weight: Cost,
    },
}

/// Dump sites, yards, truck types and the balance setting of an instance.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Operations {
    /// The dump sites (none: trucks never tip; a route is one trip).
    pub dump_sites: Vec<DumpSite>,
    /// Whether a truck must tip before it returns to its yard (only
    /// meaningful with dump sites; default true).
    pub return_empty: bool,
    /// The yards (empty: the instance's depot is the only yard).
    pub yards: Vec<Yard>,
    /// The truck types (empty: one type made from the instance's fleet).
    pub truck_types: Vec<TruckType>,
    /// The balance setting.
    pub balance: Balance,
}

impl Default for Operations {
    fn default() -> Self {
        Operations {
            dump_sites: Vec::new(),
            return_empty: true,
            yards: Vec::new(),
            truck_types: Vec::new(),
            balance: Balance::LeastCost,
        }
    }
}

/// Why dump sites, yards or truck types do not fit an instance. Messages use
/// the words of the scenario file: street (index in `streets`), junction
/// (by id), yard and truck type (by name), dump site (by position).
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum OperationsError {
    /// A junction index out of range.
    #[error("{what} is not a junction of the network")]
    NoSuchJunction {
        /// Which element ("dump site 2", "yard `north`").
        what: String,
    },
    /// A number that must not be negative.
    #[error("{element}: the {what} must not be negative, found {value}")]
    Negative {
        /// Where the number is.
        element: Element,
        /// What the number is ("unload time", "fixed cost", ...).
        what: &'static str,
        /// The value.
        value: Cost,
    },
    /// A load limit that is not positive.
    #[error("truck type `{truck}`: the capacity must be positive, found {capacity}")]
    BadCapacity {
        /// The truck type.
        truck: String,
        /// The value.
        capacity: Cost,
    },
    /// Opening hours that close before they open.
    #[error("dump site {site}: closes at {closes}, before it opens at {opens}")]
    BadHours {
        /// Dump site position.
        site: usize,
        /// Opening time.
        opens: Cost,
        /// Closing time.
        closes: Cost,
    },
    /// Two yards or two truck types with the same name.
    #[error("{what} `{name}` is given twice")]
    DuplicateName {
        /// "yard" or "truck type".
        what: &'static str,
        /// The name.
        name: String,
    },
    /// A truck type's home yard is not a yard.
    #[error("truck type `{truck}`: its yard (number {yard}) is not a yard")]
    NoSuchYard {
        /// The truck type.
        truck: String,
        /// The yard index given.
        yard: usize,
    },
    /// A street index out of range in a truck type's restrictions.
    #[error("truck type `{truck}`: {list} names street {street}, which does not exist")]
    NoSuchStreet {
        /// The truck type.
        truck: String,
        /// `no_entry` or `no_service`.
        list: &'static str,
        /// The street index.
        street: usize,
    },
    /// A road class in a truck type's restrictions that no street of the
    /// network has and that is not an OpenStreetMap road class.
    #[error("truck type `{truck}`: {list} names road class `{class}`, which no street has and which is not an OpenStreetMap road class")]
    UnknownRoadClass {
        /// The truck type.
        truck: String,
        /// `no_entry` or `no_service`.
        list: &'static str,
        /// The class as written.
        class: String,
    },
    /// A yard that no truck type calls home.
    #[error("yard `{yard}` has no trucks (no truck type names it as its yard)")]
    YardWithoutTrucks {
        /// The yard's name.
        yard: String,
    },
    /// A truck type with no available truck although it is listed.
    #[error("truck type `{truck}`: count 0, no truck of this type is available")]
    NoTrucksOfType {
        /// The truck type.
        truck: String,
    },
    /// A truck type that can serve no street at all.
    #[error("truck type `{truck}` may serve none of the streets to serve (its restrictions, load limit and yard leave none)")]
    TypeServesNothing {
        /// The truck type.
        truck: String,
    },
    /// A street that no truck type can serve.
    #[error("street {street}: no truck type can serve it (restrictions, load limit, reachability from and back to its yard)")]
    StreetServedByNone {
        /// The street (link index).
        street: usize,
    },
    /// A dump site that some street to serve cannot reach.
    #[error("dump site {site}: cannot be reached from street {street} (a street to serve)")]
    DumpSiteUnreachable {
        /// Dump site position.
        site: usize,
        /// The street (link index).
        street: usize,
    },
}

/// The element of the operations an error is about.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Element {
    /// A dump site, by position in [`Operations::dump_sites`].
    DumpSite(usize),
    /// A yard, by name.
    Yard(String),
    /// A truck type, by name.
    TruckType(String),
    /// A street (link index).
    Street(usize),
}

impl std::fmt::Display for Element {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            Element::DumpSite(i) => write!(f, "dump site {i}"),
            Element::Yard(n) => write!(f, "yard `{n}`"),
            Element::TruckType(n) => write!(f, "truck type `{n}`"),
            Element::Street(i) => write!(f, "street {i}"),
        }
    }
}

impl OperationsError {
    /// The dump site, yard, truck type or street the error is about (readers
    /// map it back to a place in the file).
    pub fn element(&self) -> Option<Element> {
        use OperationsError as E;
        match self {
            E::NoSuchJunction { .. } => None,
            E::Negative { element, .. } => Some(element.clone()),
            E::BadHours { site, .. } | E::DumpSiteUnreachable { site, .. } => {
                Some(Element::DumpSite(*site))
            }
            E::DuplicateName { what, name } => Some(if *what == "yard" {
                Element::Yard(name.clone())
            } else {
                Element::TruckType(name.clone())
            }),
            E::BadCapacity { truck, .. }
            | E::NoSuchYard { truck, .. }
            | E::NoSuchStreet { truck, .. }
            | E::UnknownRoadClass { truck, .. }
            | E::NoTrucksOfType { truck }
            | E::TypeServesNothing { truck } => Some(Element::TruckType(truck.clone())),
            E::YardWithoutTrucks { yard } => Some(Element::Yard(yard.clone())),
            E::StreetServedByNone { street } => Some(Element::Street(*street)),
        }
    }
}

impl Operations {
    /// Whether every feature is off: no dump site, at most the instance's own
    /// yard, and at most one truck type equal to the instance's fleet (yard =
    /// depot, no fixed cost, factor 1000, no restrictions), least cost.
    pub fn is_plain(&self, inst: &Instance) -> bool {
        let yard_ok = match self.yards.as_slice() {
            [] => true,
            [y] => y.junction == inst.depot(),
            _ => false,
        };
        let type_ok = match self.truck_types.as_slice() {
            [] => true,
            [t] => {
                let f = inst.fleet();
                t.capacity == f.capacity
                    && t.shift_limit == f.shift_limit
                    && t.count == f.max_vehicles
                    && t.fixed_cost == 0
                    && t.cost_per_mille == 1000
                    && !t.is_restricted()
            }
            _ => false,
        };
        self.dump_sites.is_empty()
            && yard_ok
            && type_ok
            && matches!(
                self.balance,
                Balance::LeastCost | Balance::LongestShift { weight: 0 }
            )
    }

    /// The yards in effect: the given ones, or the instance's depot named "yard".
    pub fn yards_of(&self, inst: &Instance) -> Vec<Yard> {
        if self.yards.is_empty() {
            vec![Yard {
                name: "yard".to_string(),
                junction: inst.depot(),
            }]
        } else {
            self.yards.clone()
        }
    }

    /// The truck types in effect: the given ones, or one type made from the
    /// instance's fleet (named "truck", home yard 0).
    pub fn types_of(&self, inst: &Instance) -> Vec<TruckType> {
        if self.truck_types.is_empty() {
            let f = inst.fleet();
            vec![TruckType {
                count: f.max_vehicles,
                shift_limit: f.shift_limit,
                ..TruckType::new("truck", f.capacity)
            }]
        } else {
            self.truck_types.clone()
        }
    }

    /// Checks the numbers, names and references, independent of reachability.
    fn check_shape(&self, inst: &Instance) -> Result<(), OperationsError> {
        let n = inst.network().len();
        let links = inst.network().links.len();
        let neg = |element: Element, what: &'static str, value: Cost| {
            if value < 0 {
                Err(OperationsError::Negative {
                    element,
                    what,
                    value,
                })
            } else {
                Ok(())
            }
        };
        for (i, s) in self.dump_sites.iter().enumerate() {
            if s.junction >= n {
                return Err(OperationsError::NoSuchJunction {
                    what: format!("dump site {i}"),
                });
            }
            neg(Element::DumpSite(i), "unload time", s.unload_time)?;
            neg(Element::DumpSite(i), "unload cost", s.unload_cost)?;
            if let Some(h) = s.hours {
                neg(Element::DumpSite(i), "opening time", h.opens)?;
                if h.closes < h.opens {
                    return Err(OperationsError::BadHours {
                        site: i,
                        opens: h.opens,
                        closes: h.closes,
                    });
                }
            }
        }
        for (i, y) in self.yards.iter().enumerate() {
            if y.junction >= n {
                return Err(OperationsError::NoSuchJunction {
                    what: format!("yard `{}`", y.name),
                });
            }
            if self.yards[..i].iter().any(|o| o.name == y.name) {
                return Err(OperationsError::DuplicateName {
                    what: "yard",
                    name: y.name.clone(),
                });
            }
        }
        let yards = self.yards.len().max(1);
        for (i, t) in self.truck_types.iter().enumerate() {
            if self.truck_types[..i].iter().any(|o| o.name == t.name) {
                return Err(OperationsError::DuplicateName {
                    what: "truck type",
                    name: t.name.clone(),
                });
            }
            if t.capacity <= 0 {
                return Err(OperationsError::BadCapacity {
                    truck: t.name.clone(),
                    capacity: t.capacity,
                });
            }
            if t.count == Some(0) {
                return Err(OperationsError::NoTrucksOfType {
                    truck: t.name.clone(),
                });
            }
            let e = || Element::TruckType(t.name.clone());
            neg(e(), "shift limit", t.shift_limit.unwrap_or(0))?;
            neg(e(), "fixed cost", t.fixed_cost)?;
            neg(e(), "cost factor", t.cost_per_mille)?;
            if t.yard >= yards {
                return Err(OperationsError::NoSuchYard {
                    truck: t.name.clone(),
                    yard: t.yard,
                });
            }
            for (list, streets) in [("no_entry", &t.no_entry), ("no_service", &t.no_service)] {
                if let Some(&street) = streets.iter().find(|&&l| l >= links) {
                    return Err(OperationsError::NoSuchStreet {
                        truck: t.name.clone(),
                        list,
                        street,
                    });
                }
            }
            for (list, classes) in [
                ("no_entry", &t.no_entry_classes),
                ("no_service", &t.no_service_classes),
            ] {
                if let Some(class) = classes.iter().find(|c| !known_class(inst.network(), c)) {
                    return Err(OperationsError::UnknownRoadClass {
                        truck: t.name.clone(),
                        list,
                        class: class.clone(),
                    });
                }
            }
        }
        for (i, y) in self.yards.iter().enumerate() {
            if !self.truck_types.is_empty() && !self.truck_types.iter().any(|t| t.yard == i) {
                return Err(OperationsError::YardWithoutTrucks {
                    yard: y.name.clone(),
                });
            }
        }
        if self.truck_types.is_empty() && self.yards.len() > 1 {
            return Err(OperationsError::YardWithoutTrucks {
                yard: self.yards[1].name.clone(),
            });
        }
        Ok(())
    }

    /// Full validation against `inst`: [`Self::check_shape`], then every dump
    /// site reachable from every street to serve (and back), every truck type
    /// able to serve some street on a route of its own, and every street
    /// served by some truck type on a route of its own.
    pub(crate) fn validate(&self, inst: &Instance) -> Result<(), OperationsError> {
        self.check_shape(inst)?;
        if inst.tasks().is_empty() {
            return Ok(());
        }
        let full = Reach::new(inst, &[]);
        for (i, s) in self.dump_sites.iter().enumerate() {
            let from = full.from(s.junction);
            let to = full.to(s.junction);
            for t in inst.tasks() {
                // The site must be reachable after serving the street and the
                // street must be reachable from the site (the next trip).
                let ok = [Dir::Forward, Dir::Backward]
                    .into_iter()
                    .filter(|&d| t.allows(d))
                    .any(|d| {
                        let (a, b) = t.ends(d);
                        to[b] && from[a]
                    });
                if !ok {
                    return Err(OperationsError::DumpSiteUnreachable {
                        site: i,
                        street: t.link,
                    });
                }
            }
        }
        let yards = self.yards_of(inst);
        let types = self.types_of(inst);
        let mut served = vec![false; inst.tasks().len()];
        for ty in &types {
            let no_entry = ty.no_entry_links(inst.network());
            let no_service = ty.no_service_links(inst.network());
            let r = Reach::new(inst, &no_entry);
            let y = yards[ty.yard].junction;
            let (fy, ty_) = (r.from(y), r.to(y));
            // Junctions from which some dump site that reaches the yard is reachable.
            let mut to_site = vec![false; inst.network().len()];
            for s in self.dump_sites.iter().filter(|s| ty_[s.junction]) {
                for (v, ok) in r.to(s.junction).into_iter().enumerate() {
                    to_site[v] |= ok;
                }
            }
            let mut any = false;
            for (k, t) in inst.tasks().iter().enumerate() {
                if no_service.binary_search(&t.link).is_ok() || t.demand > ty.capacity {
                    continue;
                }
                let ok = [Dir::Forward, Dir::Backward]
                    .into_iter()
                    .filter(|&d| t.allows(d))
                    .any(|d| {
                        let (a, b) = t.ends(d);
                        let must_tip =
                            self.return_empty && !self.dump_sites.is_empty() && t.demand > 0;
                        fy[a] && (to_site[b] || (!must_tip && ty_[b]))
                    });
                if ok {
                    any = true;
                    served[k] = true;
                }
            }
            if !any {
                return Err(OperationsError::TypeServesNothing {
                    truck: ty.name.clone(),
                });
            }
        }
        if let Some(k) = served.iter().position(|&s| !s) {
            return Err(OperationsError::StreetServedByNone {
                street: inst.tasks()[k].link,
            });
        }
        Ok(())
    }
}

/// Reachability in the network without some links.
struct Reach {
    out: Vec<Vec<usize>>,
    inn: Vec<Vec<usize>>,
}

impl Reach {
    /// The network without the links of `without` (sorted).
    fn new(inst: &Instance, without: &[usize]) -> Reach {
        let n = inst.network().len();
        let mut out = vec![Vec::new(); n];
        let mut inn = vec![Vec::new(); n];
        for (i, l) in inst.network().links.iter().enumerate() {
            if without.binary_search(&i).is_ok() {
                continue;
            }
            out[l.from].push(l.to);
            inn[l.to].push(l.from);
            if !l.oneway {
                out[l.to].push(l.from);
                inn[l.from].push(l.to);
            }
        }
        Reach { out, inn }
    }

    fn bfs(adj: &[Vec<usize>], s: usize) -> Vec<bool> {
        let mut seen = vec![false; adj.len()];
        seen[s] = true;
        let mut q = VecDeque::from([s]);
        while let Some(v) = q.pop_front() {
            for &w in &adj[v] {
                if !seen[w] {
                    seen[w] = true;
                    q.push_back(w);
                }
            }
        }
        seen
    }

    /// Junctions reachable from `s`.
    fn from(&self, s: usize) -> Vec<bool> {
        Self::bfs(&self.out, s)
    }

    /// Junctions from which `s` is reachable.
    fn to(&self, s: usize) -> Vec<bool> {
        Self::bfs(&self.inn, s)
    }
}
