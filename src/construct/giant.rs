//! Giant tours: task orders that ignore capacity, the chromosomes of the
//! memetic search (Lacomme, Prins & Ramdane-Chérif 2004).

use rand::seq::SliceRandom;
use rand::Rng;

use super::arcs::ArcMatrix;

/// The giant tour of a set of routes: their tasks concatenated in order.
pub fn of_routes(routes: &[Vec<u32>]) -> Vec<usize> {
    routes
        .iter()
        .flatten()
        .map(|&a| ArcMatrix::task(a))
        .collect()
}

/// A uniformly random order of `n` tasks.
pub fn random<R: Rng>(n: usize, rng: &mut R) -> Vec<usize> {
    let mut t: Vec<usize> = (0..n).collect();
    t.shuffle(rng);
    t
}
