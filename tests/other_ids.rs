//! One star under two ids (docs/science.md §3.4): a candidate family split
//! over two star ids, rows of two star ids at one place, or one row listed
//! under two star ids. A false
//! positive at one id holds the candidates of the other, whether the
//! catalogue names it, its checks show it, or a vetter rejects it as one.
//! Invented catalogues; every command and the browser build the same
//! `Live`.

mod common;

use common::{agreed, catalogue, checks_rows, reject, starsift, stderr, stdout, written};

#[test]
fn a_candidate_family_split_over_two_star_ids_is_held_by_its_false_positive() {
    // Invented: a table merged from two lists, one host under two
    // catalogues' ids (`TIC 778`, and `Gaia 4411` for the binary of the
    // same family `TOI-902`). Before, the binary held only its own id and
    // TOI-902.01 and .02 were validated. A family split with no false
    // positive in it (TOI-903) holds nothing (docs/science.md §3.4).
    let rows = "\
TIC 778,TOI-902.01,4.9,0.00001,100.9,0.001,700,3.0,30,0.3,1,1,5772,PC\n\
TIC 778,TOI-902.02,11.7,0.00001,101.9,0.001,650,3.6,28,0.3,1,1,5772,PC\n\
Gaia 4411,TOI-902.03,2.7,0.00001,101.3,0.001,9000,2.0,55,0.3,1,1,5772,EB\n\
TIC 779,TOI-903.01,5.3,0.00001,100.2,0.001,700,3.0,30,0.3,1,1,5772,PC\n\
TIC 779,TOI-903.02,12.9,0.00001,101.2,0.001,650,3.6,28,0.3,1,1,5772,PC\n\
Gaia 4412,TOI-903.03,3.1,0.00001,101.6,0.001,700,2.0,30,0.3,1,1,5772,PC\n";
    let cat = written("split_family", &catalogue("disposition", rows));
    let c = cat.to_str().unwrap();
    let v = agreed(c);
    for planet in ["TOI-902.01", "TOI-902.02"] {
        assert_ne!(v[planet], "validated", "{planet}");
    }
    for planet in ["TOI-903.01", "TOI-903.02"] {
        assert_eq!(v[planet], "validated", "{planet}");
    }
    let o = starsift(&["odds", c, "--format", "csv"]);
    let e = stderr(&o);
    assert!(
        e.contains("1 star shares a candidate family with a false positive on another star id (star TIC 778)"),
        "{e}"
    );
}

#[test]
fn a_false_positive_at_the_same_place_under_another_star_id_holds_the_star() {
    // Invented: a table merged from two lists, one star under a survey's id
    // (`TIC 501`, two planets) and, 0.8″ away, under another catalogue's
    // (`Gaia 88`, the eclipsing binary). Before, the binary held only its
    // own id and both planets were validated. A binary 34″ away (`Gaia 89`
    // beside `TIC 502`: another star in a wide field) holds nothing here
    // (docs/science.md §3.4).
    let rows = "\
TIC 501,TOI-501.01,4.1,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772,150.00000,20.00000,PC\n\
TIC 501,TOI-501.02,9.7,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772,150.00000,20.00000,PC\n\
Gaia 88,G88-a,2.7,0.00001,101.3,0.001,9000,2.0,55,0.3,1,1,5772,150.00020,20.00010,EB\n\
TIC 502,TOI-502.01,4.3,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772,151.00000,20.00000,PC\n\
TIC 502,TOI-502.02,9.9,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772,151.00000,20.00000,PC\n\
Gaia 89,G89-a,2.9,0.00001,101.3,0.001,9000,2.0,55,0.3,1,1,5772,151.01000,20.00000,EB\n";
    let cat = written("same_place", &catalogue("ra,dec,disposition", rows));
    let c = cat.to_str().unwrap();
    let v = agreed(c);
    for planet in ["TOI-501.01", "TOI-501.02"] {
        assert_ne!(v[planet], "validated", "{planet}");
    }
    for planet in ["TOI-502.01", "TOI-502.02"] {
        assert_eq!(v[planet], "validated", "{planet}");
    }
    let e = stderr(&starsift(&["odds", c, "--format", "csv"]));
    assert!(
        e.contains("1 star within 2″ of a false positive under another star id (star TIC 501)"),
        "{e}"
    );
}

#[test]
fn a_radius_no_planet_has_in_a_split_family_holds_the_other_star_id() {
    // Invented: the family of the split-family test with no word from the
    // catalogue (every row `PC`), its third member an eclipse of 9 % on a
    // Sun-like star, 33 R⊕ (`big-radius`, docs/science.md §2), under the
    // other id. Before, only the catalogue's word held the other id, and
    // TOI-904.01 and .02 were validated; now a false positive's signs do
    // too (§3.4). TOI-905's third member is a planet, and its family stays
    // a system.
    let rows = "\
TIC 780,TOI-904.01,4.9,0.00001,100.9,0.001,700,3.0,30,0.3,1,1,5772,PC\n\
TIC 780,TOI-904.02,11.7,0.00001,101.9,0.001,650,3.6,28,0.3,1,1,5772,PC\n\
Gaia 4413,TOI-904.03,2.7,0.00001,101.3,0.001,90000,2.0,55,0.3,1,1,5772,PC\n\
TIC 781,TOI-905.01,5.3,0.00001,100.2,0.001,700,3.0,30,0.3,1,1,5772,PC\n\
TIC 781,TOI-905.02,12.9,0.00001,101.2,0.001,650,3.6,28,0.3,1,1,5772,PC\n\
Gaia 4414,TOI-905.03,3.1,0.00001,101.6,0.001,700,2.0,30,0.3,1,1,5772,PC\n";
    let cat = written("split_family_radius", &catalogue("disposition", rows));
    let c = cat.to_str().unwrap();
    let v = agreed(c);
    for planet in ["TOI-904.01", "TOI-904.02"] {
        assert_ne!(v[planet], "validated", "{planet}");
    }
    for planet in ["TOI-905.01", "TOI-905.02"] {
        assert_eq!(v[planet], "validated", "{planet}");
    }
    let e = stderr(&starsift(&["odds", c, "--format", "csv"]));
    assert!(
        e.contains("1 star shares a candidate family with a false positive on another star id (star TIC 780)"),
        "{e}"
    );
    let table = stdout(&starsift(&["odds", c]));
    assert!(
        table.contains("a false positive by its checks (big-radius)"),
        "{table}"
    );
}

#[test]
fn a_vetters_rejection_as_a_false_positive_holds_the_other_id_of_its_star() {
    // Invented: the two ways one star gets two ids, with no word from the
    // catalogue (every row `PC`). A split family (`TOI-906` on `TIC 790`
    // and, for .03, `Gaia 4415`) and one place (`TIC 503`, and `Gaia 90`
    // 0.8″ away); `Gaia 91`, 34″ from `TIC 504`, is another star. Before,
    // a vetter's rejection of TOI-906.03 or G90-a as a binary held only
    // its own id, and the planets of the other were validated
    // (docs/science.md §3.4).
    let rows = "\
TIC 790,TOI-906.01,4.9,0.00001,100.9,0.001,700,3.0,30,0.3,1,1,5772,,,PC\n\
TIC 790,TOI-906.02,11.7,0.00001,101.9,0.001,650,3.6,28,0.3,1,1,5772,,,PC\n\
Gaia 4415,TOI-906.03,2.7,0.00001,101.3,0.001,700,2.0,30,0.3,1,1,5772,,,PC\n\
TIC 503,TOI-503.01,4.1,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772,152.00000,20.00000,PC\n\
TIC 503,TOI-503.02,9.7,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772,152.00000,20.00000,PC\n\
Gaia 90,G90-a,2.7,0.00001,101.3,0.001,700,2.0,30,0.3,1,1,5772,152.00020,20.00010,PC\n\
TIC 504,TOI-504.01,4.3,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772,153.00000,20.00000,PC\n\
TIC 504,TOI-504.02,9.9,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772,153.00000,20.00000,PC\n\
Gaia 91,G91-a,2.9,0.00001,101.3,0.001,700,2.0,30,0.3,1,1,5772,153.01000,20.00000,PC\n";
    let cat = written("other_id_rejected", &catalogue("ra,dec,disposition", rows));
    let c = cat.to_str().unwrap();
    let planets = [
        "TOI-906.01",
        "TOI-906.02",
        "TOI-503.01",
        "TOI-503.02",
        "TOI-504.01",
        "TOI-504.02",
    ];
    let v = agreed(c);
    for p in planets {
        assert_eq!(v[p], "validated", "{p}, before any decision");
    }
    reject(c, "TOI-906.03", "eclipsing-binary", "ann");
    // `decide --verdicts` says what the rejection did at the other id too.
    let o = starsift(&[
        "decide",
        c,
        "--candidate",
        "G90-a",
        "--decision",
        "rejected",
        "--reason",
        "blend",
        "--vetter",
        "ann",
        "--verdicts",
    ]);
    let said = stdout(&o);
    assert!(
        said.contains("the same star as star TIC 503 (rows 0.8″ apart):")
            && said.contains("TOI-503.01 likely"),
        "{said}"
    );
    reject(c, "G91-a", "eclipsing-binary", "ann");
    let v = agreed(c);
    for p in &planets[..4] {
        assert_ne!(v[*p], "validated", "{p}");
    }
    for p in &planets[4..] {
        assert_eq!(v[*p], "validated", "{p}: another star, 34″ away");
    }
    let table = stdout(&starsift(&["odds", c]));
    for why in [
        "its star is also star Gaia 4415 (one candidate family (TOI-906))",
        "rejected as eclipsing-binary",
        "its star is also star Gaia 90 (rows 0.8″ apart)",
        "rejected as blend",
    ] {
        assert!(table.contains(why), "{why}\n{table}");
    }
    // The vetter's later word, an artefact (nothing of the star), holds
    // nothing any more.
    reject(c, "TOI-906.03", "artefact", "ann");
    let v = agreed(c);
    for p in ["TOI-906.01", "TOI-906.02"] {
        assert_eq!(v[p], "validated", "{p}, after the artefact");
    }
}

#[test]
fn a_binary_the_ledger_knows_holds_the_other_id_of_its_star_when_a_release_drops_it() {
    // Invented: one star under two ids 0.8″ apart (`TIC 507`, `Gaia 97`).
    // A vetter rejects G97-a as an eclipsing binary; the next release no
    // longer lists G97-a but keeps G97-b. The ledger still says the star
    // hosts a false positive (docs/science.md §1.1): G97-b is held, and so
    // are the planets of its other id (§3.4), as they were while G97-a was
    // listed. Before, TOI-507.01 and .02 came back validated.
    let rows = "\
TIC 507,TOI-507.01,4.1,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772,152.00000,20.00000,PC\n\
TIC 507,TOI-507.02,9.7,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772,152.00000,20.00000,PC\n\
Gaia 97,G97-a,2.7,0.00001,101.3,0.001,700,2.0,30,0.3,1,1,5772,152.00020,20.00010,PC\n\
Gaia 97,G97-b,17.3,0.00001,102.3,0.001,600,4.0,25,0.3,1,1,5772,152.00020,20.00010,PC\n";
    let cat = written("other_id_gone", &catalogue("ra,dec,disposition", rows));
    let c = cat.to_str().unwrap();
    let planets = ["TOI-507.01", "TOI-507.02"];
    let v = agreed(c);
    for p in planets {
        assert_eq!(v[p], "validated", "{p}, before any decision");
    }
    reject(c, "G97-a", "eclipsing-binary", "ann");
    let v = agreed(c);
    for p in planets {
        assert_ne!(v[p], "validated", "{p}, with G97-a listed");
    }
    let dropped: String = rows
        .lines()
        .filter(|l| !l.contains("G97-a"))
        .map(|l| format!("{l}\n"))
        .collect();
    std::fs::write(&cat, catalogue("ra,dec,disposition", &dropped)).unwrap();
    let v = agreed(c);
    for p in planets.iter().chain(&["G97-b"]) {
        assert_ne!(v[*p], "validated", "{p}, with G97-a gone");
    }
    let table = stdout(&starsift(&["odds", c, "--format", "csv"]));
    assert!(
        table
            .contains("G97-a, no longer in the catalogue, rejected as eclipsing-binary by ann on ")
            && table.contains(", on star Gaia 97, the same star as this one (rows 0.8″ apart)"),
        "{table}"
    );
}

#[test]
fn a_false_positive_only_a_skipped_row_names_holds_the_other_id_of_its_star() {
    // Invented: one star under two ids 0.8″ apart (`TIC 509`, `Gaia 99`).
    // G99-a's row cannot load (no period) but its disposition says FALSE
    // POSITIVE; G99-b loads. The skipped row holds its own star
    // (docs/science.md §3.5) and, as a loaded false positive would, the
    // other id of that star (§3.4). Before, TOI-509.01 and .02 were
    // validated.
    let rows = "\
TIC 509,TOI-509.01,4.1,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772,152.00000,20.00000,PC\n\
TIC 509,TOI-509.02,9.7,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772,152.00000,20.00000,PC\n\
Gaia 99,G99-a,,,,,,,,,1,1,5772,152.00020,20.00010,FALSE POSITIVE\n\
Gaia 99,G99-b,17.3,0.00001,102.3,0.001,600,4.0,25,0.3,1,1,5772,152.00020,20.00010,PC\n";
    let cat = written("other_id_skipped", &catalogue("ra,dec,disposition", rows));
    let c = cat.to_str().unwrap();
    let v = agreed(c);
    for p in ["TOI-509.01", "TOI-509.02", "G99-b"] {
        assert_ne!(v[p], "validated", "{p}");
    }
    let table = stdout(&starsift(&["odds", c, "--format", "csv"]));
    assert!(
        table.contains("says disposition `FALSE POSITIVE` and was skipped")
            && table.contains(", on star Gaia 99, the same star as this one (rows 0.8″ apart)"),
        "{table}"
    );
}

#[test]
fn a_rebuild_from_the_odds_own_list_holds_what_a_first_build_holds() {
    // Invented: three ids in a row at 1.5″ steps (`TIC 512`, `Gaia 112`,
    // `2MASS 12`); a skipped row at TIC 512 says FALSE POSITIVE. Gaia 112,
    // 1.5″ away, is held as the same star; 2MASS 12 is 3″ from TIC 512 and
    // a tie only of Gaia 112: one step holds it not. The browser rebuilds
    // its odds when the checks arrive from the list the first odds hold
    // (`Live::unseen_fps`), and must hold the same stars as every command.
    let rows = "\
TIC 512,T512-a,,,,,,,,,1,1,5772,152.000000,20.000000,FALSE POSITIVE\n\
TIC 512,T512-b,4.1,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772,152.000000,20.000000,PC\n\
Gaia 112,G112-a,9.7,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772,152.000000,20.000417,PC\n\
Gaia 112,G112-b,17.3,0.00001,102.3,0.001,600,4.0,25,0.3,1,1,5772,152.000000,20.000417,PC\n\
2MASS 12,M12-a,5.3,0.00001,100.6,0.001,700,3.0,30,0.3,1,1,5772,152.000000,20.000833,PC\n\
2MASS 12,M12-b,12.9,0.00001,101.6,0.001,650,3.6,28,0.3,1,1,5772,152.000000,20.000833,PC\n";
    let cat = common::load_text(&catalogue("ra,dec,disposition", rows));
    let checks = starsift::checks::run(&cat, &starsift::checks::CheckSettings::default());
    let model = starsift::odds::Model {
        targets: Some(50_000),
        ..Default::default()
    };
    let open = vec![starsift::decision::Decision::Open; cat.len()];
    let first =
        starsift::session::odds_with(&cat, model.clone(), &checks, open.clone(), &[], Vec::new())
            .unwrap();
    let again =
        starsift::session::odds_with(&cat, model, &checks, open, first.unseen_fps(), Vec::new())
            .unwrap();
    let status =
        |live: &starsift::odds::Live, id: &str| live.status(cat.find_candidate(id).unwrap());
    for id in ["T512-b", "G112-a", "G112-b", "M12-a", "M12-b"] {
        assert_eq!(status(&first, id), status(&again, id), "{id}");
    }
    for id in ["G112-a", "G112-b"] {
        assert_eq!(status(&first, id), starsift::odds::Status::Held, "{id}");
    }
    for id in ["M12-a", "M12-b"] {
        assert_ne!(status(&first, id), starsift::odds::Status::Held, "{id}");
    }
}

#[test]
fn one_row_listed_under_two_star_ids_counts_towards_neither_and_ties_them() {
    // Invented: a table merged from two lists, one host under two ids
    // (`KIC 000757` and `EPIC 201757`), no positions. The same row (period,
    // epoch, depth and duration to the last digit) sits on both, beside a
    // planet of each id. Before, each id was a pair and all four were
    // validated: one signal counted twice, on two stars. A neighbour's
    // light would be shallower (docs/science.md §3.3); an identical row is
    // one row named twice, whose star cannot be known (§3.4).
    let rows = "\
KIC 000757,K-1,3.7,0.00001,100.5,0.001,3000,2.5,40,0.3,1,1,5772,PC\n\
KIC 000757,K-2,9.1,0.00001,101.5,0.001,600,3.0,30,0.3,1,1,5772,PC\n\
EPIC 201757,E-1,3.7,0.00001,100.5,0.001,3000,2.5,40,0.3,1,1,5772,PC\n\
EPIC 201757,E-2,17.2,0.00001,102.5,0.001,400,4.0,25,0.3,1,1,5772,PC\n\
TIC 900,T-1,3.7,0.00001,100.5,0.001,2990,2.5,40,0.3,1,1,5772,PC\n\
TIC 900,T-2,8.3,0.00001,101.1,0.001,500,3.2,30,0.3,1,1,5772,PC\n";
    let cat = written("one_row_two_ids", &catalogue("disposition", rows));
    let c = cat.to_str().unwrap();
    let v = agreed(c);
    // Neither copy counts (mixed-host, at its prior odds); each id's other
    // planet is a single. T-1 is 10 ppm shallower: a measurement of its
    // own, left to the echo search (a warning without positions), and T's
    // pair stands.
    for s in ["K-1", "K-2", "E-1", "E-2"] {
        assert_eq!(v[s], "likely", "{s}");
    }
    assert_eq!(v["T-1"], "validated");
    let checks = checks_rows(c);
    let line = |id: &str| checks[id].clone();
    assert!(line("E-1").contains("mixed-host"), "{}", line("E-1"));
    assert!(line("E-1").contains("also listed as K-1 on star KIC 000757"));
    // The two copies are no echo of each other (T-1's shallower signal
    // is a warning of one).
    assert!(!line("E-1").contains("same ephemeris as K-1"));
    assert!(!line("E-1").contains("appears as K-1"), "{}", line("E-1"));
    assert!(line("T-1").contains("warning echo"), "{}", line("T-1"));
    assert!(!line("K-2").contains("mixed-host"), "{}", line("K-2"));
    // One row, one verdict, and the two ids one star: the catalogue's
    // word on either copy makes the other no planet and holds both ids.
    let fp = rows.replacen(
        "3000,2.5,40,0.3,1,1,5772,PC",
        "3000,2.5,40,0.3,1,1,5772,FP",
        1,
    );
    let cat = written("one_row_two_ids_fp", &catalogue("disposition", &fp));
    let v = agreed(cat.to_str().unwrap());
    for s in ["K-1", "E-1"] {
        assert_eq!(v[s], "unlikely", "{s}");
    }
    for s in ["K-2", "E-2"] {
        assert_eq!(v[s], "likely", "{s}");
    }
    let o = starsift(&["odds", cat.to_str().unwrap(), "--format", "csv"]);
    assert!(
        stderr(&o).contains(
            "1 star repeats a row of a false positive on another star id (star EPIC 201757)"
        ),
        "{}",
        stderr(&o)
    );
    // A vetter's rejection as an eclipsing binary does the same, in every
    // command (the odds' ties of the rejected candidate's star).
    reject(c, "K-1", "eclipsing-binary", "ann");
    let v = agreed(c);
    assert_eq!(v["K-1"], "rejected");
    assert_eq!(v["E-1"], "unlikely");
    let o = stdout(&starsift(&["odds", c, "--format", "csv"]));
    let e2 = o.lines().find(|l| l.contains(",E-2,")).unwrap();
    assert!(
        e2.contains("one row listed under both (K-1 and E-1)"),
        "{e2}"
    );
    assert_eq!(v["E-2"], "likely");
}

#[test]
fn one_row_under_two_star_ids_is_found_with_its_epoch_from_another_zero() {
    // Invented: the same merged table, one source writing its epochs as
    // BJD − 2457000 and the other as full BJD (a zero the archives
    // document, from memory). The row on EPIC 201757 is K-1's with
    // 2457000 added: one row, whose star cannot be known. Before, the
    // epochs differed and both pairs were validated.
    let rows = "\
KIC 000757,K-1,3.7,0.00001,100.5,0.001,3000,2.5,40,0.3,1,1,5772,PC\n\
KIC 000757,K-2,9.1,0.00001,101.5,0.001,600,3.0,30,0.3,1,1,5772,PC\n\
EPIC 201757,E-1,3.7,0.00001,2457100.5,0.001,3000,2.5,40,0.3,1,1,5772,PC\n\
EPIC 201757,E-2,17.2,0.00001,2457102.5,0.001,400,4.0,25,0.3,1,1,5772,PC\n";
    let cat = written("one_row_two_zeros", &catalogue("disposition", rows));
    let c = cat.to_str().unwrap();
    let v = agreed(c);
    for s in ["K-1", "K-2", "E-1", "E-2"] {
        assert_eq!(v[s], "likely", "{s}");
    }
    let line = checks_rows(c)["E-1"].clone();
    assert!(line.contains("mixed-host"), "{line}");
    assert!(
        line.contains("E-1 as 2457100.5, K-1 as 100.5, 2457000 days apart"),
        "{line}"
    );
}

#[test]
fn one_row_under_two_star_ids_is_found_written_with_fewer_digits() {
    // Invented: the second source writes the row with fewer digits (each
    // value the first's rounded: 3.71234 → 3.712, 100.54321 → 100.543,
    // 2.51 → 2.5). One row, whose star cannot be known; and a vetter's
    // rejection of one copy holds the other id's planet (the odds' ties).
    let rows = "\
KIC 000757,K-1,3.71234,0.00001,100.54321,0.001,3000,2.51,40,0.3,1,1,5772,PC\n\
KIC 000757,K-2,9.1,0.00001,101.5,0.001,600,3.0,30,0.3,1,1,5772,PC\n\
EPIC 201757,E-1,3.712,0.00001,100.543,0.001,3000,2.5,40,0.3,1,1,5772,PC\n\
EPIC 201757,E-2,17.2,0.00001,102.5,0.001,400,4.0,25,0.3,1,1,5772,PC\n";
    let cat = written("one_row_fewer_digits", &catalogue("disposition", rows));
    let c = cat.to_str().unwrap();
    let v = agreed(c);
    for s in ["K-1", "K-2", "E-1", "E-2"] {
        assert_eq!(v[s], "likely", "{s}");
    }
    assert!(checks_rows(c)["E-1"].contains("mixed-host"));
    reject(c, "K-1", "eclipsing-binary", "ann");
    let o = stdout(&starsift(&["odds", c, "--format", "csv"]));
    let e2 = o.lines().find(|l| l.contains(",E-2,")).unwrap();
    assert!(
        e2.contains("one row listed under both (K-1 and E-1)"),
        "{e2}"
    );
}

#[test]
fn one_row_under_two_star_ids_is_found_with_its_digits_counted_in_the_tables_unit() {
    // Invented: depths in percent and durations in days, stored as ppm
    // and hours. The second source rounds each value in the table's own
    // unit (0.3012 % → 0.30 %, 0.1046 d → 0.105 d): stored, 3012 and 3000
    // ppm, 2.5104 and 2.52 h, which no rounding of the stored digits
    // joins. Counted in the unit written, they are one row. Before, both
    // pairs of each star id were validated. One pair shares its period to
    // the digit (found among the rows of one period, by depth), the other
    // is rounded in period too.
    let head = common::HEAD
        .replace("depth_ppm", "depth (%)")
        .replace("duration_h", "duration (d)");
    let background: String = common::background()
        .lines()
        .map(|l| format!("{}\n", l.replace(",600,3.0,", ",0.06,0.125,")))
        .collect();
    let rows = "\
KIC 000858,K-1,3.71234,0.00001,100.54321,0.001,0.3012,0.1046,40,0.3,1,1,5772\n\
KIC 000858,K-2,9.1,0.00001,101.5,0.001,0.06,0.125,30,0.3,1,1,5772\n\
EPIC 201858,E-1,3.71234,0.00001,100.54321,0.001,0.30,0.105,40,0.3,1,1,5772\n\
EPIC 201858,E-2,17.2,0.00001,102.5,0.001,0.04,0.17,25,0.3,1,1,5772\n\
KIC 000859,K-3,5.43219,0.00001,101.98765,0.001,0.1234,0.0833,40,0.3,1,1,5772\n\
KIC 000859,K-4,11.3,0.00001,101.1,0.001,0.06,0.125,30,0.3,1,1,5772\n\
EPIC 201859,E-3,5.432,0.00001,101.988,0.001,0.12,0.083,40,0.3,1,1,5772\n\
EPIC 201859,E-4,19.9,0.00001,102.9,0.001,0.04,0.17,25,0.3,1,1,5772\n";
    let cat = written("one_row_table_unit", &format!("{head}{background}{rows}"));
    let c = cat.to_str().unwrap();
    let v = agreed(c);
    for s in ["K-1", "K-2", "E-1", "E-2", "K-3", "K-4", "E-3", "E-4"] {
        assert_eq!(v[s], "likely", "{s}");
    }
    let checks = checks_rows(c);
    for s in ["K-1", "E-1", "K-3", "E-3"] {
        assert!(checks[s].contains("mixed-host"), "{s}: {}", checks[s]);
    }
    // A depth rounded to the same digits is no licence for another
    // depth: 0.31 % is not 0.30 % written with fewer digits.
    let apart = rows.replace("0.30,0.105", "0.31,0.105");
    let cat = written(
        "one_row_table_unit_apart",
        &format!("{head}{background}{apart}"),
    );
    let v = agreed(cat.to_str().unwrap());
    for s in ["K-1", "K-2", "E-1", "E-2"] {
        assert_eq!(v[s], "validated", "{s}");
    }
}

#[test]
fn one_row_under_two_star_ids_is_found_with_its_epoch_moved_whole_periods() {
    // Invented: the second source moved the epoch to a later transit (37
    // periods on: 100.54321 + 37 × 3.712345 = 237.89998, written
    // 237.89997) and kept the rest. No positions: before, an `echo`
    // warning only, and both pairs were validated.
    let rows = "\
KIC 000959,K-1,3.712345,0.00001,100.54321,0.001,3000,2.51,40,0.3,1,1,5772,PC\n\
KIC 000959,K-2,9.1,0.00001,101.5,0.001,600,3.0,30,0.3,1,1,5772,PC\n\
EPIC 201959,E-1,3.712345,0.00001,237.89997,0.001,3000,2.51,40,0.3,1,1,5772,PC\n\
EPIC 201959,E-2,17.2,0.00001,102.5,0.001,400,4.0,25,0.3,1,1,5772,PC\n";
    let cat = written("one_row_moved_epoch", &catalogue("disposition", rows));
    let c = cat.to_str().unwrap();
    let v = agreed(c);
    for s in ["K-1", "K-2", "E-1", "E-2"] {
        assert_eq!(v[s], "likely", "{s}");
    }
    let e1 = &checks_rows(c)["E-1"];
    assert!(
        e1.contains("mixed-host") && e1.contains("the epoch moved 37 periods"),
        "{e1}"
    );
}

#[test]
fn two_star_ids_of_one_host_in_a_second_id_column_are_held_by_its_false_positive() {
    // Invented: a table merged from two archives names its stars by one
    // id and carries the host's name in a second (`hostname`). TIC 101 and
    // TIC 202 are one host, HWT-77, whose binary sits under TIC 202. Before,
    // HWT-77.01 and .02 were validated. A host name shared by more star ids
    // than one host has (a placeholder, HWT-0 on five) ties none; and a
    // vetter's rejection of a binary holds the other id of its host.
    let mut rows = String::from(
        "\
TIC 101,HWT-77.01,4.9,0.00001,100.9,0.001,700,3.0,30,0.3,1,1,5772,HWT-77,PC\n\
TIC 101,HWT-77.02,11.7,0.00001,101.9,0.001,650,3.6,28,0.3,1,1,5772,HWT-77,PC\n\
TIC 202,X-3,2.7,0.00001,101.3,0.001,9000,2.0,55,0.3,1,1,5772,hwt 77,EB\n\
TIC 303,Y-1,5.3,0.00001,100.2,0.001,700,3.0,30,0.3,1,1,5772,HWT-78,PC\n\
TIC 303,Y-2,12.9,0.00001,101.2,0.001,650,3.6,28,0.3,1,1,5772,HWT-78,PC\n\
TIC 404,Z-1,3.1,0.00001,101.6,0.001,700,2.0,30,0.3,1,1,5772,HWT-78,PC\n",
    );
    for i in 0..5 {
        rows.push_str(&format!(
            "TIC 5{i}0,P-{i},{}.1,0.00001,100.4,0.001,700,3.0,30,0.3,1,1,5772,HWT-0,{}\n",
            3 + i,
            if i == 0 { "EB" } else { "PC" }
        ));
        rows.push_str(&format!(
            "TIC 5{i}0,Q-{i},{}.8,0.00001,102.2,0.001,650,3.6,28,0.3,1,1,5772,HWT-0,PC\n",
            9 + i
        ));
    }
    let cat = written("second_id", &catalogue("hostname,disposition", &rows));
    let c = cat.to_str().unwrap();
    let v = agreed(c);
    for s in ["HWT-77.01", "HWT-77.02"] {
        assert_eq!(v[s], "likely", "{s}");
    }
    let why = &checks_rows(c)["HWT-77.01"];
    assert!(
        why.contains("names the same host (hostname hwt 77)"),
        "{why}"
    );
    // The summary says how the column is read.
    let summary = stdout(&starsift(&["summary", c]));
    assert!(summary.contains("a second star id"), "{summary}");
    // The placeholder's stars keep their own verdicts.
    for i in 1..5 {
        assert_eq!(v[&format!("P-{i}")], "validated", "P-{i}");
    }
    assert_eq!(v["Y-1"], "validated");
    // A vetter's rejection of Z-1 holds TIC 303, the other id of HWT-78.
    reject(c, "Z-1", "eclipsing-binary", "ann");
    let o = stdout(&starsift(&["odds", c, "--format", "csv"]));
    let y1 = o.lines().find(|l| l.contains(",Y-1,")).unwrap();
    assert!(y1.contains("one host (hostname HWT-78)"), "{y1}");
    assert!(y1.contains(",likely,"), "{y1}");
}
