//! The browser's work done in the background: the checks (and the odds
//! built with them) arriving while the vetter decides, and the orders
//! sorted ahead of their first use.

use super::*;
use crate::tui::app::{OddsAhead, OddsFrom, Values, ValuesIn};

/// The demo in the browser before its checks arrive (they run on a
/// background thread), and those checks.
fn checks_pending() -> (App, crate::checks::Checks) {
    checks_pending_on(crate::demo::catalogue().unwrap(), crate::demo::DEMO_TARGETS)
}

#[test]
fn checks_built_in_the_background_keep_the_decisions_made_meanwhile() {
    // The checks thread builds the odds with the decisions of when it
    // started; the vetter rejects a candidate while it runs.
    let (mut app, checks) = checks_pending();
    let (cat, n) = (std::sync::Arc::clone(&app.cat), app.cat.len());
    let (model, at_start) = (
        app.live.model().clone(),
        crate::tui::app::decisions_of(&cat, &app.live),
    );
    act(&mut app, Action::Select);
    let c = app.candidate().unwrap();
    act(&mut app, Action::Reject);
    act(&mut app, Action::Down);
    act(&mut app, Action::Select);
    let rejected = app.live.decision(c);
    assert!(rejected.is_rejected());
    let built = crate::session::odds_with(&cat, model, &checks, at_start, &[], Vec::new());
    let _ = app.update(Input::ChecksBuilt(Box::new((checks.clone(), built))));
    assert!(!app.checks_pending);
    assert_eq!(app.live.decision(c), rejected);
    // The odds of the checks and of every decision now, as if built then.
    let now = crate::tui::app::decisions_of(&cat, &app.live);
    let fresh = crate::session::odds_with(
        &cat,
        app.live.model().clone(),
        &checks,
        now,
        &[],
        Vec::new(),
    )
    .unwrap();
    assert!(app.live.same_odds_state(&fresh));
    for m in 0..n as crate::catalogue::CandidateId {
        assert_eq!(app.live.odds(m), fresh.odds(m));
        assert_eq!(app.live.verdict(m), fresh.verdict(m));
        assert_eq!(app.live.flags(m), checks.flags(m));
    }
}

#[test]
fn checks_arriving_later_feed_the_verdicts() {
    let (mut app, checks) = checks_pending();
    let cat = std::sync::Arc::clone(&app.cat);
    assert!(screen(&app, 120, 30).contains("checks running: 0 %"));
    let _ = app.update(Input::ChecksDone(45));
    assert!(screen(&app, 120, 30).contains("checks running: 45 %"));
    let _ = app.update(Input::Progress(1240, 8000));
    assert!(screen(&app, 160, 30).contains("light curves 1,240 / 8,000"));
    // The planted unstable pair would be validated without its `crowded`
    // flag: until the checks arrive, nothing is called validated on screen
    // (the verdict waits for its evidence), nor drawn into a figure.
    let pair = cat.find_candidate("HWT74304-s1").unwrap();
    assert_eq!(app.live.verdict(pair), crate::odds::Verdict::Validated);
    typed_filter(&mut app, "id:HWT74304");
    act(&mut app, Action::Select);
    let s = screen(&app, 120, 30);
    let rows = s
        .lines()
        .filter(|l| l.contains("HWT74304-s") && l.contains(" open "));
    assert!(
        rows.clone().count() == 2 && rows.clone().all(|l| l.contains("checking")),
        "{s}"
    );
    assert!(!rows.clone().any(|l| l.contains("validated")), "{s}");
    assert!(s.contains("? validated"), "{s}");
    act(&mut app, Action::WriteFigure);
    assert!(
        app.message
            .as_deref()
            .unwrap_or("")
            .contains("checks are still running")
    );
    app.message = None;
    // The flags found so far show at once (the verdicts still wait).
    let mut so_far = vec![crate::flags::FlagSet::EMPTY; cat.len()];
    so_far[pair as usize].insert(crate::flags::Flag::Crowded);
    let _ = app.update(Input::FlagsSoFar(so_far));
    let s = screen(&app, 120, 30);
    let row = s
        .lines()
        .find(|l| l.contains("HWT74304-s1") && l.contains(" open "))
        .unwrap();
    assert!(row.contains("crowded") && row.contains("checking"), "{s}");
    app.lc_progress = None;
    assert!(
        screen(&app, 160, 30).contains("checks running: 45 %, 1 flagged so far"),
        "{}",
        screen(&app, 160, 30)
    );
    assert!(
        app.star_flags(cat.star_of(pair))
            .contains(crate::flags::Flag::Crowded)
    );
    let _ = app.update(Input::Checks(Box::new(checks)));
    assert!(app.flags_so_far.is_none());
    assert!(app.checks.flags(pair).contains(crate::flags::Flag::Crowded));
    assert_eq!(app.live.verdict(pair), crate::odds::Verdict::Likely);
    assert!(!screen(&app, 120, 30).contains("checks running"));
}

#[test]
fn orders_sorted_in_the_background_are_the_browsers_own() {
    use crate::tui::app::{SortKey, static_order};
    let mut app = demo_app();
    let mut sent = Vec::new();
    for key in [SortKey::Star, SortKey::Period] {
        for descending in [false, true] {
            let order = static_order(&app.cat, key, descending).unwrap();
            (app.sort, app.descending) = (key, descending);
            app.refresh_view();
            assert_eq!(app.stars, order, "{} descending {descending}", key.name());
            sent.push(((key, descending), order));
        }
    }
    assert!(static_order(&app.cat, SortKey::BestOdds, false).is_none());
    // Delivered to a fresh browser, they are its orders, and survive a decision.
    let mut fresh = demo_app();
    let _ = fresh.update(Input::Orders(sent.clone()));
    act(&mut fresh, Action::NextPane);
    act(&mut fresh, Action::Park);
    for ((key, descending), order) in sent {
        (fresh.sort, fresh.descending) = (key, descending);
        fresh.refresh_view();
        assert_eq!(fresh.stars, order, "{} descending {descending}", key.name());
    }
}

/// The demo as the browser's first read keeps it (ids, star index, depth:
/// `LoadOptions::index_only`), in the browser before its values arrive;
/// and the whole catalogue of the second read.
fn values_pending() -> (App, ValuesIn) {
    values_pending_of(crate::demo::CATALOGUE_CSV)
}

/// [`values_pending`] on a catalogue's text. The values come as the
/// read's thread sends them: with the odds it built from the first read's
/// (`OddsAhead`), before any decision made while they were read.
fn values_pending_of(text: &str) -> (App, ValuesIn) {
    use crate::catalogue::{Catalogue, LoadOptions, Source};
    let source = || Source::Bytes {
        name: "catalogue.csv",
        data: text.as_bytes(),
    };
    let ids = Catalogue::load(
        source(),
        &LoadOptions {
            index_only: true,
            ..Default::default()
        },
    )
    .unwrap();
    let whole = Catalogue::load(source(), &LoadOptions::default()).unwrap();
    let model = Model {
        targets: Some(crate::demo::DEMO_TARGETS),
        ..Model::default()
    };
    let live = Live::new(&ids, model).unwrap();
    let n = ids.len();
    let mut app = App::new(
        std::sync::Arc::new(ids),
        live,
        crate::checks::Checks::none(n),
        None,
        "t".into(),
        Keymap::load(&[]).unwrap(),
    );
    app.values = Values::Reading(0);
    let _ = app.update(Input::ChecksStarted);
    let odds = OddsAhead::build(&whole, OddsFrom::of(&app.cat, &app.live));
    let values = ValuesIn {
        cat: std::sync::Arc::new(whole),
        odds: Some(Box::new(odds)),
    };
    (app, values)
}

#[test]
fn the_table_opens_on_the_ids_and_takes_the_values_when_they_are_read() {
    use crate::tui::app::{Effect, SortKey, static_order};
    let (mut app, whole) = values_pending();
    // A sort by a value asked for before the values are in.
    (app.sort, app.descending) = (SortKey::Period, false);
    app.refresh_view();
    act(&mut app, Action::NextPane);
    // No fold is asked for: there is no period to fold on.
    let moved = app.update(Input::Action(Action::Down));
    assert!(moved.is_empty(), "{moved:?}");
    assert!(!app.waiting());
    let _ = app.update(Input::ValuesRead(40));
    let s = screen(&app, 120, 30);
    assert!(s.contains("reading the values: 40 %"), "{s}");
    let wide = screen(&app, 200, 30);
    assert!(wide.contains("period asc (values to come)"), "{wide}");
    assert!(s.contains("reading the catalogue's values (40 %)"), "{s}");
    // A value not read yet is not a missing one ("-").
    let row = s.lines().find(|l| l.contains(" open ")).unwrap();
    assert!(row.contains("..."), "{s}");
    assert!(!row.contains("validated"), "{s}");
    let star = app.star();
    let c = app.candidate().unwrap();
    let effects = app.update(Input::Values(Ok(whole)));
    assert_eq!(app.values, Values::In);
    // The same star stays selected, its fold is asked for, and the sort
    // asked for earlier is the exact one of the values.
    assert_eq!(app.star(), star);
    let now = app.candidate().unwrap();
    assert_eq!(app.cat.star_of(now), app.cat.star_of(c));
    assert_eq!(effects, vec![Effect::LoadSignal(now)]);
    assert_eq!(
        app.stars,
        static_order(&app.cat, SortKey::Period, false).unwrap()
    );
    let s = screen(&app, 120, 30);
    assert!(!s.contains("values"), "{s}");
    assert!(s.contains("period asc"), "{s}");
    // The checks still run: the verdicts wait for them.
    assert!(s.contains("checks running: 0 %"), "{s}");
    // The checks of the whole catalogue arrive as ever.
    let checks = crate::checks::run(&app.cat, &Default::default());
    let _ = app.update(Input::Checks(Box::new(checks)));
    assert!(!app.verdicts_withheld());
    assert!(screen(&app, 120, 30).contains("validated"));
}

#[test]
fn values_of_other_rows_or_a_failed_read_leave_no_verdict_validated() {
    use crate::catalogue::{Catalogue, LoadOptions, Source};
    // The file rewritten between the two reads: one row fewer.
    let text = crate::demo::CATALOGUE_CSV;
    let last = text.trim_end().rfind('\n').unwrap() + 1;
    let shorter = &text[..last];
    let other = Catalogue::load(
        Source::Bytes {
            name: crate::demo::NAME,
            data: shorter.as_bytes(),
        },
        &LoadOptions::default(),
    )
    .unwrap();
    let failed: Result<ValuesIn, String> = Err("disk gone".into());
    for (read, said) in [
        (
            Ok(std::sync::Arc::new(other).into()),
            "changed between its two reads",
        ),
        (failed, "could not be read: disk gone"),
    ] {
        let (mut app, _) = values_pending();
        let validated = (0..app.cat.len() as u32)
            .find(|&c| app.live.verdict(c) == crate::odds::Verdict::Validated)
            .unwrap();
        let _ = app.update(Input::Values(read));
        assert_eq!(app.values, Values::Missing);
        assert!(app.message.as_deref().unwrap().contains(said));
        assert!(app.verdicts_withheld() && !app.checks_pending);
        // Nothing that needs a value: no fold, no figure, no verdict.
        act(&mut app, Action::NextPane);
        assert!(app.update(Input::Action(Action::Down)).is_empty());
        act(&mut app, Action::WriteFigure);
        assert!(app.message.as_deref().unwrap().contains("no figure"));
        typed_filter(&mut app, "verdict:validated");
        assert!(app.stars.is_empty());
        typed_filter(&mut app, "");
        app.go_to(validated);
        app.message = None;
        let s = screen(&app, 120, 30);
        let row = s
            .lines()
            .find(|l| l.contains(app.cat.candidate_id(validated)) && l.contains(" open "))
            .unwrap();
        assert!(row.contains("unchecked") && row.contains('?'), "{s}");
        assert!(s.contains("? validated"), "{s}");
    }
}

#[test]
fn checks_that_failed_leave_no_verdict_validated() {
    let (mut app, _) = checks_pending();
    let _ = app.update(Input::ChecksFailed("the checks stopped".into()));
    assert!(app.verdicts_withheld());
    typed_filter(&mut app, "verdict:validated");
    assert!(app.stars.is_empty());
    typed_filter(&mut app, "!verdict:validated");
    assert_eq!(app.stars.len(), app.cat.star_count());
    act(&mut app, Action::NextPane);
    act(&mut app, Action::WriteFigure);
    assert!(app.message.as_deref().unwrap().contains("no figure"));
}

#[test]
fn what_the_loader_says_of_the_values_is_said_when_they_arrive() {
    // A stellar radius of 0 is a placeholder, read as unknown: a note only
    // the read of the values can make.
    let text = "star,candidate,period,epoch,depth,duration,star_radius\n\
                ZZ1,ZZ1-a,3,1,100,2,0\nZZ2,ZZ2-a,5,1,200,3,1.1\n";
    let (mut app, whole) = values_pending_of(text);
    assert!(app.cat.load_warnings().is_empty());
    app.message = Some("the ledger's word".into());
    let _ = app.update(Input::Values(Ok(whole)));
    assert_eq!(app.values, Values::In);
    let said = app.message.as_deref().unwrap();
    assert!(said.starts_with("the ledger's word · 1 "), "{said}");
    assert!(said.contains("read as unknown"), "{said}");
}

#[test]
fn a_decision_for_a_whole_filter_waits_for_what_the_filter_reads() {
    let (mut app, whole) = values_pending();
    let checks = crate::checks::run(&whole.cat, &Default::default());
    // A clause on a value not read yet would match none (or, negated, all).
    for (filter, waits) in [
        ("period<3", Some("not read yet")),
        ("radius>2", Some("not read yet")),
        ("flag:crowded", Some("checks have not given")),
        ("verdict:likely", Some("checks have not given")),
        ("k=3 decision:open", None),
    ] {
        typed_filter(&mut app, filter);
        app.message = None;
        act(&mut app, Action::ApplyToFilter);
        match waits {
            Some(why) => {
                assert_eq!(app.mode, Mode::Normal, "{filter}");
                assert!(app.message.as_deref().unwrap().contains(why), "{filter}");
            }
            None => {
                assert_eq!(app.mode, Mode::Bulk, "{filter}");
                act(&mut app, Action::Close);
            }
        }
    }
    // Once the values are in, a value clause may decide; a flag waits for
    // the checks, then may too.
    let _ = app.update(Input::Values(Ok(whole)));
    typed_filter(&mut app, "period<3");
    act(&mut app, Action::ApplyToFilter);
    assert_eq!(app.mode, Mode::Bulk);
    act(&mut app, Action::Close);
    typed_filter(&mut app, "flag:crowded");
    act(&mut app, Action::ApplyToFilter);
    assert_eq!(app.mode, Mode::Normal);
    let _ = app.update(Input::Checks(Box::new(checks)));
    act(&mut app, Action::ApplyToFilter);
    assert_eq!(app.mode, Mode::Bulk);
}

#[test]
fn the_odds_are_built_again_from_the_values_with_every_decision() {
    // An fpp column sets each candidate's prior: a value the ids' read
    // does not keep. The odds before the values are the ids' alone.
    let text = "star,candidate,period,epoch,depth,duration,fpp\n\
                ZZ1,ZZ1-a,3,1,100,2,0.9\nZZ1,ZZ1-b,5,1,200,3,0.001\n\
                ZZ1,ZZ1-c,9,1,150,3,0.01\nZZ2,ZZ2-a,4,1,90,2,0.5\n";
    let (mut app, whole) = values_pending_of(text);
    let model = app.live.model().clone();
    let c = app.cat.find_candidate("ZZ1-c").unwrap();
    app.go_to(c);
    act(&mut app, Action::NextPane);
    act(&mut app, Action::Park);
    let _ = app.update(Input::Values(Ok(whole)));
    let now = crate::tui::app::decisions_of(&app.cat, &app.live);
    assert!(now[c as usize] != crate::decision::Decision::Open);
    let fresh = crate::session::odds_with(
        &app.cat,
        model,
        &crate::checks::Checks::none(app.cat.len()),
        now,
        &[],
        Vec::new(),
    )
    .unwrap();
    assert!(app.live.same_odds_state(&fresh));
    let a = app.cat.find_candidate("ZZ1-a").unwrap();
    let b = app.cat.find_candidate("ZZ1-b").unwrap();
    assert_eq!(app.live.odds(a), fresh.odds(a));
    // The priors differ by candidate now: fpp 0.9 against 0.001.
    assert!(app.live.odds(a).unwrap() < app.live.odds(b).unwrap());
}

#[test]
fn a_star_rejected_before_the_values_holds_its_other_id_once_they_arrive() {
    // P1 and Q7 are one star under two ids, 0.4″ apart: only the values
    // (the positions) tell it. Invented.
    let mut text = String::from("star,candidate,period,epoch,depth,duration,ra_deg,dec_deg\n");
    for i in 0..40 {
        text.push_str(&format!(
            "F{i},F{i}-a,{}.3,1,100,2,{}.5,-30\n",
            2 + i % 7,
            i * 3
        ));
    }
    text.push_str(
        "P1,P1-a,3.1,1,900,2,150.0,20.0\nP1,P1-b,7.7,1,400,3,150.0,20.0\n\
         Q7,Q7-a,5.2,1,300,2,150.0001,20.0\n",
    );
    let (mut app, whole) = values_pending_of(&text);
    let p = app.cat.find_candidate("P1-a").unwrap();
    let q = app.cat.find_candidate("Q7-a").unwrap();
    app.go_to(p);
    act(&mut app, Action::NextPane);
    act(&mut app, Action::Reject);
    act(&mut app, Action::Select);
    assert!(app.live.decision(p).is_rejected());
    // Without positions, nothing ties Q7 to P1 yet.
    assert_eq!(app.live.status(q), crate::odds::Status::Counted);
    let _ = app.update(Input::Values(Ok(whole)));
    assert_ne!(app.live.status(q), crate::odds::Status::Counted);
}

#[test]
fn the_odds_built_with_the_values_on_their_thread_are_taken_when_nothing_was_decided_meanwhile() {
    // Odds planted as the read's thread's, told apart by their threshold.
    let planted = |app: &App, whole: &ValuesIn| {
        let model = crate::odds::Model {
            threshold: 12345.0,
            ..app.live.model().clone()
        };
        let odds = crate::odds::Live::new(&whole.cat, model).unwrap();
        ValuesIn {
            cat: std::sync::Arc::clone(&whole.cat),
            odds: Some(Box::new(OddsAhead::planted(
                OddsFrom::of(&app.cat, &app.live),
                odds,
            ))),
        }
    };
    let (mut app, whole) = values_pending();
    let values = planted(&app, &whole);
    let _ = app.update(Input::Values(Ok(values)));
    assert_eq!(app.values, Values::In);
    assert_eq!(app.live.model().threshold, 12345.0);
    // A decision made while the values were read: the odds are built
    // again, with it, and the planted ones dropped.
    let (mut app, whole) = values_pending();
    let values = planted(&app, &whole);
    let c = app.candidate().unwrap();
    act(&mut app, Action::NextPane);
    act(&mut app, Action::Park);
    let _ = app.update(Input::Values(Ok(values)));
    assert_ne!(app.live.model().threshold, 12345.0);
    assert_eq!(app.live.decision(c), crate::decision::Decision::Parked);
    // Unplanted, the thread's odds are the odds the browser would build.
    let (mut app, whole) = values_pending();
    let from = OddsFrom::of(&app.cat, &app.live);
    let fresh = crate::session::odds_with(
        &whole.cat,
        app.live.model().clone(),
        &crate::checks::Checks::none(whole.cat.len()),
        crate::tui::app::decisions_of(&app.cat, &app.live),
        app.live.unseen_fps(),
        app.live.disputes().to_vec(),
    )
    .unwrap();
    let _ = app.update(Input::Values(Ok(whole)));
    assert_eq!(OddsFrom::of(&app.cat, &app.live), from);
    assert!(app.live.same_odds_state(&fresh));
}
