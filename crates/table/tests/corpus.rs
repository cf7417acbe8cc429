//! Every table of `tests/data` (the workspace corpus) through check and reduce, each result
//! rechecked by the independent checkers; expected facts from the files.

use crate::reduction::closed_cover_exists;
use std::path::PathBuf;
use stillpoint_table::verify::check_reduction;
use stillpoint_table::{
    analyze, collapse_chains, essential_hazards, parse_json, parse_text, reduce, ReduceConfig,
};

fn corpus() -> Vec<PathBuf> {
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../../tests/data");
    let mut files: Vec<PathBuf> = std::fs::read_dir(&dir)
        .expect("tests/data exists")
        .map(|e| e.expect("readable").path())
        .filter(|p| {
            p.is_file()
                && matches!(
                    p.extension().and_then(|e| e.to_str()),
                    Some("flow" | "json")
                )
        })
        .collect();
    files.sort();
    files
}

/// `key=value` facts from a `# expect:` line or an `"expect"` object.
fn expected(path: &std::path::Path, text: &str) -> Vec<(String, String)> {
    if path.extension().and_then(|e| e.to_str()) == Some("json") {
        let v: serde_json::Value = serde_json::from_str(text).expect("valid JSON");
        v.get("expect")
            .and_then(|e| e.as_object())
            .map(|m| m.iter().map(|(k, v)| (k.clone(), v.to_string())).collect())
            .unwrap_or_default()
    } else {
        text.lines()
            .filter_map(|l| l.strip_prefix("# expect:"))
            .flat_map(|l| l.split_whitespace())
            .filter_map(|kv| {
                kv.split_once('=')
                    .map(|(k, v)| (k.to_string(), v.to_string()))
            })
            .collect()
    }
}

#[test]
fn corpus_checks_and_reduces() {
    let files = corpus();
    assert!(files.len() >= 10, "the corpus has at least 10 tables");
    for path in files {
        let text = std::fs::read_to_string(&path).unwrap();
        let name = path.display().to_string();
        let t = if name.ends_with(".json") {
            parse_json(&text)
        } else {
            parse_text(&text)
        }
        .unwrap_or_else(|e| panic!("{name}:{e}"));
        assert_eq!(
            parse_text(&t.to_text()).unwrap(),
            t,
            "{name}: text round trip"
        );
        assert_eq!(
            parse_json(&t.to_json()).unwrap(),
            t,
            "{name}: JSON round trip"
        );
        let a = analyze(&t);
        let hazards = essential_hazards(&t);
        let reduced = reduce(&t, &ReduceConfig::default());
        assert_eq!(reduced.is_ok(), a.realizable, "{name}");
        if let Ok(r) = &reduced {
            check_reduction(&t, r).unwrap_or_else(|e| panic!("{name}: {e}"));
            assert!(r.optimal, "{name}");
            if t.num_states() <= 10 {
                let normal = collapse_chains(&t).unwrap();
                let k = r.table.num_states();
                assert!(closed_cover_exists(&normal, k), "{name}");
                assert!(k == 1 || !closed_cover_exists(&normal, k - 1), "{name}");
            }
        }
        for (k, v) in expected(&path, &text) {
            let got = match k.as_str() {
                "realizable" => a.realizable.to_string(),
                "states_after" => reduced
                    .as_ref()
                    .map(|r| r.table.num_states().to_string())
                    .unwrap_or_default(),
                "chains" => a.chains.len().to_string(),
                "essential_hazards" => hazards.len().to_string(),
                _ => continue,
            };
            assert_eq!(got, v, "{name}: {k}");
        }
    }
}

/// Timing figures for docs/table.md; run by hand:
/// `cargo test -p stillpoint-table --release --test integration -- --ignored --nocapture timing`.
#[test]
#[ignore]
fn timing() {
    let path =
        PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../../tests/data/conveyor_sorter.flow");
    let t = parse_text(&std::fs::read_to_string(path).unwrap()).unwrap();
    let start = std::time::Instant::now();
    let a = analyze(&t);
    let _ = essential_hazards(&t);
    let r = reduce(&t, &ReduceConfig::default()).unwrap();
    println!(
        "conveyor_sorter 30x16: check + reduce {:.1} ms, {} -> {} rows, optimal {}, realizable {}; {}",
        start.elapsed().as_secs_f64() * 1e3,
        t.num_states(),
        r.table.num_states(),
        r.optimal,
        a.realizable,
        r.stats
    );
    let mut proven = 0;
    let mut worst = 0.0f64;
    let n = 50;
    for seed in 0..n {
        let t = stillpoint_table::testing::random_normal_table(seed, 20, 3);
        let s = std::time::Instant::now();
        let r = reduce(&t, &ReduceConfig::default()).unwrap();
        worst = worst.max(s.elapsed().as_secs_f64());
        proven += usize::from(r.optimal);
    }
    println!(
        "random 20-row, 3-input normal tables: {proven}/{n} proven optimal, slowest {:.1} ms",
        worst * 1e3
    );
}
