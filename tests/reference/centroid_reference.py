#!/usr/bin/env python3
"""Reference maxima for the centroid tests, found with scipy.signal.find_peaks.

Generates a few deterministic, clean profile spectra (no random-number library: the small
baseline ripple comes from a fixed linear congruential sequence), runs scipy.signal.find_peaks
on each intensity array, and writes tests/reference/centroid_peaks.tsv with every profile point
and every maximum found. The Rust test `reference` in tests/centroid/ centroids the same points
with mzcore and checks it finds the same maxima.

find_peaks criterion (documented here and in the TSV header):
  height     >= BASELINE + 10   (the ripple is at most +-1, peaks are >= 300 above baseline)
  prominence >= 50              (separates resolved maxima; ripple maxima have prominence < 2)
  width      >= 1.5 samples     (width at half prominence; drops one-point spikes, whose width
                                 is about one sample, as mzcore's spike rule does)
For flat tops find_peaks reports the middle sample (the left one of the two middle samples for
an even plateau).

Only numpy and scipy are needed. Run from anywhere:  python3 tests/reference/centroid_reference.py
"""

import math
import os

import numpy as np
from scipy.signal import find_peaks

BASELINE = 100.0
HEIGHT = BASELINE + 10.0
PROMINENCE = 50.0
WIDTH = 1.5
OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "centroid_peaks.tsv")


class Ripple:
    """Deterministic values in [-1, 1): a 64-bit LCG (Knuth's MMIX constants, from memory)."""

    def __init__(self, seed):
        self.state = seed

    def next(self):
        self.state = (self.state * 6364136223846793005 + 1442695040888963407) % 2**64
        return (self.state >> 11) / 2.0**52 - 1.0


def gaussians(mz, peaks):
    """Sum of Gaussians (centre, fwhm, height) evaluated at mz."""
    out = []
    for m in mz:
        s = 0.0
        for c, fwhm, h in peaks:
            sd = fwhm / (2.0 * math.sqrt(2.0 * math.log(2.0)))
            d = (m - c) / sd
            if abs(d) < 12.0:
                s += h * math.exp(-0.5 * d * d)
        out.append(s)
    return out


def with_baseline(mz, clean, seed):
    r = Ripple(seed)
    return [BASELINE + c + r.next() for c in clean]


def geometric_grid(start, n, step):
    return [start * (1.0 + step) ** k for k in range(n)]


def spectra():
    """(name, mz list, intensity list) for each reference spectrum."""
    out = []

    # 0: isolated high-resolution peaks (R 60,000, about 7 points per FWHM, non-uniform grid).
    mz = geometric_grid(300.0, 1500, 1.0 / (60000.0 * 7.0))
    peaks = [(300.0 + 0.1 * k + 0.00037 * k, (300.0 + 0.1 * k) / 60000.0, h)
             for k, h in zip(range(1, 10), [300, 900, 2500, 8000, 20000, 50000, 1200, 600, 4000])]
    peaks = [p for p in peaks if p[0] < mz[-1] - 0.01]
    out.append(("isolated_high_res", mz, with_baseline(mz, gaussians(mz, peaks), 11)))

    # 1: unit resolution: FWHM 0.6 u, 0.05 u sampling, an isotope-like cluster 1 u apart.
    mz = [80.0 + 0.05 * k for k in range(1200)]
    peaks = [(92.0, 0.6, 5000), (93.0, 0.6, 1800), (94.0, 0.6, 3300), (95.0, 0.6, 1100),
             (120.1, 0.6, 700), (133.9, 0.6, 12000), (135.9, 0.6, 4000)]
    out.append(("unit_resolution", mz, with_baseline(mz, gaussians(mz, peaks), 12)))

    # 2: resolved doublets (2 FWHM apart) and an unresolved shoulder (0.5 FWHM, no maximum).
    mz = geometric_grid(500.0, 1500, 1.0 / (60000.0 * 8.0))
    f = 500.0 / 60000.0
    peaks = [(500.05, f, 6000), (500.05 + 2.0 * f, f, 3000),
             (500.20, f, 4000), (500.20 + 0.5 * f, f, 1500),
             (500.35, f, 2000), (500.35 + 2.5 * f, f, 2000)]
    out.append(("doublets_and_shoulder", mz, with_baseline(mz, gaussians(mz, peaks), 13)))

    # 3: saturated tops: peaks clipped at a detector ceiling (flat plateaus of several points).
    mz = geometric_grid(250.0, 1200, 1.0 / (40000.0 * 8.0))
    f = 250.0 / 40000.0
    peaks = [(250.08, f, 90000), (250.2, f, 40000), (250.31, f, 5000)]
    y = with_baseline(mz, gaussians(mz, peaks), 14)
    ceiling = 30000.0
    y = [min(v, ceiling) for v in y]
    out.append(("saturated_tops", mz, y))

    # 4: dropped baseline runs (gaps), a two-point and a three-point island, one lone spike.
    mz_full = geometric_grid(400.0, 1600, 1.0 / (60000.0 * 6.0))
    f = 400.0 / 60000.0
    peaks = [(400.1, f, 3000), (400.3, f, 800)]
    y_full = with_baseline(mz_full, gaussians(mz_full, peaks), 15)
    keep = [True] * len(mz_full)
    for lo, hi in [(200, 260), (700, 760), (1000, 1100)]:
        for k in range(lo, hi):
            keep[k] = False
    # Two-point island in the middle of dropped run 700..760, three-point in 1000..1100.
    islands = {728: 800.0, 729: 650.0, 1049: 300.0, 1050: 900.0, 1051: 500.0}
    for k, h in islands.items():
        keep[k] = True
        y_full[k] = BASELINE + h
    y_full[1400] = BASELINE + 2000.0  # a one-point spike on the baseline
    mz = [m for m, k in zip(mz_full, keep) if k]
    y = [v for v, k in zip(y_full, keep) if k]
    out.append(("gaps_islands_spike", mz, y))
    return out


def main():
    lines = [
        "# Reference maxima from scipy.signal.find_peaks; generated by centroid_reference.py, do not edit.",
        f"# criterion: height >= {HEIGHT:g}, prominence >= {PROMINENCE:g}, width >= {WIDTH:g} samples",
        "record\tspectrum\tname\tindex\tmz\tintensity",
    ]
    for sid, (name, mz, y) in enumerate(spectra()):
        mz_txt = [f"{m:.9f}" for m in mz]
        y_txt = [f"{v:.4f}" for v in y]
        # find_peaks sees exactly the rounded values the Rust test reads back.
        arr = np.array([float(v) for v in y_txt])
        idx, _ = find_peaks(arr, height=HEIGHT, prominence=PROMINENCE, width=WIDTH)
        for k, (m, v) in enumerate(zip(mz_txt, y_txt)):
            lines.append(f"point\t{sid}\t{name}\t{k}\t{m}\t{v}")
        for k in idx:
            lines.append(f"maximum\t{sid}\t{name}\t{int(k)}\t{mz_txt[k]}\t{y_txt[k]}")
    with open(OUT, "w", encoding="utf-8", newline="\n") as fh:
        fh.write("\n".join(lines) + "\n")


if __name__ == "__main__":
    main()
