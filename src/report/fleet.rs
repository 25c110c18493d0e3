//! Route sheets of fleet plans (routes with tips, truck types and yards), in
//! Markdown: one section per truck listing its stops in order, each tip as
//! "tip at <site>, unload <time>".

use std::fmt::Write as _;

use super::{street_label, CAUTIONS};
use crate::fleet::FleetPlan;
use crate::model::{Cost, Instance};

/// An unload time in the scenario's time unit, shown in minutes when the
/// unit is seconds and the time is whole minutes (`15 min`).
pub fn unload_text(inst: &Instance, t: Cost) -> String {
    let u = inst.units();
    match u.time.as_deref().map(str::trim) {
        Some("s" | "sec" | "second" | "seconds") if t % 60 == 0 => format!("{} min", t / 60),
        Some("min" | "minute" | "minutes") => format!("{t} min"),
        _ => format!("{t} {}", u.time_label()),
    }
}

/// The name of dump site `i` (`dump site N`, counted from 1, when it has none).
pub fn site_name(inst: &Instance, i: usize) -> String {
    match &inst.operations().dump_sites[i].name {
        Some(n) if !n.trim().is_empty() => n.clone(),
        _ => format!("dump site {}", i + 1),
    }
}

/// Markdown route sheets of a fleet plan: the cautions, then per truck its
/// type, yard, cost, shift time and trip loads, and its stops in order
/// ("serve ...", "tip at ..., unload ...", "back to yard ...").
pub fn fleet_markdown(inst: &Instance, plan: &FleetPlan) -> String {
    let ops = inst.operations();
    let types = ops.types_of(inst);
    let yards = ops.yards_of(inst);
    let u = inst.units();
    let id = |j: usize| inst.network().junctions[j].id;
    let mut s = String::new();
    let _ = writeln!(s, "# Route sheets: {}\n", inst.name);
    for c in CAUTIONS {
        let _ = writeln!(s, "> {c}");
    }
    let (long, short) = plan.shift_spread();
    let _ = writeln!(
        s,
        "\nTotal cost {}; {} trucks, {} trips, {} tips; shifts from {} to {}.",
        u.cost_text(plan.cost),
        plan.routes.len(),
        plan.trips(),
        plan.tips(),
        u.time_text(short),
        u.time_text(long)
    );
    for (r, route) in plan.routes.iter().enumerate() {
        let yard = &yards[route.yard];
        let loads: Vec<String> = route.trip_loads.iter().map(|&l| u.load_text(l)).collect();
        let _ = writeln!(
            s,
            "\n## Truck {}: {} from yard {}\n\nCost {}, shift time {}, trip loads {}.\n",
            r + 1,
            types[route.truck_type].name,
            yard.name,
            u.cost_text(route.cost),
            u.time_text(route.time),
            loads.join(", ")
        );
        let _ = writeln!(
            s,
            "1. leave yard {} (junction {})",
            yard.name,
            id(yard.junction)
        );
        let mut tips = route.tips.iter().peekable();
        for pos in 0..=route.visits.len() {
            while let Some(t) = tips.next_if(|t| t.after == pos) {
                let site = &ops.dump_sites[t.site];
                let _ = writeln!(
                    s,
                    "1. tip at {} (junction {}), unload {}",
                    site_name(inst, t.site),
                    id(site.junction),
                    unload_text(inst, site.unload_time)
                );
            }
            if let Some(v) = route.visits.get(pos) {
                let task = &inst.tasks()[v.task];
                let (a, b) = task.ends(v.dir);
                let _ = writeln!(
                    s,
                    "1. serve {} from junction {} to {}",
                    street_label(inst, task.link),
                    id(a),
                    id(b)
                );
            }
        }
        let _ = writeln!(
            s,
            "1. back to yard {} (junction {})",
            yard.name,
            id(yard.junction)
        );
    }
    s
}
