//! The checker's findings in the words of the route sheets: trucks numbered
//! from 1, services and steps numbered from 1, streets by name and
//! junction numbers, the yard as the yard.

use crate::check::{At, Violation};
use crate::model::Instance;

/// A street as messages name it: `Mill Lane (junctions 1–2)` when it has a
/// name, `the street between junctions 1 and 2 (#8)` when not (`#8`: its
/// 0-based place in the scenario's street list, the `link` of plan files).
pub fn street_ref(inst: &Instance, link: usize) -> String {
    let net = inst.network();
    let Some(l) = net.links.get(link) else {
        return format!("street #{link}");
    };
    let (a, b) = (net.junctions[l.from].id, net.junctions[l.to].id);
    match &l.name {
        Some(n) if !n.trim().is_empty() => format!("{n} (junctions {a}–{b})"),
        _ => format!("the street between junctions {a} and {b} (#{link})"),
    }
}

fn junction(inst: &Instance, j: usize) -> String {
    match inst.network().junctions.get(j) {
        Some(x) if j == inst.depot() => format!("junction {} (the yard)", x.id),
        Some(x) => format!("junction {}", x.id),
        None => format!("junction #{j}"),
    }
}

fn service_at(at: &At) -> String {
    format!("Truck {}, service {}", at.route + 1, at.pos + 1)
}

fn step_at(at: &At) -> String {
    format!("Truck {}, step {}", at.route + 1, at.pos + 1)
}

/// One finding of [`crate::check::check_plan`] or
/// [`crate::check::check_walks`] in the words of the sheets (trucks from 1,
/// street names, junction numbers of the scenario), where the checker's own
/// `Display`, without the instance, names streets and some junctions by
/// their place in the scenario's lists (`street #8`).
///
/// ```
/// use arcwright::check::Violation;
/// use arcwright::model::{Fleet, Instance, Network};
/// let mut net = Network::with_junctions(2);
/// net.add_required_edge(0, 1, 4, 2);
/// let inst = Instance::new("one", net, Fleet::with_capacity(9), 0).unwrap();
/// let v = Violation::EmptyRoute { route: 0 };
/// assert_eq!(arcwright::report::describe(&inst, &v), "Truck 1 serves nothing");
/// ```
pub fn describe(inst: &Instance, v: &Violation) -> String {
    use Violation::*;
    let street = |l: usize| street_ref(inst, l);
    let units = inst.units();
    match v {
        UnknownTask { at, task, tasks } => format!(
            "{}: no required street number {task} (the scenario has {tasks})",
            service_at(at)
        ),
        DirectionNotAllowed { at, link, .. } => format!(
            "{}: {} is served against its direction (it may only be served from its first junction to its second)",
            service_at(at),
            street(*link)
        ),
        ServedTwice {
            link, first, again, ..
        } => format!(
            "{} is served twice: {} and again {}",
            street(*link),
            service_at(first),
            service_at(again)
        ),
        NotServed { link, .. } => format!("{} is not served", street(*link)),
        NoPath {
            route, from, to, ..
        } => format!(
            "Truck {}: no way to drive from {} to {}",
            route + 1,
            junction(inst, *from),
            junction(inst, *to)
        ),
        OverCapacity {
            route,
            load,
            capacity,
        } => format!(
            "Truck {}: load {} exceeds the capacity {} by {}",
            route + 1,
            units.load_text(*load),
            units.load_text(*capacity),
            units.load_text(load - capacity)
        ),
        OverShift { route, time, limit } => format!(
            "Truck {}: time {} exceeds the shift limit {} by {}",
            route + 1,
            units.time_text(*time),
            units.time_text(*limit),
            units.time_text(time - limit)
        ),
        TooManyRoutes { routes, max } => {
            format!("the plan uses {routes} trucks, but the fleet has only {max}")
        }
        EmptyRoute { route } => format!("Truck {} serves nothing", route + 1),
        WrongLoad {
            route,
            reported,
            actual,
        } => format!(
            "Truck {}: the plan states load {}, but its streets add up to {}",
            route + 1,
            units.load_text(*reported),
            units.load_text(*actual)
        ),
        WrongCost {
            route,
            reported,
            actual,
        } => format!(
            "Truck {}: the plan states cost {}, but the route costs {}",
            route + 1,
            units.cost_text(*reported),
            units.cost_text(*actual)
        ),
        WrongTime {
            route,
            reported,
            actual,
        } => format!(
            "Truck {}: the plan states time {}, but the route takes {}",
            route + 1,
            units.time_text(*reported),
            units.time_text(*actual)
        ),
        WrongTotal { reported, actual } => format!(
            "the plan states a total cost of {}, but its trucks add up to {}",
            units.cost_text(*reported),
            units.cost_text(*actual)
        ),
        walk => describe_walk(inst, walk),
    }
}

/// The findings of [`crate::check::check_walks`] (street-by-street steps).
fn describe_walk(inst: &Instance, v: &Violation) -> String {
    use Violation::*;
    let street = |l: usize| street_ref(inst, l);
    match v {
        UnknownLink { at, link, links } => format!(
            "{}: no street #{link} (the scenario has {links})",
            step_at(at)
        ),
        NotOnLink {
            at, link, from, to, ..
        } => format!(
            "{}: a step from {} to {} does not follow {}",
            step_at(at),
            junction(inst, *from),
            junction(inst, *to),
            street(*link)
        ),
        AgainstOneWay { at, link, .. } => format!(
            "{}: one-way {} is driven against its direction",
            step_at(at),
            street(*link)
        ),
        Disconnected {
            at,
            expected,
            found,
        } => format!(
            "{}: the step starts at {}, but the previous one ended at {}",
            step_at(at),
            junction(inst, *found),
            junction(inst, *expected)
        ),
        NotFromDepot { route, junction: j } => format!(
            "Truck {} starts at {}, not at the yard",
            route + 1,
            junction(inst, *j)
        ),
        NotToDepot { route, junction: j } => format!(
            "Truck {} ends at {}, not at the yard",
            route + 1,
            junction(inst, *j)
        ),
        ServesNonRequired { at, link, .. } => format!(
            "{}: {} is served but it is not to be served",
            step_at(at),
            street(*link)
        ),
        // Findings about plans are worded by `describe`.
        plan => plan.to_string(),
    }
}
