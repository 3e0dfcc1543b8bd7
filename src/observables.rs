//! Observables of a [`Spectrum`]: position (dipole) matrix and oscillator strengths.

use crate::basis::{BasisRef, HermiteBasis};
use crate::eigen::Spectrum;
use crate::error::{InputError, Result};
use crate::hamiltonian::Kinetic;
use faer::Mat;

/// ⟨i|x|j⟩ between the states of the spectrum (length units), count × count.
///
/// Hermite basis: exact through x = center + L·ξ̂ with ⟨n+1|ξ̂|n⟩ = sqrt((n+1)/2).
/// Fourier grid: Σ_j c_j x_j c'_j, the position on the box [start, stop) — meaningful
/// for states localised away from the box edges.
pub fn dipole_matrix(s: &Spectrum) -> Mat<f64> {
    let v = &s.vectors;
    let n = v.nrows();
    let xv: Mat<f64> = match &s.basis {
        BasisRef::Fourier(g) => Mat::from_fn(n, v.ncols(), |i, j| g.x()[i] * v[(i, j)]),
        BasisRef::Hermite(b) => hermite_x_times(b, v),
    };
    v.transpose() * xv
}

fn hermite_x_times(b: &HermiteBasis, v: &Mat<f64>) -> Mat<f64> {
    let n = v.nrows();
    let (c, l) = (b.center(), b.length());
    Mat::from_fn(n, v.ncols(), |i, j| {
        let mut s = c * v[(i, j)];
        if i >= 1 {
            s += l * (i as f64 / 2.0).sqrt() * v[(i - 1, j)];
        }
        if i + 1 < n {
            s += l * ((i + 1) as f64 / 2.0).sqrt() * v[(i + 1, j)];
        }
        s
    })
}

/// Oscillator strengths f_ij = (2m/ħ²)(E_j − E_i)|⟨i|x|j⟩|² (dimensionless, effective-mass
/// form; Thomas-Reiche-Kuhn: Σ_j f_ij = 1 over a complete set). Needs a uniform mass.
pub fn oscillator_strengths(s: &Spectrum) -> Result<Mat<f64>> {
    let c = match &s.kinetic {
        Kinetic::Uniform(c) => *c,
        Kinetic::Profile(_) => {
            return Err(InputError::range(
                "mass",
                "uniform for oscillator_strengths() (position-dependent mass needs the mass-weighted form)",
                "a mass profile",
            )
            .into())
        }
    };
    let d = dipole_matrix(s);
    let k = s.count();
    Ok(Mat::from_fn(k, k, |i, j| (s.energies[j] - s.energies[i]) * d[(i, j)] * d[(i, j)] / c))
}
