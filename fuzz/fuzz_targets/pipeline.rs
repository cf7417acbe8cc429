//! Fuzzes the whole pipeline on small tables (at most 8 rows, 3 inputs, 3 outputs):
//! check analysis, reduction, every assignment method, and synthesis with a small
//! budget. Every answer must pass the project's own independent checkers.
#![no_main]

use libfuzzer_sys::fuzz_target;
use std::time::Duration;
use stillpoint::synth::{synthesize, SynthConfig};
use stillpoint_assign::{assign, one_hot, separation, AssignConfig, Method};
use stillpoint_table::{
    analyze, collapse_chains, parse_json, parse_text, reduce, verify, ReduceConfig,
};

const BUDGET: Duration = Duration::from_millis(100);

fuzz_target!(|data: &[u8]| {
    let Ok(src) = std::str::from_utf8(data) else {
        return;
    };
    let parsed = if src.trim_start().starts_with('{') {
        parse_json(src)
    } else {
        parse_text(src)
    };
    let Ok(t) = parsed else { return };
    if t.num_states() > 8 || t.num_inputs() > 3 || t.num_outputs() > 3 {
        return;
    }
    let a = analyze(&t);
    assert_eq!(
        a.realizable,
        a.oscillations.is_empty(),
        "realizable iff no oscillation"
    );
    let Ok(normal) = collapse_chains(&t) else {
        assert!(!a.realizable, "collapse fails only on an oscillation");
        return;
    };
    assert!(normal.is_normal());

    let r = reduce(
        &t,
        &ReduceConfig::default().budget(BUDGET).node_limit(50_000),
    )
    .expect("a realizable table reduces");
    verify::check_reduction(&t, &r).unwrap_or_else(|e| panic!("reduction fails its checker: {e}"));
    assert!(
        r.lower_bound <= r.table.num_states(),
        "reduce: lower bound above the answer"
    );

    for m in [
        Method::Tracey,
        Method::TraceyFast,
        Method::Liu,
        Method::Tan,
        Method::OneHot,
    ] {
        let cfg = AssignConfig::default().method(m).budget(BUDGET);
        let Ok(asg) = assign(&normal, &cfg) else {
            continue;
        };
        if asg.multi_step {
            one_hot::check(&normal, &asg.codes)
                .unwrap_or_else(|v| panic!("{m:?}: one-hot codes fail their checker: {v:?}"));
        } else {
            separation::check(&normal, &asg.codes)
                .unwrap_or_else(|v| panic!("{m:?}: codes have a critical race: {v:?}"));
            assert!(
                asg.lower_bound <= asg.codes.width(),
                "{m:?}: lower bound above width"
            );
        }
    }

    let cfg = SynthConfig::default().budget(BUDGET);
    if let Ok(d) = synthesize(&t, &cfg) {
        assert!(
            d.verification.ok,
            "synthesis verification failed: {:?}\n{}",
            d.verification,
            t.to_text()
        );
    }
});
