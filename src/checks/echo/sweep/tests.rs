//! The echo search's layout and search, tested against comparing every
//! pair.

use super::*;
use crate::checks::CheckSettings;

/// Invented signals (a fixed pseudo-random sequence): periods in a few
/// tight clusters and at twice them, positions in a few small patches
/// (some missing, some impossible, one across right ascension 0° and
/// one around a pole), so that many pairs fall in one
/// period window and many near each other on the sky.
fn signals(n: usize, seed: u64) -> Vec<Sig> {
    let mut x = seed;
    let mut next = move || {
        x = x
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (x >> 11) as f64 / (1u64 << 53) as f64
    };
    (0..n)
        .map(|i| {
            let base = [3.0, 7.5, 15.0, 40.0][(next() * 4.0) as usize];
            let period = base * if next() < 0.3 { 2.0 } else { 1.0 } * (1.0 + 5e-3 * next());
            let (ra, dec) = match (next() * 12.0) as u32 {
                0 => (f64::NAN, f64::NAN),
                1 => (10.0, 95.0),
                2 => (f64::NAN, 10.0),
                // Across right ascension 0° (written past 360° too).
                3 => (359.97 + 0.06 * next(), 5.0 + 0.05 * next()),
                // Around the north pole, at every right ascension.
                4 => (360.0 * next(), 89.95 + 0.05 * next()),
                k => (
                    10.0 * f64::from(k % 3) + 0.05 * next(),
                    -30.0 + 0.1 * f64::from(k % 2) + 0.05 * next(),
                ),
            };
            Sig {
                c: i as CandidateId,
                rank: 0,
                star: (next() * n as f64 / 2.0) as u32,
                period,
                period_err: if next() < 0.5 { 1e-4 } else { 0.0 },
                epoch: 100.0
                    + period * (next() * 5.0).floor()
                    + if next() < 0.2 { 0.3 } else { 0.0 },
                epoch_err: 1e-3,
                t14_d: 0.1,
                ra,
                dec,
            }
        })
        .collect()
}

/// Every pair of every period window, compared one by one.
fn every_pair(by_rank: &[Sig], pair: &Pair) -> Vec<(u32, u8, u32)> {
    let mut out = Vec::new();
    for a in by_rank {
        for n in [1u8, 2] {
            let nf = f64::from(n);
            for b in by_rank {
                let rel = pair.widest_rel(placed(a), placed(b));
                let inside = if n == 1 {
                    b.rank > a.rank && b.period <= a.period * (1.0 + rel)
                } else {
                    b.period >= 2.0 * a.period * (1.0 - rel)
                        && b.period <= 2.0 * a.period * (1.0 + rel)
                };
                if inside && pair.compare(a, b, nf).is_some() {
                    out.push((a.rank, n, b.rank));
                }
            }
        }
    }
    out
}

#[test]
fn an_entry_is_24_bytes_and_its_error_never_below_the_signals() {
    assert_eq!(std::mem::size_of::<Entry>(), 24);
    for x in [0.0, 1e-320, 1.1e-7, 9.38e-5, 0.1, 1.0 / 3.0, 1e38, 1e300] {
        let up = f64::from(f32_up(x));
        assert!(up >= x && (x == 0.0 || up > 0.0), "{x}");
        // At most one f32 step above.
        let below = f32::from_bits((up as f32).to_bits().saturating_sub(1));
        assert!(x == 0.0 || f64::from(below) < x, "{x}");
    }
    assert_eq!(f32_up(0.0), 0.0);
}

#[test]
fn the_bands_find_what_comparing_every_pair_finds() {
    // Radii from far below the patches' size to wider than the sky.
    for (seed, radius) in [(1, 120.0), (2, 30.0), (3, 1000.0), (4, 1e7), (5, 0.0)] {
        let settings = CheckSettings {
            echo_radius_arcsec: radius,
            ..CheckSettings::default()
        };
        let pair = Pair {
            s: &settings,
            positions: true,
            mag: None,
            depth: None,
            copies: None,
        };
        let mut sigs = signals(1500, seed);
        let mut order: Vec<u128> = sigs
            .iter()
            .map(|s| super::super::order_key(s.period, s.c))
            .collect();
        order.sort_unstable();
        for (r, &k) in order.iter().enumerate() {
            sigs[k as u32 as usize].rank = r as u32;
        }
        let by_period: Vec<CandidateId> = order.iter().map(|&k| k as CandidateId).collect();
        let mut by_rank = sigs.clone();
        by_rank.sort_by_key(|s| s.rank);
        let mut want = every_pair(&by_rank, &pair);
        want.sort_unstable();
        let sig = |i: usize| sigs[i];
        // Written to the bands in one block, in blocks of a few, and
        // one at a time (both ways of writing them, `Index::in_blocks`).
        let index = Index::new(radius, sig, by_period.clone());
        for block in [1, 7, 256] {
            let other = Index::in_blocks(radius, sig, by_period.clone(), block, 8);
            assert_eq!(
                format!("{:?}", (&other.placed, &other.bands, &other.cells)),
                format!("{:?}", (&index.placed, &index.bands, &index.cells)),
                "seed {seed}, radius {radius}, block {block}"
            );
        }
        // The signals in period order held whole, and as entries.
        let whole = Index::in_blocks(radius, sig, by_period.clone(), FILL_BLOCK, 0);
        let entries = Index::in_blocks(radius, sig, by_period.clone(), FILL_BLOCK, usize::MAX);
        assert!(matches!(whole.all, InPeriodOrder::Whole(_)) || whole.unplaced.is_empty());
        assert!(matches!(entries.all, InPeriodOrder::Entries(_)));
        let by_entries = entries.sweep_unplaced(0..entries.unplaced_len(), &pair, &sig);
        let (bands, unplaced) = (
            index.sweep_cells(0..index.cells_len(), &pair, &sig),
            whole.sweep_unplaced(0..whole.unplaced_len(), &pair, &sig),
        );
        assert_eq!(
            format!("{:?}", (&by_entries.matches, &by_entries.crowded)),
            format!("{:?}", (&unplaced.matches, &unplaced.crowded)),
            "seed {seed}, radius {radius}"
        );
        // No window filled up: the search was not cut short.
        assert!(
            bands.crowded.is_empty() && unplaced.crowded.is_empty(),
            "seed {seed}: {} {}",
            bands.crowded.len(),
            unplaced.crowded.len()
        );
        let mut got: Vec<(u32, u8, u32)> = bands
            .matches
            .into_iter()
            .chain(unplaced.matches)
            .map(|m| m.0)
            .collect();
        got.sort_unstable();
        assert!(want.len() > 20, "seed {seed}: only {} matches", want.len());
        let first_difference = got.iter().zip(&want).position(|(g, w)| g != w);
        assert!(
            got == want,
            "seed {seed}, radius {radius}: {} matches against {}, first difference at {first_difference:?}",
            got.len(),
            want.len()
        );
    }
}
