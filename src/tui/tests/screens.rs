//! What the browser draws: sizes from 80x24 down, palettes and ASCII,
//! text from input files made safe, the panes, dialogs and key hints.

use super::*;

#[test]
fn renders_at_80x24_and_says_so_when_too_small() {
    let mut app = demo_app();
    let s = screen(&app, 80, 24);
    assert!(s.contains("Systems 321/321"), "{s}");
    assert!(s.contains("Candidates of"), "{s}");
    assert!(s.contains("Facts"), "{s}");
    assert!(s.contains("validated"), "{s}");
    act(&mut app, Action::Help);
    let h = screen(&app, 120, 40);
    for a in Action::ALL {
        assert!(h.contains(a.name()), "help lacks {}", a.name());
    }
    let tiny = screen(&app, 20, 6);
    assert!(
        tiny.contains("starsift needs at") && tiny.contains("20x6"),
        "{tiny}"
    );
    for (w, h) in [(1, 1), (2, 3), (59, 15), (60, 16)] {
        let _ = screen(&app, w, h);
    }
}

#[test]
fn escape_sequences_in_ids_never_reach_the_screen() {
    let text = "star,candidate,period_d,epoch,depth_ppm,duration_h\nE\u{1b}[2J,E-\u{1b}]0;x\u{7}1,3,10,500,2\n";
    let cat = crate::catalogue::Catalogue::from_text("esc.csv", text);
    let app = app_of(cat, 100, None);
    let s = screen(&app, 100, 30);
    assert!(!s.contains('\u{1b}') && !s.contains('\u{7}'));
    assert!(s.contains("E\\x1b[2J"), "{s}");
}

#[test]
fn the_signal_pane_shows_odd_beside_even_and_the_secondary() {
    let mut app = demo_app();
    let s = screen(&app, 80, 24);
    assert!(s.contains("all transits"), "{s}");
    act(&mut app, Action::SignalView);
    let s = screen(&app, 80, 24);
    assert!(
        s.contains("odd - model") && s.contains("even - model"),
        "{s}"
    );
    act(&mut app, Action::SignalView);
    assert!(screen(&app, 80, 24).contains("secondary (phase 0.5)"));
    act(&mut app, Action::SignalView);
    // A tall pane shows all four at once.
    let s = screen(&app, 160, 50);
    for label in ["all transits", "odd", "even", "secondary (phase 0.5)"] {
        assert!(s.contains(label), "{label}: {s}");
    }
}

#[test]
fn palettes_paint_16_256_and_true_colour_and_none() {
    use crate::tui::draw::Palette;
    use ratatui::style::Color;
    let app = demo_app();
    let colours = |palette| {
        let mut t = Terminal::new(TestBackend::new(100, 30)).unwrap();
        t.draw(|f| {
            draw(
                &app,
                f,
                Look {
                    palette,
                    ascii: false,
                },
            );
        })
        .unwrap();
        let buf = t.backend().buffer().clone();
        buf.content().iter().map(|c| c.fg).collect::<Vec<Color>>()
    };
    let none = colours(Palette::None);
    assert!(none.iter().all(|c| *c == Color::Reset));
    assert!(colours(Palette::Basic).contains(&Color::Green));
    let indexed = colours(Palette::Indexed);
    assert!(indexed.iter().any(|c| matches!(c, Color::Indexed(_))));
    assert!(!indexed.contains(&Color::Green));
    assert!(
        colours(Palette::Rgb)
            .iter()
            .any(|c| matches!(c, Color::Rgb(..)))
    );
}

#[test]
fn the_screen_states_the_model_and_help_scrolls_to_its_statement() {
    let mut app = demo_app();
    let s = screen(&app, 80, 24);
    assert!(
        s.contains("odds under the multiplicity model, not confirmation"),
        "{s}"
    );
    assert!(s.contains("N=52000 f=0.1"), "{s}");
    act(&mut app, Action::Help);
    let top = screen(&app, 80, 24);
    assert!(top.contains("quit") && top.contains("scroll"), "{top}");
    for _ in 0..200 {
        act(&mut app, Action::Down);
    }
    let bottom = screen(&app, 80, 24);
    assert!(bottom.contains("not confirmation."), "{bottom}");
    assert_eq!(
        app.star_row, 0,
        "scrolling the help does not move the selection"
    );
    act(&mut app, Action::Close);
    assert!(matches!(app.mode, Mode::Normal));
}

#[test]
fn ascii_means_no_byte_above_127_anywhere() {
    let mut app = demo_app();
    // A candidate with data in the signal pane, facts with symbols, and
    // every overlay.
    let c = app.candidate().unwrap();
    let mut screens = vec![
        screen(&app, 80, 24),
        screen(&app, 60, 16),
        screen(&app, 200, 50),
    ];
    act(&mut app, Action::Reject);
    screens.push(screen(&app, 80, 24));
    act(&mut app, Action::Close);
    act(&mut app, Action::Help);
    screens.push(screen(&app, 80, 24));
    act(&mut app, Action::Close);
    act(&mut app, Action::Filter);
    typed(&mut app, "k>=2 ★");
    screens.push(screen(&app, 80, 24));
    for s in &screens {
        assert!(
            s.is_ascii(),
            "{}",
            s.chars().filter(|c| !c.is_ascii()).collect::<String>()
        );
        assert!(s.contains('+') && s.contains('|'), "{s}");
    }
    assert!(screens[0].contains("R_earth"), "{}", screens[0]);
    let _ = c;
}

#[test]
fn small_screens_keep_id_odds_verdict_and_decision() {
    let app = demo_app();
    for (w, h) in [(80, 24), (60, 16)] {
        let s = screen(&app, w, h);
        let header = s.lines().nth(1).unwrap();
        for col in ["id", "odds", "verdict", "decision"] {
            assert!(header.contains(col), "{w}x{h}: {header}");
        }
    }
    let wide = screen(&app, 200, 50);
    for col in ["depth ppm", "prob", "period d", "snr"] {
        assert!(wide.contains(col), "{wide}");
    }
    assert!(!wide.lines().nth(1).unwrap().contains(" P "), "no bare P");
}

#[test]
fn the_reject_dialog_names_the_candidate_and_boxes_keep_their_keys() {
    let mut app = demo_app();
    let id = app.cat.candidate_id(app.candidate().unwrap()).to_string();
    act(&mut app, Action::Reject);
    let s = screen(&app, 80, 24);
    assert!(s.contains(&format!("Reject {id}: why?")), "{s}");
    assert!(s.contains("Esc cancels"), "{s}");
    act(&mut app, Action::Close);
    // A filter long enough to wrap in the box: the key line stays whole.
    act(&mut app, Action::Filter);
    typed(
        &mut app,
        "period>0 period<1000 depth>1 depth<1000000 odds>=0 snr>0 duration>0 k>=1",
    );
    act(&mut app, Action::Select);
    act(&mut app, Action::ApplyToFilter);
    let s = screen(&app, 80, 24);
    assert!(s.contains("Esc cancel"), "{s}");
    assert!(
        s.lines()
            .any(|l| l.contains("a keep") && l.contains("x reject")),
        "{s}"
    );
}

#[test]
fn a_rebound_key_shows_in_every_hint_that_names_it() {
    let mut app = demo_app();
    app.keymap = crate::tui::keymap::Keymap::load(&[(
        "mine.toml",
        "show-ledger = [\"g\"]\nsignal-view = [\"z\"]\nhelp = [\"h\"]\nkeep = [\"K\"]\nclose = [\"ctrl-g\"]\n",
    )])
    .unwrap();
    let s = screen(&app, 100, 30);
    assert!(s.contains("z: odd/even"), "{s}");
    assert!(s.contains("(h explains)") && s.contains("K keep"), "{s}");
    assert!(!s.contains("v: odd/even") && !s.contains("a keep"), "{s}");
    act(&mut app, Action::ShowLedger);
    let s = screen(&app, 120, 40);
    assert!(s.contains("g for facts"), "{s}");
    act(&mut app, Action::ShowLedger);
    act(&mut app, Action::Help);
    let s = screen(&app, 120, 40);
    assert!(
        s.contains("Keys (Ctrl-g closes)") || s.contains("Keys (ctrl-g closes)"),
        "{s}"
    );
    act(&mut app, Action::Close);
    act(&mut app, Action::Reject);
    let s = screen(&app, 120, 40);
    assert!(s.to_lowercase().contains("ctrl-g cancels"), "{s}");
}

#[test]
fn a_long_prompt_scrolls_to_keep_the_cursor_in_sight() {
    let mut app = demo_app();
    act(&mut app, Action::Filter);
    let long = "period>0 ".repeat(20) + "depth>42";
    typed(&mut app, &long);
    let s = screen(&app, 80, 24);
    let last = s.lines().last().unwrap();
    assert!(last.contains("<") && last.contains("depth>42|"), "{last}");
}
