//! Exact integer linear algebra for balancing: the reduced row echelon form of an integer
//! matrix and the integer basis of its null space, with no floating point anywhere.
//!
//! Elimination is fraction-free: a row is combined with the pivot row by cross-multiplying and
//! then divided by the gcd of its entries, so every entry stays an integer and stays small.
//! It first runs in `i128` with checked arithmetic; the moment any product or difference would
//! overflow, the whole elimination restarts in `BigInt`. Published hard equations reach
//! coefficients in the thousands, and their intermediate values do overflow 64 bits, so the
//! fallback is a real path, not a formality (it is tested against the big-integer path).

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{Signed, Zero};

/// A dense integer matrix, row-major.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct IntegerMatrix {
    rows: usize,
    columns: usize,
    entries: Vec<i128>,
}

impl IntegerMatrix {
    /// A `rows × columns` matrix of zeros.
    pub fn zeros(rows: usize, columns: usize) -> IntegerMatrix {
        IntegerMatrix {
            rows,
            columns,
            entries: vec![0; rows * columns],
        }
    }

    /// A matrix from its rows; `None` when the rows differ in length.
    pub fn from_rows(rows: &[Vec<i128>]) -> Option<IntegerMatrix> {
        let columns = rows.first().map_or(0, Vec::len);
        if rows.iter().any(|r| r.len() != columns) {
            return None;
        }
        Some(IntegerMatrix {
            rows: rows.len(),
            columns,
            entries: rows.concat(),
        })
    }

    /// Number of rows.
    pub fn rows(&self) -> usize {
        self.rows
    }

    /// Number of columns.
    pub fn columns(&self) -> usize {
        self.columns
    }

    /// The entry at `row`, `column`.
    pub fn get(&self, row: usize, column: usize) -> i128 {
        self.entries[row * self.columns + column]
    }

    /// Sets the entry at `row`, `column`.
    pub fn set(&mut self, row: usize, column: usize, value: i128) {
        self.entries[row * self.columns + column] = value;
    }

    /// The same matrix without one row.
    pub fn without_row(&self, row: usize) -> IntegerMatrix {
        let mut entries = Vec::with_capacity(self.entries.len());
        for r in (0..self.rows).filter(|&r| r != row) {
            entries.extend_from_slice(&self.entries[r * self.columns..(r + 1) * self.columns]);
        }
        IntegerMatrix {
            rows: self.rows - 1,
            columns: self.columns,
            entries,
        }
    }

    /// The product of this matrix with an integer column vector, exactly.
    pub fn times(&self, vector: &[BigInt]) -> Vec<BigInt> {
        (0..self.rows)
            .map(|r| {
                (0..self.columns)
                    .map(|c| BigInt::from(self.get(r, c)) * &vector[c])
                    .sum()
            })
            .collect()
    }
}

/// The integers elimination can run in: checked machine integers or big integers.
trait Ring: Clone {
    /// `None` when the value does not fit.
    fn from_i128(value: i128) -> Option<Self>;
    fn zero_value() -> Self;
    fn into_i128(self) -> Option<i128>;
    fn is_zero(&self) -> bool;
    fn is_negative(&self) -> bool;
    /// `a·b − c·d`, `None` on overflow.
    fn mul_sub(a: &Self, b: &Self, c: &Self, d: &Self) -> Option<Self>;
    fn gcd(&self, other: &Self) -> Self;
    /// Division known to be exact.
    fn div_exact(&self, divisor: &Self) -> Self;
    fn negated(&self) -> Option<Self>;
}

/// The machine-integer rings: checked arithmetic, and `MIN` is never stored, because its
/// magnitude does not fit, so gcd and negation of it would overflow later.
macro_rules! machine_ring {
    ($int:ty) => {
        impl Ring for $int {
            fn from_i128(value: i128) -> Option<Self> {
                <$int>::try_from(value).ok()
            }
            fn zero_value() -> Self {
                0
            }
            fn into_i128(self) -> Option<i128> {
                Some(i128::from(self))
            }
            fn is_zero(&self) -> bool {
                *self == 0
            }
            fn is_negative(&self) -> bool {
                *self < 0
            }
            fn mul_sub(a: &Self, b: &Self, c: &Self, d: &Self) -> Option<Self> {
                a.checked_mul(*b)?
                    .checked_sub(c.checked_mul(*d)?)
                    .filter(|&x| x != <$int>::MIN)
            }
            fn gcd(&self, other: &Self) -> Self {
                Integer::gcd(self, other)
            }
            fn div_exact(&self, divisor: &Self) -> Self {
                self / divisor
            }
            fn negated(&self) -> Option<Self> {
                self.checked_neg()
            }
        }
    };
}

machine_ring!(i64);
machine_ring!(i128);

impl Ring for BigInt {
    fn from_i128(value: i128) -> Option<Self> {
        Some(BigInt::from(value))
    }
    fn zero_value() -> Self {
        BigInt::zero()
    }
    fn into_i128(self) -> Option<i128> {
        i128::try_from(&self).ok()
    }
    fn is_zero(&self) -> bool {
        Zero::is_zero(self)
    }
    fn is_negative(&self) -> bool {
        Signed::is_negative(self)
    }
    fn mul_sub(a: &Self, b: &Self, c: &Self, d: &Self) -> Option<Self> {
        Some(a * b - c * d)
    }
    fn gcd(&self, other: &Self) -> Self {
        Integer::gcd(self, other)
    }
    fn div_exact(&self, divisor: &Self) -> Self {
        self / divisor
    }
    fn negated(&self) -> Option<Self> {
        Some(-self)
    }
}

/// The reduced row echelon form of an integer matrix, kept in integers: every nonzero row has
/// a positive pivot, every pivot column is zero outside its pivot row, and every row is
/// primitive (its entries have gcd 1). Computed once; the null space is read from it.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct RowEchelon {
    columns: usize,
    /// Nonzero rows only, one per pivot.
    rows: Vec<Vec<BigInt>>,
    /// The same rows in machine integers, when elimination never left them.
    small_rows: Option<Vec<Vec<i128>>>,
    pivot_columns: Vec<usize>,
    used_big_integers: bool,
}

fn eliminate<T: Ring>(matrix: &IntegerMatrix) -> Option<(Vec<Vec<T>>, Vec<usize>)> {
    let columns = matrix.columns();
    let mut rows: Vec<Vec<T>> = (0..matrix.rows())
        .map(|r| {
            (0..columns)
                .map(|c| T::from_i128(matrix.get(r, c)))
                .collect::<Option<Vec<T>>>()
        })
        .collect::<Option<_>>()?;
    let mut pivot_columns = Vec::new();
    let mut rank = 0;
    for column in 0..columns {
        let Some(found) = (rank..rows.len()).find(|&r| !rows[r][column].is_zero()) else {
            continue;
        };
        rows.swap(rank, found);
        if rows[rank][column].is_negative() {
            for entry in rows[rank].iter_mut() {
                *entry = entry.negated()?;
            }
        }
        let pivot_row = rows[rank].clone();
        let pivot = &pivot_row[column];
        for (r, row) in rows.iter_mut().enumerate() {
            if r == rank || row[column].is_zero() {
                continue;
            }
            let g = pivot.gcd(&row[column]);
            let row_factor = pivot.div_exact(&g);
            let pivot_factor = row[column].div_exact(&g);
            let mut content = T::zero_value();
            for (entry, pivot_entry) in row.iter_mut().zip(&pivot_row) {
                *entry = T::mul_sub(entry, &row_factor, pivot_entry, &pivot_factor)?;
                content = content.gcd(entry);
            }
            if !content.is_zero() {
                for entry in row.iter_mut() {
                    *entry = entry.div_exact(&content);
                }
            }
        }
        pivot_columns.push(column);
        rank += 1;
        if rank == rows.len() {
            break;
        }
    }
    rows.truncate(rank);
    Some((rows, pivot_columns))
}

fn widen<T: Ring>(rows: Vec<Vec<T>>) -> Vec<Vec<i128>> {
    rows.into_iter()
        .map(|r| {
            r.into_iter()
                .map(|x| x.into_i128().expect("machine integers widen to i128"))
                .collect()
        })
        .collect()
}

impl RowEchelon {
    /// Reduces `matrix`, in checked `i64` or `i128` when that suffices and in big integers
    /// otherwise.
    pub fn new(matrix: &IntegerMatrix) -> RowEchelon {
        let small = eliminate::<i64>(matrix)
            .map(|(rows, pivots)| (widen(rows), pivots))
            .or_else(|| eliminate::<i128>(matrix));
        match small {
            Some((rows, pivot_columns)) => RowEchelon {
                columns: matrix.columns(),
                rows: rows
                    .iter()
                    .map(|r| r.iter().map(|&x| BigInt::from(x)).collect())
                    .collect(),
                small_rows: Some(rows),
                pivot_columns,
                used_big_integers: false,
            },
            None => RowEchelon::new_big(matrix),
        }
    }

    /// Reduces `matrix` in big integers throughout (the reference the fast path is checked
    /// against).
    pub fn new_big(matrix: &IntegerMatrix) -> RowEchelon {
        let (rows, pivot_columns) =
            eliminate::<BigInt>(matrix).expect("big-integer elimination cannot overflow");
        RowEchelon {
            columns: matrix.columns(),
            rows,
            small_rows: None,
            pivot_columns,
            used_big_integers: true,
        }
    }

    /// The rank: number of pivots.
    pub fn rank(&self) -> usize {
        self.pivot_columns.len()
    }

    /// The dimension of the null space: columns minus rank.
    pub fn nullity(&self) -> usize {
        self.columns - self.rank()
    }

    /// Columns holding a pivot, ascending.
    pub fn pivot_columns(&self) -> &[usize] {
        &self.pivot_columns
    }

    /// Columns with no pivot, ascending: one null-space basis vector each.
    pub fn free_columns(&self) -> Vec<usize> {
        (0..self.columns)
            .filter(|c| !self.pivot_columns.contains(c))
            .collect()
    }

    /// The nonzero rows of the reduced form, one per pivot.
    pub fn reduced_rows(&self) -> &[Vec<BigInt>] {
        &self.rows
    }

    /// True when the elimination overflowed `i128` and ran in big integers.
    pub fn used_big_integers(&self) -> bool {
        self.used_big_integers
    }

    /// An integer basis of the null space: one primitive vector per free column, positive in
    /// its own free column and zero in every other free column (so the vectors are
    /// independent by construction).
    pub fn null_space(&self) -> Vec<Vec<BigInt>> {
        self.free_columns()
            .into_iter()
            .map(|free| self.null_vector(free))
            .collect()
    }

    fn null_vector(&self, free: usize) -> Vec<BigInt> {
        if let Some(vector) = self.null_vector_small(free) {
            return vector.into_iter().map(BigInt::from).collect();
        }
        self.null_vector_big(free)
    }

    /// The same as [`RowEchelon::null_vector_big`] in checked `i128`; `None` on overflow.
    fn null_vector_small(&self, free: usize) -> Option<Vec<i128>> {
        let rows = self.small_rows.as_ref()?;
        let mut common: i128 = 1;
        for (row, &pivot_column) in rows.iter().zip(&self.pivot_columns) {
            if row[free] != 0 {
                let pivot = row[pivot_column];
                common = (common / Integer::gcd(&common, &pivot)).checked_mul(pivot)?;
            }
        }
        let mut vector = vec![0i128; self.columns];
        vector[free] = common;
        for (row, &pivot_column) in rows.iter().zip(&self.pivot_columns) {
            let a = row[free];
            if a != 0 {
                vector[pivot_column] = a.checked_mul(common / row[pivot_column])?.checked_neg()?;
            }
        }
        let content = vector.iter().fold(0i128, |g, x| Integer::gcd(&g, x));
        Some(vector.into_iter().map(|x| x / content).collect())
    }

    fn null_vector_big(&self, free: usize) -> Vec<BigInt> {
        // With pivot d_r in row r, the vector x_free = 1, x_pivot(r) = −a_r,free / d_r solves
        // the system; multiplying by the lcm of the pivots involved clears the fractions.
        let mut common = BigInt::from(1);
        for (row, &pivot_column) in self.rows.iter().zip(&self.pivot_columns) {
            if !Zero::is_zero(&row[free]) {
                common = common.lcm(&row[pivot_column]);
            }
        }
        let mut vector = vec![BigInt::zero(); self.columns];
        vector[free] = common.clone();
        for (row, &pivot_column) in self.rows.iter().zip(&self.pivot_columns) {
            if !Zero::is_zero(&row[free]) {
                vector[pivot_column] = -(&row[free] * (&common / &row[pivot_column]));
            }
        }
        let content = vector
            .iter()
            .fold(BigInt::zero(), |g, x| Integer::gcd(&g, x));
        for x in vector.iter_mut() {
            *x = &*x / &content;
        }
        vector
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn matrix(rows: &[&[i128]]) -> IntegerMatrix {
        IntegerMatrix::from_rows(&rows.iter().map(|r| r.to_vec()).collect::<Vec<_>>()).unwrap()
    }

    fn assert_null_space_identities(m: &IntegerMatrix, echelon: &RowEchelon) {
        assert_eq!(echelon.rank() + echelon.nullity(), m.columns());
        let basis = echelon.null_space();
        assert_eq!(basis.len(), echelon.nullity());
        let free = echelon.free_columns();
        for (i, v) in basis.iter().enumerate() {
            assert!(m.times(v).iter().all(Zero::is_zero), "A·v = 0 for {v:?}");
            for (j, &f) in free.iter().enumerate() {
                assert_eq!(Zero::is_zero(&v[f]), i != j, "independence pattern");
            }
            let g = v.iter().fold(BigInt::zero(), |g, x| Integer::gcd(&g, x));
            assert_eq!(g, BigInt::from(1), "primitive");
        }
    }

    #[test]
    fn water_formation_has_a_one_dimensional_null_space() {
        // H2 + O2 -> H2O: columns H2, O2, H2O with products negated; rows H, O.
        let m = matrix(&[&[2, 0, -2], &[0, 2, -1]]);
        let e = RowEchelon::new(&m);
        assert_eq!(e.rank(), 2);
        assert_eq!(e.null_space(), vec![vec![2.into(), 1.into(), 2.into()]]);
        assert_null_space_identities(&m, &e);
    }

    #[test]
    fn rank_deficient_rows_and_zero_columns() {
        let m = matrix(&[&[1, 2, 3, 0], &[2, 4, 6, 0], &[0, 0, 0, 0]]);
        let e = RowEchelon::new(&m);
        assert_eq!(e.rank(), 1);
        assert_eq!(e.free_columns(), vec![1, 2, 3]);
        assert_null_space_identities(&m, &e);
        let empty = IntegerMatrix::zeros(0, 3);
        let e = RowEchelon::new(&empty);
        assert_eq!(e.nullity(), 3);
        assert_null_space_identities(&empty, &e);
    }

    #[test]
    fn overflow_falls_back_to_big_integers_with_the_same_answer() {
        let big = 1i128 << 100;
        let m = matrix(&[&[big, big - 1, 3], &[big - 3, big + 5, 7], &[1, 2, 3]]);
        let fast = RowEchelon::new(&m);
        let reference = RowEchelon::new_big(&m);
        assert!(fast.used_big_integers());
        assert_eq!(fast.null_space(), reference.null_space());
        assert_eq!(fast.reduced_rows(), reference.reduced_rows());
        assert_null_space_identities(&m, &fast);
        let m = matrix(&[&[big, big - 1, 3, 1], &[big - 3, big + 5, 7, 2]]);
        let fast = RowEchelon::new(&m);
        assert_eq!(fast.nullity(), 2);
        assert_null_space_identities(&m, &fast);
        assert_eq!(fast.null_space(), RowEchelon::new_big(&m).null_space());
    }

    #[test]
    fn products_past_i64_use_i128_before_big_integers() {
        let large = 1i128 << 40;
        let m = matrix(&[&[large, large + 1, 5], &[large + 7, large - 3, 11]]);
        let e = RowEchelon::new(&m);
        assert!(!e.used_big_integers());
        assert_eq!(e.null_space(), RowEchelon::new_big(&m).null_space());
        assert_null_space_identities(&m, &e);
    }

    #[test]
    fn small_matrices_stay_in_machine_integers() {
        let m = matrix(&[&[1, 0, -1], &[0, 1, -2]]);
        let e = RowEchelon::new(&m);
        assert!(!e.used_big_integers());
        let reference = RowEchelon::new_big(&m);
        assert_eq!(e.reduced_rows(), reference.reduced_rows());
        assert_eq!(e.null_space(), reference.null_space());
    }
}
