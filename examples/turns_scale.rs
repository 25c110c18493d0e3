//! Time and memory of turn-aware distances on an invented town.
//!
//! `cargo run --release --example turns_scale -- BLOCKS` (the town of
//! `arcwright::demo::TownSpec::new(7, BLOCKS)`); run under `/usr/bin/time -v`
//! for the peak memory.

use std::time::Instant;

use arcwright::demo::{town, TownSpec};
use arcwright::turns::{TurnDistances, TurnPenalties, TurnRules, TurnTable};

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
}
