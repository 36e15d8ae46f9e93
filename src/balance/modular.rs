//! The one-dimensional integer null space of a wide matrix of full row rank, by elimination
//! modulo word-sized primes and Chinese remaindering: the fast path for large dense systems
//! whose minors overflow `i128`.
//!
//! With `r` rows of rank `r` and `r + 1` columns, the null space is one line. Modulo a prime
//! `p` for which the rank is still `r`, let `f` be the column without a pivot; then the columns
//! other than `f` are independent over the rationals too, and `w = D·x`, with `x_f = 1` and `D`
//! the determinant of the matrix without column `f`, is an integer vector of signed minors
//! (Cramer's rule) whose residues are `D·x mod p`. Every minor is below Hadamard's bound `H`
//! (the product of the rows' Euclidean lengths), so residues modulo primes whose product
//! exceeds `2H` fix `w` exactly. Primes that disagree on `f` end the attempt (the caller then
//! eliminates in big integers); nothing here is a guess, and the result is the primitive
//! vector of that line, positive in its last nonzero entry (the free column of the reduced
//! row echelon form), as [`super::matrix::RowEchelon::null_space`] gives it.

use super::matrix::{IntegerMatrix, WorkLimitReached, WorkMeter};
use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Signed, Zero};

/// The 64 largest primes below 2³¹ (listed with sympy's `prevprime`; `tests::primes_are_prime`
/// checks them): products of two residues fit `u64`.
const PRIMES: [u64; 64] = [
    2147483647, 2147483629, 2147483587, 2147483579, 2147483563, 2147483549, 2147483543, 2147483497,
    2147483489, 2147483477, 2147483423, 2147483399, 2147483353, 2147483323, 2147483269, 2147483249,
    2147483237, 2147483179, 2147483171, 2147483137, 2147483123, 2147483077, 2147483069, 2147483059,
    2147483053, 2147483033, 2147483029, 2147482951, 2147482949, 2147482943, 2147482937, 2147482921,
    2147482877, 2147482873, 2147482867, 2147482859, 2147482819, 2147482817, 2147482811, 2147482801,
    2147482763, 2147482739, 2147482697, 2147482693, 2147482681, 2147482663, 2147482661, 2147482621,
    2147482591, 2147482583, 2147482577, 2147482507, 2147482501, 2147482481, 2147482417, 2147482409,
    2147482367, 2147482361, 2147482349, 2147482343, 2147482327, 2147482291, 2147482273, 2147482237,
];

/// Each prime exceeds 2³⁰, so this many bits of modulus come with each one.
const BITS_PER_PRIME: u64 = 30;

/// Arithmetic modulo one prime below 2³¹, with Barrett reduction (no hardware division in
/// the inner loop).
#[derive(Clone, Copy)]
struct Modulus {
    prime: u64,
    /// ⌊2⁶⁴ / prime⌋.
    barrett: u64,
}

impl Modulus {
    fn new(prime: u64) -> Modulus {
        Modulus {
            prime,
            barrett: (u128::from(u64::MAX) / u128::from(prime)) as u64,
        }
    }

    /// `x mod prime` for any `x < 2⁶⁴`.
    fn reduce(self, x: u64) -> u64 {
        let quotient = ((u128::from(x) * u128::from(self.barrett)) >> 64) as u64;
        let remainder = x - quotient * self.prime;
        if remainder >= self.prime {
            remainder - self.prime
        } else {
            remainder
        }
    }

    fn residue_of(self, x: i128) -> u64 {
        x.rem_euclid(i128::from(self.prime)) as u64
    }

    fn multiply(self, a: u64, b: u64) -> u64 {
        self.reduce(a * b)
    }

    fn inverse(self, a: u64) -> u64 {
        // Fermat: a^(p−2).
        let (mut result, mut base, mut exponent) = (1u64, a, self.prime - 2);
        while exponent > 0 {
            if exponent & 1 == 1 {
                result = self.multiply(result, base);
            }
            base = self.multiply(base, base);
            exponent >>= 1;
        }
        result
    }
}

/// Bits of Hadamard's bound on every minor of `matrix`: each row's length is below
/// `2^⌈bits(Σ a²)/2⌉`, and the bound is the product over the rows.
pub(super) fn hadamard_bits(matrix: &IntegerMatrix) -> Option<u64> {
    let mut bits = 0u64;
    for r in 0..matrix.rows() {
        let mut squares: u128 = 0;
        for c in 0..matrix.columns() {
            let x = matrix.get(r, c).unsigned_abs();
            squares = squares.checked_add(x.checked_mul(x)?)?;
        }
        bits += u64::from(128 - squares.leading_zeros()).div_ceil(2);
    }
    Some(bits)
}

/// `D·x mod p` and the free column `f` (see the module documentation), or `None` when the
/// rank modulo `p` is below the number of rows.
fn residues(
    matrix: &IntegerMatrix,
    modulus: Modulus,
    work: &mut Vec<u64>,
) -> Option<(Vec<u64>, usize)> {
    let (rows, columns) = (matrix.rows(), matrix.columns());
    work.clear();
    work.extend(
        (0..rows)
            .flat_map(|r| (0..columns).map(move |c| (r, c)))
            .map(|(r, c)| modulus.residue_of(matrix.get(r, c))),
    );
    let p = modulus.prime;
    let mut pivots: Vec<usize> = Vec::with_capacity(rows);
    let mut free = None;
    let mut determinant = 1u64;
    let mut negative = false;
    for column in 0..columns {
        let rank = pivots.len();
        if rank == rows {
            free.get_or_insert(column);
            break;
        }
        let Some(found) = (rank..rows).find(|&r| work[r * columns + column] != 0) else {
            if free.replace(column).is_some() {
                return None;
            }
            continue;
        };
        if found != rank {
            for c in 0..columns {
                work.swap(rank * columns + c, found * columns + c);
            }
            negative = !negative;
        }
        let pivot = work[rank * columns + column];
        determinant = modulus.multiply(determinant, pivot);
        let inverse = modulus.inverse(pivot);
        let (top, below) = work.split_at_mut((rank + 1) * columns);
        let pivot_row = &top[rank * columns..];
        for row in below.chunks_mut(columns) {
            let entry = row[column];
            if entry == 0 {
                continue;
            }
            let factor = p - modulus.multiply(entry, inverse);
            for c in column..columns {
                row[c] = modulus.reduce(row[c] + factor * pivot_row[c]);
            }
        }
        pivots.push(column);
    }
    if pivots.len() < rows {
        return None;
    }
    let free = free.unwrap_or(columns - 1);
    if columns != rows + 1 {
        return None;
    }
    // Back-substitution with x_free = 1, then the scale D (with the sign of the row swaps).
    let mut x = vec![0u64; columns];
    x[free] = 1;
    for (r, &pivot_column) in pivots.iter().enumerate().rev() {
        let row = &work[r * columns..(r + 1) * columns];
        let mut sum = 0u64;
        for c in pivot_column + 1..columns {
            sum = modulus.reduce(sum + modulus.multiply(row[c], x[c]));
        }
        x[pivot_column] = modulus.multiply(p - sum, modulus.inverse(row[pivot_column])) % p;
    }
    let scale = if negative {
        (p - determinant) % p
    } else {
        determinant
    };
    Some((
        x.into_iter().map(|v| modulus.multiply(v, scale)).collect(),
        free,
    ))
}

/// The primitive integer vector spanning the null space of `matrix`, when `matrix` has one
/// more column than rows and full row rank modulo the primes tried; `None` otherwise (the
/// caller eliminates in big integers). Charges `meter` about one unit per multiply.
pub fn one_dimensional_null_space(
    matrix: &IntegerMatrix,
    meter: &mut WorkMeter,
) -> Result<Option<Vec<BigInt>>, WorkLimitReached> {
    let (rows, columns) = (matrix.rows(), matrix.columns());
    if rows == 0 || columns != rows + 1 {
        return Ok(None);
    }
    let Some(bound_bits) = hadamard_bits(matrix) else {
        return Ok(None);
    };
    // The product of the primes must exceed 2H.
    let primes = (bound_bits + 2).div_ceil(BITS_PER_PRIME) as usize;
    if primes > PRIMES.len() {
        return Ok(None);
    }
    let per_prime = (rows * rows * columns / 2 + rows * columns) as u64;
    let mut work = Vec::with_capacity(rows * columns);
    let mut combined: Vec<BigInt> = vec![BigInt::zero(); columns];
    let mut product = BigInt::one();
    let mut free_column = None;
    for &prime in &PRIMES[..primes] {
        meter.charge(per_prime)?;
        let modulus = Modulus::new(prime);
        let Some((residues, free)) = residues(matrix, modulus, &mut work) else {
            return Ok(None);
        };
        if *free_column.get_or_insert(free) != free {
            return Ok(None);
        }
        // Garner's step: x ≡ combined (mod product) and x ≡ residue (mod prime).
        let product_mod = modulus.reduce((&product % prime).try_into().unwrap_or(0));
        let inverse = modulus.inverse(product_mod);
        let words = product.bits() / 64 + 1;
        meter.charge(columns as u64 * words)?;
        for (value, residue) in combined.iter_mut().zip(residues) {
            let current: u64 = (&*value % prime).try_into().unwrap_or(0);
            let difference = (residue + prime - current) % prime;
            let step = modulus.multiply(difference, inverse);
            if step != 0 {
                *value += &product * step;
            }
        }
        product *= prime;
    }
    // Symmetric residues: the minors lie in (−product/2, product/2).
    let half = &product >> 1u32;
    for value in combined.iter_mut() {
        if *value > half {
            *value -= &product;
        }
    }
    let content = combined.iter().fold(BigInt::zero(), |g, x| g.gcd(x));
    if content.is_zero() {
        return Ok(None);
    }
    let last_nonzero_negative = combined
        .iter()
        .rev()
        .find(|x| !x.is_zero())
        .is_some_and(|x| x.is_negative());
    let divisor = if last_nonzero_negative {
        -content
    } else {
        content
    };
    Ok(Some(combined.iter().map(|x| x / &divisor).collect()))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::balance::matrix::RowEchelon;

    #[test]
    fn primes_are_prime() {
        for p in PRIMES {
            assert!(p > 1 << BITS_PER_PRIME && p < 1 << 31);
            assert!(
                (2..=46_341u64)
                    .take_while(|d| d * d <= p)
                    .all(|d| p % d != 0),
                "{p}"
            );
        }
    }

    #[test]
    fn barrett_reduction_is_the_remainder() {
        let modulus = Modulus::new(PRIMES[5]);
        let mut x: u64 = 0x9e37_79b9_7f4a_7c15;
        for _ in 0..10_000 {
            x = x.wrapping_mul(6_364_136_223_846_793_005).wrapping_add(1);
            assert_eq!(modulus.reduce(x), x % PRIMES[5]);
        }
        assert_eq!(modulus.reduce(u64::MAX), u64::MAX % PRIMES[5]);
    }

    #[test]
    fn modular_null_space_equals_the_big_integer_one() {
        // Square-plus-one matrices of our own, dense, with entries to 10^6: the minors run to
        // hundreds of bits, and the result must be the big-integer elimination's vector.
        let mut state: u64 = 0x2545_f491_4f6c_dd1d;
        let mut next = |n: u64| {
            state = state
                .wrapping_mul(6_364_136_223_846_793_005)
                .wrapping_add(1_442_695_040_888_963_407);
            (state >> 33) % n
        };
        let mut solved = 0;
        for size in [2usize, 5, 12, 20, 31] {
            for bound in [9u64, 1_000_000] {
                let mut m = IntegerMatrix::zeros(size, size + 1);
                for r in 0..size {
                    for c in 0..=size {
                        if next(3) > 0 {
                            let x = next(bound) as i128;
                            m.set(r, c, if next(2) == 0 { x } else { -x });
                        }
                    }
                }
                let reference = RowEchelon::new_big(&m).null_space();
                let fast = one_dimensional_null_space(&m, &mut WorkMeter::new(u64::MAX)).unwrap();
                match fast {
                    Some(vector) => {
                        assert_eq!(vec![vector], reference, "{m:?}");
                        solved += 1;
                    }
                    None => assert_ne!(reference.len(), 1, "{m:?}"),
                }
            }
        }
        assert!(solved >= 8, "{solved}");
        // Dependent rows: rank below the number of rows, no answer from here.
        let m = IntegerMatrix::from_rows(&[vec![1, 2, 3], vec![2, 4, 6]]).unwrap();
        assert_eq!(
            one_dimensional_null_space(&m, &mut WorkMeter::new(u64::MAX)),
            Ok(None)
        );
    }
}
