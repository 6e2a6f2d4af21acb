//! The browser with a team's ledger: where vetters disagree, and whether
//! on a false positive, follows each decision made in it and the team's
//! decisions made meanwhile.

use super::*;
use crate::catalogue::CandidateId;
use crate::decision::Decision;
use crate::ledger::NewDecision;

/// Records in the browser's ledger, behind its back, that vetter `other`
/// decided `decision` on candidate c; the entry's row id.
fn by_other(app: &mut App, c: CandidateId, decision: Decision) -> i64 {
    let id = app.cat.candidate_id(c).to_string();
    let star = app.cat.star_id(app.cat.star_of(c)).to_string();
    app.ledger
        .as_mut()
        .unwrap()
        .record(&NewDecision {
            candidate: &id,
            star: &star,
            vetter: "other",
            decision,
            note: None,
            undoes: None,
        })
        .unwrap()
}

/// A candidate validated in a system of two or more.
fn validated_in_a_system(app: &App) -> CandidateId {
    use crate::odds::Verdict;
    (0..app.cat.len() as CandidateId)
        .find(|&c| app.live.verdict(c) == Verdict::Validated && app.live.k(c) >= 2)
        .unwrap()
}

/// The browser's ledger as the watcher reads it (its own connection, the
/// team's view).
fn read_ledger(app: &App) -> crate::ledger::Decided {
    let l = crate::ledger::Ledger::open(app.ledger.as_ref().unwrap().path()).unwrap();
    l.decided(&app.cat, None).unwrap()
}

/// Whether the browser's odds are those every command builds from its
/// ledger now (`session::odds_of`), disputes included, and those of a
/// rebuild from nothing.
fn same_as_the_commands(app: &App) -> bool {
    let mut decided = read_ledger(app);
    let fresh = crate::session::odds_of(
        &app.cat,
        app.live.model().clone(),
        &app.checks,
        Some(&mut decided),
    )
    .unwrap();
    app.live.same_odds_state(&fresh)
        && app.live.disputes() == fresh.disputes()
        && app
            .live
            .same_odds_state(&app.live.rebuilt(&app.cat).unwrap())
}

#[test]
fn where_vetters_disagree_follows_each_decision() {
    let (dir, mut app) = demo_app_with_ledger("team");
    act(&mut app, Action::Select);
    let c = app.candidate().unwrap();
    // Another vetter kept it before this browser's vetter looks at it.
    by_other(&mut app, c, Decision::Kept);
    app.advance = false;
    // The status line, once the decision's own message is gone.
    let count = |app: &mut App| {
        app.message = None;
        screen(app, 200, 30).contains("disagree 1")
    };
    assert!(app.disagree.is_empty());
    act(&mut app, Action::Park);
    assert!(app.disagree.contains(&c), "parked against kept");
    assert!(count(&mut app), "{}", screen(&app, 200, 30));
    act(&mut app, Action::Keep);
    assert!(!app.disagree.contains(&c), "both kept");
    assert!(!count(&mut app));
    // Taking the decision back is a decision too.
    act(&mut app, Action::Undo);
    assert!(app.disagree.contains(&c), "the park is in force again");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_changed_catalogue_is_said_after_the_start_notes_not_over_them() {
    let (dir, mut app) = demo_app_with_ledger("sighting");
    let source = app.cat.source.clone();
    // The ledger saw another version of this catalogue before.
    app.ledger
        .as_mut()
        .unwrap()
        .sighting_note(&source, "xxh64:01", app.cat.len(), Some("s0"), &|| None)
        .unwrap();
    app.message = Some("1 decided candidates are not in the catalogue: X-1".into());
    let _ = app.update(Input::Seen(Ok(("xxh64:02".into(), "s1".into(), None))));
    let said = app.message.clone().unwrap();
    assert!(
        said.starts_with("1 decided candidates are not in the catalogue: X-1 · "),
        "{said}"
    );
    assert!(
        said.contains("changed since this ledger last saw it"),
        "{said}"
    );
    // Without a note before it, the change is the message.
    app.message = None;
    let _ = app.update(Input::Seen(Ok(("xxh64:03".into(), "s2".into(), None))));
    assert!(app.message.unwrap().contains("changed since"));
    let _ = std::fs::remove_dir_all(dir);
}

#[test]
fn another_vetters_rejection_as_a_false_positive_holds_the_star_until_they_agree() {
    use crate::odds::{Hold, Status, Verdict};
    let (dir, mut app) = demo_app_with_ledger("dispute");
    app.advance = false;
    let c = validated_in_a_system(&app);
    app.go_to(c);
    assert_eq!(app.candidate(), Some(c));
    let members = app.cat.members(app.cat.star_of(c)).to_vec();
    // Another vetter rejected it as an eclipsing binary; this browser's
    // vetter keeps it: while they disagree, the star is held back.
    by_other(
        &mut app,
        c,
        Decision::Rejected(crate::decision::Reason::EclipsingBinary),
    );
    act(&mut app, Action::Keep);
    assert_eq!(app.live.decision(c), Decision::Kept);
    assert!(app.disagree.contains(&c));
    for &m in &members {
        assert_eq!(app.live.status(m), Status::Held);
        assert_ne!(app.live.verdict(m), Verdict::Validated);
        assert!(matches!(app.live.hold(m), Some(Hold::Disputed { fp, .. }) if fp == c));
    }
    assert!(same_as_the_commands(&app));
    let text = crate::odds::hold_text(&app.cat, &app.live, members[0]);
    assert!(
        text.contains("rejected as eclipsing-binary by other") && text.contains("kept"),
        "{text}"
    );
    // This vetter rejects it as one too: no dispute, a known false
    // positive, whose siblings are held as such.
    act(&mut app, Action::Reject);
    act(&mut app, Action::Select);
    assert_eq!(
        app.live.decision(c),
        Decision::Rejected(crate::decision::Reason::EclipsingBinary)
    );
    assert!(app.live.disputes().is_empty());
    assert!(same_as_the_commands(&app));
    // Taken back: kept again, and disputed again.
    act(&mut app, Action::Undo);
    assert_eq!(app.live.decision(c), Decision::Kept);
    assert_eq!(app.live.disputes().len(), 1);
    assert!(same_as_the_commands(&app));
    // The other vetter keeps it too: once this browser decides on it again,
    // they agree and the system counts.
    by_other(&mut app, c, Decision::Kept);
    act(&mut app, Action::Park);
    act(&mut app, Action::Keep);
    assert!(app.live.disputes().is_empty());
    assert_eq!(app.live.verdict(c), Verdict::Validated);
    assert!(same_as_the_commands(&app));
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn the_teams_decisions_made_meanwhile_are_taken_in_and_the_newer_of_two_kept() {
    use crate::decision::Reason;
    use crate::odds::{Status, Verdict};
    let (dir, mut app) = demo_app_with_ledger("team_meanwhile");
    app.advance = false;
    let c = validated_in_a_system(&app);
    let members = app.cat.members(app.cat.star_of(c)).to_vec();
    let sibling = *members.iter().find(|&&m| m != c).unwrap();
    // Another vetter rejects it as an eclipsing binary while this browser
    // is open: once the watcher's read is taken in, it is rejected here
    // too and its siblings are held, as in every command.
    by_other(&mut app, c, Decision::Rejected(Reason::EclipsingBinary));
    assert_eq!(app.live.verdict(sibling), Verdict::Validated);
    let _ = app.update(Input::Team(Box::new(read_ledger(&app))));
    assert_eq!(
        app.live.decision(c),
        Decision::Rejected(Reason::EclipsingBinary)
    );
    assert_eq!(app.live.status(sibling), Status::Held);
    assert!(same_as_the_commands(&app));
    assert!(
        app.message
            .as_deref()
            .unwrap()
            .contains("1 decision by other vetters")
    );
    // A read made before this browser's own later decision: the browser's
    // decision is the newer and stays; the dispute its keep makes stands.
    by_other(&mut app, c, Decision::Parked);
    let stale = read_ledger(&app);
    app.go_to(c);
    act(&mut app, Action::Keep);
    let _ = app.update(Input::Team(Box::new(stale.clone())));
    assert_eq!(app.live.decision(c), Decision::Kept);
    assert!(same_as_the_commands(&app));
    // A read no newer than what the browser holds changes nothing; a
    // fresh one agrees with it.
    app.message = None;
    let _ = app.update(Input::Team(Box::new(stale)));
    assert_eq!(app.live.decision(c), Decision::Kept);
    assert!(app.message.is_none());
    let _ = app.update(Input::Team(Box::new(read_ledger(&app))));
    assert_eq!(app.live.decision(c), Decision::Kept);
    assert!(same_as_the_commands(&app));
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_sighting_an_earlier_version_recorded_is_compared_the_way_it_took_it() {
    let (dir, mut app) = demo_app_with_ledger("earlier_sighting");
    let source = app.cat.source.clone();
    // An earlier version saw this catalogue, with its FNV-1a fingerprint.
    let ledger = app.ledger.as_mut().unwrap();
    ledger
        .sighting_note(&source, "fnv1a64:0a", app.cat.len(), Some("s0"), &|| None)
        .unwrap();
    assert_eq!(
        ledger.last_fingerprint(&source).as_deref(),
        Some("fnv1a64:0a")
    );
    // The background hashed it both ways: the same file, nothing said,
    // and the sighting recorded anew.
    app.message = None;
    let seen = ("xxh64:0b".into(), "s1".into(), Some("fnv1a64:0a".into()));
    let _ = app.update(Input::Seen(Ok(seen)));
    assert_eq!(app.message, None);
    let ledger = app.ledger.as_ref().unwrap();
    assert_eq!(
        ledger.last_fingerprint(&source).as_deref(),
        Some("xxh64:0b")
    );
    let _ = std::fs::remove_dir_all(dir);
}
