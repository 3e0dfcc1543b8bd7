//! Linear algebra that sees only matrices and operators: no basis, Hamiltonian,
//! units or physics. Everything above (problems, spectra, propagators) calls in here.
//!
//! * [`banded`]: symmetric band matrices and the lowest pairs of a banded pencil with
//!   diagonal B (band → tridiagonal by Givens rotations, Sturm bisection, back-transformation).
//! * [`dense`]: all eigenpairs of a dense symmetric matrix (faer, with a backward-error
//!   probe and a QR fallback), the lowest pairs of a matrix or of independent blocks.
//! * [`lanczos`]: the lowest pairs of a banded pencil by certified shift-invert Lanczos,
//!   given a lower bound of the spectrum.
//! * [`subset`]: the lowest pairs only (tridiagonalisation, Sturm multisection,
//!   inverse iteration, verification).
//! * [`generalized`]: A x = λ B x with B symmetric positive definite, by Cholesky reduction.
//! * [`hermitian`]: all eigenpairs of a dense complex Hermitian matrix (QR path).
//! * [`lobpcg`]: the matrix-free block eigensolver and its operator/preconditioner traits.
//! * [`rng`]: the one pseudo-random generator.

pub mod banded;
pub mod dense;
pub mod generalized;
pub mod lanczos;
pub mod hermitian;
pub mod lobpcg;
pub mod rng;
pub mod subset;

use faer::Mat;

/// Parallelism for a dense kernel of about `flops` floating-point operations:
/// sequential below 2·10⁷ (measured: rayon's fork/join then costs 50–100 µs, more
/// than a 200×210×20 product takes), faer's global setting above.
pub fn par_for(flops: usize) -> faer::Par {
    if flops < 20_000_000 {
        faer::Par::Seq
    } else {
        faer::get_global_parallelism()
    }
}

/// Replace a square matrix by (A + Aᵀ)/2: removes the rounding asymmetry of a
/// product that is symmetric in exact arithmetic (e.g. Φ·diag(V)·Φᵀ).
pub fn symmetrize(m: &mut Mat<f64>) {
    for i in 0..m.nrows() {
        for j in 0..i {
            let a = 0.5 * (m[(i, j)] + m[(j, i)]);
            m[(i, j)] = a;
            m[(j, i)] = a;
        }
    }
}

/// The columns of `m` laid end to end (the column-major block layout of the
/// matrix-free operators and of warm starts).
pub fn column_major(m: &Mat<f64>) -> Vec<f64> {
    (0..m.ncols()).flat_map(|j| (0..m.nrows()).map(move |i| m[(i, j)])).collect()
}

/// A column-major block (`nrows` per column) as a matrix.
pub fn from_column_major(data: &[f64], nrows: usize, ncols: usize) -> Mat<f64> {
    Mat::from_fn(nrows, ncols, |i, j| data[j * nrows + i])
}

/// CPU time of the calling thread in seconds (Linux CLOCK_THREAD_CPUTIME_ID), for the
/// ignored timing tests: serial timings on a shared machine are not inflated by other
/// processes. `None` where the clock is not available.
#[cfg(all(test, target_os = "linux"))]
pub(crate) fn thread_time() -> Option<f64> {
    #[repr(C)]
    struct Timespec {
        sec: i64,
        nsec: i64,
    }
    extern "C" {
        fn clock_gettime(clk: i32, tp: *mut Timespec) -> i32;
    }
    let mut ts = Timespec { sec: 0, nsec: 0 };
    // SAFETY: plain libc call writing into a properly laid out timespec (64-bit Linux).
    let rc = unsafe { clock_gettime(3, &mut ts) };
    (rc == 0 && cfg!(target_pointer_width = "64")).then_some(ts.sec as f64 + ts.nsec as f64 * 1e-9)
}
/// See the Linux version.
#[cfg(all(test, not(target_os = "linux")))]
pub(crate) fn thread_time() -> Option<f64> {
    None
}
