//! Integration tests.

// Pictures: code cube, maps, flow graph (issue 8).
mod pictures;

// Malformed input, limits, determinism, budgets, fuzz regressions (issue 7).
mod robustness;
