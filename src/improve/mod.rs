//! Improvement: local search moves and Merge-Split.
