//! SVG map of a plan, written by hand.
//!
//! - The street network in light grey, along the streets' shapes where the
//!   scenario has them (maps); one-way streets darker, with grey
//!   chevrons in their direction of travel. Every street carries a tooltip
//!   with its name and junction numbers.
//! - Each truck in its own colour ([`PALETTE`], 30 colours that stay apart):
//!   served streets solid with an arrow in the direction of service;
//!   deadhead legs dashed (with turn rules, with a small arrow in the
//!   direction of travel too, and a ring where a truck makes a U-turn). Trucks that drive the same street empty in the
//!   same direction are drawn side by side in lanes, so none hides another.
//! - Junction numbers (as in the sheets' `from → to`) at every turning point
//!   of a route: where a truck starts or stops serving.
//! - Fleet plans ([`fleet_map`]): each truck's way to a dump site and back
//!   from it dotted in its colour; every yard (squares) and dump site (dark
//!   red triangles) labelled with its name.
//! - The yard, labelled inside the picture; a scale bar below the network
//!   (never over it) when the coordinate system is declared; a legend beside it.
//!
//! WGS 84 longitude/latitude is projected equirectangularly with the
//! longitudes scaled by the cosine of the mean latitude, so that a town at
//! 54° N is not drawn 1.7 times too wide. Undeclared coordinates are drawn
//! as plain numbers, without a scale bar.

use std::collections::{BTreeSet, HashMap};
use std::fmt::Write as _;

use crate::fleet::FleetPlan;
use crate::model::{Coordinates, Instance};
use crate::paths::Distances;
use crate::plan::Plan;

use super::geo::points;
use super::sheets::{all_rows, Action, SheetRow};
use super::street_ref;

/// Route colours, in order, for up to 30 trucks (then they repeat). Our own
/// set, chosen by farthest-point selection in CIELAB among in-gamut colours
/// at least ΔE 30 from the grey network and 35 from white: any two of them
/// differ by at least ΔE 26 (CIE 1976).
pub const PALETTE: [&str; 30] = [
    "#00867a", "#fb2374", "#0146c8", "#f1ac00", "#5ed149", "#6c3919", "#d7a9e2", "#00497d",
    "#d44606", "#c0bb79", "#880071", "#2f5d06", "#fd76f9", "#59b5e5", "#e8968b", "#2a91ff",
    "#67cd8c", "#9d5374", "#bcc000", "#a8012c", "#826808", "#8258a9", "#ff6f63", "#739e1f",
    "#f5a866", "#f986b9", "#932cb4", "#db1d9e", "#4dcace", "#a98bff",
];

/// Drawing width in pixels (the height follows the network's shape).
const WIDTH: f64 = 1000.0;
const MARGIN: f64 = 28.0;
const LEGEND_W: f64 = 220.0;
const GAP: f64 = 16.0;
/// Height of the strip under the network that holds the scale bar.
const SCALE_H: f64 = 36.0;
const NETWORK_GREY: &str = "#d4d4d4";
const ONE_WAY_GREY: &str = "#a6a6a6";
/// Dash pattern of the way to a dump site and back (fleet plans).
const TIP_DASH: &str = "1.5 3";

/// Escapes text for XML content and attribute values.
pub fn xml_escape(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&apos;"),
            c if (c as u32) < 0x20 && c != '\n' && c != '\t' => {}
            c => out.push(c),
        }
    }
    out
}

/// The plan drawn as a standalone SVG document, or `None` when the scenario
/// has no coordinates. North is up (`y` grows northwards in the scenario).
pub fn map(inst: &Instance, dist: &Distances, plan: &Plan) -> Option<String> {
    points(inst)?;
    map_of_rows(inst, plan, &all_rows(inst, dist, plan))
}

/// Where things go on the page.
struct Frame {
    /// Junction positions in pixels.
    px: Vec<(f64, f64)>,
    /// Pixels per metre (`None` when the unit of the coordinates is unknown).
    px_per_m: Option<f64>,
    /// Bottom of the network area.
    map_bottom: f64,
    /// Right edge of the network area.
    map_right: f64,
    height: f64,
    legend_h: f64,
    /// Pixel position of any point in the scenario's coordinates (for the
    /// streets' polylines).
    to_px: Box<dyn Fn(f64, f64) -> (f64, f64)>,
}

impl Frame {
    fn new(inst: &Instance, routes: usize) -> Option<Frame> {
        let pts = points(inst)?;
        let system = inst.coordinates();
        let lat0 = pts.iter().map(|p| p.1).sum::<f64>() / pts.len().max(1) as f64;
        let metres = system.metres(lat0);
        let project = |x: f64, y: f64| match &metres {
            Some(f) => f(x, y),
            None => (x, y),
        };
        let xy: Vec<(f64, f64)> = pts.iter().map(|&(x, y)| project(x, y)).collect();
        // Street shapes may bulge beyond their junctions: they count too.
        let shape_xy = inst
            .network()
            .links
            .iter()
            .flat_map(|l| l.geometry.iter().map(|p| project(p[0], p[1])));
        let (mut lo_x, mut hi_x, mut lo_y, mut hi_y) = (f64::MAX, f64::MIN, f64::MAX, f64::MIN);
        for (x, y) in xy.iter().copied().chain(shape_xy) {
            lo_x = lo_x.min(x);
            hi_x = hi_x.max(x);
            lo_y = lo_y.min(y);
            hi_y = hi_y.max(y);
        }
        let span_x = (hi_x - lo_x).max(1e-9);
        let span_y = (hi_y - lo_y).max(1e-9);
        let draw_w = WIDTH - 2.0 * MARGIN - LEGEND_W - GAP;
        let scale = (draw_w / span_x).min(draw_w * 1.2 / span_y);
        let map_h = span_y * scale;
        let legend_h = 150.0 + 18.0 * routes as f64;
        let height = (MARGIN + map_h + SCALE_H + MARGIN).max(legend_h + 2.0 * MARGIN);
        let place = move |(x, y): (f64, f64)| {
            (
                MARGIN + (x - lo_x) * scale,
                MARGIN + map_h - (y - lo_y) * scale,
            )
        };
        let px = xy.iter().map(|&p| place(p)).collect();
        let has_metres = metres.is_some();
        let to_px = Box::new(move |x: f64, y: f64| {
            place(match &metres {
                Some(f) => f(x, y),
                None => (x, y),
            })
        });
        Some(Frame {
            px,
            px_per_m: has_metres.then_some(scale),
            map_bottom: MARGIN + map_h,
            map_right: MARGIN + draw_w,
            height,
            legend_h,
            to_px,
        })
    }
}

/// [`map`] from the rows of every route ([`all_rows`]).
pub fn map_of_rows(inst: &Instance, plan: &Plan, all: &[Vec<SheetRow>]) -> Option<String> {
    let u = inst.units();
    let trucks: Vec<(String, Option<String>)> = plan
        .routes
        .iter()
        .enumerate()
        .map(|(r, route)| {
            (
                format!("Truck {}: {}", r + 1, u.cost_text(route.cost)),
                None,
            )
        })
        .collect();
    draw(inst, all, &u.cost_text(plan.cost), &trucks, false)
}

/// The map of a fleet plan from its rows ([`super::fleet::fleet_rows`]): as
/// [`map`], and each truck's way to a dump site and back from it dotted in
/// its colour, every yard and dump site labelled, the legend naming each
/// truck's type, yard and trips. `None` when the scenario has no coordinates.
pub fn fleet_map(inst: &Instance, plan: &FleetPlan, all: &[Vec<SheetRow>]) -> Option<String> {
    let u = inst.units();
    let types = inst.operations().types_of(inst);
    let yards = inst.operations().yards_of(inst);
    let trucks: Vec<(String, Option<String>)> = plan
        .routes
        .iter()
        .enumerate()
        .map(|(r, route)| {
            let trips = route.trip_loads.iter().filter(|&&l| l > 0).count().max(1);
            let yard = match yards.get(route.yard) {
                Some(y) if yards.len() > 1 => format!(" from {}", y.name),
                _ => String::new(),
            };
            let detail = format!(
                "{}{yard}, {trips} trip{}, {} tip{}",
                types.get(route.truck_type).map_or("?", |t| t.name.as_str()),
                if trips == 1 { "" } else { "s" },
                route.tips.len(),
                if route.tips.len() == 1 { "" } else { "s" }
            );
            (
                format!("Truck {}: {}", r + 1, u.cost_text(route.cost)),
                Some(detail),
            )
        })
        .collect();
    draw(inst, all, &u.cost_text(plan.cost), &trucks, true)
}

/// The picture: network, routes, labels, yards and dump sites, scale bar,
/// and a legend with the total, one line per truck and (with `tips`) the
/// dotted way to and from a dump site.
fn draw(
    inst: &Instance,
    all: &[Vec<SheetRow>],
    total: &str,
    trucks: &[(String, Option<String>)],
    tips: bool,
) -> Option<String> {
    let lines = trucks.len() + trucks.iter().filter(|t| t.1.is_some()).count();
    let f = Frame::new(inst, lines + usize::from(tips))?;
    let mut s = String::new();
    let _ = writeln!(
        s,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="{WIDTH:.0}" height="{h:.0}" viewBox="0 0 {WIDTH:.0} {h:.0}" font-family="sans-serif" font-size="12">"#,
        h = f.height
    );
    let _ = writeln!(s, "<title>{}</title>", xml_escape(&inst.name));
    let _ = writeln!(s, r##"<rect width="100%" height="100%" fill="#ffffff"/>"##);
    defs(&mut s, trucks.len());
    network(&mut s, inst, &f);
    routes(&mut s, inst, &f, all);
    if inst.turn_rules().is_some() {
        u_turns(&mut s, &f, all);
    }
    junction_labels(&mut s, inst, &f, all);
    yard(&mut s, inst, &f);
    sites(&mut s, inst, &f);
    scale_bar(&mut s, &f);
    legend(&mut s, inst, total, trucks, tips, &f);
    s.push_str("</svg>\n");
    Some(s)
}

fn colour(r: usize) -> &'static str {
    PALETTE[r % PALETTE.len()]
}

/// Arrow heads: one per truck colour, one grey for one-way streets.
fn defs(s: &mut String, routes: usize) {
    let marker = |s: &mut String, id: &str, fill: &str, size: f64| {
        let _ = writeln!(
            s,
            r#"<marker id="{id}" viewBox="0 0 6 6" refX="3" refY="3" markerUnits="userSpaceOnUse" markerWidth="{size}" markerHeight="{size}" orient="auto"><path d="M0,0 L6,3 L0,6 z" fill="{fill}"/></marker>"#
        );
    };
    s.push_str("<defs>\n");
    marker(s, "one-way", ONE_WAY_GREY, 7.0);
    for r in 0..routes {
        marker(s, &format!("arrow-{}", r + 1), colour(r), 9.0);
        marker(s, &format!("travel-{}", r + 1), colour(r), 6.0);
    }
    s.push_str("</defs>\n");
}

fn mid(a: (f64, f64), b: (f64, f64)) -> (f64, f64) {
    ((a.0 + b.0) / 2.0, (a.1 + b.1) / 2.0)
}

/// The pixel polyline of a street's shape, driven from junction `start`
/// (reversed when that is the street's `to` end); `None` without a shape.
fn shape_px(inst: &Instance, f: &Frame, link: usize, start: usize) -> Option<Vec<(f64, f64)>> {
    let l = &inst.network().links[link];
    if l.geometry.len() < 2 {
        return None;
    }
    let mut pts: Vec<(f64, f64)> = l.geometry.iter().map(|p| (f.to_px)(p[0], p[1])).collect();
    if start != l.from {
        pts.reverse();
    }
    Some(pts)
}

fn points_attr(pts: &[(f64, f64)]) -> String {
    let mut out = String::new();
    for (k, p) in pts.iter().enumerate() {
        let sep = if k == 0 { "" } else { " " };
        let _ = write!(out, "{sep}{:.1},{:.1}", p.0, p.1);
    }
    out
}

/// A polyline moved `off` pixels to the right of its direction of travel
/// (each point along the mean of the normals of its segments).
fn shifted_poly(pts: &[(f64, f64)], off: f64) -> Vec<(f64, f64)> {
    let normal = |a: (f64, f64), b: (f64, f64)| {
        let (dx, dy) = (b.0 - a.0, b.1 - a.1);
        let len = (dx * dx + dy * dy).sqrt();
        if len < 1e-9 {
            (0.0, 0.0)
        } else {
            (-dy / len, dx / len)
        }
    };
    (0..pts.len())
        .map(|k| {
            let before = if k > 0 {
                normal(pts[k - 1], pts[k])
            } else {
                (0.0, 0.0)
            };
            let after = if k + 1 < pts.len() {
                normal(pts[k], pts[k + 1])
            } else {
                (0.0, 0.0)
            };
            let (nx, ny) = (before.0 + after.0, before.1 + after.1);
            let len = (nx * nx + ny * ny).sqrt();
            if len < 1e-9 {
                pts[k]
            } else {
                (pts[k].0 + nx / len * off, pts[k].1 + ny / len * off)
            }
        })
        .collect()
}

/// Three points around the middle of a polyline (by length), for an arrow
/// drawn with `marker-mid`.
fn middle(pts: &[(f64, f64)]) -> [(f64, f64); 3] {
    let seg = |k: usize| {
        let (a, b) = (pts[k], pts[k + 1]);
        ((b.0 - a.0).powi(2) + (b.1 - a.1).powi(2)).sqrt()
    };
    let total: f64 = (0..pts.len() - 1).map(seg).sum();
    let mut run = 0.0;
    for k in 0..pts.len() - 1 {
        let l = seg(k);
        if run + l >= total / 2.0 && l > 1e-9 {
            let t = (total / 2.0 - run) / l;
            let (a, b) = (pts[k], pts[k + 1]);
            let m = (a.0 + t * (b.0 - a.0), a.1 + t * (b.1 - a.1));
            let (ux, uy) = ((b.0 - a.0) / l * 0.5, (b.1 - a.1) / l * 0.5);
            return [(m.0 - ux, m.1 - uy), m, (m.0 + ux, m.1 + uy)];
        }
        run += l;
    }
    let (a, b) = (pts[0], pts[pts.len() - 1]);
    [a, mid(a, b), b]
}

/// Every street: two-way as a light line, one-way darker with a chevron.
/// Streets with a shape (maps) are drawn along it.
fn network(s: &mut String, inst: &Instance, f: &Frame) {
    let _ = writeln!(
        s,
        r#"<g id="network" stroke="{NETWORK_GREY}" stroke-width="3" stroke-linecap="round" fill="none">"#
    );
    for (i, l) in inst.network().links.iter().enumerate() {
        let (a, b) = (f.px[l.from], f.px[l.to]);
        let title = format!("<title>{}</title>", xml_escape(&street_ref(inst, i)));
        if let Some(pts) = shape_px(inst, f, i, l.from) {
            let (class, stroke) = if l.oneway {
                (
                    r#" class="one-way""#,
                    format!(r#" stroke="{ONE_WAY_GREY}""#),
                )
            } else {
                ("", String::new())
            };
            let _ = writeln!(
                s,
                r#"<polyline{class} points="{}"{stroke}>{title}</polyline>"#,
                points_attr(&pts)
            );
            if l.oneway {
                let _ = writeln!(
                    s,
                    r#"<polyline points="{}" stroke="none" marker-mid="url(#one-way)"/>"#,
                    points_attr(&middle(&pts))
                );
            }
        } else if l.oneway {
            let m = mid(a, b);
            let _ = writeln!(
                s,
                r#"<polyline class="one-way" points="{:.1},{:.1} {:.1},{:.1} {:.1},{:.1}" stroke="{ONE_WAY_GREY}" marker-mid="url(#one-way)">{title}</polyline>"#,
                a.0, a.1, m.0, m.1, b.0, b.1
            );
        } else {
            let _ = writeln!(
                s,
                r#"<line x1="{:.1}" y1="{:.1}" x2="{:.1}" y2="{:.1}">{title}</line>"#,
                a.0, a.1, b.0, b.1
            );
        }
    }
    s.push_str("</g>\n");
}

/// Lane of each (route, street, direction) deadhead: trucks that drive the
/// same street empty in the same direction get lanes 0, 1, 2, ...
fn deadhead_lanes(all: &[Vec<SheetRow>]) -> HashMap<(usize, usize, (usize, usize)), usize> {
    let mut users: HashMap<(usize, (usize, usize)), Vec<usize>> = HashMap::new();
    let mut lane = HashMap::new();
    for (r, rows) in all.iter().enumerate() {
        for row in rows.iter().filter(|x| x.action.is_deadhead()) {
            let list = users.entry((row.link, row.ends)).or_default();
            if !list.contains(&r) {
                list.push(r);
            }
            lane.insert((r, row.link, row.ends), list.len() - 1);
        }
    }
    lane
}

/// Deadhead legs of all trucks (dashed, in lanes), then their services
/// (solid, with an arrow in the direction of service) on top. Streets with a
/// shape (maps) are drawn along it.
fn routes(s: &mut String, inst: &Instance, f: &Frame, all: &[Vec<SheetRow>]) {
    let lanes = deadhead_lanes(all);
    for serve in [false, true] {
        for (r, rows) in all.iter().enumerate() {
            let id = if serve { "serve" } else { "deadhead" };
            let _ = writeln!(
                s,
                r#"<g id="route-{}-{id}" stroke="{}" stroke-linecap="round" fill="none">"#,
                r + 1,
                colour(r)
            );
            for row in rows.iter().filter(|x| x.action.is_deadhead() != serve) {
                let (a, b) = (f.px[row.ends.0], f.px[row.ends.1]);
                let pts = shape_px(inst, f, row.link, row.ends.0).unwrap_or_else(|| vec![a, b]);
                let title = format!(
                    "<title>Truck {} step {}: {} ({} → {}, {})</title>",
                    r + 1,
                    row.step,
                    xml_escape(&row.street),
                    row.from,
                    row.to,
                    match row.action {
                        Action::Serve => "serve",
                        Action::ToDumpSite | Action::FromDumpSite => row.action.label(),
                        _ => "deadhead",
                    }
                );
                // The way to a dump site and back: dotted and a little wider.
                let (width, dash) = match row.action {
                    Action::ToDumpSite | Action::FromDumpSite => ("2.4", TIP_DASH),
                    _ => ("1.6", "5 4"),
                };
                if serve {
                    let pts = shifted_poly(&pts, 1.8);
                    if pts.len() == 2 {
                        let m = mid(pts[0], pts[1]);
                        let _ = writeln!(
                            s,
                            r#"<polyline points="{}" stroke-width="2.6" marker-mid="url(#arrow-{})">{title}</polyline>"#,
                            points_attr(&[pts[0], m, pts[1]]),
                            r + 1
                        );
                    } else {
                        let _ = writeln!(
                            s,
                            r#"<polyline points="{}" stroke-width="2.6">{title}</polyline>"#,
                            points_attr(&pts)
                        );
                        let _ = writeln!(
                            s,
                            r#"<polyline points="{}" stroke="none" marker-mid="url(#arrow-{})"/>"#,
                            points_attr(&middle(&pts)),
                            r + 1
                        );
                    }
                } else {
                    let lane = lanes[&(r, row.link, row.ends)];
                    let pts = shifted_poly(&pts, 2.0 + 2.2 * lane as f64);
                    if row.manoeuvre.is_some() {
                        // With turn rules the deadhead legs show the direction of travel too.
                        let m = if pts.len() == 2 {
                            [pts[0], mid(pts[0], pts[1]), pts[1]]
                        } else {
                            middle(&pts)
                        };
                        let _ = writeln!(
                            s,
                            r#"<polyline class="travel" points="{}" stroke="none" marker-mid="url(#travel-{})"/>"#,
                            points_attr(&m),
                            r + 1
                        );
                    }
                    if pts.len() == 2 {
                        let (a, b) = (pts[0], pts[1]);
                        let _ = writeln!(
                            s,
                            r#"<line x1="{:.1}" y1="{:.1}" x2="{:.1}" y2="{:.1}" stroke-width="{width}" stroke-dasharray="{dash}">{title}</line>"#,
                            a.0, a.1, b.0, b.1
                        );
                    } else {
                        let _ = writeln!(
                            s,
                            r#"<polyline points="{}" stroke-width="{width}" stroke-dasharray="{dash}">{title}</polyline>"#,
                            points_attr(&pts)
                        );
                    }
                }
            }
            s.push_str("</g>\n");
        }
    }
}

/// With turn rules: a ring in the truck's colour where it makes a U-turn
/// (at a dead end, or anywhere U-turns are allowed), with a tooltip.
fn u_turns(s: &mut String, f: &Frame, all: &[Vec<SheetRow>]) {
    use crate::turns::TurnKind;
    s.push_str("<g id=\"u-turns\" fill=\"#ffffff\" stroke-width=\"1.5\">\n");
    for (r, rows) in all.iter().enumerate() {
        for row in rows {
            if row.turn.is_some_and(|t| t.kind == TurnKind::UTurn) {
                let (x, y) = f.px[row.ends.0];
                let _ = writeln!(
                    s,
                    r#"<circle cx="{x:.1}" cy="{y:.1}" r="4" stroke="{}"><title>Truck {} step {}: U-turn at junction {}</title></circle>"#,
                    colour(r),
                    r + 1,
                    row.step,
                    row.from
                );
            }
        }
    }
    s.push_str("</g>\n");
}

/// Junction numbers where a truck starts or stops serving (its turning
/// points), as in the sheets' `from → to` columns.
fn junction_labels(s: &mut String, inst: &Instance, f: &Frame, all: &[Vec<SheetRow>]) {
    let mut at = BTreeSet::new();
    for rows in all {
        for w in rows.windows(2) {
            if w[0].action.is_deadhead() != w[1].action.is_deadhead() {
                at.insert(w[0].ends.1);
            }
        }
    }
    at.remove(&inst.depot());
    s.push_str(r##"<g id="junction-labels" font-size="9" fill="#222222" stroke="#ffffff" stroke-width="2.5" paint-order="stroke">"##);
    s.push('\n');
    for j in at {
        let (x, y) = f.px[j];
        let _ = writeln!(
            s,
            r#"<text x="{:.1}" y="{:.1}">{}</text>"#,
            x + 3.0,
            y - 3.0,
            inst.network().junctions[j].id
        );
    }
    s.push_str("</g>\n");
}

/// The yard: a black square, its label inside the picture (left of the
/// square when there is no room on the right).
fn yard(s: &mut String, inst: &Instance, f: &Frame) {
    let (yx, yy) = f.px[inst.depot()];
    let id = inst.network().junctions[inst.depot()].id;
    let label = match inst.operations().yards.first() {
        Some(y) => format!("Yard {} ({id})", y.name),
        None => format!("Yard ({id})"),
    };
    let text_w = 7.5 * label.len() as f64;
    let (tx, anchor) = if yx + 11.0 + text_w <= f.map_right + GAP {
        (yx + 11.0, "start")
    } else {
        (yx - 11.0, "end")
    };
    let ty = (yy + 4.0).clamp(14.0, f.map_bottom + 14.0);
    let _ = writeln!(
        s,
        r##"<g id="yard"><rect x="{:.1}" y="{:.1}" width="14" height="14" fill="#111111" stroke="#ffffff" stroke-width="2"/><text x="{tx:.1}" y="{ty:.1}" text-anchor="{anchor}" font-weight="bold" stroke="#ffffff" stroke-width="3" paint-order="stroke">{}</text></g>"##,
        yx - 7.0,
        yy - 7.0,
        xml_escape(&label)
    );
}

/// The other yards of the instance's operations (white squares) and its
/// dump sites (dark red triangles), each labelled with its name.
fn sites(s: &mut String, inst: &Instance, f: &Frame) {
    let ops = inst.operations();
    let mut marks: Vec<(usize, String, bool)> = ops
        .yards
        .iter()
        .filter(|y| y.junction != inst.depot())
        .map(|y| (y.junction, format!("Yard {}", y.name), false))
        .collect();
    for i in 0..ops.dump_sites.len() {
        let name = super::fleet::site_name(inst, i);
        marks.push((ops.dump_sites[i].junction, name, true));
    }
    if marks.is_empty() {
        return;
    }
    s.push_str("<g id=\"sites\">\n");
    for (j, label, dump) in marks {
        let (x, y) = f.px[j];
        let shape = if dump {
            format!(
                r##"<path d="M {:.1} {:.1} L {:.1} {:.1} L {:.1} {:.1} Z" fill="#8b1a1a" stroke="#ffffff" stroke-width="2"/>"##,
                x,
                y - 9.0,
                x + 8.0,
                y + 6.0,
                x - 8.0,
                y + 6.0
            )
        } else {
            format!(
                r##"<rect x="{:.1}" y="{:.1}" width="14" height="14" fill="#ffffff" stroke="#111111" stroke-width="2"/>"##,
                x - 7.0,
                y - 7.0
            )
        };
        // Left of the mark when the label would run into the legend.
        let text_w = 7.5 * label.chars().count() as f64;
        let (tx, anchor) = if x + 11.0 + text_w <= f.map_right + GAP {
            (x + 11.0, "start")
        } else {
            (x - 11.0, "end")
        };
        let _ = writeln!(
            s,
            r##"{shape}<text x="{tx:.1}" y="{:.1}" text-anchor="{anchor}" font-weight="bold" stroke="#ffffff" stroke-width="3" paint-order="stroke">{}</text>"##,
            y + 4.0,
            xml_escape(&label)
        );
    }
    s.push_str("</g>\n");
}

/// A round length (1, 2 or 5 times a power of ten) about a fifth of the
/// width, in the strip below the network.
fn scale_bar(s: &mut String, f: &Frame) {
    let Some(ppm) = f.px_per_m else {
        return;
    };
    let target = (f.map_right - MARGIN) / ppm / 5.0;
    let mag = 10f64.powf(target.log10().floor());
    let len = [5.0, 2.0, 1.0]
        .into_iter()
        .map(|m| m * mag)
        .find(|&l| l <= target)
        .unwrap_or(mag);
    let text = if len >= 1000.0 {
        format!("{} km", len / 1000.0)
    } else {
        format!("{len} m")
    };
    let (x0, y0) = (MARGIN, f.map_bottom + SCALE_H - 8.0);
    let _ = writeln!(
        s,
        r##"<g id="scale"><line x1="{x0:.1}" y1="{y0:.1}" x2="{:.1}" y2="{y0:.1}" stroke="#333333" stroke-width="2"/><text x="{:.1}" y="{:.1}">{text}</text></g>"##,
        x0 + len * ppm,
        x0 + len * ppm + 6.0,
        y0 + 4.0
    );
}

/// One legend line: a sample stroke and a text.
fn legend_entry(s: &mut String, lx: f64, y: f64, sample: &str, text: &str) {
    let _ = writeln!(
        s,
        r#"<line x1="{:.1}" y1="{:.1}" x2="{:.1}" y2="{:.1}" {sample}/><text x="{:.1}" y="{y:.1}">{}</text>"#,
        lx + 10.0,
        y - 4.0,
        lx + 34.0,
        y - 4.0,
        lx + 42.0,
        xml_escape(text)
    );
}

fn legend(
    s: &mut String,
    inst: &Instance,
    total: &str,
    trucks: &[(String, Option<String>)],
    tips: bool,
    f: &Frame,
) {
    let lx = WIDTH - LEGEND_W - MARGIN / 2.0;
    let _ = writeln!(
        s,
        r##"<g id="legend"><rect x="{lx:.1}" y="{MARGIN:.1}" width="{LEGEND_W:.0}" height="{:.0}" fill="#ffffff" stroke="#999999" rx="4"/>"##,
        f.legend_h
    );
    let mut y = MARGIN + 20.0;
    let _ = writeln!(
        s,
        r#"<text x="{:.1}" y="{y:.1}" font-weight="bold">Total cost {}</text>"#,
        lx + 10.0,
        xml_escape(total)
    );
    for (r, (line, detail)) in trucks.iter().enumerate() {
        y += 18.0;
        let sample = format!(r#"stroke="{}" stroke-width="4""#, colour(r));
        legend_entry(s, lx, y, &sample, line);
        if let Some(d) = detail {
            y += 15.0;
            let _ = writeln!(
                s,
                r##"<text x="{:.1}" y="{y:.1}" font-size="10" fill="#444444">{}</text>"##,
                lx + 42.0,
                xml_escape(d)
            );
        }
    }
    y += 24.0;
    let served = r##"stroke="#333333" stroke-width="2.6" marker-end="url(#one-way)""##;
    legend_entry(s, lx, y, served, "served, arrow: direction");
    y += 18.0;
    let dashed = r##"stroke="#333333" stroke-width="1.6" stroke-dasharray="5 4""##;
    legend_entry(
        s,
        lx,
        y,
        dashed,
        if inst.turn_rules().is_some() {
            "deadhead, arrow: direction"
        } else {
            "deadhead (not served)"
        },
    );
    if tips {
        y += 18.0;
        let dotted =
            format!(r##"stroke="#333333" stroke-width="2.4" stroke-dasharray="{TIP_DASH}""##);
        legend_entry(s, lx, y, &dotted, "to or from a dump site");
    }
    y += 18.0;
    let one_way = format!(r#"stroke="{ONE_WAY_GREY}" stroke-width="3" marker-end="url(#one-way)""#);
    legend_entry(s, lx, y, &one_way, "one-way street");
    y += 18.0;
    let street = format!(r#"stroke="{NETWORK_GREY}" stroke-width="3""#);
    legend_entry(s, lx, y, &street, "street network");
    y += 18.0;
    let _ = writeln!(
        s,
        r#"<text x="{:.1}" y="{y:.1}" font-size="10">Small numbers: junctions where</text><text x="{:.1}" y="{:.1}" font-size="10">a truck starts or stops serving.</text>"#,
        lx + 10.0,
        lx + 10.0,
        y + 13.0
    );
    if inst.coordinates() == Coordinates::Undeclared {
        let _ = writeln!(
            s,
            r#"<text x="{:.1}" y="{:.1}" font-size="10">Coordinate system not declared.</text>"#,
            lx + 10.0,
            y + 28.0
        );
    }
    s.push_str("</g>\n");
}
