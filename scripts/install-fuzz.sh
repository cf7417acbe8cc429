#!/usr/bin/env bash
# Installs the fuzzing tool for Stillpoint's fuzz/ project (see docs/robustness.md).
#
# CI does not run this script nor the fuzzers: fuzzing is a manual, long-running job.
#
# cargo-fuzz comes from crates.io. Its targets need nightly-only compiler flags
# (-Zsanitizer, -Cpasses=sancov-module). On a machine with only a stable toolchain, let
# the stable compiler accept them with RUSTC_BOOTSTRAP=1, e.g.:
#
#   cd fuzz
#   RUSTC_BOOTSTRAP=1 CARGO_TARGET_DIR=/tmp/stillpoint-fuzz \
#       nice -n 10 cargo fuzz run table_text -- -max_total_time=600
#
# (RUSTC_BOOTSTRAP unlocks unstable features on a stable compiler; use it only for
# fuzz builds, never for release builds.)
set -euo pipefail

if command -v cargo-fuzz >/dev/null 2>&1; then
    echo "cargo-fuzz already installed: $(cargo fuzz --version 2>/dev/null || echo unknown version)"
    exit 0
fi

cargo install --locked cargo-fuzz
cargo fuzz --version
