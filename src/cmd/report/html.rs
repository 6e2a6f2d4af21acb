//! The report as one self-contained HTML page: the Markdown report's text
//! turned into HTML, with inline SVG figures (the boost per k, a fold
//! thumbnail beside each validated and held-back candidate) and inline CSS;
//! no script and no external reference, so it opens offline anywhere.

use std::collections::HashMap;
use std::io::IsTerminal;

use crate::catalogue::CandidateId;
use crate::cli::args::VettingArgs;
use crate::cli::error::CliError;
use crate::odds::Verdict;
use crate::session::Session;

const STYLE: &str = "body{font-family:sans-serif;max-width:72em;margin:1.5em auto;padding:0 1em;color:#111;line-height:1.4}\
h1{font-size:1.6em}h2{font-size:1.25em;border-bottom:1px solid #999;margin-top:1.6em}\
table{border-collapse:collapse;margin:.6em 0}td,th{border:1px solid #bbb;padding:.15em .5em;text-align:left;vertical-align:middle}\
th{background:#eee}blockquote{border-left:4px solid #0072b2;margin:1em 0;padding:.3em 1em;background:#f4f8fb}\
code{background:#f2f2f2;padding:0 .2em}svg{display:block}.statement{font-weight:bold}";

/// Escapes text for HTML.
fn esc(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            c => out.push(c),
        }
    }
    out
}

/// Inline text: escaped, with `code` spans and Markdown's `\|`.
fn inline(s: &str) -> String {
    let s = esc(&s.replace("\\|", "|"));
    let mut out = String::new();
    for (i, part) in s.split('`').enumerate() {
        if i % 2 == 1 {
            out.push_str("<code>");
            out.push_str(part);
            out.push_str("</code>");
        } else {
            out.push_str(part);
        }
    }
    out
}

/// Splits a Markdown table row into cells (a `\|` stays in its cell).
fn cells(line: &str) -> Vec<String> {
    let inner = line.trim().trim_start_matches('|').trim_end_matches('|');
    let mut out = Vec::new();
    let mut cur = String::new();
    let mut prev = ' ';
    for c in inner.chars() {
        if c == '|' && prev != '\\' {
            out.push(cur.trim().to_string());
            cur.clear();
        } else {
            cur.push(c);
        }
        prev = c;
    }
    out.push(cur.trim().to_string());
    out
}

/// An inline SVG for HTML: no XML declaration, no namespace attribute (an
/// HTML parser places `<svg>` itself), so the page names no URL at all.
fn inline_svg(svg: &str) -> String {
    let body = match svg.find("<svg") {
        Some(i) => &svg[i..],
        None => svg,
    };
    let mut out = String::with_capacity(body.len());
    let mut rest = body;
    while let Some(i) = rest.find(" xmlns") {
        out.push_str(&rest[..i]);
        let after = &rest[i + 1..];
        // Skip ` xmlns...="..."`.
        match after
            .find('"')
            .and_then(|q| after[q + 1..].find('"').map(|e| q + e + 2))
        {
            Some(end) => rest = &after[end..],
            None => {
                rest = after;
                break;
            }
        }
    }
    out.push_str(rest);
    out
}

/// Markdown (as `report` writes it) to HTML. `thumbs` adds a `fold` column
/// to every table with a `candidate` column; `after` adds HTML at the end of
/// the section with that heading.
fn convert(md: &str, thumbs: &HashMap<String, String>, after: &HashMap<&str, String>) -> String {
    let mut out = String::new();
    let mut section = String::new();
    let mut list = false;
    let mut para: Vec<String> = Vec::new();
    let lines: Vec<&str> = md.lines().collect();
    let flush_para = |out: &mut String, para: &mut Vec<String>| {
        if !para.is_empty() {
            out.push_str("<p>");
            out.push_str(&para.join("<br>\n"));
            out.push_str("</p>\n");
            para.clear();
        }
    };
    let close_section = |out: &mut String, section: &str| {
        if let Some(extra) = after.get(section) {
            out.push_str(extra);
        }
    };
    let mut i = 0;
    while i < lines.len() {
        let line = lines[i];
        let t = line.trim_end();
        if !t.starts_with("- ") && list {
            out.push_str("</ul>\n");
            list = false;
        }
        if let Some(h) = t.strip_prefix("# ") {
            flush_para(&mut out, &mut para);
            out.push_str(&format!("<h1>{}</h1>\n", inline(h)));
        } else if let Some(h) = t.strip_prefix("## ") {
            flush_para(&mut out, &mut para);
            close_section(&mut out, &section);
            section = h.to_string();
            out.push_str(&format!("<h2>{}</h2>\n", inline(h)));
        } else if let Some(q) = t.strip_prefix("> ") {
            flush_para(&mut out, &mut para);
            out.push_str(&format!(
                "<blockquote class=\"statement\">{}</blockquote>\n",
                inline(q)
            ));
        } else if let Some(item) = t.strip_prefix("- ") {
            flush_para(&mut out, &mut para);
            if !list {
                out.push_str("<ul>\n");
                list = true;
            }
            out.push_str(&format!("<li>{}</li>\n", inline(item)));
        } else if t.starts_with('|') {
            flush_para(&mut out, &mut para);
            let header = cells(t);
            let cand = header.iter().position(|h| h == "candidate");
            out.push_str("<table>\n<tr>");
            for h in &header {
                out.push_str(&format!("<th>{}</th>", inline(h)));
            }
            if cand.is_some() {
                out.push_str("<th>fold</th>");
            }
            out.push_str("</tr>\n");
            i += 1;
            // The separator line.
            if i < lines.len() && lines[i].trim_start().starts_with("|-") {
                i += 1;
            }
            while i < lines.len() && lines[i].trim_start().starts_with('|') {
                let row = cells(lines[i]);
                out.push_str("<tr>");
                for c in &row {
                    out.push_str(&format!("<td>{}</td>", inline(c)));
                }
                if let Some(k) = cand {
                    let id = row
                        .get(k)
                        .map(|c| c.replace("\\|", "|"))
                        .unwrap_or_default();
                    out.push_str("<td>");
                    out.push_str(thumbs.get(&id).map_or("", String::as_str));
                    out.push_str("</td>");
                }
                out.push_str("</tr>\n");
                i += 1;
            }
            out.push_str("</table>\n");
            continue;
        } else if t == "---" {
            flush_para(&mut out, &mut para);
            out.push_str("<hr>\n");
        } else if t.is_empty() {
            flush_para(&mut out, &mut para);
        } else {
            para.push(inline(t.trim_end()));
        }
        i += 1;
    }
    flush_para(&mut out, &mut para);
    if list {
        out.push_str("</ul>\n");
    }
    close_section(&mut out, &section);
    out
}

/// The HTML page of the report whose Markdown is `md`.
pub fn page(v: &Session, vetting: &VettingArgs, md: &str) -> Result<String, CliError> {
    let live = v.live()?;
    let cat = &v.loaded.catalogue;
    // A fold thumbnail for each validated and each held-back candidate.
    let wanted: Vec<CandidateId> = (0..cat.len() as CandidateId)
        .filter(|&c| live.verdict(c) == Verdict::Validated || live.hold(c).is_some())
        .collect();
    let finder = vetting.lc.finder(&v.loaded);
    let detrend = vetting.lc.detrend();
    let cache = crate::lightcurve::Cache::default();
    let mut thumbs: HashMap<String, String> = HashMap::new();
    let progress = std::io::stderr().is_terminal();
    let start = std::time::Instant::now();
    let mut by_star: Vec<CandidateId> = wanted.clone();
    by_star.sort_by_key(|&c| cat.star_of(c));
    for (n, &c) in by_star.iter().enumerate() {
        let shown = crate::lightcurve::show(&cache, &finder, cat, c, &detrend, 40).ok();
        let model = crate::lightcurve::model_params(cat, c);
        let svg = crate::figure::thumbnail_svg(shown.as_ref(), &model)
            .map_err(|e| CliError::Input(format!("a figure could not be drawn: {e}")))?;
        thumbs.insert(cat.candidate_id(c).to_string(), inline_svg(&svg));
        if by_star
            .get(n + 1)
            .is_none_or(|&next| cat.star_of(next) != cat.star_of(c))
        {
            cache.forget(cat.star_of(c));
        }
        if progress && start.elapsed().as_millis() > 500 {
            let pct = 100 * (n + 1) / by_star.len();
            eprint!("\rstarsift: figures {} / {} ({pct}%)", n + 1, by_star.len());
        }
    }
    if progress && start.elapsed().as_millis() > 500 {
        eprintln!();
    }
    let rows: Vec<(u32, f64)> = live
        .table()
        .rows
        .iter()
        .map(|r| (r.k as u32, r.boost))
        .collect();
    let chart = crate::figure::boost_chart_svg(&rows)
        .map_err(|e| CliError::Input(format!("the boost chart could not be drawn: {e}")))?;
    let mut after = HashMap::new();
    after.insert(
        "Model",
        format!(
            "<p>The boost per system size k (log scale), as the table gives it:</p>\n{}\n",
            inline_svg(&chart)
        ),
    );
    let body = convert(md, &thumbs, &after);
    Ok(format!(
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<title>Vetting report: {}</title>\n<style>{STYLE}</style>\n</head>\n<body>\n{body}</body>\n</html>\n",
        esc(&crate::sanitize::clean(&cat.source))
    ))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn markdown_tables_lists_and_quotes_become_html() {
        let md = "# T\n\n> odds & stuff\n\n## Model\n\n- a `b`\n\n| star | candidate |\n|---|---|\n| S | C\\|1 |\n\ntext\n";
        let mut thumbs = HashMap::new();
        thumbs.insert("C|1".to_string(), "<svg></svg>".to_string());
        let mut after = HashMap::new();
        after.insert("Model", "<p>chart</p>".to_string());
        let h = convert(md, &thumbs, &after);
        assert!(h.contains("<h1>T</h1>"), "{h}");
        assert!(
            h.contains("<blockquote class=\"statement\">odds &amp; stuff</blockquote>"),
            "{h}"
        );
        assert!(h.contains("<li>a <code>b</code></li>"), "{h}");
        assert!(h.contains("<td>C|1</td><td><svg></svg></td>"), "{h}");
        assert!(h.contains("<th>fold</th>"), "{h}");
        assert!(h.ends_with("<p>text</p>\n<p>chart</p>"), "{h}");
    }

    #[test]
    fn inline_svg_drops_namespaces() {
        let s = inline_svg(
            "<?xml version=\"1.0\"?>\n<svg width=\"2\" xmlns=\"http://www.w3.org/2000/svg\" xmlns:xlink=\"http://www.w3.org/1999/xlink\"><rect/></svg>",
        );
        assert_eq!(s, "<svg width=\"2\"><rect/></svg>");
    }
}
