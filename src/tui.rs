//! The terminal browser: a thin shell over [`app::App`]. It owns the
//! terminal (one guard restores it on exit, error and panic), turns key
//! presses into actions through the key map, runs light-curve work on a
//! background thread, and draws with [`draw::draw`].

pub mod app;
mod background;
pub mod draw;
mod input;
pub mod keymap;
pub mod lineedit;
mod worker;

use std::io::{IsTerminal, Write};
use std::path::PathBuf;
use std::sync::{Arc, mpsc};
use std::time::Duration;

use ratatui::Terminal;
use ratatui::backend::CrosstermBackend;
use ratatui::crossterm::event;
use ratatui::crossterm::{cursor, execute, terminal};

use crate::cli::args::VettingArgs;
use crate::cli::error::CliError;
use app::{App, Effect, Input};
use draw::Look;
use keymap::Keymap;

#[derive(Debug, Clone, clap::Args)]
pub struct Args {
    #[command(flatten)]
    pub vetting: VettingArgs,
    /// Start with this filter (e.g. "odds>=100 decision:open").
    #[arg(long = "where", value_name = "FILTER")]
    pub filter: Option<String>,
    /// A key-map file that overrides the defaults.
    #[arg(long, value_name = "FILE")]
    pub keymap: Option<PathBuf>,
    /// Use the home-row key map (adds h/j/k/l movement).
    #[arg(long)]
    pub home_row: bool,
    /// Colour: never, or 16 / 256 / true colour (NO_COLOR is honoured).
    #[arg(long, value_parser = ["never", "16", "256", "true"], default_value = "16")]
    pub color: String,
    /// Draw plots and sparklines with ASCII only.
    #[arg(long)]
    pub ascii: bool,
    /// Decisions stay in memory, no ledger is opened.
    #[arg(long)]
    pub no_ledger: bool,
    /// Let the mouse select rows (click) and scroll the lists (wheel).
    /// Off by default: it takes the terminal's own text selection away.
    #[arg(long)]
    pub mouse: bool,
}

impl Args {
    /// The demo, with everything at its defaults.
    pub fn demo() -> Args {
        use clap::Parser;
        #[derive(clap::Parser)]
        struct Wrap {
            #[command(flatten)]
            args: Args,
        }
        Wrap::parse_from(["starsift"]).args
    }

    fn look(&self) -> Look {
        let no_color = std::env::var_os("NO_COLOR").is_some_and(|v| !v.is_empty());
        let utf8 = ["LC_ALL", "LC_CTYPE", "LANG"]
            .iter()
            .find_map(|k| std::env::var(k).ok().filter(|v| !v.is_empty()))
            .is_none_or(|v| {
                v.to_ascii_uppercase().contains("UTF-8") || v.to_ascii_uppercase().contains("UTF8")
            });
        let palette = match draw::Palette::parse(&self.color) {
            _ if no_color => draw::Palette::None,
            Some(p) => p,
            None => draw::Palette::Basic,
        };
        Look {
            palette,
            ascii: self.ascii || !utf8,
        }
    }

    fn keymap(&self) -> Result<Keymap, CliError> {
        let mut layers: Vec<(String, String)> = Vec::new();
        if self.home_row {
            layers.push(("keymaps/home-row.toml".into(), keymap::HOME_ROW.into()));
        }
        let user = self.keymap.clone().or_else(|| {
            let dir = std::env::var_os("XDG_CONFIG_HOME")
                .map(PathBuf::from)
                .or_else(|| std::env::var_os("HOME").map(|h| PathBuf::from(h).join(".config")))?;
            let p = dir.join("starsift/keymap.toml");
            p.is_file().then_some(p)
        });
        if let Some(p) = user {
            let text = std::fs::read_to_string(&p)
                .map_err(|e| CliError::Input(format!("{}: cannot read: {e}", p.display())))?;
            layers.push((p.display().to_string(), text));
        }
        let refs: Vec<(&str, &str)> = layers
            .iter()
            .map(|(a, b)| (a.as_str(), b.as_str()))
            .collect();
        Keymap::load(&refs).map_err(|e| CliError::Input(e.to_string()))
    }
}

/// Builds the browser state for a catalogue (everything but the terminal).
pub fn build_app(args: &Args) -> Result<(App, crate::lightcurve::Finder), CliError> {
    build_app_counting(args, None).map(|b| (b.app, b.finder))
}

/// The browser as its first read builds it.
struct Built {
    app: App,
    finder: crate::lightcurve::Finder,
    /// A catalogue new to the ledger, to hash in the background.
    unseen: Option<Unseen>,
    /// The second read, of the values, when the first kept ids only.
    values: Option<background::ValuesRead>,
}

/// A catalogue the ledger has yet to record (`Loaded::sighting_deferred`):
/// the file and its stamp at the load, for the background fingerprint.
struct Unseen {
    path: PathBuf,
    stamp: String,
    /// The ledger's last sighting of it is an earlier version's: its
    /// fingerprint is taken their way too, to compare.
    earlier: bool,
}

/// What the loading screen shows: the catalogue's bytes read so far, and
/// the stage of the work after the read (a [`Stage`]).
struct Counted {
    read: Arc<std::sync::atomic::AtomicU64>,
    stage: Arc<std::sync::atomic::AtomicU8>,
}

/// The work before the table, after the bytes are read.
#[derive(Clone, Copy)]
enum Stage {
    /// The rows parsed and grouped by star (the read's own end).
    Rows,
    /// The ledger opened, its notes made, its latest decisions read.
    Ledger,
    /// The odds built from them.
    Odds,
}

impl Stage {
    fn words(stage: u8) -> &'static str {
        match stage {
            s if s == Stage::Rows as u8 => "grouping the rows by star",
            s if s == Stage::Ledger as u8 => "reading the ledger",
            _ => "building the odds",
        }
    }
}

/// [`build_app`], counting the catalogue's bytes read and the stage into
/// `counted`. With it (the browser's loading screen), only the ids are read
/// (`CatalogueArgs::load_counting`; the App waits for its values,
/// `app::Values`), and a catalogue new to the ledger is not hashed before
/// the table: it comes back as [`Unseen`].
fn build_app_counting(args: &Args, counted: Option<Counted>) -> Result<Built, CliError> {
    let keymap = args.keymap()?;
    let VettingArgs {
        input,
        ledger: ledger_args,
        model,
        lc,
        ..
    } = &args.vetting;
    lc.check_folder()?;
    let counting = counted.is_some();
    let stage = |s: Stage| {
        if let Some(c) = &counted {
            c.stage.store(s as u8, std::sync::atomic::Ordering::Relaxed);
        }
    };
    // The ledger's decisions are read while the catalogue loads.
    let ahead = (!args.no_ledger).then(|| ledger_args.read_ahead(input, false));
    let loaded = match &counted {
        Some(c) => {
            let read = Arc::clone(&c.read);
            input.load_counting(read, (!args.no_ledger).then_some(ledger_args))?
        }
        None => input.load()?,
    };
    stage(Stage::Ledger);
    // The checks run on a background thread once the browser is up (see `run`).
    let checks = crate::checks::Checks::none(loaded.catalogue.len());
    let finder = lc.finder(&loaded);
    // The ledger's notes (catalogue changed, decided candidates gone) go to
    // the message line: stderr is behind the browser's screen.
    let (ledger, mut notes, unseen) = if args.no_ledger {
        (None, Vec::new(), None)
    } else if counting {
        let (l, notes, deferred) = ledger_args.open_deferring(input, &loaded)?;
        let unseen = loaded
            .sighting_deferred()
            .filter(|_| deferred)
            .map(|(path, stamp)| Unseen {
                path: path.to_path_buf(),
                stamp: stamp.to_string(),
                earlier: (l.last_fingerprint(&loaded.catalogue.source))
                    .is_some_and(|f| crate::fingerprint::is_earlier(&f)),
            });
        (Some(l), notes, unseen)
    } else {
        let (l, notes) = ledger_args.open_noting(input, &loaded)?;
        (Some(l), notes, None)
    };
    // The scan serves the ledger opened above when it is the one scanned
    // (opening that one again said why, if the scan's could not be read).
    let read = ahead
        .and_then(|t| {
            t.join()
                .unwrap_or_else(|e| std::panic::resume_unwind(e))
                .ok()?
        })
        .filter(|(scanned, _)| ledger.as_ref().is_some_and(|l| l.path() == scanned.path()));
    let vetter = ledger_args.vetter.as_deref();
    let mut decided = match (&ledger, read) {
        (Some(l), Some((_, read))) => {
            Some(l.decided_ahead(&loaded.catalogue, vetter, read, false)?.0)
        }
        (Some(l), None) => Some(l.decided(&loaded.catalogue, vetter)?),
        (None, _) => None,
    };
    notes.extend(
        decided
            .as_ref()
            .and_then(|d| crate::cli::args::gone_note(&d.not_listed)),
    );
    stage(Stage::Odds);
    // The same odds as every command's session; the checks arrive later.
    let live = crate::session::odds_of(
        &loaded.catalogue,
        model.model(&loaded.survey)?,
        &checks,
        decided.as_mut(),
    )?;
    let newest = decided.as_ref().map_or(0, |d| d.newest);
    let disagree = decided
        .map(|d| crate::selection::disagreeing(&loaded.catalogue, &d.disagreements))
        .unwrap_or_default();
    let cat = Arc::new(loaded.catalogue);
    // The values are read from now on, behind the table being drawn.
    let values = counting.then(|| {
        let odds = app::OddsFrom::of(&cat, &live);
        background::ValuesRead::start(args, loaded.stamp, Arc::clone(&cat), odds)
    });
    let mut app = App::with_disagreements(
        cat,
        live,
        checks,
        ledger,
        ledger_args.vetter(),
        keymap,
        disagree,
    );
    app.ledger_seen = newest;
    app.message = skipped_message(&app.cat)
        .into_iter()
        .chain(notes)
        .reduce(|a, b| format!("{a} · {b}"));
    if counting {
        app.values = app::Values::Reading(0);
    }
    if let Some(f) = crate::cli::args::parse_where(args.filter.as_deref())? {
        app.filter = f;
        app.refresh_view();
    }
    Ok(Built {
        app,
        finder,
        unseen,
        values,
    })
}

/// Hashes a catalogue new to the ledger for its sighting, once the values
/// are in (not before the table): at the lowest priority, then sends it
/// if the file is as it was read (the same stamp); else the next start
/// records it.
fn hash_for_sighting(
    Unseen {
        path,
        stamp,
        earlier,
    }: Unseen,
    seen: mpsc::Sender<std::io::Result<(String, String, Option<String>)>>,
) {
    std::thread::spawn(move || {
        crate::parallel::run_when_idle();
        let fp = crate::ledger::fingerprint_file(&path);
        let earlier = earlier
            .then(|| crate::fingerprint::earlier_fingerprint_file(&path).ok())
            .flatten();
        if crate::fingerprint::file_stamp(&path).as_deref() == Some(stamp.as_str()) {
            let _ = seen.send(fp.map(|fp| (fp, stamp, earlier)));
        }
    });
}

/// Rows that did not load, and the loader's notes, said as the browser opens
/// (`Catalogue::load_warnings`).
fn skipped_message(cat: &crate::catalogue::Catalogue) -> Option<String> {
    let w = cat.load_warnings();
    (!w.is_empty()).then(|| w.join("; "))
}

/// `$XDG_STATE_HOME/starsift/positions.json` (else `~/.local/state/...`):
/// where the vetter was, per catalogue.
fn positions_path() -> Option<PathBuf> {
    let base = std::env::var_os("XDG_STATE_HOME")
        .map(PathBuf::from)
        .filter(|p| p.is_absolute())
        .or_else(|| std::env::var_os("HOME").map(|h| PathBuf::from(h).join(".local/state")))?;
    Some(base.join("starsift/positions.json"))
}

fn load_positions() -> std::collections::BTreeMap<String, app::Position> {
    positions_path()
        .and_then(|p| std::fs::read(p).ok())
        .and_then(|b| serde_json::from_slice(&b).ok())
        .unwrap_or_default()
}

/// Remembers where the vetter was; failure to save is not worth an error.
fn save_position(catalogue: &str, pos: app::Position) {
    let Some(path) = positions_path() else { return };
    let mut all = load_positions();
    all.insert(catalogue.to_string(), pos);
    if let (Some(dir), Ok(text)) = (path.parent(), serde_json::to_vec_pretty(&all)) {
        let _ = std::fs::create_dir_all(dir);
        let tmp = path.with_extension("tmp");
        if std::fs::write(&tmp, text).is_ok() {
            let _ = std::fs::rename(&tmp, &path);
        }
    }
}

/// Restores the terminal when dropped, and from the panic hook.
struct Guard;

impl Guard {
    fn enter(mouse: bool) -> std::io::Result<Guard> {
        terminal::enable_raw_mode()?;
        execute!(
            std::io::stdout(),
            terminal::EnterAlternateScreen,
            cursor::Hide,
            ratatui::crossterm::event::EnableBracketedPaste
        )?;
        if mouse {
            execute!(
                std::io::stdout(),
                ratatui::crossterm::event::EnableMouseCapture
            )?;
        }
        crate::contain::install_hook();
        let previous = std::panic::take_hook();
        std::panic::set_hook(Box::new(move |info| {
            // A panic `contain::contained` catches is one star's error: the
            // browser goes on, so the terminal stays as it is.
            if !crate::contain::inside() {
                restore();
            }
            previous(info);
        }));
        Ok(Guard)
    }
}

fn restore() {
    let _ = terminal::disable_raw_mode();
    let _ = execute!(
        std::io::stdout(),
        ratatui::crossterm::event::DisableMouseCapture,
        ratatui::crossterm::event::DisableBracketedPaste,
        terminal::LeaveAlternateScreen,
        cursor::Show
    );
}

impl Drop for Guard {
    fn drop(&mut self) {
        restore();
    }
}

/// Builds the browser on a thread while the screen shows how much of the
/// catalogue was read; `None` when the vetter quit (q or Ctrl-C) first.
fn load_showing_progress(
    args: &Args,
    term: &mut Terminal<CrosstermBackend<std::io::Stdout>>,
    look: Look,
) -> Result<Option<Built>, CliError> {
    use std::sync::atomic::{AtomicU64, Ordering::Relaxed};
    let path = args.vetting.input.catalogue.clone();
    let total = path
        .as_ref()
        .and_then(|p| std::fs::metadata(p).ok())
        .map_or(0, |m| m.len());
    let name = path.as_ref().map_or("the built-in demo".to_string(), |p| {
        crate::sanitize::clean(&p.display().to_string()).into_owned()
    });
    let read = Arc::new(AtomicU64::new(0));
    let stage = Arc::new(std::sync::atomic::AtomicU8::new(Stage::Rows as u8));
    let (tx, rx) = mpsc::channel();
    {
        let counted = Counted {
            read: Arc::clone(&read),
            stage: Arc::clone(&stage),
        };
        let args = args.clone();
        std::thread::spawn(move || {
            let _ = tx.send(build_app_counting(&args, Some(counted)));
        });
    }
    let start = std::time::Instant::now();
    loop {
        match rx.recv_timeout(Duration::from_millis(100)) {
            Ok(built) => return built.map(Some),
            Err(mpsc::RecvTimeoutError::Disconnected) => {
                return Err(CliError::Input("the catalogue could not be loaded".into()));
            }
            Err(mpsc::RecvTimeoutError::Timeout) => {}
        }
        let r = read.load(Relaxed);
        let text = if total > 0 && r < total {
            format!(
                "starsift: loading {name}: {:.0} of {:.0} MB read ({}%) · {:.1} s · q quits",
                r as f64 / 1e6,
                total as f64 / 1e6,
                (100 * r / total).min(100),
                start.elapsed().as_secs_f64()
            )
        } else if total > 0 {
            // Read to the end: what comes before the table (with a ledger
            // of many decisions, seconds).
            format!(
                "starsift: loading {name}: {:.0} MB read · {} · {:.1} s · q quits",
                total as f64 / 1e6,
                Stage::words(stage.load(Relaxed)),
                start.elapsed().as_secs_f64()
            )
        } else {
            format!("starsift: loading {name} · q quits")
        };
        term.draw(|f| {
            let text = if look.ascii {
                text.replace('·', "-")
            } else {
                text.clone()
            };
            // Wrapped: a long path must not push the numbers off a narrow
            // screen.
            let wrap = ratatui::widgets::Wrap { trim: true };
            f.render_widget(ratatui::widgets::Paragraph::new(text).wrap(wrap), f.area());
        })?;
        while ratatui::crossterm::event::poll(Duration::ZERO)? {
            if let ratatui::crossterm::event::Event::Key(k) = ratatui::crossterm::event::read()? {
                let ctrl_c = k.code == ratatui::crossterm::event::KeyCode::Char('c')
                    && k.modifiers
                        .contains(ratatui::crossterm::event::KeyModifiers::CONTROL);
                if ctrl_c || k.code == ratatui::crossterm::event::KeyCode::Char('q') {
                    return Ok(None);
                }
            }
        }
    }
}

/// Writes a candidate's figure into `starsift-figures/` (in the current
/// folder) from the browser's own state, and says where or why not.
fn write_figure(
    app: &App,
    finder: &crate::lightcurve::Finder,
    args: &Args,
    c: crate::catalogue::CandidateId,
) -> String {
    let cat = &app.cat;
    let id = cat.candidate_id(c);
    let dir = std::path::PathBuf::from("starsift-figures");
    let path = dir.join(format!("{}.svg", crate::figure::file_name(id)));
    let settings = args.vetting.checks.settings();
    let decided = app
        .history
        .iter()
        .rev()
        .find(|e| &*e.candidate == id && e.undoes.is_none())
        .map(|e| (e.vetter.to_string(), e.decided_at.clone()));
    let facts = crate::figure::facts_of(
        &crate::figure::FactsOf {
            cat,
            settings: &settings,
            live: Some(&app.live),
            checks: &app.checks,
            decided,
        },
        c,
    );
    let cache = crate::lightcurve::Cache::default();
    let shown = crate::lightcurve::show(&cache, finder, cat, c, &args.vetting.lc.detrend(), 80);
    let result = std::fs::create_dir_all(&dir)
        .map_err(|e| e.to_string())
        .and_then(|()| {
            crate::figure::draw_to(
                cat,
                shown.as_ref().map_err(String::as_str),
                &facts,
                app.live.verdict(c).name(),
                c,
                &path,
            )
        });
    let shown_path = std::fs::canonicalize(&path).unwrap_or(path);
    match result {
        Ok(()) => format!(
            "figure of {} written to {}",
            crate::sanitize::clean(id),
            crate::sanitize::clean(&shown_path.display().to_string())
        ),
        Err(e) => format!("figure of {} not written: {e}", crate::sanitize::clean(id)),
    }
}

/// OSC 52: ask the terminal to put text on the clipboard (works over SSH
/// and through tmux with `set-clipboard on`).
fn osc52(text: &str) -> String {
    use std::fmt::Write as _;
    const B64: &[u8; 64] = b"ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
    let bytes = text.as_bytes();
    let mut out = String::from("\x1b]52;c;");
    for chunk in bytes.chunks(3) {
        let n = chunk
            .iter()
            .enumerate()
            .fold(0u32, |a, (i, &b)| a | (b as u32) << (16 - 8 * i));
        for i in 0..4 {
            if i <= chunk.len() {
                out.push(B64[(n >> (18 - 6 * i) & 63) as usize] as char);
            } else {
                out.push('=');
            }
        }
    }
    let _ = write!(out, "\x07");
    out
}

pub fn run(args: &Args) -> Result<(), CliError> {
    if !std::io::stdout().is_terminal() || !std::io::stdin().is_terminal() {
        return Err(CliError::Input(
            "the browser needs a terminal; for scripts use the headless commands: summary, odds, checks, fold, decide, history, export, report".into(),
        ));
    }
    let look = args.look();
    // Flags first (a bad key map or value costs nothing), then the terminal
    // opens at once with a progress line while the catalogue loads.
    args.keymap()?;
    args.vetting.model.model(&args.vetting.input.survey()?.0)?;
    let guard = Guard::enter(args.mouse)?;
    let mut term = Terminal::new(CrosstermBackend::new(std::io::stdout()))?;
    let built = load_showing_progress(args, &mut term, look);
    let Built {
        mut app,
        finder,
        mut unseen,
        mut values,
    } = match built {
        Ok(Some(b)) => b,
        Ok(None) => return Ok(()),
        Err(e) => {
            drop(term);
            drop(guard);
            return Err(e);
        }
    };
    if args.filter.is_none()
        && let Some(p) = load_positions().get(&app.cat.source)
    {
        app.restore(p);
    }
    // The values (the first read kept ids only), then what needs them:
    // the checks, the light-curve worker, the orders. The verdicts wait
    // for the checks from the first frame on.
    let mut running: Option<background::Running> = None;
    let mut effects = app.update(Input::ChecksStarted);
    let (seen_tx, seen_rx) = mpsc::channel();
    // SIGTERM, SIGHUP (a lost terminal) and SIGINT end the browser the
    // normal way: terminal restored, place saved. Ctrl-C in raw mode is a
    // key, which `quit` handles.
    let stop = Arc::new(std::sync::atomic::AtomicBool::new(false));
    for sig in [
        signal_hook::consts::SIGTERM,
        signal_hook::consts::SIGHUP,
        signal_hook::consts::SIGINT,
    ] {
        signal_hook::flag::register(sig, Arc::clone(&stop))?;
    }
    let (w, h) = terminal::size().unwrap_or((80, 24));
    effects.extend(app.update(Input::Resize(w, h)));
    const FRAME: Duration = Duration::from_millis(16);
    let mut last_draw = std::time::Instant::now() - FRAME;
    // A frame is drawn only when something changed: a key, a resize, a
    // result from a background thread.
    let mut dirty = true;
    // Where the last frame drew the lists (for the mouse).
    let mut hits = app::Hits::default();
    loop {
        if stop.load(std::sync::atomic::Ordering::Relaxed) {
            drop(term);
            drop(guard);
            save_position(&app.cat.source, app.position());
            return Err(CliError::Input(
                "stopped by a signal; the terminal is restored and the place saved".into(),
            ));
        }
        let mut follow = Vec::new();
        for e in effects.drain(..) {
            match e {
                Effect::Quit => {
                    drop(term);
                    drop(guard);
                    save_position(&app.cat.source, app.position());
                    return Ok(());
                }
                Effect::Copy(text) => {
                    let mut out = std::io::stdout();
                    let _ = out.write_all(osc52(&text).as_bytes());
                    let _ = out.flush();
                }
                Effect::LoadSignal(c) => {
                    if let Some(r) = &running {
                        let _ = r.worker.send(c);
                    }
                }
                Effect::WriteFigure(c) => {
                    let said = write_figure(&app, &finder, args, c);
                    follow.extend(app.update(Input::Notice(said)));
                    dirty = true;
                }
            }
        }
        effects.extend(follow);
        // Keys that trickle in (a paste through a slow link) are read on
        // for the rest of a 16 ms frame before the screen is drawn again.
        let since = last_draw.elapsed();
        if since < FRAME && event::poll(FRAME - since)? {
            read_batch(&mut app, &hits, &mut effects, &running)?;
            dirty = true;
            continue;
        }
        if dirty {
            term.draw(|f| hits = draw::draw(&app, f, look))?;
            last_draw = std::time::Instant::now();
            dirty = false;
        }
        match &running {
            Some(r) => dirty |= r.poll(&mut app, &mut effects),
            None => {
                let before = app.values;
                if values
                    .as_ref()
                    .is_some_and(|v| v.poll(&mut app, &mut effects))
                {
                    values = None;
                }
                dirty |= app.values != before;
                if app.values == app::Values::In {
                    running = Some(background::Running::start(&app, args, &finder));
                    if let Some(u) = unseen.take() {
                        hash_for_sighting(u, seen_tx.clone());
                    }
                }
            }
        }
        if let Ok(seen) = seen_rx.try_recv() {
            effects.extend(app.update(Input::Seen(seen.map_err(|e| e.to_string()))));
            dirty = true;
        }
        if !effects.is_empty() || dirty {
            continue;
        }
        // While a light curve is being read, look for its result every few
        // milliseconds (it then shows in the next frame); otherwise sleep
        // until a key, waking now and then for the background checks.
        let wait = if app.waiting() {
            Duration::from_millis(4)
        } else if app.checks_pending {
            Duration::from_millis(50)
        } else {
            Duration::from_millis(250)
        };
        if !event::poll(wait)? {
            continue;
        }
        read_batch(&mut app, &hits, &mut effects, &running)?;
        dirty = true;
    }
}

/// Handles every event already waiting before the next frame (a paste or a
/// burst of keys is one redraw, not one per key), up to a bound that keeps
/// the screen alive. Light-curve requests go to the worker at once; any
/// other effect ends the batch.
fn read_batch(
    app: &mut App,
    hits: &app::Hits,
    effects: &mut Vec<Effect>,
    running: &Option<background::Running>,
) -> std::io::Result<()> {
    for _ in 0..4096 {
        match input::translate(app, hits, event::read()?) {
            input::Translated::Quit => effects.push(Effect::Quit),
            input::Translated::Input(i) => effects.extend(app.update(i)),
            input::Translated::Nothing => {}
        }
        effects.retain(|e| match e {
            Effect::LoadSignal(c) => {
                if let Some(r) = running {
                    let _ = r.worker.send(*c);
                }
                false
            }
            _ => true,
        });
        if !effects.is_empty() || !event::poll(Duration::ZERO)? {
            break;
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests;
