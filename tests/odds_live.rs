//! Live odds: the incremental state always equals a from-scratch computation,
//! counts equal the per-candidate verdicts, and a rejection moves siblings to
//! the smaller system's odds.

mod common;

use common::{fixture, load_text, starsift, stderr, stdout};
use proptest::prelude::*;
use starsift::catalogue::{CandidateId, Catalogue};
use starsift::decision::{Decision, Reason};
use starsift::flags::{ALL_FLAGS, FlagSet};
use starsift::odds::{ALL_VERDICTS, BoostMode, Live, Model, Verdict, VerdictCounts};

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
        steps in proptest::collection::vec((0usize..1000, 0u8..5, proptest::option::of(0u16..1024)), 1..60),
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
        for (pick, code, flags) in steps {
            let c = (pick % cat.len()) as CandidateId;
            live.set_decision(c, decision(code));
            if let Some(bits) = flags {
                let set: FlagSet = ALL_FLAGS.iter().enumerate().filter(|(i, _)| bits & (1 << i) != 0).map(|(_, f)| *f).collect();
                live.set_flags(c, set);
            }
            let fresh = live.rebuilt(&cat).unwrap();
            prop_assert!(live.same_odds_state(&fresh));
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
    let what_if = live.what_if_rejected(m[0]);
    assert_eq!(what_if.len(), 2);
    live.set_decision(m[0], Decision::Rejected(Reason::EclipsingBinary));
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
