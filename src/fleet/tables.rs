//! What the fleet solver needs to know per truck type: its deadhead
//! distances (on the network without the streets it may not enter, by index
//! or road class), its yard, and which streets it may serve.

use crate::model::{Cost, Dir, DumpSite, Instance, Network, TruckType};
use crate::paths::{DistanceError, Distances, UNREACHABLE};

/// Per-type view of an instance with [`crate::model::Operations`].
#[derive(Clone, Debug)]
pub struct TypeTable {
    /// The truck type.
    pub ty: TruckType,
    /// Junction of its home yard.
    pub yard: usize,
    /// Index of its distances in [`Tables::dists`].
    pub dist: usize,
    /// Per task: may this type serve it (restrictions and load limit)?
    pub serves: Vec<bool>,
}

/// Distances and per-type data shared by the split, the solver and the plan
/// evaluation.
#[derive(Clone, Debug)]
pub struct Tables {
    /// One distance table per distinct list of streets barred from entry
    /// ([`TruckType::no_entry_links`]: by index and by road class).
    pub dists: Vec<Distances>,
    /// The truck types in effect ([`crate::model::Operations::types_of`]).
    pub types: Vec<TypeTable>,
    /// The dump sites.
    pub sites: Vec<DumpSite>,
    /// Whether trucks must tip before returning to the yard.
    pub return_empty: bool,
    /// Whether times matter (a shift limit, opening hours or balancing).
    pub timed: bool,
}

/// The network as a truck of a type that may not enter `no_entry` sees it:
/// those links become loops at their first junction, which no shortest path
/// uses, so link indices stay the same.
fn network_without(net: &Network, no_entry: &[usize]) -> Network {
    let mut net = net.clone();
    for &l in no_entry {
        let link = &mut net.links[l];
        link.to = link.from;
    }
    net
}

impl Tables {
    /// Builds the tables of `inst` (its operations, or the plain model).
    ///
    /// # Errors
    ///
    /// A [`DistanceError`] when a shortest path does not fit the 32-bit matrix.
    pub fn new(inst: &Instance) -> Result<Tables, DistanceError> {
        let ops = inst.operations();
        let yards = ops.yards_of(inst);
        let types = ops.types_of(inst);
        let mut keys: Vec<usize> = yards.iter().map(|y| y.junction).collect();
        keys.push(inst.depot());
        keys.extend(ops.dump_sites.iter().map(|s| s.junction));
        for t in inst.tasks() {
            keys.push(t.tail);
            keys.push(t.head);
        }
        let mut lists: Vec<Vec<usize>> = Vec::new();
        let mut dists = Vec::new();
        let mut tables = Vec::new();
        for ty in types {
            let no_entry = ty.no_entry_links(inst.network());
            let no_service = ty.no_service_links(inst.network());
            let d = match lists.iter().position(|l| *l == no_entry) {
                Some(d) => d,
                None => {
                    let net = network_without(inst.network(), &no_entry);
                    dists.push(Distances::between(&net, keys.clone(), inst.has_times())?);
                    lists.push(no_entry.clone());
                    dists.len() - 1
                }
            };
            let serves = inst
                .tasks()
                .iter()
                .map(|t| t.demand <= ty.capacity && no_service.binary_search(&t.link).is_err())
                .collect();
            tables.push(TypeTable {
                yard: yards[ty.yard].junction,
                dist: d,
                serves,
                ty,
            });
        }
        let timed = ops.dump_sites.iter().any(|s| s.hours.is_some())
            || tables.iter().any(|t| t.ty.shift_limit.is_some())
            || matches!(ops.balance, crate::model::Balance::LongestShift { weight } if weight > 0);
        Ok(Tables {
            dists,
            types: tables,
            sites: ops.dump_sites.clone(),
            return_empty: ops.return_empty,
            timed,
        })
    }

    /// The distances of type `k`.
    pub fn dist(&self, k: usize) -> &Distances {
        &self.dists[self.types[k].dist]
    }

    /// Deadhead cost and time of type `k` from `u` to `v` (`None` when unreachable).
    #[inline]
    pub fn leg(&self, k: usize, u: usize, v: usize) -> Option<(Cost, Cost)> {
        let d = self.dist(k);
        let c = d.cost(u, v);
        (c < UNREACHABLE).then(|| (c, d.time(u, v)))
    }
}

/// Start and end junction of task `t` served in `dir`.
pub(crate) fn ends(inst: &Instance, t: usize, dir: Dir) -> (usize, usize) {
    inst.tasks()[t].ends(dir)
}
