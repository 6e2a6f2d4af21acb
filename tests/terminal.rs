//! The browser in a real terminal: tmux starts it on the demo, keys are sent
//! as a person would type them, and the pane is read back.

mod common;

use std::process::Command;
use std::thread::sleep;
use std::time::{Duration, Instant};

fn tmux(args: &[&str]) -> String {
    let o = Command::new("tmux").args(args).output().expect("tmux");
    String::from_utf8_lossy(&o.stdout).into_owned()
}

fn pane(session: &str) -> String {
    tmux(&["capture-pane", "-t", session, "-p"])
}

/// Waits until the pane shows `text` (or fails after a few seconds).
fn wait_for(session: &str, text: &str) -> String {
    let start = Instant::now();
    loop {
        let p = pane(session);
        if p.contains(text) {
            return p;
        }
        if start.elapsed() > Duration::from_secs(10) {
            panic!("the pane never showed {text:?}:\n{p}");
        }
        sleep(Duration::from_millis(100));
    }
}

/// Waits until the pane no longer shows `text` (e.g. a background job's
/// progress).
fn wait_gone(session: &str, text: &str) {
    let start = Instant::now();
    while pane(session).contains(text) {
        if start.elapsed() > Duration::from_secs(30) {
            panic!("the pane still shows {text:?}:\n{}", pane(session));
        }
        sleep(Duration::from_millis(100));
    }
}

/// Waits until the browser's background work is done: the catalogue's
/// values read (the table opens on the ids first), then the checks.
fn wait_checked(session: &str) {
    wait_gone(session, "reading the values");
    wait_gone(session, "checks running");
}

fn keys(session: &str, k: &[&str]) {
    let mut args = vec!["send-keys", "-t", session];
    args.extend_from_slice(k);
    tmux(&args);
    sleep(Duration::from_millis(250));
}

/// True when tmux can run here; on CI it must (see .ci/run).
fn have_tmux() -> bool {
    if Command::new("tmux").arg("-V").output().is_ok() {
        return true;
    }
    assert!(
        std::env::var_os("CI").is_none(),
        "CI must install tmux (see .ci/run)"
    );
    eprintln!("tmux is not installed: skipping the terminal test");
    false
}

/// Starts the browser on the demo in a new tmux session of `cols` x `rows`,
/// with its data and state in `dir`. The shell then records the exit status
/// and the terminal's settings (`stty -a`, in `dir/stty.txt`) and writes
/// `shell-ok` into the returned status file: proof the terminal was usable.
fn start(session: &str, dir: &std::path::Path, cols: &str, rows: &str) -> std::path::PathBuf {
    start_with(session, dir, cols, rows, "")
}

/// [`start`] with the browser's options (given to `starsift` itself, with
/// no subcommand).
fn start_with(
    session: &str,
    dir: &std::path::Path,
    cols: &str,
    rows: &str,
    options: &str,
) -> std::path::PathBuf {
    let status = dir.join("status");
    let script = format!(
        "cd {d} && XDG_DATA_HOME={d}/data XDG_STATE_HOME={d}/state {bin} {options}; echo $? > {s}; stty -a > {d}/stty.txt; echo shell-ok >> {s}; sleep 30",
        d = dir.display(),
        bin = env!("CARGO_BIN_EXE_starsift"),
        s = status.display()
    );
    tmux(&["kill-session", "-t", session]);
    tmux(&[
        "new-session",
        "-d",
        "-s",
        session,
        "-x",
        cols,
        "-y",
        rows,
        "bash",
        "-c",
        &script,
    ]);
    status
}

/// Waits until the browser has ended and the shell after it ran; returns
/// the status file's text and the terminal settings it left.
fn ended(dir: &std::path::Path, status: &std::path::Path, what: &str) -> (String, String) {
    let start = Instant::now();
    while !std::fs::read_to_string(status)
        .unwrap_or_default()
        .contains("shell-ok")
    {
        assert!(
            start.elapsed() < Duration::from_secs(10),
            "{what}: the browser did not end"
        );
        sleep(Duration::from_millis(100));
    }
    (
        std::fs::read_to_string(status).unwrap(),
        std::fs::read_to_string(dir.join("stty.txt")).unwrap(),
    )
}

#[test]
fn browse_the_demo_reject_one_of_three_and_quit() {
    if !have_tmux() {
        return;
    }
    let dir = common::scratch("tmux");
    let session = format!("starsift-test-{}", std::process::id());
    let status = start(&session, &dir, "80", "24");
    wait_for(&session, "Systems 321/321");
    // The first candidate's light curve is read and drawn with no key
    // pressed (its request was once lost at start-up: "reading the light
    // curve" stayed until the selection moved).
    wait_for(&session, "data HWT");
    wait_gone(&session, "reading the light curve");
    // The checks (light curves included) run in the background and change
    // the odds when they arrive: wait for them.
    wait_checked(&session);
    keys(&session, &["?"]);
    wait_for(&session, "Keys (Esc closes)");
    keys(&session, &["Escape"]);
    sleep(Duration::from_millis(300));
    keys(&session, &["f"]);
    keys(&session, &["k=3"]);
    keys(&session, &["Enter"]);
    wait_for(&session, "Systems 17/321");
    keys(&session, &["Enter"]);
    let before = wait_for(&session, "if rejected:");
    // The what-if line names the siblings and the odds they would have.
    let line = before
        .lines()
        .find(|l| l.starts_with("if rejected:"))
        .unwrap()
        .to_string();
    let predicted: String = line
        .split("→ ")
        .nth(1)
        .unwrap()
        .split(' ')
        .next()
        .unwrap()
        .to_string();
    // Rejected as an artefact (the third reason: nothing of the star), the
    // siblings count on; as a binary they would be held back.
    keys(&session, &["x"]);
    wait_for(&session, ": why?");
    keys(&session, &["Down", "Down", "Enter"]);
    let after = wait_for(&session, "rejected (artefact)");
    assert!(
        after.contains(&predicted),
        "the siblings now show {predicted}:\n{after}"
    );
    // The two-candidate odds: the same as every other 2-candidate star now.
    keys(&session, &["q"]);
    let (s, stty) = ended(&dir, &status, "q");
    assert!(s.starts_with("0\n"), "exit status: {s}");
    assert!(
        stty.contains(" icanon") && stty.contains(" echo "),
        "the terminal was not restored: {stty}"
    );
    tmux(&["kill-session", "-t", &session]);
    // Where the vetter was is remembered for the next session.
    let pos = std::fs::read_to_string(dir.join("state/starsift/positions.json")).unwrap();
    assert!(pos.contains("\"filter\": \"k=3\""), "{pos}");
    // The decision is in the demo's ledger.
    let l = starsift::ledger::Ledger::open(&dir.join("data/starsift/demo.ledger.sqlite")).unwrap();
    assert_eq!(l.len().unwrap(), 1);
}

/// SIGTERM, SIGHUP and SIGINT end the browser the normal way: the terminal
/// restored (echo and line editing back) and the place saved.
#[test]
fn signals_restore_the_terminal() {
    if !have_tmux() {
        return;
    }
    for sig in ["TERM", "HUP", "INT"] {
        let dir = common::scratch(&format!("signal-{sig}"));
        let session = format!("starsift-sig-{sig}-{}", std::process::id());
        let status = start(&session, &dir, "80", "24");
        wait_for(&session, "Systems 321/321");
        let shell = tmux(&["list-panes", "-t", &session, "-F", "#{pane_pid}"]);
        let child = Command::new("pgrep")
            .args(["-P", shell.trim()])
            .output()
            .expect("pgrep");
        let pid = String::from_utf8_lossy(&child.stdout).trim().to_string();
        assert!(!pid.is_empty(), "no browser process under the shell");
        Command::new("kill")
            .args([&format!("-{sig}"), &pid])
            .status()
            .unwrap();
        let (_, stty) = ended(&dir, &status, &format!("SIG{sig}"));
        assert!(
            stty.contains(" icanon") && stty.contains(" echo "),
            "SIG{sig}: the terminal was not restored: {stty}"
        );
        let after = pane(&session);
        assert!(after.contains("stopped by a signal"), "SIG{sig}:\n{after}");
        assert!(
            dir.join("state/starsift/positions.json").is_file(),
            "SIG{sig}: the place was not saved"
        );
        tmux(&["kill-session", "-t", &session]);
    }
}

/// A burst of 5,000 keys is read to the end: the key typed after it is
/// answered at once (the terminal is drained, not read 1 kB per wake-up),
/// and a 20,000-character filter typed into the prompt is capped, not a
/// frozen screen.
#[test]
fn a_burst_of_keys_is_drained() {
    if !have_tmux() {
        return;
    }
    let dir = common::scratch("burst");
    let session = format!("starsift-burst-{}", std::process::id());
    start(&session, &dir, "100", "30");
    wait_for(&session, "Systems 321/321");
    keys(&session, &["-l", &"n".repeat(5000)]);
    keys(&session, &["?"]);
    wait_for(&session, "Keys (Esc closes)");
    keys(&session, &["Escape"]);
    keys(&session, &["f"]);
    keys(&session, &["-l", &format!("{}k=3", " ".repeat(20_000))]);
    keys(&session, &["Escape"]);
    keys(&session, &["?"]);
    wait_for(&session, "Keys (Esc closes)");
    tmux(&["kill-session", "-t", &session]);
}

/// At 60x16 with `--ascii` (given to `starsift` with no subcommand): only
/// ASCII on the screen, the decision column kept; the filter prompt edits
/// as a shell does and recalls earlier filters; after a rejection the
/// cursor stays in the system while it has open candidates.
#[test]
fn ascii_small_screen_prompt_keys_and_staying_in_the_system() {
    if !have_tmux() {
        return;
    }
    let dir = common::scratch("ascii");
    let session = format!("starsift-ascii-{}", std::process::id());
    start_with(&session, &dir, "60", "16", "--ascii");
    wait_for(&session, "Systems 321/321");
    wait_checked(&session);
    let s = pane(&session);
    assert!(s.is_ascii(), "{s}");
    assert!(s.lines().nth(1).unwrap().contains("decision"), "{s}");
    // A filter; then the prompt opens with it selected: typing replaces it.
    keys(&session, &["f"]);
    keys(&session, &["-l", "k=3"]);
    keys(&session, &["Enter"]);
    wait_for(&session, "Systems 17/321");
    keys(&session, &["f"]);
    keys(&session, &["-l", "k=2"]);
    keys(&session, &["Enter"]);
    wait_for(&session, "filter k=2: ");
    // Up recalls k=3 (Up again would go further back); C-a then typing
    // inserts at the start; C-e and C-w remove the last word.
    keys(&session, &["f"]);
    keys(&session, &["C-u"]);
    keys(&session, &["Up"]);
    keys(&session, &["Up"]);
    wait_for(&session, "filter: k=3");
    keys(&session, &["End"]);
    keys(&session, &["-l", " odds>1"]);
    keys(&session, &["C-a"]);
    keys(&session, &["-l", "decision:open "]);
    wait_for(&session, "filter: decision:open |k=3 odds>1");
    keys(&session, &["C-e"]);
    keys(&session, &["C-w"]);
    wait_for(&session, "filter: decision:open k=3 |");
    keys(&session, &["Enter"]);
    wait_for(&session, "Systems 17/321");
    // Into the first system; reject its first candidate: the cursor stays.
    keys(&session, &["Enter"]);
    let before = wait_for(&session, "Candidates of");
    let star = before
        .lines()
        .find_map(|l| l.split("Candidates of ").nth(1))
        .and_then(|t| t.split_whitespace().next())
        .unwrap()
        .to_string();
    keys(&session, &["x"]);
    wait_for(&session, ": why?");
    keys(&session, &["Enter"]);
    let after = wait_for(&session, "rejected");
    assert!(
        after.contains(&format!("Candidates of {star}")),
        "still in {star}:\n{after}"
    );
    assert!(after.is_ascii(), "{after}");
    tmux(&["kill-session", "-t", &session]);
}

/// A catalogue new to the ledger is hashed for the ledger's record after
/// the table is up (in the background), and recorded: the ledger then
/// knows its fingerprint by the file's stamp. Changed, it is said so on the
/// message line, as every command says it on stderr.
#[test]
fn a_new_catalogue_is_recorded_by_the_ledger_after_the_table() {
    if !have_tmux() {
        return;
    }
    let dir = common::scratch("sighting");
    let cat = dir.join("survey.csv");
    std::fs::write(&cat, starsift::demo::CATALOGUE_CSV).unwrap();
    // A stamp is trusted once the file has settled (0.1 s).
    sleep(Duration::from_millis(300));
    let ledger = dir.join("survey.csv.ledger.sqlite");
    let session = format!("starsift-seen-{}", std::process::id());
    let options = format!("{} --no-lightcurves --targets 52000", cat.display());
    let status = start_with(&session, &dir, "80", "24", &options);
    wait_for(&session, "Systems 321/321");
    let stamp = starsift::fingerprint::file_stamp(&cat).unwrap();
    let want = starsift::ledger::fingerprint(starsift::demo::CATALOGUE_CSV.as_bytes());
    let start = Instant::now();
    let path = cat.display().to_string();
    while starsift::ledger::recorded_fingerprint(&ledger, &path, &stamp).as_deref()
        != Some(want.as_str())
    {
        assert!(
            start.elapsed() < Duration::from_secs(20),
            "the ledger never recorded the catalogue:\n{}",
            pane(&session)
        );
        sleep(Duration::from_millis(100));
    }
    keys(&session, &["q"]);
    ended(&dir, &status, "q");
    tmux(&["kill-session", "-t", &session]);
    // The file changed (a blank line at its end): the next start says so
    // once it has hashed the file.
    std::fs::write(&cat, format!("{}\n", starsift::demo::CATALOGUE_CSV)).unwrap();
    sleep(Duration::from_millis(300));
    let dir2 = common::scratch("sighting-again");
    let session = format!("starsift-seen2-{}", std::process::id());
    start_with(&session, &dir2, "200", "24", &options);
    wait_for(&session, "changed since this ledger last saw it");
    tmux(&["kill-session", "-t", &session]);
}

/// A decided candidate the catalogue no longer lists is named on the
/// message line, as every command names it on stderr (the browser finds it
/// in its one read of the decisions).
#[test]
fn a_decided_candidate_gone_from_the_catalogue_is_named() {
    if !have_tmux() {
        return;
    }
    let dir = common::scratch("gone-candidate");
    let cat = dir.join("survey.csv");
    let ledger = dir.join("l.sqlite");
    let text = starsift::demo::CATALOGUE_CSV;
    std::fs::write(&cat, text).unwrap();
    // The first candidate, parked, then its row taken out of the file.
    let row = text.lines().filter(|l| !l.starts_with('#')).nth(1).unwrap();
    let gone = row.split(',').nth(1).unwrap();
    let o = common::starsift(&[
        "decide",
        cat.to_str().unwrap(),
        "--candidate",
        gone,
        "--decision",
        "parked",
        "--vetter",
        "ann",
        "--ledger",
        ledger.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", common::stderr(&o));
    let kept: String = text
        .lines()
        .filter(|l| *l != row)
        .map(|l| format!("{l}\n"))
        .collect();
    std::fs::write(&cat, kept).unwrap();
    let session = format!("starsift-gone-{}", std::process::id());
    let options = format!(
        "{} --no-lightcurves --targets 52000 --ledger {}",
        cat.display(),
        ledger.display()
    );
    start_with(&session, &dir, "400", "24", &options);
    wait_for(
        &session,
        &format!("1 decided candidates are not in the catalogue: {gone}"),
    );
    tmux(&["kill-session", "-t", &session]);
}
