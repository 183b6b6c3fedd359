//! Property tests: any input is handled, every field is finite, centroids stay on their points.

use mzcore::centroid::{
    ApexMethod, Centroid, CentroidParams, Centroider, NoiseMethod, threshold_centroided,
};
use proptest::prelude::*;

fn all_finite(c: &Centroid) -> bool {
    [c.mz, c.intensity, c.area, c.snr, c.fwhm].iter().all(|v| v.is_finite())
}

fn params_strategy() -> impl Strategy<Value = CentroidParams> {
    (
        prop_oneof![
            Just(ApexMethod::Gaussian3),
            Just(ApexMethod::GaussianFit),
            Just(ApexMethod::WeightedHalfHeight)
        ],
        prop_oneof![
            Just(NoiseMethod::Global),
            (1usize..50).prop_map(|window| NoiseMethod::Sliding { window })
        ],
        -5.0f64..10.0,
        (0.0f64..=1.0, 0.0f64..10.0, 0.0f64..=1.0, 1.01f64..5.0),
    )
        .prop_map(|(apex, noise, min_snr, (depth, valley_snr, spike, gap))| CentroidParams {
            apex,
            noise,
            // Negative values are refused by `validate`, but must not panic either.
            min_snr,
            min_valley_depth: depth,
            min_valley_snr: valley_snr,
            spike_ratio: spike,
            gap_factor: gap,
            centroided_min_snr: min_snr,
        })
}

fn any_value() -> impl Strategy<Value = f64> {
    prop_oneof![
        4 => -1e3f64..1e6,
        1 => Just(0.0),
        1 => Just(f64::NAN),
        1 => Just(f64::INFINITY),
        1 => Just(f64::NEG_INFINITY),
        1 => any::<f64>(),
    ]
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(400))]

    /// Arbitrary values (NaN, infinities, negatives, unsorted m/z): no panic, finite fields,
    /// each centroid inside the range of the finite m/z values.
    #[test]
    fn arbitrary_input_never_panics(
        pts in prop::collection::vec((any_value(), any_value()), 0..80),
        params in params_strategy(),
    ) {
        let mz: Vec<f64> = pts.iter().map(|p| p.0).collect();
        let y: Vec<f64> = pts.iter().map(|p| p.1).collect();
        let mut picker = Centroider::new();
        let mut out = Vec::new();
        picker.centroid_profile(&mz, &y, &params, &mut out);
        let lo = mz.iter().copied().filter(|v| v.is_finite()).fold(f64::INFINITY, f64::min);
        let hi = mz.iter().copied().filter(|v| v.is_finite()).fold(f64::NEG_INFINITY, f64::max);
        for c in &out {
            prop_assert!(all_finite(c), "{c:?}");
            prop_assert!(c.mz >= lo && c.mz <= hi, "{c:?} outside {lo}..{hi}");
        }
        threshold_centroided(&mz, &y, &params, &mut out);
        for c in &out {
            prop_assert!(all_finite(c), "{c:?}");
        }
    }

    /// Islands of points separated by gaps (10 to 60 times the sampling step): every centroid
    /// lies within the m/z span of one island, never inside a gap.
    #[test]
    fn centroids_stay_on_their_island(
        islands in prop::collection::vec(
            (prop::collection::vec(0.0f64..1e4, 1..15), 10.0f64..60.0),
            1..12,
        ),
        base_noise in prop::collection::vec(0.0f64..5.0, 200),
        step in 1e-4f64..0.1,
        params in params_strategy(),
    ) {
        let (mut mz, mut y, mut spans) = (Vec::new(), Vec::new(), Vec::new());
        let mut m = 100.0;
        // A stretch of baseline first so the noise estimate has something to work on.
        for v in &base_noise {
            mz.push(m);
            y.push(*v);
            m += step;
        }
        spans.push((mz[0], m - step));
        for (points, gap) in &islands {
            m += gap * step;
            let first = m;
            for v in points {
                mz.push(m);
                y.push(*v);
                m += step;
            }
            spans.push((first, m - step));
        }
        let mut out = Vec::new();
        Centroider::new().centroid_profile(&mz, &y, &params, &mut out);
        for c in &out {
            prop_assert!(all_finite(c));
            let slack = 1e-9 * c.mz.abs();
            prop_assert!(
                spans.iter().any(|&(a, b)| c.mz >= a - slack && c.mz <= b + slack),
                "{c:?} in a gap; islands {spans:?}"
            );
            prop_assert!(c.fwhm >= 0.0 && c.area >= 0.0);
        }
        for w in out.windows(2) {
            prop_assert!(w[0].mz <= w[1].mz, "not ascending");
        }
    }
}
