//! Minimum-cost perfect matching ([`DenseBlossom`]) on random complete
//! graphs of 200, 1000 and 2000 vertices (as the odd vertices of a postman
//! problem): random points on a 10,000 × 10,000 grid, Manhattan distances.
//!
//! ```text
//! cargo bench --bench matching
//! ```
#![allow(missing_docs)] // criterion_group! makes an undocumented pub fn

use arcwright::postman::{DenseBlossom, PerfectMatching};
use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;

fn points(n: usize) -> Vec<(i64, i64)> {
    let mut r = ChaCha8Rng::seed_from_u64(n as u64);
    (0..n)
        .map(|_| (r.random_range(0..10_000), r.random_range(0..10_000)))
        .collect()
}

fn bench(c: &mut Criterion) {
    let mut group = c.benchmark_group("min_cost_perfect_matching");
    group.sample_size(10);
    for n in [200usize, 1000, 2000] {
        let p = points(n);
        let cost = move |i: usize, j: usize| (p[i].0 - p[j].0).abs() + (p[i].1 - p[j].1).abs();
        if n >= 1000 {
            group.measurement_time(std::time::Duration::from_secs(if n >= 2000 {
                60
            } else {
                20
            }));
        }
        group.bench_with_input(BenchmarkId::from_parameter(n), &n, |b, &n| {
            b.iter(|| DenseBlossom.min_cost_perfect_matching(n, &cost).unwrap())
        });
    }
    group.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
