//! `starsift export CATALOGUE`: the vetted catalogue — every input column,
//! then the system size, boost, odds, probability and verdict recomputed from
//! the ledger's decisions (rejected candidates leave their systems), the
//! decision with its reason, vetter and time, and the flags.
//!
//! The table opens in any reader with no options: CSV with the header on
//! the first line, JSON as an array of records, or a VOTable. Where the
//! numbers came from (tool, catalogue and its fingerprint, ledger, model,
//! settings, the not-confirmation statement) goes to a sidecar
//! `FILE.meta.json` beside `--output FILE`, into the VOTable's INFO
//! elements, and into `#` lines above a CSV header only on request.

use std::io::Write;
use std::path::{Path, PathBuf};

use serde_json::{Value, json};

use crate::catalogue::{CandidateId, Decimal, Field, NUMERIC};
use crate::cli::args::VettingArgs;
use crate::cli::error::CliError;
use crate::odds::{Live, model_statement};
use crate::output::votable::{self, Column, Kind};
use crate::output::{exact_in, push_decimal, write_atomically, write_csv_rows, write_joined_rows};
use crate::query::Filter;
use crate::sanitize::clean;
use crate::session::{LedgerUse, Session};

#[derive(Debug, Clone, clap::Args)]
pub struct Args {
    #[command(flatten)]
    pub vetting: VettingArgs,
    /// Output format: csv (header on the first line), json (an array of
    /// records) or votable (VOTable 1.4, TABLEDATA).
    #[arg(long, value_enum, default_value = "csv")]
    pub format: ExportFormat,
    /// Write to this file (atomically) instead of standard output; the
    /// provenance goes beside it to FILE.meta.json.
    #[arg(short = 'o', long = "output", value_name = "FILE")]
    pub output: Option<PathBuf>,
    /// CSV only: also write the provenance as `#` lines above the header
    /// (readers then need their comment option, e.g. pandas' comment="#").
    #[arg(long)]
    pub comments: bool,
    /// Only the candidates this filter matches (the browser's syntax, e.g.
    /// "verdict:validated !flag:echo"); the odds are still those of the
    /// whole catalogue.
    #[arg(long = "where", value_name = "FILTER")]
    pub filter: Option<String>,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, clap::ValueEnum)]
pub enum ExportFormat {
    Csv,
    Json,
    Votable,
}

impl ExportFormat {
    fn name(self) -> &'static str {
        match self {
            ExportFormat::Csv => "csv",
            ExportFormat::Json => "json",
            ExportFormat::Votable => "votable",
        }
    }
}

/// The sidecar that carries an export's provenance: `FILE.meta.json`.
pub fn sidecar_path(output: &Path) -> PathBuf {
    let mut s = output.as_os_str().to_owned();
    s.push(".meta.json");
    PathBuf::from(s)
}

pub fn run(args: &Args, out: &mut dyn Write) -> Result<(), CliError> {
    let filter = crate::cli::args::parse_where(args.filter.as_deref())?;
    if args.comments && args.format != ExportFormat::Csv {
        return Err(CliError::Input(format!(
            "--comments applies to --format csv only (a {} export carries its provenance {})",
            args.format.name(),
            if args.format == ExportFormat::Votable {
                "in INFO elements"
            } else {
                "in the sidecar FILE.meta.json"
            }
        )));
    }
    if let Some(path) = &args.output {
        crate::cli::args::check_output_path(path, &args.vetting)?;
        crate::cli::args::check_output_path(&sidecar_path(path), &args.vetting)?;
    }
    let v = Session::open_for_verdicts(&args.vetting, LedgerUse::ReadEntries)?;
    v.warn();
    let live = v.live()?;
    let rows = v.selected(live, filter.as_ref());
    let table = Export::new(&v, live);
    // The provenance (which reads the catalogue for its fingerprint) only
    // where it goes somewhere: the sidecar, `#` lines, a VOTable's INFO.
    let wanted = args.output.is_some() || args.comments || args.format == ExportFormat::Votable;
    let meta = if wanted {
        table.provenance(&rows, filter.as_ref(), args.format)
    } else {
        Value::Null
    };
    let mut buf: Vec<u8> = Vec::new();
    let sink: &mut dyn Write = if args.output.is_some() { &mut buf } else { out };
    match args.format {
        ExportFormat::Csv => table.write_csv(&rows, args.comments.then_some(&meta), sink)?,
        ExportFormat::Json => table.write_json(&rows, sink)?,
        ExportFormat::Votable => table.write_votable(&rows, &meta, sink)?,
    }
    match &args.output {
        Some(path) => {
            write_atomically(path, &buf)?;
            let side = sidecar_path(path);
            let mut text = serde_json::to_vec_pretty(&meta).map_err(std::io::Error::from)?;
            text.push(b'\n');
            write_atomically(&side, &text)?;
            eprintln!(
                "starsift: wrote {} candidates to {} (provenance in {})",
                rows.len(),
                clean(&path.display().to_string()),
                clean(&side.display().to_string())
            );
        }
        None if !args.comments && args.format != ExportFormat::Votable => {
            // Standard output carries only the table; the model goes to
            // the terminal so a person piping it still reads it.
            eprintln!("starsift: note: {}", model_statement(live.model()));
        }
        None => {}
    }
    Ok(())
}

/// One cell of the export, typed so each format writes it its own way.
enum Cell<'a> {
    Text(&'a str),
    /// Text that may be absent: empty in CSV, null in JSON.
    Opt(Option<&'a str>),
    Num(Option<f64>),
    /// An input value kept as the decimal it was written as.
    Decimal(Decimal),
    Int(u64),
    Bool(bool),
    List(Vec<&'static str>),
}

/// The vetting columns after the input columns: name, kind, unit, meaning.
const VETTING_COLUMNS: [(&str, Kind, &str, &str); 15] = [
    ("k", Kind::Long, "", "counted candidates in the system"),
    (
        "boost",
        Kind::Double,
        "",
        "multiplicity boost of the system size",
    ),
    (
        "odds",
        Kind::Double,
        "",
        "planet : false positive odds under the stated model",
    ),
    ("probability", Kind::Double, "", "odds / (1 + odds)"),
    (
        "verdict",
        Kind::Text,
        "",
        "validated, likely, held back, rejected...",
    ),
    ("decision", Kind::Text, "", "the vetter's latest decision"),
    ("reason", Kind::Text, "", "why a candidate was rejected"),
    ("note", Kind::Text, "", "the vetter's note"),
    ("vetter", Kind::Text, "", "who decided"),
    ("decided_at", Kind::Text, "", "when (UTC, RFC 3339)"),
    ("flags", Kind::Text, "", "firm flags, separated by ;"),
    ("warnings", Kind::Text, "", "soft flags, separated by ;"),
    (
        "counted",
        Kind::Boolean,
        "",
        "counts toward its system's size",
    ),
    (
        "held_back",
        Kind::Text,
        "",
        "why it is held back from validation",
    ),
    (
        "holds_to_f",
        Kind::Double,
        "",
        "the false-positive fraction up to which the verdict holds",
    ),
];

/// The unit of an input field in VOUnits (IVOA VOUnits 1.0).
fn vo_unit(f: Field) -> &'static str {
    match f {
        Field::PeriodD | Field::PeriodErrD | Field::EpochErrD | Field::Epoch => "d",
        Field::DepthPpm => "ppm",
        Field::DurationH => "h",
        Field::StarRadiusRsun => "solRad",
        Field::StarMassMsun => "solMass",
        Field::StarTeffK => "K",
        // log g has no VOUnits spelling; its unit is in the description.
        Field::RaDeg | Field::DecDeg => "deg",
        Field::Mag => "mag",
        _ => "",
    }
}

/// The export of one session: its columns and, per candidate, its cells.
struct Export<'a> {
    v: &'a Session,
    live: &'a Live,
    numeric: Vec<Field>,
    extras: Vec<String>,
}

impl<'a> Export<'a> {
    fn new(v: &'a Session, live: &'a Live) -> Export<'a> {
        let cat = &v.loaded.catalogue;
        Export {
            v,
            live,
            numeric: NUMERIC.iter().copied().filter(|f| cat.has(*f)).collect(),
            extras: cat.extra_headers().map(str::to_string).collect(),
        }
    }

    fn columns(&self) -> Vec<Column> {
        let cat = &self.v.loaded.catalogue;
        let col = |name: &str, kind, unit, description: &str| Column {
            name: name.to_string(),
            kind,
            unit,
            description: description.to_string(),
        };
        let mut c = vec![
            col("star", Kind::Text, "", "host star id"),
            col("candidate", Kind::Text, "", "candidate id"),
        ];
        for f in &self.numeric {
            let what = match f.unit() {
                "" => String::new(),
                u => format!("unit: {u}"),
            };
            c.push(col(f.name(), Kind::Double, vo_unit(*f), &what));
        }
        if cat.has(Field::Lightcurve) {
            c.push(col("lightcurve", Kind::Text, "", "light-curve file(s)"));
        }
        for h in &self.extras {
            c.push(col(h, Kind::Text, "", "input column kept as it was"));
        }
        for (name, kind, unit, what) in VETTING_COLUMNS {
            c.push(col(name, kind, unit, what));
        }
        c
    }

    fn cells(&self, c: CandidateId) -> Vec<Cell<'a>> {
        let (v, live) = (self.v, self.live);
        let cat = &v.loaded.catalogue;
        let mut out = Vec::with_capacity(self.numeric.len() + self.extras.len() + 18);
        out.push(Cell::Text(cat.star_id(cat.star_of(c))));
        out.push(Cell::Text(cat.candidate_id(c)));
        out.extend(self.numeric.iter().map(|&f| match cat.decimal(f, c) {
            Some(d) => Cell::Decimal(d),
            None => Cell::Num(cat.value(f, c)),
        }));
        if cat.has(Field::Lightcurve) {
            out.push(Cell::Text(cat.lightcurve(c).unwrap_or("")));
        }
        out.extend((0..self.extras.len()).map(|i| Cell::Text(cat.extra(i, c))));
        let e = v.stamps.get(c);
        let names = |s: crate::flags::FlagSet| s.iter().map(|f| f.name()).collect::<Vec<_>>();
        out.extend([
            Cell::Int(live.k(c) as u64),
            Cell::Num(live.boost(c)),
            Cell::Num(live.odds(c)),
            Cell::Num(live.probability(c)),
            Cell::Text(live.verdict(c).name()),
            Cell::Text(live.decision(c).name()),
            Cell::Opt(live.decision(c).reason().map(|r| r.name())),
            Cell::Opt(e.and_then(|e| e.note)),
            Cell::Opt(e.map(|e| e.vetter)),
            Cell::Opt(e.map(|e| e.decided_at)),
            Cell::List(names(v.checks.flags(c))),
            Cell::List(names(v.checks.warnings(c))),
            Cell::Bool(live.counted(c)),
            Cell::Opt(None),
            Cell::Num(live.holds_to(c)),
        ]);
        out
    }

    /// The held-back text is owned; it replaces the placeholder in `cells`.
    fn held(&self, c: CandidateId) -> String {
        crate::odds::hold_text(&self.v.loaded.catalogue, self.live, c)
    }

    fn provenance(&self, rows: &[CandidateId], filter: Option<&Filter>, f: ExportFormat) -> Value {
        let (v, live) = (self.v, self.live);
        let cat = &v.loaded.catalogue;
        let m = live.model();
        let fingerprint = v.catalogue_fingerprint().ok();
        json!({
            "tool": format!("starsift {}", env!("CARGO_PKG_VERSION")),
            "written_at": crate::ledger::now_rfc3339(),
            "format": f.name(),
            "rows": rows.len(),
            "catalogue": {
                "path": clean(&cat.source),
                "fingerprint": fingerprint,
                "candidates": cat.len(),
                "stars": cat.star_count(),
            },
            "ledger": v.ledger_path.as_deref().map(clean),
            "filter": filter.map(|f| clean(&f.text).into_owned()),
            "model": {
                "targets_searched": m.targets,
                "fp_fraction_singles": m.fp_fraction,
                "fp_fraction": m.describe_fp(),
                "boost_mode": m.mode.describe(),
                "threshold": m.threshold,
                "blocking_flags": m.blocking.iter().map(|f| f.name()).collect::<Vec<_>>(),
            },
            "check_settings": v.settings,
            "lightcurves": {
                "stars_read": v.lightcurve_stars,
                "stars_failed": v.lightcurve_errors.len(),
                "samples": v.lightcurve_totals,
                "notice": v.lightcurve_notice,
            },
            "held_back": live.held_line(),
            "statement": model_statement(m),
            "columns": self.columns().iter().map(|c| json!({
                "name": clean(&c.name), "unit": c.unit, "description": c.description,
            })).collect::<Vec<_>>(),
        })
    }

    /// Asks for what a row reads out of file order, some rows ahead (its
    /// star's id and system size).
    fn ahead(&self, &c: &CandidateId, bytes: bool) {
        self.live.prefetch_star(&self.v.loaded.catalogue, c, bytes);
    }

    fn write_csv(
        &self,
        rows: &[CandidateId],
        comments: Option<&Value>,
        out: &mut dyn Write,
    ) -> Result<(), CliError> {
        if let Some(meta) = comments {
            for line in comment_lines(meta) {
                writeln!(out, "# {line}")?;
            }
        }
        let header: Vec<String> = self.columns().into_iter().map(|c| c.name).collect();
        let held_at = header.len() - 2;
        let ahead = |c: &CandidateId, bytes: bool| self.ahead(c, bytes);
        write_csv_rows(out, &header, rows, ahead, |w, &c| {
            for (i, cell) in self.cells(c).into_iter().enumerate() {
                match cell {
                    _ if i == held_at => w.text(self.held(c)),
                    Cell::Text(s) => w.text(s),
                    Cell::Opt(s) => w.text(s.unwrap_or("")),
                    Cell::Num(x) => w.exact(x),
                    Cell::Decimal(d) => w.decimal(d),
                    Cell::Int(n) => w.int(n),
                    Cell::Bool(t) => w.text(if t { "yes" } else { "no" }),
                    Cell::List(l) => w.list(l, ";"),
                }
            }
        })?;
        Ok(())
    }

    fn write_json(&self, rows: &[CandidateId], out: &mut dyn Write) -> Result<(), CliError> {
        let names: Vec<String> = self.columns().into_iter().map(|c| c.name).collect();
        let held_at = names.len() - 2;
        out.write_all(if rows.is_empty() { b"[" } else { b"[\n" })?;
        // One compact object per row, keys in column order. A name given
        // twice (an input column named like a vetting one) is one member,
        // where the name first came, with the last value: as a JSON map.
        let mut place: Vec<usize> = Vec::with_capacity(names.len());
        for (i, n) in names.iter().enumerate() {
            place.push(names[..i].iter().position(|m| m == n).unwrap_or(i));
        }
        let last: Vec<usize> = (0..names.len())
            .map(|i| (0..names.len()).rev().find(|&j| place[j] == i).unwrap_or(i))
            .collect();
        let keys: Vec<String> = names
            .iter()
            .map(|n| serde_json::to_string(n).unwrap_or_default())
            .collect();
        let ahead = |c: &CandidateId, bytes: bool| self.ahead(c, bytes);
        write_joined_rows(out, rows, b",\n", ahead, |&c, buf| {
            let cells = self.cells(c);
            buf.push(b'{');
            let mut first = true;
            for (i, &p) in place.iter().enumerate() {
                if p != i {
                    continue;
                }
                if !first {
                    buf.push(b',');
                }
                first = false;
                buf.extend_from_slice(keys[i].as_bytes());
                buf.push(b':');
                let j = last[i];
                // Writing JSON into memory cannot fail.
                let _ = match &cells[j] {
                    _ if j == held_at => serde_json::to_writer(&mut *buf, &self.held(c)),
                    Cell::Text(s) => serde_json::to_writer(&mut *buf, s),
                    Cell::Opt(s) => serde_json::to_writer(&mut *buf, s),
                    Cell::Num(x) => serde_json::to_writer(&mut *buf, &x.filter(|x| x.is_finite())),
                    Cell::Decimal(d) => {
                        push_decimal(buf, *d, true);
                        Ok(())
                    }
                    Cell::Int(k) => serde_json::to_writer(&mut *buf, k),
                    Cell::Bool(t) => serde_json::to_writer(&mut *buf, t),
                    Cell::List(l) => serde_json::to_writer(&mut *buf, l),
                };
            }
            buf.push(b'}');
        })?;
        out.write_all(b"\n]\n")?;
        Ok(())
    }

    fn write_votable(
        &self,
        rows: &[CandidateId],
        meta: &Value,
        out: &mut dyn Write,
    ) -> Result<(), CliError> {
        let columns = self.columns();
        let held_at = columns.len() - 2;
        let info: Vec<(String, String)> = comment_lines(meta)
            .into_iter()
            .filter_map(|l| {
                l.split_once(": ")
                    .map(|(k, v)| (k.to_string(), v.to_string()))
            })
            .collect();
        let description = format!(
            "starsift vetted catalogue of {}. {}",
            clean(&self.v.loaded.catalogue.source),
            model_statement(self.live.model())
        );
        votable::begin(out, &description, &info, &columns)?;
        let ahead = |c: &CandidateId, bytes: bool| self.ahead(c, bytes);
        write_joined_rows(out, rows, b"", ahead, |&c, buf| {
            let (mut b, mut scratch) = (crate::output::Shortest::new(), String::new());
            let texts: Vec<String> = (self.cells(c).into_iter().enumerate())
                .map(|(i, cell)| match cell {
                    _ if i == held_at => self.held(c),
                    Cell::Text(s) => clean(s).into_owned(),
                    Cell::Opt(s) => clean(s.unwrap_or("")).into_owned(),
                    Cell::Num(x) => exact_in(&mut b, x).to_string(),
                    Cell::Decimal(d) => {
                        let mut text = Vec::new();
                        push_decimal(&mut text, d, false);
                        // Digits, a sign, a point and an exponent: ASCII.
                        String::from_utf8(text).unwrap_or_default()
                    }
                    Cell::Int(k) => k.to_string(),
                    Cell::Bool(t) => (if t { "T" } else { "F" }).to_string(),
                    Cell::List(l) => l.join(";"),
                })
                .collect();
            // Writing into memory cannot fail.
            let _ = votable::row(buf, &texts, &mut scratch);
        })?;
        votable::end(out)?;
        Ok(())
    }
}

/// The provenance as `key: value` lines (for `#` comments and INFO elements).
fn comment_lines(meta: &Value) -> Vec<String> {
    let s = |v: &Value| match v {
        Value::String(s) => s.clone(),
        Value::Null => "none".into(),
        other => other.to_string(),
    };
    let mut lines = vec![
        format!("tool: {}", s(&meta["tool"])),
        format!("written_at: {}", s(&meta["written_at"])),
        format!("catalogue: {}", s(&meta["catalogue"]["path"])),
        format!("fingerprint: {}", s(&meta["catalogue"]["fingerprint"])),
        format!("ledger: {}", s(&meta["ledger"])),
        format!(
            "model: N = {}, {}, boost {}, validated at odds >= {}:1",
            s(&meta["model"]["targets_searched"]),
            s(&meta["model"]["fp_fraction"]),
            s(&meta["model"]["boost_mode"]),
            crate::output::num(meta["model"]["threshold"].as_f64(), 6)
        ),
    ];
    if !meta["held_back"].is_null() {
        lines.push(format!("held_back: {}", s(&meta["held_back"])));
    }
    if !meta["filter"].is_null() {
        lines.push(format!(
            "filter: only the {} candidates matching {}",
            s(&meta["rows"]),
            s(&meta["filter"])
        ));
    }
    lines.push(format!("statement: {}", s(&meta["statement"])));
    lines
}
