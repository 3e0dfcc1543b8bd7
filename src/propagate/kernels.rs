//! Pointwise complex multiplies of the split-step loop (AVX2/FMA where the CPU has
//! it, rayon over chunks when asked) and the bare-FFT floor of the benchmark.

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

#[cfg(test)]
mod tests {
    use super::*;

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
