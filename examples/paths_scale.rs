//! Measures the shortest-path matrices on invented towns of growing size:
//! junctions, key junctions, matrix bytes, wall time and the process's peak
//! memory (Linux `VmHWM`).
//!
//! ```text
//! cargo run --release --example paths_scale -- 20000
//! ```
//! The argument is the target number of junctions (default 20,000); towns
//! are generated until one reaches it.

use std::time::Instant;

use arcwright::demo::{town, TownSpec};
use arcwright::paths::Distances;

fn peak_rss_mib() -> Option<f64> {
    let s = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = s.lines().find(|l| l.starts_with("VmHWM:"))?;
    let kb: f64 = line.split_whitespace().nth(1)?.parse().ok()?;
    Some(kb / 1024.0)
}

fn main() {
    let target: usize = std::env::args()
        .nth(1)
        .and_then(|a| a.parse().ok())
        .unwrap_or(20_000);
    println!("junctions,links,tasks,key_junctions,matrix_mib,seconds,peak_rss_mib");
    let mut blocks = 8;
    loop {
        let mut spec = TownSpec::new(7, blocks);
        spec.max_trucks = None;
        let inst = match town(&spec) {
            Ok(i) => i,
            Err(e) => {
                eprintln!("town of {blocks} blocks: {e}");
                return;
            }
        };
        let t = Instant::now();
        // The full matrices (what `Distances::new` builds up to
        // `FULL_MATRIX_KEYS` key junctions; above, it answers on demand).
        let mut keys = vec![inst.depot()];
        keys.extend(inst.tasks().iter().flat_map(|t| [t.tail, t.head]));
        let d = match Distances::between(inst.network(), keys, inst.has_times()) {
            Ok(d) => d,
            Err(e) => {
                eprintln!("distances: {e}");
                return;
            }
        };
        let secs = t.elapsed().as_secs_f64();
        let n = inst.network().junctions.len();
        println!(
            "{},{},{},{},{:.1},{:.2},{:.0}",
            n,
            inst.network().links.len(),
            inst.tasks().len(),
            d.keys().len(),
            d.matrix_bytes() as f64 / (1 << 20) as f64,
            secs,
            peak_rss_mib().unwrap_or(f64::NAN)
        );
        drop(d);
        if n >= target {
            break;
        }
        // Junctions grow with the square of the blocks: aim at the target
        // without overshooting it by much (memory grows with its square).
        let step = ((target as f64 / n as f64).sqrt()).min(1.6);
        blocks = ((blocks as f64 * step).ceil() as usize).max(blocks + 1);
    }
}
