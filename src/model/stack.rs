//! Layered heterostructures (the model): layers → band-edge and mass profiles,
//! pieces of constant mass in the mass coordinate, and the exact Fourier
//! coefficients of piecewise-linear functions on them. No discretisation here.
//!
//! A [`Heterostructure`] is a stack of [`Layer`]s occupying z ∈ [0, L), L = Σ thickness
//! (nm). Outside the stack the first layer (z < 0) and the last layer (z ≥ L) continue
//! as flat semi-infinite claddings. At an interface z_i the layer on the right applies
//! (profiles are right-continuous).
//!
//! **Field convention.** `field_kv_cm` = F is the electric field along +z in kV/cm.
//! An electron (charge −e) in it has potential energy +e·F·z, and 1 kV/cm gives
//! 0.1 meV/nm ([`MEV_PER_NM_PER_KV_CM`]). The field is *confined to the structure*:
//! V_field(z) = 0.1·F·(clamp(z, 0, L) − L/2), i.e. linear inside the stack, zero at
//! the stack centre and constant (continuous) in the claddings. So F > 0 raises the
//! right-hand side and the claddings stay flat.
//!
//! Units: lengths nm, energies meV, masses m_e.

use crate::error::InputError;
use num_complex::Complex64;
use std::f64::consts::PI;

/// Electron potential energy gradient of a 1 kV/cm field, in meV/nm.
pub const MEV_PER_NM_PER_KV_CM: f64 = 0.1;

/// One layer: thickness (nm, > 0), conduction band edge (meV), effective mass (m_e, > 0),
/// and optionally
/// * `doping`: net ionized dopant density in cm⁻³ (donors > 0, acceptors < 0), used by
///   the Schrödinger-Poisson solver;
/// * `permittivity`: static relative permittivity ε_r (> 0), needed where charge is;
/// * `nonparabolicity`: α in 1/eV (trade convention) of the energy-dependent mass
///   m(E) = m (1 + α (E − E_c)) (two-band Kane form, Nelson, Miller & Kleinman 1987).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Layer {
    pub thickness: f64,
    pub band_edge: f64,
    pub mass: f64,
    pub doping: f64,
    pub permittivity: Option<f64>,
    pub nonparabolicity: f64,
}

impl Layer {
    /// A layer with no doping, no permittivity and a parabolic band; validated when it
    /// enters a [`Heterostructure`].
    pub fn new(thickness: f64, band_edge: f64, mass: f64) -> Self {
        Layer { thickness, band_edge, mass, doping: 0.0, permittivity: None, nonparabolicity: 0.0 }
    }

    /// A layer of `material`: band edge = its Γ conduction-band edge minus that of
    /// `reference` (or on the compilation's absolute scale without one), its mass and
    /// permittivity, and the non-parabolicity α of `model` (None: a parabolic band).
    pub fn from_material(
        material: &crate::model::materials::Material,
        thickness: f64,
        reference: Option<&crate::model::materials::Material>,
        model: Option<crate::model::materials::Nonparabolicity>,
    ) -> Self {
        Layer {
            thickness,
            band_edge: material.conduction_band - reference.map_or(0.0, |r| r.conduction_band),
            mass: material.mass,
            doping: 0.0,
            permittivity: Some(material.permittivity),
            nonparabolicity: model.map_or(0.0, |m| material.nonparabolicity(m)),
        }
    }
}

/// A validated stack of layers on [0, L) with an optional field confined to it.
#[derive(Debug, Clone, PartialEq)]
pub struct Heterostructure {
    layers: Vec<Layer>,
    field_kv_cm: f64,
    /// Interface positions z_0 = 0 < z_1 < … < z_n = L.
    bounds: Vec<f64>,
}

impl Heterostructure {
    /// Requires ≥ 1 layer, every thickness and mass finite and > 0, every band edge
    /// finite, a finite total thickness and a finite field.
    pub fn new(layers: Vec<Layer>, field_kv_cm: f64) -> std::result::Result<Self, InputError> {
        if layers.is_empty() {
            return Err(InputError::range("layers", "a list of at least one layer", "an empty list"));
        }
        for (i, l) in layers.iter().enumerate() {
            if !(l.thickness.is_finite() && l.thickness > 0.0) {
                return Err(InputError::range(&format!("layers[{i}].thickness"), "a finite number of nm > 0", l.thickness));
            }
            if !l.band_edge.is_finite() {
                return Err(InputError::range(&format!("layers[{i}].band_edge"), "a finite number of meV", l.band_edge));
            }
            if !(l.mass.is_finite() && l.mass > 0.0) {
                return Err(InputError::range(&format!("layers[{i}].mass"), "a finite number of m_e > 0", l.mass));
            }
            if !(l.doping.is_finite() && l.doping.abs() <= 1e23) {
                return Err(InputError::range(&format!("layers[{i}].doping"), "a finite density in cm^-3 with |doping| <= 1e23", l.doping));
            }
            if let Some(e) = l.permittivity {
                if !(e.is_finite() && e > 0.0) {
                    return Err(InputError::range(&format!("layers[{i}].permittivity"), "a finite relative permittivity > 0 (or None)", e));
                }
            }
            if !(l.nonparabolicity.is_finite() && l.nonparabolicity >= 0.0 && l.nonparabolicity <= 100.0) {
                return Err(InputError::range(&format!("layers[{i}].nonparabolicity"), "a finite α in [0, 100] 1/eV", l.nonparabolicity));
            }
        }
        if !field_kv_cm.is_finite() {
            return Err(InputError::range("field_kv_cm", "a finite number of kV/cm", field_kv_cm));
        }
        let mut bounds = Vec::with_capacity(layers.len() + 1);
        let mut z = 0.0;
        bounds.push(z);
        for l in &layers {
            z += l.thickness;
            bounds.push(z);
        }
        if !z.is_finite() {
            return Err(InputError::range("layers", "layers whose total thickness is a finite number of nm", z));
        }
        Ok(Heterostructure { layers, field_kv_cm, bounds })
    }

    pub fn layers(&self) -> &[Layer] {
        &self.layers
    }
    /// Field F along +z in kV/cm (see the module docs for the sign convention).
    pub fn field_kv_cm(&self) -> f64 {
        self.field_kv_cm
    }
    /// L = Σ thickness (nm).
    pub fn total_thickness(&self) -> f64 {
        self.bounds[self.bounds.len() - 1]
    }
    /// Stack centre z_c = L/2, where the field term vanishes.
    pub fn center(&self) -> f64 {
        0.5 * self.total_thickness()
    }
    /// Interface positions 0 = z_0 < … < z_n = L.
    pub fn interfaces(&self) -> &[f64] {
        &self.bounds
    }

    /// Band edges of the two claddings (meV): the first layer's edge plus the field
    /// term at z = 0 and the last layer's at z = L. A state below both is bound.
    pub fn cladding_edges(&self) -> (f64, f64) {
        let n = self.layers.len();
        (self.layers[0].band_edge + self.field_energy(0.0), self.layers[n - 1].band_edge + self.field_energy(self.total_thickness()))
    }

    /// A copy with another field (kV/cm).
    pub fn with_field(&self, field_kv_cm: f64) -> Result<Self, InputError> {
        Heterostructure::new(self.layers.clone(), field_kv_cm)
    }

    /// Index of the layer whose material is found at z (padding included, right-continuous).
    pub fn layer_index(&self, z: f64) -> usize {
        let n = self.layers.len();
        // Number of interior interfaces z_1..z_{n-1} that are <= z.
        self.bounds[1..n].partition_point(|&b| b <= z)
    }

    /// Field energy 0.1·F·(clamp(z, 0, L) − L/2), meV.
    pub fn field_energy(&self, z: f64) -> f64 {
        let zc = z.clamp(0.0, self.total_thickness());
        MEV_PER_NM_PER_KV_CM * self.field_kv_cm * (zc - self.center())
    }

    /// V(z) = band edge + field energy at one point (meV); NaN for NaN input.
    pub fn potential_at(&self, z: f64) -> f64 {
        if z.is_nan() {
            return f64::NAN;
        }
        self.layers[self.layer_index(z)].band_edge + self.field_energy(z)
    }

    /// m(z) in m_e at one point; NaN for NaN input.
    pub fn mass_at(&self, z: f64) -> f64 {
        if z.is_nan() {
            return f64::NAN;
        }
        self.layers[self.layer_index(z)].mass
    }

    /// Exact (min, max) of V(z) over all z (meV): V is linear inside each layer, so the
    /// extremes lie at layer ends (claddings constant beyond the stack).
    pub fn potential_range(&self) -> (f64, f64) {
        self.layers.iter().enumerate().flat_map(|(i, l)| [l.band_edge + self.field_energy(self.bounds[i]), l.band_edge + self.field_energy(self.bounds[i + 1])]).fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| (a.min(v), b.max(v)))
    }

    /// V(z) (meV) on the points z (nm), for plotting and collocation.
    pub fn potential(&self, z: &[f64]) -> Vec<f64> {
        z.iter().map(|&z| self.potential_at(z)).collect()
    }

    /// m(z) (m_e) on the points z (nm).
    pub fn mass(&self, z: &[f64]) -> Vec<f64> {
        z.iter().map(|&z| self.mass_at(z)).collect()
    }

    /// Whether any layer has a non-parabolicity α ≠ 0.
    pub fn is_nonparabolic(&self) -> bool {
        self.layers.iter().any(|l| l.nonparabolicity != 0.0)
    }

    /// The energy-dependent mass m(z; E) = m(1 + α (E − V(z))) (α in 1/eV, E and V in
    /// meV; Nelson, Miller & Kleinman 1987, two-band Kane form) on the points z, with V the
    /// band edge including the field. Errors when it is not positive (α too large for E).
    pub fn mass_at_energy(&self, z: &[f64], energy: f64) -> Result<Vec<f64>, InputError> {
        z.iter()
            .map(|&zi| {
                let i = self.layer_index(zi);
                let l = &self.layers[i];
                let m = l.mass * (1.0 + 1e-3 * l.nonparabolicity * (energy - self.potential_at(zi)));
                if m.is_finite() && m > 0.0 {
                    Ok(m)
                } else {
                    Err(InputError::range(
                        &format!("layers[{i}].nonparabolicity"),
                        format!("small enough that m(E) = m(1 + α(E − E_c)) > 0 at E = {energy} meV"),
                        l.nonparabolicity,
                    ))
                }
            })
            .collect()
    }
}

/// A piece of the box on which m is constant and V linear in z.
#[derive(Debug, Clone, Copy)]
pub struct Piece {
    /// Ends in z (nm).
    pub z0: f64,
    pub z1: f64,
    /// Ends in the mass coordinate s = ∫ m dz (nm·m_e), s = 0 at the start of the box.
    pub s0: f64,
    pub s1: f64,
    /// Mass (m_e).
    pub mass: f64,
    /// V at the piece midpoint (meV).
    pub v_mid: f64,
    /// dV/dz on the piece (meV/nm).
    pub slope: f64,
}

/// sin(x)/x, stable at 0.
fn sinc(x: f64) -> f64 {
    if x.abs() < 1e-4 {
        1.0 - x * x / 6.0
    } else {
        x.sin() / x
    }
}

/// g(x) = (sin x − x cos x)/x², with ∫_{−h}^{h} v e^{−ikv} dv = −2i h² g(kh); series for |x| < 1.
fn gfun(x: f64) -> f64 {
    if x.abs() < 1.0 {
        // g = Σ_{n≥1} (−1)^{n+1} 2n/(2n+1)! x^{2n−1}
        let x2 = x * x;
        let mut term = x / 3.0; // n = 1
        let mut sum = term;
        for n in 2..12 {
            let nf = n as f64;
            // ratio of consecutive terms: −x² · (2n/(2n+1)!) / ((2n−2)/(2n−1)!)
            term *= -x2 * (2.0 * nf) / ((2.0 * nf - 2.0) * (2.0 * nf) * (2.0 * nf + 1.0));
            sum += term;
        }
        sum
    } else {
        (x.sin() - x * x.cos()) / (x * x)
    }
}

/// Exact Fourier coefficients f̂_d = (1/S)∫_0^S f(s) e^{−2πi d s/S} ds, d = −dmax..=dmax
/// (stored at index d + dmax), of a function that is linear on every piece:
/// f(s) = mid + slope_s·(s − s_mid). `f` returns (mid, slope_s) for a piece.
pub fn fourier_coefficients(pieces: &[Piece], s_len: f64, dmax: usize, f: impl Fn(&Piece) -> (f64, f64)) -> Vec<Complex64> {
    let vals: Vec<(f64, f64, f64, f64)> = pieces
        .iter()
        .map(|p| {
            let (mid, slope) = f(p);
            (p.s1 - p.s0, 0.5 * (p.s0 + p.s1) / s_len, mid, slope)
        })
        .collect();
    let mut out = vec![Complex64::new(0.0, 0.0); 2 * dmax + 1];
    for d in 0..=dmax {
        let df = d as f64;
        let mut acc = Complex64::new(0.0, 0.0);
        for &(w, mid_frac, mid, slope) in &vals {
            let x = PI * df * w / s_len;
            // Phase e^{−i k s_mid} with k s_mid = 2π d s_mid/S reduced mod 2π.
            let t = df * mid_frac;
            let theta = 2.0 * PI * (t - t.floor());
            let (sn, cs) = theta.sin_cos();
            let re = mid * w * sinc(x);
            let im = -slope * 0.5 * w * w * gfun(x);
            acc += Complex64::new(re, im) * Complex64::new(cs, -sn);
        }
        acc /= s_len;
        out[dmax + d] = acc;
        out[dmax - d] = acc.conj();
    }
    out
}

impl Heterostructure {
    /// The pieces of constant mass (and linear V) covering the box [a0, a1] ⊇ [0, L]:
    /// the part of the left cladding inside the box, every layer, the part of the
    /// right cladding; empty parts are skipped. s runs from 0 at a0.
    pub fn pieces(&self, a0: f64, a1: f64) -> Vec<Piece> {
        let mut pieces = Vec::with_capacity(self.layers.len() + 2);
        let mut s = 0.0;
        let mut push = |z0: f64, z1: f64, layer: &Layer, v_mid: f64, slope: f64| {
            if z1 > z0 {
                let s1 = s + layer.mass * (z1 - z0);
                pieces.push(Piece { z0, z1, s0: s, s1, mass: layer.mass, v_mid, slope });
                s = s1;
            }
        };
        let fgrad = MEV_PER_NM_PER_KV_CM * self.field_kv_cm;
        let total = self.total_thickness();
        let first = self.layers[0];
        let last = self.layers[self.layers.len() - 1];
        push(a0, 0.0, &first, first.band_edge + self.field_energy(0.0), 0.0);
        for (i, layer) in self.layers.iter().enumerate() {
            let (z0, z1) = (self.bounds[i], self.bounds[i + 1]);
            let zm = 0.5 * (z0 + z1);
            push(z0, z1, layer, layer.band_edge + fgrad * (zm - self.center()), fgrad);
        }
        push(total, a1, &last, last.band_edge + self.field_energy(total), 0.0);
        pieces
    }
}
