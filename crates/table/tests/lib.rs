//! Integration tests of the table stage, one binary.

// parse∘print = id for both forms, and junk input never panics
mod roundtrip;
// the reducer against the closed-cover and reduction checkers and a SAT formulation
mod reduction;
// the corpus of tests/data through check and reduce
mod corpus;
