//! Live odds: the incremental state always equals a from-scratch computation,
//! counts equal the per-candidate verdicts, and a rejection moves siblings to
//! the smaller system's odds.

mod common;

use common::{fixture, load_text, starsift, stderr, stdout};
use proptest::prelude::*;
use starsift::catalogue::{CandidateId, Catalogue};
use starsift::checks::{StarLink, Tie};
use starsift::decision::{Decision, Reason};
use starsift::flags::{ALL_FLAGS, FlagSet};
use starsift::odds::{ALL_VERDICTS, BoostMode, Live, Model, Status, Verdict, VerdictCounts};

/// An invented catalogue: `sizes[i]` candidates on star i, optional fpp.
fn catalogue(sizes: &[usize], fpp: Option<&[f64]>) -> Catalogue {
    let mut text = String::from("star,candidate,period_d,epoch,depth_ppm,duration_h,fpp\n");
    let mut n = 0;
    for (s, &k) in sizes.iter().enumerate() {
        for j in 0..k {
            let p = fpp.map_or(String::new(), |f| f[n % f.len()].to_string());
            text.push_str(&format!("ZS{s},ZS{s}-{j},{}.5,100.0,500,2.0,{p}\n", j + 1));
            n += 1;
        }
    }
    load_text(&text)
}

fn tally(live: &Live, n: usize) -> VerdictCounts {
    let mut c = VerdictCounts::default();
    for i in 0..n as CandidateId {
        match live.verdict(i) {
            Verdict::Validated => c.validated += 1,
            Verdict::Likely => c.likely += 1,
            Verdict::Unlikely => c.unlikely += 1,
            Verdict::Rejected => c.rejected += 1,
        }
    }
    c
}

fn decision(code: u8) -> Decision {
    match code % 5 {
        0 => Decision::Open,
        1 => Decision::Kept,
        2 => Decision::Parked,
        3 => Decision::Rejected(Reason::EclipsingBinary),
        _ => Decision::Rejected(Reason::Duplicate),
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]

    #[test]
    fn incremental_equals_from_scratch(
        sizes in proptest::collection::vec(1usize..7, 1..40),
        fpp in proptest::option::of(proptest::collection::vec(0.0f64..1.0, 1..9)),
        extra_targets in 0u64..5000,
        f in 0.02f64..0.6,
        mode in 0u8..3,
        threshold in prop_oneof![Just(100.0), 1.0f64..5000.0],
        steps in proptest::collection::vec((0usize..1000, 0u8..5, proptest::option::of(any::<u16>())), 1..60),
        ties in proptest::collection::vec((0usize..1000, 0usize..1000), 0..6),
    ) {
        let cat = catalogue(&sizes, fpp.as_deref());
        let model = Model {
            targets: Some(cat.star_count() as u64 + extra_targets),
            fp_fraction: f,
            mode: match mode { 0 => BoostMode::Catalogue, 1 => BoostMode::System, _ => BoostMode::Fixed(vec![(2, 25.0), (3, 100.0)]) },
            threshold,
            ..Model::default()
        };
        let mut live = Live::new(&cat, model).unwrap();
        // Star ids of one star (docs/science.md §3.4), both ways round, as
        // `checks::links_of` gives them: a rejection as a binary at one
        // holds the other's candidates.
        let stars = cat.star_count();
        let ties: Vec<(u32, u32)> = ties
            .into_iter()
            .map(|(a, b)| ((a % stars) as u32, (b % stars) as u32))
            .filter(|(a, b)| a != b)
            .collect();
        let links: Vec<StarLink> = ties
            .iter()
            .flat_map(|&(a, b)| [(a, b), (b, a)])
            .map(|(star, other)| StarLink { star, other, tie: Tie::Place(1.0) })
            .collect();
        let asked: Vec<u32> = ties.iter().flat_map(|&(a, b)| [a, b]).collect();
        live.add_links(&asked, links);
        for (pick, code, flags) in steps {
            let c = (pick % cat.len()) as CandidateId;
            live.set_decision(c, decision(code));
            if let Some(bits) = flags {
                let set: FlagSet = ALL_FLAGS.iter().enumerate().filter(|(i, _)| bits & (1 << i) != 0).map(|(_, f)| *f).collect();
                live.set_flags(c, set);
            }
            let fresh = live.rebuilt(&cat).unwrap();
            prop_assert!(live.same_odds_state(&fresh));
            // A star tied to one with a candidate rejected as a binary
            // counts none of its own.
            for &(a, b) in &ties {
                for (s, o) in [(a, b), (b, a)] {
                    let binary = cat.members(o).iter().any(|&m| live.decision(m) == Decision::Rejected(Reason::EclipsingBinary));
                    if binary {
                        for &m in cat.members(s) {
                            prop_assert_ne!(live.status(m), Status::Counted);
                        }
                    }
                }
            }
            prop_assert_eq!(live.counts(), tally(&live, cat.len()));
            let total: usize = ALL_VERDICTS.iter().map(|v| live.counts().get(*v)).sum();
            prop_assert_eq!(total, cat.len());
            for i in 0..cat.len() as CandidateId {
                prop_assert_eq!(live.odds(i), fresh.odds(i));
                if let Some(o) = live.odds(i) {
                    prop_assert!(o.is_finite() && o > 0.0);
                }
            }
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]

    /// The state built at once (candidates read in file order, the stars
    /// with a member in a signal group one by one) equals the state reached
    /// one decision and one flag at a time (star by star), with signal
    /// groups that join candidates of different stars.
    #[test]
    fn built_at_once_equals_built_one_change_at_a_time(
        sizes in proptest::collection::vec(1usize..6, 1..40),
        links in proptest::collection::vec((0usize..1000, 0usize..1000, 0u8..3), 0..25),
        changes in proptest::collection::vec((0u8..5, proptest::option::of(any::<u16>())), 1..200),
        f in 0.02f64..0.6,
    ) {
        use starsift::checks::SignalGroups;
        use starsift::flags::Flag;
        let cat = catalogue(&sizes, None);
        let n = cat.len();
        let kinds = [Flag::NearTwin, Flag::Harmonic, Flag::HalfPhase];
        let links: Vec<(CandidateId, CandidateId, Flag)> = links
            .iter()
            .map(|&(a, b, k)| ((a % n) as CandidateId, (b % n) as CandidateId, kinds[k as usize]))
            .filter(|l| l.0 != l.1)
            .collect();
        let groups = SignalGroups::from_links(&cat, &links);
        let model = Model {
            targets: Some(cat.star_count() as u64 + 500),
            fp_fraction: f,
            ..Model::default()
        };
        let flag_set = |bits: Option<u16>| -> FlagSet {
            ALL_FLAGS.iter().enumerate().filter(|(i, _)| bits.is_some_and(|b| b & (1 << i) != 0)).map(|(_, f)| *f).collect()
        };
        let decisions: Vec<Decision> = (0..n).map(|c| decision(changes[c % changes.len()].0)).collect();
        let flags: Vec<FlagSet> = (0..n).map(|c| flag_set(changes[c % changes.len()].1)).collect();
        let at_once = Live::with_state(&cat, model.clone(), flags.clone(), groups.clone(), decisions.clone()).unwrap();
        let mut stepwise = Live::with_state(&cat, model, vec![FlagSet::default(); n], groups, vec![Decision::Open; n]).unwrap();
        for c in 0..n {
            stepwise.set_flags(c as CandidateId, flags[c]);
            stepwise.set_decision(c as CandidateId, decisions[c]);
        }
        prop_assert!(at_once.same_odds_state(&stepwise));
        for c in 0..n as CandidateId {
            prop_assert_eq!(at_once.verdict(c), stepwise.verdict(c));
            prop_assert_eq!(at_once.odds(c), stepwise.odds(c));
            prop_assert_eq!(at_once.status(c), stepwise.status(c));
        }
    }
}

#[test]
fn a_copy_on_another_star_follows_every_decision_on_its_signal() {
    // Two stars of three candidates; one signal seen on both (a near twin,
    // one group), so only one of the two may ever be counted.
    use starsift::checks::SignalGroups;
    use starsift::flags::Flag;
    use starsift::odds::Status;
    let cat = catalogue(&[3, 3], None);
    let n = cat.len();
    let id = |s: &str| cat.find_candidate(s).unwrap();
    let pair = [id("ZS0-0"), id("ZS1-0")];
    let groups = SignalGroups::from_links(&cat, &[(pair[0], pair[1], Flag::NearTwin)]);
    let model = Model {
        targets: Some(1000),
        ..Model::default()
    };
    let mut live = Live::with_state(
        &cat,
        model,
        vec![FlagSet::default(); n],
        groups,
        vec![Decision::Open; n],
    )
    .unwrap();
    let counted = |live: &Live| {
        pair.iter()
            .filter(|&&c| live.status(c) == Status::Counted)
            .count()
    };
    assert_eq!(counted(&live), 1);
    let rep = *pair
        .iter()
        .find(|&&c| live.status(c) == Status::Counted)
        .unwrap();
    let copy = pair.into_iter().find(|&c| c != rep).unwrap();
    // The representative rejected as a copy: the other stands for the
    // signal at once, counted on its own star.
    live.set_decision(rep, Decision::Rejected(Reason::Duplicate));
    assert_eq!(live.status(copy), Status::Counted);
    assert!(live.same_odds_state(&live.rebuilt(&cat).unwrap()));
    // A decision elsewhere on the copy's star, then the representative
    // reopened: the signal is counted once, never twice.
    let sibling = cat
        .members(cat.star_of(copy))
        .iter()
        .copied()
        .find(|&m| m != copy)
        .unwrap();
    live.set_decision(sibling, Decision::Kept);
    live.set_decision(rep, Decision::Open);
    assert_eq!(counted(&live), 1);
    assert_eq!(live.status(copy), Status::Held);
    assert!(live.same_odds_state(&live.rebuilt(&cat).unwrap()));
}

#[test]
fn rejecting_one_of_three_gives_siblings_the_two_candidate_odds() {
    let cat = starsift::demo::catalogue().unwrap();
    let model = Model {
        targets: Some(starsift::demo::DEMO_TARGETS),
        ..Model::default()
    };
    let mut live = Live::new(&cat, model).unwrap();
    let star = (0..cat.star_count() as u32)
        .find(|&s| cat.members(s).len() == 3)
        .unwrap();
    let m = cat.members(star).to_vec();
    let before = live.odds(m[1]).unwrap();
    // Rejected as an artefact (not a false positive of the star: the
    // siblings count on, one k lower).
    let what_if = live.what_if_rejected(m[0], Reason::Artefact);
    assert_eq!(what_if.len(), 2);
    live.set_decision(m[0], Decision::Rejected(Reason::Artefact));
    assert_eq!(live.k(m[1]), 2);
    let after = live.odds(m[1]).unwrap();
    assert!(after < before, "{after} < {before}");
    // The siblings now have exactly the odds of a 2-candidate star.
    let two = cat.members(
        (0..cat.star_count() as u32)
            .find(|&s| cat.members(s).len() == 2)
            .unwrap(),
    )[0];
    assert_eq!(live.odds(two), Some(after));
    // And the what-if said so beforehand.
    for (s, k, o) in what_if {
        assert_eq!(k, 2);
        assert_eq!(live.odds(s), Some(o));
    }
    assert_eq!(live.verdict(m[0]), Verdict::Rejected);
    assert_eq!(live.odds(m[0]), None);
    // Reopening restores everything.
    live.set_decision(m[0], Decision::Open);
    assert_eq!(live.odds(m[1]), Some(before));
    // Rejected as an eclipsing binary, it makes its star one known to host
    // a false positive: the siblings are held back at their prior odds
    // (9:1 with f = 0.1), and the what-if says no sibling stays counted.
    assert!(
        live.what_if_rejected(m[0], Reason::EclipsingBinary)
            .is_empty()
    );
    live.set_decision(m[0], Decision::Rejected(Reason::EclipsingBinary));
    for &s in &m[1..] {
        assert_eq!(live.status(s), Status::Held);
        assert!((live.odds(s).unwrap() - 9.0).abs() < 1e-9);
        assert_eq!(live.verdict(s), Verdict::Likely);
        assert!(matches!(
            live.hold(s),
            Some(starsift::odds::Hold::Sibling { fp, reason: Some(Reason::EclipsingBinary), .. }) if fp == m[0]
        ));
    }
    assert!(live.same_odds_state(&live.rebuilt(&cat).unwrap()));
    live.set_decision(m[0], Decision::Open);
    assert_eq!(live.odds(m[1]), Some(before));
}

#[test]
fn fpp_column_sets_the_prior() {
    let cat = catalogue(&[1, 2], Some(&[0.5, 0.01, 0.2]));
    let live = Live::new(
        &cat,
        Model {
            targets: Some(1000),
            ..Model::default()
        },
    )
    .unwrap();
    assert_eq!(live.prior(0), 0.5);
    assert_eq!(live.odds(0), Some(1.0)); // single: B = 1, (1 - 0.5)/0.5
    let b = live.boost(1).unwrap();
    assert!((live.odds(1).unwrap() - b * 0.99 / 0.01).abs() < 1e-6 * b * 99.0);
}

#[test]
fn odds_command_csv_and_refusals() {
    let o = starsift(&["odds", "--format", "csv"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let s = stdout(&o);
    let mut lines = s.lines();
    assert_eq!(
        lines.next(),
        Some(
            "star,candidate,k,prior,boost,odds,probability,verdict,decision,flags,counted,held_back,holds_to_f"
        )
    );
    assert_eq!(lines.count(), 444);
    // No N anywhere: refused with a suggestion, never an invented N.
    let o = starsift(&["odds", fixture("good.csv").to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("--targets") && stderr(&o).contains("fixed"),
        "{}",
        stderr(&o)
    );
    let o = starsift(&[
        "odds",
        fixture("good.csv").to_str().unwrap(),
        "--boost",
        "fixed:2=25,3=100",
        "--format",
        "csv",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(
        stdout(&o).contains("QX0001,QX0001-a,3,0.1,100,900,0.9988901220865705,validated"),
        "{}",
        stdout(&o)
    );
    let o = starsift(&[
        "odds",
        fixture("good.csv").to_str().unwrap(),
        "--targets",
        "2",
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("below the 3 stars"), "{}", stderr(&o));
    let o = starsift(&["odds", "--fp-fraction", "1.2"]);
    assert_eq!(o.status.code(), Some(2));
    // The table ends with the model and the statement.
    let o = starsift(&["odds"]);
    let s = stdout(&o);
    assert!(s.contains("N = 52000 targets searched, f = 0.1"), "{s}");
    assert!(s.contains("Statistical validation is not confirmation."));
    let o = starsift(&["odds", "--format", "json"]);
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(v["model"]["targets_searched"], 52000);
    assert_eq!(v["candidates"].as_array().unwrap().len(), 444);
    assert!(
        v["model"]["statement"]
            .as_str()
            .unwrap()
            .contains("not confirmation")
    );
}
