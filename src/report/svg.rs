//! SVG map of a plan, written by hand: the network in light grey, each route
//! in its own colour (served links solid, deadhead legs dashed), the yard and
//! a legend.

use std::fmt::Write as _;

use crate::model::Instance;
use crate::paths::Distances;
use crate::plan::Plan;

use super::geo::{points, Coordinates};
use super::sheets::{all_rows, Action, SheetRow};

/// Route colours, in order; routes beyond the tenth reuse them. Picked for
/// this project to stay apart from each other and from the grey network.
pub const PALETTE: [&str; 10] = [
    "#0b7a75", // deep teal
    "#c8553d", // brick
    "#3d5a98", // cobalt
    "#e0a100", // mustard
    "#7d3c98", // violet
    "#5c8a2e", // fern
    "#d64f8c", // raspberry
    "#1f9ed1", // sky
    "#8c5a2b", // walnut
    "#4a4a4a", // graphite
];

/// Drawing width in pixels (the height follows the network's shape).
const WIDTH: f64 = 960.0;
const MARGIN: f64 = 24.0;
const LEGEND_W: f64 = 200.0;

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
/// has no coordinates. North is up (`y` grows upwards in the scenario).
/// Steps are shifted a little to the right of the direction of travel so that
/// a street driven both ways shows both passes.
pub fn map(inst: &Instance, dist: &Distances, plan: &Plan) -> Option<String> {
    points(inst)?;
    map_of_rows(inst, plan, &all_rows(inst, dist, plan))
}

/// [`map`] from the rows of every route ([`all_rows`]).
pub fn map_of_rows(inst: &Instance, plan: &Plan, all: &[Vec<SheetRow>]) -> Option<String> {
    let pts = points(inst)?;
    let (mut lo_x, mut hi_x, mut lo_y, mut hi_y) = (f64::MAX, f64::MIN, f64::MAX, f64::MIN);
    for &(x, y) in &pts {
        lo_x = lo_x.min(x);
        hi_x = hi_x.max(x);
        lo_y = lo_y.min(y);
        hi_y = hi_y.max(y);
    }
    let span_x = (hi_x - lo_x).max(1e-9);
    let span_y = (hi_y - lo_y).max(1e-9);
    let draw_w = WIDTH - 2.0 * MARGIN - LEGEND_W;
    let scale = (draw_w / span_x).min(draw_w * 1.2 / span_y);
    let legend_h = 90.0 + 18.0 * plan.routes.len() as f64;
    let height = (span_y * scale + 2.0 * MARGIN).max(legend_h + 2.0 * MARGIN);
    let px = |j: usize| -> (f64, f64) {
        let (x, y) = pts[j];
        (
            MARGIN + (x - lo_x) * scale,
            height - MARGIN - (y - lo_y) * scale,
        )
    };
    let mut s = String::new();
    let _ = writeln!(
        s,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="{WIDTH:.0}" height="{height:.0}" viewBox="0 0 {WIDTH:.0} {height:.0}" font-family="sans-serif" font-size="12">"#
    );
    let _ = writeln!(s, "<title>{}</title>", xml_escape(&inst.name));
    let _ = writeln!(s, r##"<rect width="100%" height="100%" fill="#ffffff"/>"##);
    // The network.
    s.push_str(r##"<g id="network" stroke="#d4d4d4" stroke-width="3" stroke-linecap="round">"##);
    s.push('\n');
    for l in &inst.network().links {
        let (a, b) = (px(l.from), px(l.to));
        let _ = writeln!(
            s,
            r#"<line x1="{:.1}" y1="{:.1}" x2="{:.1}" y2="{:.1}"/>"#,
            a.0, a.1, b.0, b.1
        );
    }
    s.push_str("</g>\n");
    // Routes: deadheads under services.
    for pass in [true, false] {
        for r in 0..plan.routes.len() {
            let colour = PALETTE[r % PALETTE.len()];
            let id = if pass { "deadhead" } else { "serve" };
            let _ = writeln!(
                s,
                r#"<g id="route-{}-{id}" stroke="{colour}" stroke-linecap="round" fill="none">"#,
                r + 1
            );
            for row in &all[r] {
                if row.action.is_deadhead() != pass {
                    continue;
                }
                let (a, b) = (px(row.ends.0), px(row.ends.1));
                let (dx, dy) = (b.0 - a.0, b.1 - a.1);
                let len = (dx * dx + dy * dy).sqrt().max(1e-9);
                // Right of travel on screen (y grows downwards).
                let off = 1.8;
                let (ox, oy) = (-dy / len * off, dx / len * off);
                let style = if pass {
                    r#" stroke-width="1.6" stroke-dasharray="5 4""#
                } else {
                    r#" stroke-width="2.6""#
                };
                let _ = writeln!(
                    s,
                    r#"<line x1="{:.1}" y1="{:.1}" x2="{:.1}" y2="{:.1}"{style}><title>truck {} step {}: {} ({})</title></line>"#,
                    a.0 + ox,
                    a.1 + oy,
                    b.0 + ox,
                    b.1 + oy,
                    r + 1,
                    row.step,
                    xml_escape(&row.street),
                    if row.action == Action::Serve {
                        "serve"
                    } else {
                        "deadhead"
                    },
                );
            }
            s.push_str("</g>\n");
        }
    }
    // The yard.
    let (yx, yy) = px(inst.depot());
    let _ = writeln!(
        s,
        r##"<g id="yard"><rect x="{:.1}" y="{:.1}" width="14" height="14" fill="#111111" stroke="#ffffff" stroke-width="2"/><text x="{:.1}" y="{:.1}" font-weight="bold">Yard</text></g>"##,
        yx - 7.0,
        yy - 7.0,
        yx + 11.0,
        yy + 4.0
    );
    // Scale bar, for planar coordinates only (taken as metres).
    if let Some(Coordinates::Metres { .. }) = Coordinates::guess(inst) {
        let target = span_x / 5.0;
        let mag = 10f64.powf(target.log10().floor());
        let len = [5.0, 2.0, 1.0]
            .into_iter()
            .map(|m| m * mag)
            .find(|&l| l <= target)
            .unwrap_or(mag);
        let (x0, y0) = (WIDTH - LEGEND_W - MARGIN / 2.0, height - MARGIN);
        let _ = writeln!(
            s,
            r##"<g id="scale"><line x1="{x0:.1}" y1="{y0:.1}" x2="{:.1}" y2="{y0:.1}" stroke="#333333" stroke-width="2"/><text x="{x0:.1}" y="{:.1}">{len} m</text></g>"##,
            x0 + len * scale,
            y0 - 6.0
        );
    }
    // Legend.
    let lx = WIDTH - LEGEND_W - MARGIN / 2.0;
    let _ = writeln!(
        s,
        r##"<g id="legend"><rect x="{lx:.1}" y="{:.1}" width="{LEGEND_W:.0}" height="{legend_h:.0}" fill="#ffffff" stroke="#999999" rx="4"/>"##,
        MARGIN
    );
    let mut y = MARGIN + 20.0;
    let _ = writeln!(
        s,
        r#"<text x="{:.1}" y="{y:.1}" font-weight="bold">Total distance {}</text>"#,
        lx + 10.0,
        plan.cost
    );
    for (r, route) in plan.routes.iter().enumerate() {
        y += 18.0;
        let colour = PALETTE[r % PALETTE.len()];
        let _ = writeln!(
            s,
            r#"<line x1="{:.1}" y1="{:.1}" x2="{:.1}" y2="{:.1}" stroke="{colour}" stroke-width="4"/><text x="{:.1}" y="{:.1}">Truck {}: {}</text>"#,
            lx + 10.0,
            y - 4.0,
            lx + 34.0,
            y - 4.0,
            lx + 42.0,
            y,
            r + 1,
            route.cost
        );
    }
    y += 24.0;
    let _ = writeln!(
        s,
        r##"<line x1="{:.1}" y1="{:.1}" x2="{:.1}" y2="{:.1}" stroke="#333333" stroke-width="2.6"/><text x="{:.1}" y="{y:.1}">served</text>"##,
        lx + 10.0,
        y - 4.0,
        lx + 34.0,
        y - 4.0,
        lx + 42.0
    );
    y += 18.0;
    let _ = writeln!(
        s,
        r##"<line x1="{:.1}" y1="{:.1}" x2="{:.1}" y2="{:.1}" stroke="#333333" stroke-width="1.6" stroke-dasharray="5 4"/><text x="{:.1}" y="{y:.1}">deadhead (not served)</text>"##,
        lx + 10.0,
        y - 4.0,
        lx + 34.0,
        y - 4.0,
        lx + 42.0
    );
    y += 18.0;
    let _ = writeln!(
        s,
        r##"<line x1="{:.1}" y1="{:.1}" x2="{:.1}" y2="{:.1}" stroke="#d4d4d4" stroke-width="3"/><text x="{:.1}" y="{y:.1}">street network</text></g>"##,
        lx + 10.0,
        y - 4.0,
        lx + 34.0,
        y - 4.0,
        lx + 42.0
    );
    s.push_str("</svg>\n");
    Some(s)
}
