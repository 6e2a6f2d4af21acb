//! Bench: a 1,000,000-candidate catalogue loaded from CSV, from an IPAC
//! ASCII table and from a VOTable (TABLEDATA) holding the same rows, best
//! of three loads each in the same run. The target: IPAC or VOTable
//! within 3× of CSV.
//!
//! Run: `cargo bench --bench formats` (writes bench-data/big-1000000.{csv,tbl,vot}
//! on first use). Options: `-- --candidates N` for another size.

use std::io::{BufWriter, Write};
use std::path::{Path, PathBuf};
use std::time::{Duration, Instant};

use starsift::catalogue::{Catalogue, LoadOptions, Source};

fn best_of(runs: usize, path: &Path) -> (Duration, usize) {
    let mut best = Duration::MAX;
    let mut n = 0;
    for _ in 0..runs {
        let t = Instant::now();
        let c = Catalogue::load(Source::Path(path), &LoadOptions::default()).expect("load");
        best = best.min(t.elapsed());
        n = c.len();
    }
    (best, n)
}

/// The CSV's header and rows (comment lines dropped).
fn rows(csv: &Path) -> (Vec<String>, Vec<Vec<String>>) {
    let mut r = csv::ReaderBuilder::new()
        .comment(Some(b'#'))
        .from_path(csv)
        .expect("open");
    let header = r
        .headers()
        .expect("header")
        .iter()
        .map(String::from)
        .collect();
    let rows = r
        .records()
        .map(|x| x.expect("row").iter().map(String::from).collect())
        .collect();
    (header, rows)
}

fn write_ipac(path: &Path, header: &[String], rows: &[Vec<String>]) {
    let width: Vec<usize> = (0..header.len())
        .map(|k| {
            rows.iter()
                .map(|r| r[k].len())
                .chain([header[k].len(), 6])
                .max()
                .unwrap_or(6)
                + 1
        })
        .collect();
    let mut w = BufWriter::new(std::fs::File::create(path).expect("create"));
    let bar = |w: &mut BufWriter<std::fs::File>, cells: &[&str]| {
        let mut s = String::from("|");
        for (k, c) in cells.iter().enumerate() {
            s += &format!("{:>w$}|", c, w = width[k]);
        }
        writeln!(w, "{s}").expect("write");
    };
    let names: Vec<&str> = header.iter().map(String::as_str).collect();
    bar(&mut w, &names);
    let types: Vec<&str> = header.iter().map(|_| "char").collect();
    bar(&mut w, &types);
    let mut line = String::new();
    for r in rows {
        line.clear();
        line.push(' ');
        for (k, c) in r.iter().enumerate() {
            line += &format!("{:>w$} ", c, w = width[k]);
        }
        writeln!(w, "{line}").expect("write");
    }
}

fn write_votable(path: &Path, header: &[String], rows: &[Vec<String>]) {
    let mut w = BufWriter::new(std::fs::File::create(path).expect("create"));
    writeln!(
        w,
        "<?xml version=\"1.0\"?>\n<VOTABLE version=\"1.4\"><RESOURCE><TABLE>"
    )
    .expect("w");
    for h in header {
        writeln!(w, "<FIELD name=\"{h}\" datatype=\"char\" arraysize=\"*\"/>").expect("w");
    }
    writeln!(w, "<DATA><TABLEDATA>").expect("w");
    for r in rows {
        let mut s = String::from("<TR>");
        for c in r {
            s += "<TD>";
            s += &c.replace('&', "&amp;").replace('<', "&lt;");
            s += "</TD>";
        }
        s += "</TR>";
        writeln!(w, "{s}").expect("w");
    }
    writeln!(w, "</TABLEDATA></DATA></TABLE></RESOURCE></VOTABLE>").expect("w");
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let candidates = args
        .iter()
        .position(|a| a == "--candidates")
        .and_then(|i| args.get(i + 1))
        .and_then(|v| v.parse().ok())
        .unwrap_or(1_000_000);
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("bench-data");
    std::fs::create_dir_all(&dir).expect("bench-data");
    let csv = dir.join(format!("big-{candidates}.csv"));
    if !csv.exists() {
        starsift::demo::write_big(&csv, candidates, 42).expect("write");
    }
    let ipac: PathBuf = csv.with_extension("tbl");
    let vot: PathBuf = csv.with_extension("vot");
    if !ipac.exists() || !vot.exists() {
        eprintln!("writing {} and {} ...", ipac.display(), vot.display());
        let (h, r) = rows(&csv);
        write_ipac(&ipac, &h, &r);
        write_votable(&vot, &h, &r);
    }
    let (t_csv, n_csv) = best_of(3, &csv);
    println!(
        "csv      {n_csv} candidates  {:>8.3} s",
        t_csv.as_secs_f64()
    );
    for p in [&ipac, &vot] {
        let (t, n) = best_of(3, p);
        assert_eq!(n, n_csv, "{}", p.display());
        println!(
            "{:<8} {n} candidates  {:>8.3} s  ({:.2}x csv)",
            p.extension().and_then(|e| e.to_str()).unwrap_or(""),
            t.as_secs_f64(),
            t.as_secs_f64() / t_csv.as_secs_f64()
        );
    }
}
