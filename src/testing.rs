//! What the unit tests share.

/// A fixed sequence of numbers in [0, 1) from `seed`, the same on every machine: a 64-bit
/// linear congruential generator with the multiplier and increment of Knuth's MMIX (The Art
/// of Computer Programming, vol. 2, 3.3.4), its top 53 bits taken as the fraction.
pub fn numbers(mut seed: u64) -> impl FnMut() -> f64 {
    move || {
        seed = seed
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (seed >> 11) as f64 / (1u64 << 53) as f64
    }
}
