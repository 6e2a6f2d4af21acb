//! Bench: `checks` on the 1,000,000-candidate synthetic catalogue, echo
//! matching included.
//!
//! Run: `cargo bench --bench checks` (uses bench-data/big-1000000.csv, made
//! on first use).

use std::process::Command;
use std::time::Instant;

use starsift::catalogue::{Catalogue, LoadOptions, Source};
use starsift::checks::{self, CheckSettings};

fn main() {
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR"));
    let path = root.join("bench-data/big-1000000.csv");
    if !path.exists() {
        std::fs::create_dir_all(path.parent().expect("parent")).expect("bench-data");
        starsift::demo::write_big(&path, 1_000_000, 42).expect("write");
    }
    let cat = Catalogue::load(Source::Path(&path), &LoadOptions::default()).expect("load");
    let s = CheckSettings::default();
    let mut best = f64::MAX;
    let mut fired = 0;
    for _ in 0..3 {
        let t = Instant::now();
        let ch = checks::run(&cat, &s);
        best = best.min(t.elapsed().as_secs_f64());
        fired = ch.all_flags().iter().filter(|f| !f.is_empty()).count();
    }
    println!(
        "checks::run on {} candidates (derived physics, system checks, echo sweep): {:.3} s best of 3 ({fired} flagged)",
        cat.len(),
        best
    );
    let bin = root.join("target/release/starsift");
    if bin.exists() {
        let mut best = f64::MAX;
        for _ in 0..3 {
            let t = Instant::now();
            let out = Command::new(&bin)
                .args(["checks", path.to_str().expect("utf-8"), "--format", "csv"])
                .output()
                .expect("run");
            assert!(out.status.success());
            best = best.min(t.elapsed().as_secs_f64());
        }
        println!(
            "whole `starsift checks --format csv` process (load + checks + 1M rows out): {best:.3} s best of 3"
        );
    }
}
