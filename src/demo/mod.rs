//! Seeded generator of invented demo towns.
