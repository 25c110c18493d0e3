use std::collections::VecDeque;

use serde::{Deserialize, Serialize};

use super::{
    CoordError, Coordinates, Cost, Fleet, Network, Operations, OperationsError, ServeDirection,
    Units,
};

/// Why a network, fleet and depot do not make a valid instance.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum ModelError {
    /// The depot index is not a junction.
    #[error("depot {depot} is not a junction (the network has {junctions})")]
    DepotOutOfRange { depot: usize, junctions: usize },
    /// A link refers to a junction that does not exist.
    #[error("link {link} refers to junction {junction}, but the network has {junctions}")]
    LinkEndOutOfRange {
        link: usize,
        junction: usize,
        junctions: usize,
    },
    /// A cost, time or demand is negative.
    #[error("link {link}: {what} must not be negative, found {value}")]
    Negative {
        link: usize,
        what: &'static str,
        value: Cost,
    },
    /// The trucks' capacity is not positive.
    #[error("vehicle capacity must be positive, found {capacity}")]
    BadCapacity { capacity: Cost },
    /// A single required link needs more than a whole truck.
    #[error("link {link}: demand {demand} exceeds the vehicle capacity {capacity}")]
    DemandExceedsCapacity {
        link: usize,
        demand: Cost,
        capacity: Cost,
    },
    /// A required link cannot be served on a round trip from the depot.
    #[error("link {link} is required but cannot be reached from the depot and back")]
    Unreachable { link: usize },
    /// The fleet allows zero vehicles but there is work to do.
    #[error("the fleet allows no vehicle but there are {tasks} required links")]
    NoVehicles { tasks: usize },
    /// Dump sites, yards or truck types that do not fit the network.
    #[error("{0}")]
    Operations(OperationsError),
}

impl ModelError {
    /// The link the error is about, if any (readers map it back to a source line).
    pub fn link(&self) -> Option<usize> {
        match *self {
            ModelError::LinkEndOutOfRange { link, .. }
            | ModelError::Negative { link, .. }
            | ModelError::DemandExceedsCapacity { link, .. }
            | ModelError::Unreachable { link } => Some(link),
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
    pub fn new(
        name: impl Into<String>,
        network: Network,
        fleet: Fleet,
        depot: usize,
    ) -> Result<Instance, ModelError> {
        let n = network.junctions.len();
        if depot >= n {
            return Err(ModelError::DepotOutOfRange {
                depot,
                junctions: n,
            });
        }
        if fleet.capacity <= 0 {
            return Err(ModelError::BadCapacity {
                capacity: fleet.capacity,
            });
        }
        let mut tasks = Vec::new();
        for (i, l) in network.links.iter().enumerate() {
            for j in [l.from, l.to] {
                if j >= n {
                    return Err(ModelError::LinkEndOutOfRange {
                        link: i,
                        junction: j,
                        junctions: n,
                    });
                }
            }
            let neg = |what, value: Cost| {
                if value < 0 {
                    Err(ModelError::Negative {
                        link: i,
                        what,
                        value,
                    })
                } else {
                    Ok(())
                }
            };
            neg("cost", l.cost)?;
            neg("time", l.time.unwrap_or(0))?;
            neg("length", l.length.unwrap_or(0))?;
            if let Some(s) = &l.service {
                neg("service cost", s.cost)?;
                neg("service time", s.time.unwrap_or(0))?;
                neg("demand", s.demand)?;
                if s.demand > fleet.capacity {
                    return Err(ModelError::DemandExceedsCapacity {
                        link: i,
                        demand: s.demand,
                        capacity: fleet.capacity,
                    });
                }
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
        if fleet.max_vehicles == Some(0) && !tasks.is_empty() {
            return Err(ModelError::NoVehicles { tasks: tasks.len() });
        }
        let inst = Instance {
            name: name.into(),
            units: Units::default(),
            coordinates: Coordinates::Undeclared,
            network,
            fleet,
            depot,
            tasks,
            ops: Operations::default(),
        };
        inst.check_reachable()?;
        Ok(inst)
    }

    fn check_reachable(&self) -> Result<(), ModelError> {
        let n = self.network.junctions.len();
        let mut out: Vec<Vec<usize>> = vec![Vec::new(); n];
        let mut inn: Vec<Vec<usize>> = vec![Vec::new(); n];
        for l in &self.network.links {
            out[l.from].push(l.to);
            inn[l.to].push(l.from);
            if !l.oneway {
                out[l.to].push(l.from);
                inn[l.from].push(l.to);
            }
        }
        let reach = |adj: &Vec<Vec<usize>>| {
            let mut seen = vec![false; n];
            let mut q = VecDeque::from([self.depot]);
            seen[self.depot] = true;
            while let Some(v) = q.pop_front() {
                for &w in &adj[v] {
                    if !seen[w] {
                        seen[w] = true;
                        q.push_back(w);
                    }
                }
            }
            seen
        };
        let from_depot = reach(&out);
        let to_depot = reach(&inn);
        for t in &self.tasks {
            let ok = [Dir::Forward, Dir::Backward]
                .into_iter()
                .filter(|&d| t.allows(d))
                .any(|d| {
                    let (s, e) = t.ends(d);
                    from_depot[s] && to_depot[e]
                });
            if !ok {
                return Err(ModelError::Unreachable { link: t.link });
            }
        }
        Ok(())
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
    ///
    /// A [`ModelError`] when the fleet does not fit the network; operations
    /// that no longer fit give [`ModelError::Operations`].
    pub fn with_fleet(&self, fleet: Fleet) -> Result<Instance, ModelError> {
        let inst = Instance::new(self.name.clone(), self.network.clone(), fleet, self.depot)?;
        let inst = Instance {
            units: self.units.clone(),
            coordinates: self.coordinates,
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
