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

fn keys(session: &str, k: &[&str]) {
    let mut args = vec!["send-keys", "-t", session];
    args.extend_from_slice(k);
    tmux(&args);
    sleep(Duration::from_millis(250));
}

#[test]
fn browse_the_demo_reject_one_of_three_and_quit() {
    if Command::new("tmux").arg("-V").output().is_err() {
        assert!(
            std::env::var_os("CI").is_none(),
            "CI must install tmux (see .ci/run)"
        );
        eprintln!("tmux is not installed: skipping the terminal test");
        return;
    }
    let dir = common::scratch("tmux");
    let session = format!("starsift-test-{}", std::process::id());
    let status = dir.join("status");
    // The shell runs the browser, then records its exit status and whether a
    // plain command still works afterwards (the terminal was restored).
    let script = format!(
        "cd {d} && XDG_DATA_HOME={d}/data XDG_STATE_HOME={d}/state {bin}; echo $? > {s}; stty -a > {d}/stty.txt; echo shell-ok >> {s}; sleep 30",
        d = dir.display(),
        bin = env!("CARGO_BIN_EXE_starsift"),
        s = status.display()
    );
    tmux(&["kill-session", "-t", &session]);
    tmux(&[
        "new-session",
        "-d",
        "-s",
        &session,
        "-x",
        "80",
        "-y",
        "24",
        "bash",
        "-c",
        &script,
    ]);
    wait_for(&session, "Systems 321 of 321");
    // The checks (light curves included) run in the background and change
    // the odds when they arrive: wait for them.
    wait_gone(&session, "checks running");
    keys(&session, &["?"]);
    wait_for(&session, "Keys (Esc closes)");
    keys(&session, &["Escape"]);
    sleep(Duration::from_millis(300));
    keys(&session, &["f"]);
    keys(&session, &["k=3"]);
    keys(&session, &["Enter"]);
    wait_for(&session, "Systems 17 of 321");
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
    keys(&session, &["x"]);
    wait_for(&session, "Reject: why?");
    keys(&session, &["Enter"]);
    let after = wait_for(&session, "rejected (eclipsing-binary)");
    assert!(
        after.contains(&predicted),
        "the siblings now show {predicted}:\n{after}"
    );
    // The two-candidate odds: the same as every other 2-candidate star now.
    keys(&session, &["q"]);
    let start = Instant::now();
    while !std::fs::read_to_string(&status)
        .unwrap_or_default()
        .contains("shell-ok")
    {
        assert!(
            start.elapsed() < Duration::from_secs(10),
            "the browser did not quit"
        );
        sleep(Duration::from_millis(100));
    }
    let s = std::fs::read_to_string(&status).unwrap();
    assert!(s.starts_with("0\n"), "exit status: {s}");
    let stty = std::fs::read_to_string(dir.join("stty.txt")).unwrap();
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
    if Command::new("tmux").arg("-V").output().is_err() {
        assert!(std::env::var_os("CI").is_none(), "CI must install tmux");
        return;
    }
    for sig in ["TERM", "HUP", "INT"] {
        let dir = common::scratch(&format!("signal-{sig}"));
        let session = format!("starsift-sig-{sig}-{}", std::process::id());
        let status = dir.join("status");
        let script = format!(
            "cd {d} && XDG_DATA_HOME={d}/data XDG_STATE_HOME={d}/state {bin}; echo $? > {s}; stty -a > {d}/stty.txt; echo shell-ok >> {s}; sleep 30",
            d = dir.display(),
            bin = env!("CARGO_BIN_EXE_starsift"),
            s = status.display()
        );
        tmux(&["kill-session", "-t", &session]);
        tmux(&[
            "new-session",
            "-d",
            "-s",
            &session,
            "-x",
            "80",
            "-y",
            "24",
            "bash",
            "-c",
            &script,
        ]);
        wait_for(&session, "Systems 321 of 321");
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
        let start = Instant::now();
        while !std::fs::read_to_string(&status)
            .unwrap_or_default()
            .contains("shell-ok")
        {
            assert!(
                start.elapsed() < Duration::from_secs(10),
                "SIG{sig}: the browser did not stop"
            );
            sleep(Duration::from_millis(100));
        }
        let stty = std::fs::read_to_string(dir.join("stty.txt")).unwrap();
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
    if Command::new("tmux").arg("-V").output().is_err() {
        assert!(std::env::var_os("CI").is_none(), "CI must install tmux");
        return;
    }
    let dir = common::scratch("burst");
    let session = format!("starsift-burst-{}", std::process::id());
    let script = format!(
        "cd {d} && XDG_DATA_HOME={d}/data XDG_STATE_HOME={d}/state {bin}; sleep 30",
        d = dir.display(),
        bin = env!("CARGO_BIN_EXE_starsift"),
    );
    tmux(&["kill-session", "-t", &session]);
    tmux(&[
        "new-session",
        "-d",
        "-s",
        &session,
        "-x",
        "100",
        "-y",
        "30",
        "bash",
        "-c",
        &script,
    ]);
    wait_for(&session, "Systems 321 of 321");
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
