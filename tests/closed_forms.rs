//! Integration tests of the public Rust API against closed-form spectra.

use specwell::basis::{BasisRef, FourierGrid, HermiteBasis};
use specwell::{solve, Hamiltonian, Mass, SolveOptions, Units};
use std::sync::Arc;

fn spectrum(basis: BasisRef, v: impl Fn(f64) -> f64, mass: f64, count: usize) -> Vec<f64> {
    let pot: Vec<f64> = basis.as_dyn().points().iter().map(|&x| v(x)).collect();
    let h = Hamiltonian::new(basis, pot, Mass::Uniform(mass), Units::Natural).unwrap();
    let mut o = SolveOptions::new(count);
    o.method = specwell::Method::Dense;
    solve(&Arc::new(h), &o).unwrap().energies
}

#[test]
fn harmonic_oscillator_both_bases() {
    // E_n = (n + ½)ħω (any QM textbook, e.g. Griffiths 2005 eq. 2.61), m = 2, ω = 1.5.
    let (m, w) = (2.0, 1.5);
    let v = move |x: f64| 0.5 * m * w * w * x * x;
    let hb = BasisRef::Hermite(Arc::new(HermiteBasis::new(90, 0.4, 0.7, None).unwrap()));
    let fg = BasisRef::Fourier(Arc::new(FourierGrid::new(-10.0, 10.0, 200).unwrap()));
    for e in [spectrum(hb, v, m, 10), spectrum(fg, v, m, 10)] {
        for (n, en) in e.iter().enumerate() {
            assert!((en - (n as f64 + 0.5) * w).abs() < 1e-10, "n={n}: {en}");
        }
    }
}

#[test]
fn poschl_teller_bound_states() {
    // V = −λ(λ+1)/2 sech²x (ħ = m = 1): E_n = −(λ − n)²/2, n < λ
    // (Pöschl & Teller 1933; Landau & Lifshitz, QM §23, problem 4). λ = 3.
    let lam = 3.0;
    let v = move |x: f64| -0.5 * lam * (lam + 1.0) / x.cosh().powi(2);
    let fg = BasisRef::Fourier(Arc::new(FourierGrid::new(-25.0, 25.0, 512).unwrap()));
    let e = spectrum(fg, v, 1.0, 3);
    for (n, en) in e.iter().enumerate() {
        let want = -0.5 * (lam - n as f64).powi(2);
        assert!((en - want).abs() < 1e-9, "n={n}: {en} vs {want}");
    }
}
