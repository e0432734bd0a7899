//! Samples of ψ as CSV: header `r,re_psi,im_psi`, one line per grid point, `nan` where ψ has a
//! pole. Loads with `numpy.loadtxt(path, delimiter=",", skiprows=1)`.

use num_complex::Complex64;

/// The CSV text of the samples `values` at the real parts `grid`.
pub fn samples(grid: &[f64], values: &[Option<Complex64>]) -> String {
    let mut out = String::from("r,re_psi,im_psi\n");
    for (r, v) in grid.iter().zip(values) {
        match v {
            Some(v) => out.push_str(&format!("{r:.12},{:.17e},{:.17e}\n", v.re, v.im)),
            None => out.push_str(&format!("{r:.12},nan,nan\n")),
        }
    }
    out
}
