//! Seeded random streams whose draws are bit-identical natively and in wasm.
//!
//! The generator is ChaCha8 (Bernstein 2008) from `rand_chacha`; every chain gets its own stream
//! of one seed, so chains are independent and reproducible. Uniforms take the top 53 bits of a
//! `u64`; normals use Marsaglia's polar method (Marsaglia & Bray 1964) and exponentials inversion,
//! with logarithms from `libm` so no platform maths enters a draw.

use rand_chacha::ChaCha8Rng;
use rand_core::{Rng, SeedableRng};

/// One reproducible stream of random numbers.
#[derive(Clone, Debug)]
pub struct Stream {
    rng: ChaCha8Rng,
    /// The polar method makes normals in pairs; the second waits here.
    spare_normal: Option<f64>,
}

impl Stream {
    /// Stream `index` of `seed`: distinct indices give independent streams.
    pub fn new(seed: u64, index: u64) -> Self {
        let mut rng = ChaCha8Rng::seed_from_u64(seed);
        rng.set_stream(index);
        Stream { rng, spare_normal: None }
    }

    /// Uniform on [0, 1).
    #[inline]
    pub fn uniform(&mut self) -> f64 {
        (self.rng.next_u64() >> 11) as f64 * (1.0 / (1u64 << 53) as f64)
    }

    /// Uniform on (0, 1): never exactly zero, so its logarithm is finite.
    #[inline]
    pub fn open_uniform(&mut self) -> f64 {
        ((self.rng.next_u64() >> 11) as f64 + 0.5) * (1.0 / (1u64 << 53) as f64)
    }

    /// Uniform integer in 0..n (n > 0), by Lemire's multiply-shift with rejection.
    pub fn below(&mut self, n: u64) -> u64 {
        let zone = n.wrapping_neg() % n;
        loop {
            let m = (self.rng.next_u64() as u128) * (n as u128);
            if (m as u64) >= zone {
                return (m >> 64) as u64;
            }
        }
    }

    /// Standard normal.
    pub fn normal(&mut self) -> f64 {
        if let Some(z) = self.spare_normal.take() {
            return z;
        }
        loop {
            let u = 2.0 * self.uniform() - 1.0;
            let v = 2.0 * self.uniform() - 1.0;
            let s = u * u + v * v;
            if s > 0.0 && s < 1.0 {
                let factor = (-2.0 * libm::log(s) / s).sqrt();
                self.spare_normal = Some(v * factor);
                return u * factor;
            }
        }
    }

    /// Standard exponential (rate 1).
    pub fn exponential(&mut self) -> f64 {
        -libm::log(self.open_uniform())
    }

    /// A fresh seed from the operating system or browser, for runs the user did not seed. The
    /// seed is then reported, so even these runs can be repeated. It is below 2⁵³, so that it
    /// travels through JavaScript and JSON exactly.
    pub fn entropy_seed() -> u64 {
        getrandom::u64().unwrap_or(0x6d69_7877_656c_6c21) >> 11
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn same_seed_same_draws_other_stream_other_draws() {
        let draws = |seed, index| {
            let mut s = Stream::new(seed, index);
            (0..5).map(|_| s.normal()).collect::<Vec<_>>()
        };
        assert_eq!(draws(7, 0), draws(7, 0));
        assert_ne!(draws(7, 0), draws(7, 1));
        assert_ne!(draws(7, 0), draws(8, 0));
    }

    /// Moments of 10⁶ draws against N(0,1), Exp(1) and U(0,1): each tolerance is 5 standard errors
    /// (sd of the sample mean σ/√n; of the sample variance σ²·√(2/n) for the normal).
    #[test]
    fn draws_have_the_right_moments() {
        let n = 1_000_000;
        let mut s = Stream::new(42, 3);
        let normals: Vec<f64> = (0..n).map(|_| s.normal()).collect();
        let mean = normals.iter().sum::<f64>() / n as f64;
        let var = normals.iter().map(|z| (z - mean).powi(2)).sum::<f64>() / n as f64;
        assert!(mean.abs() < 5.0 / (n as f64).sqrt(), "normal mean {mean}");
        assert!((var - 1.0).abs() < 5.0 * (2.0 / n as f64).sqrt(), "normal variance {var}");
        let exp_mean = (0..n).map(|_| s.exponential()).sum::<f64>() / n as f64;
        assert!((exp_mean - 1.0).abs() < 5.0 / (n as f64).sqrt(), "exponential mean {exp_mean}");
        let u_mean = (0..n).map(|_| s.uniform()).sum::<f64>() / n as f64;
        assert!((u_mean - 0.5).abs() < 5.0 * (1.0f64 / 12.0).sqrt() / (n as f64).sqrt(), "uniform mean {u_mean}");
        let counts = (0..n).fold([0usize; 3], |mut c, _| {
            c[s.below(3) as usize] += 1;
            c
        });
        let expected = n as f64 / 3.0;
        let sd = (n as f64 * (1.0 / 3.0) * (2.0 / 3.0)).sqrt();
        assert!(counts.iter().all(|&c| (c as f64 - expected).abs() < 5.0 * sd), "{counts:?}");
    }
}
