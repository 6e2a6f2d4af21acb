//! Bench: the boost table plus every verdict for 1,000,000 candidates, and
//! one decision's incremental recompute.
//!
//! Run: `cargo bench --bench odds` (uses bench-data/big-1000000.csv, made on
//! first use).

use std::time::Instant;

use starsift::catalogue::{CandidateId, Catalogue, LoadOptions, Source};
use starsift::decision::{Decision, Reason};
use starsift::odds::{Live, Model, Verdict};

fn main() {
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("bench-data/big-1000000.csv");
    if !path.exists() {
        std::fs::create_dir_all(path.parent().expect("parent")).expect("bench-data");
        starsift::demo::write_big(&path, 1_000_000, 42).expect("write");
    }
    let cat = Catalogue::load(Source::Path(&path), &LoadOptions::default()).expect("load");
    let model = Model {
        targets: Some(cat.star_count() as u64 * 20),
        ..Model::default()
    };
    // The catalogue checks give the flags and signal groups the model sees.
    let t = Instant::now();
    let checks = starsift::checks::run(&cat, &starsift::checks::CheckSettings::default());
    println!(
        "catalogue checks: {:.0} ms; {} signal groups",
        t.elapsed().as_secs_f64() * 1e3,
        checks.groups().len()
    );
    let build = |model: Model| {
        Live::with_state(
            &cat,
            model,
            checks.all_flags().to_vec(),
            checks.groups().clone(),
            vec![Decision::Open; cat.len()],
        )
    };
    // Table + every verdict, from scratch.
    let mut best = f64::MAX;
    let mut best_new = f64::MAX;
    let mut validated = 0;
    for _ in 0..5 {
        let t = Instant::now();
        let live = build(model.clone()).expect("model");
        best_new = best_new.min(t.elapsed().as_secs_f64());
        validated = (0..cat.len() as CandidateId)
            .filter(|&c| live.verdict(c) == Verdict::Validated)
            .count();
        best = best.min(t.elapsed().as_secs_f64());
    }
    println!(
        "boost table + every verdict, {} candidates: {:.1} ms (best of 5; of which building the live state {:.1} ms; {validated} validated)",
        cat.len(),
        best * 1e3,
        best_new * 1e3
    );
    // One decision at a time: reject then reopen candidates in multis.
    let mut live = build(model).expect("model");
    let multis: Vec<CandidateId> = (0..cat.len() as CandidateId)
        .filter(|&c| cat.members(cat.star_of(c)).len() >= 2)
        .take(20_000)
        .collect();
    let mut times = Vec::with_capacity(multis.len() * 2);
    for &c in &multis {
        let t = Instant::now();
        live.set_decision(c, Decision::Rejected(Reason::EclipsingBinary));
        times.push(t.elapsed().as_secs_f64());
    }
    for &c in &multis {
        let t = Instant::now();
        live.set_decision(c, Decision::Open);
        times.push(t.elapsed().as_secs_f64());
    }
    times.sort_by(f64::total_cmp);
    let q = |p: f64| times[((times.len() - 1) as f64 * p) as usize] * 1e6;
    println!(
        "one decision, incremental ({} decisions): median {:.2} µs, p99 {:.2} µs, max {:.2} µs",
        times.len(),
        q(0.5),
        q(0.99),
        q(1.0)
    );
}
