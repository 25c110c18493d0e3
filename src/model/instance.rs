use serde::{Deserialize, Serialize};

use super::{
    CoordError, Coordinates, Cost, Fleet, Network, Operations, OperationsError, ServeDirection,
    Units,
};

/// Why a network, fleet and yard do not make a valid instance.
///
/// Messages speak of streets, the yard and trucks, and name a street by its
/// name and end junctions ([`Network::street_label`]); `link` fields are
/// indices into [`Network::links`] (for a scenario file: `streets[link]`).
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum ModelError {
    /// The yard index is not a junction.
    #[error("the yard (junction index {depot}) is not a junction: the network has {junctions}")]
    DepotOutOfRange {
        /// The yard index given.
        depot: usize,
        /// The number of junctions of the network.
        junctions: usize,
    },
    /// A street refers to a junction that does not exist.
    #[error("street {link} refers to junction index {junction}, but the network has {junctions} junctions")]
    LinkEndOutOfRange {
        /// Index of the link (street) in `Network::links` (for a scenario: `streets[link]`).
        link: usize,
        /// The junction index given.
        junction: usize,
        /// The number of junctions of the network.
        junctions: usize,
    },
    /// A cost, time or demand is negative.
    #[error("{street}: {what} must not be negative, found {value}")]
    Negative {
        /// Index of the link (street) in `Network::links` (for a scenario: `streets[link]`).
        link: usize,
        /// The street as messages name it (`Network::street_label`).
        street: String,
        /// What the number is (cost, demand, ...).
        what: &'static str,
        /// The value found.
        value: Cost,
    },
    /// The trucks' capacity is not positive.
    #[error("the truck capacity must be positive, found {capacity}")]
    BadCapacity {
        /// The truck capacity.
        capacity: Cost,
    },
    /// A single street to serve needs more than a whole truck.
    #[error("{street}: demand {demand} exceeds the truck capacity {capacity}")]
    DemandExceedsCapacity {
        /// Index of the link (street) in `Network::links` (for a scenario: `streets[link]`).
        link: usize,
        /// The street as messages name it (`Network::street_label`).
        street: String,
        /// The demand of the street.
        demand: Cost,
        /// The truck capacity.
        capacity: Cost,
    },
    /// A street to serve cannot be served on a round trip from the yard.
    #[error("{street} is to be served, but {why}")]
    Unreachable {
        /// Index of the link (street) in `Network::links` (for a scenario: `streets[link]`).
        link: usize,
        /// The street as messages name it (`Network::street_label`).
        street: String,
        /// Why no round trip from the yard serves it.
        why: Reach,
    },
    /// The fleet allows zero trucks but there is work to do.
    #[error("the fleet allows no truck but there are {tasks} streets to serve")]
    NoVehicles {
        /// The number of streets to serve.
        tasks: usize,
    },
    /// Dump sites, yards or truck types that do not fit the network.
    #[error("{0}")]
    Operations(OperationsError),
}

/// Why a street to serve is out of reach of a round trip from the yard.
#[derive(Clone, Copy, Debug, PartialEq, Eq, thiserror::Error)]
pub enum Reach {
    /// No way leads from the yard to its start (in any allowed direction).
    #[error("no way leads to it from the yard")]
    NotFromYard,
    /// A truck can get to it, but no way leads from its end back to the
    /// yard: it can be entered but not left (a one-way trap).
    #[error("no way leads from it back to the yard (a truck could enter it but not leave)")]
    NoWayBack,
}

/// Most problems a reader lists for one input (from [`Instance::validate`]
/// and its own checks); the rest are counted, not listed.
pub const MAX_PROBLEMS: usize = 20;

impl ModelError {
    /// The link the error is about, if any (readers map it back to a source line).
    pub fn link(&self) -> Option<usize> {
        match *self {
            ModelError::LinkEndOutOfRange { link, .. }
            | ModelError::Negative { link, .. }
            | ModelError::DemandExceedsCapacity { link, .. }
            | ModelError::Unreachable { link, .. } => Some(link),
            _ => None,
        }
    }
}

/// The direction in which a task is served.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize, Deserialize)]
pub enum Dir {
    /// From the link's `from` junction to its `to` junction.
    Forward,
    /// From `to` to `from`.
    Backward,
}

impl Dir {
    /// The other direction.
    pub fn flip(self) -> Dir {
        match self {
            Dir::Forward => Dir::Backward,
            Dir::Backward => Dir::Forward,
        }
    }
}

/// A required link, as the solvers see it.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Task {
    /// Index of the link in [`Network::links`].
    pub link: usize,
    /// The link's `from` junction.
    pub tail: usize,
    /// The link's `to` junction.
    pub head: usize,
    /// Demand.
    pub demand: Cost,
    /// Cost of serving (paid once, whichever direction).
    pub cost: Cost,
    /// Time of serving.
    pub time: Cost,
    /// Whether it may be served [`Dir::Backward`] too.
    pub either: bool,
}

impl Task {
    /// Start and end junction when served in direction `dir`.
    pub fn ends(&self, dir: Dir) -> (usize, usize) {
        match dir {
            Dir::Forward => (self.tail, self.head),
            Dir::Backward => (self.head, self.tail),
        }
    }

    /// Whether `dir` is an allowed service direction.
    pub fn allows(&self, dir: Dir) -> bool {
        dir == Dir::Forward || self.either
    }
}

/// A validated routing instance: network, fleet, depot and the derived tasks.
#[derive(Clone, Debug, PartialEq)]
pub struct Instance {
    /// A name for reports.
    pub name: String,
    units: Units,
    coordinates: Coordinates,
    network: Network,
    fleet: Fleet,
    depot: usize,
    tasks: Vec<Task>,
    turns: Option<crate::turns::TurnRules>,
    ops: Operations,
}

impl Instance {
    /// Validates and builds an instance.
    ///
    /// ```
    /// use arcwright::model::{Fleet, Instance, Network};
    /// let mut net = Network::with_junctions(3);
    /// net.add_required_edge(0, 1, 4, 2);
    /// net.add_required_edge(1, 2, 5, 3);
    /// net.add_edge(2, 0, 7);
    /// let inst = Instance::new("triangle", net, Fleet::with_capacity(10), 0).unwrap();
    /// assert_eq!(inst.tasks().len(), 2);
    /// ```
    ///
    /// # Errors
    /// The first [`ModelError`] that [`Instance::validate`] finds.
    pub fn new(
        name: impl Into<String>,
        network: Network,
        fleet: Fleet,
        depot: usize,
    ) -> Result<Instance, ModelError> {
        Instance::validate(name, network, fleet, depot).map_err(|mut all| all.remove(0))
    }

    /// Validates and builds an instance, reporting every problem found (the
    /// general ones first, then in link order) instead of stopping at the
    /// first. Readers list up to [`MAX_PROBLEMS`] of them and count the rest.
    ///
    /// # Errors
    /// A non-empty list of [`ModelError`]s: the yard or a street end is not a
    /// junction, a negative number, a capacity that is not positive, a street
    /// whose demand exceeds a truck, no truck for the work, or a street to
    /// serve that no round trip from the yard can serve.
    ///
    /// # Complexity
    /// `O(V + E)` for `V` junctions and `E` links.
    ///
    /// ```
    /// use arcwright::model::{Fleet, Instance, ModelError, Network};
    /// let mut net = Network::with_junctions(3);
    /// net.add_required_edge(0, 1, -4, 2);
    /// net.add_required_edge(1, 2, 5, 30);
    /// let all = Instance::validate("faults", net, Fleet::with_capacity(10), 0).unwrap_err();
    /// // Street 0: negative cost and service cost; street 1: 30 bins in trucks of 10.
    /// assert_eq!(all.len(), 3);
    /// assert!(matches!(all[2], ModelError::DemandExceedsCapacity { link: 1, .. }));
    /// ```
    pub fn validate(
        name: impl Into<String>,
        network: Network,
        fleet: Fleet,
        depot: usize,
    ) -> Result<Instance, Vec<ModelError>> {
        let n = network.junctions.len();
        let mut problems = Vec::new();
        if depot >= n {
            problems.push(ModelError::DepotOutOfRange {
                depot,
                junctions: n,
            });
        }
        if fleet.capacity <= 0 {
            problems.push(ModelError::BadCapacity {
                capacity: fleet.capacity,
            });
        }
        let tasks = check_links(&network, &fleet, &mut problems);
        if fleet.max_vehicles == Some(0) && !tasks.is_empty() {
            problems.push(ModelError::NoVehicles { tasks: tasks.len() });
        }
        let inst = Instance {
            name: name.into(),
            units: Units::default(),
            coordinates: Coordinates::Undeclared,
            network,
            fleet,
            depot,
            tasks,
            turns: None,
            ops: Operations::default(),
        };
        if problems.is_empty() {
            inst.check_reachable(&mut problems);
        }
        if problems.is_empty() {
            Ok(inst)
        } else {
            Err(problems)
        }
    }

    /// Every task must be servable on a round trip from the yard: in some
    /// allowed direction its start and end lie in the yard's strongly
    /// connected component of the driving graph (the task's own link is an
    /// arc of that graph, so this is the same as: the start can be reached
    /// from the yard and the yard from the end). Strongly connected
    /// components by Tarjan's algorithm (petgraph); the reason given tells
    /// a street the yard cannot reach from one a truck cannot leave.
    fn check_reachable(&self, problems: &mut Vec<ModelError>) {
        use petgraph::graph::{DiGraph, NodeIndex};
        let n = self.network.junctions.len();
        let mut g: DiGraph<(), ()> = DiGraph::with_capacity(n, 2 * self.network.links.len());
        for _ in 0..n {
            g.add_node(());
        }
        for l in &self.network.links {
            g.add_edge(NodeIndex::new(l.from), NodeIndex::new(l.to), ());
            if !l.oneway {
                g.add_edge(NodeIndex::new(l.to), NodeIndex::new(l.from), ());
            }
        }
        let mut with_yard = vec![false; n];
        for comp in petgraph::algo::tarjan_scc(&g) {
            if comp.iter().any(|v| v.index() == self.depot) {
                for v in comp {
                    with_yard[v.index()] = true;
                }
                break;
            }
        }
        let mut from_yard = vec![false; n];
        let mut dfs = petgraph::visit::Dfs::new(&g, NodeIndex::new(self.depot));
        while let Some(v) = dfs.next(&g) {
            from_yard[v.index()] = true;
        }
        for t in &self.tasks {
            let dirs = || {
                [Dir::Forward, Dir::Backward]
                    .into_iter()
                    .filter(|&d| t.allows(d))
            };
            if dirs().any(|d| {
                let (s, e) = t.ends(d);
                with_yard[s] && with_yard[e]
            }) {
                continue;
            }
            let entered = dirs().any(|d| from_yard[t.ends(d).0]);
            problems.push(ModelError::Unreachable {
                link: t.link,
                street: self.network.street_label(t.link),
                why: if entered {
                    Reach::NoWayBack
                } else {
                    Reach::NotFromYard
                },
            });
        }
    }

    /// The street network.
    pub fn network(&self) -> &Network {
        &self.network
    }

    /// The fleet.
    pub fn fleet(&self) -> &Fleet {
        &self.fleet
    }

    /// The depot junction (index into the network's junctions).
    pub fn depot(&self) -> usize {
        self.depot
    }

    /// The tasks, one per required link, in link order.
    pub fn tasks(&self) -> &[Task] {
        &self.tasks
    }

    /// Sum of all task demands.
    pub fn total_demand(&self) -> Cost {
        self.tasks.iter().map(|t| t.demand).sum()
    }

    /// Sum of all task service costs (paid by every plan).
    pub fn total_service_cost(&self) -> Cost {
        self.tasks.iter().map(|t| t.cost).sum()
    }

    /// Whether any time differs from its cost (then shift limits need a time matrix).
    pub fn has_times(&self) -> bool {
        self.network.has_times()
    }

    /// Returns a copy with another fleet, revalidated (its operations are
    /// kept and revalidated too).
    ///
    /// # Errors
    /// The first [`ModelError`] with the new fleet (a capacity that is not positive, a street
    /// heavier than a truck, no truck for the work); operations that no longer fit give
    /// [`ModelError::Operations`].
    pub fn with_fleet(&self, fleet: Fleet) -> Result<Instance, ModelError> {
        let inst = Instance::new(self.name.clone(), self.network.clone(), fleet, self.depot)?;
        let inst = Instance {
            units: self.units.clone(),
            coordinates: self.coordinates,
            turns: self.turns,
            ..inst
        };
        inst.with_operations(self.ops.clone())
            .map_err(ModelError::Operations)
    }

    /// The dump sites, yards, truck types and balance setting
    /// ([`Operations::default`], every feature off, unless set with
    /// [`Instance::with_operations`]).
    pub fn operations(&self) -> &Operations {
        &self.ops
    }

    /// Attaches dump sites, yards, truck types and a balance setting,
    /// validated against the network.
    ///
    /// ```
    /// use arcwright::model::{DumpSite, Fleet, Instance, Network, Operations};
    /// let mut net = Network::with_junctions(3);
    /// net.add_required_edge(0, 1, 4, 2);
    /// net.add_edge(1, 2, 5);
    /// let inst = Instance::new("lane", net, Fleet::with_capacity(10), 0).unwrap();
    /// let ops = Operations {
    ///     dump_sites: vec![DumpSite { name: None, junction: 2, unload_time: 20,
    ///                                 unload_cost: 0, hours: None }],
    ///     ..Operations::default()
    /// };
    /// let inst = inst.with_operations(ops).unwrap();
    /// assert_eq!(inst.operations().dump_sites.len(), 1);
    /// ```
    ///
    /// # Errors
    ///
    /// An [`OperationsError`] naming the dump site, yard, truck type or
    /// street at fault: a junction or street out of range, a negative
    /// number, a dump site that a street to serve cannot reach, a yard with
    /// no trucks, a truck type that can serve no street, a street no truck
    /// type can serve.
    pub fn with_operations(mut self, ops: Operations) -> Result<Instance, OperationsError> {
        ops.validate(&self)?;
        self.ops = ops;
        Ok(self)
    }

    /// The units the scenario declares for its numbers.
    pub fn units(&self) -> &Units {
        &self.units
    }

    /// The instance with these units declared.
    pub fn with_units(self, units: Units) -> Instance {
        Instance { units, ..self }
    }

    /// The turn rules, when the scenario sets them (`None`: trucks turn
    /// freely and pay nothing for turns, as in the public research sets).
    pub fn turn_rules(&self) -> Option<&crate::turns::TurnRules> {
        self.turns.as_ref()
    }

    /// The instance with these turn rules, after checking that they can be
    /// used (see [`crate::turns::TurnTable::new`]).
    ///
    /// # Errors
    /// Every [`crate::turns::TurnError`] found.
    pub fn with_turn_rules(
        self,
        rules: Option<crate::turns::TurnRules>,
    ) -> Result<Instance, Vec<crate::turns::TurnError>> {
        if let Some(r) = &rules {
            crate::turns::TurnTable::new(&self, r)?;
        }
        Ok(Instance {
            turns: rules,
            ..self
        })
    }

    /// The coordinate system of the junctions' `x` and `y`.
    pub fn coordinates(&self) -> Coordinates {
        self.coordinates
    }

    /// The instance with its junction coordinates declared to be in
    /// `system`, after checking every junction's coordinates against it.
    ///
    /// # Errors
    ///
    /// The index of the first junction whose coordinates cannot be in
    /// `system` (see [`Coordinates::check_point`]), with the reason.
    pub fn with_coordinates(self, system: Coordinates) -> Result<Instance, (usize, CoordError)> {
        for (i, j) in self.network.junctions.iter().enumerate() {
            if let (Some(x), Some(y)) = (j.x, j.y) {
                system.check_point(x, y).map_err(|e| (i, e))?;
            }
        }
        Ok(Instance {
            coordinates: system,
            ..self
        })
    }
}

/// Checks every link (ends, signs, demand against capacity) and derives the
/// tasks of the valid required ones; problems go to `problems`.
fn check_links(network: &Network, fleet: &Fleet, problems: &mut Vec<ModelError>) -> Vec<Task> {
    let n = network.junctions.len();
    let mut tasks = Vec::new();
    for (i, l) in network.links.iter().enumerate() {
        if let Some(&j) = [l.from, l.to].iter().find(|&&j| j >= n) {
            problems.push(ModelError::LinkEndOutOfRange {
                link: i,
                junction: j,
                junctions: n,
            });
            continue;
        }
        let before = problems.len();
        let mut neg = |what, value: Cost| {
            if value < 0 {
                problems.push(ModelError::Negative {
                    link: i,
                    street: network.street_label(i),
                    what,
                    value,
                });
            }
        };
        neg("cost", l.cost);
        neg("time", l.time.unwrap_or(0));
        neg("length", l.length.unwrap_or(0));
        let Some(s) = &l.service else { continue };
        neg("service cost", s.cost);
        neg("service time", s.time.unwrap_or(0));
        neg("demand", s.demand);
        if s.demand > fleet.capacity && fleet.capacity > 0 {
            problems.push(ModelError::DemandExceedsCapacity {
                link: i,
                street: network.street_label(i),
                demand: s.demand,
                capacity: fleet.capacity,
            });
        }
        if problems.len() == before {
            tasks.push(Task {
                link: i,
                tail: l.from,
                head: l.to,
                demand: s.demand,
                cost: s.cost,
                time: s.time.unwrap_or(s.cost),
                either: s.direction == ServeDirection::Either && !l.oneway,
            });
        }
    }
    tasks
}
