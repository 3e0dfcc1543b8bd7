//! Observables of a [`Spectrum`]: position (dipole) matrix and oscillator strengths.

use crate::basis::{BasisRef, HermiteBasis};
use crate::eigen::Spectrum;
use crate::error::Result;
use crate::hamiltonian::Mass;
use faer::Mat;

/// ⟨i|x|j⟩ between the states of the spectrum (length units), count × count.
///
/// Hermite basis: exact through x = center + L·ξ̂ with ⟨n+1|ξ̂|n⟩ = sqrt((n+1)/2).
/// Fourier grid: Σ_j c_j x_j c'_j, the position on the box [start, stop) — meaningful
/// for states localised away from the box edges.
/// Heterostructure: ∫ψ_i z ψ_j dz from exact layer integrals in the mass coordinate.
pub fn dipole_matrix(s: &Spectrum) -> Result<Mat<f64>> {
    let v = &s.vectors;
    let n = v.nrows();
    let xv: Mat<f64> = match &s.basis {
        BasisRef::Fourier(g) => Mat::from_fn(n, v.ncols(), |i, j| g.x()[i] * v[(i, j)]),
        BasisRef::Hermite(b) => hermite_x_times(b, v),
        BasisRef::Layered(l) => return Ok(l.problem().position_matrix(v.as_ref())?),
    };
    Ok(v.transpose() * xv)
}

/// ⟨i|m(x)|i⟩ for every state (mass units): the mass a state "sees".
/// Fourier grid: Σ_j c_j² m(x_j); heterostructure: ∫|ψ|² m dz = ∫|ψ|² ds = Σ_j c_j².
pub fn mean_masses(s: &Spectrum) -> Vec<f64> {
    let v = &s.vectors;
    let n = v.nrows();
    (0..v.ncols())
        .map(|j| match (&s.basis, &s.mass) {
            (_, Mass::Uniform(m)) => *m,
            (BasisRef::Layered(_), _) => (0..n).map(|i| v[(i, j)] * v[(i, j)]).sum(),
            (_, Mass::Profile(ms)) => (0..n).map(|i| v[(i, j)] * v[(i, j)] * ms[i]).sum(),
        })
        .collect()
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

/// Oscillator strengths f_ij = (2m_i/ħ²)(E_j − E_i)|⟨i|x|j⟩|² (dimensionless,
/// effective-mass form; Thomas-Reiche-Kuhn: Σ_j f_ij = 1 over a complete set for a
/// uniform mass). With a position-dependent mass, m_i = ⟨i|m|i⟩ ([`mean_masses`]),
/// a common effective-mass approximation: the sum rule then holds only approximately.
pub fn oscillator_strengths(s: &Spectrum) -> Result<Mat<f64>> {
    let d = dipole_matrix(s)?;
    let masses = mean_masses(s);
    let k = s.count();
    let h2m = s.units.hbar2_over_2me();
    Ok(Mat::from_fn(k, k, |i, j| (s.energies[j] - s.energies[i]) * d[(i, j)] * d[(i, j)] * masses[i] / h2m))
}
