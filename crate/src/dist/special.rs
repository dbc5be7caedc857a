//! Special functions for log-densities, all from `libm` so results are bit-identical everywhere.

/// ½ log(2π).
pub const HALF_LN_2PI: f64 = 0.918_938_533_204_672_8;
