//! Bench: one decision committed durably (WAL, synchronous=FULL), and opening
//! a ledger of 1,000,000 decisions to build the latest-decision view.
//!
//! Run: `cargo bench --bench ledger` (writes bench-data/ledger-1m.sqlite on
//! first use).

use std::time::Instant;

use starsift::decision::{Decision, Reason};
use starsift::ledger::{Ledger, NewDecision};

fn main() {
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("bench-data");
    std::fs::create_dir_all(&root).expect("bench-data");
    // Single durable commits.
    let p = root.join("ledger-commits.sqlite");
    for ext in ["", "-wal", "-shm"] {
        let _ = std::fs::remove_file(format!("{}{ext}", p.display()));
    }
    let mut l = Ledger::open(&p).expect("open");
    let mut times = Vec::new();
    for i in 0..500 {
        let c = format!("BENCH-{i}");
        let t = Instant::now();
        l.record(&NewDecision {
            candidate: &c,
            star: "BENCH",
            vetter: "bench",
            decision: Decision::Kept,
            note: None,
            undoes: None,
        })
        .expect("record");
        times.push(t.elapsed().as_secs_f64() * 1e3);
    }
    times.sort_by(f64::total_cmp);
    println!(
        "one durable decision (500 commits): median {:.2} ms, p90 {:.2} ms, max {:.2} ms",
        times[times.len() / 2],
        times[times.len() * 9 / 10],
        times[times.len() - 1]
    );
    // A million decisions, then open + latest view.
    let big = root.join("ledger-1m.sqlite");
    if !big.exists() {
        let mut l = Ledger::open(&big).expect("open");
        let names: Vec<String> = (0..400_000).map(|i| format!("SYN{:07}-s1", i)).collect();
        for chunk in 0..100 {
            let batch: Vec<NewDecision> = (0..10_000)
                .map(|j| {
                    let i = chunk * 10_000 + j;
                    NewDecision {
                        candidate: &names[(i * 7919) % names.len()],
                        star: "SYN",
                        vetter: ["ann", "bob", "cy"][i % 3],
                        decision: if i % 4 == 0 {
                            Decision::Rejected(Reason::EclipsingBinary)
                        } else {
                            Decision::Kept
                        },
                        note: None,
                        undoes: None,
                    }
                })
                .collect();
            l.record_all(&batch).expect("bulk");
        }
    }
    let mut best = f64::MAX;
    let mut n = 0;
    for _ in 0..3 {
        let t = Instant::now();
        let l = Ledger::open(&big).expect("open");
        n = l.latest(None).expect("latest").len();
        best = best.min(t.elapsed().as_secs_f64());
    }
    println!(
        "open a ledger of 1,000,000 decisions and build the latest view ({n} candidates): {best:.3} s best of 3"
    );
}
