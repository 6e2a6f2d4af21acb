//! The browser without a terminal: actions → state, and rendering on
//! ratatui's TestBackend at 80x24 and at a tiny size.

use crate::tui::app::Hits;
use ratatui::Terminal;
use ratatui::backend::TestBackend;

use super::app::{Action, App, Input, Mode, PROMPT_MAX, Pane};
use super::draw::{Look, draw};
use super::keymap::Keymap;
use crate::decision::Decision;
use crate::odds::{Live, Model};

mod background;
mod other_ids;
mod screens;
mod team;

fn demo_app() -> App {
    demo_app_with(None)
}

/// The demo browser state, with a ledger or with decisions in memory.
fn demo_app_with(ledger: Option<crate::ledger::Ledger>) -> App {
    let cat = crate::demo::catalogue().unwrap();
    app_of(cat, crate::demo::DEMO_TARGETS, ledger)
}

/// The browser on a catalogue, its checks run, N targets, every candidate open.
fn app_of(
    cat: crate::catalogue::Catalogue,
    targets: u64,
    ledger: Option<crate::ledger::Ledger>,
) -> App {
    let checks = crate::checks::run(&cat, &Default::default());
    let model = Model {
        targets: Some(targets),
        ..Model::default()
    };
    let live = Live::with_state(
        &cat,
        model,
        checks.all_flags().to_vec(),
        checks.groups().clone(),
        vec![Decision::Open; cat.len()],
    )
    .unwrap();
    App::new(
        std::sync::Arc::new(cat),
        live,
        checks,
        ledger,
        "tester".into(),
        Keymap::load(&[]).unwrap(),
    )
}

/// The browser on a catalogue before its checks arrive (they run on a
/// background thread), N targets, every candidate open, and those checks.
fn checks_pending_on(
    cat: crate::catalogue::Catalogue,
    targets: u64,
) -> (App, crate::checks::Checks) {
    let model = Model {
        targets: Some(targets),
        ..Model::default()
    };
    let live = Live::new(&cat, model).unwrap();
    let checks = crate::checks::run(&cat, &Default::default());
    let n = cat.len();
    let mut app = App::new(
        std::sync::Arc::new(cat),
        live,
        crate::checks::Checks::none(n),
        None,
        "t".into(),
        Keymap::load(&[]).unwrap(),
    );
    app.checks_pending = true;
    (app, checks)
}

/// The demo browser with a ledger in a fresh scratch folder (returned, to
/// be removed by the test).
fn demo_app_with_ledger(tag: &str) -> (std::path::PathBuf, App) {
    let dir = std::env::temp_dir().join(format!("starsift-tui-{tag}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let ledger = crate::ledger::Ledger::open(&dir.join("l.sqlite")).unwrap();
    (dir, demo_app_with(Some(ledger)))
}

/// The ledger's history of candidate `c`, oldest first.
fn ledger_history(app: &App, c: crate::catalogue::CandidateId) -> Vec<crate::ledger::Entry> {
    let ledger = app.ledger.as_ref().expect("a browser with a ledger");
    ledger.history(Some(app.cat.candidate_id(c))).unwrap()
}

fn act(app: &mut App, a: Action) {
    let _ = app.update(Input::Action(a));
}

fn typed(app: &mut App, text: &str) {
    for c in text.chars() {
        let _ = app.update(Input::Char(c));
    }
}

/// Where a frame of `w` x `h` draws the lists.
fn frame_hits(app: &App, w: u16, h: u16) -> Hits {
    let mut t = Terminal::new(TestBackend::new(w, h)).unwrap();
    let mut hits = Hits::default();
    t.draw(|f| {
        hits = draw(
            app,
            f,
            Look {
                palette: super::draw::Palette::None,
                ascii: true,
            },
        )
    })
    .unwrap();
    hits
}

fn screen(app: &App, w: u16, h: u16) -> String {
    let mut t = Terminal::new(TestBackend::new(w, h)).unwrap();
    t.draw(|f| {
        draw(
            app,
            f,
            Look {
                palette: super::draw::Palette::None,
                ascii: true,
            },
        );
    })
    .unwrap();
    let buf = t.backend().buffer().clone();
    (0..h)
        .map(|y| {
            (0..w)
                .map(|x| buf[(x, y)].symbol().to_string())
                .collect::<String>()
                .trim_end()
                .to_string()
        })
        .collect::<Vec<_>>()
        .join("\n")
}

#[test]
fn rejecting_one_of_three_drops_the_siblings_to_two_candidate_odds() {
    let mut app = demo_app();
    typed_filter(&mut app, "k=3");
    assert!(app.stars.iter().all(|&s| app.cat.members(s).len() == 3));
    act(&mut app, Action::Select);
    assert_eq!(app.focus, Pane::Candidates);
    let members = app.members().to_vec();
    let before = app.live.odds(members[1]).unwrap();
    let what_if = app.what_if();
    // The what-if line says both outcomes where it has room, and the
    // reason picker says what each reason does.
    let s = screen(&app, 120, 24);
    assert!(
        s.contains("if rejected:") && s.contains("as a binary or blend: all held back"),
        "{s}"
    );
    // Rejected as an artefact (the third reason): the siblings count on.
    act(&mut app, Action::Reject);
    assert!(matches!(app.mode, Mode::Reasons { .. }));
    let s = screen(&app, 80, 24);
    assert!(
        s.contains("eclipsing-binary siblings held back")
            && s.contains("artefact         siblings at k=2"),
        "{s}"
    );
    act(&mut app, Action::Down);
    act(&mut app, Action::Down);
    act(&mut app, Action::Select);
    assert_eq!(
        app.live.decision(members[0]),
        Decision::Rejected(crate::decision::Reason::Artefact)
    );
    let after = app.live.odds(members[1]).unwrap();
    assert!(after < before);
    assert_eq!(what_if[0].2, after, "the what-if line said so");
    assert_eq!(app.live.counts().rejected, 1);
    // Undo and redo.
    act(&mut app, Action::Undo);
    assert_eq!(app.live.decision(members[0]), Decision::Open);
    assert_eq!(app.live.odds(members[1]), Some(before));
    act(&mut app, Action::Redo);
    assert!(app.live.decision(members[0]).is_rejected());
    act(&mut app, Action::Undo);
    // Rejected as a blend (the second reason): a star known to host a false
    // positive, whose siblings are held back at their prior odds.
    act(&mut app, Action::Reject);
    act(&mut app, Action::Down);
    act(&mut app, Action::Select);
    assert_eq!(
        app.live.decision(members[0]),
        Decision::Rejected(crate::decision::Reason::Blend)
    );
    for &m in &members[1..] {
        assert_eq!(app.live.status(m), crate::odds::Status::Held);
        assert_ne!(app.live.verdict(m), crate::odds::Verdict::Validated);
    }
}

/// Replaces the filter through its prompt (which opens holding the current one).
fn typed_filter(app: &mut App, text: &str) {
    act(app, Action::Filter);
    for _ in 0..app.filter.text.chars().count() {
        let _ = app.update(Input::Backspace);
    }
    typed(app, text);
    act(app, Action::Select);
    assert!(matches!(app.mode, Mode::Normal), "{:?}", app.mode);
}

#[test]
fn filter_errors_stay_at_the_prompt_with_the_position() {
    let mut app = demo_app();
    act(&mut app, Action::Filter);
    typed(&mut app, "odds>=100 peroid<3");
    act(&mut app, Action::Select);
    match &app.mode {
        Mode::Prompt { error: Some(e), .. } => assert_eq!(e.pos, 10),
        m => panic!("{m:?}"),
    }
    let s = screen(&app, 80, 24);
    assert!(s.contains("at column 11"), "{s}");
    act(&mut app, Action::Close);
    assert!(matches!(app.mode, Mode::Normal));
}

#[test]
fn keep_advances_to_the_next_open_candidate_and_find_jumps() {
    let mut app = demo_app();
    act(&mut app, Action::Select);
    let first = app.candidate().unwrap();
    act(&mut app, Action::Keep);
    assert_eq!(app.live.decision(first), Decision::Kept);
    assert_ne!(app.candidate(), Some(first));
    assert_eq!(app.live.decision(app.candidate().unwrap()), Decision::Open);
    act(&mut app, Action::Find);
    typed(&mut app, "HWT20300-s3");
    act(&mut app, Action::Select);
    assert_eq!(
        app.cat.candidate_id(app.candidate().unwrap()),
        "HWT20300-s3"
    );
    act(&mut app, Action::SortNext);
    act(&mut app, Action::SortReverse);
    assert_eq!(
        app.cat.candidate_id(app.candidate().unwrap()),
        "HWT20300-s3",
        "the selection survives a sort"
    );
}

#[test]
fn decisions_go_to_the_ledger_first_and_show_in_its_pane() {
    let (dir, mut app) = demo_app_with_ledger("ledger");
    act(&mut app, Action::Select);
    let c = app.candidate().unwrap();
    act(&mut app, Action::Park);
    assert_eq!(app.ledger.as_ref().unwrap().len().unwrap(), 1);
    act(&mut app, Action::Undo);
    let h = ledger_history(&app, c);
    assert_eq!(h.len(), 2, "undo is a new row");
    assert_eq!(h[1].undoes, Some(h[0].id));
    app.advance = false;
    act(&mut app, Action::ShowLedger);
    let s = screen(&app, 100, 30);
    assert!(
        s.contains("Ledger - 2 entries") && s.contains("tester"),
        "{s}"
    );
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_position_is_remembered_and_restored() {
    let mut app = demo_app();
    act(&mut app, Action::Find);
    typed(&mut app, "HWT20300-s2");
    act(&mut app, Action::Select);
    act(&mut app, Action::SortNext);
    let p = app.position();
    assert_eq!(p.candidate.as_deref(), Some("HWT20300-s2"));
    let mut fresh = demo_app();
    fresh.restore(&p);
    assert_eq!(fresh.position(), p);
    // A filter that no longer parses and a vanished candidate are passed over.
    fresh.restore(&super::app::Position {
        candidate: Some("GONE-1".into()),
        filter: "wobble>1".into(),
        ..p.clone()
    });
    assert!(fresh.filter.is_empty());
}

#[test]
fn a_decision_applies_to_the_whole_filter_after_confirmation() {
    let mut app = demo_app();
    act(&mut app, Action::ApplyToFilter);
    assert!(
        matches!(app.mode, Mode::Normal),
        "no filter, no bulk decision"
    );
    typed_filter(&mut app, "k>=5");
    let n = app.bulk_targets(Decision::Parked).len();
    assert!(n > 0);
    act(&mut app, Action::ApplyToFilter);
    act(&mut app, Action::Park);
    match app.mode {
        Mode::Confirm { count, .. } => assert_eq!(count, n),
        ref m => panic!("{m:?}"),
    }
    let s = screen(&app, 100, 30);
    assert!(s.contains(&format!("for {n} candidates")), "{s}");
    act(&mut app, Action::Select);
    assert_eq!(
        (0..app.cat.len() as u32)
            .filter(|&c| app.live.decision(c) == Decision::Parked)
            .count(),
        n
    );
    // Rejecting them all takes them out of their systems.
    act(&mut app, Action::ApplyToFilter);
    act(&mut app, Action::Reject);
    act(&mut app, Action::Select);
    act(&mut app, Action::Select);
    assert_eq!(app.live.counts().rejected, n);
    // One undo takes the whole bulk rejection back (to parked), one redo
    // makes it again.
    act(&mut app, Action::Undo);
    assert_eq!(app.live.counts().rejected, 0);
    let parked = |app: &App| {
        (0..app.cat.len() as u32)
            .filter(|&c| app.live.decision(c) == Decision::Parked)
            .count()
    };
    assert_eq!(parked(&app), n);
    act(&mut app, Action::Redo);
    assert_eq!(app.live.counts().rejected, n);
    act(&mut app, Action::Undo);
    act(&mut app, Action::Undo);
    assert_eq!(
        parked(&app),
        0,
        "two undos: the rejection, then the parking"
    );
}

#[test]
fn a_note_typed_in_the_reason_picker_goes_to_the_ledger() {
    let (dir, mut app) = demo_app_with_ledger("note");
    act(&mut app, Action::NextPane);
    let c = app.candidate().unwrap();
    act(&mut app, Action::Reject);
    act(&mut app, Action::Down);
    // Letters type into the note, even those bound to actions elsewhere.
    typed(&mut app, "odd/even x2");
    let _ = app.update(Input::Backspace);
    let s = screen(&app, 80, 24);
    assert!(s.contains("note: odd/even x_"), "{s}");
    act(&mut app, Action::Select);
    assert_eq!(
        app.live.decision(c),
        Decision::Rejected(crate::decision::ALL_REASONS[1])
    );
    let h = ledger_history(&app, c);
    assert_eq!(h.last().unwrap().note.as_deref(), Some("odd/even x"));
    // Undo, then redo: the redone decision keeps its note.
    act(&mut app, Action::Undo);
    act(&mut app, Action::Redo);
    let h = ledger_history(&app, c);
    assert_eq!(h.len(), 3, "decision, undo, redo");
    assert_eq!(h.last().unwrap().note.as_deref(), Some("odd/even x"));
    let _ = std::fs::remove_dir_all(&dir);
}

/// The order of the systems pane, checked against a plain sort of the
/// quantities the pane shows (std's stable `sort_by`; ties in catalogue
/// order, by id for the id sort), for every sort in both directions,
/// before and after rejections, with and without per-candidate `fpp`.
#[test]
fn every_sort_orders_the_systems_exactly() {
    use super::app::SortKey;
    use crate::catalogue::Field;
    // An invented catalogue: sizes 1 to 4, ids out of order, equal periods,
    // and (in the second pass) per-candidate priors.
    let mut rng = crate::demo::Rng::new(11);
    let mut rows = Vec::new();
    for s in 0..400 {
        let star = format!("T{:03}{}", (s * 37) % 400, ["", "x", "b"][s % 3]);
        for m in 0..1 + rng.below(4) {
            let period = [1.5, 3.0, 3.0, 10.0][rng.below(4) as usize] + rng.below(3) as f64;
            rows.push((
                format!("{star},{star}-{m},{period},1.0,500,2.0"),
                0.05 + 0.9 * rng.f64(),
            ));
        }
    }
    for with_fpp in [false, true] {
        let mut text = String::from("star,candidate,period,epoch,depth,duration");
        text += if with_fpp { ",fpp\n" } else { "\n" };
        for (row, fpp) in &rows {
            text += row;
            text += &if with_fpp {
                format!(",{fpp:.4}\n")
            } else {
                "\n".into()
            };
        }
        let cat = crate::catalogue::Catalogue::from_text("sorts.csv", &text);
        assert_eq!(cat.has(Field::Fpp), with_fpp);
        let mut app = app_of(cat, 20_000, None);
        // Every order checked at the start and after each rejection (the
        // cached orders are kept across decisions where that stays exact).
        for round in 0..16 {
            for &sort in &SortKey::ALL {
                for descending in [false, true] {
                    app.sort = sort;
                    app.descending = descending;
                    app.refresh_view();
                    let want = reference_order(&app);
                    assert_eq!(
                        app.stars, want,
                        "sort {sort:?}, descending {descending}, fpp {with_fpp}, round {round}"
                    );
                }
            }
            // Reject one candidate (through the keys, as a vetter would),
            // alternating the sort it is made under.
            app.sort = if round % 2 == 0 {
                SortKey::BestOdds
            } else {
                SortKey::Multiplicity
            };
            app.descending = true;
            app.refresh_view();
            for _ in 0..round % 5 {
                let _ = app.update(Input::Action(Action::Down));
            }
            let _ = app.update(Input::Action(Action::NextPane));
            let _ = app.update(Input::Action(Action::Reject));
            let _ = app.update(Input::Action(Action::Select));
            let _ = app.update(Input::Action(Action::NextPane));
        }
        let rejected = (0..app.cat.len() as u32)
            .filter(|&c| app.live.decision(c).is_rejected())
            .count();
        assert!(rejected >= 10, "{rejected} rejected");
    }
}

fn reference_order(app: &App) -> Vec<crate::catalogue::StarId> {
    use super::app::SortKey;
    use crate::catalogue::Field;
    let cat = &app.cat;
    let key = |s: crate::catalogue::StarId| -> f64 {
        let m = cat.members(s);
        match app.sort {
            SortKey::BestOdds => m
                .iter()
                .filter_map(|&c| app.live.odds(c))
                .reduce(f64::max)
                .unwrap_or(-1.0),
            SortKey::Multiplicity => m.iter().filter(|&&c| app.live.k(c) > 0).count() as f64,
            SortKey::Flags => app.star_flags(s).iter().count() as f64,
            SortKey::Star => 0.0,
            SortKey::Period => m
                .iter()
                .map(|&c| cat.value(Field::PeriodD, c).unwrap())
                .fold(f64::INFINITY, f64::min),
        }
    };
    let mut v: Vec<crate::catalogue::StarId> = (0..cat.star_count() as u32).collect();
    v.sort_by(|&a, &b| {
        let o = key(a).total_cmp(&key(b)).then_with(|| match app.sort {
            SortKey::Star => cat.star_id(a).cmp(cat.star_id(b)),
            _ => std::cmp::Ordering::Equal,
        });
        let o = if app.descending { o.reverse() } else { o };
        o.then(a.cmp(&b))
    });
    v
}

#[test]
fn the_candidates_pane_sorts_its_members() {
    use super::app::CandidateSort;
    let mut app = demo_app();
    act(&mut app, Action::NextPane);
    act(&mut app, Action::Down);
    let picked = app.candidate().unwrap();
    let period = |app: &App, c| app.cat.value(crate::catalogue::Field::PeriodD, c).unwrap();
    // s in the candidates pane: file order → period, ascending.
    act(&mut app, Action::SortNext);
    assert_eq!(app.cand_sort, CandidateSort::Period);
    let m = app.members();
    assert!(
        m.windows(2)
            .all(|w| period(&app, w[0]) <= period(&app, w[1]))
    );
    assert_eq!(
        app.candidate(),
        Some(picked),
        "the selection follows the candidate"
    );
    act(&mut app, Action::SortReverse);
    let m = app.members();
    assert!(
        m.windows(2)
            .all(|w| period(&app, w[0]) >= period(&app, w[1]))
    );
    assert!(screen(&app, 100, 30).contains("by period desc"));
    // The systems' sort is untouched, and the order is remembered.
    assert_eq!(app.sort, super::app::SortKey::BestOdds);
    let p = app.position();
    let mut fresh = demo_app();
    fresh.restore(&p);
    assert_eq!(
        (fresh.cand_sort, fresh.cand_descending),
        (CandidateSort::Period, true)
    );
    assert_eq!(fresh.candidate(), Some(picked));
}

#[test]
fn clicks_select_rows_and_the_wheel_scrolls() {
    let mut app = demo_app();
    // The lists' places come from a frame; the event loop keeps the last.
    let hits = frame_hits(&app, 100, 30);
    let (rows, first) = hits.systems;
    assert!(rows.height > 5 && first == 0);
    let pick = |app: &mut App, hits: &Hits, x: u16, y: u16| {
        if let Some((pane, row)) = hits.at(x, y) {
            let _ = app.update(Input::Pick(pane, row));
        }
    };
    // The fourth system's row.
    pick(&mut app, &hits, rows.x + 2, rows.y + 3);
    assert_eq!((app.focus, app.star_row), (Pane::Systems, 3));
    let _ = app.update(Input::Wheel(Pane::Systems, true));
    assert_eq!(app.star_row, 6);
    let _ = app.update(Input::Wheel(Pane::Systems, false));
    assert_eq!(app.star_row, 3);
    let hits = frame_hits(&app, 100, 30);
    let (cands, _) = hits.candidates;
    pick(&mut app, &hits, cands.x + 1, cands.y + 1);
    assert_eq!((app.focus, app.cand_row), (Pane::Candidates, 1));
    // Outside the lists, or under an overlay, nothing happens.
    assert_eq!(hits.at(0, 29), None);
    act(&mut app, Action::Help);
    pick(&mut app, &hits, rows.x + 2, rows.y);
    assert_eq!(app.star_row, 3);
}

/// The screen as snapshot files (insta; `cargo insta review` or
/// `INSTA_UPDATE=always cargo test` after a deliberate change): the demo's
/// first system at 80x24 with the reason picker open, the odd/even view,
/// and the too-small message at 20x6.
#[test]
fn snapshots_at_80x24_60x16_and_20x6() {
    let mut app = demo_app();
    insta::assert_snapshot!("start_80x24", screen(&app, 80, 24));
    insta::assert_snapshot!("start_60x16", screen(&app, 60, 16));
    act(&mut app, Action::NextPane);
    act(&mut app, Action::SignalView);
    insta::assert_snapshot!("odd_even_80x24", screen(&app, 80, 24));
    act(&mut app, Action::Reject);
    typed(&mut app, "secondary at 0.5");
    insta::assert_snapshot!("reject_picker_80x24", screen(&app, 80, 24));
    insta::assert_snapshot!("reject_picker_60x16", screen(&app, 60, 16));
    insta::assert_snapshot!("too_small_20x6", screen(&app, 20, 6));
}

#[test]
fn find_takes_exact_ids_then_parts_of_ids_then_fuzzy() {
    let mut app = demo_app();
    let id = |app: &App| app.cat.candidate_id(app.candidate().unwrap()).to_string();
    act(&mut app, Action::Find);
    typed(&mut app, "HWT20300-s2");
    assert_eq!(id(&app), "HWT20300-s2", "exact");
    act(&mut app, Action::Close);
    act(&mut app, Action::Find);
    typed(&mut app, "hwt20300-s2");
    assert_eq!(id(&app), "HWT20300-s2", "lower case matches either case");
    act(&mut app, Action::Close);
    act(&mut app, Action::Find);
    typed(&mut app, "HWT20300");
    assert_eq!(
        app.cat.star_id(app.star().unwrap()),
        "HWT20300",
        "a star id goes to its first candidate"
    );
    act(&mut app, Action::Close);
    // A typo: no id contains it, the fuzzy match still finds the candidate.
    act(&mut app, Action::Find);
    typed(&mut app, "HWT2030s2");
    act(&mut app, Action::Select);
    assert_eq!(id(&app), "HWT20300-s2", "fuzzy");
}

#[test]
fn a_rejected_candidate_has_k_zero_in_filters() {
    let mut app = demo_app();
    // Held-back candidates (flags, copies of another signal) have k = 0 too.
    typed_filter(&mut app, "k<1 decision:rejected");
    assert!(app.stars.is_empty(), "nothing rejected yet");
    typed_filter(&mut app, "");
    act(&mut app, Action::NextPane);
    let c = app.candidate().unwrap();
    act(&mut app, Action::Reject);
    act(&mut app, Action::Select);
    assert!(app.live.decision(c).is_rejected());
    typed_filter(&mut app, "k<1 decision:rejected");
    assert_eq!(app.stars, vec![app.cat.star_of(c)]);
    // Its siblings are still counted in the smaller system.
    let k = app.cat.members(app.cat.star_of(c)).len() - 1;
    typed_filter(&mut app, &format!("k={k} decision:open"));
    assert!(app.stars.contains(&app.cat.star_of(c)));
}

#[test]
fn the_filter_shows_exactly_the_stars_with_a_matching_candidate() {
    let mut app = demo_app();
    let texts = [
        "k>1",
        "k<1",
        "k>=2 k<=3",
        "k=0 decision:rejected",
        "star:hwt2",
        "!star:0 k>=3",
        "depth>300 snr>10 k>=2",
        "period<20 flag:near-twin",
        "period!=3.5 duration<4",
        "radius>2 !flag:odd-even",
        "odds>=10 decision:open",
        "verdict:likely k>=2 star:hwt",
        "decision:parked",
        "id:s2 teff>5000",
        "reason:eclipsing-binary k>=1",
        "mag<13 impact<0.5",
    ];
    let check = |app: &mut App| {
        for parallel_from in [usize::MAX, 0] {
            app.parallel_from = parallel_from;
            for text in texts {
                let before = app.star();
                typed_filter(app, text);
                // No candidate is kept, so these are all the matching ones.
                let mut want: Vec<_> = app
                    .bulk_targets(Decision::Kept)
                    .into_iter()
                    .map(|c| app.cat.star_of(c))
                    .collect();
                want.sort_unstable();
                want.dedup();
                let mut shown = app.stars.clone();
                shown.sort_unstable();
                // The star just decided on may stay in view (pinned).
                shown.retain(|&s| want.binary_search(&s).is_ok() || Some(s) != before);
                assert_eq!(
                    shown, want,
                    "{text}, two threads from {parallel_from} stars"
                );
                typed_filter(app, "");
            }
        }
    };
    // Before any decision (every `k` is decided by the star), and after.
    check(&mut app);
    // Rejections and parks on a spread of systems, so that `k`, decisions
    // and verdicts differ from candidate to candidate.
    for step in 0..24 {
        app.focus = Pane::Systems;
        for _ in 0..7 {
            act(&mut app, Action::Down);
        }
        act(&mut app, Action::NextPane);
        if step % 3 == 0 {
            act(&mut app, Action::Park);
        } else {
            act(&mut app, Action::Reject);
            act(&mut app, Action::Select);
        }
    }
    check(&mut app);
}

#[test]
fn long_ledger_entries_wrap_and_the_newest_stays_in_view() {
    let (dir, mut app) = demo_app_with_ledger("wrap");
    app.advance = false;
    act(&mut app, Action::NextPane);
    for _ in 0..10 {
        act(&mut app, Action::Park);
        act(&mut app, Action::Reopen);
    }
    act(&mut app, Action::Reject);
    typed(
        &mut app,
        "secondary at phase 0.5 is four tenths of the primary, so this is a binary END",
    );
    act(&mut app, Action::Select);
    act(&mut app, Action::ShowLedger);
    let s = screen(&app, 80, 24);
    assert!(s.contains("Ledger - 21 entries"), "{s}");
    assert!(s.contains("END") && s.contains("secondary"), "{s}");
    let _ = std::fs::remove_dir_all(&dir);
}

/// A catalogue from bytes (invented rows), default options.
fn catalogue_of(name: &str, data: &[u8]) -> crate::catalogue::Catalogue {
    crate::catalogue::Catalogue::load(
        crate::catalogue::Source::Bytes { name, data },
        &Default::default(),
    )
    .unwrap()
}

#[test]
fn a_catalogue_whose_rows_were_all_skipped_sorts_and_filters_without_panic() {
    use super::app::{SortKey, static_order};
    let cat = catalogue_of(
        "all-bad.csv",
        b"star,candidate,period,epoch,depth,duration\nZZ1,ZZ1-a,-1,1,100,2\n",
    );
    assert_eq!((cat.len(), cat.star_count(), cat.skipped.len()), (0, 0, 1));
    for key in [SortKey::Star, SortKey::Period] {
        assert_eq!(static_order(&cat, key, false), Some(Vec::new()));
    }
}

#[test]
fn skipped_rows_are_said_as_the_browser_opens() {
    let cat = catalogue_of(
        "some-bad.csv",
        b"star,candidate,period,epoch,depth,duration\nZZ1,ZZ1-a,-1,1,100,2\nZZ2,ZZ2-a,3,1,100,2\nZZ3,ZZ3-a,3,1,0,2\n",
    );
    let msg = super::skipped_message(&cat).unwrap();
    assert!(
        msg.starts_with("2 rows skipped; first: line 2 (period_d: must be > 0"),
        "{msg}"
    );
    assert!(super::skipped_message(&crate::demo::catalogue().unwrap()).is_none());
    let mut app = app_of(cat, 1000, None);
    app.message = None;
    assert!(
        screen(&app, 120, 30).contains("2 rows skipped"),
        "the status line says it too"
    );
}

#[test]
fn a_paste_is_text_in_a_prompt_and_never_keys() {
    let mut app = demo_app();
    let before = app.live.counts();
    // Outside a prompt a paste of "xxxx" rejects nothing.
    let _ = app.update(Input::Paste("xxxx".into()));
    assert_eq!(app.live.counts(), before);
    assert!(
        app.message
            .as_deref()
            .unwrap_or("")
            .contains("paste ignored")
    );
    // In the filter prompt it is typed, line breaks as spaces, capped.
    let _ = app.update(Input::Action(Action::Filter));
    let _ = app.update(Input::Paste("k=3\n".into()));
    assert!(screen(&app, 100, 30).contains("k=3"));
    let _ = app.update(Input::Paste("y".repeat(100_000)));
    match &app.mode {
        Mode::Prompt { line, .. } => assert_eq!(line.text.chars().count(), PROMPT_MAX),
        other => panic!("{other:?}"),
    }
}

#[test]
fn after_a_decision_the_cursor_stays_in_the_system_while_it_has_open_candidates() {
    let mut app = demo_app();
    typed_filter(&mut app, "k=3");
    act(&mut app, Action::NextPane);
    act(&mut app, Action::Bottom);
    let star = app.star().unwrap();
    // The last candidate of a system of three: the first two are still open.
    act(&mut app, Action::Keep);
    assert_eq!(app.star(), Some(star), "moved to another system");
    let c = app.candidate().unwrap();
    assert_eq!(app.live.decision(c), Decision::Open);
    act(&mut app, Action::Keep);
    assert_eq!(app.star(), Some(star));
    act(&mut app, Action::Keep);
    // All three decided: now the next system.
    assert_ne!(app.star(), Some(star));
}

#[test]
fn prompts_edit_as_a_shell_and_recall_earlier_filters() {
    let mut app = demo_app();
    act(&mut app, Action::Filter);
    typed(&mut app, "k>=2");
    act(&mut app, Action::Select);
    // The old filter comes back selected: typing replaces it.
    act(&mut app, Action::Filter);
    typed(&mut app, "k>=3");
    let text = |app: &App| match &app.mode {
        Mode::Prompt { line, .. } => line.text.clone(),
        _ => String::from("(no prompt)"),
    };
    assert_eq!(text(&app), "k>=3");
    let _ = app.update(Input::Edit(super::app::Edit::KillToStart));
    assert_eq!(text(&app), "");
    let _ = app.update(Input::Recall(true));
    assert_eq!(text(&app), "k>=2");
    // End keeps the recalled text for editing.
    let _ = app.update(Input::Edit(super::app::Edit::End));
    typed(&mut app, " odds>10");
    assert_eq!(text(&app), "k>=2 odds>10");
    let _ = app.update(Input::Edit(super::app::Edit::KillWord));
    let _ = app.update(Input::Edit(super::app::Edit::Home));
    typed(&mut app, "!flag:echo ");
    assert_eq!(text(&app), "!flag:echo k>=2 ");
    // Esc leaves the filter in effect as it was.
    act(&mut app, Action::Close);
    assert_eq!(app.filter.text, "k>=2");
    // An empty find leaves it too.
    act(&mut app, Action::Find);
    act(&mut app, Action::Select);
    assert_eq!(app.filter.text, "k>=2");
    // The history is remembered with the position.
    assert_eq!(app.position().filters, vec!["k>=2".to_string()]);
}
