//! The basis of a heterostructure: periodic sinc functions in the mass coordinate
//! s = ∫ m dz (see [`crate::heterostructure`]). Unlike the other bases it carries
//! its own operators: the BenDaniel-Duke problem is the generalized symmetric-definite
//! problem A c = E B c, and coefficient vectors are B-orthonormal (∫|ψ|² dz = cᵀBc = 1).

use super::Basis;
use crate::basis::FourierGrid;
use crate::error::InputError;
use crate::heterostructure::{Heterostructure, LayeredProblem};
use crate::units::Units;
use faer::{Mat, MatRef};

/// A [`LayeredProblem`] together with the positions z(s_j) of its nodes.
#[derive(Debug)]
pub struct LayeredBasis {
    problem: LayeredProblem,
    nodes: Vec<f64>,
}

impl LayeredBasis {
    /// The layered problem of `stack` in the box and with the size of `grid`.
    pub fn new(stack: &Heterostructure, grid: &FourierGrid, units: Units) -> Result<Self, InputError> {
        let problem = LayeredProblem::new(stack, grid, units)?;
        let nodes = problem.node_positions();
        Ok(LayeredBasis { problem, nodes })
    }
    pub fn problem(&self) -> &LayeredProblem {
        &self.problem
    }
}

impl Basis for LayeredBasis {
    fn size(&self) -> usize {
        self.problem.dim()
    }
    /// Positions z(s_j) (nm) of the nodes; they crowd where the mass is large.
    fn points(&self) -> &[f64] {
        &self.nodes
    }
    fn evaluate(&self, coefs: MatRef<'_, f64>, x: &[f64]) -> Result<Mat<f64>, InputError> {
        self.problem.evaluate(coefs, x)
    }
    /// c_j ∝ ψ(z(s_j)) (exactly for odd N).
    fn sample_sign_profile(&self, coefs: MatRef<'_, f64>) -> Mat<f64> {
        coefs.to_owned()
    }
    fn describe(&self) -> String {
        let g = self.problem.grid();
        format!(
            "LayeredBasis(layers={}, field_kv_cm={}, box=[{}, {}), modes={})",
            self.problem.stack().layers().len(),
            self.problem.stack().field_kv_cm(),
            g.start(),
            g.stop(),
            self.problem.dim()
        )
    }
}
