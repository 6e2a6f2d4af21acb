//! The browser's work done in the background: the checks (and the odds
//! built with them) arriving while the vetter decides, and the orders
//! sorted ahead of their first use.

use super::*;

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
    let built = crate::session::odds_with(&cat, model, &checks, at_start, &[]);
    let _ = app.update(Input::ChecksBuilt(Box::new((checks.clone(), built))));
    assert!(!app.checks_pending);
    assert_eq!(app.live.decision(c), rejected);
    // The odds of the checks and of every decision now, as if built then.
    let now = crate::tui::app::decisions_of(&cat, &app.live);
    let fresh =
        crate::session::odds_with(&cat, app.live.model().clone(), &checks, now, &[]).unwrap();
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
