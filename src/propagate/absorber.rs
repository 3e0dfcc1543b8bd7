//! Absorbing boundaries of the split-step propagator.

use crate::basis::{FourierGrid, PeriodicGrid};
use crate::error::{check_positive, InputError};

/// The 1D mask of [`Absorber::cos_mask`] on one axis.
fn axis_mask(grid: &FourierGrid, width: f64) -> Vec<f64> {
    let (n, dx) = (grid.len(), grid.dx());
    (0..n)
        .map(|j| {
            let s = j.min(n - j) as f64 * dx;
            if s >= width {
                1.0
            } else {
                let u = (width - s) / width;
                if u >= 1.0 {
                    0.0
                } else {
                    (0.5 * std::f64::consts::PI * u).cos().max(0.0).powf(0.125)
                }
            }
        })
        .collect()
}

/// Absorbing boundary.
#[derive(Debug, Clone, PartialEq)]
pub enum Absorber {
    /// Mask m_j in [0, 1] multiplied into the state once per step (the absorption
    /// per unit time therefore depends on dt).
    Mask(Vec<f64>),
    /// Complex absorbing potential: V → V − iW with W_j ≥ 0 (energy). Independent of
    /// dt; needs dt > 0.
    Cap(Vec<f64>),
}

impl Absorber {
    /// Smooth mask at every face of the periodic box of `grid`. On each axis, with
    /// s_j = min(j, n − j)·dx the distance to the box edge x = start ≡ stop, points with
    /// s_j < `width` get m_j = cos(π u/2)^{1/8}, u = (width − s_j)/width, the others 1
    /// (m = 0 at the edge); in 2D/3D the mask is the product of the axis masks.
    /// `width` in (0, L/2] for the shortest box side L.
    pub fn cos_mask(grid: &dyn PeriodicGrid, width: f64) -> Result<Absorber, InputError> {
        let half = (0..grid.ndim())
            .map(|a| 0.5 * (grid.axis(a).stop() - grid.axis(a).start()))
            .fold(f64::INFINITY, f64::min);
        let what = if grid.ndim() == 1 { "half the box" } else { "half the shortest side of the box" };
        let range = || InputError::range("absorber_width", format!("a length in (0, {half}] ({what})"), width);
        check_positive("absorber_width", width).map_err(|_| range())?;
        if width > half {
            return Err(range());
        }
        let axis_masks: Vec<Vec<f64>> = (0..grid.ndim()).map(|a| axis_mask(grid.axis(a), width)).collect();
        let shape = grid.shape();
        let mut mask = vec![1.0; grid.len()];
        let mut stride = grid.len();
        for (a, &n) in shape.iter().enumerate() {
            stride /= n;
            for (idx, m) in mask.iter_mut().enumerate() {
                *m *= axis_masks[a][(idx / stride) % n];
            }
        }
        Ok(Absorber::Mask(mask))
    }

    /// A complex absorbing potential W ≥ 0 on the grid points.
    pub fn cap(w: Vec<f64>, n: usize) -> Result<Absorber, InputError> {
        if w.len() != n {
            return Err(InputError::Length { argument: "absorber_potential".into(), expected: n, got: w.len() });
        }
        if let Some(i) = w.iter().position(|v| !(v.is_finite() && *v >= 0.0)) {
            return Err(InputError::range(
                "absorber_potential",
                "a complex absorbing potential W >= 0 everywhere (finite; W in V − iW)",
                format!("{} at index {i}", w[i]),
            ));
        }
        Ok(Absorber::Cap(w))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn mask_is_one_inside_and_zero_at_the_edge() {
        let g = FourierGrid::new(-10.0, 10.0, 200).unwrap();
        let Absorber::Mask(m) = Absorber::cos_mask(&g, 3.0).unwrap() else { panic!("mask") };
        assert_eq!(m[0], 0.0);
        assert_eq!(m[100], 1.0);
        assert!(m.iter().all(|v| (0.0..=1.0).contains(v)));
        assert!(Absorber::cos_mask(&g, 11.0).is_err());
        assert!(Absorber::cos_mask(&g, -1.0).is_err());
        assert!(Absorber::cap(vec![-1.0; 200], 200).is_err());
    }

    // Source: the definition (product of the axis masks); the limit is the shortest side.
    #[test]
    fn product_mask_is_the_product_of_axis_masks() {
        use std::sync::Arc;
        let gx = Arc::new(FourierGrid::new(-10.0, 10.0, 40).unwrap());
        let gy = Arc::new(FourierGrid::new(-4.0, 4.0, 16).unwrap());
        let g = crate::basis::ProductGrid::new(vec![gx.clone(), gy.clone()]).unwrap();
        let Absorber::Mask(m) = Absorber::cos_mask(&g, 2.0).unwrap() else { panic!("mask") };
        let (mx, my) = (axis_mask(&gx, 2.0), axis_mask(&gy, 2.0));
        for i in 0..40 {
            for j in 0..16 {
                assert_eq!(m[i * 16 + j], mx[i] * my[j]);
            }
        }
        let e = Absorber::cos_mask(&g, 4.5).unwrap_err();
        assert!(e.to_string().contains("shortest side"), "{e}");
    }
}
