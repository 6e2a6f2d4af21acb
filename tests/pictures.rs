//! Pictures through the built binary: the candidate figure (SVG structure,
//! the facts equal to `odds` and `checks`), PNG, one file per candidate in a
//! folder, the self-contained HTML report, and both rendered in headless
//! Chromium (skipped, saying why, only where Chromium is not installed).

mod common;

use std::path::{Path, PathBuf};
use std::process::Command;

use common::{scratch, starsift, stderr, stdout};

fn s(p: &Path) -> &str {
    p.to_str().unwrap()
}

/// (candidate, odds, verdict, k) from `odds --format csv` on the demo.
fn odds_rows() -> Vec<(String, String, String, String)> {
    let o = starsift(&["odds", "--format", "csv"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let mut r = csv::Reader::from_reader(o.stdout.as_slice());
    let h = r.headers().unwrap().clone();
    let at = |n: &str| h.iter().position(|x| x == n).unwrap();
    let (c, od, v, k) = (at("candidate"), at("odds"), at("verdict"), at("k"));
    r.records()
        .map(|x| {
            let x = x.unwrap();
            (x[c].into(), x[od].into(), x[v].into(), x[k].into())
        })
        .collect()
}

/// The text of every `<text>` element of an SVG.
fn svg_text(svg: &str) -> String {
    let mut out = String::new();
    for part in svg.split("<text").skip(1) {
        if let Some(start) = part.find('>') {
            let rest = &part[start + 1..];
            if let Some(end) = rest.find("</text>") {
                out.push_str(&rest[..end]);
                out.push('\n');
            }
        }
    }
    out.replace("&apos;", "'")
        .replace("&quot;", "\"")
        .replace("&lt;", "<")
        .replace("&gt;", ">")
        .replace("&amp;", "&")
}

#[test]
fn a_candidate_figure_has_every_panel_and_the_sessions_numbers() {
    let d = scratch("plot");
    let rows = odds_rows();
    // A held-back candidate of a multi (its siblings' transits are marked).
    let (id, odds, verdict, _) = rows
        .iter()
        .find(|r| r.0 == "HWT98466-s2")
        .cloned()
        .unwrap_or_else(|| rows[0].clone());
    let out = d.join("fig.svg");
    let o = starsift(&["plot", "--candidate", &id, "-o", s(&out)]);
    assert!(o.status.success(), "{}", stderr(&o));
    let svg = std::fs::read_to_string(&out).unwrap();
    assert!(svg.starts_with("<svg") || svg.contains("<svg"), "an SVG");
    let text = svg_text(&svg);
    for panel in [
        "light curve, detrended",
        "this candidate's transits",
        "transit: depth",
        "residuals",
        "odd:",
        "even:",
        "whole orbit: secondary at 0.5",
        "per-transit depths",
        "Statistical validation is not confirmation",
    ] {
        assert!(text.contains(panel), "{panel} missing from:\n{text}");
    }
    // The facts are the session's: odds and verdict as `odds` prints them.
    let shown = starsift::odds::format_odds(odds.parse::<f64>().unwrap());
    assert!(
        text.contains(&format!("odds {shown}")),
        "odds {shown}:\n{text}"
    );
    assert!(text.contains(&format!("verdict {verdict}")), "{text}");
    // Every flag `checks` gives it, with its reason.
    let o = starsift(&["checks", "--format", "json"]);
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let c = v["candidates"]
        .as_array()
        .unwrap()
        .iter()
        .find(|c| c["candidate"] == id.as_str())
        .unwrap();
    for f in c["flags"].as_array().unwrap() {
        assert!(
            text.contains(&format!("flag {}:", f.as_str().unwrap())),
            "{f}:\n{text}"
        );
    }
    // Marks: binned points (circles), error bars and the model line.
    assert!(svg.matches("<circle").count() > 100, "points");
    assert!(svg.contains("<polyline"), "lines");
    // PNG.
    let png = d.join("fig.png");
    let o = starsift(&["plot", "--candidate", &id, "-o", s(&png)]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(
        std::fs::read(&png)
            .unwrap()
            .starts_with(b"\x89PNG\r\n\x1a\n")
    );
    // A wrong extension is refused before anything is read.
    let o = starsift(&["plot", "--candidate", &id, "-o", s(&d.join("fig.jpg"))]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains(".svg or .png"), "{}", stderr(&o));
}

#[test]
fn a_figure_says_who_decided_the_candidate_and_when() {
    let d = scratch("plot-decided");
    let ledger = d.join("l.sqlite");
    let rows = odds_rows();
    let (id, other) = (&rows[0].0, &rows[1].0);
    for (c, vetter) in [(id, "zed"), (other, "amy"), (id, "amy")] {
        let o = starsift(&[
            "decide",
            "--candidate",
            c,
            "--decision",
            "parked",
            "--vetter",
            vetter,
            "--ledger",
            s(&ledger),
        ]);
        assert!(o.status.success(), "{}", stderr(&o));
    }
    let figure = |extra: &[&str]| {
        let out = d.join("fig.svg");
        let mut a = vec![
            "plot",
            "--candidate",
            id,
            "-o",
            s(&out),
            "--ledger",
            s(&ledger),
        ];
        a.extend_from_slice(extra);
        let o = starsift(&a);
        assert!(o.status.success(), "{}", stderr(&o));
        svg_text(&std::fs::read_to_string(&out).unwrap())
    };
    // Its latest entry, whoever made it; of one vetter when asked.
    let text = figure(&[]);
    assert!(text.contains("decision: parked by amy at "), "{text}");
    let text = figure(&["--vetter", "zed"]);
    assert!(text.contains("decision: parked by zed at "), "{text}");
}

#[test]
fn a_filter_writes_one_figure_per_candidate() {
    let d = scratch("plot-many");
    let rows = odds_rows();
    let want = rows.iter().filter(|r| r.3 == "4").count();
    let dir = d.join("figs");
    let o = starsift(&["plot", "--where", "k=4", "-o", s(&dir), "--format", "svg"]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(
        stdout(&o).contains(&format!("wrote {want} figures")),
        "{}",
        stdout(&o)
    );
    assert_eq!(std::fs::read_dir(&dir).unwrap().count(), want);
}

fn html_report(d: &Path) -> PathBuf {
    let out = d.join("report.html");
    let o = starsift(&["report", "--format", "html", "-o", s(&out)]);
    assert!(o.status.success(), "{}", stderr(&o));
    out
}

#[test]
fn the_html_report_is_self_contained() {
    let d = scratch("report-html");
    let html = std::fs::read_to_string(html_report(&d)).unwrap();
    assert!(html.starts_with("<!DOCTYPE html>"));
    for external in [
        "http:", "https:", "<script", "src=", "href=", "url(", "@import",
    ] {
        assert!(!html.contains(external), "{external} in the report");
    }
    for section in [
        "Model",
        "Counts",
        "Validated",
        "Held back by the cleaning",
        "Rejections by reason",
        "Decisions per vetter",
        "Disagreements",
        "Provenance",
    ] {
        assert!(html.contains(&format!("<h2>{section}</h2>")), "{section}");
    }
    assert!(html.contains("Statistical validation is not confirmation"));
    assert!(html.contains("boost by system size k"));
    // A thumbnail beside every validated candidate.
    let validated = odds_rows().iter().filter(|r| r.2 == "validated").count();
    assert!(html.matches("<svg").count() > validated, "thumbnails");
}

/// Headless Chromium, if installed: `None` (and why) when it is not.
fn chromium() -> Option<String> {
    ["chromium", "chromium-browser", "google-chrome"]
        .into_iter()
        .find(|c| {
            Command::new(c)
                .arg("--version")
                .output()
                .is_ok_and(|o| o.status.success())
        })
        .map(String::from)
}

/// A screenshot of `page` in headless Chromium.
fn screenshot(browser: &str, page: &Path, out: &Path, profile: &Path) {
    let o = Command::new(browser)
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
            "--hide-scrollbars",
            "--window-size=1200,1600",
        ])
        .arg(format!("--user-data-dir={}", profile.display()))
        .arg(format!("--screenshot={}", out.display()))
        .arg(format!("file://{}", page.display()))
        .output()
        .expect("run chromium");
    assert!(
        out.exists(),
        "no screenshot: {}",
        String::from_utf8_lossy(&o.stderr)
    );
}

/// Distinct grey levels in a PNG: a blank page has one or two.
fn grey_levels(png: &Path) -> usize {
    let decoder = png::Decoder::new(std::io::BufReader::new(std::fs::File::open(png).unwrap()));
    let mut reader = decoder.read_info().unwrap();
    let mut buf = vec![0; reader.output_buffer_size()];
    let info = reader.next_frame(&mut buf).unwrap();
    let step = info.color_type.samples();
    let mut seen = std::collections::HashSet::new();
    for px in buf[..info.buffer_size()].chunks(step) {
        seen.insert(px[0] / 8);
    }
    seen.len()
}

#[test]
fn chromium_renders_the_report_and_a_figure() {
    let Some(browser) = chromium() else {
        eprintln!("skipped: Chromium is not installed here (.ci/run installs it)");
        return;
    };
    let d = scratch("chromium");
    let report = html_report(&d);
    let fig = d.join("fig.svg");
    let o = starsift(&["plot", "--candidate", "HWT98466-s2", "-o", s(&fig)]);
    assert!(o.status.success(), "{}", stderr(&o));
    for (page, shot) in [(&report, d.join("report.png")), (&fig, d.join("fig.png"))] {
        screenshot(&browser, page, &shot, &d.join("profile"));
        let levels = grey_levels(&shot);
        assert!(
            levels > 4,
            "{}: a blank screenshot ({levels} levels)",
            page.display()
        );
    }
}
