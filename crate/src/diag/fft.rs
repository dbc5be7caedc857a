//! A small radix-2 fast Fourier transform, used only to get every lag of a chain's autocovariance
//! in O(N log N).
//!
//! Why not `rustfft`: diagnostics must come out bit-identical natively and in wasm, because a shared
//! link reproduces the whole report. `rustfft` picks SIMD code paths at run time (different
//! summation orders on different machines) and computes its twiddle factors with the platform's
//! `sin`/`cos`. Here the twiddles come from `libm` and the butterflies run in one fixed order, with
//! plain IEEE additions and multiplications, so every platform gets the same bits.

use core::f64::consts::PI;

/// A transform of one power-of-two length, with its twiddle factors computed once.
pub(crate) struct Fft {
    len: usize,
    /// Per butterfly stage of span 2, 4, …, len, the factors exp(−2πik/span) for k < span/2, laid
    /// out one stage after another (span/2 values starting at index span/2 − 1) so each stage reads
    /// them contiguously. Real and imaginary parts apart.
    twiddle_re: Vec<f64>,
    twiddle_im: Vec<f64>,
}

impl Fft {
    /// A transform of length `len`, which must be a power of two (≥ 1).
    pub(crate) fn new(len: usize) -> Self {
        debug_assert!(len.is_power_of_two());
        // exp(−2πik/span) = exp(−2πi·k(len/span)/len): every stage reuses the values of the last one.
        let angle = |j: usize| 2.0 * PI * j as f64 / len as f64;
        let cos: Vec<f64> = (0..len / 2).map(|j| libm::cos(angle(j))).collect();
        let sin: Vec<f64> = (0..len / 2).map(|j| -libm::sin(angle(j))).collect();
        let mut twiddle_re = Vec::with_capacity(len);
        let mut twiddle_im = Vec::with_capacity(len);
        let mut span = 2;
        while span <= len {
            let stride = len / span;
            twiddle_re.extend((0..span / 2).map(|k| cos[k * stride]));
            twiddle_im.extend((0..span / 2).map(|k| sin[k * stride]));
            span *= 2;
        }
        Fft { len, twiddle_re, twiddle_im }
    }

    /// In place: X_k = Σ_j x_j exp(−2πi jk/len) (iterative Cooley–Tukey, decimation in time).
    pub(crate) fn forward(&self, re: &mut [f64], im: &mut [f64]) {
        let n = self.len;
        debug_assert!(re.len() == n && im.len() == n);
        // Bit-reversal permutation.
        let mut j = 0;
        for i in 1..n {
            let mut bit = n >> 1;
            while j & bit != 0 {
                j ^= bit;
                bit >>= 1;
            }
            j |= bit;
            if i < j {
                re.swap(i, j);
                im.swap(i, j);
            }
        }
        let mut span = 2;
        while span <= n {
            let half = span / 2;
            let w_re = &self.twiddle_re[half - 1..span - 1];
            let w_im = &self.twiddle_im[half - 1..span - 1];
            for (block_re, block_im) in re.chunks_exact_mut(span).zip(im.chunks_exact_mut(span)) {
                let (a_re, b_re) = block_re.split_at_mut(half);
                let (a_im, b_im) = block_im.split_at_mut(half);
                for k in 0..half {
                    let (wr, wi) = (w_re[k], w_im[k]);
                    let tr = wr * b_re[k] - wi * b_im[k];
                    let ti = wr * b_im[k] + wi * b_re[k];
                    b_re[k] = a_re[k] - tr;
                    b_im[k] = a_im[k] - ti;
                    a_re[k] += tr;
                    a_im[k] += ti;
                }
            }
            span *= 2;
        }
    }
}

/// The biased autocovariances c_t = (1/N) Σ_{n<N−t} (x_n − x̄)(x_{n+t} − x̄), t = 0..N−1, of every
/// chain (each of length `len`, stored one after another in `values`), returned in the same layout.
///
/// Each chain is centred and zero-padded to a power of two ≥ 2N (so the circular correlation equals
/// the linear one); c = IFFT(|FFT(x)|²)/N. Two real chains share one complex transform (one in the
/// real part, one in the imaginary part), which halves the work.
pub(crate) fn autocovariances(values: &[f64], len: usize) -> Vec<f64> {
    let mut out = vec![0.0; values.len()];
    if len == 0 {
        return out;
    }
    let size = (2 * len).next_power_of_two();
    let fft = Fft::new(size);
    let mut re = vec![0.0; size];
    let mut im = vec![0.0; size];
    let chains: Vec<&[f64]> = values.chunks_exact(len).collect();
    for (pair_index, pair) in chains.chunks(2).enumerate() {
        re.fill(0.0);
        im.fill(0.0);
        centre_into(pair[0], &mut re[..len]);
        if let Some(second) = pair.get(1) {
            centre_into(second, &mut im[..len]);
        }
        fft.forward(&mut re, &mut im);
        // Untangle the two spectra: with Z = X + iY for real x, y,
        // |X_k|² = |Z_k + conj Z_{n−k}|²/4 and |Y_k|² = |Z_k − conj Z_{n−k}|²/4.
        for k in 0..=size / 2 {
            let r = (size - k) % size;
            let (zr, zi, cr, ci) = (re[k], im[k], re[r], im[r]);
            let power_x = 0.25 * ((zr + cr) * (zr + cr) + (zi - ci) * (zi - ci));
            let power_y = 0.25 * ((zr - cr) * (zr - cr) + (zi + ci) * (zi + ci));
            re[k] = power_x;
            re[r] = power_x;
            im[k] = power_y;
            im[r] = power_y;
        }
        // Both power spectra are real and even, so a forward transform is the inverse up to 1/size,
        // and it keeps the two results apart in the real and imaginary parts.
        fft.forward(&mut re, &mut im);
        let scale = 1.0 / (size as f64 * len as f64);
        let first = 2 * pair_index * len;
        for t in 0..len {
            out[first + t] = re[t] * scale;
        }
        if pair.len() == 2 {
            for t in 0..len {
                out[first + len + t] = im[t] * scale;
            }
        }
    }
    out
}

fn centre_into(chain: &[f64], dest: &mut [f64]) {
    let mean = super::draws::mean(chain);
    for (d, &x) in dest.iter_mut().zip(chain) {
        *d = x - mean;
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::rng::Stream;

    /// The definition, summed directly in O(N²).
    fn direct(chain: &[f64]) -> Vec<f64> {
        let n = chain.len();
        let mean = chain.iter().sum::<f64>() / n as f64;
        (0..n).map(|t| (0..n - t).map(|i| (chain[i] - mean) * (chain[i + t] - mean)).sum::<f64>() / n as f64).collect()
    }

    /// FFT autocovariances against the direct sum of the definition (Vehtari et al. 2021, §3.2's
    /// autocovariance), for odd and even chain counts and lengths that are and are not powers of two.
    /// The tolerance is relative to c_0: the FFT's rounding error is about ε·log₂(size)·c_0.
    #[test]
    fn fft_autocovariance_matches_direct_sum() {
        let mut rng = Stream::new(11, 0);
        for &(chains, len) in &[(1usize, 1usize), (1, 2), (3, 7), (2, 64), (5, 100), (4, 333)] {
            let mut x = 0.0;
            let values: Vec<f64> = (0..chains * len)
                .map(|_| {
                    x = 0.8 * x + rng.normal() + 3.0;
                    x
                })
                .collect();
            let fast = autocovariances(&values, len);
            for m in 0..chains {
                let chain = &values[m * len..(m + 1) * len];
                let slow = direct(chain);
                let scale = slow[0].abs().max(f64::MIN_POSITIVE);
                for t in 0..len {
                    let err = (fast[m * len + t] - slow[t]).abs() / scale;
                    assert!(err < 1e-14, "{chains}×{len}, chain {m}, lag {t}: {} vs {}", fast[m * len + t], slow[t]);
                }
            }
        }
    }

    /// The transform itself against the O(N²) DFT sum, on a complex input.
    #[test]
    fn fft_matches_direct_dft() {
        let n = 32;
        let mut rng = Stream::new(5, 1);
        let x_re: Vec<f64> = (0..n).map(|_| rng.normal()).collect();
        let x_im: Vec<f64> = (0..n).map(|_| rng.normal()).collect();
        let (mut re, mut im) = (x_re.clone(), x_im.clone());
        Fft::new(n).forward(&mut re, &mut im);
        for k in 0..n {
            let (mut sr, mut si) = (0.0, 0.0);
            for j in 0..n {
                let a = -2.0 * PI * ((j * k) % n) as f64 / n as f64;
                let (c, s) = (libm::cos(a), libm::sin(a));
                sr += x_re[j] * c - x_im[j] * s;
                si += x_re[j] * s + x_im[j] * c;
            }
            assert!((re[k] - sr).abs() < 1e-12 && (im[k] - si).abs() < 1e-12, "bin {k}");
        }
    }
}
