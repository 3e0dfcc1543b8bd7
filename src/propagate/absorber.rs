//! Absorbing boundaries of the split-step propagator.

use crate::basis::FourierGrid;
use crate::error::{check_positive, InputError};

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
    /// Smooth mask at both edges of the periodic box of `grid`: with s_j = min(j, n − j)·dx
    /// the distance to the box edge x = start ≡ stop, points with s_j < `width` get
    /// m_j = cos(π u/2)^{1/8}, u = (width − s_j)/width, the others 1 (m = 0 at the edge).
    /// `width` in (0, L/2].
    pub fn cos_mask(grid: &FourierGrid, width: f64) -> Result<Absorber, InputError> {
        let (n, dx) = (grid.len(), grid.dx());
        let half = 0.5 * (grid.stop() - grid.start());
        check_positive("absorber_width", width)
            .map_err(|_| InputError::range("absorber_width", format!("a length in (0, {half}] (half the box)"), width))?;
        if width > half {
            return Err(InputError::range("absorber_width", format!("a length in (0, {half}] (half the box)"), width));
        }
        let mask = (0..n)
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
            .collect();
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
}
