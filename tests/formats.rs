//! Catalogues in astronomy's table formats, written here the way archives
//! and VO services lay them out (IPAC ASCII with its type and unit lines, a
//! VOTable with TABLEDATA, a FITS binary table with TUNITn, ECSV with its
//! YAML header), each stating its own units, read back through the built
//! binary: the same candidates and the same odds as from CSV. Ids invented.

mod common;

use std::path::{Path, PathBuf};

use common::{scratch, starsift, stderr, stdout};

/// An invented candidate: star, id, period (d), epoch, depth (ppm),
/// duration (h).
struct Row {
    star: String,
    id: String,
    period: f64,
    epoch: f64,
    depth: f64,
    duration: f64,
}

fn rows() -> Vec<Row> {
    let mut v = Vec::new();
    // Singles, pairs and a triple; values spread over realistic ranges.
    let sizes = [1, 1, 2, 1, 3, 1, 2, 1, 1, 2, 1, 1, 1, 2, 1, 1];
    for (s, &k) in sizes.iter().enumerate() {
        for j in 0..k {
            let x = (s * 7 + j * 3) as f64;
            v.push(Row {
                star: format!("FMT{:03}", s + 1),
                id: format!("FMT{:03}.{:02}", s + 1, j + 1),
                period: 1.3 + 2.7 * x + 0.01 * j as f64,
                epoch: 100.25 + 0.37 * x,
                depth: 300.0 + 45.0 * x,
                duration: 1.5 + 0.05 * x,
            });
        }
    }
    v
}

fn write_csv(d: &Path) -> PathBuf {
    let mut t = String::from("star,candidate,period_d,epoch,depth_ppm,duration_h\n");
    for r in rows() {
        t += &format!(
            "{},{},{},{},{},{}\n",
            r.star, r.id, r.period, r.epoch, r.depth, r.duration
        );
    }
    let p = d.join("cat.csv");
    std::fs::write(&p, t).unwrap();
    p
}

/// IPAC ASCII (IRSA's definition): keyword and comment lines, then the
/// name, type, unit and null lines between `|` marks, then fixed-width
/// rows whose values lie between the marks. Depth in percent, duration in
/// days: the unit line says so.
fn write_ipac(d: &Path) -> PathBuf {
    let header = ["star", "candidate", "period", "epoch", "depth", "duration"];
    let types = ["char", "char", "double", "double", "double", "double"];
    let units = ["", "", "d", "d", "%", "d"];
    let cells: Vec<[String; 6]> = rows()
        .iter()
        .map(|r| {
            [
                r.star.clone(),
                r.id.clone(),
                format!("{}", r.period),
                format!("{}", r.epoch),
                format!("{}", r.depth / 1e4),
                format!("{}", r.duration / 24.0),
            ]
        })
        .collect();
    let width: Vec<usize> = (0..6)
        .map(|k| {
            cells
                .iter()
                .map(|c| c[k].len())
                .chain([header[k].len(), types[k].len(), 4])
                .max()
                .unwrap()
                + 1
        })
        .collect();
    let line = |vals: [&str; 6]| -> String {
        let mut s = String::from("|");
        for k in 0..6 {
            s += &format!("{:>w$}|", vals[k], w = width[k]);
        }
        s + "\n"
    };
    let mut t = String::from("\\fixlen = T\n\\ an invented survey's candidates\n");
    t += &line(header);
    t += &line(types);
    t += &line(units);
    t += &line(["null"; 6]);
    for c in &cells {
        let mut s = String::from(" ");
        for k in 0..6 {
            s += &format!("{:>w$} ", c[k], w = width[k]);
        }
        t += &s;
        t += "\n";
    }
    let p = d.join("cat.tbl");
    std::fs::write(&p, t).unwrap();
    p
}

/// A VOTable 1.4 with TABLEDATA, as VO services return it: an INFO, a
/// PARAM, FIELDs with units (depth as a fraction... stated as ppt here,
/// duration in minutes), and the rows.
fn write_votable(d: &Path) -> PathBuf {
    let mut t = String::from(
        r#"<?xml version="1.0" encoding="UTF-8"?>
<VOTABLE version="1.4" xmlns="http://www.ivoa.net/xml/VOTable/v1.3">
<RESOURCE type="results">
<INFO name="QUERY_STATUS" value="OK"/>
<TABLE name="candidates">
<PARAM name="survey" datatype="char" arraysize="*" value="invented"/>
<FIELD name="star_id" datatype="char" arraysize="*" ucd="meta.id"/>
<FIELD name="candidate_id" datatype="char" arraysize="*" ucd="meta.id;meta.main"/>
<FIELD name="period" datatype="double" unit="d"/>
<FIELD name="t0" datatype="double" unit="d"/>
<FIELD name="depth" datatype="double" unit="ppt"/>
<FIELD name="duration" datatype="double" unit="min"/>
<DATA><TABLEDATA>
"#,
    );
    for r in rows() {
        t += &format!(
            "<TR><TD>{}</TD><TD>{}</TD><TD>{}</TD><TD>{}</TD><TD>{}</TD><TD>{}</TD></TR>\n",
            r.star,
            r.id,
            r.period,
            r.epoch,
            r.depth / 1e3,
            r.duration * 60.0
        );
    }
    t += "</TABLEDATA></DATA>\n</TABLE>\n</RESOURCE>\n</VOTABLE>\n";
    let p = d.join("cat.vot");
    std::fs::write(&p, t).unwrap();
    p
}

/// A FITS binary table in the first extension, units in TUNITn (depth in
/// ppm, duration in hours), text columns as fixed-width strings.
fn write_fits(d: &Path) -> PathBuf {
    use fitsio::tables::{ColumnDataType, ColumnDescription};
    let p = d.join("cat.fits");
    let _ = std::fs::remove_file(&p);
    let mut f = fitsio::FitsFile::create(&p).open().unwrap();
    let text = |n: &str| {
        ColumnDescription::new(n)
            .with_type(ColumnDataType::String)
            .that_repeats(16)
            .create()
            .unwrap()
    };
    let num = |n: &str| {
        ColumnDescription::new(n)
            .with_type(ColumnDataType::Double)
            .create()
            .unwrap()
    };
    let cols = [
        text("star"),
        text("candidate"),
        num("period"),
        num("epoch"),
        num("depth"),
        num("duration"),
    ];
    let hdu = f.create_table("CANDIDATES", &cols).unwrap();
    let rs = rows();
    let strings = |g: fn(&Row) -> String| rs.iter().map(g).collect::<Vec<String>>();
    let floats = |g: fn(&Row) -> f64| rs.iter().map(g).collect::<Vec<f64>>();
    hdu.write_col(&mut f, "star", &strings(|r| r.star.clone()))
        .unwrap();
    hdu.write_col(&mut f, "candidate", &strings(|r| r.id.clone()))
        .unwrap();
    hdu.write_col(&mut f, "period", &floats(|r| r.period))
        .unwrap();
    hdu.write_col(&mut f, "epoch", &floats(|r| r.epoch))
        .unwrap();
    hdu.write_col(&mut f, "depth", &floats(|r| r.depth))
        .unwrap();
    hdu.write_col(&mut f, "duration", &floats(|r| r.duration))
        .unwrap();
    for (k, u) in [(3, "d"), (4, "d"), (5, "ppm"), (6, "h")] {
        hdu.write_key(&mut f, &format!("TUNIT{k}"), u.to_string())
            .unwrap();
    }
    p
}

/// ECSV 1.0: the YAML header names each column's unit (duration in days,
/// depth in percent); space-delimited rows.
fn write_ecsv(d: &Path) -> PathBuf {
    let mut t = String::from(
        "# %ECSV 1.0\n# ---\n# datatype:\n\
         # - {name: star, datatype: string}\n\
         # - {name: candidate, datatype: string}\n\
         # - {name: period, unit: d, datatype: float64}\n\
         # - {name: epoch, unit: d, datatype: float64}\n\
         # - {name: depth, unit: '%', datatype: float64}\n\
         # - {name: duration, unit: d, datatype: float64}\n\
         # meta: !!omap\n# - {survey: invented}\n# schema: astropy-2.0\n\
         star candidate period epoch depth duration\n",
    );
    for r in rows() {
        t += &format!(
            "{} {} {} {} {} {}\n",
            r.star,
            r.id,
            r.period,
            r.epoch,
            r.depth / 1e4,
            r.duration / 24.0
        );
    }
    let p = d.join("cat.ecsv");
    std::fs::write(&p, t).unwrap();
    p
}

/// (candidate, k, odds, verdict) per row of `odds --format csv`, with odds
/// rounded to 9 significant digits (unit conversions round at 1e-16).
fn odds(cat: &Path) -> Vec<(String, String, String, String)> {
    let o = starsift(&[
        "odds",
        cat.to_str().unwrap(),
        "--no-lightcurves",
        "--targets",
        "2000",
        "--format",
        "csv",
    ]);
    assert!(o.status.success(), "{}: {}", cat.display(), stderr(&o));
    let mut r = csv::Reader::from_reader(o.stdout.as_slice());
    let h = r.headers().unwrap().clone();
    let at = |n: &str| h.iter().position(|x| x == n).unwrap();
    let (c, k, od, v) = (at("candidate"), at("k"), at("odds"), at("verdict"));
    r.records()
        .map(|rec| {
            let rec = rec.unwrap();
            let odds = rec[od]
                .parse::<f64>()
                .map_or(String::new(), |x| format!("{x:.9e}"));
            (rec[c].into(), rec[k].into(), odds, rec[v].into())
        })
        .collect()
}

/// (candidate, period, depth ppm, duration h) as loaded, from the library.
fn values(cat: &Path) -> Vec<(String, f64, f64, f64)> {
    use starsift::catalogue::{Catalogue, Field, LoadOptions, Source};
    let c = Catalogue::load(Source::Path(cat), &LoadOptions::default()).unwrap();
    (0..c.len() as u32)
        .map(|i| {
            (
                c.candidate_id(i).to_string(),
                c.value(Field::PeriodD, i).unwrap(),
                c.value(Field::DepthPpm, i).unwrap(),
                c.value(Field::DurationH, i).unwrap(),
            )
        })
        .collect()
}

#[test]
fn every_format_gives_the_csv_candidates_and_odds() {
    let d = scratch("formats-same");
    let csv = write_csv(&d);
    let want = odds(&csv);
    let want_values = values(&csv);
    assert_eq!(want.len(), rows().len());
    for p in [
        write_ipac(&d),
        write_votable(&d),
        write_fits(&d),
        write_ecsv(&d),
    ] {
        assert_eq!(odds(&p), want, "{}", p.display());
        for (a, b) in values(&p).iter().zip(&want_values) {
            assert_eq!(a.0, b.0);
            for (x, y) in [(a.1, b.1), (a.2, b.2), (a.3, b.3)] {
                assert!(
                    (x - y).abs() <= 1e-9 * y.abs(),
                    "{}: {a:?} vs {b:?}",
                    p.display()
                );
            }
        }
        // summary names the format and the conversion it applied.
        let o = starsift(&["summary", p.to_str().unwrap(), "--format", "json"]);
        assert!(o.status.success(), "{}", stderr(&o));
        let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
        assert_eq!(v["candidates"], rows().len());
        let how: Vec<String> = v["columns"]
            .as_array()
            .unwrap()
            .iter()
            .map(|c| c["mapped_by"].as_str().unwrap().to_string())
            .collect();
        assert!(
            how.iter().any(|h| h.contains("table")),
            "{}: {how:?}",
            p.display()
        );
    }
}

#[test]
fn a_votable_export_reads_back_as_a_catalogue() {
    let d = scratch("formats-roundtrip");
    let csv = write_csv(&d);
    let vot = d.join("vetted.vot");
    let o = starsift(&[
        "export",
        csv.to_str().unwrap(),
        "--no-lightcurves",
        "--targets",
        "2000",
        "--format",
        "votable",
        "-o",
        vot.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert_eq!(odds(&vot), odds(&csv));
}

#[test]
fn bad_tables_name_the_file_the_line_or_hdu_and_the_column() {
    let d = scratch("formats-bad");
    // IPAC: a value shifted across a column boundary.
    let p = write_ipac(&d);
    let text = std::fs::read_to_string(&p).unwrap();
    let mut lines: Vec<String> = text.lines().map(String::from).collect();
    lines[8] = format!("  {}", lines[8].trim_end());
    std::fs::write(&p, lines.join("\n")).unwrap();
    let o = starsift(&["summary", p.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));
    let e = stderr(&o);
    assert!(
        e.contains("cat.tbl") && e.contains("line 9") && e.contains('`'),
        "{e}"
    );
    // VOTable without the required fields.
    let p = d.join("few.vot");
    std::fs::write(
        &p,
        "<VOTABLE><RESOURCE><TABLE><FIELD name=\"star\" datatype=\"char\" arraysize=\"*\"/>\
         <DATA><TABLEDATA><TR><TD>S1</TD></TR></TABLEDATA></DATA></TABLE></RESOURCE></VOTABLE>",
    )
    .unwrap();
    let o = starsift(&["summary", p.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));
    let e = stderr(&o);
    assert!(
        e.contains("few.vot") && e.contains("VOTable") && e.contains("candidate"),
        "{e}"
    );
    assert_eq!(e.lines().count(), 1, "{e}");
    // A truncated FITS table, and a wrong HDU.
    let p = write_fits(&d);
    let o = starsift(&["summary", p.to_str().unwrap(), "--table-hdu", "0"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("cat.fits") && stderr(&o).contains("HDU 0"),
        "{}",
        stderr(&o)
    );
    let bytes = std::fs::read(&p).unwrap();
    std::fs::write(&p, &bytes[..bytes.len() - 2000]).unwrap();
    let o = starsift(&["summary", p.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));
    let e = stderr(&o);
    assert!(
        e.contains("cat.fits") && e.lines().count() == 1 && e.len() < 400,
        "{e}"
    );
    // Something that is no table at all: one line naming what is read.
    let p = d.join("cat.xlsx");
    std::fs::write(&p, b"PK\x03\x04\x14\x00\x06\x00binary").unwrap();
    let o = starsift(&["summary", p.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));
    let e = stderr(&o);
    assert!(
        e.contains("cat.xlsx") && e.contains("IPAC") && e.lines().count() == 1,
        "{e}"
    );
    assert!(stdout(&o).is_empty());
}
