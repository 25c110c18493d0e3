use serde::{Deserialize, Serialize};

use super::Cost;

/// The trucks that leave the yard: all alike.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Fleet {
    /// Load limit of one truck, in the unit of the tasks' demands.
    pub capacity: Cost,
    /// Shift limit of one route, in time units. The time of a route is the
    /// sum of the service times of its tasks and the driving times of its
    /// deadhead links (a link without an explicit time takes its cost as time).
    pub shift_limit: Option<Cost>,
    /// Largest number of trucks (routes) a plan may use; `None` is unlimited.
    pub max_vehicles: Option<usize>,
}

impl Fleet {
    /// A fleet with only a load limit: unlimited trucks, no shift limit.
    pub fn with_capacity(capacity: Cost) -> Self {
        Fleet {
            capacity,
            shift_limit: None,
            max_vehicles: None,
        }
    }
}
