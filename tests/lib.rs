//! Integration tests.

// Pictures: code cube, maps, flow graph (issue 8).
mod pictures;
