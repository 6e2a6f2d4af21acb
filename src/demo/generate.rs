//! The generator of the invented demo survey and of large synthetic
//! catalogues for benches. Everything here is invented: the survey, its stars,
//! their ids and their signals. A fixed seed makes every run identical.

use std::fmt::Write as _;
use std::fs;
use std::io::{self, BufWriter, Write};
use std::path::Path;

use super::rng::Rng;
use crate::constants::{R_EARTH_M, R_SUN_M};
use crate::science::{a_over_rstar, durations_h, small_planet_depth_ppm};

/// The demo's seed. Change it only together with the checked-in demo files.
pub const DEMO_SEED: u64 = 0x5eed_2026_0001;
/// Targets searched by the invented survey (N of the odds model).
pub const DEMO_TARGETS: u64 = 52_000;
/// Time of the first sample, in the invented survey's time system (days).
const T_START: f64 = 100.0;
const BASELINE_D: f64 = 416.0;
const CADENCE_MIN: f64 = 30.0;
/// Quadratic limb-darkening coefficients for a Sun-like star (typical values,
/// common practice, no source; used only to invent the demo).
const LD: (f64, f64) = (0.4, 0.26);

/// What a planted signal really is; written to `truth.csv` for tests.
#[derive(Clone, Copy, Debug, PartialEq)]
enum Truth {
    Planet,
    /// Eclipsing binary caught at half its period: alternating depths.
    EbOddEven,
    /// Eclipsing binary at its period, with a secondary eclipse.
    EbSecondary,
    /// Grazing eclipsing binary: V-shaped and large.
    EbGrazing,
    /// A background eclipsing binary blended into a multi: wrong duration.
    Blend,
    /// The same signal detected twice on one star.
    Duplicate,
    /// The same signal detected again at twice its period.
    Alias,
    /// Two signals too close in period to orbit one star stably.
    Unstable,
    /// The bright star whose signal leaks into a neighbour.
    EchoSource,
    /// The faint neighbour that shows a copy of the source's signal.
    EchoCopy,
    /// A genuine signal below the usual detection threshold.
    LowSnr,
}

impl Truth {
    fn name(self) -> &'static str {
        match self {
            Truth::Planet => "planet",
            Truth::EbOddEven => "eclipsing-binary-odd-even",
            Truth::EbSecondary => "eclipsing-binary-secondary",
            Truth::EbGrazing => "eclipsing-binary-grazing",
            Truth::Blend => "background-blend",
            Truth::Duplicate => "duplicate",
            Truth::Alias => "period-alias",
            Truth::Unstable => "unstable-pair",
            Truth::EchoSource => "echo-source",
            Truth::EchoCopy => "echo-copy",
            Truth::LowSnr => "low-snr-planet",
        }
    }
}

#[derive(Clone, Debug)]
struct Star {
    id: String,
    mass: f64,
    radius: f64,
    teff: f64,
    ra: f64,
    dec: f64,
    mag: f64,
    contamination: f64,
    /// Photometric scatter per 30-minute sample, ppm.
    sigma_ppm: f64,
    signals: Vec<Signal>,
    lightcurve: bool,
}

#[derive(Clone, Debug)]
struct Signal {
    period: f64,
    epoch: f64,
    depth_ppm: f64,
    duration_h: f64,
    /// Flat-bottom duration, hours (0 for V-shaped).
    flat_h: f64,
    impact: f64,
    ror: f64,
    truth: Truth,
    /// Depth of every second transit (odd/even eclipsing binaries).
    alt_depth_ppm: Option<f64>,
    /// Secondary-eclipse depth at phase 0.5.
    secondary_ppm: Option<f64>,
    note: &'static str,
}

fn star_params(rng: &mut Rng, id: String) -> Star {
    let mass = (0.95 + 0.18 * rng.normal()).clamp(0.5, 1.4);
    let mut radius = mass.powf(0.85) * (0.08 * rng.normal()).exp();
    if rng.f64() < 0.05 {
        radius *= rng.uniform(1.6, 2.6); // a few subgiants
    }
    let teff = (5772.0 * mass.powf(0.55) + 120.0 * rng.normal()).clamp(3400.0, 7200.0);
    let mag = rng.uniform(10.0, 15.5);
    Star {
        id,
        mass,
        radius,
        teff,
        ra: rng.uniform(40.0, 58.0),
        dec: rng.uniform(-22.0, -10.0),
        mag,
        contamination: if rng.f64() < 0.7 {
            rng.uniform(0.0, 0.04)
        } else {
            rng.uniform(0.04, 0.2)
        },
        sigma_ppm: 80.0 * 10f64.powf(0.2 * (mag - 12.0)),
        signals: Vec::new(),
        lightcurve: false,
    }
}

impl Star {
    fn logg(&self) -> f64 {
        4.438 + self.mass.log10() - 2.0 * self.radius.log10()
    }

    fn transits(&self, s: &Signal) -> f64 {
        ((T_START + BASELINE_D - s.epoch) / s.period).floor() + 1.0
    }

    fn snr(&self, s: &Signal) -> f64 {
        let points = s.duration_h * 60.0 / CADENCE_MIN;
        s.depth_ppm / self.sigma_ppm * (self.transits(s) * points).sqrt()
    }

    /// A planet of radius `rp_rearth` at `period` with impact `b`, seen
    /// through the star's contamination; `None` if it would not transit.
    fn planet(&self, rng: &mut Rng, period: f64, rp_rearth: f64, b: f64) -> Option<Signal> {
        let ror = rp_rearth * R_EARTH_M / (self.radius * R_SUN_M);
        let a = a_over_rstar(period, self.mass, self.radius);
        let (t14, t23) = durations_h(period, a, ror, b)?;
        if t14 <= 0.0 {
            return None;
        }
        let depth =
            small_planet_depth_ppm(ror, b.min(0.99), LD.0, LD.1) * (1.0 - self.contamination);
        Some(Signal {
            period,
            epoch: T_START + rng.uniform(0.0, period.min(BASELINE_D / 2.0)),
            depth_ppm: depth,
            duration_h: t14,
            flat_h: t23,
            impact: b,
            ror,
            truth: Truth::Planet,
            alt_depth_ppm: None,
            secondary_ppm: None,
            note: "",
        })
    }
}

fn draw_radius(rng: &mut Rng, giant_chance: f64) -> f64 {
    if rng.f64() < giant_chance {
        rng.uniform(8.0, 14.0)
    } else {
        (2.0f64.ln() + 0.42 * rng.normal()).exp().clamp(0.6, 6.0)
    }
}

/// Draws a system of `k` planets around `star`, periods increasing with
/// ratios of 1.35–3.2, impacts rising outward (roughly coplanar).
fn draw_system(rng: &mut Rng, star: &Star, k: usize) -> Vec<Signal> {
    'retry: for _ in 0..200 {
        let mut out = Vec::with_capacity(k);
        let mut period = if k == 1 {
            rng.log_uniform(0.6, 300.0)
        } else {
            rng.log_uniform(0.8, 25.0)
        };
        let cos_i = rng.uniform(0.0, 0.6) / a_over_rstar(period, star.mass, star.radius);
        for j in 0..k {
            if j > 0 {
                period *= rng.log_uniform(1.35, 3.2);
            }
            if period > 200.0 {
                continue 'retry;
            }
            let a = a_over_rstar(period, star.mass, star.radius);
            let b = (a * (cos_i + 0.012 * rng.normal() / a.sqrt())).abs();
            let rp = draw_radius(rng, if k == 1 { 0.06 } else { 0.01 });
            match star.planet(rng, period, rp, b) {
                Some(s) if b < 0.9 && star.snr(&s) >= 7.3 && star.transits(&s) >= 2.0 => {
                    out.push(s)
                }
                _ => continue 'retry,
            }
        }
        return out;
    }
    Vec::new()
}

/// The demo's multiplicity plan: (k, number of stars).
const DEMO_PLAN: [(usize, usize); 6] = [(1, 246), (2, 44), (3, 18), (4, 7), (5, 3), (6, 2)];

struct Demo {
    stars: Vec<Star>,
}

fn unique_star_id(rng: &mut Rng, used: &mut std::collections::HashSet<u32>) -> String {
    loop {
        let n = 10_000 + rng.below(90_000) as u32;
        if used.insert(n) {
            return format!("HWT{n:05}");
        }
    }
}

fn build_demo() -> Demo {
    let mut rng = Rng::new(DEMO_SEED);
    let mut used = std::collections::HashSet::new();
    let mut stars = Vec::new();
    for (k, count) in DEMO_PLAN {
        for _ in 0..count {
            loop {
                let id = unique_star_id(&mut rng, &mut used);
                let mut star = star_params(&mut rng, id);
                let sys = draw_system(&mut rng, &star, k);
                if sys.len() == k {
                    star.signals = sys;
                    stars.push(star);
                    break;
                }
            }
        }
    }
    plant_cases(&mut rng, &mut stars, &mut used);
    // Light curves: every planted star, then multis, to at least 32 stars.
    let mut with_lc = stars
        .iter()
        .filter(|s| s.signals.iter().any(|x| x.truth != Truth::Planet))
        .count();
    for s in stars.iter_mut() {
        if s.signals.iter().any(|x| x.truth != Truth::Planet) {
            s.lightcurve = true;
        }
    }
    for s in stars.iter_mut().rev() {
        if with_lc >= 34 {
            break;
        }
        if !s.lightcurve && s.signals.len() >= 2 {
            s.lightcurve = true;
            with_lc += 1;
        }
    }
    // A few clean singles too, so a vetter sees what a good single looks like.
    for s in stars
        .iter_mut()
        .filter(|s| s.signals.len() == 1 && !s.lightcurve)
        .take(4)
    {
        s.lightcurve = true;
    }
    rng.shuffle(&mut stars);
    Demo { stars }
}

/// Turns some of the drawn stars into the planted cases of DESIGN.md.
fn plant_cases(rng: &mut Rng, stars: &mut Vec<Star>, used: &mut std::collections::HashSet<u32>) {
    let singles: Vec<usize> = (0..stars.len())
        .filter(|&i| stars[i].signals.len() == 1)
        .collect();
    let doubles: Vec<usize> = (0..stars.len())
        .filter(|&i| stars[i].signals.len() == 2)
        .collect();
    let triples: Vec<usize> = (0..stars.len())
        .filter(|&i| stars[i].signals.len() == 3)
        .collect();
    // Eclipsing binaries on singles: four odd/even, four with secondaries, two grazing.
    for (n, &i) in singles.iter().take(10).enumerate() {
        let star = &mut stars[i];
        star.mag = rng.uniform(11.0, 14.5);
        star.sigma_ppm = 80.0 * 10f64.powf(0.2 * (star.mag - 12.0));
        let true_period = rng.log_uniform(1.2, 12.0);
        let a = a_over_rstar(true_period, star.mass, star.radius);
        let (truth, period, depth, alt, sec, b, ror) = match n {
            0..=3 => {
                // Caught at half the true period: transits alternate primary, secondary.
                let d1 = rng.uniform(9_000.0, 30_000.0);
                let d2 = d1 * rng.uniform(0.45, 0.75);
                (
                    Truth::EbOddEven,
                    true_period / 2.0,
                    (d1 + d2) / 2.0,
                    Some((d1, d2)),
                    None,
                    rng.uniform(0.1, 0.6),
                    rng.uniform(0.2, 0.35),
                )
            }
            4..=7 => {
                let d1 = rng.uniform(12_000.0, 60_000.0);
                (
                    Truth::EbSecondary,
                    true_period,
                    d1,
                    None,
                    Some(d1 * rng.uniform(0.08, 0.25)),
                    rng.uniform(0.1, 0.6),
                    rng.uniform(0.25, 0.45),
                )
            }
            _ => (
                Truth::EbGrazing,
                true_period,
                rng.uniform(4_000.0, 15_000.0),
                None,
                Some(rng.uniform(300.0, 900.0)),
                1.05,
                rng.uniform(0.3, 0.5),
            ),
        };
        let (t14, _) = durations_h(true_period, a, ror, b).unwrap_or((3.0, 0.0));
        let sig = &mut star.signals[0];
        sig.truth = truth;
        sig.period = period;
        sig.epoch = T_START + rng.uniform(0.0, period);
        sig.depth_ppm = depth;
        sig.duration_h = t14;
        sig.flat_h = if truth == Truth::EbGrazing {
            0.0
        } else {
            t14 * 0.35
        };
        sig.impact = b;
        sig.ror = ror;
        sig.alt_depth_ppm = alt.map(|(_, d2)| d2);
        if let Some((d1, _)) = alt {
            sig.depth_ppm = (d1 + sig.alt_depth_ppm.unwrap_or(d1)) / 2.0;
        }
        sig.secondary_ppm = sec;
        sig.note = match truth {
            Truth::EbOddEven => "odd and even depths differ",
            Truth::EbSecondary => "secondary eclipse at phase 0.5",
            _ => "V-shaped",
        };
    }
    // Background blend in a triple: same depth scale, far too long a duration.
    if let Some(&i) = triples.first() {
        let star = &mut stars[i];
        let s = &mut star.signals[2];
        s.truth = Truth::Blend;
        s.duration_h *= 3.4;
        s.flat_h = s.duration_h * 0.2;
        s.note = "duration implies a far less dense star";
    }
    // Duplicate in a double: the second signal repeats the first.
    if let Some(&i) = doubles.first() {
        let star = &mut stars[i];
        let first = star.signals[0].clone();
        let s = &mut star.signals[1];
        *s = first;
        s.period *= 1.0 + 3e-6;
        s.epoch += 0.004;
        s.depth_ppm *= 0.93;
        s.truth = Truth::Duplicate;
        s.note = "second detection of the first signal";
    }
    // Alias in a double: the second signal is the first at twice the period.
    if let Some(&i) = doubles.get(1) {
        let star = &mut stars[i];
        let first = star.signals[0].clone();
        let s = &mut star.signals[1];
        *s = first;
        s.period *= 2.0;
        s.epoch += s.period / 2.0;
        s.depth_ppm *= 1.04;
        s.truth = Truth::Alias;
        s.note = "the first signal at twice its period";
    }
    // Unstable pair in a double: period ratio 1.044 with mini-Neptune radii.
    if let Some(&i) = doubles.get(2) {
        let star = &mut stars[i];
        star.mag = 11.5;
        star.sigma_ppm = 80.0 * 10f64.powf(0.2 * (star.mag - 12.0));
        let p1 = 12.4;
        let b = star.signals[0].impact.min(0.5);
        let mut made = Vec::new();
        for (p, rp) in [(p1, 2.6), (p1 * 1.044, 2.4)] {
            if let Some(mut s) = star.planet(rng, p, rp, b) {
                s.truth = Truth::Unstable;
                s.note = "period ratio 1.044";
                made.push(s);
            }
        }
        if made.len() == 2 {
            star.signals = made;
        }
    }
    // Echo: a bright single and a faint neighbour 9 arcsec away with a copy.
    let bright = singles[10];
    let mut echo = stars[bright].clone();
    {
        let src = &mut stars[bright];
        src.mag = 10.2;
        src.sigma_ppm = 80.0 * 10f64.powf(0.2 * (src.mag - 12.0));
        let s = &mut src.signals[0];
        s.truth = Truth::EchoSource;
        s.depth_ppm = s.depth_ppm.max(2500.0);
        s.note = "its light leaks into a neighbour";
    }
    echo.id = unique_star_id(rng, used);
    echo.mag = 13.9;
    echo.sigma_ppm = 80.0 * 10f64.powf(0.2 * (echo.mag - 12.0));
    echo.ra = stars[bright].ra + 0.0018 / stars[bright].dec.to_radians().cos();
    echo.dec = stars[bright].dec + 0.0012;
    echo.mass = (echo.mass * 0.8).max(0.5);
    echo.radius *= 0.8;
    let mut copy = stars[bright].signals[0].clone();
    // Flux ratio 10^(-0.4 Δm) of the bright star leaking in, about 4%.
    copy.depth_ppm *= 10f64.powf(-0.4 * (echo.mag - stars[bright].mag)) * 1.6;
    copy.epoch += 0.0009;
    copy.truth = Truth::EchoCopy;
    copy.note = "copy of the bright neighbour's signal";
    echo.signals = vec![copy];
    stars.push(echo);
    // Two genuine low-SNR singles.
    for &i in singles.iter().skip(11).take(2) {
        let star = &mut stars[i];
        let s = &mut star.signals[0];
        s.depth_ppm *= 6.6
            / (s.depth_ppm / star.sigma_ppm
                * (((T_START + BASELINE_D - s.epoch) / s.period).floor() + 1.0).sqrt()
                * (s.duration_h * 2.0).sqrt());
        s.truth = Truth::LowSnr;
        s.note = "near the detection threshold";
    }
}

fn catalogue_header() -> &'static str {
    "star_id,candidate_id,period_d,period_err_d,epoch,epoch_err_d,depth_ppm,duration_h,snr,impact,ror,\
     star_radius_rsun,star_mass_msun,star_teff_k,star_logg,ra_deg,dec_deg,mag,contamination,lightcurve,pipeline_note"
}

fn signal_errors(star: &Star, s: &Signal, snr: f64) -> (f64, f64) {
    let dur_d = s.duration_h / 24.0;
    let n = star.transits(s).max(1.0);
    let epoch_err = dur_d / snr * 0.6;
    let period_err = epoch_err / n.powf(1.5) * 2.0;
    (period_err, epoch_err)
}

/// Writes the demo catalogue, survey facts, truth table and light curves.
pub fn write_demo(dir: &Path) -> io::Result<()> {
    let demo = build_demo();
    fs::create_dir_all(dir.join("lightcurves"))?;
    let mut cat = String::new();
    let mut truth = String::from("candidate_id,star_id,planted,note\n");
    writeln!(
        cat,
        "# Halcyon Wide Transit Search (an invented survey): demo candidate catalogue for starsift"
    )
    .ok();
    writeln!(
        cat,
        "# Generated by `starsift generate demo` with a fixed seed; do not edit by hand."
    )
    .ok();
    writeln!(
        cat,
        "# Times are in the survey's own invented system (days); depths in ppm."
    )
    .ok();
    writeln!(cat, "{}", catalogue_header()).ok();
    let mut rng = Rng::new(DEMO_SEED ^ 0xcafe);
    for star in &demo.stars {
        for (j, s) in star.signals.iter().enumerate() {
            let cid = format!("{}-s{}", star.id, j + 1);
            let snr = star.snr(s) * (0.05 * rng.normal()).exp();
            let (pe, ee) = signal_errors(star, s, snr);
            let lc = if star.lightcurve {
                format!("lightcurves/{}.csv.gz", star.id)
            } else {
                String::new()
            };
            let note = match (j, s.truth) {
                (0, _) if star.mag < 10.5 => "bright target",
                (_, Truth::Duplicate) => "\"flagged by pipeline, see \"\"s1\"\"\"",
                _ => "",
            };
            writeln!(
                cat,
                "{},{},{:.7},{:.2e},{:.5},{:.2e},{:.1},{:.3},{:.1},{:.3},{:.5},{:.3},{:.3},{:.0},{:.3},{:.6},{:.6},{:.2},{:.3},{},{}",
                star.id, cid, s.period, pe, s.epoch, ee, s.depth_ppm, s.duration_h, snr, s.impact, s.ror,
                star.radius, star.mass, star.teff, star.logg(), star.ra, star.dec, star.mag, star.contamination, lc, note
            )
            .ok();
            writeln!(truth, "{},{},{},{}", cid, star.id, s.truth.name(), s.note).ok();
        }
    }
    fs::write(dir.join("catalogue.csv"), cat)?;
    fs::write(dir.join("truth.csv"), truth)?;
    fs::write(
        dir.join("survey.toml"),
        format!(
            "# Survey facts of the invented Halcyon Wide Transit Search (demo only).\n\
             name = \"Halcyon Wide Transit Search (invented)\"\n\
             targets_searched = {DEMO_TARGETS}\n\
             fp_fraction_singles = 0.1\n\
             baseline_d = {BASELINE_D:.1}\n\
             cadence_min = {CADENCE_MIN:.1}\n\
             time_system = \"HWTS days (invented)\"\n"
        ),
    )?;
    for star in demo.stars.iter().filter(|s| s.lightcurve) {
        let text = lightcurve_csv(star);
        let file = fs::File::create(dir.join("lightcurves").join(format!("{}.csv.gz", star.id)))?;
        let mut gz = flate2::GzBuilder::new()
            .mtime(0)
            .write(BufWriter::new(file), flate2::Compression::default());
        gz.write_all(text.as_bytes())?;
        gz.finish()?.flush()?;
    }
    Ok(())
}

/// The demo light curve of one star as CSV text, regenerated from the seed
/// (for a binary that runs away from the source tree).
pub fn demo_lightcurve_csv(star_id: &str) -> Option<String> {
    let demo = build_demo();
    let star = demo
        .stars
        .iter()
        .find(|s| s.id == star_id && s.lightcurve)?;
    Some(lightcurve_csv(star))
}

/// Relative flux deficit of a trapezoid transit at time offset `dt_h` from
/// mid-transit (hours).
fn trapezoid(dt_h: f64, total_h: f64, flat_h: f64, depth: f64) -> f64 {
    let x = dt_h.abs();
    let half = total_h / 2.0;
    let flat = flat_h / 2.0;
    if x >= half {
        0.0
    } else if x <= flat {
        depth
    } else {
        depth * (half - x) / (half - flat)
    }
}

/// The star's light curve: 30-minute samples over the baseline, two data
/// gaps, white noise, slow stellar variability and every signal's transits.
fn lightcurve_csv(star: &Star) -> String {
    let seed = star
        .id
        .bytes()
        .fold(DEMO_SEED, |h, b| h.rotate_left(7) ^ b as u64);
    let mut rng = Rng::new(seed);
    let amp = 10f64.powf(rng.uniform(-4.0, -2.6));
    let prot = rng.uniform(4.0, 30.0);
    let phase = rng.uniform(0.0, std::f64::consts::TAU);
    let drift = rng.uniform(-2e-6, 2e-6);
    let gaps = [(T_START + 93.0, 4.5), (T_START + 281.0, 3.0)];
    let sigma = star.sigma_ppm * 1e-6;
    let n = (BASELINE_D * 24.0 * 60.0 / CADENCE_MIN) as usize;
    let mut out = String::with_capacity(n * 32);
    out.push_str("time,flux,flux_err\n");
    for i in 0..n {
        let t = T_START + i as f64 * CADENCE_MIN / 1440.0;
        if gaps.iter().any(|&(g, w)| t >= g && t < g + w) {
            continue;
        }
        let mut f =
            1.0 + amp * (std::f64::consts::TAU * t / prot + phase).sin() + drift * (t - T_START);
        // A duplicate or an alias is a second detection of dips already
        // there, not a second body: nothing more is added to the flux.
        for s in star
            .signals
            .iter()
            .filter(|s| !matches!(s.truth, Truth::Duplicate | Truth::Alias))
        {
            let cycles = ((t - s.epoch) / s.period).round();
            let dt_h = (t - s.epoch - cycles * s.period) * 24.0;
            let depth = match s.alt_depth_ppm {
                Some(alt) if (cycles as i64).rem_euclid(2) == 1 => alt,
                Some(_) => 2.0 * s.depth_ppm - s.alt_depth_ppm.unwrap_or(s.depth_ppm),
                None => s.depth_ppm,
            };
            f -= trapezoid(dt_h, s.duration_h, s.flat_h, depth * 1e-6);
            if let Some(sec) = s.secondary_ppm {
                let c2 = ((t - s.epoch - s.period / 2.0) / s.period).round();
                let dt2 = (t - s.epoch - s.period / 2.0 - c2 * s.period) * 24.0;
                f -= trapezoid(dt2, s.duration_h, s.flat_h, sec * 1e-6);
            }
        }
        f += sigma * rng.normal();
        writeln!(out, "{t:.5},{f:.6},{sigma:.6}").ok();
    }
    out
}

/// Writes a large synthetic catalogue of about `candidates` rows, rows
/// shuffled, 16 columns, for benches. Ids are invented (`SYN` prefix).
pub fn write_big(path: &Path, candidates: usize, seed: u64) -> io::Result<()> {
    let mut rng = Rng::new(seed);
    // Multiplicity distribution: roughly geometric, like survey catalogues
    // (invented numbers, demo only).
    let p = [0.755, 0.16, 0.055, 0.02, 0.007, 0.0023, 0.0007];
    let mut rows: Vec<(u32, u8)> = Vec::with_capacity(candidates + 8);
    let mut star_k: Vec<u8> = Vec::new();
    while rows.len() < candidates {
        let u = rng.f64();
        let mut acc = 0.0;
        let mut k = p.len();
        for (i, pi) in p.iter().enumerate() {
            acc += pi;
            if u < acc {
                k = i + 1;
                break;
            }
        }
        let k = k.min(candidates - rows.len());
        let s = star_k.len() as u32;
        star_k.push(k as u8);
        for j in 0..k {
            rows.push((s, j as u8));
        }
    }
    rng.shuffle(&mut rows);
    // Per-star parameters, derived from the star number so rows need no table.
    let star_param = |s: u32| -> (f64, f64, f64, f64, f64, f64) {
        let mut r = Rng::new(seed ^ (s as u64).wrapping_mul(0x9e37_79b9));
        let mass = (0.95 + 0.18 * r.normal()).clamp(0.5, 1.4);
        let radius = mass.powf(0.85) * (0.08 * r.normal()).exp();
        let teff = 5772.0 * mass.powf(0.55);
        (
            mass,
            radius,
            teff,
            r.uniform(0.0, 360.0),
            r.uniform(-90.0, 90.0),
            r.uniform(0.6, 20.0),
        )
    };
    let file = fs::File::create(path)?;
    let mut w = BufWriter::with_capacity(1 << 20, file);
    writeln!(
        w,
        "star_id,candidate_id,period_d,period_err_d,epoch,epoch_err_d,depth_ppm,duration_h,snr,impact,ror,star_radius_rsun,star_mass_msun,star_teff_k,ra_deg,dec_deg"
    )?;
    let mut line = String::with_capacity(256);
    for (s, j) in rows {
        let (mass, radius, teff, ra, dec, p0) = star_param(s);
        let period = p0 * 1.8f64.powi(j as i32);
        let b = rng.uniform(0.0, 0.85);
        let rp = draw_radius(&mut rng, 0.03);
        let ror = rp * R_EARTH_M / (radius * R_SUN_M);
        let a = a_over_rstar(period, mass, radius);
        let t14 = durations_h(period, a, ror, b).map_or(2.0, |d| d.0).max(0.3);
        let depth = ror * ror * 1.1e6;
        let snr = rng.uniform(7.1, 60.0);
        let epoch = T_START + rng.uniform(0.0, period);
        line.clear();
        writeln!(
            line,
            "SYN{s:07},SYN{s:07}-s{},{period:.6},{:.2e},{epoch:.5},{:.2e},{depth:.1},{t14:.3},{snr:.1},{b:.3},{ror:.5},{radius:.3},{mass:.3},{teff:.0},{ra:.5},{dec:.5}",
            j + 1,
            period * 1e-5,
            t14 / 24.0 / snr
        )
        .ok();
        w.write_all(line.as_bytes())?;
    }
    w.flush()
}
