//! Time and memory of turn-aware distances on an invented town.
//!
//! `cargo run --release --example turns_scale -- BLOCKS` (the town of
//! `arcwright::demo::TownSpec::new(7, BLOCKS)`); run under `/usr/bin/time -v`
//! for the peak memory. Also times the explicit walks with turns
//! (`walks_with_turns`, what plan files and sheets are made of) of a plan
//! that serves every street in list order, 50 streets per route.

use std::time::Instant;

use arcwright::demo::{town, TownSpec};
use arcwright::model::Dir;
use arcwright::plan::{Plan, Route, Visit};
use arcwright::turns::{walks_with_turns, TurnDistances, TurnPenalties, TurnRules, TurnTable};

fn main() {
    let blocks: usize = std::env::args()
        .nth(1)
        .and_then(|s| s.parse().ok())
        .unwrap_or(20);
    let inst = town(&TownSpec::new(7, blocks)).expect("town");
    let rules = TurnRules::trucks(TurnPenalties {
        left: 30,
        right: 5,
        u_turn: 60,
        straight: 0,
    });
    let t0 = Instant::now();
    let table = TurnTable::new(&inst, &rules).expect("rules");
    let td = TurnDistances::new(&inst, &table);
    println!(
        "blocks {blocks}: {} streets, {} to serve; turn table {} bytes; distances {} bytes; {:.1} s",
        inst.network().links.len(),
        inst.tasks().len(),
        table.bytes(),
        td.bytes(),
        t0.elapsed().as_secs_f64()
    );
    let routes: Vec<Route> = (0..inst.tasks().len())
        .map(|t| Visit::new(t, Dir::Forward))
        .collect::<Vec<_>>()
        .chunks(50)
        .map(|v| Route {
            visits: v.to_vec(),
            load: 0,
            cost: 0,
            time: 0,
        })
        .collect();
    let plan = Plan { routes, cost: 0 };
    let t1 = Instant::now();
    let walks = walks_with_turns(&inst, &table, &plan).expect("every street can be served");
    println!(
        "walks of {} routes ({} streets driven): {:.2} s",
        plan.routes.len(),
        walks.iter().map(|w| w.steps.len()).sum::<usize>(),
        t1.elapsed().as_secs_f64()
    );
}
