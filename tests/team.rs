//! A team's ledger: where vetters disagree whether a candidate is a false
//! positive (one rejected it as an eclipsing binary, a blend or a
//! stellar-size companion; the decision in force does not), its star is
//! held back until they agree (docs/science.md §1.1), in every command and
//! every vetter's view alike. Invented catalogues.

mod common;

use common::{HEAD, agreed, background, reject, starsift, stderr, stdout, verdicts, written};

/// A clean trio (periods far from any alias or unstable ratio) and a clean
/// pair beside the background.
const ROWS: &str = "\
T,T-1,4.1,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772\n\
T,T-2,9.7,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772\n\
T,T-3,21.9,0.00001,102.0,0.001,640,4.7,26,0.3,1,1,5772\n\
P,P-1,4.4,0.00001,100.3,0.001,700,3.0,30,0.3,1,1,5772\n\
P,P-2,10.4,0.00001,101.3,0.001,650,3.6,28,0.3,1,1,5772\n";

/// Records in the ledger beside catalogue `c` that `vetter` decided
/// `decision` (without a reason) on `candidate`.
fn decide(c: &str, candidate: &str, decision: &str, vetter: &str) {
    let o = starsift(&[
        "decide",
        c,
        "--candidate",
        candidate,
        "--decision",
        decision,
        "--vetter",
        vetter,
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
}

fn keep(c: &str, candidate: &str, vetter: &str) {
    decide(c, candidate, "kept", vetter);
}

#[test]
fn a_rejection_as_a_false_positive_that_another_vetter_overrode_holds_the_star() {
    let cat = written("team_dispute", &format!("{HEAD}{}{ROWS}", background()));
    let c = cat.to_str().unwrap();
    let odds = agreed(c);
    for s in ["T-1", "T-2", "T-3", "P-1", "P-2"] {
        assert_eq!(odds[s], "validated", "{s}");
    }
    // Ann calls T-2 an eclipsing binary; Bob keeps it after her. The latest
    // decision is Bob's, but Ann's call stands as evidence: the trio is
    // held back at its prior odds, in the team's view and in each vetter's.
    reject(c, "T-2", "eclipsing-binary", "ann");
    keep(c, "T-2", "bob");
    let team = agreed(c);
    for s in ["T-1", "T-2", "T-3"] {
        assert_eq!(team[s], "likely", "{s}");
    }
    assert_eq!(team["P-1"], "validated");
    let bob = verdicts(&["odds", c, "--vetter", "bob", "--format", "csv"]);
    assert_eq!(bob, team);
    let ann = verdicts(&["odds", c, "--vetter", "ann", "--format", "csv"]);
    assert_eq!(ann["T-2"], "rejected");
    assert_eq!(ann["T-1"], "likely");
    // Said where it is held, and counted in the cleaning line.
    let table = stdout(&starsift(&["odds", c]));
    assert!(
        table.contains(
            "vetters disagree whether T-2 is a false positive (rejected as \
             eclipsing-binary by ann on "
        ) && table.contains("; bob kept): held until they agree")
            && table.contains("3 on a star where vetters disagree on a false positive"),
        "{table}"
    );
    // Ann rejects it again, as an artefact: no false positive is named,
    // and as her decision is the latest, T-2 is out and the pair counts.
    reject(c, "T-2", "artefact", "ann");
    let now = agreed(c);
    assert_eq!(now["T-2"], "rejected");
    assert_eq!(now["T-1"], "validated");
    // Both keep it: they agree, and the trio counts again.
    keep(c, "T-2", "ann");
    let now = agreed(c);
    for s in ["T-1", "T-2", "T-3"] {
        assert_eq!(now[s], "validated", "{s}");
    }
    // A blend against a park is a dispute too.
    reject(c, "T-3", "blend", "ann");
    decide(c, "T-3", "parked", "bob");
    let now = agreed(c);
    for s in ["T-1", "T-2", "T-3"] {
        assert_eq!(now[s], "likely", "{s}");
    }
}

#[test]
fn a_disputed_candidate_a_new_release_dropped_still_holds_its_star() {
    let cat = written(
        "team_dispute_gone",
        &format!("{HEAD}{}{ROWS}", background()),
    );
    let c = cat.to_str().unwrap();
    reject(c, "T-2", "eclipsing-binary", "ann");
    keep(c, "T-2", "bob");
    // The next release no longer lists T-2; its star is still there.
    let without: String = format!("{HEAD}{}{ROWS}", background())
        .lines()
        .filter(|l| !l.starts_with("T,T-2,"))
        .map(|l| format!("{l}\n"))
        .collect();
    std::fs::write(&cat, without).unwrap();
    for view in [&[][..], &["--vetter", "bob"], &["--vetter", "ann"]] {
        let mut args = vec!["odds", c, "--format", "csv"];
        args.extend(view);
        let v = verdicts(&args);
        assert_eq!(v["T-1"], "likely", "{view:?}");
        assert_eq!(v["T-3"], "likely", "{view:?}");
        assert_eq!(v["P-1"], "validated", "{view:?}");
    }
    let table = stdout(&starsift(&["odds", c]));
    assert!(
        table.contains("T-2, no longer in the catalogue, rejected as eclipsing-binary by ann"),
        "{table}"
    );
}

#[test]
fn another_vetters_rejection_as_a_false_positive_holds_the_star_in_every_view() {
    let cat = written("team_other_view", &format!("{HEAD}{}{ROWS}", background()));
    let c = cat.to_str().unwrap();
    // Only Bob has looked at T-2, and calls it a blend; Ann has decided on
    // another candidate only.
    reject(c, "T-2", "blend", "bob");
    keep(c, "P-1", "ann");
    let ann = verdicts(&["odds", c, "--vetter", "ann", "--format", "csv"]);
    for s in ["T-1", "T-2", "T-3"] {
        assert_eq!(ann[s], "likely", "{s}");
    }
    assert_eq!(ann["P-1"], "validated");
    let export = verdicts(&["export", c, "--vetter", "ann", "--format", "csv"]);
    assert_eq!(export, ann);
    // A vetter the ledger has never seen: the same.
    let new = verdicts(&["odds", c, "--vetter", "cyd", "--format", "csv"]);
    assert_eq!(new, ann);
    // In the team's view and Bob's, T-2 is rejected and its siblings held.
    for view in [&[][..], &["--vetter", "bob"]] {
        let mut args = vec!["odds", c, "--format", "csv"];
        args.extend(view);
        let v = verdicts(&args);
        assert_eq!(v["T-2"], "rejected", "{view:?}");
        assert_eq!(v["T-1"], "likely", "{view:?}");
    }
}

#[test]
fn a_disputed_rejection_holds_the_other_ids_of_its_star_too() {
    // Invented: one host under two catalogues' ids (a candidate family split
    // over `TIC 778` and `Gaia 4411`, docs/science.md §3.4). Ann rejects
    // the family's third member as an eclipsing binary at one id; Bob
    // keeps it. The planets at the other id are held, as a rejection
    // holds them.
    let rows = "\
TIC 778,TOI-902.01,4.9,0.00001,100.9,0.001,700,3.0,30,0.3,1,1,5772\n\
TIC 778,TOI-902.02,11.7,0.00001,101.9,0.001,650,3.6,28,0.3,1,1,5772\n\
Gaia 4411,TOI-902.03,2.7,0.00001,101.3,0.001,900,2.0,30,0.3,1,1,5772\n";
    let cat = written("team_dispute_ids", &format!("{HEAD}{}{rows}", background()));
    let c = cat.to_str().unwrap();
    assert_eq!(agreed(c)["TOI-902.01"], "validated");
    reject(c, "TOI-902.03", "eclipsing-binary", "ann");
    keep(c, "TOI-902.03", "bob");
    let v = agreed(c);
    for s in ["TOI-902.01", "TOI-902.02", "TOI-902.03"] {
        assert_eq!(v[s], "likely", "{s}");
    }
    let table = stdout(&starsift(&["odds", c]));
    assert!(
        table.contains("vetters disagree whether TOI-902.03, on star Gaia 4411 ("),
        "{table}"
    );
}
