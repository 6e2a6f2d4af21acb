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
