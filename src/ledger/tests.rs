//! Tests of the ledger: append-only, the latest entries, disagreements,
//! migrations, foreign files.

use super::*;
use std::collections::{BTreeMap, HashSet};

fn temp(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("starsift-ledger-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d.join("l.sqlite")
}

#[test]
fn rfc3339_dates() {
    // 2000-03-01 (the day after a leap day): 951868800 s after the Unix epoch.
    assert_eq!(rfc3339(951_868_800, 5), "2000-03-01T00:00:00.005Z");
    assert_eq!(rfc3339(0, 0), "1970-01-01T00:00:00.000Z");
}

/// A decision on star S, with no note.
fn on_s<'a>(candidate: &'a str, vetter: &'a str, decision: Decision) -> NewDecision<'a> {
    NewDecision {
        candidate,
        star: "S",
        vetter,
        decision,
        note: None,
        undoes: None,
    }
}

#[test]
fn append_only_and_latest() {
    let p = temp("basic");
    let mut l = Ledger::open(&p).unwrap();
    let d = on_s;
    l.record(&d("S-1", "ann", Decision::Kept)).unwrap();
    let id = l
        .record(&d("S-1", "ann", Decision::Rejected(Reason::Blend)))
        .unwrap();
    l.record(&d("S-1", "bob", Decision::Kept)).unwrap();
    l.record(&d("S-2", "bob", Decision::Parked)).unwrap();
    assert_eq!(l.len().unwrap(), 4);
    let latest = l.latest(None).unwrap();
    assert_eq!(latest["S-1"].decision, Decision::Kept);
    assert_eq!(&*latest["S-1"].vetter, "bob");
    let ann = l.latest(Some("ann")).unwrap();
    assert_eq!(ann["S-1"].decision, Decision::Rejected(Reason::Blend));
    assert!(!ann.contains_key("S-2"));
    let dis = l.disagreements().unwrap();
    assert_eq!(dis.keys().collect::<Vec<_>>(), ["S-1"]);
    // Nothing is updated or deleted in place.
    let e = l
        .conn
        .execute("UPDATE decision SET vetter = 'eve' WHERE id = ?1", [id])
        .unwrap_err();
    assert!(e.to_string().contains("append-only"), "{e}");
    assert!(l.conn.execute("DELETE FROM decision", []).is_err());
    // A rejection without a reason is refused by the schema itself.
    assert!(l.conn.execute(
        "INSERT INTO decision (candidate, star, vetter, decision, decided_at) VALUES ('x','S','ann','rejected','t')",
        []
    ).is_err());
    let mode: String = l
        .conn
        .query_row("PRAGMA journal_mode", [], |r| r.get(0))
        .unwrap();
    let sync: i64 = l
        .conn
        .query_row("PRAGMA synchronous", [], |r| r.get(0))
        .unwrap();
    assert_eq!((mode.as_str(), sync), ("wal", 2));
    assert_eq!(l.integrity().unwrap(), "ok");
}

#[test]
fn disagreements_are_latest_decisions_of_two_vetters_that_differ() {
    let p = temp("disagree");
    let mut l = Ledger::open(&p).unwrap();
    let mut say = |c, v, dec| {
        l.record(&on_s(c, v, dec)).unwrap();
    };
    // One vetter changing their mind is no disagreement.
    say("S-1", "ann", Decision::Kept);
    say("S-1", "ann", Decision::Rejected(Reason::Blend));
    say("S-2", "ann", Decision::Parked);
    // A second vetter who agrees (in the end) with the first's latest.
    say("S-2", "bob", Decision::Kept);
    say("S-2", "bob", Decision::Parked);
    // And one who does not: the latest of each counts, not the first.
    say("S-1", "cy", Decision::Rejected(Reason::Blend));
    say("S-1", "cy", Decision::Kept);
    say("S-3", "cy", Decision::Kept);
    let dis = l.disagreements().unwrap();
    assert_eq!(dis.keys().collect::<Vec<_>>(), ["S-1"]);
    let who: Vec<&str> = dis["S-1"].iter().map(|e| &*e.vetter).collect();
    assert_eq!(who, ["ann", "cy"]);
    // A ledger of one vetter has none, and so has an empty one.
    let q = temp("one-vetter");
    let mut one = Ledger::open(&q).unwrap();
    assert!(one.disagreements().unwrap().is_empty());
    for dec in [Decision::Kept, Decision::Parked] {
        one.record(&on_s("S-1", "ann", dec)).unwrap();
    }
    assert!(one.disagreements().unwrap().is_empty());
}

#[test]
fn since_says_whether_another_vetter_decided_after_a_row() {
    let p = temp("since");
    let mut l = Ledger::open(&p).unwrap();
    assert_eq!(l.since(0, "ann").unwrap(), (0, false));
    let a = l.record(&on_s("S-1", "ann", Decision::Kept)).unwrap();
    // Only Ann's own decision after row 0.
    assert_eq!(l.since(0, "ann").unwrap(), (a, false));
    assert_eq!(l.since(0, "bob").unwrap(), (a, true));
    let b = l
        .record(&on_s(
            "S-2",
            "bob",
            Decision::Rejected(Reason::EclipsingBinary),
        ))
        .unwrap();
    assert_eq!(l.since(a, "ann").unwrap(), (b, true));
    // Nothing after the newest.
    assert_eq!(l.since(b, "ann").unwrap(), (b, false));
    // A second connection, as the browser's watcher has, sees the same,
    // and the read of the decisions names the newest row it holds.
    let other = Ledger::open(&p).unwrap();
    assert_eq!(other.since(a, "ann").unwrap(), (b, true));
    let cat = crate::catalogue::Catalogue::load(
        crate::catalogue::Source::Bytes {
            name: "s.csv",
            data: b"star,candidate,period,epoch,depth_ppm,duration_h\nS,S-1,3,1,500,2\nS,S-2,7,1,500,3\n",
        },
        &crate::catalogue::LoadOptions::default(),
    )
    .unwrap();
    assert_eq!(other.decided(&cat, None).unwrap().newest, b);
    assert_eq!(other.decided(&cat, Some("ann")).unwrap().newest, b);
}

#[test]
fn migrates_version_1() {
    let p = temp("v1");
    {
        let c = Connection::open(&p).unwrap();
        c.execute_batch(SCHEMA_V1).unwrap();
        c.execute_batch("PRAGMA user_version = 1;").unwrap();
        c.execute(
            "INSERT INTO decision (candidate, star, vetter, decision, reason, note, decided_at)
             VALUES ('OLD-1', 'OLD', 'ann', 'rejected', 'alias', 'from v1', '2026-01-02T03:04:05.000Z')",
            [],
        )
        .unwrap();
    }
    let mut l = Ledger::open(&p).unwrap();
    let h = l.history(None).unwrap();
    assert_eq!(h.len(), 1);
    assert_eq!(h[0].decision, Decision::Rejected(Reason::Alias));
    assert_eq!(h[0].tool_version, None);
    let v: i32 = l
        .conn
        .query_row("PRAGMA user_version", [], |r| r.get(0))
        .unwrap();
    assert_eq!(v, SCHEMA_VERSION);
    let id = l
        .record(&NewDecision {
            candidate: "OLD-1",
            star: "OLD",
            vetter: "bob",
            decision: Decision::Open,
            note: None,
            undoes: Some(h[0].id),
        })
        .unwrap();
    assert_eq!(l.history(Some("OLD-1")).unwrap()[1].undoes, Some(h[0].id));
    assert!(id > h[0].id);
}

#[test]
fn foreign_files_are_refused_unchanged() {
    let p = temp("foreign");
    std::fs::write(&p, b"star,candidate\nA,A-1\n").unwrap();
    let before = std::fs::read(&p).unwrap();
    let e = Ledger::open(&p).err().unwrap();
    assert!(e.to_string().contains("not an SQLite database"), "{e}");
    assert_eq!(std::fs::read(&p).unwrap(), before);
    let q = p.with_file_name("other.sqlite");
    {
        let c = Connection::open(&q).unwrap();
        c.execute_batch("CREATE TABLE birds (name TEXT); INSERT INTO birds VALUES ('wren');")
            .unwrap();
    }
    let before = std::fs::read(&q).unwrap();
    let e = Ledger::open(&q).err().unwrap();
    assert!(e.to_string().contains("another application"), "{e}");
    assert_eq!(std::fs::read(&q).unwrap(), before);
    assert!(!q.with_file_name("other.sqlite-wal").exists());
}

/// Every decision, and two reasons of a rejection.
const FIVE_DECISIONS: [Decision; 5] = [
    Decision::Kept,
    Decision::Parked,
    Decision::Open,
    Decision::Rejected(Reason::EclipsingBinary),
    Decision::Rejected(Reason::Blend),
];

/// An invented catalogue of candidates S-1, S-2 and S-3 on star S.
fn three_on_s() -> crate::catalogue::Catalogue {
    crate::catalogue::Catalogue::from_text(
        "invented.csv",
        "star,candidate,period,epoch,depth_ppm,duration_h\n\
         S,S-1,3.5,100,500,2\nS,S-2,5.5,100,500,2\nS,S-3,7.5,100,500,2\n",
    )
}

#[test]
fn what_the_odds_read_is_the_latest_entry_of_each_candidate() {
    let p = temp("decided");
    let mut l = Ledger::open(&p).unwrap();
    let cat = three_on_s();
    let mut rng = crate::demo::Rng::new(7);
    let names = ["S-1", "S-2", "gone-1", "gone-2", "S-3"];
    let vetters = ["ann", "bob"];
    let decisions = FIVE_DECISIONS;
    for _ in 0..60 {
        let pick = |rng: &mut crate::demo::Rng, n: usize| rng.below(n as u64) as usize;
        let (c, v, d) = (pick(&mut rng, 4), pick(&mut rng, 2), pick(&mut rng, 5));
        l.record(&on_s(names[c], vetters[v], decisions[d])).unwrap();
    }
    for vetter in [None, Some("ann"), Some("bob"), Some("eve")] {
        // What the whole latest entries give, one candidate at a time.
        let latest = l.latest(vetter).unwrap();
        let decided = l.decided(&cat, vetter).unwrap();
        let want: Vec<Decision> = (0..cat.len() as crate::catalogue::CandidateId)
            .map(|c| {
                latest
                    .get(cat.candidate_id(c))
                    .map_or(Decision::Open, |e| e.decision)
            })
            .collect();
        assert_eq!(decided.decisions, want, "{vetter:?}");
        let gone: Vec<&Entry> = latest
            .iter()
            .filter(|e| cat.find_candidate(&e.candidate).is_none())
            .collect();
        assert_eq!(decided.gone.iter().collect::<Vec<_>>(), gone, "{vetter:?}");
        // The candidates gone are every vetter's, whoever's decisions count.
        assert_eq!(decided.not_listed, ["gone-1", "gone-2"], "{vetter:?}");
        // The same from a scan made ahead of the catalogue (as a command
        // scans while the catalogue loads).
        let (ahead, _) = l
            .decided_ahead(&cat, vetter, l.read_ahead().unwrap(), false)
            .unwrap();
        assert_eq!(ahead.decisions, decided.decisions, "{vetter:?}");
        assert_eq!(ahead.gone, decided.gone, "{vetter:?}");
        assert_eq!(ahead.not_listed, decided.not_listed, "{vetter:?}");
        assert_eq!(ahead.disagreements, decided.disagreements, "{vetter:?}");
    }
    // S-3 was never decided: open; both gone candidates were.
    let all = l.decided(&cat, None).unwrap();
    assert_eq!(all.decisions[2], Decision::Open);
    assert_eq!(all.gone.len(), 2);
    assert_eq!(l.candidates_not_in(&cat).unwrap(), ["gone-1", "gone-2"]);
}

#[test]
fn the_unlisted_candidates_kept_are_those_found_anew() {
    let p = temp("unlisted");
    let mut l = Ledger::open(&p).unwrap();
    let text = |ids: &[&str]| {
        let mut t = String::from("star,candidate,period,epoch,depth_ppm,duration_h\n");
        for (i, id) in ids.iter().enumerate() {
            t += &format!("S,{id},{}.5,100,500,2\n", i + 3);
        }
        t
    };
    // Two releases of one survey, and the same ids in another order.
    let one = crate::catalogue::Catalogue::from_text("r1.csv", &text(&["a-1", "a-2", "b-1"]));
    let two = crate::catalogue::Catalogue::from_text("r2.csv", &text(&["a-1", "c-1", "c-2"]));
    let turned = crate::catalogue::Catalogue::from_text("r3.csv", &text(&["b-1", "a-2", "a-1"]));
    let names = ["a-1", "a-2", "b-1", "c-1", "c-2", "d-1", "b-1 ", "A-1"];
    // What the ledger's decisions say, asked of every decision.
    let anew = |l: &Ledger, cat: &crate::catalogue::Catalogue| {
        let mut all: Vec<String> = l
            .history(None)
            .unwrap()
            .into_iter()
            .map(|e| e.candidate)
            .filter(|c| cat.find_candidate(c).is_none())
            .collect();
        all.sort_unstable();
        all.dedup();
        all
    };
    let mut rng = crate::demo::Rng::new(11);
    let kept = |l: &Ledger| -> i64 {
        l.conn
            .query_row("SELECT COUNT(*) FROM unlisted", [], |r| r.get(0))
            .unwrap_or(0)
    };
    for round in 0..40 {
        for _ in 0..rng.below(4) {
            let c = names[rng.below(names.len() as u64) as usize];
            l.record(&on_s(c, "ann", Decision::Kept)).unwrap();
        }
        for cat in [&one, &two, &turned] {
            assert_eq!(
                l.candidates_not_in(cat).unwrap(),
                anew(&l, cat),
                "round {round}, {}",
                cat.source
            );
        }
        // Each catalogue's list is kept, the one in another order apart.
        assert_eq!(kept(&l), 3);
    }
    // A list that cannot be read as written is found anew.
    l.conn
        .execute("UPDATE unlisted SET candidates = 'not a list'", [])
        .unwrap();
    assert_eq!(l.candidates_not_in(&one).unwrap(), anew(&l, &one));
}

/// Where vetters disagree, from every entry: each vetter's latest entry per
/// candidate, kept where two differ, sorted by vetter.
fn disagreements_by_hand(l: &Ledger) -> BTreeMap<String, Vec<Entry>> {
    let mut latest: BTreeMap<(String, String), Entry> = BTreeMap::new();
    for e in l.history(None).unwrap() {
        latest.insert((e.candidate.clone(), e.vetter.to_string()), e);
    }
    let mut by: BTreeMap<String, Vec<Entry>> = BTreeMap::new();
    for ((c, _), e) in latest {
        by.entry(c).or_default().push(e);
    }
    by.retain(|_, v| v.iter().any(|e| e.decision != v[0].decision));
    by
}

#[test]
fn where_vetters_disagree_is_the_same_from_either_read() {
    let p = temp("disagree");
    let mut l = Ledger::open(&p).unwrap();
    let cat = three_on_s();
    let names = ["S-1", "S-2", "S-3", "gone-1", "gone-2"];
    let vetters = ["ann", "bob", "cy"];
    let decisions = FIVE_DECISIONS;
    let mut rng = crate::demo::Rng::new(5);
    let pick = |rng: &mut crate::demo::Rng, n: usize| rng.below(n as u64) as usize;
    for round in 0..30 {
        let batch: Vec<NewDecision> = (0..pick(&mut rng, 6))
            .map(|_| {
                let (c, v, d) = (pick(&mut rng, 5), pick(&mut rng, 3), pick(&mut rng, 5));
                on_s(names[c], vetters[v], decisions[d])
            })
            .collect();
        l.record_all(&batch).unwrap();
        let want = disagreements_by_hand(&l);
        assert_eq!(l.disagreements().unwrap(), want, "round {round}");
        for vetter in [None, Some("bob")] {
            let decided = l.decided(&cat, vetter).unwrap();
            assert_eq!(decided.disagreements, want, "round {round}, {vetter:?}");
        }
    }
    // Many at once: their entries are read in one pass, not one by one.
    let many: Vec<String> = (0..3000).map(|i| format!("M-{i}")).collect();
    let batch: Vec<NewDecision> = many
        .iter()
        .flat_map(|c| {
            [
                on_s(c, "ann", Decision::Kept),
                on_s(c, "bob", Decision::Rejected(Reason::Blend)),
            ]
        })
        .collect();
    l.record_all(&batch).unwrap();
    let want = disagreements_by_hand(&l);
    assert!(want.len() > 3000);
    assert_eq!(l.disagreements().unwrap(), want);
    assert_eq!(l.decided(&cat, None).unwrap().disagreements, want);
}

#[test]
fn the_stamps_are_those_of_each_candidates_latest_entry() {
    let p = temp("stamps");
    let mut l = Ledger::open(&p).unwrap();
    let cat = crate::catalogue::Catalogue::from_text(
        "invented.csv",
        "star,candidate,period,epoch,depth_ppm,duration_h\n\
         S,S-1,3.5,100,500,2\nS,S-2,5.5,100,500,2\nS,S-3,7.5,100,500,2\nS,S-4,9.5,100,500,2\n",
    );
    let names = ["S-1", "S-2", "S-3", "gone-1"];
    let notes = [None, Some(""), Some("odd-even at 2σ"), Some("ask bob")];
    let mut rng = crate::demo::Rng::new(3);
    let pick = |rng: &mut crate::demo::Rng, n: usize| rng.below(n as u64) as usize;
    for _ in 0..80 {
        l.record(&NewDecision {
            note: notes[pick(&mut rng, 4)],
            ..on_s(
                names[pick(&mut rng, 4)],
                ["ann", "bob"][pick(&mut rng, 2)],
                Decision::Kept,
            )
        })
        .unwrap();
    }
    for vetter in [None, Some("ann"), Some("bob"), Some("eve")] {
        let latest = l.latest(vetter).unwrap();
        let (decided, stamps) = l.decided_with_stamps(&cat, vetter).unwrap();
        assert_eq!(
            decided.decisions,
            l.decided(&cat, vetter).unwrap().decisions
        );
        for c in 0..cat.len() as crate::catalogue::CandidateId {
            let want = latest.get(cat.candidate_id(c)).map(|e| Stamp {
                vetter: &e.vetter,
                decided_at: &e.decided_at,
                note: e.note.as_deref(),
            });
            assert_eq!(stamps.get(c), want, "{vetter:?} {}", cat.candidate_id(c));
        }
        // S-4 was never decided.
        assert_eq!(stamps.get(3), None);
        // The same from a scan made ahead of the catalogue.
        let (ahead, ahead_stamps) = l
            .decided_ahead(&cat, vetter, l.read_ahead().unwrap(), true)
            .unwrap();
        assert_eq!(ahead.decisions, decided.decisions);
        for c in 0..cat.len() as crate::catalogue::CandidateId {
            assert_eq!(ahead_stamps.get(c), stamps.get(c));
        }
    }
}

#[test]
fn the_tally_counts_what_the_history_holds() {
    let p = temp("tally");
    let mut l = Ledger::open(&p).unwrap();
    let mut rng = crate::demo::Rng::new(9);
    let pick = |rng: &mut crate::demo::Rng, n: usize| rng.below(n as u64) as usize;
    let decisions = [
        Decision::Kept,
        Decision::Parked,
        Decision::Open,
        Decision::Rejected(Reason::Artefact),
    ];
    let mut ids = Vec::new();
    for _ in 0..150 {
        let who = ["ann", "bob", "cy"][pick(&mut rng, 3)];
        let c = ["S-1", "S-2", "S-3"][pick(&mut rng, 3)];
        // One row in five undoes an earlier one (an undo may be undone).
        let undoes =
            (pick(&mut rng, 5) == 0 && !ids.is_empty()).then(|| ids[pick(&mut rng, ids.len())]);
        let d = NewDecision {
            undoes,
            ..on_s(c, who, decisions[pick(&mut rng, 4)])
        };
        ids.push(l.record(&d).unwrap());
    }
    // By hand: an undo row is an undo; a row undone is no decision.
    let h = l.history(None).unwrap();
    let undone: HashSet<i64> = h.iter().filter_map(|e| e.undoes).collect();
    let mut want: BTreeMap<String, BTreeMap<&str, u64>> = BTreeMap::new();
    for e in &h {
        let kind = match (e.undoes, undone.contains(&e.id)) {
            (Some(_), _) => "undo",
            (None, true) => continue,
            (None, false) => e.decision.name(),
        };
        *want
            .entry(e.vetter.to_string())
            .or_default()
            .entry(kind)
            .or_default() += 1;
    }
    let t = l.tally().unwrap();
    assert_eq!(t.rows, 150);
    assert_eq!(t.per_vetter, want);
    assert!(want.values().any(|k| k.contains_key("undo")));
}
