//! Route sheets of fleet plans (routes with tips, truck types and yards), in
//! Markdown: one section per truck listing its stops in order, each tip as
//! "tip at `SITE`, unload `TIME`".

use std::fmt::Write as _;

use super::sheets::{csv_text, Action, CsvColumns, SheetRow};
use super::{street_label, street_ref, CAUTIONS};
use crate::check::fleet::FleetViolation;
use crate::fleet::{FleetPlan, FleetRoute, Tables};
use crate::model::{Cost, Instance, TruckType};

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

/// What trucks of type `t` may not do, in the sheets' words: "Trucks of type
/// large may not enter living_street streets or Mill Lane (junctions 1–2);
/// may not serve primary streets."
pub fn restrictions_text(inst: &Instance, t: &TruckType) -> String {
    let list = |streets: &[usize], classes: &[String]| {
        let mut parts: Vec<String> = classes.iter().map(|c| format!("{c} streets")).collect();
        parts.extend(streets.iter().map(|&l| street_ref(inst, l)));
        parts.join(", ")
    };
    let mut clauses = Vec::new();
    if !(t.no_entry.is_empty() && t.no_entry_classes.is_empty()) {
        clauses.push(format!(
            "may not enter {}",
            list(&t.no_entry, &t.no_entry_classes)
        ));
    }
    if !(t.no_service.is_empty() && t.no_service_classes.is_empty()) {
        clauses.push(format!(
            "may not serve {}",
            list(&t.no_service, &t.no_service_classes)
        ));
    }
    format!("Trucks of type {} {}.", t.name, clauses.join("; "))
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
    for t in types.iter().filter(|t| t.is_restricted()) {
        let _ = writeln!(s, "\n{}", restrictions_text(inst, t));
    }
    // "the yard" when the scenario names none, else "yard NAME".
    let yard_name = |y: &crate::model::Yard| {
        if ops.yards.is_empty() {
            "the yard".to_string()
        } else {
            format!("yard {}", y.name)
        }
    };
    for (r, route) in plan.routes.iter().enumerate() {
        let yard = &yards[route.yard];
        let loads: Vec<String> = route.trip_loads.iter().map(|&l| u.load_text(l)).collect();
        let _ = writeln!(
            s,
            "\n## Truck {}: {} from {}\n\nCost {}, shift time {}, trip loads {}.\n",
            r + 1,
            types[route.truck_type].name,
            yard_name(yard),
            u.cost_text(route.cost),
            u.time_text(route.time),
            loads.join(", ")
        );
        let _ = writeln!(
            s,
            "1. leave {} (junction {})",
            yard_name(yard),
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
            "1. back to {} (junction {})",
            yard_name(yard),
            id(yard.junction)
        );
    }
    s
}

/// One finding of [`crate::check::fleet::check_fleet_plan`] in the words of
/// the fleet sheets: trucks numbered from 1 with their type and yard, trips
/// and tips numbered from 1 (tips with their dump site), services numbered
/// from 1 with the street's name, junctions by the scenario's ids, amounts
/// with their units. The checker's own `Display` numbers from 0 and names
/// streets by index.
///
/// ```
/// use arcwright::check::fleet::FleetViolation;
/// use arcwright::fleet::FleetPlan;
/// use arcwright::model::{Fleet, Instance, Network};
/// let mut net = Network::with_junctions(2);
/// net.add_required_edge(0, 1, 4, 2);
/// let inst = Instance::new("one", net, Fleet::with_capacity(9), 0).unwrap();
/// let v = FleetViolation::ServedTimes { street: 0, times: 0 };
/// let text = arcwright::report::fleet::describe_fleet(&inst, &FleetPlan::new(vec![]), &v);
/// assert_eq!(text, "the street between junctions 1 and 2 (#0) is not served");
/// ```
pub fn describe_fleet(inst: &Instance, plan: &FleetPlan, v: &FleetViolation) -> String {
    use FleetViolation as V;
    let u = inst.units();
    let types = inst.operations().types_of(inst);
    let yards = inst.operations().yards_of(inst);
    let truck = |r: usize| match plan.routes.get(r) {
        Some(route) => match types.get(route.truck_type) {
            Some(t) => format!("Truck {} ({})", r + 1, t.name),
            None => format!("Truck {}", r + 1),
        },
        None => format!("Truck {}", r + 1),
    };
    let tip = |r: usize, t: usize| {
        let site = plan
            .routes
            .get(r)
            .and_then(|x| x.tips.get(t))
            .filter(|x| x.site < inst.operations().dump_sites.len())
            .map(|x| format!(" at {}", site_name(inst, x.site)))
            .unwrap_or_default();
        format!("{}, tip {}{site}", truck(r), t + 1)
    };
    let service = |r: usize, s: usize| format!("{}, service {}", truck(r), s + 1);
    let street = |l: usize| street_ref(inst, l);
    let junction = |j: usize| match inst.network().junctions.get(j) {
        Some(x) => format!("junction {}", x.id),
        None => format!("junction #{j}"),
    };
    let yard = |y: usize| match yards.get(y) {
        Some(x) => format!("yard {}", x.name),
        None => format!("yard #{}", y + 1),
    };
    match v {
        V::UnknownType { route, truck_type } => format!(
            "Truck {}: no truck type number {} (the scenario has {})",
            route + 1,
            truck_type + 1,
            types.len()
        ),
        V::WrongYard { route, yard: y, home } => format!(
            "{} starts from {}, but its type's home is {}",
            truck(*route),
            yard(*y),
            yard(*home)
        ),
        V::TooManyTrucks {
            truck_type,
            used,
            count,
        } => format!("{used} trucks of type {truck_type} are used, but only {count} are available"),
        V::UnknownTask { route, visit } => {
            format!("{}: not a street to serve", service(*route, *visit))
        }
        V::WrongDirection {
            route,
            visit,
            street: l,
        } => format!(
            "{}: {} is served against its direction",
            service(*route, *visit),
            street(*l)
        ),
        V::TypeMayNotServe {
            route,
            visit,
            street: l,
            truck_type,
            list,
        } => format!(
            "{}: trucks of type {truck_type} may not {} {} (its {list})",
            service(*route, *visit),
            if *list == "no_entry" { "drive on" } else { "serve" },
            street(*l)
        ),
        V::ServedTimes { street: l, times } => match times {
            0 => format!("{} is not served", street(*l)),
            n => format!("{} is served {n} times, not once", street(*l)),
        },
        V::BadTip { route, tip: t } => format!(
            "{}: a tip must follow a service, at most one between two services, at a dump site of the scenario",
            tip(*route, *t)
        ),
        V::Overloaded {
            route,
            trip,
            load,
            capacity,
        } => format!(
            "{}, trip {}: load {} over the load limit of {}",
            truck(*route),
            trip + 1,
            u.load_text(*load),
            u.load_text(*capacity)
        ),
        V::ReturnsLoaded { route, load } => format!(
            "{} returns to its yard with {} on board; it must tip first",
            truck(*route),
            u.load_text(*load)
        ),
        V::SiteClosed {
            route,
            tip: t,
            arrival,
            closes,
        } => format!(
            "{}: arrives at {}, after the dump site closes at {}",
            tip(*route, *t),
            u.time_text(*arrival),
            u.time_text(*closes)
        ),
        V::NoPath { route, from, to } => format!(
            "{}: no way to drive from {} to {} on the streets its type may enter",
            truck(*route),
            junction(*from),
            junction(*to)
        ),
        V::OverShift { route, time, limit } => format!(
            "{}: shift time {} over the shift limit of {}",
            truck(*route),
            u.time_text(*time),
            u.time_text(*limit)
        ),
        V::Mismatch {
            route,
            what,
            stated,
            actual,
        } => format!(
            "{}: the plan states {what} {stated}, recomputed {actual}",
            truck(*route)
        ),
        V::WrongTotal { stated, actual } => format!(
            "the plan states a total cost of {}, its trucks' costs add up to {}",
            u.cost_text(*stated),
            u.cost_text(*actual)
        ),
    }
}

/// The explicit walk of every route of a fleet plan, street by street, as
/// sheet rows: the shortest paths of each truck's type (around the streets
/// it may not enter), legs to a dump site marked [`Action::ToDumpSite`] and
/// legs leaving one [`Action::FromDumpSite`]. `cost` is the street's cost
/// before the type's cost factor; `load` the load of the current trip (0
/// after a tip); `time` includes waiting for a dump site to open and
/// unloading, `cost_so_far` the gate fees paid. Routes whose legs cannot be driven (a plan that fails the
/// checker) miss those legs.
pub fn fleet_rows(inst: &Instance, tables: &Tables, plan: &FleetPlan) -> Vec<Vec<SheetRow>> {
    plan.routes
        .iter()
        .map(|r| route_walk(inst, tables, r).rows)
        .collect()
}

/// Route `r`'s sheet as RFC 4180 CSV (written with the `csv` crate), one
/// line per step and one per tip, in driving order. The columns of the plain
/// sheets ([`super::sheets::route_csv`]: `step`, `street`, `link`,
/// `from_junction`, `to_junction`, `action`, `cost (U)`, ...,
/// `load_after (U)`, `cost_so_far (U)`, ...), then `truck_type` and `yard`
/// (the same on every line), `dump_site` and `unload_time (U)` (filled on
/// tip lines only). A tip line has action `tip`, no street, its dump site's
/// junction as both ends, the gate fee as its cost, waiting and unloading as
/// its time, and load 0 after it. Costs are before the type's cost factor:
/// the last line's `cost_so_far` is the route's driven cost plus its gate
/// fees (the route's cost adds the fixed cost and the factor, see
/// [`FleetRoute::cost`]); the last `time_so_far` is the shift time.
///
/// ```
/// use arcwright::fleet::{FleetSolver, Tables};
/// use arcwright::model::{Fleet, Instance, Network};
/// let mut net = Network::with_junctions(2);
/// net.add_required_edge(0, 1, 4, 2);
/// let inst = Instance::new("one", net, Fleet::with_capacity(9), 0).unwrap();
/// let plan = FleetSolver::new(&inst).solve().unwrap().plan;
/// let csv = arcwright::report::fleet::fleet_csv(&inst, &Tables::new(&inst).unwrap(), &plan, 0);
/// assert!(csv.starts_with("step,street,link,"));
/// assert!(csv.lines().next().unwrap().ends_with(",truck_type,yard,dump_site,unload_time (time units)"));
/// ```
pub fn fleet_csv(inst: &Instance, tables: &Tables, plan: &FleetPlan, r: usize) -> String {
    let route = &plan.routes[r];
    let walk = route_walk(inst, tables, route);
    let cols = CsvColumns::of(inst);
    let u = inst.units();
    let type_name = inst
        .operations()
        .types_of(inst)
        .get(route.truck_type)
        .map_or(String::new(), |t| t.name.clone());
    let yard = inst
        .operations()
        .yards_of(inst)
        .get(route.yard)
        .map_or(String::new(), |y| y.name.clone());
    let mut head = cols.head(inst);
    head.extend(["truck_type".into(), "yard".into(), "dump_site".into()]);
    head.push(format!("unload_time ({})", u.time_label()));
    let mut w = csv::Writer::from_writer(Vec::new());
    // Writing to memory cannot fail; a failure would be a bug here.
    w.write_record(&head).expect("CSV to memory");
    let mut tips = walk.tips.iter().peekable();
    let mut step = 0;
    for k in 0..=walk.rows.len() {
        while let Some(t) = tips.next_if(|t| t.before == k) {
            step += 1;
            let row = SheetRow {
                step,
                ..t.row.clone()
            };
            let mut rec = cols.record_as(&row, None, "tip");
            let site = &inst.operations().dump_sites[t.site];
            rec.extend([type_name.clone(), yard.clone(), site_name(inst, t.site)]);
            rec.push(site.unload_time.to_string());
            w.write_record(&rec).expect("CSV to memory");
        }
        if let Some(x) = walk.rows.get(k) {
            step += 1;
            let mut rec = cols.record(&SheetRow { step, ..x.clone() });
            rec.extend([
                type_name.clone(),
                yard.clone(),
                String::new(),
                String::new(),
            ]);
            w.write_record(&rec).expect("CSV to memory");
        }
    }
    csv_text(w)
}

/// Rows and tips of one route (see [`fleet_rows`]).
fn route_walk<'a>(inst: &'a Instance, tables: &Tables, r: &FleetRoute) -> RowWalk<'a> {
    let ops = inst.operations();
    let mut w = RowWalk {
        inst,
        rows: Vec::new(),
        tips: Vec::new(),
        load: 0,
        cost: 0,
        time: 0,
        length: Some(0),
    };
    let Some(tt) = tables.types.get(r.truck_type) else {
        return w;
    };
    let dist = tables.dist(r.truck_type);
    let mut at = tt.yard;
    let mut served = false;
    let mut from_site = false;
    let mut tips = r.tips.iter().peekable();
    for pos in 0..=r.visits.len() {
        while let Some(t) = tips.next_if(|t| t.after == pos) {
            let Some(site) = ops.dump_sites.get(t.site) else {
                continue;
            };
            w.leg(dist, at, site.junction, Action::ToDumpSite);
            let arrival = w.time;
            if let Some(h) = site.hours {
                w.time = w.time.max(h.opens);
            }
            w.time += site.unload_time;
            w.cost += site.unload_cost;
            w.load = 0;
            w.tip(t.site, site.junction, site.unload_cost, w.time - arrival);
            at = site.junction;
            from_site = true;
        }
        let Some(v) = r.visits.get(pos) else { break };
        let Some(task) = inst.tasks().get(v.task) else {
            continue;
        };
        let (s, e) = task.ends(v.dir);
        let action = match (from_site, served) {
            (true, _) => Action::FromDumpSite,
            (false, false) => Action::FromYard,
            (false, true) => Action::Deadhead,
        };
        w.leg(dist, at, s, action);
        w.load += task.demand;
        w.push(task.link, (s, e), Action::Serve, task.cost, task.time);
        at = e;
        served = true;
        from_site = false;
    }
    if !r.visits.is_empty() {
        let action = if from_site {
            Action::FromDumpSite
        } else {
            Action::ToYard
        };
        w.leg(dist, at, tt.yard, action);
    }
    w
}

/// Rows of a route being built, with the running figures.
struct RowWalk<'a> {
    inst: &'a Instance,
    rows: Vec<SheetRow>,
    tips: Vec<TipLine>,
    load: Cost,
    cost: Cost,
    time: Cost,
    length: Option<Cost>,
}

/// A tip on a route's walk: before row `before`, at dump site `site`; `row`
/// holds its figures (its `link` and `street` mean nothing).
struct TipLine {
    before: usize,
    site: usize,
    row: SheetRow,
}

impl RowWalk<'_> {
    /// Records a tip at dump site `site` (junction `j`), its gate fee `fee`
    /// and the time `dt` spent waiting and unloading (already counted).
    fn tip(&mut self, site: usize, j: usize, fee: Cost, dt: Cost) {
        let place = Place {
            link: 0,
            street: String::new(),
            ends: (j, j),
            length: None,
        };
        let row = self.row(place, Action::ToDumpSite, fee, dt);
        let before = self.rows.len();
        self.tips.push(TipLine { before, site, row });
    }

    /// A row at `place` with the running figures (already updated).
    fn row(&self, place: Place, action: Action, cost: Cost, dt: Cost) -> SheetRow {
        let junctions = &self.inst.network().junctions;
        SheetRow {
            step: self.rows.len() + 1,
            link: place.link,
            street: place.street,
            from: junctions[place.ends.0].id,
            to: junctions[place.ends.1].id,
            ends: place.ends,
            action,
            cost,
            length: place.length,
            step_time: dt,
            load: self.load,
            cost_so_far: self.cost,
            length_so_far: self.length,
            time: self.time,
            turn: None,
            manoeuvre: None,
        }
    }

    /// The deadhead path from `a` to `b` on the type's network.
    fn leg(&mut self, dist: &crate::paths::Distances, a: usize, b: usize, action: Action) {
        for h in dist.path(a, b).unwrap_or_default() {
            let l = &self.inst.network().links[h.link];
            self.push(h.link, (h.from, h.to), action, l.cost, l.drive_time());
        }
    }

    fn push(&mut self, link: usize, ends: (usize, usize), action: Action, cost: Cost, dt: Cost) {
        let l = &self.inst.network().links[link];
        self.cost += cost;
        self.time += dt;
        self.length = self.length.zip(l.length).map(|(a, b)| a + b);
        let place = Place {
            link,
            street: street_label(self.inst, link),
            ends,
            length: l.length,
        };
        let row = self.row(place, action, cost, dt);
        self.rows.push(row);
    }
}

/// Where a row is: a street (its link, label, ends and length), or a
/// junction (a tip: no street, both ends the junction).
struct Place {
    link: usize,
    street: String,
    ends: (usize, usize),
    length: Option<Cost>,
}
