//! The model transit: the flux of a star of unit radius, uniform or with
//! quadratic limb darkening, partly covered by an opaque disc of radius p at
//! centre distance z (Mandel & Agol 2002, ApJ 580, L171), and the light
//! curve of a circular orbit.
//!
//! The uniform source uses the closed form of Mandel & Agol (their λᵉ); the
//! quadratic limb-darkened source their eq. (7) with λᵈ and ηᵈ from the case
//! table (their Table 1 and §4), through complete elliptic integrals of the
//! first, second and third kind computed by Bulirsch's general integral
//! `cel`. Tests check it against docs/science.md §4, against values computed
//! offline with scipy, and against a direct quadrature of the intensity
//! over the covered part of each ring of the stellar disc, kept in the tests.

use std::f64::consts::PI;

/// Fraction of a uniform stellar disc covered by the planet (Mandel & Agol
/// 2002, λᵉ): 0 for z ≥ 1+p; p² for z ≤ 1−p; 1 for z ≤ p−1; otherwise
/// [p²κ₀ + κ₁ − √((4z² − (1+z²−p²)²)/4)]/π with κ₀ = acos[(p²+z²−1)/(2pz)],
/// κ₁ = acos[(1−p²+z²)/(2z)].
pub fn uniform_covered(p: f64, z: f64) -> f64 {
    let z = z.abs();
    if z >= 1.0 + p {
        0.0
    } else if z <= p - 1.0 {
        1.0
    } else if z <= 1.0 - p {
        p * p
    } else {
        let k0 = ((p * p + z * z - 1.0) / (2.0 * p * z))
            .clamp(-1.0, 1.0)
            .acos();
        let k1 = ((1.0 - p * p + z * z) / (2.0 * z)).clamp(-1.0, 1.0).acos();
        let root = ((4.0 * z * z - (1.0 + z * z - p * p).powi(2)) / 4.0)
            .max(0.0)
            .sqrt();
        (p * p * k0 + k1 - root) / PI
    }
}

/// Relative flux with quadratic limb darkening I(μ) = 1 − u₁(1−μ) − u₂(1−μ)²,
/// μ = √(1 − r²), for a planet of radius p at centre distance z (stellar
/// radii). Mandel & Agol (2002) eq. (7) with c₂ = u₁ + 2u₂:
/// F = 1 − [(1 − c₂)λᵉ + c₂(λᵈ + ⅔Θ(p − z)) + u₂ηᵈ] / (1 − u₁/3 − u₂/6).
pub fn quadratic_flux(p: f64, z: f64, u1: f64, u2: f64) -> f64 {
    let z = z.abs();
    if z >= 1.0 + p || p <= 0.0 {
        return 1.0;
    }
    let (ld, ed) = lambda_eta(p, z);
    let c2 = u1 + 2.0 * u2;
    let omega = 1.0 - u1 / 3.0 - u2 / 6.0;
    1.0 - ((1.0 - c2) * uniform_covered(p, z) + c2 * ld + u2 * ed) / omega
}

/// How close (in stellar radii) z must come to p, 1 − p or 0 (and p to ½)
/// to be taken as that special case of the table: the general formulas
/// divide by zero there, and the special ones are their limits. Beside the
/// edges the general formulas keep ~1e-9 (tested down to 1e-12 away).
const EDGE: f64 = 1e-9;

/// λᵈ + ⅔Θ(p − z) and ηᵈ of Mandel & Agol (2002) Table 1, for 0 < p and
/// z < 1 + p. The step Θ(p − z) makes up the jump of λᵈ at z = p, so it is
/// added by the same branch that picks the formula: none where z is taken
/// as equal to p. With
/// a = (z−p)², b = (z+p)², k = √((1−a)/(4zp)), q = p² − z²:
/// cases 2 and 8 (the planet's disc crosses the limb) λ₁, η₁; 3 and 9 (inside
/// the disc) λ₂, η₂; 4 (z = 1−p < ½) λ₅, η₂; 5 (z = p < ½) λ₄, η₂; 6
/// (p = z = ½) ⅓ − 4/(9π), 3/32; 7 (z = p > ½) λ₃, η₁; 10 (z = 0) λ₆, η₂;
/// 11 (the star covered) 0, ½.
fn lambda_eta(p: f64, z: f64) -> (f64, f64) {
    let (p2, z2) = (p * p, z * z);
    let eta2 = p2 / 2.0 * (p2 + 2.0 * z2);
    const STEP: f64 = 2.0 / 3.0;
    if p >= 1.0 && z <= p - 1.0 {
        return (STEP, 0.5); // case 11
    }
    if z < EDGE {
        return (STEP - 2.0 / 3.0 * (1.0 - p2).max(0.0).powf(1.5), eta2); // case 10: λ₆
    }
    let eta1 = || {
        let a = (z - p) * (z - p);
        let b = (z + p) * (z + p);
        let k0 = ((p2 + z2 - 1.0) / (2.0 * p * z)).clamp(-1.0, 1.0).acos();
        let k1 = ((1.0 - p2 + z2) / (2.0 * z)).clamp(-1.0, 1.0).acos();
        (k1 + 2.0 * eta2 * k0
            - 0.25 * (1.0 + 5.0 * p2 + z2) * ((1.0 - a) * (b - 1.0)).max(0.0).sqrt())
            / (2.0 * PI)
    };
    let inside = z + p <= 1.0 + EDGE && z <= 1.0 - p + EDGE;
    if (p - 0.5).abs() < EDGE && (z - 0.5).abs() < EDGE {
        return (1.0 / 3.0 - 4.0 / (9.0 * PI), 3.0 / 32.0); // case 6
    }
    if (z - p).abs() < EDGE {
        if p < 0.5 {
            return (lambda4(p), eta2); // case 5
        }
        return (lambda3(p), eta1()); // case 7
    }
    if p < 1.0 && (z - (1.0 - p)).abs() < EDGE {
        // Case 4; λ₅ holds for p > ½ too (its Θ(p − ½)), where z = 1 − p < p.
        let step = if p > z { STEP } else { 0.0 };
        return (lambda5(p) + step, eta2);
    }
    let step = if p > z { STEP } else { 0.0 };
    if inside {
        (lambda2(p, z) + step, eta2) // cases 3 and 9
    } else {
        (lambda1(p, z) + step, eta1()) // cases 2 and 8
    }
}

/// λ₁ = [((1−b)(2b+a−3) − 3q(b−2)) K(k) + 4pz(z²+7p²−4) E(k) − 3(q/a) Π((a−1)/a, k)] / (9π√(pz)).
fn lambda1(p: f64, z: f64) -> f64 {
    let (a, b, q) = ((z - p).powi(2), (z + p).powi(2), p * p - z * z);
    // k² = (1−a)/(4zp), so k_c² = 1 − k² = (b−1)/(4zp): no cancellation
    // near z = 1 − p, where k → 1.
    let kc = ((b - 1.0) / (4.0 * z * p)).max(0.0).sqrt();
    (((1.0 - b) * (2.0 * b + a - 3.0) - 3.0 * q * (b - 2.0)) * ell_k(kc)
        + 4.0 * p * z * (z * z + 7.0 * p * p - 4.0) * ell_e(kc)
        - 3.0 * (q / a) * ell_pi((a - 1.0) / a, kc))
        / (9.0 * PI * (p * z).sqrt())
}

/// λ₂ = 2[(1 − 5z² + p² + q²) K(1/k) + (1−a)(z²+7p²−4) E(1/k) − 3(q/a) Π((a−b)/a, 1/k)] / (9π√(1−a)).
fn lambda2(p: f64, z: f64) -> f64 {
    let (a, b, q) = ((z - p).powi(2), (z + p).powi(2), p * p - z * z);
    // 1/k² = 4zp/(1−a), so k_c² = 1 − 1/k² = (1−b)/(1−a).
    let kc = ((1.0 - b) / (1.0 - a)).max(0.0).sqrt();
    2.0 * ((1.0 - 5.0 * z * z + p * p + q * q) * ell_k(kc)
        + (1.0 - a) * (z * z + 7.0 * p * p - 4.0) * ell_e(kc)
        - 3.0 * (q / a) * ell_pi((a - b) / a, kc))
        / (9.0 * PI * (1.0 - a).sqrt())
}

/// λ₃ = ⅓ + 16p(2p²−1) E(1/(2p)) / (9π) − (1−4p²)(3−8p²) K(1/(2p)) / (9πp).
fn lambda3(p: f64) -> f64 {
    let k = 1.0 / (2.0 * p);
    let kc = (1.0 - k * k).max(0.0).sqrt();
    1.0 / 3.0 + 16.0 * p / (9.0 * PI) * (2.0 * p * p - 1.0) * ell_e(kc)
        - (1.0 - 4.0 * p * p) * (3.0 - 8.0 * p * p) / (9.0 * PI * p) * ell_k(kc)
}

/// λ₄ = ⅓ + 2[4(2p²−1) E(2p) + (1−4p²) K(2p)] / (9π).
fn lambda4(p: f64) -> f64 {
    let k = 2.0 * p;
    let kc = (1.0 - k * k).max(0.0).sqrt();
    1.0 / 3.0
        + 2.0 / (9.0 * PI)
            * (4.0 * (2.0 * p * p - 1.0) * ell_e(kc) + (1.0 - 4.0 * p * p) * ell_k(kc))
}

/// λ₅ = (2/(3π)) acos(1−2p) − (4/(9π))(3 + 2p − 8p²)√(p(1−p)) − ⅔Θ(p − ½).
fn lambda5(p: f64) -> f64 {
    let step = if p > 0.5 { 2.0 / 3.0 } else { 0.0 };
    2.0 / (3.0 * PI) * (1.0 - 2.0 * p).acos()
        - 4.0 / (9.0 * PI) * (3.0 + 2.0 * p - 8.0 * p * p) * (p * (1.0 - p)).sqrt()
        - step
}

/// K(k) from the complementary modulus k_c = √(1 − k²).
fn ell_k(kc: f64) -> f64 {
    cel(kc, 1.0, 1.0, 1.0)
}

/// E(k) from k_c.
fn ell_e(kc: f64) -> f64 {
    cel(kc, 1.0, 1.0, kc * kc)
}

/// Π(n, k) = ∫₀^{π/2} dφ / [(1 − n sin²φ) √(1 − k² sin²φ)] (Mandel &
/// Agol's convention; their λ₁ and λ₂ take n < 0, where it is finite).
fn ell_pi(n: f64, kc: f64) -> f64 {
    cel(kc, 1.0 - n, 1.0, 1.0)
}

/// Bulirsch's general complete elliptic integral (Bulirsch 1969, Numer.
/// Math. 13, 305; the form of Numerical Recipes §6.11):
/// cel(k_c, p, a, b) = ∫₀^{π/2} (a cos²φ + b sin²φ) / [(cos²φ + p sin²φ) √(cos²φ + k_c² sin²φ)] dφ.
/// Infinite for k_c = 0.
fn cel(kc: f64, p: f64, a: f64, b: f64) -> f64 {
    // The iteration converges quadratically: stopping at 1e-8 leaves ~1e-16.
    const CA: f64 = 1e-8;
    if kc == 0.0 {
        return f64::INFINITY;
    }
    let mut qc = kc.abs();
    let (mut a, mut b, mut p) = (a, b, p);
    let mut e = qc;
    let mut em = 1.0;
    if p > 0.0 {
        p = p.sqrt();
        b /= p;
    } else {
        let mut f = qc * qc;
        let mut q = 1.0 - f;
        let g = 1.0 - p;
        f -= p;
        q *= b - a * p;
        p = (f / g).sqrt();
        a = (a - b) / g;
        b = -q / (g * g * p) + a * p;
    }
    for _ in 0..64 {
        let f = a;
        a += b / p;
        let g = e / p;
        b += f * g;
        b += b;
        p += g;
        let g = em;
        em += qc;
        if (g - qc).abs() <= g * CA {
            break;
        }
        qc = e.sqrt();
        qc += qc;
        e = qc * em;
    }
    PI / 2.0 * (b + a * em) / (em * (em + p))
}

/// Projected centre distance in stellar radii for a circular orbit at
/// `phase` (0 at mid-transit, in cycles): z = (a/R★) √(sin²2πφ + cos²i cos²2πφ),
/// with cos i = b/(a/R★). Far side of the orbit (no transit) gives +∞.
pub fn separation(phase: f64, a_rstar: f64, impact: f64) -> f64 {
    let w = 2.0 * PI * phase;
    if w.cos() <= 0.0 {
        return f64::INFINITY;
    }
    let cos_i = impact / a_rstar;
    a_rstar * (w.sin().powi(2) + (cos_i * w.cos()).powi(2)).sqrt()
}

/// The model flux at `phase` for R_p/R★ = p, a/R★, b and quadratic limb darkening.
pub fn model_flux(phase: f64, p: f64, a_rstar: f64, impact: f64, u1: f64, u2: f64) -> f64 {
    let z = separation(phase, a_rstar, impact);
    if z.is_infinite() {
        1.0
    } else if u1 == 0.0 && u2 == 0.0 {
        1.0 - uniform_covered(p, z)
    } else {
        quadratic_flux(p, z, u1, u2)
    }
}

/// Typical quadratic limb-darkening coefficients of a Sun-like star in the
/// visible, used when the catalogue gives none (common practice, no source).
pub const DEFAULT_LD: (f64, f64) = (0.4, 0.26);

#[cfg(test)]
mod tests {
    use super::*;

    /// The flux by direct quadrature, as a check on the case table:
    /// B = ∫ I(r) θ(r) r dr over the rings the planet crosses (θ the angle of
    /// the ring inside the planet's disc), plus the rings it covers whole in
    /// closed form; double-exponential (tanh-sinh) quadrature split at the
    /// kinks of θ, good to ~1e-12.
    fn quadratic_flux_by_quadrature(p: f64, z: f64, u1: f64, u2: f64) -> f64 {
        let z = z.abs();
        if z >= 1.0 + p || p <= 0.0 {
            return 1.0;
        }
        let intensity = |r: f64| {
            let m = 1.0 - (1.0 - r * r).max(0.0).sqrt();
            1.0 - u1 * m - u2 * m * m
        };
        let total = PI * (1.0 - u1 / 3.0 - u2 / 6.0);
        let inner = (p - z).clamp(0.0, 1.0);
        let mut blocked = if inner > 0.0 {
            full_rings(inner, u1, u2)
        } else {
            0.0
        };
        let (lo, hi) = ((z - p).abs().min(1.0), (z + p).min(1.0));
        if hi > lo && z > 0.0 {
            let covered = |r: f64| {
                let c = ((r * r + z * z - p * p) / (2.0 * r * z)).clamp(-1.0, 1.0);
                2.0 * c.acos()
            };
            blocked += tanh_sinh(|r| intensity(r) * covered(r) * r, lo, hi);
        }
        1.0 - blocked / total
    }

    /// ∫₀^R I(r) 2π r dr in closed form (μ₀ = √(1−R²)).
    fn full_rings(r: f64, u1: f64, u2: f64) -> f64 {
        let mu0 = (1.0 - r * r).max(0.0).sqrt();
        let a = |m: f64| m * m / 2.0;
        let b = |m: f64| m * m / 2.0 - m.powi(3) / 3.0;
        let c = |m: f64| m * m / 2.0 - 2.0 * m.powi(3) / 3.0 + m.powi(4) / 4.0;
        2.0 * PI * ((a(1.0) - a(mu0)) - u1 * (b(1.0) - b(mu0)) - u2 * (c(1.0) - c(mu0)))
    }

    /// Double-exponential quadrature on [a, b] (Takahasi & Mori 1974).
    fn tanh_sinh(f: impl Fn(f64) -> f64, a: f64, b: f64) -> f64 {
        let (c, d) = (0.5 * (a + b), 0.5 * (b - a));
        let h = 1.0 / 16.0;
        let mut sum = 0.0;
        for k in -96i32..=96 {
            let t = k as f64 * h;
            let u = 0.5 * PI * t.sinh();
            let x = u.tanh();
            let w = 0.5 * PI * t.cosh() / u.cosh().powi(2);
            if w < 1e-300 || x.abs() >= 1.0 {
                continue;
            }
            sum += w * f(c + d * x);
        }
        sum * h * d
    }

    #[test]
    fn elliptic_integrals_match_scipy() {
        // Reference values computed offline with scipy 1.17.1:
        // ellipk(m), ellipe(m) with m = k², and Π(n, k) with (1 − n sin²φ) as
        // RF(0, 1−m, 1) + n/3 RJ(0, 1−m, 1, 1−n) (Carlson's forms).
        let kc = |k: f64| (1.0 - k * k).sqrt();
        for (k, kk, ee) in [
            (0.1, 1.5747455615173558, 1.5668619420216683),
            (0.5, 1.685750354812596, 1.4674622093394272),
            (0.9, 2.2805491384227703, 1.1716970527816142),
            (0.99, 3.3566005233611915, 1.0284758090288042),
        ] {
            assert!((ell_k(kc(k)) - kk).abs() < 1e-13, "K({k})");
            assert!((ell_e(kc(k)) - ee).abs() < 1e-13, "E({k})");
        }
        for (n, k, pi) in [
            (0.3, 0.5, 2.0277924458111314),
            (-0.7, 0.6, 1.323273746882281),
            (0.9, 0.2, 5.044826935620039),
            (-5.0, 0.8, 0.734583944269745),
        ] {
            assert!((ell_pi(n, kc(k)) - pi).abs() < 1e-12, "Π({n}, {k})");
        }
    }

    #[test]
    fn case_table_matches_scipy_and_quadrature() {
        // u = (0.4, 0.26). Values computed offline with scipy 1.17.1
        // (integrate.quad of I(r)·θ(r)·r over r, split at the kinks of θ).
        for (p, z, f) in [
            (0.1, 0.0, 0.9878664435),
            (0.1, 0.5, 0.9885838251),
            (0.1, 0.95, 0.9940333434),
            (0.1, 1.05, 0.9988487849),
            (0.3, 0.5, 0.8989556759),
            (0.3, 0.8, 0.9257146106),
            (0.5, 0.5, 0.7317146263),
            (0.6, 0.3, 0.5947632010),
            (0.6, 0.9, 0.8105840770),
            (0.1, 0.1, 0.9878911601),
            (1.2, 0.1, 0.0),
            (1.2, 0.8, 0.3210172079),
            (1.2, 1.5, 0.7625584355),
        ] {
            let got = quadratic_flux(p, z, 0.4, 0.26);
            assert!((got - f).abs() < 2e-10, "p {p}, z {z}: {got} vs {f}");
        }
        // Every case of the table, its edges and points just beside them,
        // against the quadrature, for three limb-darkening laws.
        let mut worst = 0.0f64;
        for &(u1, u2) in &[(0.4, 0.26), (0.1, 0.6), (0.9, -0.2)] {
            for &p in &[
                0.01, 0.1, 0.3, 0.4999999, 0.5, 0.5000001, 0.7, 0.99, 1.0, 1.3,
            ] {
                let mut zs: Vec<f64> = (0..=60).map(|i| i as f64 * (1.0 + p) / 60.0).collect();
                for edge in [p, (1.0 - p).abs(), 1.0 + p, p - 1.0, 0.0] {
                    for d in [-1e-5, -1e-8, -1e-10, -1e-12, 0.0, 1e-12, 1e-10, 1e-8, 1e-5] {
                        zs.push(edge + d);
                    }
                }
                for z in zs.into_iter().filter(|z| *z >= 0.0) {
                    let a = quadratic_flux(p, z, u1, u2);
                    let b = quadratic_flux_by_quadrature(p, z, u1, u2);
                    worst = worst.max((a - b).abs());
                    assert!(
                        (a - b).abs() < 1e-8,
                        "p {p}, z {z}, u ({u1}, {u2}): {a} vs {b}"
                    );
                }
            }
        }
        eprintln!("largest difference from the quadrature: {worst:e}");
    }

    #[test]
    fn uniform_source_check_values() {
        // docs/science.md §4, Mandel & Agol 2002 uniform source, p = 0.1 (checked
        // there by a 2-D grid integration at z = 1).
        for (z, f) in [
            (0.0, 0.9900000),
            (0.9, 0.9900000),
            (0.95, 0.9920266),
            (1.0, 0.9951061),
            (1.05, 0.9981114),
            (1.1, 1.0),
        ] {
            let got = 1.0 - uniform_covered(0.1, z);
            assert!((got - f).abs() < 5e-8, "z = {z}: {got} vs {f}");
        }
        assert_eq!(uniform_covered(2.0, 0.5), 1.0);
    }

    #[test]
    fn quadratic_check_values() {
        // docs/science.md §4: u = (0.4, 0.26), p = 0.1; exact at z = 0: 0.9878664;
        // numerical at z = 0.5: 0.9885839. An independent midpoint rule with a
        // cosine substitution (200,000 nodes, plain Python, run offline) gives
        // 0.98858383 at z = 0.5, so the methods note's seventh digit is rounded up:
        // agreement is asked to 1e-7 there.
        let f0 = quadratic_flux(0.1, 0.0, 0.4, 0.26);
        assert!((f0 - 0.9878664).abs() < 5e-8, "{f0}");
        let f5 = quadratic_flux(0.1, 0.5, 0.4, 0.26);
        assert!((f5 - 0.9885839).abs() < 1e-7, "{f5}");
        assert!((f5 - 0.98858383).abs() < 1e-8, "{f5}");
        // The exact z = 0 formula of docs/science.md §4 with μ_p = √(1−p²).
        let (p, u1, u2) = (0.1f64, 0.4, 0.26);
        let mp = (1.0 - p * p).sqrt();
        let lam = (p * p
            - u1 * (1.0 / 3.0 - mp * mp + 2.0 * mp.powi(3) / 3.0)
            - u2 * (1.0 / 6.0 - mp * mp + 4.0 * mp.powi(3) / 3.0 - mp.powi(4) / 2.0))
            / (1.0 - u1 / 3.0 - u2 / 6.0);
        assert!((f0 - (1.0 - lam)).abs() < 1e-10);
        // No limb darkening reduces to the uniform source everywhere.
        for z in [0.0, 0.3, 0.92, 0.97, 1.0, 1.04, 1.09] {
            let a = quadratic_flux(0.1, z, 0.0, 0.0);
            let b = 1.0 - uniform_covered(0.1, z);
            assert!((a - b).abs() < 1e-10, "z = {z}: {a} vs {b}");
        }
        assert_eq!(quadratic_flux(0.1, 1.2, 0.4, 0.26), 1.0);
        // A planet larger than the star covering it whole.
        assert!(quadratic_flux(1.5, 0.2, 0.4, 0.26).abs() < 1e-9);
    }

    #[test]
    fn orbit_geometry() {
        // Mid-transit: z = b; the far side never transits.
        assert!((separation(0.0, 10.0, 0.3) - 0.3).abs() < 1e-12);
        assert!(separation(0.5, 10.0, 0.3).is_infinite());
        assert_eq!(model_flux(0.25, 0.1, 10.0, 0.3, 0.4, 0.26), 1.0);
    }
}
