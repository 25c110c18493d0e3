//! Order crossover (OX) on giant tours, as in the memetic algorithm for the
//! CARP of Lacomme, Prins & Ramdane-Chérif (2004).

use rand::Rng;

/// OX: the child keeps `p1[i..=j]` in place and fills the other positions
/// with the remaining tasks in the order they appear in `p2`, starting after
/// position `j` and wrapping around. Both parents must be permutations of
/// the same tasks.
pub fn order_crossover<R: Rng>(p1: &[usize], p2: &[usize], rng: &mut R) -> Vec<usize> {
    let n = p1.len();
    if n < 2 {
        return p1.to_vec();
    }
    let mut i = rng.random_range(0..n);
    let mut j = rng.random_range(0..n);
    if i > j {
        std::mem::swap(&mut i, &mut j);
    }
    let max_task = p1.iter().copied().max().unwrap_or(0);
    let mut taken = vec![false; max_task + 1];
    let mut child = vec![usize::MAX; n];
    for k in i..=j {
        child[k] = p1[k];
        taken[p1[k]] = true;
    }
    let mut w = (j + 1) % n;
    for k in 0..n {
        let t = p2[(j + 1 + k) % n];
        if !taken[t] {
            child[w] = t;
            taken[t] = true;
            w = (w + 1) % n;
        }
    }
    child
}

#[cfg(test)]
mod tests {
    use super::*;
    use rand::SeedableRng;

    #[test]
    fn child_is_a_permutation() {
        let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(3);
        let p1: Vec<usize> = (0..30).collect();
        let p2: Vec<usize> = (0..30).rev().collect();
        for _ in 0..50 {
            let mut c = order_crossover(&p1, &p2, &mut rng);
            c.sort_unstable();
            assert_eq!(c, p1);
        }
    }
}
