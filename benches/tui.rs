//! Bench: the browser on the 1,000,000-candidate synthetic catalogue —
//! start-up to the first frame, every keystroke handled and drawn on a
//! 200x50 TestBackend (p99), and bytes written to a terminal per navigation
//! keystroke at 100x30 through a counting writer.
//!
//! Run: `cargo bench --bench tui` (uses bench-data/big-1000000.csv).

use std::io::Write;
use std::sync::Arc;
use std::time::Instant;

use ratatui::Terminal;
use ratatui::backend::{CrosstermBackend, TestBackend};
use starsift::catalogue::{Catalogue, LoadOptions, Source};
use starsift::decision::Decision;
use starsift::odds::{Live, Model};
use starsift::tui::app::{Action, App, Input, Pane, SortKey, static_order};
use starsift::tui::draw::{Look, draw};
use starsift::tui::keymap::Keymap;

struct Counting(Arc<std::sync::atomic::AtomicUsize>);

impl Write for Counting {
    fn write(&mut self, b: &[u8]) -> std::io::Result<usize> {
        self.0
            .fetch_add(b.len(), std::sync::atomic::Ordering::Relaxed);
        Ok(b.len())
    }
    fn flush(&mut self) -> std::io::Result<()> {
        Ok(())
    }
}

fn main() {
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("bench-data/big-1000000.csv");
    if !path.exists() {
        std::fs::create_dir_all(path.parent().expect("parent")).expect("dir");
        starsift::demo::write_big(&path, 1_000_000, 42).expect("write");
    }
    let look = Look {
        palette: starsift::tui::draw::Palette::Basic,
        ascii: false,
    };
    // As the browser starts: the checks run on another thread and arrive later.
    let t = Instant::now();
    let cat =
        Arc::new(Catalogue::load(Source::Path(&path), &LoadOptions::default()).expect("load"));
    let t_load = t.elapsed().as_secs_f64();
    let background = {
        let cat = Arc::clone(&cat);
        std::thread::spawn(move || starsift::checks::run(&cat, &Default::default()))
    };
    // And the orders no decision moves, as the browser sorts them.
    let orders = {
        let cat = Arc::clone(&cat);
        std::thread::spawn(move || {
            let t = Instant::now();
            let orders: Vec<_> = [SortKey::Star, SortKey::Period]
                .into_iter()
                .flat_map(|k| [(k, false), (k, true)])
                .filter_map(|(k, d)| Some(((k, d), static_order(&cat, k, d)?)))
                .collect();
            (orders, t.elapsed().as_secs_f64())
        })
    };
    let model = Model {
        targets: Some(cat.star_count() as u64 * 20),
        ..Model::default()
    };
    let n = cat.len();
    let live = Live::with_state(
        &cat,
        model,
        vec![Default::default(); n],
        starsift::checks::SignalGroups::none(),
        vec![Decision::Open; n],
    )
    .expect("model");
    let none = starsift::checks::Checks::none(n);
    let mut app = App::new(
        Arc::clone(&cat),
        live,
        none,
        None,
        "bench".into(),
        Keymap::load(&[]).expect("keys"),
    );
    let mut term = Terminal::new(TestBackend::new(200, 50)).expect("term");
    term.draw(|f| {
        draw(&app, f, look);
    })
    .expect("draw");
    println!(
        "start-up to the first frame: {:.3} s (of which loading {t_load:.3} s; checks still running)",
        t.elapsed().as_secs_f64()
    );
    let (sorted, took) = orders.join().expect("orders");
    let _ = app.update(Input::Orders(sorted));
    println!("orders by star and by period (both ways) sorted in the background in {took:.3} s");
    let checks = background.join().expect("checks");
    let ready = t.elapsed().as_secs_f64();
    let _ = app.update(Input::Checks(Box::new(checks)));
    term.draw(|f| {
        draw(&app, f, look);
    })
    .expect("draw");
    println!(
        "checks arrived and applied after {:.3} s (applying and redrawing {:.3} s)",
        t.elapsed().as_secs_f64(),
        t.elapsed().as_secs_f64() - ready
    );

    // Each sort the first time (a full sort of every star, but for the
    // orders sorted in the background).
    for _ in 0..5 {
        let t = Instant::now();
        let _ = app.update(Input::Action(Action::SortNext));
        term.draw(|f| {
            draw(&app, f, look);
        })
        .expect("draw");
        println!(
            "first sort by {:<16} {:.2} ms",
            app.sort.name(),
            t.elapsed().as_secs_f64() * 1e3
        );
    }
    let script: Vec<(&str, Vec<Input>)> = vec![
        ("move", vec![Input::Action(Action::Down)]),
        ("page", vec![Input::Action(Action::PageDown)]),
        ("sort change", vec![Input::Action(Action::SortNext)]),
        (
            "decision",
            vec![Input::Action(Action::NextPane), Input::Action(Action::Keep)],
        ),
        // A rejection as a binary: the picker opens, then the first reason;
        // each star's first such rejection looks for its other ids (one
        // pass over the catalogue).
        (
            "rejection as a binary",
            vec![Input::Action(Action::Reject), Input::Action(Action::Select)],
        ),
        // A decision makes the best-odds order stale: the next sort change
        // (here: reverse and back) sorts every star again.
        (
            "sort after a decision",
            vec![
                Input::Action(Action::Keep),
                Input::Action(Action::SortReverse),
                Input::Action(Action::SortReverse),
            ],
        ),
        (
            "filter edit",
            vec![
                Input::Action(Action::Filter),
                Input::Char('k'),
                Input::Char('>'),
                Input::Char('1'),
                Input::Action(Action::Select),
            ],
        ),
    ];
    for (name, inputs) in &script {
        let mut times = Vec::new();
        for _ in 0..40 {
            for input in inputs {
                // The sorts are the systems' sorts (in the candidates pane
                // the same keys order a system's members).
                if matches!(input, Input::Action(Action::SortNext | Action::SortReverse)) {
                    app.focus = Pane::Systems;
                }
                let t = Instant::now();
                let _ = app.update(input.clone());
                term.draw(|f| {
                    draw(&app, f, look);
                })
                .expect("draw");
                times.push(t.elapsed().as_secs_f64() * 1e3);
            }
            if *name == "filter edit" {
                let _ = app.update(Input::Action(Action::Filter));
                for _ in 0..3 {
                    let _ = app.update(Input::Backspace);
                }
                let _ = app.update(Input::Action(Action::Select));
            }
        }
        times.sort_by(f64::total_cmp);
        println!(
            "{name:<22} median {:.2} ms, p99 {:.2} ms ({} keystrokes)",
            times[times.len() / 2],
            times[(times.len() as f64 * 0.99) as usize - 1],
            times.len()
        );
    }
    // Fuzzy find: every typed character jumps to the best match.
    let mut times = Vec::new();
    let _ = app.update(Input::Action(Action::Find));
    for ch in "SYN05517".chars() {
        let t = Instant::now();
        let _ = app.update(Input::Char(ch));
        term.draw(|f| {
            draw(&app, f, look);
        })
        .expect("draw");
        times.push(t.elapsed().as_secs_f64() * 1e3);
    }
    let _ = app.update(Input::Action(Action::Close));
    times.sort_by(f64::total_cmp);
    println!(
        "find keystroke         median {:.2} ms, max {:.2} ms ({} keystrokes)",
        times[times.len() / 2],
        times[times.len() - 1],
        times.len()
    );
    // The filter apply alone, split into update and draw: one filter the
    // stars decide alone, and one that reads every member of the stars left.
    for filter in ["k>1", "depth>300 snr>10 k>=2", "period<20 flag:near-twin"] {
        let (mut up, mut dr) = (Vec::new(), Vec::new());
        for _ in 0..20 {
            for text in [filter, ""] {
                let _ = app.update(Input::Action(Action::Filter));
                for _ in 0..filter.len() {
                    let _ = app.update(Input::Backspace);
                }
                for ch in text.chars() {
                    let _ = app.update(Input::Char(ch));
                }
                let t = Instant::now();
                let _ = app.update(Input::Action(Action::Select));
                let t1 = t.elapsed().as_secs_f64() * 1e3;
                term.draw(|f| {
                    draw(&app, f, look);
                })
                .expect("draw");
                if !text.is_empty() {
                    up.push(t1);
                    dr.push(t.elapsed().as_secs_f64() * 1e3 - t1);
                }
            }
        }
        up.sort_by(f64::total_cmp);
        dr.sort_by(f64::total_cmp);
        println!(
            "filter apply `{filter}`: update min {:.2} ms, median {:.2} ms, max {:.2} ms; draw median {:.2} ms",
            up[0],
            up[up.len() / 2],
            up[up.len() - 1],
            dr[dr.len() / 2]
        );
    }
    // Bytes per navigation keystroke at 100x30.
    let count = Arc::new(std::sync::atomic::AtomicUsize::new(0));
    let mut term =
        Terminal::new(CrosstermBackend::new(Counting(Arc::clone(&count)))).expect("term");
    term.resize(ratatui::layout::Rect::new(0, 0, 100, 30))
        .expect("resize");
    term.draw(|f| {
        draw(&app, f, look);
    })
    .expect("draw");
    for (pane, name) in [
        (Pane::Systems, "system to system"),
        (Pane::Candidates, "candidate to candidate"),
    ] {
        app.focus = pane;
        let _ = app.update(Input::Action(Action::Top));
        term.draw(|f| {
            draw(&app, f, look);
        })
        .expect("draw");
        let base = count.load(std::sync::atomic::Ordering::Relaxed);
        let mut n = 0;
        for _ in 0..50 {
            // Within one system's members, down and back up.
            let a = if pane == Pane::Candidates && n % 2 == 1 {
                Action::Up
            } else {
                Action::Down
            };
            let _ = app.update(Input::Action(a));
            term.draw(|f| {
                draw(&app, f, look);
            })
            .expect("draw");
            n += 1;
        }
        println!(
            "bytes written per navigation keystroke at 100x30, {name}: {} B",
            (count.load(std::sync::atomic::Ordering::Relaxed) - base) / n
        );
    }
}
