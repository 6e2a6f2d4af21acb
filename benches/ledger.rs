//! Bench: one decision committed durably (WAL, synchronous=FULL), and opening
//! a ledger of 1,000,000 decisions to build the latest-decision view, and
//! to read what the odds need (`Ledger::decided`) for a catalogue.
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
    // What the odds read of it for a catalogue of its 400,000 candidates
    // and as many others: each one's latest decision, and those gone.
    let mut text = String::from("star,candidate,period,epoch,depth_ppm,duration_h\n");
    for i in 0..800_000 {
        let name = if i % 2 == 0 { "SYN" } else { "OTHER" };
        text.push_str(&format!("S{i},{name}{:07}-s1,3.5,100,500,2\n", i / 2));
    }
    let cat = starsift::catalogue::Catalogue::load(
        starsift::catalogue::Source::Bytes {
            name: "bench.csv",
            data: text.as_bytes(),
        },
        &starsift::catalogue::LoadOptions::default(),
    )
    .expect("catalogue");
    let mut best = f64::MAX;
    let mut decided = 0;
    for _ in 0..3 {
        let t = Instant::now();
        let l = Ledger::open(&big).expect("open");
        let d = l.decided(&cat, None).expect("decided");
        decided = d.decisions.iter().filter(|d| **d != Decision::Open).count();
        best = best.min(t.elapsed().as_secs_f64());
    }
    println!(
        "open it and read each latest decision for a catalogue of 800,000 ({decided} decided): {best:.3} s best of 3"
    );
}
