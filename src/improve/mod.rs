//! Improvement: local search moves and Merge-Split.
//!
//! - [`local_search`]: neighbour-list local search with constant-time move
//!   evaluation (relocate, swap, cross-exchange, 2-opt, 2-opt\*);
//! - [`merge_split`]: the Merge-Split operator of Tang, Mei & Yao (2009).

pub mod local_search;
pub mod merge_split;
