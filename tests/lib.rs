//! Integration tests.

// Pictures: code cube, maps, flow graph (issue 8).
mod pictures;

// Malformed input, limits, determinism, budgets, fuzz regressions (issue 7).
mod robustness;

// The whole pipeline: corpus and random tables, Icarus test benches, negative tests (issue 5).
mod synth;
