//! Integration tests of the cover crate (one binary).

mod budget;
mod checks;
mod common;
mod props;
mod sympy;
