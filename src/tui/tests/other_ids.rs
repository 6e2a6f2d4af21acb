//! The browser holds the other id of a star whose candidate the vetter
//! rejects as a false positive, live, as every command does
//! (docs/science.md §3.4).

use super::*;
use crate::catalogue::{CandidateId, Catalogue, LoadOptions, Source};
use crate::odds::{Status, Verdict};

/// Invented: 400 singles and 60 doubles for a histogram, and two stars
/// each under two ids by its candidate family (`TOI-906.03` on `Gaia
/// 4415`, the others on `TIC 790`; `TOI-907.03` on `Gaia 4416`, the
/// others on `TIC 791`).
fn split_family() -> Catalogue {
    let mut t = String::from(
        "star,candidate,period_d,period_err_d,epoch,epoch_err_d,depth_ppm,duration_h,snr,impact,star_radius_rsun,star_mass_msun,star_teff_k\n",
    );
    let mut n = 0;
    let mut row = |s: &str, c: &str, p: f64| {
        n += 1;
        let p = p * (1.0 + 0.0007 * n as f64);
        t.push_str(&format!(
            "{s},{c},{p:.6},0.00001,100.{n},0.001,600,3.0,25,0.3,1,1,5772\n"
        ));
    };
    for i in 0..400 {
        row(&format!("S{i}"), &format!("S{i}-1"), 3.3);
    }
    for i in 0..60 {
        row(&format!("D{i}"), &format!("D{i}-1"), 3.3);
        row(&format!("D{i}"), &format!("D{i}-2"), 7.9);
    }
    t.push_str(
        "TIC 790,TOI-906.01,4.9,0.00001,100.9,0.001,700,3.0,30,0.3,1,1,5772\n\
         TIC 790,TOI-906.02,11.7,0.00001,101.9,0.001,650,3.6,28,0.3,1,1,5772\n\
         Gaia 4415,TOI-906.03,2.7,0.00001,101.3,0.001,700,2.0,30,0.3,1,1,5772\n\
         TIC 791,TOI-907.01,5.3,0.00001,100.2,0.001,700,3.0,30,0.3,1,1,5772\n\
         TIC 791,TOI-907.02,12.9,0.00001,101.2,0.001,650,3.6,28,0.3,1,1,5772\n\
         Gaia 4416,TOI-907.03,3.1,0.00001,101.6,0.001,700,2.0,30,0.3,1,1,5772\n",
    );
    Catalogue::load(
        Source::Bytes {
            name: "invented.csv",
            data: t.as_bytes(),
        },
        &LoadOptions::default(),
    )
    .unwrap()
}

/// Rejects candidate `c` as an eclipsing binary (the first reason), by
/// keys.
fn reject_as_binary(app: &mut App, c: CandidateId) {
    app.go_to(c);
    act(app, Action::Select);
    assert_eq!(app.candidate(), Some(c));
    act(app, Action::Reject);
    act(app, Action::Select);
    assert_eq!(
        app.live.decision(c),
        Decision::Rejected(crate::decision::Reason::EclipsingBinary)
    );
}

/// The odds built from nothing with every decision of the browser now, as
/// a command builds them.
fn from_scratch(app: &App, checks: &crate::checks::Checks) -> Live {
    let now = crate::tui::app::decisions_of(&app.cat, &app.live);
    crate::session::odds_with(
        &app.cat,
        app.live.model().clone(),
        checks,
        now,
        &[],
        Vec::new(),
    )
    .unwrap()
}

#[test]
fn rejecting_a_binary_holds_the_other_id_of_its_star_and_undo_releases_it() {
    let cat = split_family();
    let checks = crate::checks::run(&cat, &Default::default());
    let mut app = app_of(cat, 50_000, None);
    let id = |app: &App, s: &str| app.cat.find_candidate(s).unwrap();
    let planets = [id(&app, "TOI-906.01"), id(&app, "TOI-906.02")];
    for &p in &planets {
        assert_eq!(app.live.verdict(p), Verdict::Validated);
    }
    let binary = id(&app, "TOI-906.03");
    reject_as_binary(&mut app, binary);
    for &p in &planets {
        assert_eq!(app.live.status(p), Status::Held);
        assert_ne!(app.live.verdict(p), Verdict::Validated);
    }
    let fresh = from_scratch(&app, &checks);
    assert!(app.live.same_odds_state(&fresh));
    assert!(
        app.live
            .same_odds_state(&app.live.rebuilt(&app.cat).unwrap())
    );
    let why = crate::odds::hold_text(&app.cat, &app.live, planets[0]);
    assert!(
        why.contains("its star is also star Gaia 4415 (one candidate family (TOI-906))"),
        "{why}"
    );
    act(&mut app, Action::Undo);
    for &p in &planets {
        assert_eq!(app.live.verdict(p), Verdict::Validated, "after the undo");
    }
    assert!(app.live.same_odds_state(&from_scratch(&app, &checks)));
}

#[test]
fn checks_arriving_after_the_rejection_keep_the_other_id_held() {
    // The checks thread builds its odds from the decisions of when it
    // started, before the rejection.
    let (mut app, checks) = checks_pending_on(split_family(), 50_000);
    let model = app.live.model().clone();
    let at_start = crate::tui::app::decisions_of(&app.cat, &app.live);
    let binary = app.cat.find_candidate("TOI-906.03").unwrap();
    reject_as_binary(&mut app, binary);
    let built = crate::session::odds_with(&app.cat, model, &checks, at_start, &[], Vec::new());
    let _ = app.update(Input::ChecksBuilt(Box::new((checks.clone(), built))));
    let planet = app.cat.find_candidate("TOI-906.01").unwrap();
    assert_eq!(app.live.status(planet), Status::Held);
    assert!(app.live.same_odds_state(&from_scratch(&app, &checks)));
}

#[test]
fn a_rejection_of_a_whole_filter_holds_every_other_id_it_names() {
    // One bulk rejection of both `Gaia` stars' binaries: one pass over the
    // catalogue finds both other ids.
    let cat = split_family();
    let checks = crate::checks::run(&cat, &Default::default());
    let mut app = app_of(cat, 50_000, None);
    typed_filter(&mut app, "star:gaia");
    act(&mut app, Action::ApplyToFilter);
    act(&mut app, Action::Reject);
    act(&mut app, Action::Select);
    act(&mut app, Action::Select);
    for binary in ["TOI-906.03", "TOI-907.03"] {
        let c = app.cat.find_candidate(binary).unwrap();
        assert_eq!(
            app.live.decision(c),
            Decision::Rejected(crate::decision::Reason::EclipsingBinary)
        );
    }
    for planet in ["TOI-906.01", "TOI-906.02", "TOI-907.01", "TOI-907.02"] {
        let c = app.cat.find_candidate(planet).unwrap();
        assert_eq!(app.live.status(c), Status::Held, "{planet}");
    }
    assert!(app.live.same_odds_state(&from_scratch(&app, &checks)));
}

#[test]
fn a_rejection_that_holds_another_id_moves_that_star_in_every_order() {
    // The orders by size and by best odds are kept across a decision by
    // moving the stars it moved. A rejection of TOI-906.03 as a binary
    // holds TIC 790 (its other id) too: its size falls from 2 to 0, and
    // the cached orders and the view move it with Gaia 4415 (before, they
    // moved only the decided star, and TIC 790 stayed among the pairs).
    use crate::tui::app::SortKey;
    let (mut app, checks) = checks_pending_on(split_family(), 50_000);
    let decisions = crate::tui::app::decisions_of(&app.cat, &app.live);
    let built = crate::session::odds_with(
        &app.cat,
        app.live.model().clone(),
        &checks,
        decisions,
        &[],
        Vec::new(),
    );
    let _ = app.update(Input::ChecksBuilt(Box::new((checks, built))));
    let sorts = [SortKey::Multiplicity, SortKey::BestOdds];
    for (sort, descending) in sorts.into_iter().flat_map(|s| [(s, false), (s, true)]) {
        app.sort = sort;
        app.descending = descending;
        app.refresh_view();
    }
    let binary = app.cat.find_candidate("TOI-906.03").unwrap();
    reject_as_binary(&mut app, binary);
    let tic = app.cat.find_star("TIC 790").unwrap();
    assert_eq!(app.live.star_k(tic), 0);
    // The view as the decision left it (sorted by best odds, descending).
    assert_eq!(app.stars, super::reference_order(&app));
    for (sort, descending) in sorts.into_iter().flat_map(|s| [(s, false), (s, true)]) {
        app.sort = sort;
        app.descending = descending;
        app.refresh_view();
        assert_eq!(
            app.stars,
            super::reference_order(&app),
            "{sort:?} {descending}"
        );
    }
}
