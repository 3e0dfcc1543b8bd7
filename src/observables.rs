//! Observables of a [`Spectrum`]: position (dipole) matrix, oscillator strengths and
//! overlaps between two spectra (Franck-Condon factors).

use crate::eigen::Spectrum;
use crate::error::{InputError, Result};
use faer::Mat;

/// Overlaps S_ij = ⟨ψ_i^a|ψ_j^b⟩ (count_a × count_b) of the states of two spectra;
/// |S_ij|² are Franck-Condon factors when a and b are two electronic states' levels.
///
/// Same basis (same kind, size and points): exact, a_iᵀ B b_j with the discretisation's
/// overlap matrix B (I for orthonormal bases); refused when the two inner products
/// differ (a layered Fourier problem's mass coordinate depends on its layers).
/// Different bases: composite Gauss-Lobatto-Legendre quadrature ([`quadrature_rule`])
/// of ψ_i^a(x) ψ_j^b(x) over the x range both bases cover — converged to
/// round-off for smooth states, about 1e-7 for states with kinks (layer interfaces)
/// that fall inside a panel.
pub fn overlaps(a: &Spectrum, b: &Spectrum) -> Result<Mat<f64>> {
    let (ha, hb) = (&a.hamiltonian, &b.hamiltonian);
    let (pa, pb) = (ha.problem(), hb.problem());
    let same_kind = std::mem::discriminant(ha.basis()) == std::mem::discriminant(hb.basis());
    if !same_kind || pa.dim() != pb.dim() || ha.basis().as_dyn().points() != hb.basis().as_dyn().points() {
        return quadrature_overlaps(a, b);
    }
    let n = pa.dim();
    let kb = b.count();
    let x = crate::linalg::column_major(&b.vectors);
    let mut bx = vec![0.0; n * kb];
    pa.apply_b(&x, &mut bx, kb);
    if pa.structure().generalized || pb.structure().generalized {
        let mut bx2 = vec![0.0; n * kb];
        pb.apply_b(&x, &mut bx2, kb);
        let scale = bx.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
        if bx.iter().zip(&bx2).any(|(p, q)| (p - q).abs() > 1e-12 * scale) {
            return quadrature_overlaps(a, b);
        }
    }
    Ok(Mat::from_fn(a.count(), kb, |i, j| (0..n).map(|r| a.vectors[(r, i)] * bx[j * n + r]).sum()))
}

/// [`overlaps`] of spectra on different bases, by quadrature in x.
fn quadrature_overlaps(a: &Spectrum, b: &Spectrum) -> Result<Mat<f64>> {
    let ((la, ua), (lb, ub)) = (x_range(a), x_range(b));
    let (lo, hi) = (la.max(lb), ua.min(ub));
    if !(hi > lo) {
        return Err(InputError::range("other", "a Spectrum whose basis covers part of this one's x range", format!("[{lb}, {ub}] against [{la}, {ua}]")).into());
    }
    let (xs, ws) = quadrature_rule(lo, hi)?;
    let (fa, fb) = (a.wavefunctions(&xs)?, b.wavefunctions(&xs)?);
    Ok(Mat::from_fn(a.count(), b.count(), |i, j| (0..xs.len()).map(|k| ws[k] * fa[(k, i)] * fb[(k, j)]).sum()))
}

/// The x range (min, max) of a spectrum's basis points.
pub fn x_range(s: &Spectrum) -> (f64, f64) {
    s.basis().as_dyn().points().iter().fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), &x| (l.min(x), h.max(x)))
}

/// Composite Gauss-Lobatto-Legendre rule (order 12, 512 equal panels) on [lo, hi]:
/// nodes and weights.
pub fn quadrature_rule(lo: f64, hi: f64) -> Result<(Vec<f64>, Vec<f64>)> {
    const PANELS: usize = 512;
    let rule = crate::basis::gll::Gll::new(12)?;
    let h = (hi - lo) / PANELS as f64;
    let mut xs = Vec::with_capacity(PANELS * rule.nodes().len());
    let mut ws = Vec::with_capacity(xs.capacity());
    for p in 0..PANELS {
        let mid = lo + (p as f64 + 0.5) * h;
        for (t, w) in rule.nodes().iter().zip(rule.weights()) {
            xs.push(mid + 0.5 * h * t);
            ws.push(0.5 * h * w);
        }
    }
    Ok((xs, ws))
}

/// The quadrature rule of [`matrix_elements`] for this spectrum: over its basis's x range.
pub fn matrix_element_rule(s: &Spectrum) -> Result<(Vec<f64>, Vec<f64>)> {
    let (lo, hi) = x_range(s);
    quadrature_rule(lo, hi)
}

/// ⟨i|g(x)|j⟩ (count × count) with g sampled at the nodes `xs` of
/// [`matrix_element_rule`] (weights `ws`): the same quadrature for every basis,
/// converged to round-off for smooth states and g, about 1e-7 relative where ψ or g
/// has a kink inside a panel (layer interfaces).
pub fn matrix_elements(s: &Spectrum, xs: &[f64], ws: &[f64], g: &[f64]) -> Result<Mat<f64>> {
    crate::error::check_finite("g", g)?;
    let f = s.wavefunctions(xs)?;
    Ok(Mat::from_fn(s.count(), s.count(), |i, j| (0..xs.len()).map(|k| ws[k] * g[k] * f[(k, i)] * f[(k, j)]).sum()))
}

/// ⟨i|x|j⟩ between the states of the spectrum (length units), count × count.
///
/// Hermite basis: exact through x = center + L·ξ̂ with ⟨n+1|ξ̂|n⟩ = sqrt((n+1)/2).
/// Fourier grid: Σ_j c_j x_j c'_j, the position on the box [start, stop) — meaningful
/// for states localised away from the box edges.
/// Heterostructure: ∫ψ_i z ψ_j dz from exact layer integrals in the mass coordinate.
pub fn dipole_matrix(s: &Spectrum) -> Result<Mat<f64>> {
    Ok(s.hamiltonian.position_matrix(s.vectors.as_ref()))
}

/// ⟨i|m(x)|i⟩ for every state (mass units): the mass a state "sees".
/// Fourier grid: Σ_j c_j² m(x_j); heterostructure: ∫|ψ|² m dz = ∫|ψ|² ds = Σ_j c_j².
pub fn mean_masses(s: &Spectrum) -> Vec<f64> {
    s.hamiltonian.mean_masses(s.vectors.as_ref())
}

/// Oscillator strengths f_ij = (2m_i/ħ²)(E_j − E_i)|⟨i|x|j⟩|² (dimensionless,
/// effective-mass form; Thomas-Reiche-Kuhn: Σ_j f_ij = 1 over a complete set for a
/// uniform mass). With a position-dependent mass, m_i = ⟨i|m|i⟩ ([`mean_masses`]),
/// a common effective-mass approximation: the sum rule then holds only approximately.
pub fn oscillator_strengths(s: &Spectrum) -> Result<Mat<f64>> {
    let d = dipole_matrix(s)?;
    let masses = mean_masses(s);
    let k = s.count();
    let h2m = s.units().hbar2_over_2me();
    Ok(Mat::from_fn(k, k, |i, j| (s.energies[j] - s.energies[i]) * d[(i, j)] * d[(i, j)] * masses[i] / h2m))
}

/// Line shape of a broadened transition. Parsed from a string at the Python edge.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LineShape {
    /// (γ/π) / (ΔE² + γ²), γ = half width at half maximum.
    Lorentzian,
    /// exp(−ΔE²/2σ²) / (σ√(2π)), σ = standard deviation.
    Gaussian,
}

impl LineShape {
    /// Option strings and their line shapes.
    pub const TABLE: [(&'static str, LineShape); 2] = [("lorentzian", LineShape::Lorentzian), ("gaussian", LineShape::Gaussian)];

    pub fn parse(s: &str) -> std::result::Result<Self, crate::error::InputError> {
        crate::error::parse_choice("shape", s, &Self::TABLE)
    }

    fn value(self, de: f64, width: f64) -> f64 {
        match self {
            LineShape::Lorentzian => width / std::f64::consts::PI / (de * de + width * width),
            LineShape::Gaussian => (-0.5 * (de / width).powi(2)).exp() / (width * (2.0 * std::f64::consts::PI).sqrt()),
        }
    }
}

/// Absorption spectrum from state `initial`: A(E) = Σ_{f>initial} f_{if} · L(E − (E_f − E_i)),
/// with L a unit-area line of width `broadening` (energy units). Dimensionless
/// oscillator strength per unit energy; multiply by the material prefactor
/// (π e²ħ/(2 ε₀ n c m*) × sheet density / period) for an absorption coefficient.
pub fn absorption(s: &Spectrum, energies: &[f64], broadening: f64, shape: LineShape, initial: usize) -> Result<Vec<f64>> {
    crate::error::check_positive("broadening", broadening)?;
    crate::error::check_finite("energies", energies)?;
    if initial >= s.count() {
        return Err(crate::error::InputError::range("initial", format!("a state index in [0, {}]", s.count() - 1), initial).into());
    }
    let f = oscillator_strengths(s)?;
    let lines: Vec<(f64, f64)> = (initial + 1..s.count()).map(|j| (s.energies[j] - s.energies[initial], f[(initial, j)])).collect();
    Ok(energies.iter().map(|&e| lines.iter().map(|&(de, fij)| fij * shape.value(e - de, broadening)).sum()).collect())
}

/// ⟨i|g(x)|i⟩ for every state, with g sampled on a uniform grid `xs` (ascending,
/// covering the states): trapezoid rule on |ψ_i(x)|² g(x). Accuracy is that of the
/// trapezoid rule on `xs` (spectrally accurate for smooth, decayed states).
pub fn expectation(s: &Spectrum, xs: &[f64], g: &[f64]) -> Result<Vec<f64>> {
    let psi = s.wavefunctions(xs)?;
    let n = xs.len();
    Ok((0..s.count())
        .map(|j| {
            (0..n.saturating_sub(1))
                .map(|i| {
                    let h = xs[i + 1] - xs[i];
                    0.5 * h * (psi[(i, j)].powi(2) * g[i] + psi[(i + 1, j)].powi(2) * g[i + 1])
                })
                .sum()
        })
        .collect())
}
