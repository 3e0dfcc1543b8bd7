//! The Hamiltonian H = T + V of a basis, a potential, a mass and a unit system:
//! validates the input once and builds the [`DiscreteProblem`] of its basis. Energies
//! and lengths are in the chosen [`Units`].

use super::elements::ElementProblem;
use super::fourier::FourierProblem;
use super::hermite::HermiteProblem;
use super::layered::LayeredProblem;
use super::DiscreteProblem;
use crate::basis::{Basis, BasisRef, ElementBasis, FourierGrid, LayeredBasis};
use crate::error::{check_finite, check_positive, InputError, Result};
use crate::model::stack::Heterostructure;
use crate::model::units::Units;
use faer::{Mat, MatRef};
use std::sync::Arc;

/// Particle mass: one value, or a profile on the grid points (Fourier grids only).
/// In units of the unit system's mass unit (m_e in "atomic" and "semiconductor").
#[derive(Debug, Clone, PartialEq)]
pub enum Mass {
    Uniform(f64),
    Profile(Vec<f64>),
}

/// Kinetic prefactor ħ²/2m resolved from a [`Mass`] and the units.
#[derive(Debug, Clone, PartialEq)]
pub enum Kinetic {
    /// c = ħ²/2m (energy·length²).
    Uniform(f64),
    /// c_j = ħ²/2m(x_j) on the Fourier grid points.
    Profile(Vec<f64>),
}

/// Largest |V| accepted: beyond this, squares in residuals and eigensolver
/// scaling overflow f64.
pub const MAX_ABS_POTENTIAL: f64 = 1e100;

/// A single mass: finite, > 0 and within [1e-100, 1e100].
pub fn check_mass(m: f64) -> std::result::Result<(), InputError> {
    check_positive("mass", m)?;
    check_mass_range(m, None)
}

/// Masses outside [1e-100, 1e100] overflow the kinetic prefactor.
fn check_mass_range(m: f64, index: Option<usize>) -> std::result::Result<(), InputError> {
    if (1e-100..=1e100).contains(&m) {
        return Ok(());
    }
    let got = match index {
        Some(i) => format!("{m:e} at index {i}"),
        None => format!("{m:e}"),
    };
    Err(InputError::range("mass", "in [1e-100, 1e100]", got))
}

/// A real symmetric Hamiltonian on a basis (A c = E B c for a heterostructure).
#[derive(Clone)]
pub struct Hamiltonian {
    basis: BasisRef,
    potential: Vec<f64>,
    mass: Mass,
    kinetic: Kinetic,
    units: Units,
    problem: Arc<dyn DiscreteProblem>,
    /// The layered structure the potential and mass come from, if any.
    stack: Option<Arc<Heterostructure>>,
}

impl std::fmt::Debug for Hamiltonian {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "Hamiltonian({}, mass={:?}, units={:?})", self.basis.as_dyn().describe(), self.mass, self.units)
    }
}

impl Hamiltonian {
    /// `potential` is sampled on `basis.points()`; `mass` as in [`Mass`].
    pub fn new(basis: BasisRef, potential: Vec<f64>, mass: Mass, units: Units) -> Result<Self> {
        let b = basis.as_dyn();
        if potential.len() != b.points().len() {
            return Err(InputError::Length {
                argument: "potential".into(),
                expected: b.points().len(),
                got: potential.len(),
            }
            .into());
        }
        check_finite("potential", &potential)?;
        if let Some(i) = potential.iter().position(|v| v.abs() > MAX_ABS_POTENTIAL) {
            return Err(InputError::range(
                "potential",
                format!("finite with |V| <= {MAX_ABS_POTENTIAL:e} (larger values overflow the eigensolver)"),
                format!("{:e} at index {i}", potential[i]),
            )
            .into());
        }
        // On elements, one mass per element is expanded to the element's sample points.
        let mass = match (&basis, mass) {
            (BasisRef::Elements(e), Mass::Profile(ms)) if ms.len() == e.elements().len() && ms.len() != b.points().len() => {
                let per = e.order() + 1;
                Mass::Profile(ms.iter().flat_map(|&m| std::iter::repeat_n(m, per)).collect())
            }
            (_, m) => m,
        };
        let kinetic = match &mass {
            Mass::Uniform(m) => {
                check_mass(*m)?;
                Kinetic::Uniform(units.kinetic_prefactor(*m))
            }
            Mass::Profile(ms) => {
                if matches!(basis, BasisRef::Layered(_)) {
                    return Err(InputError::range("basis", "a HermiteBasis or FourierGrid (use Hamiltonian::layered for heterostructures)", "a LayeredBasis").into());
                }
                if matches!(basis, BasisRef::Hermite(_)) {
                    return Err(InputError::range(
                        "mass",
                        "a single positive number for a HermiteBasis (mass profiles need a FourierGrid or an ElementBasis)",
                        "an array",
                    )
                    .into());
                }
                let points = b.points().len();
                if ms.len() != points {
                    let expected = match &basis {
                        BasisRef::Elements(e) => format!("one value per sample point ({points}, basis.x) or per element ({})", e.elements().len()),
                        _ => format!("one value per grid point ({points})"),
                    };
                    return Err(InputError::range("mass", expected, format!("length {}", ms.len())).into());
                }
                if let Some(i) = ms.iter().position(|m| !(m.is_finite() && *m > 0.0)) {
                    return Err(InputError::range("mass", "finite and > 0 at every grid point", format!("{} at index {i}", ms[i])).into());
                }
                for (i, &m) in ms.iter().enumerate() {
                    check_mass_range(m, Some(i))?;
                }
                Kinetic::Profile(ms.iter().map(|&m| units.kinetic_prefactor(m)).collect())
            }
        };
        let problem: Arc<dyn DiscreteProblem> = match (&basis, &kinetic) {
            (BasisRef::Hermite(b), Kinetic::Uniform(c)) => {
                let m = match mass {
                    Mass::Uniform(m) => m,
                    Mass::Profile(_) => 1.0,
                };
                Arc::new(HermiteProblem::new(b.clone(), potential.clone(), *c, m, units.hbar2_over_2me()))
            }
            (BasisRef::Fourier(g), _) => {
                let masses = match &mass {
                    Mass::Uniform(m) => vec![*m],
                    Mass::Profile(ms) => ms.clone(),
                };
                Arc::new(FourierProblem::new(g.clone(), potential.clone(), kinetic.clone(), masses))
            }
            (BasisRef::Elements(e), _) => {
                let masses = match &mass {
                    Mass::Uniform(m) => vec![*m; e.points().len()],
                    Mass::Profile(ms) => ms.clone(),
                };
                Arc::new(ElementProblem::new(e.clone(), units.hbar2_over_2me(), masses, &potential)?)
            }
            _ => return Err(InputError::range("basis", "a HermiteBasis or FourierGrid (use Hamiltonian::layered for heterostructures)", b.describe()).into()),
        };
        Ok(Hamiltonian { basis, potential, mass, kinetic, units, problem, stack: None })
    }

    /// The BenDaniel-Duke Hamiltonian of a heterostructure on the box and size of `grid`
    /// (exact layer integrals, mass coordinate; see [`super::layered`]).
    /// `potential()` and `mass()` then hold the band edge and mass at the basis nodes.
    pub fn layered(stack: &Heterostructure, grid: &FourierGrid, units: Units) -> Result<Self> {
        let basis = Arc::new(LayeredBasis::new(stack, grid)?);
        let problem = LayeredProblem::new(basis.clone(), units)?;
        let nodes = basis.points().to_vec();
        let potential = stack.potential(&nodes);
        let masses = stack.mass(&nodes);
        let kinetic = Kinetic::Profile(masses.iter().map(|&m| units.kinetic_prefactor(m)).collect());
        let stack = Some(Arc::new(stack.clone()));
        Ok(Hamiltonian { basis: BasisRef::Layered(basis), potential, mass: Mass::Profile(masses), kinetic, units, problem: Arc::new(problem), stack })
    }

    /// The BenDaniel-Duke Hamiltonian of a heterostructure on an element basis: band
    /// edge (with the field) and mass sampled at the basis points, whose element ends
    /// are nudged inward, so each element sees its own layer (put a breakpoint on every
    /// interface). Requires `units` = Semiconductor.
    pub fn stack_on_elements(stack: &Heterostructure, basis: Arc<ElementBasis>, units: Units) -> Result<Self> {
        Self::stack_on_elements_at(stack, basis, units, None)
    }

    /// [`Hamiltonian::stack_on_elements`] with the layers' energy-dependent masses
    /// m(E) = m(1 + α(E − E_c)) evaluated at `energy` (meV), or the band-edge masses for `None`.
    pub fn stack_on_elements_at(stack: &Heterostructure, basis: Arc<ElementBasis>, units: Units, energy: Option<f64>) -> Result<Self> {
        if units != Units::Semiconductor {
            return Err(InputError::range("units", "\"semiconductor\" (layers are given in nm, meV, m_e and the field in kV/cm)", format!("{:?}", units.name())).into());
        }
        let points = basis.points().to_vec();
        let masses = match energy {
            Some(e) => stack.mass_at_energy(&points, e)?,
            None => stack.mass(&points),
        };
        let mut h = Hamiltonian::new(BasisRef::Elements(basis), stack.potential(&points), Mass::Profile(masses), units)?;
        h.stack = Some(Arc::new(stack.clone()));
        Ok(h)
    }

    /// A Hamiltonian of `stack`'s masses on an element basis with a given total
    /// potential (samples on the basis points, meV), e.g. band edge plus a
    /// self-consistent electrostatic term; keeps the stack for bound flags and plots.
    pub fn stack_with_potential(stack: &Heterostructure, basis: Arc<ElementBasis>, potential: Vec<f64>, units: Units) -> Result<Self> {
        let masses = stack.mass(basis.points());
        let mut h = Hamiltonian::new(BasisRef::Elements(basis), potential, Mass::Profile(masses), units)?;
        h.stack = Some(Arc::new(stack.clone()));
        Ok(h)
    }

    /// The layered structure behind the Hamiltonian, if it was built from one.
    pub fn stack(&self) -> Option<&Arc<Heterostructure>> {
        self.stack.as_ref()
    }

    /// The operators of the discretised problem.
    pub fn problem(&self) -> &dyn DiscreteProblem {
        self.problem.as_ref()
    }
    /// Whether the eigenproblem is generalized (A c = E B c, heterostructures).
    pub fn is_generalized(&self) -> bool {
        self.problem.structure().generalized
    }
    pub fn basis(&self) -> &BasisRef {
        &self.basis
    }
    pub fn potential(&self) -> &[f64] {
        &self.potential
    }
    /// The mass as given (for reconstruction and display).
    pub fn mass(&self) -> &Mass {
        &self.mass
    }
    pub fn kinetic(&self) -> &Kinetic {
        &self.kinetic
    }
    pub fn units(&self) -> Units {
        self.units
    }
    pub fn size(&self) -> usize {
        self.problem.dim()
    }
    /// An upper estimate of ‖H‖₂ (of the standard-form operator for a heterostructure).
    pub fn norm_estimate(&self) -> f64 {
        self.problem.norm_estimate()
    }
    /// Bytes a dense N×N matrix of this Hamiltonian takes.
    pub fn dense_bytes(&self) -> u64 {
        let n = self.size() as u64;
        n * n * 8
    }
    /// The dense N×N matrix (real symmetric). For a heterostructure this is the
    /// matrix A of the generalized problem A c = E B c (B: [`Hamiltonian::overlap`]).
    pub fn matrix(&self) -> Mat<f64> {
        self.problem.dense_a()
    }
    /// The overlap (mass) matrix B of a generalized problem; `None` when B = I.
    pub fn overlap(&self) -> Option<Mat<f64>> {
        self.problem.dense_b()
    }
    /// y = H x for `ncols` columns stored column-major (column j is x[j*N..(j+1)*N]).
    pub fn apply_block(&self, x: &[f64], y: &mut [f64], ncols: usize) {
        self.problem.apply_a(x, y, ncols)
    }
    /// y = B x (the identity except for heterostructures).
    pub fn apply_overlap_block(&self, x: &[f64], y: &mut [f64], ncols: usize) {
        self.problem.apply_b(x, y, ncols)
    }
    /// y = H x for one vector, checking its length and finiteness.
    pub fn apply(&self, x: &[f64]) -> Result<Vec<f64>> {
        if x.len() != self.size() {
            return Err(InputError::Length { argument: "psi".into(), expected: self.size(), got: x.len() }.into());
        }
        check_finite("psi", x)?;
        let mut y = vec![0.0; x.len()];
        self.apply_block(x, &mut y, 1);
        Ok(y)
    }
    /// ⟨i|x|j⟩ of the states in the columns of `v`.
    pub fn position_matrix(&self, v: MatRef<'_, f64>) -> Mat<f64> {
        self.problem.position_matrix(v)
    }
    /// ⟨i|m|i⟩ of the states in the columns of `v`.
    pub fn mean_masses(&self, v: MatRef<'_, f64>) -> Vec<f64> {
        self.problem.mean_masses(v)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::basis::HermiteBasis;

    fn max_abs_diff(a: &[f64], b: &[f64]) -> f64 {
        a.iter().zip(b).map(|(x, y)| (x - y).abs()).fold(0.0, f64::max)
    }

    fn check_apply_matches_matrix(h: &Hamiltonian) {
        let n = h.size();
        let m = h.matrix();
        let x: Vec<f64> = (0..3 * n).map(|i| ((i * 7919) % 101) as f64 / 50.0 - 1.0).collect();
        let mut y = vec![0.0; 3 * n];
        h.apply_block(&x, &mut y, 3);
        for j in 0..3 {
            let want: Vec<f64> = (0..n).map(|i| (0..n).map(|l| m[(i, l)] * x[j * n + l]).sum()).collect();
            assert!(max_abs_diff(&want, &y[j * n..(j + 1) * n]) < 1e-9 * (1.0 + want.iter().map(|v| v.abs()).fold(0.0, f64::max)));
        }
        // Symmetry of the dense matrix.
        for i in 0..n {
            for j in 0..n {
                assert!((m[(i, j)] - m[(j, i)]).abs() < 1e-10);
            }
        }
    }

    #[test]
    fn apply_matches_dense_matrix_fourier_uniform_and_profile() {
        for n in [32, 33] {
            let g = Arc::new(FourierGrid::new(-5.0, 5.0, n).unwrap());
            let v: Vec<f64> = g.x().iter().map(|x| 0.5 * x * x).collect();
            let h = Hamiltonian::new(BasisRef::Fourier(g.clone()), v.clone(), Mass::Uniform(2.0), Units::Natural).unwrap();
            check_apply_matches_matrix(&h);
            let ms: Vec<f64> = g.x().iter().map(|x| 1.0 + 0.5 * (x / 2.0).tanh()).collect();
            let h = Hamiltonian::new(BasisRef::Fourier(g), v, Mass::Profile(ms), Units::Natural).unwrap();
            check_apply_matches_matrix(&h);
        }
    }

    #[test]
    fn constant_profile_equals_uniform_mass() {
        let g = Arc::new(FourierGrid::new(-3.0, 4.0, 24).unwrap());
        let v: Vec<f64> = g.x().iter().map(|x| x.sin()).collect();
        let a = Hamiltonian::new(BasisRef::Fourier(g.clone()), v.clone(), Mass::Uniform(0.7), Units::Natural).unwrap();
        let b = Hamiltonian::new(BasisRef::Fourier(g), v, Mass::Profile(vec![0.7; 24]), Units::Natural).unwrap();
        let (ma, mb) = (a.matrix(), b.matrix());
        for i in 0..24 {
            for j in 0..24 {
                assert!((ma[(i, j)] - mb[(i, j)]).abs() < 1e-10);
            }
        }
    }

    #[test]
    fn parity_blocks_are_the_even_and_odd_submatrices() {
        // A potential symmetric about the basis centre (ξ ↦ −ξ); the blocks must be
        // the even/odd rows and columns of the full matrix, the couplings zero.
        for (size, quad) in [(21, 43), (20, 40)] {
            let b = Arc::new(HermiteBasis::new(size, 0.3, 1.4, Some(quad)).unwrap());
            let v: Vec<f64> = b.nodes().iter().map(|xi| xi.powi(4) - 3.0 * xi * xi).collect();
            let h = Hamiltonian::new(BasisRef::Hermite(b.clone()), v, Mass::Uniform(0.7), Units::Natural).unwrap();
            let full = h.matrix();
            let blocks = h.problem().symmetry_blocks().expect("symmetric potential").blocks;
            let (even, odd) = (&blocks[0], &blocks[1]);
            let scale = (0..size).map(|i| full[(i, i)].abs()).fold(0.0, f64::max);
            for i in 0..size {
                for j in 0..size {
                    let got = match (i % 2, j % 2) {
                        (0, 0) => even[(i / 2, j / 2)],
                        (1, 1) => odd[(i / 2, j / 2)],
                        _ => 0.0,
                    };
                    assert!((got - full[(i, j)]).abs() < 1e-12 * scale, "({i},{j}) {got} vs {}", full[(i, j)]);
                }
            }
            // An asymmetric potential has no parity blocks.
            let w: Vec<f64> = b.nodes().iter().map(|xi| xi.powi(4) + 1e-6 * xi).collect();
            let g = Hamiltonian::new(BasisRef::Hermite(b), w, Mass::Uniform(0.7), Units::Natural).unwrap();
            assert!(g.problem().symmetry_blocks().is_none());
        }
    }

    #[test]
    fn apply_matches_dense_matrix_hermite() {
        let b = Arc::new(HermiteBasis::new(20, 0.3, 1.4, None).unwrap());
        let v: Vec<f64> = b.points().iter().map(|x| x.powi(4) - x * x).collect();
        let h = Hamiltonian::new(BasisRef::Hermite(b), v, Mass::Uniform(1.0), Units::Natural).unwrap();
        check_apply_matches_matrix(&h);
    }

    #[test]
    fn rejects_bad_potential_and_mass() {
        let g = Arc::new(FourierGrid::new(0.0, 1.0, 8).unwrap());
        let r = BasisRef::Fourier(g);
        assert!(Hamiltonian::new(r.clone(), vec![0.0; 7], Mass::Uniform(1.0), Units::Natural).is_err());
        assert!(Hamiltonian::new(r.clone(), vec![f64::NAN; 8], Mass::Uniform(1.0), Units::Natural).is_err());
        assert!(Hamiltonian::new(r.clone(), vec![0.0; 8], Mass::Uniform(-1.0), Units::Natural).is_err());
        assert!(Hamiltonian::new(r, vec![0.0; 8], Mass::Profile(vec![1.0; 7]), Units::Natural).is_err());
    }
}
