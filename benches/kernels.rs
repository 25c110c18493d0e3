//! Criterion benchmarks of the solver's kernels on a public instance
//! (egl-e4-C, Li & Eglese 1996, from ../shared/instances): Ulusoy's split of
//! a giant tour, one local-search descent from a split, and the
//! constant-time evaluation of relocation moves.
#![allow(missing_docs)] // criterion_group! makes an undocumented pub fn

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use rand::SeedableRng;
use rand_chacha::ChaCha8Rng;

use arcwright::construct::arcs::ArcMatrix;
use arcwright::construct::giant;
use arcwright::construct::split::split;
use arcwright::improve::local_search::{neighbour_lists, LocalSearch, DEFAULT_NEIGHBOURS};
use arcwright::io::read_dat_file;
use arcwright::paths::Distances;

#[path = "../tests/common/mod.rs"]
mod common;

fn kernels(c: &mut Criterion) {
    let Some(path) = common::shared_file("kernels", "egl/egl-e4-C.dat") else {
        return;
    };
    let dat = read_dat_file(&path).unwrap();
    let inst = &dat.instance;
    let dist = Distances::new(inst).unwrap();
    let m = ArcMatrix::new(inst, &dist).unwrap();
    let neigh = neighbour_lists(&m, DEFAULT_NEIGHBOURS);
    let mut rng = ChaCha8Rng::seed_from_u64(1);
    let tour = giant::random(m.n, &mut rng);
    c.bench_function("split of a random giant tour, egl-e4-C", |b| {
        b.iter(|| split(&m, black_box(&tour)).unwrap().cost)
    });
    let s = split(&m, &tour).unwrap();
    let mut ls = LocalSearch::new(&m, &neigh);
    c.bench_function("local search descent from a split, egl-e4-C", |b| {
        b.iter(|| {
            let mut r = ChaCha8Rng::seed_from_u64(2);
            ls.run(black_box(&s.routes), &mut r).cost
        })
    });
    let routes = ls.run(&s.routes, &mut rng).routes;
    let (count, _) = ls.scan_relocations(&routes);
    c.bench_function(
        &format!("evaluate {count} relocations (constant-time each), egl-e4-C"),
        |b| b.iter(|| ls.scan_relocations(black_box(&routes)).1),
    );
}

criterion_group!(benches, kernels);
criterion_main!(benches);
