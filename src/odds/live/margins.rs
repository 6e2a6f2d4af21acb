//! "Holds to f": the largest false-positive fraction at which a counted
//! candidate still reaches the threshold (docs/science.md §1.5), from a
//! table of boosts over a grid of f, built once per state.

use super::*;

/// The table of boosts at a grid of f values (scaled from the model's), for
/// "holds to f" (docs/science.md §1.5).
#[derive(Clone, Debug)]
pub(super) struct Margins {
    /// The scale on every f at grid point j, ascending.
    scale: Vec<f64>,
    /// boost[j][k] at scale j (index 0 unused).
    boost: Vec<Vec<f64>>,
    /// Per k, the suffix maximum over j of boost[j][k].
    suffix_max: Vec<Vec<f64>>,
    /// For candidates without `fpp`: per (k, f), the edge refined by
    /// bisection between grid points (`None`: below the threshold at every f).
    refined: Vec<(usize, f64, Option<f64>)>,
}

const MARGIN_STEPS: usize = 480;

impl Live {
    /// The largest f (the candidate's own, with every other f scaled in
    /// proportion) at which a counted candidate still reaches the threshold,
    /// everything else unchanged; `None` when it is not counted or does not
    /// reach it at any f (docs/science.md §1.5).
    pub fn holds_to(&self, c: CandidateId) -> Option<f64> {
        if self.status[c as usize] != Status::Counted || self.model.targets.is_none() {
            return None;
        }
        let k = self.k(c);
        let m = self.margins.get_or_init(|| self.margins_table());
        let t = self.model.threshold;
        let f_c = self.f_of.get(c as usize);
        let has_fpp = self.has_fpp.get(c as usize);
        let last = m.scale.len() - 1;
        let hold_at = |j: usize| {
            let b = m.boost[j].get(k).copied().unwrap_or(1.0);
            let p = if has_fpp {
                self.prior(c)
            } else {
                (m.scale[j] * f_c).min(1.0)
            };
            posterior_odds(b, p) >= t
        };
        if !has_fpp {
            return m
                .refined
                .iter()
                .find(|r| r.0 == k && r.1 == f_c)
                .and_then(|r| r.2);
        }
        let j = if has_fpp {
            // Largest j with boost_j ≥ x: the suffix maximum falls with j.
            let p = self.prior(c);
            let x = t * p / (1.0 - p).max(1e-300);
            let sm = m.suffix_max.get(k)?;
            let upto = sm.partition_point(|&b| b >= x);
            upto.checked_sub(1)?
        } else {
            (0..=last).rev().find(|&j| hold_at(j))?
        };
        Some((m.scale[j] * f_c).min(0.9999))
    }

    fn margins_table(&self) -> Margins {
        // The distinct f of the candidates, in order: those the singles
        // are counted by (`singles_by_f`), so no pass over the catalogue.
        let fs: Vec<f64> = self.singles_by_f.iter().map(|e| e.0).collect();
        let f_max = fs.iter().copied().fold(self.model.fp_fraction, f64::max);
        let k_max = self.hist.len().saturating_sub(1).max(1);
        let (lo, hi) = (1e-4_f64.ln(), 0.9999_f64.ln());
        let mut scale = Vec::with_capacity(MARGIN_STEPS);
        let mut boost = Vec::with_capacity(MARGIN_STEPS);
        let fp_singles = self.fp_singles();
        // The boost per k with every f scaled by s (each f capped below 1).
        let boosts_at = |s: f64| -> Vec<f64> {
            let mut model = self.model.clone();
            model.fp_fraction = (model.fp_fraction * s).min(0.9999);
            for b in &mut model.fp_by_radius {
                b.f = (b.f * s).min(0.9999);
            }
            let t = table_with(&model, trimmed(&self.hist), fp_singles * s);
            let mut row = vec![f64::NAN];
            row.extend((1..=k_max).map(|k| t.boost(k)));
            row
        };
        for j in 0..MARGIN_STEPS {
            let f_top = (lo + (hi - lo) * j as f64 / (MARGIN_STEPS - 1) as f64).exp();
            let s = f_top / f_max;
            scale.push(s);
            boost.push(boosts_at(s));
        }
        let t = self.model.threshold;
        let mut refined = Vec::new();
        for k in 1..=k_max {
            for &f_c in &fs {
                let holds = |b: &[f64], s: f64| posterior_odds(b[k], (s * f_c).min(1.0)) >= t;
                let edge = (0..scale.len())
                    .rev()
                    .find(|&j| holds(&boost[j], scale[j]))
                    .map(|j| {
                        if j + 1 == scale.len() {
                            return scale[j];
                        }
                        let (mut a, mut b) = (scale[j], scale[j + 1]);
                        for _ in 0..40 {
                            let mid = 0.5 * (a + b);
                            if holds(&boosts_at(mid), mid) {
                                a = mid;
                            } else {
                                b = mid;
                            }
                        }
                        a
                    });
                refined.push((k, f_c, edge.map(|s| (s * f_c).min(0.9999))));
            }
        }
        let suffix_max = (0..=k_max)
            .map(|k| {
                let mut v: Vec<f64> = boost.iter().map(|r| r[k]).collect();
                for j in (0..v.len().saturating_sub(1)).rev() {
                    v[j] = v[j].max(v[j + 1]);
                }
                v
            })
            .collect();
        Margins {
            scale,
            boost,
            suffix_max,
            refined,
        }
    }
}
