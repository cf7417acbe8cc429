//! The integration tests of stillpoint-assign, in one binary.
#![allow(clippy::needless_range_loop)] // index loops read best in these checks

/// Codes files: parse, print, located errors.
mod codes_format;
/// Random normal tables and small helpers shared by the topic modules.
mod common;
/// Every method on random and published tables, rechecked by the independent checkers.
mod methods;
/// Race analysis against brute-force exploration of bit orders.
mod races;
/// Exact Tracey against a SAT encoding on code bits (varisat).
mod sat_reference;
/// Universal codes: Liu, the pruned linear code, and the exact minima of small n.
mod universal;
