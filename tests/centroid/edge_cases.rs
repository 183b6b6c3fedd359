//! What real profile data does: gaps, short islands, flat tops, shoulders, spikes, tiny inputs.
//! Expected values are worked out by hand from the constructed spectra.

use mzcore::centroid::{
    ApexMethod, Centroid, CentroidParams, Centroider, NoiseMethod, centroid_profile,
    threshold_centroided,
};

const RIPPLE: [f64; 4] = [-1.0, 0.5, 1.0, -0.5];

/// `n` baseline points (level 100, ripple +-1) every `step` from `start`.
fn baseline(start: f64, step: f64, n: usize) -> (Vec<f64>, Vec<f64>) {
    let mz = (0..n).map(|k| start + step * k as f64).collect();
    let y = (0..n).map(|k| 100.0 + RIPPLE[k % 4]).collect();
    (mz, y)
}

fn gauss(m: f64, centre: f64, fwhm: f64, h: f64) -> f64 {
    let s = fwhm / (2.0 * (2.0 * std::f64::consts::LN_2).sqrt());
    h * (-0.5 * ((m - centre) / s).powi(2)).exp()
}

fn pick(mz: &[f64], y: &[f64], params: &CentroidParams) -> Vec<Centroid> {
    let mut out = Vec::new();
    centroid_profile(mz, y, params, &mut out);
    out
}

fn defaults() -> CentroidParams {
    CentroidParams::default()
}

#[test]
fn empty_one_and_two_point_spectra() {
    assert!(pick(&[], &[], &defaults()).is_empty());
    assert!(pick(&[100.0], &[1e6], &defaults()).is_empty(), "one point is a spike");
    assert!(pick(&[100.0, 100.01], &[5.0, 7.0], &defaults()).len() <= 1);
    // Mismatched lengths: extra elements ignored.
    assert!(pick(&[100.0, 100.01, 100.02], &[1.0], &defaults()).is_empty());
    let mut out = vec![Centroid { mz: 1.0, intensity: 1.0, area: 1.0, snr: 1.0, fwhm: 1.0 }];
    threshold_centroided(&[], &[], &defaults(), &mut out);
    assert!(out.is_empty(), "output is cleared");
}

#[test]
fn a_gap_is_not_bridged() {
    // Island A rises to its last point, island B falls from its first; without gap detection
    // this is one peak with its apex in B.
    let (mut mz, mut y) = baseline(200.0, 0.001, 300);
    mz.extend([200.5, 200.501, 200.502]);
    y.extend([300.0, 700.0, 900.0]);
    mz.extend([200.52, 200.521, 200.522]);
    y.extend([950.0, 600.0, 250.0]);
    let (m2, y2) = baseline(200.6, 0.001, 300);
    mz.extend(m2);
    y.extend(y2);
    let c = pick(&mz, &y, &defaults());
    assert_eq!(c.len(), 2, "{c:?}");
    assert!(c[0].mz >= 200.5 && c[0].mz <= 200.502, "{:?}", c[0]);
    assert!(c[1].mz >= 200.52 && c[1].mz <= 200.522, "{:?}", c[1]);
}

#[test]
fn two_and_three_point_islands_are_peaks() {
    let (mut mz, mut y) = baseline(300.0, 0.001, 400);
    mz.extend([300.8, 300.801]);
    y.extend([900.0, 700.0]);
    mz.extend([301.0, 301.001, 301.002]);
    y.extend([400.0, 1000.0, 500.0]);
    let (m2, y2) = baseline(301.2, 0.001, 400);
    mz.extend(m2);
    y.extend(y2);
    let c = pick(&mz, &y, &defaults());
    assert_eq!(c.len(), 2, "{c:?}");
    // Two points: no Gaussian through three points, so the centroid of the straight line
    // between them, weighted by height above the estimated baseline b:
    // 300.8 + 0.001 (w0 + 2 w1) / (3 (w0 + w1)) with w0 = 900 - b, w1 = 700 - b.
    let mut picker = Centroider::new();
    let mut again = Vec::new();
    picker.centroid_profile(&mz, &y, &defaults(), &mut again);
    let b = picker.noise()[0].baseline;
    assert!((b - 100.0).abs() <= 1.0);
    let (w0, w1) = (900.0 - b, 700.0 - b);
    let expected = 300.8 + 0.001 * (w0 + 2.0 * w1) / (3.0 * (w0 + w1));
    assert!((c[0].mz - expected).abs() < 1e-9, "{:?} vs {expected}", c[0]);
    // Three points 400, 1000, 500: the right neighbour is the higher one, so the apex lies
    // right of the middle point.
    assert!(c[1].mz > 301.001 && c[1].mz < 301.002, "{:?}", c[1]);
    for p in &c {
        assert!(p.fwhm > 0.0 && p.area > 0.0 && p.snr > 100.0);
    }
}

#[test]
fn flat_saturated_top_gives_the_plateau_centre() {
    let (mz, mut y) = baseline(400.0, 0.001, 1000);
    // Clip a Gaussian at 400.5003 at 5000: five points form the plateau 400.498..400.502.
    for k in 0..1000 {
        y[k] = (y[k] + gauss(mz[k], 400.5003, 0.012, 20_000.0)).min(5000.0);
    }
    let flat: Vec<usize> = (0..1000).filter(|&k| y[k] == 5000.0).collect();
    assert!(flat.len() >= 4, "test construction: {flat:?}");
    let centre = 0.5 * (mz[flat[0]] + mz[*flat.last().unwrap()]);
    let c = pick(&mz, &y, &defaults());
    assert_eq!(c.len(), 1);
    assert!((c[0].mz - centre).abs() < 1e-9, "{} vs {centre}", c[0].mz);
    assert_eq!(c[0].intensity, 5000.0);
}

#[test]
fn shoulders_split_by_valley_depth() {
    let (mz, base) = baseline(500.0, 0.0005, 2000);
    let f = 0.0083;
    // Resolved: 1.5 FWHM apart, the valley (2725) is 47 % below the smaller maximum (5116).
    let resolved: Vec<f64> = mz
        .iter()
        .zip(&base)
        .map(|(&m, &b)| b + gauss(m, 500.4, f, 8000.0) + gauss(m, 500.4 + 1.5 * f, f, 5000.0))
        .collect();
    assert_eq!(pick(&mz, &resolved, &defaults()).len(), 2);
    // Demanding a 60 % valley merges them into one peak at the taller apex.
    let strict = CentroidParams { min_valley_depth: 0.6, ..defaults() };
    let one = pick(&mz, &resolved, &strict);
    assert_eq!(one.len(), 1);
    assert!((one[0].mz - 500.4).abs() < 0.2 * f, "{:?}", one[0]);
}

#[test]
fn one_point_noise_spikes_are_rejected() {
    let (mz, mut y) = baseline(600.0, 0.001, 1000);
    y[300] = 5000.0;
    y[700] = 1e6;
    assert!(pick(&mz, &y, &defaults()).is_empty());
}

#[test]
fn non_uniform_sampling_keeps_the_apex_exact() {
    // TOF-like sampling: spacing grows with sqrt(m/z); a clean Gaussian must come back exactly.
    let mz: Vec<f64> = (0..3000).map(|k| (20.0 + 0.0004 * k as f64).powi(2)).collect();
    let centre = mz[1500] + 0.3 * (mz[1501] - mz[1500]);
    let fwhm = 6.0 * (mz[1501] - mz[1500]);
    let y: Vec<f64> = mz
        .iter()
        .enumerate()
        .map(|(k, &m)| 100.0 + RIPPLE[k % 4] * 0.01 + gauss(m, centre, fwhm, 1e5))
        .collect();
    for apex in [ApexMethod::Gaussian3, ApexMethod::GaussianFit, ApexMethod::WeightedHalfHeight] {
        let c = pick(&mz, &y, &CentroidParams { apex, ..defaults() });
        assert_eq!(c.len(), 1, "{apex:?}");
        let ppm = (c[0].mz - centre) / centre * 1e6;
        let limit = if apex == ApexMethod::WeightedHalfHeight { 0.1 } else { 0.01 };
        assert!(ppm.abs() < limit, "{apex:?}: {ppm} ppm");
        assert!((c[0].fwhm / fwhm - 1.0).abs() < 0.03, "{apex:?}: fwhm {}", c[0].fwhm);
    }
}

#[test]
fn sliding_noise_follows_a_raised_baseline() {
    // First half baseline 100 +-1, second half a hump at 2000 +-1 with the same small peak on
    // both halves (height 50 above local baseline).
    let (mz, mut y) = baseline(100.0, 0.01, 4000);
    for v in &mut y[2000..4000] {
        *v += 1900.0;
    }
    for (centre, k0) in [(105.0, 500), (135.0, 3500)] {
        for k in k0 - 20..k0 + 20 {
            y[k] += gauss(mz[k], centre + 0.003, 0.05, 50.0);
        }
    }
    let sliding = CentroidParams { noise: NoiseMethod::Sliding { window: 1000 }, ..defaults() };
    let c = pick(&mz, &y, &sliding);
    assert_eq!(c.len(), 2, "{c:?}");
    assert!((c[0].mz - 105.003).abs() < 0.005 && (c[1].mz - 135.003).abs() < 0.005, "{c:?}");
    assert!(c[1].snr > 10.0 && c[1].snr < 100.0, "S/N against the local baseline: {}", c[1].snr);
    let mut picker = Centroider::new();
    let mut out = Vec::new();
    picker.centroid_profile(&mz, &y, &sliding, &mut out);
    assert_eq!(picker.noise().len(), 4);
    assert_eq!(picker.noise_block_len(), 1000);
}

#[test]
fn centroided_input_gets_the_same_threshold() {
    // Centroided list: 200 noise peaks of 10..14 and three real ones.
    let mz: Vec<f64> = (0..203).map(|k| 100.0 + 0.37 * k as f64).collect();
    let mut y: Vec<f64> = (0..203).map(|k| 10.0 + (k % 5) as f64).collect();
    y[50] = 400.0;
    y[120] = 90.0;
    y[121] = 16.0; // 16 is below baseline 12 + 4 * sigma (sigma = 1.4826 * 1)
    let mut out = Vec::new();
    threshold_centroided(&mz, &y, &CentroidParams::default(), &mut out);
    let kept: Vec<f64> = out.iter().map(|c| c.mz).collect();
    assert_eq!(kept, vec![mz[50], mz[120]]);
    // median 12, MAD 1 -> sigma 1.4826; S/N of 400 is (400 - 12) / 1.4826.
    assert!((out[0].snr - 388.0 / 1.482_602_218_505_602).abs() < 1e-9);
    assert_eq!(out[0].fwhm, 0.0);
}

#[test]
fn fixed_noise_for_baseline_free_data() {
    // Only zero-flanked peak islands, as from an instrument that drops everything below its
    // own threshold: the median sees mostly peak points, so a known noise level is given.
    let (mut mz, mut y) = (Vec::new(), Vec::new());
    for p in 0..20 {
        let centre = 300.0 + p as f64;
        for k in 0..12 {
            let m = centre - 0.0052 + 0.001 * k as f64;
            mz.push(m);
            y.push(if k == 0 || k == 11 {
                0.0
            } else {
                gauss(m, centre, 0.005, 100.0 * (p + 1) as f64)
            });
        }
    }
    let fixed = CentroidParams {
        noise: NoiseMethod::Fixed(mzcore::centroid::NoiseLevel { baseline: 0.0, sigma: 5.0 }),
        ..defaults()
    };
    fixed.validate().unwrap();
    let c = pick(&mz, &y, &fixed);
    assert_eq!(c.len(), 20, "{c:?}");
    assert!((c[0].snr - 20.0).abs() < 0.5, "S/N against the given sigma: {}", c[0].snr);
    // The median estimate, by contrast, sits on the peaks and loses the small ones.
    assert!(pick(&mz, &y, &defaults()).len() < 20);
}

#[test]
fn representation_is_guessed_from_spacing() {
    use mzcore::centroid::looks_like_profile;
    use mzcore::spectrum::{Peaks, Representation};
    let (mz, y) = baseline(200.0, 0.001, 500);
    assert!(looks_like_profile(&mz));
    // Irregular spacings of a centroid list: unit steps plus scrambled offsets of 0 to 0.8.
    let list: Vec<f64> =
        (0..200).map(|k| 100.0 + k as f64 + ((k * 37) % 11) as f64 * 0.08).collect();
    assert!(!looks_like_profile(&list));
    assert!(!looks_like_profile(&mz[..5]));
    let peaks = Peaks { mz, intensity: y };
    let mut picker = Centroider::new();
    let mut out = Vec::new();
    let used = picker.pick(&peaks, Representation::Unknown, &defaults(), &mut out);
    assert_eq!(used, Representation::Profile);
    assert_eq!(
        picker.pick(&peaks, Representation::Centroid, &defaults(), &mut out),
        Representation::Centroid
    );
}
