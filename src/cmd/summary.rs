//! `starsift summary CATALOGUE`: what loaded — stars, candidates, the
//! multiplicity histogram, the column mapping and the skipped rows.

use std::io::Write;

use serde_json::{Value, json};

use crate::catalogue::Catalogue;
use crate::checks::LightcurveTotals;
use crate::cli::args::{CatalogueArgs, LightcurveArgs, Loaded};
use crate::cli::error::CliError;
use crate::output::{Align, Format, Table, csv_writer, write_json};
use crate::sanitize::clean;

#[derive(Debug, Clone, clap::Args)]
pub struct Args {
    #[command(flatten)]
    pub input: CatalogueArgs,
    /// With `--lightcurves [DIR]`, also read every star's light curve and
    /// say how many segments and samples were used and dropped.
    #[command(flatten)]
    pub lc: LightcurveArgs,
    /// Output format: a table for people, CSV (the histogram) or JSON for scripts.
    #[arg(long, value_enum, default_value = "table")]
    pub format: Format,
}

/// Skipped rows listed in the table format; JSON lists them all.
const SKIPPED_SHOWN: usize = 20;

pub fn run(args: &Args, out: &mut dyn Write) -> Result<(), CliError> {
    // Every cell is validated; only the values summary reports are kept
    // (all of them when light curves are to be read: they need the epochs).
    args.lc.check_folder()?;
    let census = args.lc.lightcurves.is_some();
    let loaded = if census {
        args.input.load()?
    } else {
        args.input.load_index()?
    };
    let cat = &loaded.catalogue;
    let lcs = census.then(|| light_curves(&args.lc, &loaded));
    match args.format {
        Format::Json => {
            let mut v = to_json(cat);
            if let Some(l) = &lcs {
                v["lightcurves"] = l.json();
            }
            write_json(out, &v)?
        }
        Format::Csv => {
            let mut w = csv_writer(out);
            w.write_record(["multiplicity", "stars", "candidates"])?;
            for (k, n) in cat.histogram().iter().enumerate().skip(1) {
                w.write_record([k.to_string(), n.to_string(), (k * n).to_string()])?;
            }
            w.flush()?;
            if !cat.skipped.is_empty() {
                eprintln!(
                    "starsift: {} rows skipped; `--format table` or `--format json` lists them",
                    cat.skipped.len()
                );
            }
            for n in &cat.notes {
                eprintln!("starsift: warning: {}", clean(n));
            }
        }
        Format::Table => {
            writeln!(out, "catalogue   {} ({})", clean(&cat.source), cat.format)?;
            match (&loaded.survey.name, &loaded.survey_source) {
                (Some(name), Some(src)) => {
                    writeln!(out, "survey      {} ({})", clean(name), clean(src))?
                }
                (None, Some(src)) => writeln!(out, "survey      {}", clean(src))?,
                _ => writeln!(out, "survey      no survey.toml beside the catalogue")?,
            }
            writeln!(out, "stars       {}", cat.star_count())?;
            if let Some(l) = &lcs {
                writeln!(out, "lightcurves {}", l.describe())?;
            }
            writeln!(out, "candidates  {}", cat.len())?;
            writeln!(
                out,
                "rows        {} read, {} skipped",
                cat.rows_seen,
                cat.skipped.len()
            )?;
            for n in &cat.notes {
                writeln!(out, "note        {}", clean(n))?;
            }
            writeln!(out)?;
            let mut t = Table::new(&[
                ("multiplicity", Align::Right),
                ("stars", Align::Right),
                ("candidates", Align::Right),
            ]);
            for (k, n) in cat.histogram().iter().enumerate().skip(1) {
                if *n > 0 {
                    t.row(&[k.to_string(), n.to_string(), (k * n).to_string()]);
                }
            }
            t.row(&[
                "all".to_string(),
                cat.star_count().to_string(),
                cat.len().to_string(),
            ]);
            t.write(out, "")?;
            writeln!(out)?;
            writeln!(out, "columns")?;
            let mut t = Table::new(&[
                ("field", Align::Left),
                ("header", Align::Left),
                ("unit", Align::Left),
                ("mapped by", Align::Left),
            ]);
            for c in &cat.columns {
                t.row(&[c.field, &c.header, &c.unit, &c.how]);
            }
            t.write(out, "  ")?;
            let extras: Vec<_> = cat.extra_headers().map(|h| clean(h).into_owned()).collect();
            if !extras.is_empty() {
                writeln!(out, "  kept as extra columns: {}", extras.join(", "))?;
            }
            let verdicts = verdict_columns(cat);
            if !verdicts.is_empty() {
                let said: Vec<String> =
                    verdicts.iter().map(|(h, w)| format!("{h} ({w})")).collect();
                writeln!(
                    out,
                    "  read for earlier verdicts: {} (docs/science.md §3.5)",
                    said.join(", ")
                )?;
            }
            if !cat.skipped.is_empty() {
                writeln!(out)?;
                writeln!(
                    out,
                    "skipped rows ({} of {}{})",
                    cat.skipped.len().min(SKIPPED_SHOWN),
                    cat.skipped.len(),
                    if cat.skipped.len() > SKIPPED_SHOWN {
                        "; --format json lists all"
                    } else {
                        ""
                    }
                )?;
                let mut t = Table::new(&[
                    (
                        if cat.format == "VOTable" || cat.format == "FITS table" {
                            "row"
                        } else {
                            "line"
                        },
                        Align::Right,
                    ),
                    ("column", Align::Left),
                    ("reason", Align::Left),
                ]);
                for s in cat.skipped.iter().take(SKIPPED_SHOWN) {
                    t.row(&[
                        s.line.to_string(),
                        s.column.clone().unwrap_or_else(|| "-".into()),
                        s.reason.clone(),
                    ]);
                }
                t.write(out, "  ")?;
            }
        }
    }
    Ok(())
}

/// The JSON summary. Keys: `catalogue`, `stars`, `candidates`, `rows_seen`,
/// `histogram` (multiplicity as a string → stars), `skipped_rows`, `skipped`
/// (all of them, {line, column, reason}), `columns`, `extra_columns`.
pub fn to_json(cat: &Catalogue) -> Value {
    let histogram: serde_json::Map<String, Value> = cat
        .histogram()
        .iter()
        .enumerate()
        .skip(1)
        .filter(|(_, n)| **n > 0)
        .map(|(k, n)| (k.to_string(), json!(n)))
        .collect();
    let skipped: Vec<Value> = cat
        .skipped
        .iter()
        .map(|s| {
            json!({
                "line": s.line,
                "column": s.column.as_deref().map(|c| clean(c).into_owned()),
                "reason": clean(&s.reason),
            })
        })
        .collect();
    let columns: Vec<Value> = cat
        .columns
        .iter()
        .map(|c| {
            json!({
                "field": c.field,
                "header": clean(&c.header),
                "index": c.index,
                "unit": c.unit,
                "mapped_by": clean(&c.how),
            })
        })
        .collect();
    let extras: Vec<String> = cat.extra_headers().map(|h| clean(h).into_owned()).collect();
    let mut v = json!({
        "catalogue": clean(&cat.source),
        "format": cat.format,
        "stars": cat.star_count(),
        "candidates": cat.len(),
        "rows_seen": cat.rows_seen,
        "histogram": histogram,
        "skipped_rows": cat.skipped.len(),
        "skipped": skipped,
        "columns": columns,
        "extra_columns": extras,
    });
    // The columns read for earlier verdicts, where there are some.
    let verdicts = verdict_columns(cat);
    if !verdicts.is_empty() {
        v["verdict_columns"] = verdicts
            .iter()
            .map(|(h, w)| json!({"header": h, "read_as": w}))
            .collect();
    }
    // The loader's notes, where it has some (the key is absent otherwise,
    // as before there were any).
    if !cat.notes.is_empty() {
        v["notes"] = cat.notes.iter().map(|n| clean(n).into_owned()).collect();
    }
    v
}

/// The extra columns the checks read for earlier verdicts, each with what
/// it is read as: a disposition, a false-positive flag, or a false-positive
/// probability beside the mapped `fpp` (docs/science.md §3.5).
fn verdict_columns(cat: &Catalogue) -> Vec<(String, &'static str)> {
    let dispositions = cat.disposition_columns();
    cat.extra_headers()
        .enumerate()
        .filter_map(|(i, h)| {
            let what = if dispositions.contains(&i) {
                "disposition"
            } else if crate::catalogue::names_an_fp_flag(h) {
                if crate::catalogue::names_a_not_transit_flag(h) {
                    "not-transit-like flag"
                } else {
                    "false-positive flag"
                }
            } else if crate::catalogue::names_an_fp_probability(h) {
                "false-positive probability"
            } else {
                return None;
            };
            Some((clean(h).into_owned(), what))
        })
        .collect()
}

/// What the light curves of a catalogue hold, read without diagnostics.
struct Census {
    stars: usize,
    unreadable: Vec<(String, String)>,
    totals: LightcurveTotals,
}

impl Census {
    fn describe(&self) -> String {
        format!(
            "{} stars, {} unreadable: {}",
            self.stars,
            self.unreadable.len(),
            self.totals.describe()
        )
    }

    fn json(&self) -> Value {
        json!({
            "stars": self.stars,
            "totals": self.totals,
            "unreadable": self.unreadable.iter().map(|(s, e)| json!({"star": clean(s), "error": clean(e)})).collect::<Vec<_>>(),
        })
    }
}

fn light_curves(lc: &LightcurveArgs, loaded: &Loaded) -> Census {
    let cat = &loaded.catalogue;
    let finder = lc.finder(loaded);
    let mut c = Census {
        stars: 0,
        unreadable: Vec::new(),
        totals: LightcurveTotals::default(),
    };
    for star in (0..cat.star_count() as u32).filter(|&s| finder.has(cat, s)) {
        c.stars += 1;
        let what = format!("reading the light curve of star {}", cat.star_id(star));
        match crate::contain::contained(&what, || finder.load(cat, star).map_err(|e| e.to_string()))
            .and_then(|r| r)
        {
            Ok(l) => {
                c.totals.segments += l.segments.len();
                c.totals.samples += l.time.len();
                c.totals.dropped_missing += l.dropped;
                c.totals.dropped_quality += l.dropped_quality;
            }
            Err(e) => {
                eprintln!(
                    "starsift: warning: star {}: {}",
                    clean(cat.star_id(star)),
                    clean(&e)
                );
                c.unreadable.push((cat.star_id(star).to_string(), e));
            }
        }
    }
    c
}
