//! Fuzzes the function-file reader (JSON and `.fn` text) and, for small accepted
//! functions, the minimiser: every cover it returns must pass the independent checker.
#![no_main]

use libfuzzer_sys::fuzz_target;
use std::time::Duration;
use stillpoint_cover::{file, minimize, verify, Config, Effort, HazardMode};

fuzz_target!(|data: &[u8]| {
    let Ok(src) = std::str::from_utf8(data) else {
        return;
    };
    // The first byte picks the form, so both readers see every kind of input.
    let is_json = src.trim_start().starts_with('{') || src.starts_with('[');
    let mf = match file::parse(src, is_json) {
        Err(e) => {
            assert!(e.line >= 1 && e.col >= 1, "location is 1-based: {e}");
            assert!(
                !e.message.is_empty() && !e.message.contains('\n'),
                "one line: {e:?}"
            );
            return;
        }
        Ok(mf) => mf,
    };
    // Minimise only small functions (the fuzzer must stay fast).
    if mf.vars.len() > 8 || mf.outputs.len() > 3 {
        return;
    }
    let has_transitions = mf.outputs.iter().any(|(_, f)| !f.transitions().is_empty());
    let mut modes = vec![HazardMode::None, HazardMode::Static];
    if has_transitions {
        modes.push(HazardMode::Full);
    }
    for mode in modes {
        for effort in [Effort::Exact, Effort::Fast] {
            let cfg = Config::default()
                .hazards(mode)
                .effort(effort)
                .budget(Duration::from_millis(50))
                .node_limit(20_000);
            match minimize(&mf, &cfg) {
                // A function hazard or "no hazard-free cover" is a typed refusal.
                Err(_) => {}
                Ok(sol) => {
                    if let Err(v) = verify::check(&mf, &sol, mode) {
                        panic!("{mode:?}/{effort:?}: cover fails the checker: {v:?}\n{src}");
                    }
                    assert!(
                        sol.lower_bound <= sol.cube_count,
                        "lower bound above the answer"
                    );
                }
            }
        }
    }
});
