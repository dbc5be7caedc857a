//! The standard normal distribution function and quantiles used by diagnostics and the tuner.

/// Φ(z), the standard normal distribution function.
pub fn normal_cdf(z: f64) -> f64 {
    0.5 * libm::erfc(-z * core::f64::consts::FRAC_1_SQRT_2)
}

/// φ(z), the standard normal density.
pub fn normal_pdf(z: f64) -> f64 {
    libm::exp(-0.5 * z * z) / (2.0 * core::f64::consts::PI).sqrt()
}
