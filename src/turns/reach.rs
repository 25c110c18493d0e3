//! Which streets to serve a truck can reach from the yard and leave back to
//! it under the turn rules.
//!
//! A network whose streets are all reachable without turn rules (the
//! strongly connected part of a map) can lose some under them: a turn
//! restriction at the edge of a map extract, or a U-turn ban at the end of a
//! one-way pair, can leave a street that is entered but never left, or never
//! entered. **Cost**: two breadth-first searches over the allowed turns,
//! `O(A + T)` time and memory for `A` driving arcs and `T` allowed turns.

use std::collections::VecDeque;

use super::table::{arc_of, head, tail, TurnTable};
use crate::model::{Dir, Instance};

/// The tasks (indices into [`Instance::tasks`]) that no truck can serve on
/// a route from the yard and back under `table`'s turn rules: for every
/// allowed service direction, the street is not reachable from the yard,
/// or the yard is not reachable after it. Empty when every task can be served.
pub fn unservable(inst: &Instance, table: &TurnTable) -> Vec<usize> {
    let net = inst.network();
    let yard = inst.depot();
    let arcs = table.arcs();
    let mut back: Vec<Vec<u32>> = vec![Vec::new(); arcs];
    for a in 0..arcs as u32 {
        if table.drivable(a) {
            for &b in table.turns(a).next {
                back[b as usize].push(a);
            }
        }
    }
    let spread = |start: Vec<u32>, next: &dyn Fn(u32) -> Vec<u32>| {
        let mut seen = vec![false; arcs];
        let mut queue: VecDeque<u32> = VecDeque::new();
        for a in start {
            if !seen[a as usize] {
                seen[a as usize] = true;
                queue.push_back(a);
            }
        }
        while let Some(a) = queue.pop_front() {
            for b in next(a) {
                if !seen[b as usize] {
                    seen[b as usize] = true;
                    queue.push_back(b);
                }
            }
        }
        seen
    };
    let drivable = || (0..arcs as u32).filter(|&a| table.drivable(a));
    let from_yard = spread(
        drivable().filter(|&a| tail(net, a) == yard).collect(),
        &|a| table.turns(a).next.to_vec(),
    );
    let to_yard = spread(
        drivable().filter(|&a| head(net, a) == yard).collect(),
        &|a| back[a as usize].clone(),
    );
    inst.tasks()
        .iter()
        .enumerate()
        .filter(|(_, t)| {
            ![Dir::Forward, Dir::Backward]
                .into_iter()
                .filter(|&d| t.allows(d))
                .map(|d| arc_of(t.link, d) as usize)
                .any(|a| from_yard[a] && to_yard[a])
        })
        .map(|(i, _)| i)
        .collect()
}
