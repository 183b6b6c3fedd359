//! Apex interpolation: Gaussian fits on log intensities and the weighted centroid.
//!
//! A Gaussian `h exp(-(x - mu)^2 / (2 s^2))` is a parabola in `ln y`, so three points determine
//! it exactly (Caruana's method: R. A. Caruana, R. B. Searle, T. Heller, S. I. Shupack,
//! "Fast algorithm for the resolution of spectra", Anal. Chem. 58, 1162-1167 (1986), from
//! memory). The least-squares variant fits the same parabola to all points above half height
//! with weights `y^2`, which compensates the noise amplification of the logarithm (a published
//! refinement of Caruana's method, H. Guo, IEEE Signal Process. Mag. 28(5), 134-137 (2011),
//! from memory). All inputs here are already baseline-subtracted and positive.

/// A fitted Gaussian apex: position, height and the log-parabola curvature (`d2 ln y / dx2 / 2`,
/// negative for a peak).
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct GaussFit {
    pub mu: f64,
    pub height: f64,
    pub curvature: f64,
}

impl GaussFit {
    /// Full width at half maximum of the fitted Gaussian.
    pub fn fwhm(&self) -> f64 {
        // FWHM = 2 sqrt(2 ln 2) s and curvature = -1 / (2 s^2)  =>  FWHM = 2 sqrt(ln 2 / -c).
        2.0 * (std::f64::consts::LN_2 / -self.curvature).sqrt()
    }
}

/// Exact log-parabola through three points (non-uniform spacing allowed), `y1` the largest.
pub(crate) fn gaussian3(x: [f64; 3], y: [f64; 3]) -> Option<GaussFit> {
    if !(y[0] > 0.0 && y[1] > 0.0 && y[2] > 0.0) {
        return None;
    }
    let (l0, l1, l2) = (y[0].ln(), y[1].ln(), y[2].ln());
    let d0 = x[0] - x[1];
    let d2 = x[2] - x[1];
    let det = d0 * d2 * (d2 - d0);
    if !(det.abs() > 0.0) {
        return None;
    }
    let a0 = l0 - l1;
    let a2 = l2 - l1;
    let b = (a0 * d2 * d2 - a2 * d0 * d0) / det;
    let c = (a2 * d0 - a0 * d2) / det;
    finish(x[1], l1, b, c)
}

/// Weighted least-squares log-parabola through points `(x[i], y[i])`, weights `y^2`, `x`
/// measured from `x_ref` and divided by `scale` (for conditioning).
pub(crate) fn gaussian_lsq(x: &[f64], y: &[f64], x_ref: f64, scale: f64) -> Option<GaussFit> {
    if x.len() < 3 || !(scale > 0.0) {
        return None;
    }
    let (mut s0, mut s1, mut s2, mut s3, mut s4) = (0.0, 0.0, 0.0, 0.0, 0.0);
    let (mut t0, mut t1, mut t2) = (0.0, 0.0, 0.0);
    for (&xi, &yi) in x.iter().zip(y) {
        if !(yi > 0.0) {
            return None;
        }
        let t = (xi - x_ref) / scale;
        let w = yi * yi;
        let l = yi.ln();
        let t2v = t * t;
        s0 += w;
        s1 += w * t;
        s2 += w * t2v;
        s3 += w * t2v * t;
        s4 += w * t2v * t2v;
        t0 += w * l;
        t1 += w * t * l;
        t2 += w * t2v * l;
    }
    // Normal equations [s0 s1 s2; s1 s2 s3; s2 s3 s4] [a b c]' = [t0 t1 t2]', Cramer's rule.
    let det = s0 * (s2 * s4 - s3 * s3) - s1 * (s1 * s4 - s3 * s2) + s2 * (s1 * s3 - s2 * s2);
    if !(det.abs() > 0.0) || !det.is_finite() {
        return None;
    }
    let da = t0 * (s2 * s4 - s3 * s3) - s1 * (t1 * s4 - s3 * t2) + s2 * (t1 * s3 - s2 * t2);
    let db = s0 * (t1 * s4 - t2 * s3) - t0 * (s1 * s4 - s3 * s2) + s2 * (s1 * t2 - t1 * s2);
    let dc = s0 * (s2 * t2 - s3 * t1) - s1 * (s1 * t2 - t1 * s2) + t0 * (s1 * s3 - s2 * s2);
    let (a, b, c) = (da / det, db / det, dc / det);
    let fit = finish(0.0, a, b, c)?;
    Some(GaussFit {
        mu: x_ref + fit.mu * scale,
        height: fit.height,
        curvature: fit.curvature / (scale * scale),
    })
}

/// Vertex of `l(t) = l_at_origin + b t + c t^2` with `t = x - origin`.
fn finish(origin: f64, l_at_origin: f64, b: f64, c: f64) -> Option<GaussFit> {
    if !(c < 0.0) {
        return None;
    }
    let dt = -b / (2.0 * c);
    let height = (l_at_origin - b * b / (4.0 * c)).exp();
    let fit = GaussFit { mu: origin + dt, height, curvature: c };
    (fit.mu.is_finite() && fit.height.is_finite() && fit.height > 0.0 && c.is_finite())
        .then_some(fit)
}

/// Intensity-weighted mean of `x` with weights `w` (ignoring non-positive weights).
pub(crate) fn weighted_mean(x: &[f64], w: &[f64]) -> Option<f64> {
    let (mut sw, mut swx) = (0.0, 0.0);
    for (&xi, &wi) in x.iter().zip(w) {
        if wi > 0.0 {
            sw += wi;
            swx += wi * xi;
        }
    }
    let m = swx / sw;
    (sw > 0.0 && m.is_finite()).then_some(m)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn gauss(x: f64, mu: f64, fwhm: f64, h: f64) -> f64 {
        let s = fwhm / (2.0 * (2.0 * std::f64::consts::LN_2).sqrt());
        h * (-(x - mu).powi(2) / (2.0 * s * s)).exp()
    }

    // A Gaussian is a log-parabola, so both fits must recover it exactly (up to rounding).
    #[test]
    fn three_point_fit_is_exact_on_a_gaussian_with_uneven_spacing() {
        let (mu, fwhm, h) = (500.004, 0.008, 1234.0);
        let x = [499.9985, 500.0031, 500.0102];
        let y = x.map(|v| gauss(v, mu, fwhm, h));
        let f = gaussian3(x, y).unwrap();
        assert!((f.mu - mu).abs() < 1e-9);
        assert!((f.height - h).abs() < 1e-6 * h);
        assert!((f.fwhm() - fwhm).abs() < 1e-9);
    }

    #[test]
    fn least_squares_fit_is_exact_on_a_gaussian() {
        let (mu, fwhm, h) = (250.1234, 0.6, 50.0);
        let x: Vec<f64> = (0..7).map(|i| 249.85 + 0.09 * i as f64).collect();
        let y: Vec<f64> = x.iter().map(|&v| gauss(v, mu, fwhm, h)).collect();
        let f = gaussian_lsq(&x, &y, x[3], 0.3).unwrap();
        assert!((f.mu - mu).abs() < 1e-9);
        assert!((f.fwhm() - fwhm).abs() < 1e-9);
    }

    #[test]
    fn fits_refuse_non_peaks() {
        assert!(gaussian3([1.0, 2.0, 3.0], [1.0, 2.0, 4.0]).is_none());
        assert!(gaussian3([1.0, 2.0, 3.0], [1.0, 0.0, 1.0]).is_none());
        assert!(gaussian3([1.0, 1.0, 3.0], [1.0, 2.0, 1.0]).is_none());
        assert_eq!(weighted_mean(&[1.0, 3.0], &[1.0, 1.0]), Some(2.0));
        assert_eq!(weighted_mean(&[1.0], &[0.0]), None);
    }
}
