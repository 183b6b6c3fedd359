#!/usr/bin/env python3
"""Writes tests/reference/numpress.tsv: MS-Numpress reference encodings from pynumpress.

pynumpress (PyPI) wraps the reference MS-Numpress implementation (Teleman et al., Mol. Cell.
Proteomics 13(6), 1537-1542, 2014). For each case this records the codec, the fixed point used
(and whether it came from pynumpress's optimal_*_fixed_point), the input values, the base64 of
pynumpress's encoded bytes and pynumpress's decoding of those bytes. mzcore's test
`mzcore/tests/numpress_reference.rs` decodes and re-encodes every row.

Deterministic: the inputs come from a fixed-seed integer generator (splitmix64) and only
+, -, *, / on floats, so they do not depend on numpy's random streams or the platform libm.
Floats are written with repr(), which round-trips exactly.

Usage: python3 tests/reference/numpress_reference.py  (from anywhere; writes beside itself)
Needs: numpy, pynumpress (generated and checked with pynumpress 0.1.5, numpy 2.4).
"""

import base64
import os

import numpy as np
import pynumpress


class SplitMix64:
    """Tiny deterministic generator (Steele, Lea, Flood 2014), so results never depend on numpy."""

    def __init__(self, seed):
        self.state = seed & 0xFFFFFFFFFFFFFFFF

    def next_u64(self):
        self.state = (self.state + 0x9E3779B97F4A7C15) & 0xFFFFFFFFFFFFFFFF
        z = self.state
        z = ((z ^ (z >> 30)) * 0xBF58476D1CE4E5B9) & 0xFFFFFFFFFFFFFFFF
        z = ((z ^ (z >> 27)) * 0x94D049BB133111EB) & 0xFFFFFFFFFFFFFFFF
        return z ^ (z >> 31)

    def uniform(self):
        """A float in [0, 1) with 53 random bits (exact arithmetic)."""
        return (self.next_u64() >> 11) / 9007199254740992.0


def profile_mz(rng, n, start, step):
    """Evenly spaced m/z with slowly growing spacing and small jitter (profile-mode-like)."""
    out, mz = [], start
    for _ in range(n):
        out.append(mz)
        mz += step * (1.0 + 0.001 * rng.uniform()) + step * 1e-4 * (mz - start)
    return out


def centroid_mz(rng, n, lo, hi):
    """Sorted random m/z with irregular gaps (centroid-mode-like)."""
    return sorted(lo + (hi - lo) * rng.uniform() for _ in range(n))


def intensities(rng, n, scale, zero_share):
    """Heavy-tailed non-negative intensities with a share of exact zeros."""
    out = []
    for _ in range(n):
        if rng.uniform() < zero_share:
            out.append(0.0)
        else:
            u = rng.uniform()
            out.append(scale * u * u * u * u + rng.uniform())
    return out


def counts(rng, n, top):
    """Integer-valued counts, many small, some up to `top`."""
    out = []
    for _ in range(n):
        u = rng.uniform()
        out.append(float(int(top * u * u * u * u * u * u)))
    return out


def fmt(values):
    return ",".join(repr(float(v)) for v in values)


def row(name, codec, values, fixed_point=None):
    data = np.array(values, dtype=np.float64)
    if codec == "linear":
        optimal = fixed_point is None
        fp = float(pynumpress.optimal_linear_fixed_point(data)) if optimal else fixed_point
        encoded = pynumpress.encode_linear(data, fp)
        decode = pynumpress.decode_linear
    elif codec == "slof":
        optimal = fixed_point is None
        fp = float(pynumpress.optimal_slof_fixed_point(data)) if optimal else fixed_point
        encoded = pynumpress.encode_slof(data, fp)
        decode = pynumpress.decode_slof
    elif codec == "pic":
        optimal, fp = False, None
        encoded = pynumpress.encode_pic(data)
        decode = pynumpress.decode_pic
    else:
        raise ValueError(codec)
    raw = bytes(np.asarray(encoded, dtype=np.uint8))
    try:
        decoded = fmt(decode(np.frombuffer(raw, dtype=np.uint8)))
    except ValueError as err:  # pynumpress refuses some valid streams (see the Rust test)
        decoded = "error: " + str(err).replace("\t", " ")
    return "\t".join(
        [
            name,
            codec,
            "-" if fp is None else repr(float(fp)),
            "optimal" if optimal else "given",
            fmt(values),
            base64.b64encode(raw).decode("ascii"),
            decoded,
        ]
    )


def cases():
    rng = SplitMix64(20140601)
    out = []
    # m/z-like arrays for the linear codec, with pynumpress's optimal fixed point and with
    # fixed points typical of m/z (about 1e5..1e6) and of retention time.
    out.append(row("linear-profile-400", "linear", profile_mz(rng, 400, 100.0, 0.0125)))
    out.append(row("linear-profile-fp1e5", "linear", profile_mz(rng, 300, 250.0, 0.002), 100000.0))
    out.append(row("linear-profile-fp1e6", "linear", profile_mz(rng, 300, 50.0, 0.01), 1000000.0))
    out.append(row("linear-centroid-200", "linear", centroid_mz(rng, 200, 50.0, 2000.0)))
    out.append(row("linear-centroid-fp3e5", "linear", centroid_mz(rng, 150, 100.0, 1500.0), 300000.0))
    out.append(row("linear-wide-gaps", "linear", [80.0, 80.5, 95.25, 400.125, 400.126, 1999.9]))
    out.append(row("linear-rt-minutes", "linear", profile_mz(rng, 120, 0.05, 0.0083), 100000.0))
    out.append(row("linear-repeated", "linear", [500.0, 500.0, 500.0, 500.0, 500.0]))
    out.append(row("linear-falling", "linear", [900.0, 850.5, 700.25, 700.0, 10.0, 0.0]))
    out.append(row("linear-empty", "linear", []))
    out.append(row("linear-one", "linear", [445.12057]))
    out.append(row("linear-one-fp", "linear", [445.12057], 100000.0))
    out.append(row("linear-two", "linear", [445.12057, 446.12392]))
    out.append(row("linear-three", "linear", [1.0, 2.0, 3.0], 10.0))
    out.append(row("linear-four-odd-nibbles", "linear", [1.0, 2.0, 3.0, 5.0], 10.0))
    # Counts for positive integer compression, incl. zeros, halves and values up to ~2e9.
    out.append(row("pic-counts-300", "pic", counts(rng, 300, 50000)))
    out.append(row("pic-large", "pic", counts(rng, 100, 2_000_000_000)))
    out.append(row("pic-zeros", "pic", [0.0] * 17))
    out.append(row("pic-halves", "pic", [0.5, 1.5, 2.5, 0.49, 7.51, 15.5, 16.0, 255.5]))
    out.append(row("pic-edges", "pic", [0.0, 15.0, 16.0, 255.0, 256.0, 65535.0, 65536.0, 268435455.0, 268435456.0, 2147483646.0]))
    out.append(row("pic-fractional", "pic", intensities(rng, 120, 1.0e5, 0.2)))
    out.append(row("pic-empty", "pic", []))
    out.append(row("pic-one", "pic", [12345.0]))
    out.append(row("pic-two", "pic", [0.0, 3.0]))
    # Intensity-like arrays for short logged float, incl. zeros, tiny and very large values.
    out.append(row("slof-intensity-400", "slof", intensities(rng, 400, 2.0e6, 0.3)))
    out.append(row("slof-intensity-fp100", "slof", intensities(rng, 200, 5.0e4, 0.1), 100.0))
    out.append(row("slof-large", "slof", intensities(rng, 100, 1.0e12, 0.05)))
    out.append(row("slof-small", "slof", intensities(rng, 100, 2.0, 0.25)))
    out.append(row("slof-zeros", "slof", [0.0] * 9))
    out.append(row("slof-empty", "slof", []))
    out.append(row("slof-one", "slof", [98765.4321]))
    out.append(row("slof-two", "slof", [0.0, 1.0e7]))
    out.append(row("slof-fp-given", "slof", [0.0, 1.0, 1000.0], 10.0))
    return out


def main():
    here = os.path.dirname(os.path.abspath(__file__))
    header = "\t".join(["case", "codec", "fixed_point", "fixed_point_source", "input", "encoded_base64", "decoded"])
    with open(os.path.join(here, "numpress.tsv"), "w", encoding="ascii", newline="\n") as f:
        f.write("# Generated by tests/reference/numpress_reference.py (pynumpress); do not edit.\n")
        f.write(header + "\n")
        for line in cases():
            f.write(line + "\n")


if __name__ == "__main__":
    main()
