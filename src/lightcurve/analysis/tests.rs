//! Diagnostics against the check values of docs/science.md §4 and recovery tests
//! on synthetic light curves made here (invented).

use super::*;
use crate::demo::Rng;

#[test]
fn odd_even_check_value() {
    // docs/science.md §4 [D]: 1000 ± 30 vs 850 ± 40 ppm → Z = 3.00.
    let z = odd_even_z(
        Measure {
            value: 1000.0,
            err: 30.0,
        },
        Measure {
            value: 850.0,
            err: 40.0,
        },
    );
    assert!((z - 3.0).abs() < 1e-12, "{z}");
}

#[test]
fn depth_consistency_check_values() {
    // docs/science.md §4 [D]: depths 100, 110, 90, 100 ± 5 → δ̄ = 100, χ² = 8,
    // p = 0.04601 (3 degrees of freedom); χ² survival(9, 1 dof) = 0.0026998.
    let d: Vec<Measure> = [100.0, 110.0, 90.0, 100.0]
        .iter()
        .map(|&v| Measure { value: v, err: 5.0 })
        .collect();
    let (chi2, dof, p) = depth_consistency(&d).unwrap();
    assert!((chi2 - 8.0).abs() < 1e-12 && dof == 3);
    assert!((p - 0.04601).abs() < 5e-6, "{p}");
    let p1 = ChiSquared::new(1.0).unwrap().sf(9.0);
    assert!((p1 - 0.0026998).abs() < 5e-8, "{p1}");
    assert!(depth_consistency(&d[..1]).is_none());
}

#[test]
fn reflected_light_ceiling() {
    // docs/science.md §4 [D]: k = 0.1, a/R★ = 8.7536 → 130.5 ppm for A_g = 1.
    assert!((reflected_ceiling_ppm(0.1, 8.7536) - 130.5).abs() < 0.05);
    // Thermal emission of a hot planet is far below its reflected ceiling in
    // the visible, and rises with temperature.
    let cool = thermal_depth_ppm(0.1, 8.7536, 5000.0, 0.6e-6);
    let hot = thermal_depth_ppm(0.1, 8.7536, 6500.0, 0.6e-6);
    assert!(cool > 0.0 && cool < hot && hot < 130.5, "{cool} {hot}");
}

/// An invented light curve: 30-minute cadence over 200 d, white noise of
/// `sigma`, a slow sinusoid, and trapezoid transits of `depth` (ppm) every
/// `period`, with every second one of depth `alt` and an eclipse of `sec`
/// at phase 0.5.
fn synthetic(
    period: f64,
    depth: f64,
    alt: f64,
    sec: f64,
    flat: f64,
    sigma: f64,
    seed: u64,
) -> (LightCurve, Ephemeris) {
    let mut rng = Rng::new(seed);
    let e = Ephemeris {
        period_d: period,
        epoch: 3.3,
        duration_h: 3.0,
    };
    let (mut t, mut f) = (Vec::new(), Vec::new());
    let trap = |dt_h: f64, d: f64| {
        let x = dt_h.abs() / 1.5;
        if x >= 1.0 {
            0.0
        } else if x <= flat {
            d
        } else {
            d * (1.0 - x) / (1.0 - flat)
        }
    };
    for i in 0..9600 {
        let ti = i as f64 / 48.0;
        let cyc = e.cycle(ti);
        let d = if cyc.rem_euclid(2) == 1 { alt } else { depth };
        let mut v = 1.0 + 0.002 * (ti / 7.0).sin();
        v -= trap(e.offset_d(ti) * 24.0, d * 1e-6);
        let s2 = Ephemeris {
            epoch: e.epoch + period / 2.0,
            ..e
        };
        v -= trap(s2.offset_d(ti) * 24.0, sec * 1e-6);
        v += sigma * rng.normal();
        t.push(ti);
        f.push(v * 1234.5);
    }
    let lc = LightCurve::from_samples("synthetic".into(), t, f, None).unwrap();
    (lc, e)
}

fn ctx() -> Context {
    Context {
        ror: 0.03,
        a_rstar: Some(12.0),
        teff_k: Some(5700.0),
        catalogue_depth_ppm: None,
        catalogue_snr: None,
        star_mass_msun: Some(1.0),
    }
}

#[test]
fn a_clean_planet_is_recovered_and_not_flagged() {
    let (lc, e) = synthetic(4.1, 900.0, 900.0, 0.0, 0.8, 3e-4, 11);
    let d = diagnose(&lc, &e, &[], &ctx(), &DetrendSettings::default());
    // The central half of a trapezoid with 80 % flat bottom is at full depth.
    assert!(
        (d.depth.value - 900.0).abs() < 3.0 * d.depth.err,
        "{:?}",
        d.depth
    );
    assert!(d.snr > 30.0);
    assert!(d.findings.is_empty(), "{:?}", d.findings);
    assert!(d.flat_fraction >= 0.5, "{}", d.flat_fraction);
    let (chi2, dof, p) = d.consistency.unwrap();
    assert!(p > 1e-3, "χ² {chi2} on {dof}");
}

#[test]
fn an_eclipsing_binary_is_flagged() {
    // Alternating depths and a secondary eclipse, V-shaped.
    let (lc, e) = synthetic(2.7, 12000.0, 7000.0, 2500.0, 0.0, 5e-4, 12);
    let d = diagnose(
        &lc,
        &e,
        &[],
        &Context { ror: 0.1, ..ctx() },
        &DetrendSettings::default(),
    );
    let flags: Vec<Flag> = d.findings.iter().map(|f| f.0).collect();
    assert!(flags.contains(&Flag::OddEven), "{:?}", d.findings);
    assert!(flags.contains(&Flag::Secondary), "{:?}", d.findings);
    assert!(
        flags.contains(&Flag::VShape),
        "{:?} {}",
        d.findings,
        d.flat_fraction
    );
    assert!(d.consistency.unwrap().2 < 1e-6);
}

#[test]
fn other_signals_are_masked() {
    // A second, deeper signal on the same star does not leak into the first.
    let (mut lc, e) = synthetic(4.1, 900.0, 900.0, 0.0, 0.8, 3e-4, 13);
    let other = Ephemeris {
        period_d: 6.7,
        epoch: 1.1,
        duration_h: 4.0,
    };
    for (t, f) in lc.time.iter().zip(lc.flux.iter_mut()) {
        if other.offset_d(*t).abs() < other.half_d() {
            *f -= 5e-3;
        }
    }
    let d = diagnose(&lc, &e, &[other], &ctx(), &DetrendSettings::default());
    assert!(
        (d.depth.value - 900.0).abs() < 3.0 * d.depth.err,
        "{:?}",
        d.depth
    );
    assert!(d.findings.is_empty(), "{:?}", d.findings);
}

#[test]
fn detrending_removes_slow_variability() {
    let (lc, e) = synthetic(4.1, 0.0, 0.0, 0.0, 0.8, 1e-4, 14);
    let flat = detrend(&lc, &[e], &DetrendSettings::default());
    let mut dev: Vec<f64> = flat.iter().map(|f| (f - 1.0).abs()).collect();
    let mad = median_of(&mut dev);
    assert!(mad < 1.5e-4, "{mad}");
    let raw = detrend(
        &lc,
        &[e],
        &DetrendSettings {
            enabled: false,
            ..DetrendSettings::default()
        },
    );
    assert_eq!(raw, lc.flux);
}

#[test]
fn binning_matches_a_direct_computation() {
    let (lc, e) = synthetic(4.1, 900.0, 900.0, 0.0, 0.8, 3e-4, 15);
    let b = fold_bin(
        &lc.time,
        &lc.flux,
        &lc.flux_err,
        None,
        e.period_d,
        e.epoch,
        0.0,
        (-0.5, 0.5),
        40,
    );
    assert_eq!(
        b.count.iter().map(|&c| c as usize).sum::<usize>(),
        lc.time.len()
    );
    let k = 20; // the bin just after phase 0
    let vals: Vec<f64> = (0..lc.time.len())
        .filter(|&i| ((phase(lc.time[i], e.period_d, e.epoch) + 0.5) * 40.0).floor() as usize == k)
        .map(|i| lc.flux[i])
        .collect();
    let mean = vals.iter().sum::<f64>() / vals.len() as f64;
    assert_eq!(vals.len() as u32, b.count[k]);
    assert!((mean - b.mean[k]).abs() < 1e-12);
    // Equal errors: the weighted mean is the mean.
    assert!((b.weighted_mean[k] - b.mean[k]).abs() < 1e-12);
    assert!(
        (phase(10.0, 4.0, 2.0) - 0.0).abs() < 1e-12 && (phase(4.0, 4.0, 2.0) + 0.5).abs() < 1e-12
    );
}

#[test]
fn the_views_show_odd_even_and_secondary_apart() {
    // Flat-bottomed eclipses of 12000 ppm (even transits) and 7000 ppm (odd),
    // and a 2500 ppm secondary half an orbit later: each view's deepest
    // bins sit at its own depth (injected values; invented star).
    let (lc, e) = synthetic(2.7, 12000.0, 7000.0, 2500.0, 0.9, 2e-4, 21);
    let all = [e];
    let flux = detrend(&lc, &all, &DetrendSettings::default());
    let skip = vec![false; lc.time.len()];
    let zoom = 3.0 * e.duration_h / 24.0 / e.period_d;
    let v = views(&lc.time, &flux, &lc.flux_err, &skip, &e, zoom, 60);
    let deepest = |b: &Binned| {
        b.mean
            .iter()
            .filter(|m| m.is_finite())
            .map(|m| (1.0 - m) * 1e6)
            .fold(f64::NEG_INFINITY, f64::max)
    };
    let near = |got: f64, want: f64| (got - want).abs() < 0.06 * want;
    assert!(near(deepest(&v.even), 12000.0), "even {}", deepest(&v.even));
    assert!(near(deepest(&v.odd), 7000.0), "odd {}", deepest(&v.odd));
    assert!(
        near(deepest(&v.secondary), 2500.0),
        "secondary {}",
        deepest(&v.secondary)
    );
    // All transits together: the deepest bin lies between the two.
    let d = deepest(&v.transit);
    assert!(d > 8000.0 && d < 11500.0, "all {d}");
    assert_eq!(v.transit.centre.len(), 60);
}

#[test]
fn red_noise_beta_is_one_for_white_noise_and_large_for_correlated() {
    // docs/science.md §4.1 (Pont, Zucker & Queloz 2006): white noise gives
    // β → 1; an AR(1) series with equal red and white variance and a
    // correlation time of hours gives β well above 1 for bins of hours.
    let mut rng = Rng::new(7);
    let n = 20_000;
    let cadence = 2.0 / 1440.0;
    let white: Vec<f64> = (0..n).map(|_| rng.normal() * 1e-3).collect();
    let s1 = crate::lightcurve::point_to_point_sigma(&white);
    let b = red_noise_beta(&white, s1, cadence, 3.0 / 24.0);
    assert!((1.0..1.1).contains(&b), "{b}");
    let tau = 2.0 / 24.0;
    let phi = (-cadence / tau).exp();
    let mut r = 0.0;
    let red: Vec<f64> = (0..n)
        .map(|_| {
            r = phi * r + (1.0 - phi * phi).sqrt() * rng.normal() * 1e-3;
            r + rng.normal() * 1e-3
        })
        .collect();
    let s1 = crate::lightcurve::point_to_point_sigma(&red);
    let b = red_noise_beta(&red, s1, cadence, 3.0 / 24.0);
    assert!(b > 3.0, "{b}");
}

/// Subtracts a box-shaped eclipse of `depth` ppm and `duration_h` hours
/// centred at `phase` (cycles after mid-transit) from a light curve.
fn add_eclipse(lc: &mut LightCurve, e: &Ephemeris, phase: f64, depth: f64) {
    let at = Ephemeris {
        epoch: e.epoch + phase * e.period_d,
        ..*e
    };
    for (t, f) in lc.time.iter().zip(lc.flux.iter_mut()) {
        if at.offset_d(*t).abs() < e.duration_h / 48.0 {
            *f -= depth * 1e-6;
        }
    }
}

fn flags_of(d: &Diagnostics) -> Vec<Flag> {
    d.findings.iter().map(|f| f.0).collect()
}

#[test]
fn an_eccentric_secondary_is_found_at_its_own_phase() {
    // An eccentric binary's secondary is not at phase 0.5 (its offset is
    // ≈ (2/π) e cos ω of a period, Winn 2010 eq. 33, from memory): a 3000 ppm
    // eclipse at phase 0.37 must be flagged and its phase reported.
    let (mut lc, e) = synthetic(4.1, 6000.0, 6000.0, 0.0, 0.5, 5e-4, 21);
    add_eclipse(&mut lc, &e, 0.37, 3000.0);
    let d = diagnose(&lc, &e, &[], &ctx(), &DetrendSettings::default());
    assert!(flags_of(&d).contains(&Flag::Secondary), "{:?}", d.findings);
    let ecl = d.eclipse.unwrap();
    assert!((ecl.phase - 0.37).abs() < 0.01, "{ecl:?}");
    // Measured against its own neighbourhood, not a fitted trend: its full
    // depth, within 3σ.
    assert!(
        (ecl.depth.value - 3000.0).abs() < 3.0 * ecl.depth.err,
        "{ecl:?}"
    );
    // The same light curve without it: nothing found anywhere.
    let (lc, e) = synthetic(4.1, 6000.0, 6000.0, 0.0, 0.5, 5e-4, 21);
    let d = diagnose(&lc, &e, &[], &ctx(), &DetrendSettings::default());
    assert!(!flags_of(&d).contains(&Flag::Secondary), "{:?}", d.findings);
}

#[test]
fn an_absent_signal_or_shifted_epochs_are_not_recovered() {
    // The catalogue claims 900 ppm at SNR 40; the light curve has nothing.
    let claimed = Context {
        catalogue_depth_ppm: Some(900.0),
        catalogue_snr: Some(40.0),
        ..ctx()
    };
    let (lc, e) = synthetic(4.1, 0.0, 0.0, 0.0, 0.8, 3e-4, 22);
    let d = diagnose(&lc, &e, &[], &claimed, &DetrendSettings::default());
    assert!(
        flags_of(&d).contains(&Flag::NotRecovered),
        "{:?}",
        d.findings
    );
    // A real transit, but the catalogue's epoch counts from another zero
    // (BJD against BJD − 2457000): the ephemeris lands off the transits.
    let (lc, e) = synthetic(4.1, 900.0, 900.0, 0.0, 0.8, 3e-4, 23);
    let shifted = Ephemeris {
        epoch: e.epoch + 2_457_000.0,
        ..e
    };
    let d = diagnose(&lc, &shifted, &[], &claimed, &DetrendSettings::default());
    assert!(
        flags_of(&d).contains(&Flag::NotRecovered),
        "{:?}",
        d.findings
    );
    // At its true epoch it is recovered.
    let d = diagnose(&lc, &e, &[], &claimed, &DetrendSettings::default());
    assert!(d.findings.is_empty(), "{:?}", d.findings);
    // A transit the light curve does not cover at all.
    let late = Ephemeris {
        period_d: 900.0,
        epoch: 450.0,
        ..e
    };
    let d = diagnose(&lc, &late, &[], &claimed, &DetrendSettings::default());
    assert!(
        matches!(d.recovery, Recovery::NoTransitInData { .. }),
        "{:?}",
        d.recovery
    );
}

#[test]
fn a_copy_or_alias_is_not_masked_out_of_its_own_signal() {
    let (lc, e) = synthetic(4.1, 900.0, 900.0, 0.0, 0.8, 3e-4, 24);
    let alias = Ephemeris {
        period_d: 2.0 * e.period_d,
        ..e
    };
    let twin = Ephemeris {
        epoch: e.epoch + 0.001,
        ..e
    };
    assert!(shares_transits(&e, &alias) && shares_transits(&alias, &e));
    assert!(shares_transits(&e, &twin));
    // The alias at twice the period sees its own transits, not NaN.
    let d = diagnose(&lc, &alias, &[e], &ctx(), &DetrendSettings::default());
    assert!(
        (d.depth.value - 900.0).abs() < 3.0 * d.depth.err,
        "{:?}",
        d.depth
    );
    // An unrelated orbit that happens to overlap is still masked.
    let other = Ephemeris {
        period_d: 4.1 * 23.63,
        ..e
    };
    assert!(!shares_transits(&e, &other));
}

/// White plus red noise: an AR(1) process of equal variance with a 2-hour
/// correlation time, as stellar granulation and pointing jitter give
/// (common practice, no source).
fn reddened(lc: &mut LightCurve, sigma: f64, seed: u64) {
    let mut rng = Rng::new(seed);
    let phi = (-(0.5f64) / 2.0).exp(); // 30-minute cadence, τ = 2 h
    let mut r = 0.0;
    for f in lc.flux.iter_mut() {
        r = phi * r + (1.0 - phi * phi).sqrt() * sigma * rng.normal();
        *f += r;
    }
}

#[test]
fn red_noise_false_flag_rate_on_genuine_planets() {
    // 600 genuine planets (900 ppm, flat-bottomed, identical transits, no
    // secondary) in white noise plus equally strong red noise; fixed seeds.
    // The errors must be honest (pulls of sd ≈ 1) and the firm light-curve
    // flags must fire on at most 1 % of them (measured: 0.3 % over 2,000).
    let claimed = Context {
        catalogue_depth_ppm: Some(900.0),
        catalogue_snr: None,
        ..ctx()
    };
    let (mut flagged, runs) = (0, 600u64);
    let mut binaries = 0;
    let (mut secondary_pulls, mut odd_even_pulls) = (Vec::new(), Vec::new());
    let mut phase_pulls = Vec::new();
    for seed in 0..runs {
        let (mut lc, e) = synthetic(
            4.1 + 0.001 * seed as f64,
            900.0,
            900.0,
            0.0,
            0.8,
            3e-4,
            10_000 + seed,
        );
        reddened(&mut lc, 3e-4, 50_000 + seed);
        let d = diagnose(&lc, &e, &[], &claimed, &DetrendSettings::default());
        secondary_pulls.push(d.secondary.z());
        odd_even_pulls
            .push((d.odd.value - d.even.value) / (d.odd.err.powi(2) + d.even.err.powi(2)).sqrt());
        if let Some(p) = d.phase {
            phase_pulls.extend([p.at_period.z(), p.at_half.z()]);
        }
        if d.findings
            .iter()
            .any(|(f, t)| *f == Flag::Secondary && t.starts_with("odd and even"))
        {
            binaries += 1;
        }
        if d.findings.iter().any(|(f, _)| {
            matches!(
                f,
                Flag::OddEven | Flag::Secondary | Flag::NotRecovered | Flag::Ellipsoidal
            )
        }) {
            flagged += 1;
        }
    }
    let sd = |v: &[f64]| {
        let m = v.iter().sum::<f64>() / v.len() as f64;
        (v.iter().map(|x| (x - m).powi(2)).sum::<f64>() / v.len() as f64).sqrt()
    };
    let (s_sec, s_oe, s_ph) = (sd(&secondary_pulls), sd(&odd_even_pulls), sd(&phase_pulls));
    eprintln!(
        "red noise: {flagged} of {runs} flagged; pull sd secondary {s_sec:.2}, odd-even {s_oe:.2}, \
         orbit-locked variation {s_ph:.2} (t of {} means)",
        phase_pulls.len()
    );
    // The variation's t has Student's spread: for 48 orbits, sd = √(47/45) ≈ 1.02.
    assert!(
        (0.85..1.15).contains(&s_sec)
            && (0.85..1.15).contains(&s_oe)
            && (0.85..1.15).contains(&s_ph),
        "{s_sec} {s_oe} {s_ph}"
    );
    assert!(flagged * 100 <= runs, "{flagged} of {runs} flagged");
    // Of these, none is read as a binary's two eclipses (`secondary` from
    // odd and even beyond ODD_EVEN_BINARY_Z), which would hold its star.
    assert_eq!(
        binaries, 0,
        "{binaries} of {runs} read as a binary's two eclipses"
    );
    // A binary in the same noise is still caught, and read as one: 6000
    // against 4500 ppm.
    let (mut lc, e) = synthetic(4.1, 6000.0, 4500.0, 0.0, 0.3, 3e-4, 77);
    reddened(&mut lc, 3e-4, 78);
    let d = diagnose(&lc, &e, &[], &claimed, &DetrendSettings::default());
    assert!(flags_of(&d).contains(&Flag::OddEven), "{:?}", d.findings);
    assert!(flags_of(&d).contains(&Flag::Secondary), "{:?}", d.findings);
}

#[test]
fn the_shape_cells_show_a_box_transit_in_the_middle() {
    // A box of depth 1e-3 lasting one duration (0.1 d), sampled every
    // 0.001 d over ± 0.3 d: cells of 0.05 d across ± 0.2 d; the middle two
    // lie wholly inside (drop 1e-3), the outer ones wholly outside (0).
    let dt: Vec<f64> = (-300..=300).map(|i| i as f64 * 1e-3).collect();
    let flux: Vec<f64> = dt
        .iter()
        .map(|&t| if t.abs() < 0.05 { 1.0 - 1e-3 } else { 1.0 })
        .collect();
    let s = shape_cells(&dt, &flux, &vec![false; dt.len()], 0.1);
    // (the sample at the edge, t = −0.05, lies outside the box)
    assert!(
        (s[3] - 1e-3).abs() < 3e-5 && (s[4] - 1e-3).abs() < 3e-5,
        "{s:?}"
    );
    assert!(s[0].abs() < 1e-9 && s[7].abs() < 1e-9, "{s:?}");
}

#[test]
fn ellipsoidal_ceiling_check_value() {
    // A = α (M_p/M★)(R★/a)³ (Faigler & Mazeh 2011, eq. 2, from memory) with
    // α = 2, M_p = 13 M_J, M★ = 1 M☉, a/R★ = 5: GM_J/GM☉ = 9.54594e-4 (IAU
    // 2015 B3 nominal values), so 2 × 13 × 9.54594e-4 / 125 = 198.56 ppm.
    assert!((ellipsoidal_ceiling_ppm(5.0, 1.0) - 198.56).abs() < 0.01);
    // A tenth of the mass, ten times the ceiling; twice a/R★, an eighth.
    assert!(
        (ellipsoidal_ceiling_ppm(5.0, 0.1) / ellipsoidal_ceiling_ppm(5.0, 1.0) - 10.0).abs() < 1e-9
    );
    assert!(
        (ellipsoidal_ceiling_ppm(5.0, 1.0) / ellipsoidal_ceiling_ppm(10.0, 1.0) - 8.0).abs() < 1e-9
    );
}

/// `synthetic` with light varying with the orbit, faintest at the transit:
/// semi-amplitudes `at_period` and `at_half` (ppm, −cos 2πφ and −cos 4πφ).
fn varying(at_period: f64, at_half: f64, seed: u64) -> (LightCurve, Ephemeris) {
    let (mut lc, e) = synthetic(2.3, 6000.0, 6000.0, 0.0, 0.5, 3e-4, seed);
    let tau = std::f64::consts::TAU;
    for (t, f) in lc.time.iter().zip(lc.flux.iter_mut()) {
        let x = phase(*t, e.period_d, e.epoch);
        *f *= 1.0 - 1e-6 * (at_period * (tau * x).cos() + at_half * (2.0 * tau * x).cos());
    }
    reddened(&mut lc, 3e-4, seed + 1);
    (lc, e)
}

#[test]
fn light_varying_with_the_orbit_beyond_a_planet_is_a_binary() {
    // Invented: a 6000 ppm eclipse every 2.3 d at a/R★ = 5 around 1 M☉
    // (ellipsoidal ceiling 198.6 ppm, reflected ceiling for k = 0.03: 36 ppm)
    // in white and red noise of 300 ppm each.
    let close = Context {
        a_rstar: Some(5.0),
        ..ctx()
    };
    let flagged = |at_period: f64, at_half: f64, seed: u64| {
        let (lc, e) = varying(at_period, at_half, seed);
        let d = diagnose(&lc, &e, &[], &close, &DetrendSettings::default());
        (flags_of(&d).contains(&Flag::Ellipsoidal), d)
    };
    // A stellar companion's tides: 1000 ppm at half the period.
    let (yes, d) = flagged(0.0, 1000.0, 5);
    let p = d.phase.unwrap();
    assert!(yes, "{p:?} {:?}", d.findings);
    assert!(
        (p.at_half.value - 1000.0).abs() < 4.0 * p.at_half.err,
        "{p:?}"
    );
    // An ellipsoidal binary folded at half its period: 800 ppm at the period.
    let (yes, d) = flagged(800.0, 0.0, 7);
    assert!(yes, "{:?} {:?}", d.phase, d.findings);
    // What a planet could do (100 ppm of tides, below the 198.6 ppm
    // ceiling, and none at the period): measured, not flagged.
    let (yes, d) = flagged(0.0, 100.0, 9);
    let p = d.phase.unwrap();
    assert!(!yes, "{p:?} {:?}", d.findings);
    assert!(
        (p.at_half.value - 100.0).abs() < 4.0 * p.at_half.err,
        "{p:?}"
    );
}

#[test]
fn two_different_eclipses_beyond_chance_are_a_binarys_two_eclipses() {
    // A clean planet's diagnostics (invented light curve), its odd and even
    // depths then set by hand: what the findings make of each pair.
    let (lc, e) = synthetic(4.1, 900.0, 900.0, 0.0, 0.8, 3e-4, 11);
    let clean = diagnose(&lc, &e, &[], &ctx(), &DetrendSettings::default());
    let with = |odd: (f64, f64), even: (f64, f64)| {
        let mut d = clean.clone();
        d.odd = Measure {
            value: odd.0,
            err: odd.1,
        };
        d.even = Measure {
            value: even.0,
            err: even.1,
        };
        d.odd_even_z = odd_even_z(d.odd, d.even);
        flags_of(&Diagnostics {
            findings: findings(&d),
            ..d
        })
    };
    // docs/science.md §4.2's check value, Z = 3.00: a difference real
    // planets reach by chance; it holds the candidate, not its star.
    let chance = with((1000.0, 30.0), (850.0, 40.0));
    assert!(chance.contains(&Flag::OddEven) && !chance.contains(&Flag::Secondary));
    // Z = 4.9: still short of ODD_EVEN_BINARY_Z.
    let short = with((1000.0, 20.0), (860.0, 20.0));
    assert!(short.contains(&Flag::OddEven) && !short.contains(&Flag::Secondary));
    // 6000 ± 50 against 4500 ± 50 ppm (Z = 21): two eclipses of a binary
    // at twice the period, the shallower far above any occultation.
    let binary = with((6000.0, 50.0), (4500.0, 50.0));
    assert!(binary.contains(&Flag::OddEven) && binary.contains(&Flag::Secondary));
    // A planet at twice the catalogue's period: one transit in two, the
    // other nothing (20 ± 30 ppm). No second eclipse, no binary.
    let alias = with((1000.0, 30.0), (20.0, 30.0));
    assert!(alias.contains(&Flag::OddEven) && !alias.contains(&Flag::Secondary));
}
