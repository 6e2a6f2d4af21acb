//! Pooling of sparse multiplicity bins and the monotone fit of the
//! false-positive probability per k (docs/science.md §1.3): bins with fewer
//! than [`MIN_SYSTEMS`] stars are pooled with their neighbours, as the
//! published framework pools k ≥ 3 (Lissauer et al. 2014, ApJ 784, 44), and
//! adjacent pools that break "more candidates, fewer false positives" are
//! merged (pool-adjacent-violators; Ayer et al. 1955, Ann. Math. Stat. 26,
//! 641). A pooled estimate is a ratio of sums, so merging two pools is the
//! same as pooling their counts.

/// A bin with fewer stars than this is pooled with its neighbours (as the
/// issue tracker asked; common practice, no source: ten systems give a
/// Poisson relative error of about 30 %).
pub const MIN_SYSTEMS: usize = 10;

/// A run of multiplicities k = lo..=hi that share one estimate.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Pool {
    pub lo: usize,
    pub hi: usize,
    /// The summed numerator (expected false positives) of the run.
    pub num: f64,
    /// The summed denominator (candidates or systems) of the run.
    pub den: f64,
    /// Stars in the run.
    pub stars: usize,
}

impl Pool {
    /// The pooled estimate num/den (the numerator alone when den is 0).
    pub fn value(&self) -> f64 {
        if self.den > 0.0 {
            self.num / self.den
        } else {
            self.num
        }
    }

    fn merge(self, o: Pool) -> Pool {
        Pool {
            lo: self.lo.min(o.lo),
            hi: self.hi.max(o.hi),
            num: self.num + o.num,
            den: self.den + o.den,
            stars: self.stars + o.stars,
        }
    }
}

/// Pools of k = 2..=k_max (`bins[i]` is k = i + 2, as (num, den, stars)):
/// first from the top down, each pool gathering bins until it holds
/// `MIN_SYSTEMS` stars (a short remainder at the bottom joins the pool
/// above it); then adjacent pools are merged while a lower k has the smaller
/// estimate, or would have it after one star moved down into it (`grow`:
/// the denominator one star of the pool's top multiplicity adds). That one
/// star's margin is what keeps a rejection from raising a sibling's odds:
/// the sibling moves down one k and its new bin gains exactly that star.
pub fn pools(bins: &[(f64, f64, usize)], grow: impl Fn(usize) -> f64) -> Vec<Pool> {
    let mut sized: Vec<Pool> = Vec::new();
    let mut cur: Option<Pool> = None;
    for (i, &(num, den, stars)) in bins.iter().enumerate().rev() {
        let k = i + 2;
        let p = Pool {
            lo: k,
            hi: k,
            num,
            den,
            stars,
        };
        let joined = match cur {
            Some(c) => c.merge(p),
            None => p,
        };
        if joined.stars >= MIN_SYSTEMS {
            sized.push(joined);
            cur = None;
        } else {
            cur = Some(joined);
        }
    }
    if let Some(rest) = cur {
        match sized.pop() {
            Some(above) => sized.push(above.merge(rest)),
            None => sized.push(rest),
        }
    }
    sized.reverse(); // ascending k
    // Pool adjacent violators: the estimate must fall as k rises, with the
    // one-star margin on the lower pool.
    let mut out: Vec<Pool> = Vec::with_capacity(sized.len());
    for p in sized {
        let mut p = p;
        while let Some(&low) = out.last() {
            let grown = Pool {
                den: low.den + grow(low.hi),
                ..low
            };
            if grown.value() < p.value() || low.value() < p.value() {
                out.pop();
                p = low.merge(p);
            } else {
                break;
            }
        }
        out.push(p);
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn bins(v: &[(f64, f64, usize)]) -> Vec<Pool> {
        pools(v, |_| 0.0)
    }

    #[test]
    fn sparse_top_bins_pool_down_to_ten_stars() {
        // The histogram of Latham et al. 2011 (n2..n6 = 115, 45, 8, 1, 1):
        // k = 4, 5, 6 hold 10 stars together and pool; 2 and 3 stand alone.
        let v = [
            (1.0, 230.0, 115),
            (0.1, 135.0, 45),
            (0.001, 32.0, 8),
            (0.0, 5.0, 1),
            (0.0, 6.0, 1),
        ];
        let p = bins(&v);
        assert_eq!(
            p.iter().map(|p| (p.lo, p.hi)).collect::<Vec<_>>(),
            [(2, 2), (3, 3), (4, 6)]
        );
        assert_eq!(p[2].stars, 10);
    }

    #[test]
    fn a_rising_estimate_is_merged() {
        // k = 3 would have more false positives per candidate than k = 2:
        // the two are pooled, and the pooled value is the ratio of sums.
        let p = bins(&[(1.0, 100.0, 50), (3.0, 150.0, 50)]);
        assert_eq!(p.len(), 1);
        assert_eq!((p[0].lo, p[0].hi), (2, 3));
        assert!((p[0].value() - 4.0 / 250.0).abs() < 1e-15);
        // Fewer than ten stars in all: one pool, said by its star count.
        let p = bins(&[(1.0, 10.0, 3), (0.1, 6.0, 2)]);
        assert_eq!(p.len(), 1);
        assert_eq!(p[0].stars, 5);
    }

    #[test]
    fn the_one_star_margin_merges_near_ties() {
        // 2: 1/100, 3: 0.0099/1: k = 3 is lower, but one more star at k = 2
        // (den + 2) would take k = 2 below it: merged.
        let v = [(1.0, 100.0, 50), (0.98, 99.0, 33)];
        assert_eq!(pools(&v, |_| 0.0).len(), 2);
        assert_eq!(pools(&v, |k| k as f64).len(), 1);
    }
}
