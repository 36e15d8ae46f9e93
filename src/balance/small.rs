//! The usual system on the stack: at most [`MAX_ROWS`] conservation rows and
//! [`MAX_COLUMNS`] species, at most six independent balances, and an elimination that never
//! leaves `i64`.
//!
//! The elimination is the one [`super::matrix`] runs first (fraction-free Gauss–Jordan with
//! Bareiss's exact division, the same pivot order, the same sign rule, the same work charged),
//! so its reduced rows and null vectors are the very ones the general path would find; only
//! the storage differs: a fixed array instead of heap vectors of `i128` converted to big
//! integers. Anything it cannot finish in `i64` (a product that overflows, too many rows or
//! species) is left to the general path, which starts again from the matrix. The work is
//! committed to the meter only when this path finishes, so a hand-over charges nothing twice.

use super::Column;
use super::matrix::WorkMeter;
use crate::elements::Element;
use num_integer::Integer;

/// Most conservation rows (elements plus the charge) handled on the stack.
pub const MAX_ROWS: usize = 12;
/// Most species (written and added) handled on the stack.
pub const MAX_COLUMNS: usize = 12;
/// Most independent balances handled on the stack (more go to the general path).
const MAX_DIMENSION: usize = 6;

/// An integer basis of the null space of a small conservation matrix, in `i64`: the vectors
/// [`super::matrix::RowEchelon::null_space`] gives, one per free column in ascending order.
pub(super) struct SmallNullSpace {
    columns: usize,
    dimension: usize,
    vectors: [[i64; MAX_COLUMNS]; MAX_DIMENSION],
}

impl SmallNullSpace {
    /// Number of independent balances.
    pub fn dimension(&self) -> usize {
        self.dimension
    }

    /// Basis vector `i`, one entry per species.
    pub fn vector(&self, i: usize) -> &[i64] {
        &self.vectors[i][..self.columns]
    }
}

/// Fills the conservation matrix of `columns` in the order of [`super::conservation_matrix`]
/// (elements in order of first appearance, then the charge when any species is charged).
/// `None` when it does not fit the stack or a count does not fit `i64`.
fn conservation_rows(
    columns: &[Column],
    entries: &mut [[i64; MAX_COLUMNS]; MAX_ROWS],
) -> Option<usize> {
    if columns.len() > MAX_COLUMNS {
        return None;
    }
    let mut elements = [None::<Element>; MAX_ROWS];
    let mut rows = 0;
    for (c, column) in columns.iter().enumerate() {
        for &(element, count) in column.species.composition.counts() {
            let row = match elements[..rows].iter().position(|e| *e == Some(element)) {
                Some(row) => row,
                None => {
                    if rows == MAX_ROWS {
                        return None;
                    }
                    elements[rows] = Some(element);
                    rows += 1;
                    rows - 1
                }
            };
            entries[row][c] = i64::try_from(count).ok()?;
        }
    }
    if columns.iter().any(|c| c.species.charge() != 0) {
        if rows == MAX_ROWS {
            return None;
        }
        for (c, column) in columns.iter().enumerate() {
            let composition = &column.species.composition;
            entries[rows][c] = composition
                .charge()
                .checked_mul(i64::try_from(composition.denominator()).ok()?)?;
        }
        rows += 1;
    }
    Some(rows)
}

/// The null space of the conservation matrix of `columns`; `None` when the system is too
/// large for the stack or a value would overflow `i64` (the general path then starts from
/// scratch, and nothing has been charged). On success the work is charged to `meter`; `None`
/// too when that passes its limit, so that the general path reports the limit where it falls.
pub(super) fn null_space(columns: &[Column], meter: &mut WorkMeter) -> Option<SmallNullSpace> {
    let mut entries = [[0i64; MAX_COLUMNS]; MAX_ROWS];
    let rows = conservation_rows(columns, &mut entries)?;
    if entries[..rows].iter().flatten().any(|&x| x == i64::MIN) {
        return None;
    }
    let columns = columns.len();
    let cannot_overflow = products_fit(&entries[..rows], columns);
    let mut pivot_columns = [0usize; MAX_ROWS];
    let mut rank = 0;
    let mut previous = ExactDivisor::new(1);
    let mut work: u64 = 0;
    for column in 0..columns {
        if rank == rows {
            break;
        }
        let Some(found) = (rank..rows).find(|&r| entries[r][column] != 0) else {
            continue;
        };
        if found != rank {
            entries.swap(rank, found);
        }
        if entries[rank][column] < 0 {
            for x in entries[rank][..columns].iter_mut() {
                *x = x.checked_neg()?;
            }
        }
        let pivot_row = entries[rank];
        let pivot = pivot_row[column];
        for (r, row) in entries[..rows].iter_mut().enumerate() {
            if r == rank {
                continue;
            }
            // As the general path charges a row of machine words: three products each.
            work += 3 * columns as u64;
            let factor = row[column];
            if factor == 0 && pivot == previous.divisor {
                // (pivot·x − 0) / previous = x.
                continue;
            }
            // Updated in place: on overflow the whole attempt is dropped.
            let pairs = row[..columns].iter_mut().zip(&pivot_row[..columns]);
            if cannot_overflow {
                for (x, &p) in pairs {
                    *x = previous.divide(*x * pivot - factor * p);
                }
            } else {
                for (x, &p) in pairs {
                    let product = x
                        .checked_mul(pivot)?
                        .checked_sub(factor.checked_mul(p)?)
                        .filter(|&x| x != i64::MIN)?;
                    *x = previous.divide(product);
                }
            }
        }
        previous = ExactDivisor::new(pivot);
        pivot_columns[rank] = column;
        rank += 1;
    }
    let pivots = &pivot_columns[..rank];
    let reduced = &entries[..rank];
    let mut space = SmallNullSpace {
        columns,
        dimension: 0,
        vectors: [[0i64; MAX_COLUMNS]; MAX_DIMENSION],
    };
    if columns - rank > MAX_DIMENSION {
        return None;
    }
    for free in (0..columns).filter(|c| !pivots.contains(c)) {
        space.vectors[space.dimension] = null_vector(reduced, pivots, columns, free)?;
        space.dimension += 1;
        // The general path charges each null vector `rank + 1` units of one word.
        work += rank as u64 + 1;
    }
    meter.charge(work).ok()?;
    Some(space)
}

/// Whether no product in the elimination can overflow `i64`, by Hadamard's bound: every
/// entry the elimination stores is a minor of the matrix (up to sign), no larger in magnitude
/// than H, the product of the Euclidean norms of the nonzero rows, and every intermediate
/// `x·pivot − factor·p` is at most 2·H². With H² ≤ 2⁶¹ that is below 2⁶³, so the usual
/// chemistry matrix (small counts, a handful of rows) is eliminated without overflow checks.
/// Integer arithmetic only: H² is the product of the squared norms.
fn products_fit(rows: &[[i64; MAX_COLUMNS]], columns: usize) -> bool {
    const LIMIT: u128 = 1 << 61;
    let mut bound: u128 = 1;
    for row in rows {
        let mut squared: u128 = 0;
        for &x in &row[..columns] {
            squared += u128::from(x.unsigned_abs()).pow(2);
            if squared > LIMIT {
                return false;
            }
        }
        bound = bound.saturating_mul(squared.max(1));
        if bound > LIMIT {
            return false;
        }
    }
    true
}

/// The primitive null vector of free column `free` (see `null_vector_big` in
/// [`super::matrix`]): x_free = lcm of the pivots involved, x_pivot(r) = −a_r,free ·
/// (lcm / d_r), divided by the content. `None` on overflow.
fn null_vector(
    reduced: &[[i64; MAX_COLUMNS]],
    pivots: &[usize],
    columns: usize,
    free: usize,
) -> Option<[i64; MAX_COLUMNS]> {
    let mut common: i64 = 1;
    for (row, &pivot_column) in reduced.iter().zip(pivots) {
        if row[free] != 0 {
            let pivot = row[pivot_column];
            common = (common / common.gcd(&pivot)).checked_mul(pivot)?;
        }
    }
    let mut vector = [0i64; MAX_COLUMNS];
    vector[free] = common;
    for (row, &pivot_column) in reduced.iter().zip(pivots) {
        let a = row[free];
        if a != 0 {
            vector[pivot_column] = a.checked_mul(common / row[pivot_column])?.checked_neg()?;
        }
    }
    let content = vector[..columns].iter().fold(0i64, |g, x| g.gcd(x));
    for x in vector[..columns].iter_mut() {
        *x /= content;
    }
    Some(vector)
}

/// Division by a positive `i64` known to divide exactly, as a shift and a multiplication by
/// the inverse of its odd part modulo 2^64: Bareiss's divisions are all exact, and a hardware
/// division takes tens of cycles where a multiplication takes three.
#[derive(Clone, Copy)]
struct ExactDivisor {
    shift: u32,
    inverse: u64,
    divisor: i64,
}

impl ExactDivisor {
    fn new(divisor: i64) -> ExactDivisor {
        debug_assert!(divisor > 0);
        let shift = divisor.trailing_zeros();
        let odd = (divisor >> shift) as u64;
        // Newton's iteration doubles the correct low bits: odd·odd ≡ 1 (mod 8) gives 3,
        // five steps give 96 ≥ 64.
        let mut inverse = odd;
        for _ in 0..5 {
            inverse = inverse.wrapping_mul(2u64.wrapping_sub(odd.wrapping_mul(inverse)));
        }
        ExactDivisor {
            shift,
            inverse,
            divisor,
        }
    }

    /// `value / divisor`, for a `value` the divisor divides.
    fn divide(self, value: i64) -> i64 {
        debug_assert_eq!(value % self.divisor, 0, "inexact division");
        ((value >> self.shift) as u64).wrapping_mul(self.inverse) as i64
    }
}

#[cfg(test)]
mod tests {
    use super::super::{Medium, columns, conservation_matrix, written_species};
    use super::*;
    use crate::balance::matrix;
    use crate::notation::parse_equation;
    use num_bigint::BigInt;

    /// Every skeleton of the published corpus (in acid, in base, as written, with and without
    /// electrons), the alkane family and dense random systems that fit the stack: the small
    /// path gives the very basis of the general one and charges the same work, or hands over.
    #[test]
    fn the_stack_path_finds_what_the_general_path_finds() {
        let corpus: Vec<serde_json::Value> =
            serde_json::from_str(include_str!("../../tests/data/balance_corpus.json")).unwrap();
        let mut texts: Vec<String> = corpus
            .iter()
            .map(|e| e["input"].as_str().unwrap().to_owned())
            .collect();
        for m in 2..=8 {
            let fuels: Vec<String> = (1..=m).map(|n| format!("C{n}H{}", 2 * n + 2)).collect();
            texts.push(format!("{} + O2 -> CO2 + H2O", fuels.join(" + ")));
        }
        // Dense skeletons from a fixed linear congruential sequence (no chemistry).
        let symbols = ["C", "N", "O", "S", "P", "Cl", "Br", "Fe", "Cu", "Zn", "Mn"];
        let mut seed: u64 = 12345;
        let mut next = || {
            seed = seed
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            (seed >> 33) as usize
        };
        for round in 0..300 {
            // Every third system has counts to 3,000, past Hadamard's bound for unchecked
            // products, so that both kinds of elimination are compared.
            let largest = if round % 3 == 0 { 3000 } else { 9 };
            let species = 3 + next() % 10;
            let terms: Vec<String> = (0..species)
                .map(|_| {
                    let mut formula = String::new();
                    for symbol in symbols {
                        if next() % 3 == 0 {
                            formula.push_str(&format!("{symbol}{}", 1 + next() % largest));
                        }
                    }
                    if formula.is_empty() {
                        formula.push('C');
                    }
                    formula
                })
                .collect();
            let cut = 1 + next() % (species - 1);
            texts.push(format!(
                "{} -> {}",
                terms[..cut].join(" + "),
                terms[cut..].join(" + ")
            ));
        }
        let mut compared = 0;
        for text in &texts {
            let Ok(equation) = parse_equation(text) else {
                continue;
            };
            let written = written_species(&equation);
            for medium in [Medium::None, Medium::Acid, Medium::Base] {
                for electrons in [false, true] {
                    let columns = columns(&written, medium, electrons);
                    let mut small_meter = WorkMeter::new(u64::MAX);
                    let Some(space) = null_space(&columns, &mut small_meter) else {
                        continue;
                    };
                    let mut general_meter = WorkMeter::new(u64::MAX);
                    let general = matrix::null_space_within(
                        &conservation_matrix(&columns).0,
                        &mut general_meter,
                    )
                    .unwrap();
                    let small: Vec<Vec<BigInt>> = (0..space.dimension())
                        .map(|i| space.vector(i).iter().map(|&x| BigInt::from(x)).collect())
                        .collect();
                    assert_eq!(small, general, "{text} ({medium}, e- {electrons})");
                    assert_eq!(
                        small_meter.used(),
                        general_meter.used(),
                        "{text} ({medium}, e- {electrons})"
                    );
                    compared += 1;
                }
            }
        }
        assert!(compared > 1200, "only {compared} systems compared");
    }

    /// Hadamard's bound admits the usual matrices and refuses those whose minors could pass
    /// 2⁶¹ (the checked elimination then runs, and hands over on overflow).
    #[test]
    fn products_fit_where_hadamard_allows() {
        let mut rows = [[0i64; MAX_COLUMNS]; MAX_ROWS];
        rows[0][..3].copy_from_slice(&[1, 2, 3]);
        rows[1][..3].copy_from_slice(&[4, 0, -6]);
        assert!(products_fit(&rows[..2], 3));
        rows[2][..3].copy_from_slice(&[1 << 20, 1 << 20, 0]);
        rows[3][..3].copy_from_slice(&[0, 1 << 20, 1 << 20]);
        assert!(!products_fit(&rows[..4], 3));
        rows[0][0] = i64::MAX;
        assert!(!products_fit(&rows[..1], 3));
    }

    #[test]
    fn exact_division_by_the_inverse_is_division() {
        for divisor in (1..2000).chain([1 << 40, 3 << 50, i64::MAX]) {
            let exact = ExactDivisor::new(divisor);
            for quotient in [0i64, 1, -1, 7, -12345, 1 << 20, -(1 << 22)] {
                if let Some(value) = quotient.checked_mul(divisor) {
                    assert_eq!(exact.divide(value), quotient, "{value} / {divisor}");
                }
            }
        }
    }

    /// Past the stack's size, past `i64`, or past the work limit, the small path hands over
    /// without charging anything.
    #[test]
    fn what_does_not_fit_is_handed_over_uncharged() {
        let many: Vec<String> = (1..=17).map(|n| format!("C{n}H{}", 2 * n + 2)).collect();
        // Six-digit subscripts: the minors of a 6 × 6 block pass 10^30.
        let mut seed: u64 = 7;
        let mut n = || {
            seed = seed
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            100_000 + (seed >> 33) % 900_000
        };
        let large: Vec<String> = (0..8)
            .map(|_| format!("C{}H{}O{}N{}S{}P{}", n(), n(), n(), n(), n(), n()))
            .collect();
        let seven: Vec<String> = (1..=7).map(|n| format!("C{n}H{}", 2 * n + 2)).collect();
        for text in [
            format!("{} + O2 -> CO2 + H2O", many.join(" + ")),
            format!("{} + O2 -> CO2 + H2O", seven.join(" + ")),
            format!("{} -> {}", large[..4].join(" + "), large[4..].join(" + ")),
        ] {
            let equation = parse_equation(&text).unwrap();
            let written = written_species(&equation);
            let columns = columns(&written, Medium::None, false);
            let mut meter = WorkMeter::new(u64::MAX);
            assert!(null_space(&columns, &mut meter).is_none(), "{text}");
            assert_eq!(meter.used(), 0, "{text}");
        }
        let equation = parse_equation("MnO4- + Fe2+ -> Mn2+ + Fe3+").unwrap();
        let written = written_species(&equation);
        let columns = columns(&written, Medium::Acid, false);
        let mut tight = WorkMeter::new(10);
        assert!(null_space(&columns, &mut tight).is_none());
    }
}
