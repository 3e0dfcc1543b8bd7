//! Pointwise complex multiplies of the split-step loop (AVX2/FMA where the CPU has
//! it, rayon over chunks when asked), the nonlinear (Gross-Pitaevskii) kick with its
//! sine/cosine, and the bare-FFT floor of the benchmark.

use num_complex::Complex64;
use rayon::prelude::*;
use rustfft::FftPlanner;

/// Chunk length of the parallel pointwise loops.
const PAR_CHUNK: usize = 8192;

#[inline(always)]
pub fn mul_kernel(a: &mut [Complex64], b: &[Complex64]) {
    for (x, y) in a.iter_mut().zip(b) {
        *x *= *y;
    }
}

/// a_j *= b_j with AVX2/FMA, two complex numbers per 256-bit register:
/// (a_r + i a_i)(b_r + i b_i) = fmaddsub(a, dup(b_r), swap(a)·dup(b_i)).
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
unsafe fn mul_avx(a: &mut [Complex64], b: &[Complex64]) {
    use std::arch::x86_64::*;
    let n = a.len().min(b.len());
    let pairs = n / 2;
    let pa = a.as_mut_ptr() as *mut f64;
    let pb = b.as_ptr() as *const f64;
    for p in 0..pairs {
        // SAFETY: 2p + 1 < n; Complex64 is two contiguous f64 (repr(C)); unaligned loads.
        unsafe {
            let x = _mm256_loadu_pd(pa.add(4 * p));
            let y = _mm256_loadu_pd(pb.add(4 * p));
            let yr = _mm256_movedup_pd(y);
            let yi = _mm256_permute_pd(y, 0b1111);
            let xs = _mm256_permute_pd(x, 0b0101);
            let r = _mm256_fmaddsub_pd(x, yr, _mm256_mul_pd(xs, yi));
            _mm256_storeu_pd(pa.add(4 * p), r);
        }
    }
    mul_kernel(&mut a[2 * pairs..n], &b[2 * pairs..n]);
}

/// a_j *= b_j (AVX2/FMA code path selected at run time where available).
pub fn mul_seq(a: &mut [Complex64], b: &[Complex64]) {
    #[cfg(target_arch = "x86_64")]
    {
        if std::is_x86_feature_detected!("avx2") && std::is_x86_feature_detected!("fma") {
            // SAFETY: the CPU supports the features the function was compiled for.
            unsafe { mul_avx(a, b) };
            return;
        }
    }
    mul_kernel(a, b)
}

pub fn mul(a: &mut [Complex64], b: &[Complex64], par: bool) {
    if par {
        a.par_chunks_mut(PAR_CHUNK)
            .zip(b.par_chunks(PAR_CHUNK))
            .for_each(|(a, b)| mul_seq(a, b));
    } else {
        mul_seq(a, b);
    }
}

/// a_j *= b_j · e^{i coef v_j}
fn mul_drive_seq(a: &mut [Complex64], b: &[Complex64], v: &[f64], coef: f64) {
    for ((x, y), v) in a.iter_mut().zip(b).zip(v) {
        let (s, c) = (coef * v).sin_cos();
        *x *= *y * Complex64::new(c, s);
    }
}

pub fn mul_drive(a: &mut [Complex64], b: &[Complex64], v: &[f64], coef: f64, par: bool) {
    if par {
        a.par_chunks_mut(PAR_CHUNK)
            .zip(b.par_chunks(PAR_CHUNK))
            .zip(v.par_chunks(PAR_CHUNK))
            .for_each(|((a, b), v)| mul_drive_seq(a, b, v, coef));
    } else {
        mul_drive_seq(a, b, v, coef);
    }
}

/// The coefficient G of the nonlinear phase G·|ψ_j|² of one kick (see [`kick_nonlinear`]).
#[derive(Debug, Clone, PartialEq)]
pub enum NlCoef {
    /// The same G at every point (no absorber, or a kick the mask does not split).
    Uniform(f64),
    /// G_j per point (a complex absorbing potential, or a merged kick around a mask).
    PerPoint(Vec<f64>),
}

// Taylor coefficients (−1)^m/(2m+1)! and (−1)^m/(2m)!; on |r| ≤ π/4 the first omitted
// terms are r¹⁷/17! < 5e-17 and r¹⁸/18! < 3e-18.
const SIN_C: [f64; 8] = [
    1.0,
    -1.0 / 6.0,
    1.0 / 120.0,
    -1.0 / 5040.0,
    1.0 / 362_880.0,
    -1.0 / 39_916_800.0,
    1.0 / 6_227_020_800.0,
    -1.0 / 1_307_674_368_000.0,
];
const COS_C: [f64; 9] = [
    1.0,
    -0.5,
    1.0 / 24.0,
    -1.0 / 720.0,
    1.0 / 40_320.0,
    -1.0 / 3_628_800.0,
    1.0 / 479_001_600.0,
    -1.0 / 87_178_291_200.0,
    1.0 / 20_922_789_888_000.0,
];
/// Phases beyond this magnitude go to the standard library's sin_cos (the three-part
/// reduction below is exact for |n| < 2^20 quarter turns).
const FAST_TRIG_MAX: f64 = 1.0e6;

/// (sin θ, cos θ) for |θ| ≤ [`FAST_TRIG_MAX`], branch-free: Cody & Waite (1980) reduction
/// by π/2 in three parts, n = round(2θ/π) by the 1.5·2⁵² trick (its low mantissa bits are
/// n mod 4), Taylor polynomials on [−π/4, π/4], quadrant by bit operations. Written so
/// that a loop over it vectorises (SSE2, or AVX2 in [`sin_cos_block`]).
#[inline(always)]
fn sin_cos_reduced(theta: f64) -> (f64, f64) {
    // π/2 = P1 + P2 + P3 with P1, P2 of 33 significant bits (n·P1, n·P2 exact for |n| < 2^20).
    const P1: f64 = 1.570_796_326_734_125_6; // 0x1.921fb544p0
    const P2: f64 = 6.077_100_506_303_966e-11; // 0x1.0b4611a6p-34
    const P3: f64 = 2.022_266_248_795_950_6e-21;
    const ROUND: f64 = 6_755_399_441_055_744.0; // 1.5·2^52
    let shifted = theta * std::f64::consts::FRAC_2_PI + ROUND;
    let q = shifted.to_bits() & 3;
    let n = shifted - ROUND;
    let r = ((theta - n * P1) - n * P2) - n * P3;
    let z = r * r;
    // Horner with separate multiply and add: `mul_add` is a slow library call on targets
    // compiled without FMA (the default x86_64 target).
    let mut sp = SIN_C[7];
    for &c in SIN_C[..7].iter().rev() {
        sp = sp * z + c;
    }
    let mut cp = COS_C[8];
    for &c in COS_C[..8].iter().rev() {
        cp = cp * z + c;
    }
    let (sb, cb) = ((r * sp).to_bits(), cp.to_bits());
    // Odd quadrants swap sin and cos; sin < 0 in quadrants 2, 3; cos < 0 in 1, 2.
    let swap = 0u64.wrapping_sub(q & 1);
    let sin = (sb & !swap) | (cb & swap);
    let cos = (cb & !swap) | (sb & swap);
    (f64::from_bits(sin ^ ((q & 2) << 62)), f64::from_bits(cos ^ (((q + 1) & 2) << 62)))
}

/// (sin θ, cos θ) to a few units in the last place: the branch-free reduction for |θ| ≤ 1e6,
/// the standard library's sin_cos beyond (and for non-finite θ).
#[inline(always)]
pub fn sin_cos_fast(theta: f64) -> (f64, f64) {
    if !(theta.abs() <= FAST_TRIG_MAX) {
        return theta.sin_cos();
    }
    sin_cos_reduced(theta)
}

#[inline(always)]
fn sin_cos_block_body(th: &[f64], s: &mut [f64], c: &mut [f64]) {
    for k in 0..th.len().min(s.len()).min(c.len()) {
        (s[k], c[k]) = sin_cos_reduced(th[k]);
    }
}

/// Whether the CPU has AVX2 and FMA (the nonlinear kick then runs its AVX2 build).
fn has_avx2_fma() -> bool {
    #[cfg(target_arch = "x86_64")]
    {
        std::is_x86_feature_detected!("avx2") && std::is_x86_feature_detected!("fma")
    }
    #[cfg(not(target_arch = "x86_64"))]
    {
        false
    }
}

/// Points per block of the real-time nonlinear kick (phases, then their sines and cosines).
const NL_BLOCK: usize = 64;

/// The real-time kick ψ_j ← ψ_j t_j e^{i(d_j − g_j|ψ_j|²)} in blocks: phases, then their
/// sines and cosines (branch-free unless a block has a phase beyond ±1e6), then the product.
#[inline(always)]
fn nl_real_body<G: Fn(usize) -> f64, D: Fn(usize) -> f64>(a: &mut [Complex64], t: &[Complex64], g: &G, d: &D) {
    let mut th = [0.0; NL_BLOCK];
    let mut sn = [0.0; NL_BLOCK];
    let mut cs = [0.0; NL_BLOCK];
    let n = a.len().min(t.len());
    let mut j0 = 0;
    while j0 < n {
        let len = NL_BLOCK.min(n - j0);
        for k in 0..len {
            th[k] = d(j0 + k) - g(j0 + k) * a[j0 + k].norm_sqr();
        }
        if th[..len].iter().all(|t| t.abs() <= FAST_TRIG_MAX) {
            sin_cos_block_body(&th[..len], &mut sn[..len], &mut cs[..len]);
        } else {
            for k in 0..len {
                (sn[k], cs[k]) = th[k].sin_cos();
            }
        }
        for k in 0..len {
            a[j0 + k] *= t[j0 + k] * Complex64::new(cs[k], sn[k]);
        }
        j0 += len;
    }
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
unsafe fn nl_real_avx2<G: Fn(usize) -> f64, D: Fn(usize) -> f64>(a: &mut [Complex64], t: &[Complex64], g: &G, d: &D) {
    nl_real_body(a, t, g, d)
}

#[inline(always)]
fn nl_line<G: Fn(usize) -> f64, D: Fn(usize) -> f64>(a: &mut [Complex64], t: &[Complex64], g: G, d: D, imaginary: bool) {
    if imaginary {
        for (j, (x, y)) in a.iter_mut().zip(t).enumerate() {
            let damp = (-g(j) * x.norm_sqr()).exp();
            *x *= *y * damp;
        }
        return;
    }
    #[cfg(target_arch = "x86_64")]
    {
        if has_avx2_fma() {
            // SAFETY: the CPU supports the features the function was compiled for.
            unsafe { nl_real_avx2(a, t, &g, &d) };
            return;
        }
    }
    nl_real_body(a, t, &g, &d)
}

fn kick_nonlinear_seq(a: &mut [Complex64], t: &[Complex64], g: &[f64], g0: f64, drive: Option<(&[f64], f64)>, imaginary: bool) {
    match (g.is_empty(), drive) {
        (true, None) => nl_line(a, t, |_| g0, |_| 0.0, imaginary),
        (true, Some((v, coef))) => nl_line(a, t, |_| g0, |j| coef * v[j], imaginary),
        (false, None) => nl_line(a, t, |j| g[j], |_| 0.0, imaginary),
        (false, Some((v, coef))) => nl_line(a, t, |j| g[j], |j| coef * v[j], imaginary),
    }
}

/// The potential kick with the mean-field term, in one pass:
/// real time ψ_j ← ψ_j · t_j · e^{i(coef·v_j − G_j |ψ_j|²)}, imaginary time
/// ψ_j ← ψ_j · t_j · e^{−G_j |ψ_j|²}, where t_j is the linear kick factor (potential,
/// absorber) and (v, coef) the optional drive term f·V₁ (coef = −Σf·w·dt/ħ).
pub fn kick_nonlinear(a: &mut [Complex64], t: &[Complex64], g: &NlCoef, drive: Option<(&[f64], f64)>, imaginary: bool, par: bool) {
    let (gs, g0): (&[f64], f64) = match g {
        NlCoef::Uniform(g0) => (&[], *g0),
        NlCoef::PerPoint(v) => (v, 0.0),
    };
    if !par {
        kick_nonlinear_seq(a, t, gs, g0, drive, imaginary);
        return;
    }
    a.par_chunks_mut(PAR_CHUNK).enumerate().for_each(|(c, a)| {
        let r = c * PAR_CHUNK..c * PAR_CHUNK + a.len();
        let gs = if gs.is_empty() { gs } else { &gs[r.clone()] };
        let d = drive.map(|(v, coef)| (&v[r.clone()], coef));
        kick_nonlinear_seq(a, &t[r], gs, g0, d, imaginary);
    });
}

pub fn sum_sq(a: &[Complex64]) -> f64 {
    a.iter().map(|z| z.norm_sqr()).sum()
}

/// Seconds per pair of bare in-place FFTs (forward + inverse) of length `n`, best of
/// `reps` timed batches: the floor a split step (two FFTs plus two multiplies) is
/// compared against in the benchmark.
pub fn bare_fft_pair_seconds(n: usize, reps: usize) -> f64 {
    let n = n.max(1);
    let mut planner = FftPlanner::new();
    let fwd = planner.plan_fft_forward(n);
    let inv = planner.plan_fft_inverse(n);
    let mut buf: Vec<Complex64> = (0..n).map(|j| Complex64::new((j as f64 * 0.37).sin(), 0.0)).collect();
    let mut scratch = vec![Complex64::new(0.0, 0.0); fwd.get_inplace_scratch_len().max(inv.get_inplace_scratch_len())];
    let inner = (4_000_000 / n).clamp(1, 10_000);
    let mut best = f64::INFINITY;
    for _ in 0..reps.max(1) {
        let t = std::time::Instant::now();
        for i in 0..inner {
            fwd.process_with_scratch(&mut buf, &mut scratch);
            inv.process_with_scratch(&mut buf, &mut scratch);
            if i % 16 == 15 {
                // Each pair multiplies by n; rescale rarely so values stay finite.
                let s = (n as f64).powi(-16);
                buf.iter_mut().for_each(|z| *z *= s);
            }
        }
        best = best.min(t.elapsed().as_secs_f64() / inner as f64);
    }
    best
}

/// Seconds per pair of bare whole-state FFTs (forward + inverse) of `grid` (any
/// [`PeriodicGrid`]: the multi-dimensional transform of a product grid), best of `reps`
/// timed batches, with the scratch a propagator would use.
pub fn bare_grid_fft_pair_seconds(grid: &dyn crate::basis::PeriodicGrid, reps: usize) -> f64 {
    let n = grid.len().max(1);
    let mut buf: Vec<Complex64> = (0..n).map(|j| Complex64::new((j as f64 * 0.37).sin(), 0.0)).collect();
    let mut scratch = vec![Complex64::new(0.0, 0.0); grid.scratch_len()];
    let inner = (4_000_000 / n).clamp(1, 10_000);
    let s = 1.0 / n as f64;
    let mut best = f64::INFINITY;
    for _ in 0..reps.max(1) {
        let t = std::time::Instant::now();
        for i in 0..inner {
            grid.forward(&mut buf, &mut scratch);
            grid.inverse(&mut buf, &mut scratch);
            if i % 16 == 15 {
                // Each pair multiplies by n; rescale rarely so values stay finite.
                let s16 = s.powi(16);
                buf.iter_mut().for_each(|z| *z *= s16);
            }
        }
        best = best.min(t.elapsed().as_secs_f64() / inner as f64);
    }
    best
}

#[cfg(test)]
mod tests {
    use super::*;

    // Source: the standard library's sin_cos (correctly rounded to within an ulp or so).
    #[test]
    fn fast_sin_cos_matches_std() {
        let mut worst: f64 = 0.0;
        let mut x = -1.2e6;
        let mut i = 0u64;
        while x < 1.2e6 {
            for t in [x, x * 1e-6, x * 1e-3, std::f64::consts::FRAC_PI_4 * (i % 9) as f64] {
                let (s, c) = sin_cos_fast(t);
                let (s0, c0) = t.sin_cos();
                worst = worst.max((s - s0).abs()).max((c - c0).abs());
            }
            x += 37.123_456_789;
            i += 1;
        }
        assert!(worst < 4e-16, "worst |Δ| = {worst:e}");
        // The block form gives the same values.
        let th: Vec<f64> = (0..1000).map(|k| (k as f64 - 500.0) * 1_987.654_321).collect();
        let (mut sn, mut cs) = (vec![0.0; 1000], vec![0.0; 1000]);
        sin_cos_block_body(&th, &mut sn, &mut cs);
        for (k, &t) in th.iter().enumerate() {
            assert_eq!((sn[k], cs[k]), sin_cos_fast(t));
        }
        assert!(sin_cos_fast(f64::NAN).0.is_nan());
        assert_eq!(sin_cos_fast(3e7), 3e7f64.sin_cos());
    }

    // Source: the defining formula of the kick (module docs of `kick_nonlinear`), evaluated
    // with std's exp and sin_cos; the rayon path must give the same bits as the serial one.
    #[test]
    fn nonlinear_kick_matches_formula() {
        let n = 3 * PAR_CHUNK + 5;
        let a0: Vec<Complex64> = (0..n).map(|j| Complex64::new((j as f64 * 0.01).sin(), 0.3 * (j as f64 * 0.02).cos())).collect();
        let t: Vec<Complex64> = (0..n).map(|j| Complex64::from_polar(0.99, 0.001 * j as f64)).collect();
        let v: Vec<f64> = (0..n).map(|j| (j as f64 * 0.003).cos()).collect();
        let gp: Vec<f64> = (0..n).map(|j| 0.5 + 0.1 * (j % 7) as f64).collect();
        for (g, drive, imag) in [
            (NlCoef::Uniform(0.7), None, false),
            (NlCoef::PerPoint(gp.clone()), Some((&v[..], -0.4)), false),
            (NlCoef::Uniform(0.7), None, true),
        ] {
            let mut a = a0.clone();
            kick_nonlinear(&mut a, &t, &g, drive, imag, false);
            let mut b = a0.clone();
            kick_nonlinear(&mut b, &t, &g, drive, imag, true);
            assert_eq!(a, b);
            for j in 0..n {
                let gj = match &g {
                    NlCoef::Uniform(x) => *x,
                    NlCoef::PerPoint(p) => p[j],
                };
                let p = a0[j].norm_sqr();
                let want = if imag {
                    a0[j] * t[j] * (-gj * p).exp()
                } else {
                    let th = drive.map_or(0.0, |(v, c)| c * v[j]) - gj * p;
                    a0[j] * t[j] * Complex64::from_polar(1.0, th)
                };
                assert!((a[j] - want).norm() < 1e-15, "j={j}");
            }
        }
    }

    #[test]
    fn simd_complex_multiply_matches_scalar() {
        // The AVX2 kernel (two complex numbers per register, scalar tail) against
        // num-complex's multiplication, for even and odd lengths.
        for n in [0usize, 1, 2, 7, 1024, 1031] {
            let a0: Vec<Complex64> = (0..n).map(|j| Complex64::new((j as f64 * 0.7).sin(), (j as f64 * 1.3).cos() - 0.2)).collect();
            let b: Vec<Complex64> = (0..n).map(|j| Complex64::from_polar(1.0 + 0.1 * j as f64, j as f64 * 0.01)).collect();
            let mut a = a0.clone();
            mul_seq(&mut a, &b);
            for j in 0..n {
                let want = a0[j] * b[j];
                assert!((a[j] - want).norm() <= 4.0 * f64::EPSILON * want.norm().max(1e-300), "n={n} j={j}");
            }
        }
    }
}
