//! TEMPORARY placeholder (being replaced by the stable implementation).
pub struct GaussHermite { pub nodes: Vec<f64>, pub scaled_weights: Vec<f64>, pub weights: Vec<f64> }
pub fn hermite_functions(n: usize, xi: f64, out: &mut [f64]) {
    if n == 0 { return; }
    out[0] = std::f64::consts::PI.powf(-0.25) * (-0.5 * xi * xi).exp();
    if n > 1 { out[1] = 2f64.sqrt() * xi * out[0]; }
    for j in 1..n - 1 { out[j + 1] = (2.0 / (j + 1) as f64).sqrt() * xi * out[j] - (j as f64 / (j + 1) as f64).sqrt() * out[j - 1]; }
}
pub fn gauss_hermite(m: usize) -> GaussHermite {
    let mut nodes = vec![0.0; m];
    let mut buf = vec![0.0; m + 1];
    let mut z = 0.0f64;
    for i in 0..(m + 1) / 2 {
        z = match i { 0 => (2.0 * m as f64 + 1.0).sqrt() - 1.85575 * (2.0 * m as f64 + 1.0).powf(-0.16667),
            1 => z - 1.14 * (m as f64).powf(0.426) / z, 2 => 1.86 * z - 0.86 * nodes[0], 3 => 1.91 * z - 0.91 * nodes[1], _ => 2.0 * z - nodes[i - 2] };
        for _ in 0..100 { hermite_functions(m + 1, z, &mut buf); let p = buf[m]; let d = (2.0 * m as f64).sqrt() * buf[m - 1] - z * p; let dz = p / d; z -= dz; if dz.abs() < 1e-15 * z.abs().max(1.0) { break; } }
        nodes[i] = z; nodes[m - 1 - i] = -z;
    }
    nodes.sort_by(|a, b| a.partial_cmp(b).unwrap());
    let scaled: Vec<f64> = nodes.iter().map(|&x| { hermite_functions(m, x, &mut buf); let w = 1.0 / (m as f64 * buf[m - 1] * buf[m - 1]); w * (-x * x).exp() * (x*x).exp() }).collect();
    let weights = nodes.iter().zip(&scaled).map(|(x, s)| s * (-x * x).exp()).collect();
    GaussHermite { nodes, scaled_weights: scaled, weights }
}
