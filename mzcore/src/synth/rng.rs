//! A small deterministic random number generator, written out here so that generated files
//! stay bit-identical whatever crate versions are in the lock file.
//!
//! Seeding uses SplitMix64 and the stream is xoshiro256** (Blackman and Vigna, "Scrambled
//! linear pseudorandom number generators", ACM Trans. Math. Softw. 47(4), 2021; constants
//! from memory, checked against the published first outputs in the unit tests below).
//! Normal deviates come from the Box-Muller transform (Box and Muller, Ann. Math. Statist.
//! 29, 610-611, 1958).

/// One SplitMix64 step: advances `state` and returns the next output.
pub fn splitmix64(state: &mut u64) -> u64 {
    *state = state.wrapping_add(0x9E37_79B9_7F4A_7C15);
    let mut z = *state;
    z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
    z ^ (z >> 31)
}

/// Mixes two words into one seed (for per-run and per-scan streams).
pub fn mix(a: u64, b: u64) -> u64 {
    let mut s = a ^ b.wrapping_mul(0xD6E8_FEB8_6659_FD93);
    splitmix64(&mut s)
}

/// FNV-1a hash of a text (to derive a run's stream from its name).
pub fn hash_text(text: &str) -> u64 {
    let mut h: u64 = 0xCBF2_9CE4_8422_2325;
    for b in text.bytes() {
        h ^= u64::from(b);
        h = h.wrapping_mul(0x0000_0100_0000_01B3);
    }
    h
}

/// xoshiro256** generator with a cached second Box-Muller deviate.
#[derive(Debug, Clone)]
pub struct Rng {
    s: [u64; 4],
    spare: Option<f64>,
}

impl Rng {
    /// A generator whose state is filled from `seed` by SplitMix64.
    pub fn new(seed: u64) -> Rng {
        let mut sm = seed;
        let s =
            [splitmix64(&mut sm), splitmix64(&mut sm), splitmix64(&mut sm), splitmix64(&mut sm)];
        Rng { s, spare: None }
    }

    /// The next 64 random bits.
    pub fn next_u64(&mut self) -> u64 {
        let s = &mut self.s;
        let result = s[1].wrapping_mul(5).rotate_left(7).wrapping_mul(9);
        let t = s[1] << 17;
        s[2] ^= s[0];
        s[3] ^= s[1];
        s[1] ^= s[2];
        s[0] ^= s[3];
        s[2] ^= t;
        s[3] = s[3].rotate_left(45);
        result
    }

    /// Uniform in [0, 1) with 53 random bits.
    pub fn uniform(&mut self) -> f64 {
        (self.next_u64() >> 11) as f64 * (1.0 / (1u64 << 53) as f64)
    }

    /// Uniform in (0, 1]: safe to take the logarithm of.
    pub fn uniform_open(&mut self) -> f64 {
        1.0 - self.uniform()
    }

    /// Standard normal deviate (Box-Muller, both values used).
    pub fn normal(&mut self) -> f64 {
        if let Some(z) = self.spare.take() {
            return z;
        }
        let r = (-2.0 * self.uniform_open().ln()).sqrt();
        let (s, c) = (std::f64::consts::TAU * self.uniform()).sin_cos();
        self.spare = Some(r * s);
        r * c
    }

    /// Exponential deviate with mean 1.
    pub fn exponential(&mut self) -> f64 {
        -self.uniform_open().ln()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn splitmix64_matches_the_reference_outputs() {
        // Reference: the first outputs of splitmix64.c (Vigna, public domain) seeded with 0,
        // as quoted in many ports (from memory): e220a8397b1dcdaf, 6e789e6aa1b965f4.
        let mut s = 0u64;
        assert_eq!(splitmix64(&mut s), 0xE220_A839_7B1D_CDAF);
        assert_eq!(splitmix64(&mut s), 0x6E78_9E6A_A1B9_65F4);
    }

    #[test]
    fn xoshiro256starstar_matches_the_reference_sequence() {
        // Reference: xoshiro256** with state [1, 2, 3, 4] (Vigna's xoshiro256starstar.c);
        // first outputs 11520, 0, 1509978240, 1215971899390074240 (from memory; they follow
        // by hand from the algorithm: 2*5 rotl 7 = 1280, *9 = 11520).
        let mut r = Rng { s: [1, 2, 3, 4], spare: None };
        assert_eq!(r.next_u64(), 11520);
        assert_eq!(r.next_u64(), 0);
        assert_eq!(r.next_u64(), 1_509_978_240);
        assert_eq!(r.next_u64(), 1_215_971_899_390_074_240);
    }

    #[test]
    fn normal_deviates_have_unit_variance() {
        let mut r = Rng::new(7);
        let n = 200_000;
        let xs: Vec<f64> = (0..n).map(|_| r.normal()).collect();
        let mean = xs.iter().sum::<f64>() / n as f64;
        let var = xs.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / n as f64;
        // Standard errors: mean 1/sqrt(n) = 0.0022, variance sqrt(2/n) = 0.0032.
        assert!(mean.abs() < 0.01, "mean {mean}");
        assert!((var - 1.0).abs() < 0.015, "variance {var}");
    }
}
