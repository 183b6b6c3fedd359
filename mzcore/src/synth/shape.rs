//! Chromatographic elution profiles: Gaussian and exponentially modified Gaussian (EMG),
//! scaled to height 1 at the apex and placed so that the apex falls on the stated time.
//!
//! EMG: the convolution of a Gaussian (centre mu, sd sigma) with an exponential decay of time
//! constant tau (Grushka, Anal. Chem. 44, 1733-1738, 1972):
//! `f(t) = (1/(2 tau)) exp(sigma^2/(2 tau^2) - (t - mu)/tau) erfc((sigma/tau - (t - mu)/sigma)/sqrt 2)`.

/// FWHM of a Gaussian in units of its standard deviation: 2 sqrt(2 ln 2).
pub const FWHM_PER_SIGMA: f64 = 2.354_820_045_030_949;

/// `exp(a) * erfc(x)` without overflow, from the Chebyshev fit of `erfc` in Numerical Recipes
/// (Press et al., 2nd ed., section 6.2, `erfcc`; fractional error below 1.2e-7 everywhere).
fn exp_erfc(a: f64, x: f64) -> f64 {
    let z = x.abs();
    let t = 1.0 / (1.0 + 0.5 * z);
    let poly = -1.265_512_23
        + t * (1.000_023_68
            + t * (0.374_091_96
                + t * (0.096_784_18
                    + t * (-0.186_288_06
                        + t * (0.278_868_07
                            + t * (-1.135_203_98
                                + t * (1.488_515_87 + t * (-0.822_152_23 + t * 0.170_872_77))))))));
    if x >= 0.0 {
        t * (a - z * z + poly).exp()
    } else {
        // erfc(-z) = 2 - erfc(z); a is small or negative on this side.
        2.0 * a.exp() - t * (a - z * z + poly).exp()
    }
}

/// An elution profile of unit height at its apex.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Elution {
    apex: f64,
    sigma: f64,
    tau: f64,
    /// Gaussian centre mu (differs from the apex for an EMG).
    mu: f64,
    /// 1 / value of the unscaled shape at the apex.
    scale: f64,
}

impl Elution {
    /// A profile with its apex at `apex_min`, Gaussian FWHM `fwhm_min`, and exponential
    /// tailing time constant `tau_min` (0 for a pure Gaussian).
    pub fn new(apex_min: f64, fwhm_min: f64, tau_min: f64) -> Elution {
        let sigma = (fwhm_min / FWHM_PER_SIGMA).max(1e-9);
        let tau = if tau_min > sigma * 1e-3 { tau_min } else { 0.0 };
        let mut e = Elution { apex: apex_min, sigma, tau, mu: apex_min, scale: 1.0 };
        if tau > 0.0 {
            // The EMG mode lies between mu and mu + tau: golden-section search on the
            // unscaled shape with mu = 0, then shift so the mode lands on the apex.
            let shape = e;
            let f = |t: f64| shape.raw(t, 0.0);
            let (mut lo, mut hi) = (-sigma, tau + sigma);
            let g = 0.618_033_988_749_894_8;
            let (mut x1, mut x2) = (hi - g * (hi - lo), lo + g * (hi - lo));
            let (mut f1, mut f2) = (f(x1), f(x2));
            for _ in 0..100 {
                if f1 < f2 {
                    lo = x1;
                    x1 = x2;
                    f1 = f2;
                    x2 = lo + g * (hi - lo);
                    f2 = f(x2);
                } else {
                    hi = x2;
                    x2 = x1;
                    f2 = f1;
                    x1 = hi - g * (hi - lo);
                    f1 = f(x1);
                }
            }
            let mode = 0.5 * (lo + hi);
            e.mu = apex_min - mode;
            e.scale = 1.0 / f(mode);
        }
        e
    }

    fn raw(&self, t: f64, mu: f64) -> f64 {
        if self.tau == 0.0 {
            let d = (t - mu) / self.sigma;
            return (-0.5 * d * d).exp();
        }
        let (s, tau) = (self.sigma, self.tau);
        let a = s * s / (2.0 * tau * tau) - (t - mu) / tau;
        let x = (s / tau - (t - mu) / s) / std::f64::consts::SQRT_2;
        exp_erfc(a, x) / (2.0 * tau)
    }

    /// Height at time `t_min` relative to the apex (1 at the apex).
    pub fn at(&self, t_min: f64) -> f64 {
        self.raw(t_min, self.mu) * self.scale
    }

    /// The apex time in minutes.
    pub fn apex(&self) -> f64 {
        self.apex
    }

    /// A time span outside which the profile is below 1e-6 of its apex.
    pub fn span(&self) -> (f64, f64) {
        let w = 5.3 * self.sigma;
        (self.mu - w, self.mu + w + 14.0 * self.tau)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn exp_erfc_matches_tabulated_erfc() {
        // erfc values from Abramowitz and Stegun, Table 7.1 (erf 0.5 = 0.5204998778,
        // erf 1 = 0.8427007929, erf 2 = 0.9953222650).
        for (x, erfc) in [(0.5, 0.479_500_122_2), (1.0, 0.157_299_207_1), (2.0, 0.004_677_735)] {
            assert!((exp_erfc(0.0, x) / erfc - 1.0).abs() < 2e-7, "erfc({x})");
            assert!((exp_erfc(0.0, -x) - (2.0 - erfc)).abs() < 2e-7, "erfc(-{x})");
        }
    }

    #[test]
    fn gaussian_apex_and_half_height() {
        let e = Elution::new(5.0, 0.2, 0.0);
        assert!((e.at(5.0) - 1.0).abs() < 1e-12);
        assert!((e.at(5.1) - 0.5).abs() < 1e-9);
        assert!((e.at(4.9) - 0.5).abs() < 1e-9);
    }

    #[test]
    fn emg_apex_lies_on_the_stated_time_and_tails_late() {
        let e = Elution::new(7.0, 0.1, 0.08);
        assert!((e.at(7.0) - 1.0).abs() < 1e-9);
        for dt in [0.002, 0.01, 0.05] {
            assert!(e.at(7.0 + dt) < 1.0 && e.at(7.0 - dt) < 1.0);
            // Tailing: the late side decays more slowly than the early side.
            assert!(e.at(7.0 + 3.0 * dt) > e.at(7.0 - 3.0 * dt));
        }
        let (lo, hi) = e.span();
        assert!(e.at(lo) < 1e-5 && e.at(hi) < 1e-5);
    }
}
