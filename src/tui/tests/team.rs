//! The browser with a team's ledger: where vetters disagree follows each
//! decision made in it.

use super::*;
use crate::decision::Decision;
use crate::ledger::NewDecision;

#[test]
fn where_vetters_disagree_follows_each_decision() {
    let (dir, mut app) = demo_app_with_ledger("team");
    act(&mut app, Action::Select);
    let c = app.candidate().unwrap();
    let id = app.cat.candidate_id(c).to_string();
    let star = app.cat.star_id(app.cat.star_of(c)).to_string();
    // Another vetter kept it before this browser's vetter looks at it.
    app.ledger
        .as_mut()
        .unwrap()
        .record(&NewDecision {
            candidate: &id,
            star: &star,
            vetter: "other",
            decision: Decision::Kept,
            note: None,
            undoes: None,
        })
        .unwrap();
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
        .sighting_note(&source, "fnv1a64:01", app.cat.len(), Some("s0"))
        .unwrap();
    app.message = Some("1 decided candidates are not in the catalogue: X-1".into());
    let _ = app.update(Input::Seen(Ok(("fnv1a64:02".into(), "s1".into()))));
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
    let _ = app.update(Input::Seen(Ok(("fnv1a64:03".into(), "s2".into()))));
    assert!(app.message.unwrap().contains("changed since"));
    let _ = std::fs::remove_dir_all(dir);
}
