//! A star known to host a false positive lends its other candidates no
//! multiplicity (docs/science.md §1.1 and §3.5): known from the catalogue
//! (a disposition column, a false-positive flag column, or an fpp of at
//! least 0.5), from a vetter's
//! rejection as an eclipsing binary, a blend or a stellar-size companion, or
//! from a flag beyond doubt (`secondary`, `big-radius`) on the candidate
//! that stands for its signal. Invented catalogues; every command and the
//! browser build the same `Live`.

mod common;

use common::{
    HEAD, agreed, background, catalogue, live_of, load_text, reject, scratch, starsift, stderr,
    stdout, verdicts, written,
};
use starsift::catalogue::{CandidateId, Catalogue};
use starsift::checks::{CheckSettings, SignalGroups};
use starsift::decision::{Decision, Reason};
use starsift::flags::{Flag, FlagSet};
use starsift::odds::{Hold, Live, Model, Status, Verdict};

/// Clean systems of two and three (periods far from any alias or unstable
/// ratio), each with a disposition and an fpp cell.
const ROWS: &str = "\
OK,OK-1,4.1,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772,CANDIDATE,\n\
OK,OK-2,9.7,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772,CONFIRMED,\n\
SIB,SIB-1,4.3,0.00001,100.4,0.001,700,3.0,30,0.3,1,1,5772,CANDIDATE,\n\
SIB,SIB-2,10.1,0.00001,101.4,0.001,650,3.6,28,0.3,1,1,5772,FALSE POSITIVE,\n\
TRI,TRI-1,4.5,0.00001,100.5,0.001,700,3.0,30,0.3,1,1,5772,PC,\n\
TRI,TRI-2,10.6,0.00001,101.5,0.001,650,3.6,28,0.3,1,1,5772,PC,\n\
TRI,TRI-3,23.9,0.00001,102.5,0.001,640,4.7,26,0.3,1,1,5772,fp,\n\
FPP,FPP-1,4.7,0.00001,100.7,0.001,700,3.0,30,0.3,1,1,5772,,0.02\n\
FPP,FPP-2,11.2,0.00001,101.7,0.001,650,3.6,28,0.3,1,1,5772,,0.97\n\
T3,T3-1,4.9,0.00001,100.9,0.001,700,3.0,30,0.3,1,1,5772,,\n\
T3,T3-2,11.7,0.00001,101.9,0.001,650,3.6,28,0.3,1,1,5772,,\n\
T3,T3-3,25.1,0.00001,102.9,0.001,640,4.7,26,0.3,1,1,5772,,\n";

fn id(cat: &Catalogue, s: &str) -> CandidateId {
    cat.find_candidate(s).unwrap()
}

#[test]
fn the_catalogues_own_false_positives_lend_no_multiplicity() {
    let cat = load_text(&catalogue("disposition,fpp", ROWS));
    let live = live_of(&cat);
    let c = |s| id(&cat, s);
    // A confirmed planet counts: the clean pair and the clean trio are
    // validated.
    for s in ["OK-1", "OK-2", "T3-1", "T3-2", "T3-3"] {
        assert_eq!(live.verdict(c(s)), Verdict::Validated, "{s}");
    }
    // Marked by the disposition (`FALSE POSITIVE`, `fp`) or by fpp 0.97:
    // flagged, and held back.
    for s in ["SIB-2", "TRI-3", "FPP-2"] {
        assert!(live.flags(c(s)).contains(Flag::KnownFp), "{s}");
        assert_eq!(live.status(c(s)), Status::Held, "{s}");
    }
    // Their siblings are held back with them, at their prior odds: f = 0.1
    // gives 9:1; FPP-1's own fpp 0.02 gives 49:1 (odds = (1 − p)/p), below
    // the 100:1 of `validated`.
    for (s, fp, odds) in [
        ("SIB-1", "SIB-2", 9.0),
        ("TRI-1", "TRI-3", 9.0),
        ("TRI-2", "TRI-3", 9.0),
        ("FPP-1", "FPP-2", 49.0),
    ] {
        assert_eq!(live.status(c(s)), Status::Held, "{s}");
        assert_eq!(live.verdict(c(s)), Verdict::Likely, "{s}");
        assert!((live.odds(c(s)).unwrap() - odds).abs() < 1e-6, "{s}");
        match live.hold(c(s)) {
            Some(Hold::Sibling {
                fp: f,
                reason,
                flags,
            }) => {
                assert_eq!(f, c(fp), "{s}");
                assert_eq!(reason, None);
                assert_eq!(flags, FlagSet::from_iter([Flag::KnownFp]));
            }
            h => panic!("{s}: {h:?}"),
        }
    }
    let line = live.held_line().unwrap();
    assert!(
        line.contains("4 on a star with a known false positive"),
        "{line}"
    );
    // A vetter's rejection says what the member is, over the catalogue:
    // TRI-3 rejected as an artefact marks nothing, and TRI-1 and TRI-2 are
    // a pair again; rejected as a blend, it holds them back once more.
    let mut live = live;
    live.set_decision(c("TRI-3"), Decision::Rejected(Reason::Artefact));
    assert_eq!(live.k(c("TRI-1")), 2);
    assert_eq!(live.verdict(c("TRI-2")), Verdict::Validated);
    assert!(live.same_odds_state(&live.rebuilt(&cat).unwrap()));
    live.set_decision(c("TRI-3"), Decision::Rejected(Reason::Blend));
    assert_eq!(live.status(c("TRI-1")), Status::Held);
    assert!(live.same_odds_state(&live.rebuilt(&cat).unwrap()));
    // The same rows without the two columns: the false positives count, and
    // their siblings were validated (what this rule is for).
    let bare: String = ROWS
        .lines()
        .map(|l| {
            let cells: Vec<&str> = l.split(',').collect();
            format!("{}\n", cells[..cells.len() - 2].join(","))
        })
        .collect();
    let cat = load_text(&format!("{HEAD}{}{bare}", background()));
    let live = live_of(&cat);
    for s in ["SIB-1", "SIB-2", "TRI-1", "TRI-2", "TRI-3"] {
        assert_eq!(live.verdict(id(&cat, s)), Verdict::Validated, "{s}");
    }
}

#[test]
fn an_archive_with_two_disposition_columns_is_read_in_both() {
    // The archive's own column says candidate, its pipeline's says false
    // positive: the candidate is a known false positive.
    let rows = "\
D2,D2-1,4.1,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772,CANDIDATE,CANDIDATE\n\
D2,D2-2,9.7,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772,CANDIDATE,FALSE POSITIVE\n";
    for headers in [
        "koi_disposition,koi_pdisposition",
        // Spelled as a table exported for people might: not a synonym, but
        // a header naming a disposition.
        "TFOPWG Disposition,Pipeline-Disp",
    ] {
        let cat = load_text(&catalogue(headers, rows));
        assert_eq!(cat.disposition_columns().len(), 2, "{headers}");
        let live = live_of(&cat);
        assert!(
            live.flags(id(&cat, "D2-2")).contains(Flag::KnownFp),
            "{headers}"
        );
        assert_eq!(live.status(id(&cat, "D2-1")), Status::Held, "{headers}");
        assert_ne!(live.verdict(id(&cat, "D2-1")), Verdict::Validated);
    }
}

#[test]
fn an_archives_false_positive_flag_columns_are_read() {
    // A table with the archive's 0/1 false-positive flags and no
    // disposition: a set flag is a known false positive.
    let rows = "\
F0,F0-1,4.1,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772,0,0\n\
F0,F0-2,9.7,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772,0,0\n\
F1,F1-1,4.3,0.00001,100.4,0.001,700,3.0,30,0.3,1,1,5772,0,0\n\
F1,F1-2,10.1,0.00001,101.4,0.001,650,3.6,28,0.3,1,1,5772,1,0\n";
    let cat = load_text(&catalogue("koi_fpflag_ss,koi_fpflag_co", rows));
    let live = live_of(&cat);
    assert_eq!(live.verdict(id(&cat, "F0-1")), Verdict::Validated);
    assert!(live.flags(id(&cat, "F1-2")).contains(Flag::KnownFp));
    assert_eq!(live.status(id(&cat, "F1-1")), Status::Held);
    assert_ne!(live.verdict(id(&cat, "F1-1")), Verdict::Validated);
}

#[test]
fn a_surveys_own_yes_no_columns_for_false_positives_are_read() {
    // A survey team's table marks its eclipsing binaries and false
    // positives in a yes/no column of its own naming, as tables and their
    // writers spell a logical value (pandas `True`, FITS and VOTable `T`,
    // 0/1). The marked candidate is a known false positive and its
    // siblings are held back in every command, where before the column
    // was an extra one no check read and the trio was validated.
    let rows = |yes: &str, no: &str| {
        format!(
            "\
Y3,Y3-1,4.1,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772,{yes}\n\
Y3,Y3-2,9.7,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772,{no}\n\
Y3,Y3-3,21.3,0.00001,102.0,0.001,640,4.6,26,0.3,1,1,5772,{no}\n\
N3,N3-1,4.3,0.00001,100.4,0.001,700,3.0,30,0.3,1,1,5772,{no}\n\
N3,N3-2,10.1,0.00001,101.4,0.001,650,3.6,28,0.3,1,1,5772,{no}\n\
N3,N3-3,22.9,0.00001,102.4,0.001,640,4.7,26,0.3,1,1,5772,\n"
        )
    };
    for (i, (header, yes, no)) in [
        ("is_eb", "True", "False"),
        ("EB_flag", "1", "0"),
        ("false_positive", "T", "F"),
        ("isFP", "yes", "no"),
        ("known_fp", "1.0", "0.0"),
        ("likely_beb", "EB", "-"),
    ]
    .into_iter()
    .enumerate()
    {
        let cat = written(
            &format!("yes_no_fp_{i}"),
            &catalogue(header, &rows(yes, no)),
        );
        let c = cat.to_str().unwrap();
        let odds = agreed(c);
        assert_eq!(odds["Y3-1"], "unlikely", "{header}");
        for s in ["Y3-2", "Y3-3"] {
            assert_eq!(odds[s], "likely", "{header} {s}");
        }
        for s in ["N3-1", "N3-2", "N3-3"] {
            assert_eq!(odds[s], "validated", "{header} {s}");
        }
        let o = starsift(&["odds", c, "--format", "csv"]);
        assert!(!stderr(&o).contains("read as neither"), "{}", stderr(&o));
        let s = stdout(&starsift(&["summary", c]));
        assert!(s.contains("false-positive flag"), "{header}: {s}");
    }
    // A host in a binary is no false positive: a `binary` column is not
    // read as one. A value read as neither set nor unset is said.
    let cat = written("yes_no_fp_binary", &catalogue("binary", &rows("1", "0")));
    assert_eq!(agreed(cat.to_str().unwrap())["Y3-1"], "validated");
    // A column named `FP` that holds another quantity (numbers above 1)
    // is no yes or no: said, and not read as flags.
    let cat = written("yes_no_fp_other", &catalogue("FP", &rows("98.5", "97")));
    let c = cat.to_str().unwrap();
    assert_eq!(agreed(c)["Y3-1"], "validated");
    let e = stderr(&starsift(&["odds", c, "--format", "csv"]));
    assert!(e.contains("FP holds 2 values read as neither set"), "{e}");
    let cat = written(
        "yes_no_fp_unknown",
        &catalogue("is_eb", &rows("maybe", "0")),
    );
    let c = cat.to_str().unwrap();
    assert_eq!(agreed(c)["Y3-1"], "validated");
    let e = stderr(&starsift(&["odds", c, "--format", "csv"]));
    assert!(
        e.contains("is_eb holds 1 value read as neither set (1, true, yes) nor unset")
            && e.contains("`maybe` (1)"),
        "{e}"
    );
}

#[test]
fn a_copys_flags_do_not_mark_its_star_but_its_representatives_do() {
    // A, B, C on one star; B is A at twice its period (one signal, A
    // stands for it). An alias folded at twice its period shows its own
    // transit at phase 0.5: a `secondary` on B says nothing of the star.
    let rows = "\
AB,AB-1,4.1,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772\n\
AB,AB-2,8.2,0.00002,100.0,0.001,700,3.0,20,0.3,1,1,5772\n\
AB,AB-3,21.3,0.00001,102.0,0.001,640,4.6,26,0.3,1,1,5772\n";
    let cat = load_text(&format!("{HEAD}{}{rows}", background()));
    let (a, b, c) = (id(&cat, "AB-1"), id(&cat, "AB-2"), id(&cat, "AB-3"));
    let groups = SignalGroups::from_links(&cat, &[(a, b, Flag::Harmonic)]);
    let model = Model {
        targets: Some(50_000),
        ..Model::default()
    };
    let with_flags = |on: &[(CandidateId, Flag)]| {
        let mut flags = vec![FlagSet::EMPTY; cat.len()];
        flags[b as usize].insert(Flag::Harmonic);
        for &(x, f) in on {
            flags[x as usize].insert(f);
        }
        Live::with_state(
            &cat,
            model.clone(),
            flags,
            groups.clone(),
            vec![Decision::Open; cat.len()],
        )
        .unwrap()
    };
    let live = with_flags(&[(b, Flag::Secondary)]);
    assert_eq!(live.k(a), 2);
    assert_eq!(live.verdict(a), Verdict::Validated);
    assert_eq!(live.verdict(c), Verdict::Validated);
    // On the candidate that stands for the signal, it is the star's: C is
    // held back.
    let live = with_flags(&[(a, Flag::Secondary)]);
    assert_eq!(live.status(c), Status::Held);
    assert!(matches!(live.hold(c), Some(Hold::Sibling { fp, .. }) if fp == a));
    // `odd-even` (3σ, which planets reach by chance) holds only its own.
    let live = with_flags(&[(c, Flag::OddEven)]);
    assert_eq!(live.status(c), Status::Held);
    assert_eq!(live.verdict(a), Verdict::Likely);
    assert_eq!(live.status(a), Status::Counted);
}

#[test]
fn every_command_holds_the_siblings_of_a_known_false_positive() {
    let cat = written("known_fp_commands", &catalogue("disposition,fpp", ROWS));
    let c = cat.to_str().unwrap();
    let odds = agreed(c);
    for s in [
        "SIB-1", "SIB-2", "TRI-1", "TRI-2", "TRI-3", "FPP-1", "FPP-2",
    ] {
        assert_ne!(odds[s], "validated", "{s}");
    }
    assert_eq!(odds["T3-1"], "validated");
    // The false positives themselves are `unlikely` in every output
    // (docs/science.md §1.1), their siblings `likely` at their prior.
    for s in ["SIB-2", "TRI-3", "FPP-2"] {
        assert_eq!(odds[s], "unlikely", "{s}");
    }
    assert_eq!(odds["SIB-1"], "likely");
    // No word of the test rows is unknown: no warning.
    let o = starsift(&["odds", c, "--format", "csv"]);
    assert!(!stderr(&o).contains("read as neither"), "{}", stderr(&o));
    // The summary says where the dispositions come from.
    let s = stdout(&starsift(&["summary", c]));
    assert!(s.contains("disposition"), "{s}");
    // A vetter's rejection of T3-3 as a blend holds T3-1 and T3-2 back; a
    // later rejection as an artefact (instrumental: nothing of the star)
    // lets them count again, as a pair.
    let decide = |reason: &str| reject(c, "T3-3", reason, "t");
    decide("blend");
    let odds = verdicts(&["odds", c, "--format", "csv"]);
    assert_eq!(odds["T3-1"], "likely");
    assert_eq!(odds["T3-2"], "likely");
    assert_eq!(odds, verdicts(&["export", c, "--format", "csv"]));
    let o = starsift(&["odds", c, "--format", "csv"]);
    assert!(
        stdout(&o).contains("its star hosts a known false positive: T3-3, rejected as blend"),
        "{}",
        stdout(&o)
    );
    decide("artefact");
    let odds = verdicts(&["odds", c, "--format", "csv"]);
    assert_eq!(odds["T3-1"], "validated");
    assert_eq!(odds["T3-2"], "validated");
}

#[test]
fn dispositions_read_as_neither_are_said_in_every_output() {
    // A survey's own words: a warning names them and their rows, on stderr
    // and in the JSON's warnings; the rows are vetted as candidates.
    let rows = "\
W,W-1,4.1,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772,RETRACTED\n\
W,W-2,9.7,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772,retracted\n\
X,X-1,4.3,0.00001,100.4,0.001,700,3.0,30,0.3,1,1,5772,under review\n";
    let dir = scratch("known_fp_unknown_words");
    let cat = dir.join("cat.csv");
    std::fs::write(&cat, catalogue("disposition", rows)).unwrap();
    let c = cat.to_str().unwrap();
    let o = starsift(&["odds", c, "--targets", "50000", "--format", "csv"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let e = stderr(&o);
    assert!(
        e.contains("the catalogue's disposition holds 3 values read as neither")
            && e.contains("(3 rows: `RETRACTED` (1), `retracted` (1), `under review` (1))"),
        "{e}"
    );
    // `checks` says it too, with or without the model's N.
    for extra in [&["--targets", "50000"][..], &[][..]] {
        let mut args = vec!["checks", c, "--format", "csv"];
        args.extend_from_slice(extra);
        let o = starsift(&args);
        assert!(stderr(&o).contains("read as neither"), "{}", stderr(&o));
    }
    let o = starsift(&["odds", c, "--targets", "50000", "--format", "json"]);
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert!(
        v["warnings"]
            .as_array()
            .unwrap()
            .iter()
            .any(|w| w.as_str().unwrap().contains("read as neither")),
        "{v}"
    );
}

#[test]
fn a_false_positive_only_a_skipped_row_names_still_holds_its_star() {
    // Invented rows as archive tables give them. SK-3's fitted values are
    // blank (the row cannot load: no period) but its disposition says
    // FALSE POSITIVE; KD-1 is listed twice, one row per reference, the
    // second calling it a false positive (the loader keeps the first row
    // of an id); KP-2's second row gives fpp 0.93. Each star hosts a known
    // false positive that no loaded row shows: its candidates are held back
    // (docs/science.md §3.5), in every command, with a warning that names
    // the line. UN-3, skipped for the same reason but a candidate, holds
    // nothing.
    let rows = "\
SK,SK-1,4.1,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772,CANDIDATE,\n\
SK,SK-2,9.7,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772,CANDIDATE,\n\
SK,SK-3,,,,,,,,,1,1,5772,FALSE POSITIVE,\n\
KD,KD-1,4.3,0.00001,100.4,0.001,700,3.0,30,0.3,1,1,5772,CANDIDATE,\n\
KD,KD-2,10.1,0.00001,101.4,0.001,650,3.6,28,0.3,1,1,5772,CANDIDATE,\n\
KD,KD-1,4.3,0.00001,100.4,0.001,700,3.0,30,0.3,1,1,5772,FALSE POSITIVE,\n\
KP,KP-1,4.5,0.00001,100.5,0.001,700,3.0,30,0.3,1,1,5772,PC,\n\
KP,KP-2,10.6,0.00001,101.5,0.001,650,3.6,28,0.3,1,1,5772,PC,\n\
KP,KP-2,10.6,0.00001,101.5,0.001,650,3.6,28,0.3,1,1,5772,PC,0.93\n\
UN,UN-1,4.7,0.00001,100.7,0.001,700,3.0,30,0.3,1,1,5772,PC,\n\
UN,UN-2,11.2,0.00001,101.7,0.001,650,3.6,28,0.3,1,1,5772,PC,\n\
UN,UN-3,,,,,,,,,1,1,5772,PC,\n";
    let text = catalogue("disposition,fpp", rows);
    let cat = load_text(&text);
    assert_eq!(cat.skipped.len(), 4);
    let checks = starsift::checks::run(&cat, &CheckSettings::default());
    let live = starsift::session::odds_with(
        &cat,
        Model {
            targets: Some(50_000),
            ..Model::default()
        },
        &checks,
        vec![Decision::Open; cat.len()],
        &[],
        Vec::new(),
    )
    .unwrap();
    for s in ["SK-1", "SK-2", "KD-1", "KD-2", "KP-1", "KP-2"] {
        let c = id(&cat, s);
        assert_eq!(live.status(c), Status::Held, "{s}");
        assert_ne!(live.verdict(c), Verdict::Validated, "{s}");
        assert!(
            matches!(live.hold(c), Some(Hold::UnseenSibling { .. })),
            "{s}: {:?}",
            live.hold(c)
        );
    }
    for s in ["UN-1", "UN-2"] {
        assert_eq!(live.verdict(id(&cat, s)), Verdict::Validated, "{s}");
    }
    // Rebuilt from nothing, the same.
    let again = live.rebuilt(&cat).unwrap();
    for c in 0..cat.len() as CandidateId {
        assert_eq!(again.status(c), live.status(c));
    }
    // Every command: the same verdicts, and the warning naming the lines.
    let file = written("known_fp_skipped_rows", &text);
    let c = file.to_str().unwrap();
    let odds = agreed(c);
    assert_eq!(odds["SK-1"], "likely");
    assert_eq!(odds["UN-1"], "validated");
    let o = starsift(&["odds", c, "--format", "csv"]);
    let e = stderr(&o);
    assert!(
        e.contains("3 stars host a false positive only a skipped row names")
            && e.contains("line ")
            && e.contains("says disposition `FALSE POSITIVE` and was skipped (period_d: missing)")
            && e.contains("says fpp 0.93"),
        "{e}"
    );
    assert!(
        stdout(&o).contains("its star hosts a known false positive: line "),
        "{}",
        stdout(&o)
    );
}

#[test]
fn a_binary_the_ledger_knows_still_holds_its_star_when_a_release_drops_it() {
    // Invented: a vetter rejects GN-3 as an eclipsing binary; the next
    // release of the catalogue (same file) no longer lists GN-3. The
    // ledger still says its star GN hosts a false positive (docs/science.md
    // §1.1): GN-1 and GN-2 stay held back in every command, and say why.
    // Rejected as an artefact instead, GN-3 says nothing of its star.
    let three = "\
GN,GN-1,4.1,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772\n\
GN,GN-2,9.7,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772\n\
GN,GN-3,23.9,0.00001,102.5,0.001,9000,4.7,90,0.3,1,1,5772\n";
    let two: String = three.lines().take(2).map(|l| format!("{l}\n")).collect();
    let with = |rows: &str| format!("{HEAD}{}{rows}", background());
    let cat = written("known_fp_gone", &with(three));
    let c = cat.to_str().unwrap();
    let decide = |reason: &str| reject(c, "GN-3", reason, "ann");
    decide("eclipsing-binary");
    std::fs::write(&cat, with(&two)).unwrap();
    let odds = agreed(c);
    assert_eq!(odds["GN-1"], "likely");
    assert_eq!(odds["GN-2"], "likely");
    let o = starsift(&["odds", c, "--format", "csv"]);
    assert!(
        stdout(&o).contains(
            "its star hosts a known false positive: GN-3, no longer in the catalogue, rejected as eclipsing-binary by ann on "
        ),
        "{}",
        stdout(&o)
    );
    // The vetter's later word on GN-3 (an artefact, decided on the old
    // release) frees the pair.
    std::fs::write(&cat, with(three)).unwrap();
    decide("artefact");
    std::fs::write(&cat, with(&two)).unwrap();
    let odds = agreed(c);
    assert_eq!(odds["GN-1"], "validated");
}

#[test]
fn an_fpp_in_percent_is_read_as_one() {
    // Invented: an archive gives fpp in percent (2 and 75). Read as
    // fractions, 75 would be no probability at all and PCT-2 a candidate
    // like any other; in percent it is more likely a false positive than a
    // planet (docs/science.md §3.5), and PCT-1 is held with it.
    let rows = "\
PCT,PCT-1,4.1,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772,2\n\
PCT,PCT-2,9.7,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772,75\n";
    let cat = load_text(&catalogue("fpp", rows));
    let live = live_of(&cat);
    let (one, two) = (id(&cat, "PCT-1"), id(&cat, "PCT-2"));
    assert!(
        live.flags(two).contains(Flag::KnownFp),
        "{:?}",
        live.flags(two)
    );
    assert_eq!(live.status(one), Status::Held);
    assert_ne!(live.verdict(one), Verdict::Validated);
    assert!(live.input_warnings.is_empty(), "{:?}", live.input_warnings);
}

#[test]
fn a_signal_the_catalogue_calls_no_transit_counts_for_nothing_and_names_nothing() {
    // Invented: TOI-style codes. IS-3 is instrumental (`IS`): before, an
    // unknown word, it counted and made IS a system of three, itself
    // validated. Now it counts for nothing, and says nothing of its star:
    // IS-1 and IS-2 are a pair, as after a vetter's rejection as an
    // artefact (docs/science.md §3.5). The same for a false alarm (`FA`).
    let rows = "\
IS,IS-1,4.1,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772,PC\n\
IS,IS-2,9.7,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772,PC\n\
IS,IS-3,23.9,0.00001,102.5,0.001,640,4.7,26,0.3,1,1,5772,IS\n\
FA,FA-1,4.3,0.00001,100.4,0.001,700,3.0,30,0.3,1,1,5772,PC\n\
FA,FA-2,10.1,0.00001,101.4,0.001,650,3.6,28,0.3,1,1,5772,PC\n\
FA,FA-3,24.7,0.00001,102.9,0.001,640,4.7,26,0.3,1,1,5772,FA\n";
    let cat = load_text(&catalogue("disposition", rows));
    let live = live_of(&cat);
    for (artefact, pair) in [("IS-3", ["IS-1", "IS-2"]), ("FA-3", ["FA-1", "FA-2"])] {
        let a = id(&cat, artefact);
        assert!(live.flags(a).contains(Flag::KnownArtefact), "{artefact}");
        assert!(!live.flags(a).contains(Flag::KnownFp), "{artefact}");
        assert_ne!(live.verdict(a), Verdict::Validated, "{artefact}");
        for s in pair {
            assert_eq!(live.k(id(&cat, s)), 2, "{s}");
            assert_eq!(live.verdict(id(&cat, s)), Verdict::Validated, "{s}");
        }
    }
    // The archive's "not transit-like" flag says the same.
    let rows = rows.replace(",IS\n", ",PC,1\n").replace(",FA\n", ",PC,0\n");
    let rows = rows.replace(",PC\n", ",PC,\n");
    let cat = load_text(&catalogue("disposition,koi_fpflag_nt", &rows));
    let live = live_of(&cat);
    assert!(live.flags(id(&cat, "IS-3")).contains(Flag::KnownArtefact));
    assert_eq!(live.verdict(id(&cat, "IS-1")), Verdict::Validated);
    assert!(live.flags(id(&cat, "FA-3")).is_empty());
}

#[test]
fn follow_up_codes_and_hedged_words_name_a_false_positive() {
    // Invented stars of three, the third dispositioned as follow-up teams
    // and vetters write it: a nearby or background eclipsing binary (`NEB`,
    // `BEB`, codes from memory), a spectroscopic binary (`SB2`), or a
    // doubt (`likely EB`, `PC; possible FP`). Before, each was an unknown
    // word: the binary counted, and all three were validated. Now each is
    // `known-fp` and holds its star (docs/science.md §3.5); a clause that
    // negates the word (`PC (EB ruled out)`) does not.
    let words = [
        "NEB",
        "BEB",
        "SB2",
        "likely EB",
        "PC; possible FP",
        "PC (EB ruled out)",
    ];
    let mut rows = String::new();
    for (i, w) in words.iter().enumerate() {
        let p = 1.0 + 0.01 * i as f64;
        rows.push_str(&format!(
            "W{i},W{i}-1,{:.4},0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772,PC\n\
             W{i},W{i}-2,{:.4},0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772,PC\n\
             W{i},W{i}-3,{:.4},0.00001,102.5,0.001,640,4.7,26,0.3,1,1,5772,{w}\n",
            4.1 * p,
            9.7 * p,
            23.9 * p
        ));
    }
    let cat = load_text(&catalogue("disposition", &rows));
    let live = live_of(&cat);
    for (i, w) in words.iter().enumerate() {
        let c = |j: usize| id(&cat, &format!("W{i}-{j}"));
        if w.contains("ruled out") {
            for j in 1..=3 {
                assert_eq!(live.verdict(c(j)), Verdict::Validated, "{w}");
            }
            continue;
        }
        assert!(live.flags(c(3)).contains(Flag::KnownFp), "{w}");
        for j in 1..=2 {
            assert_eq!(live.status(c(j)), Status::Held, "{w}");
            assert_ne!(live.verdict(c(j)), Verdict::Validated, "{w}");
        }
    }
}

#[test]
fn a_false_positive_probability_under_another_name_is_read() {
    // Invented: a validation tool's output merged into the table, its
    // probability under the tool's own header (`fpp_vespa`), and a nearby
    // star's (`nfpp`). Before, neither header was read: VP-3 (0.97) and
    // NF-3 (0.8 that the signal is a neighbour's) counted, and both
    // triples were validated. An error column (`fpp_err`) is not a
    // probability of its own (docs/science.md §3.5).
    let rows = "\
VP,VP-1,4.1,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772,0.01,,0.9\n\
VP,VP-2,9.7,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772,0.02,,0.9\n\
VP,VP-3,23.9,0.00001,102.5,0.001,640,4.7,26,0.3,1,1,5772,0.97,,0.9\n\
NF,NF-1,4.3,0.00001,100.4,0.001,700,3.0,30,0.3,1,1,5772,0.01,0.001,0.9\n\
NF,NF-2,10.1,0.00001,101.4,0.001,650,3.6,28,0.3,1,1,5772,0.01,0.001,0.9\n\
NF,NF-3,24.7,0.00001,102.9,0.001,640,4.7,26,0.3,1,1,5772,0.01,0.8,0.9\n";
    let cat = load_text(&catalogue("fpp_vespa,nfpp,fpp_err", rows));
    let live = live_of(&cat);
    for star in ["VP", "NF"] {
        let c = |j: usize| id(&cat, &format!("{star}-{j}"));
        assert!(live.flags(c(3)).contains(Flag::KnownFp), "{star}");
        for j in 1..=2 {
            assert_eq!(live.status(c(j)), Status::Held, "{star}-{j}");
            assert_ne!(live.verdict(c(j)), Verdict::Validated, "{star}-{j}");
        }
    }
    // `summary` says which columns are read so, and as what.
    let file = written(
        "fpp_other_names",
        &catalogue("fpp_vespa,nfpp,fpp_err", rows),
    );
    let o = starsift(&["summary", file.to_str().unwrap()]);
    let out = stdout(&o);
    assert!(
        out.contains(
            "read for earlier verdicts: fpp_vespa (false-positive probability), nfpp (false-positive probability)"
        ),
        "{out}"
    );
    // Below one half everywhere, and an error column of 0.9: validated.
    let calm = rows.replace(",0.97,", ",0.03,").replace(",0.8,", ",0.001,");
    let cat = load_text(&catalogue("fpp_vespa,nfpp,fpp_err", &calm));
    let live = live_of(&cat);
    for s in ["VP-1", "VP-3", "NF-1", "NF-3"] {
        assert_eq!(live.verdict(id(&cat, s)), Verdict::Validated, "{s}");
    }
}

#[test]
fn one_star_written_two_ways_is_one_star() {
    // Invented: a table merged from two sources that write one host id
    // differently (`TIC 9100` and `TIC9100`; `9200` through a float column
    // as `9200.0`; `TIC 0009300` zero-padded, and `9300` bare in a table of
    // TIC ids). Before, each spelling was its own star: the binary called
    // a false positive under one spelling held nothing, and the two
    // planets under the other were validated.
    let rows = "\
TIC 9100,A-1,4.1,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772,PC\n\
TIC 9100,A-2,9.7,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772,PC\n\
TIC9100,A-3,23.9,0.00001,102.5,0.001,640,4.7,26,0.3,1,1,5772,FP\n\
9200,B-1,4.3,0.00001,100.4,0.001,700,3.0,30,0.3,1,1,5772,PC\n\
9200,B-2,10.1,0.00001,101.4,0.001,650,3.6,28,0.3,1,1,5772,PC\n\
9200.0,B-3,24.7,0.00001,102.9,0.001,640,4.7,26,0.3,1,1,5772,EB\n\
TIC 0009300,C-1,4.5,0.00001,100.5,0.001,700,3.0,30,0.3,1,1,5772,PC\n\
TIC 0009300,C-2,10.6,0.00001,101.5,0.001,650,3.6,28,0.3,1,1,5772,PC\n\
9300,C-3,25.3,0.00001,102.7,0.001,640,4.7,26,0.3,1,1,5772,FALSE POSITIVE\n";
    let cat = load_text(&catalogue("disposition", rows));
    let live = live_of(&cat);
    for star in ["A", "B", "C"] {
        let c = |j: usize| id(&cat, &format!("{star}-{j}"));
        assert_eq!(cat.star_of(c(1)), cat.star_of(c(3)), "{star}");
        for j in 1..=2 {
            assert_eq!(live.status(c(j)), Status::Held, "{star}-{j}");
            assert_ne!(live.verdict(c(j)), Verdict::Validated, "{star}-{j}");
        }
    }
    // Under its first spelling, and said.
    assert_eq!(cat.star_id(cat.star_of(id(&cat, "A-3"))), "TIC 9100");
    assert!(
        cat.notes
            .iter()
            .any(|n| n.contains("`TIC9100` as `TIC 9100`")),
        "{:?}",
        cat.notes
    );
    // Found by any spelling (a ledger's, a skipped row's).
    assert_eq!(cat.find_star("tic-9100"), cat.find_star("TIC 9100"));
    assert!(cat.find_star("TIC 9100").is_some());
}

#[test]
fn a_binary_listed_twice_and_called_a_false_positive_once_holds_its_star() {
    // Invented: one eclipsing binary listed twice on star D (D-1 and D-2,
    // one ephemeris; D-1, of higher SNR, stands for the signal), the
    // catalogue calling only the copy D-2 a false positive, beside a third
    // signal D-3. Before, the copy's `known-fp` held the copy alone: D-1
    // and D-3 made a pair and were validated. The catalogue's word is on
    // the signal, whichever entry carries it (docs/science.md §3.5). An
    // entry called a false positive *as a duplicate* (U-2) says nothing of
    // the signal: U-1 and U-3 stay a validated pair.
    let rows = "\
D,D-1,4.1,0.00001,100.0,0.001,700,3.0,40,0.3,1,1,5772,PC\n\
D,D-2,4.1,0.00001,100.0,0.001,700,3.0,20,0.3,1,1,5772,FP\n\
D,D-3,23.9,0.00001,102.5,0.001,640,4.7,26,0.3,1,1,5772,PC\n\
U,U-1,4.3,0.00001,100.4,0.001,700,3.0,40,0.3,1,1,5772,PC\n\
U,U-2,4.3,0.00001,100.4,0.001,700,3.0,20,0.3,1,1,5772,FP - duplicate\n\
U,U-3,24.7,0.00001,102.9,0.001,640,4.7,26,0.3,1,1,5772,PC\n";
    let cat = load_text(&catalogue("disposition", rows));
    let live = live_of(&cat);
    let c = |s: &str| id(&cat, s);
    assert!(live.flags(c("D-2")).contains(Flag::NearTwin));
    for s in ["D-1", "D-2", "D-3"] {
        assert_eq!(live.status(c(s)), Status::Held, "{s}");
        assert_ne!(live.verdict(c(s)), Verdict::Validated, "{s}");
    }
    assert!(matches!(live.hold(c("D-3")), Some(Hold::Sibling { fp, .. }) if fp == c("D-2")));
    assert!(live.flags(c("U-2")).contains(Flag::KnownArtefact));
    for s in ["U-1", "U-3"] {
        assert_eq!(live.k(c(s)), 2, "{s}");
        assert_eq!(live.verdict(c(s)), Verdict::Validated, "{s}");
    }
}

#[test]
fn an_fpp_given_as_a_limit_is_read() {
    // Invented: a validation table gives its probabilities as limits
    // (`>0.99`, `<0.001`) or with errors (`0.97±0.01`). Before, such a
    // cell was not a number: the row was skipped, what it said was lost,
    // and its siblings were validated as a pair.
    let rows = "\
LA,LA-1,4.1,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772,<0.001\n\
LA,LA-2,9.7,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772,<0.001\n\
LA,LA-3,23.9,0.00001,102.5,0.001,640,4.7,26,0.3,1,1,5772,>0.99\n\
LB,LB-1,4.3,0.00001,100.4,0.001,700,3.0,30,0.3,1,1,5772,0.002\n\
LB,LB-2,10.1,0.00001,101.4,0.001,650,3.6,28,0.3,1,1,5772,0.002\n\
LB,LB-3,24.7,0.00001,102.9,0.001,640,4.7,26,0.3,1,1,5772,0.97±0.01\n";
    let cat = load_text(&catalogue("fpp", rows));
    assert!(cat.skipped.is_empty(), "{:?}", cat.skipped);
    let live = live_of(&cat);
    for star in ["LA", "LB"] {
        let c = |j: usize| id(&cat, &format!("{star}-{j}"));
        assert!(live.flags(c(3)).contains(Flag::KnownFp), "{star}");
        for j in 1..=2 {
            assert_eq!(live.status(c(j)), Status::Held, "{star}-{j}");
        }
    }
    // An upper limit is its bound: the prior of LA-1 is 0.001.
    assert!((live.prior(id(&cat, "LA-1")) - 0.001).abs() < 1e-12);
}

#[test]
fn a_false_positive_in_a_row_whose_fields_do_not_line_up_still_holds_its_star() {
    // Invented: an export whose comment column holds an unquoted comma on
    // the binary's row, so that row has one field too many and is skipped.
    // Which cell is which cannot be known; its text cells are read as a
    // disposition would be. Before, its `FALSE POSITIVE` was lost with the
    // row, and MA-1 and MA-2 were validated as a pair.
    let rows = "\
MA,MA-1,4.1,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772,PC,fine\n\
MA,MA-2,9.7,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772,PC,fine\n\
MA,MA-3,23.9,0.00001,102.5,0.001,640,4.7,26,0.3,1,1,5772,FALSE POSITIVE,secondary, odd-even\n\
OK,OK-1,4.3,0.00001,100.4,0.001,700,3.0,30,0.3,1,1,5772,PC,fine\n\
OK,OK-2,10.1,0.00001,101.4,0.001,650,3.6,28,0.3,1,1,5772,PC,see notes, page 2\n";
    let cat = load_text(&catalogue("disposition,comment", rows));
    assert_eq!(cat.skipped.len(), 2, "{:?}", cat.skipped);
    let file = written("misaligned", &catalogue("disposition,comment", rows));
    let v = agreed(file.to_str().unwrap());
    for s in ["MA-1", "MA-2"] {
        assert_ne!(v[s], "validated", "{s}: {v:?}");
    }
    // A misaligned row that names no false positive (OK-2's) holds
    // nothing: only star MA is said to host one.
    let o = starsift(&["odds", file.to_str().unwrap(), "--format", "csv"]);
    let e = stderr(&o);
    assert!(
        e.contains("1 star hosts a false positive only a skipped row names (star MA:"),
        "{e}"
    );
}

#[test]
fn rows_that_name_no_star_are_never_one_star_and_join_their_candidate_family() {
    // Invented: a merged table whose unknown hosts are written `0`, `-1`,
    // `NaN` or left empty, as archives write them. Read as ids, the three
    // unrelated signals under `0` made one system of three, validated by
    // its boost. And an empty star cell on `TOI-901.03`, a binary, lost it
    // from its star: `TOI-901.01` and `.02` (TIC 777) were validated. The
    // family's row with no period (skipped) still calls `TOI-902.03` a
    // binary, which holds TIC 778 (docs/science.md §3.4).
    let rows = "\
0,U-1,4.1,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772,PC\n\
0,U-2,9.7,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772,PC\n\
0,U-3,23.9,0.00001,102.5,0.001,640,4.7,26,0.3,1,1,5772,PC\n\
-1,V-1,4.3,0.00001,100.4,0.001,700,3.0,30,0.3,1,1,5772,PC\n\
-1,V-2,10.1,0.00001,101.4,0.001,650,3.6,28,0.3,1,1,5772,PC\n\
NaN,W-1,4.5,0.00001,100.5,0.001,700,3.0,30,0.3,1,1,5772,PC\n\
NaN,W-2,10.6,0.00001,101.5,0.001,650,3.6,28,0.3,1,1,5772,PC\n\
TIC 777,TOI-901.01,4.7,0.00001,100.7,0.001,700,3.0,30,0.3,1,1,5772,PC\n\
TIC 777,TOI-901.02,11.2,0.00001,101.7,0.001,650,3.6,28,0.3,1,1,5772,PC\n\
,TOI-901.03,2.7,0.00001,101.3,0.001,9000,2.0,55,0.3,1,1,5772,EB\n\
TIC 778,TOI-902.01,4.9,0.00001,100.9,0.001,700,3.0,30,0.3,1,1,5772,PC\n\
TIC 778,TOI-902.02,11.7,0.00001,101.9,0.001,650,3.6,28,0.3,1,1,5772,PC\n\
-999,TOI-902.03,,0.00001,101.3,0.001,9000,2.0,55,0.3,1,1,5772,EB\n";
    let cat = written("no_host", &catalogue("disposition", rows));
    let c = cat.to_str().unwrap();
    let v = agreed(c);
    for lone in ["U-1", "U-2", "U-3", "V-1", "V-2", "W-1", "W-2"] {
        assert_ne!(v[lone], "validated", "{lone}");
    }
    for planet in ["TOI-901.01", "TOI-901.02", "TOI-902.01", "TOI-902.02"] {
        assert_ne!(v[planet], "validated", "{planet}");
    }
    let loaded = load_text(&catalogue("disposition", rows));
    let star = |cand: &str| loaded.star_id(loaded.star_of(id(&loaded, cand)));
    assert_eq!(star("U-1"), "host of U-1");
    assert_ne!(
        loaded.star_of(id(&loaded, "U-1")),
        loaded.star_of(id(&loaded, "U-2"))
    );
    assert_eq!(star("TOI-901.03"), "TIC 777");
    // Said: the cells read as no star, and where each row went.
    let note = loaded.notes.join("\n");
    assert!(
        note.contains("8 rows gave no star id (`-1`, `NaN`, empty)")
            && note.contains(
                "1 joined the star of its candidate family by id (`TOI-901.03` with star `TIC 777`)"
            )
            && note.contains("7 are read as a star of their own"),
        "{note}"
    );
    let o = starsift(&["odds", c, "--format", "csv"]);
    let e = stderr(&o);
    assert!(e.contains("TOI-902.03") && e.contains("TIC 778"), "{e}");
}

#[test]
fn an_fpp_of_exactly_zero_validates_nothing() {
    // Invented: an fpp column whose gaps were filled with 0 (all 580
    // background rows here, and Z1, Z2). Read as probabilities, each zero
    // made infinite prior odds and every single candidate of the table
    // `validated`. A 0 is read as no fpp; a real small value still counts
    // (docs/science.md §3.5).
    let rows = "\
Z1,Z1-1,5.0,0.00001,100.0,0.001,600,3.0,40,0.3,1,1,5772,0\n\
Z2,Z2-1,5.3,0.00001,100.0,0.001,600,3.0,40,0.3,1,1,5772,0.000\n\
Z3,Z3-1,5.7,0.00001,100.0,0.001,600,3.0,40,0.3,1,1,5772,0.001\n";
    let text = catalogue("fpp", rows).replace(",\n", ",0\n");
    let cat = written("fpp_zero", &text);
    let c = cat.to_str().unwrap();
    let v = agreed(c);
    for single in ["Z1-1", "Z2-1", "BG1x0-1", "BG1x399-1"] {
        assert_eq!(v[single], "likely", "{single}");
    }
    // fpp 0.001: prior odds 999 (docs/science.md §1.2 with B_1 = 1).
    assert_eq!(v["Z3-1"], "validated");
    let e = stderr(&starsift(&["odds", c, "--format", "csv"]));
    assert!(
        e.contains("582 fpp values of exactly 0 were read as no fpp"),
        "{e}"
    );
}
