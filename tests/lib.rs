//! Integration tests.

// Pictures: code cube, maps, flow graph (issue 8).
mod pictures;

// Malformed input, limits, determinism, budgets, fuzz regressions (issue 7).
mod robustness;

// Property tests: >= 1000 random tables and functions per property through every checker (issue 7).
mod properties;

// The whole pipeline: corpus and random tables, Icarus test benches, negative tests (issue 5).
mod synth;

// Quality of results against tests/qor/baseline.json (issue 6).
mod qor;
