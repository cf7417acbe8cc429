//! Comparison with sympy fixtures.
