//! Bench: load + index + histogram of a 1,000,000-candidate catalogue,
//! against a raw csv-crate record scan of the same file in the same run, and
//! the peak memory of a process that only loads it.
//!
//! Run: `cargo bench --bench load` (makes bench-data/big-1m.csv on first use).
//! Options: `-- --candidates N` for another size.

use std::path::{Path, PathBuf};
use std::process::Command;
use std::time::{Duration, Instant};

use starsift::catalogue::{Catalogue, LoadOptions, Source};

fn best_of<T>(runs: usize, mut f: impl FnMut() -> T) -> (Duration, T) {
    let mut best = Duration::MAX;
    let mut last = None;
    for _ in 0..runs {
        let t = Instant::now();
        let v = f();
        best = best.min(t.elapsed());
        last = Some(v);
    }
    (best, last.expect("at least one run"))
}

fn raw_scan(path: &Path) -> u64 {
    let mut rdr = csv::ReaderBuilder::new()
        .has_headers(true)
        .from_path(path)
        .expect("open");
    let mut rec = csv::ByteRecord::new();
    let mut n = 0;
    while rdr.read_byte_record(&mut rec).expect("read") {
        n += 1;
    }
    n
}

fn peak_rss_kib() -> Option<u64> {
    let s = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = s.lines().find(|l| l.starts_with("VmHWM:"))?;
    line.split_whitespace().nth(1)?.parse().ok()
}

pub fn bench_file(candidates: usize) -> PathBuf {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("bench-data");
    std::fs::create_dir_all(&dir).expect("bench-data");
    let path = dir.join(format!("big-{candidates}.csv"));
    if !path.exists() {
        eprintln!("writing {} ...", path.display());
        starsift::demo::write_big(&path, candidates, 42).expect("write bench catalogue");
    }
    path
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    // Child mode: load once and report this process's peak memory.
    if let Some(i) = args.iter().position(|a| a == "--load-only") {
        let path = PathBuf::from(&args[i + 1]);
        let c = Catalogue::load(Source::Path(&path), &LoadOptions::default()).expect("load");
        let h = c.histogram();
        println!("{} {} {}", c.len(), h.len(), peak_rss_kib().unwrap_or(0));
        return;
    }
    let candidates = args
        .iter()
        .position(|a| a == "--candidates")
        .and_then(|i| args.get(i + 1)?.parse().ok())
        .unwrap_or(1_000_000);
    let path = bench_file(candidates);
    let size = std::fs::metadata(&path).map(|m| m.len()).unwrap_or(0);
    println!("file: {} ({:.1} MB)", path.display(), size as f64 / 1e6);

    // Interleaved, best of 7 each: on a shared machine the load drifts over
    // seconds, and alternating keeps the measures in the same conditions.
    let bin = Path::new(env!("CARGO_MANIFEST_DIR")).join("target/release/starsift");
    let summary = || {
        Command::new(&bin)
            .args([
                "summary",
                path.to_str().expect("utf-8 path"),
                "--format",
                "json",
            ])
            .output()
            .expect("starsift summary")
    };
    let (mut raw, mut load, mut whole) = (Duration::MAX, Duration::MAX, Duration::MAX);
    let (mut n, mut shape) = (0, (0, 0, Vec::new()));
    for _ in 0..7 {
        if bin.exists() {
            whole = whole.min(best_of(1, summary).0);
        }
        let (t, v) = best_of(1, || raw_scan(&path));
        raw = raw.min(t);
        n = v;
        let (t, v) = best_of(1, || {
            let c = Catalogue::load(Source::Path(&path), &LoadOptions::default()).expect("load");
            let h = c.histogram();
            (c.len(), c.star_count(), h)
        });
        load = load.min(t);
        shape = v;
    }
    let (len, stars, hist) = shape;
    println!(
        "raw csv ByteRecord scan:        {:>8.3} s  ({n} records)",
        raw.as_secs_f64()
    );
    println!(
        "starsift load + index + histogram: {:>6.3} s  ({len} candidates, {stars} stars, k up to {})  = {:.2}x raw scan",
        load.as_secs_f64(),
        hist.len() - 1,
        load.as_secs_f64() / raw.as_secs_f64()
    );

    let exe = std::env::current_exe().expect("current exe");
    let out = Command::new(&exe)
        .args(["--load-only", path.to_str().expect("utf-8 path")])
        .output()
        .expect("child");
    let text = String::from_utf8_lossy(&out.stdout);
    if let Some(kib) = text
        .split_whitespace()
        .nth(2)
        .and_then(|v| v.parse::<f64>().ok())
    {
        println!(
            "peak memory of a load-only process: {:.0} MiB",
            kib / 1024.0
        );
    }

    if bin.exists() {
        println!(
            "whole `starsift summary` process:  {:>6.3} s  = {:.2}x raw scan",
            whole.as_secs_f64(),
            whole.as_secs_f64() / raw.as_secs_f64()
        );
    } else {
        println!("(build target/release/starsift to time the whole summary process)");
    }
}
