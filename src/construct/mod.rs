//! Construction heuristics: path-scanning and route-first cluster-second splitting.
