//! Exact integer linear algebra for balancing: the reduced row echelon form of an integer
//! matrix and the integer basis of its null space, with no floating point anywhere.
//!
//! Elimination is fraction-free (Bareiss's exact division, in Gauss–Jordan form): every entry
//! stays an integer no larger than a minor of the matrix, with no gcd per row. It starts in
//! checked `i64`; the row at which a product or difference would overflow moves the
//! elimination to `i128`, and then to `BigInt`, at that point, keeping the work done. Published
//! hard equations reach coefficients in the thousands, and their intermediate values do
//! overflow 64 bits, so the wider rings are real paths, not formalities (they are tested
//! against the big-integer path).
//!
//! Work is metered ([`WorkMeter`]): one unit is about one product of two 64-bit words, so a
//! product of an `a`-word and a `b`-word big integer costs `a·b` units. Hostile input (dozens of
//! species with six-digit subscripts) makes the entries grow to hundreds of digits; the meter
//! stops such an elimination at a documented bound instead of letting it run for minutes.

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

/// A budget of elimination work, in units of about one 64-bit multiply (see the module
/// documentation). Every metered computation charges it and stops once it is spent.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct WorkMeter {
    used: u64,
    limit: u64,
}

/// The work budget was spent before the computation finished.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct WorkLimitReached {
    /// The budget that was spent.
    pub limit: u64,
}

impl WorkMeter {
    /// A meter allowing `limit` units.
    pub fn new(limit: u64) -> WorkMeter {
        WorkMeter { used: 0, limit }
    }

    /// Units charged so far (at most the limit, plus the last charge that crossed it).
    pub fn used(&self) -> u64 {
        self.used
    }

    /// The budget.
    pub fn limit(&self) -> u64 {
        self.limit
    }

    /// Charges `units`; an error once the total passes the limit.
    pub fn charge(&mut self, units: u64) -> Result<(), WorkLimitReached> {
        self.used = self.used.saturating_add(units);
        if self.used > self.limit {
            Err(WorkLimitReached { limit: self.limit })
        } else {
            Ok(())
        }
    }
}

/// Why an elimination in one ring stopped.
enum Stop {
    /// A value does not fit the ring: try a wider one.
    Overflow,
    /// The work budget is spent.
    Limit(WorkLimitReached),
}

impl From<WorkLimitReached> for Stop {
    fn from(reached: WorkLimitReached) -> Stop {
        Stop::Limit(reached)
    }
}

/// The integers elimination can run in: checked machine integers or big integers.
trait Ring: Clone {
    /// Size in 64-bit words, for the work meter (1 for machine integers).
    fn words(&self) -> u64;
    /// `None` when the value does not fit.
    fn from_i128(value: i128) -> Option<Self>;
    fn zero_value() -> Self;
    fn into_i128(self) -> Option<i128>;
    fn is_zero(&self) -> bool;
    fn is_negative(&self) -> bool;
    /// `a·b − c·d`, `None` on overflow.
    fn mul_sub(a: &Self, b: &Self, c: &Self, d: &Self) -> Option<Self>;
    /// Division known to be exact.
    fn div_exact(&self, divisor: &Self) -> Self;
    fn negated(&self) -> Option<Self>;
}

/// The machine-integer rings: checked arithmetic, and `MIN` is never stored, because its
/// magnitude does not fit, so gcd and negation of it would overflow later.
macro_rules! machine_ring {
    ($int:ty) => {
        impl Ring for $int {
            fn words(&self) -> u64 {
                1
            }
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
            fn div_exact(&self, divisor: &Self) -> Self {
                debug_assert_eq!(self % divisor, 0, "inexact division");
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
    fn words(&self) -> u64 {
        self.bits() / 64 + 1
    }
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
    fn div_exact(&self, divisor: &Self) -> Self {
        debug_assert!(Zero::is_zero(&(self % divisor)), "inexact division");
        self / divisor
    }
    fn negated(&self) -> Option<Self> {
        Some(-self)
    }
}

/// The reduced row echelon form of an integer matrix, kept in integers: every nonzero row has
/// a positive pivot and every pivot column is zero outside its pivot row. The rows are those
/// of the fraction-free elimination (every pivot equals the same minor of the matrix);
/// [`RowEchelon::reduced_rows`] gives them primitive. Computed once; the null space is read
/// from it.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct RowEchelon {
    columns: usize,
    /// Nonzero rows only, one per pivot.
    rows: Rows,
    pivot_columns: Vec<usize>,
}

/// The rows of a [`RowEchelon`], in the ring the elimination finished in.
#[derive(Clone, Debug, PartialEq, Eq)]
enum Rows {
    /// Machine integers (the elimination never left `i64` or `i128`), row-major.
    Machine(Vec<i128>),
    /// Big integers.
    Big(Vec<Vec<BigInt>>),
}

/// A fraction-free Gauss–Jordan elimination in progress, in one ring.
///
/// Bareiss's rule, applied above the pivot as well as below: with pivot `p` in column `c` and
/// the previous pivot `q` (1 at the start), every other row becomes
/// `(p·row − row[c]·pivot_row) / q`, and the division is exact because every entry is then a
/// minor of the matrix (with rows negated where a pivot was made positive). Entries therefore
/// stay as small as the minors, with no gcd per row, and at the end every pivot equals the
/// same minor. A row is computed aside and stored only when all its entries fit, so when one
/// overflows the state is still a consistent point of the elimination: it moves to the wider
/// ring and goes on from that row, nothing is redone.
struct Elimination<T> {
    rows: usize,
    columns: usize,
    /// Row-major.
    entries: Vec<T>,
    pivot_columns: Vec<usize>,
    previous: T,
    /// The column being eliminated.
    column: usize,
    /// The row to update next in that column; `None` before the pivot is chosen.
    next_row: Option<usize>,
}

impl<T: Ring> Elimination<T> {
    fn start(matrix: &IntegerMatrix) -> Option<Elimination<T>> {
        Some(Elimination {
            rows: matrix.rows(),
            columns: matrix.columns(),
            entries: matrix
                .entries
                .iter()
                .map(|&x| T::from_i128(x))
                .collect::<Option<_>>()?,
            pivot_columns: Vec::new(),
            previous: T::from_i128(1)?,
            column: 0,
            next_row: None,
        })
    }

    /// The same state in a wider ring (every machine integer fits the wider one).
    fn widen<U: Ring>(self) -> Elimination<U> {
        let widen = |x: T| {
            U::from_i128(x.into_i128().expect("machine integers fit i128"))
                .expect("a wider ring holds every narrower value")
        };
        Elimination {
            rows: self.rows,
            columns: self.columns,
            entries: self.entries.into_iter().map(widen).collect(),
            pivot_columns: self.pivot_columns,
            previous: widen(self.previous),
            column: self.column,
            next_row: self.next_row,
        }
    }

    fn run(&mut self, meter: &mut WorkMeter) -> Result<(), Stop> {
        let columns = self.columns;
        let mut scratch: Vec<T> = vec![T::zero_value(); columns];
        while self.column < columns && self.pivot_columns.len() < self.rows {
            let column = self.column;
            let rank = self.pivot_columns.len();
            if self.next_row.is_none() {
                let Some(found) =
                    (rank..self.rows).find(|&r| !self.entries[r * columns + column].is_zero())
                else {
                    self.column += 1;
                    continue;
                };
                for c in 0..columns {
                    self.entries.swap(rank * columns + c, found * columns + c);
                }
                if self.entries[rank * columns + column].is_negative() {
                    let row = &mut self.entries[rank * columns..(rank + 1) * columns];
                    for (slot, entry) in scratch.iter_mut().zip(row.iter()) {
                        *slot = entry.negated().ok_or(Stop::Overflow)?;
                    }
                    row.clone_from_slice(&scratch);
                }
                self.next_row = Some(0);
            }
            let pivot_start = rank * columns;
            while let Some(r) = self.next_row.filter(|&r| r < self.rows) {
                if r != rank {
                    let (pivot_row, row) = if r < rank {
                        let (before, after) = self.entries.split_at(pivot_start);
                        (&after[..columns], &before[r * columns..(r + 1) * columns])
                    } else {
                        let (before, after) = self.entries.split_at(r * columns);
                        (
                            &before[pivot_start..pivot_start + columns],
                            &after[..columns],
                        )
                    };
                    let pivot = &pivot_row[column];
                    let factor = &row[column];
                    let mut work = 0u64;
                    for ((slot, entry), pivot_entry) in scratch.iter_mut().zip(row).zip(pivot_row) {
                        let product =
                            T::mul_sub(entry, pivot, factor, pivot_entry).ok_or(Stop::Overflow)?;
                        work += entry.words() * pivot.words()
                            + factor.words() * pivot_entry.words()
                            + product.words() * self.previous.words();
                        *slot = product.div_exact(&self.previous);
                    }
                    meter.charge(work)?;
                    self.entries[r * columns..(r + 1) * columns].clone_from_slice(&scratch);
                }
                self.next_row = Some(r + 1);
            }
            self.previous = self.entries[pivot_start + column].clone();
            self.pivot_columns.push(column);
            self.column += 1;
            self.next_row = None;
        }
        self.entries.truncate(self.pivot_columns.len() * columns);
        Ok(())
    }
}

impl RowEchelon {
    /// Reduces `matrix`, in checked `i64` or `i128` when that suffices and in big integers
    /// otherwise (unmetered: for matrices the caller knows to be small).
    pub fn new(matrix: &IntegerMatrix) -> RowEchelon {
        RowEchelon::new_within(matrix, &mut WorkMeter::new(u64::MAX))
            .expect("an unlimited meter is never spent")
    }

    /// As [`RowEchelon::new`], charging `meter`; an error once its budget is spent. The
    /// elimination starts in `i64` and moves to `i128`, then to big integers, at the row where
    /// a value first overflows, keeping the work already done.
    pub fn new_within(
        matrix: &IntegerMatrix,
        meter: &mut WorkMeter,
    ) -> Result<RowEchelon, WorkLimitReached> {
        match RowEchelon::machine_within(matrix, meter)? {
            Ok(done) => Ok(done),
            Err(overflowed) => RowEchelon::big_from(&mut overflowed.widen(), meter),
        }
    }

    /// The elimination in machine integers, or its state at the row where `i128` overflowed.
    fn machine_within(
        matrix: &IntegerMatrix,
        meter: &mut WorkMeter,
    ) -> Result<Result<RowEchelon, Elimination<i128>>, WorkLimitReached> {
        let limit = |stop| match stop {
            Stop::Limit(reached) => Err(reached),
            Stop::Overflow => Ok(()),
        };
        let mut wide = match Elimination::<i64>::start(matrix) {
            Some(mut narrow) => match narrow.run(meter) {
                Ok(()) => return Ok(Ok(RowEchelon::machine(narrow.widen()))),
                Err(stop) => {
                    limit(stop)?;
                    narrow.widen::<i128>()
                }
            },
            None => Elimination::<i128>::start(matrix).expect("the matrix holds i128 entries"),
        };
        match wide.run(meter) {
            Ok(()) => Ok(Ok(RowEchelon::machine(wide))),
            Err(stop) => {
                limit(stop)?;
                Ok(Err(wide))
            }
        }
    }

    /// Reduces `matrix` in big integers throughout (the reference the fast path is checked
    /// against).
    pub fn new_big(matrix: &IntegerMatrix) -> RowEchelon {
        let mut big = Elimination::<BigInt>::start(matrix).expect("big integers hold every i128");
        RowEchelon::big_from(&mut big, &mut WorkMeter::new(u64::MAX))
            .expect("an unlimited meter is never spent")
    }

    fn machine(done: Elimination<i128>) -> RowEchelon {
        RowEchelon {
            columns: done.columns,
            rows: Rows::Machine(done.entries),
            pivot_columns: done.pivot_columns,
        }
    }

    fn big_from(
        elimination: &mut Elimination<BigInt>,
        meter: &mut WorkMeter,
    ) -> Result<RowEchelon, WorkLimitReached> {
        match elimination.run(meter) {
            Ok(()) => {}
            Err(Stop::Limit(reached)) => return Err(reached),
            Err(Stop::Overflow) => unreachable!("big-integer elimination cannot overflow"),
        }
        let columns = elimination.columns;
        let entries = std::mem::take(&mut elimination.entries);
        let mut rows = Vec::with_capacity(elimination.pivot_columns.len());
        let mut entries = entries.into_iter();
        for _ in 0..elimination.pivot_columns.len() {
            rows.push(entries.by_ref().take(columns).collect());
        }
        Ok(RowEchelon {
            columns,
            rows: Rows::Big(rows),
            pivot_columns: std::mem::take(&mut elimination.pivot_columns),
        })
    }

    /// A row echelon form from rows the caller has reduced (positive pivots, pivot columns
    /// zero outside their row).
    fn from_big_rows(
        columns: usize,
        rows: Vec<Vec<BigInt>>,
        pivot_columns: Vec<usize>,
    ) -> RowEchelon {
        RowEchelon {
            columns,
            rows: Rows::Big(rows),
            pivot_columns,
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

    /// The rows as big integers, as stored (not made primitive).
    fn big_rows(&self) -> Vec<Vec<BigInt>> {
        match &self.rows {
            Rows::Machine(entries) => entries
                .chunks(self.columns.max(1))
                .take(self.rank())
                .map(|row| row.iter().map(|&x| BigInt::from(x)).collect())
                .collect(),
            Rows::Big(rows) => rows.clone(),
        }
    }

    /// The nonzero rows of the reduced form, one per pivot, each primitive (gcd 1): the
    /// unique integer form of the reduced row echelon form.
    pub fn reduced_rows(&self) -> Vec<Vec<BigInt>> {
        self.big_rows()
            .iter()
            .map(|row| primitive_row(row))
            .collect()
    }

    /// True when the elimination overflowed `i128` and ran in big integers.
    pub fn used_big_integers(&self) -> bool {
        matches!(self.rows, Rows::Big(_))
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

    /// As [`RowEchelon::null_space`], charging `meter` for the big-integer work.
    pub fn null_space_within(
        &self,
        meter: &mut WorkMeter,
    ) -> Result<Vec<Vec<BigInt>>, WorkLimitReached> {
        let mut basis = Vec::new();
        for free in self.free_columns() {
            let vector = self.null_vector(free);
            let words = vector.iter().map(Ring::words).max().unwrap_or(1);
            meter.charge((self.rank() as u64 + 1) * words * words)?;
            basis.push(vector);
        }
        Ok(basis)
    }

    fn null_vector(&self, free: usize) -> Vec<BigInt> {
        if let Some(vector) = self.null_vector_small(free) {
            return vector.into_iter().map(BigInt::from).collect();
        }
        null_vector_big(&self.big_rows(), &self.pivot_columns, self.columns, free)
    }

    /// The same as [`null_vector_big`] in checked `i128`; `None` on overflow or when the rows
    /// are big integers.
    fn null_vector_small(&self, free: usize) -> Option<Vec<i128>> {
        let Rows::Machine(entries) = &self.rows else {
            return None;
        };
        let rows = entries.chunks(self.columns.max(1));
        let mut common: i128 = 1;
        for (row, &pivot_column) in rows.clone().zip(&self.pivot_columns) {
            if row[free] != 0 {
                let pivot = row[pivot_column];
                common = (common / Integer::gcd(&common, &pivot)).checked_mul(pivot)?;
            }
        }
        let mut vector = vec![0i128; self.columns];
        vector[free] = common;
        for (row, &pivot_column) in rows.zip(&self.pivot_columns) {
            let a = row[free];
            if a != 0 {
                vector[pivot_column] = a.checked_mul(common / row[pivot_column])?.checked_neg()?;
            }
        }
        let content = vector.iter().fold(0i128, |g, x| Integer::gcd(&g, x));
        Some(vector.into_iter().map(|x| x / content).collect())
    }
}

/// The null vector of free column `free` from reduced rows (positive pivots, pivot columns
/// zero outside their row): with pivot d_r in row r, x_free = 1, x_pivot(r) = −a_r,free / d_r
/// solves the system; multiplying by the lcm of the pivots involved clears the fractions.
fn null_vector_big(
    rows: &[Vec<BigInt>],
    pivot_columns: &[usize],
    columns: usize,
    free: usize,
) -> Vec<BigInt> {
    let mut common = BigInt::from(1);
    for (row, &pivot_column) in rows.iter().zip(pivot_columns) {
        if !Zero::is_zero(&row[free]) {
            common = common.lcm(&row[pivot_column]);
        }
    }
    let mut vector = vec![BigInt::zero(); columns];
    vector[free] = common.clone();
    for (row, &pivot_column) in rows.iter().zip(pivot_columns) {
        if !Zero::is_zero(&row[free]) {
            vector[pivot_column] = -(&row[free] * (&common / &row[pivot_column]));
        }
    }
    primitive_row(&vector)
}

/// An integer basis of the null space of `matrix`, the same as
/// `RowEchelon::new_within(matrix, meter)?.null_space_within(meter)`. When the minors overflow
/// `i128` and the null space is one line of a full-row-rank matrix, the line comes from
/// elimination modulo word-sized primes (`balance::modular`) instead of big integers.
pub fn null_space_within(
    matrix: &IntegerMatrix,
    meter: &mut WorkMeter,
) -> Result<Vec<Vec<BigInt>>, WorkLimitReached> {
    // When Hadamard's bound already says the minors may pass i128, the machine-integer
    // elimination would most likely be work thrown away: the modular path goes first.
    let modular_first = super::modular::hadamard_bits(matrix).is_some_and(|bits| bits > 126);
    if modular_first
        && let Some(vector) = super::modular::one_dimensional_null_space(matrix, meter)?
    {
        return Ok(vec![vector]);
    }
    match RowEchelon::machine_within(matrix, meter)? {
        Ok(echelon) => echelon.null_space_within(meter),
        Err(overflowed) => {
            if !modular_first
                && let Some(vector) = super::modular::one_dimensional_null_space(matrix, meter)?
            {
                return Ok(vec![vector]);
            }
            RowEchelon::big_from(&mut overflowed.widen(), meter)?.null_space_within(meter)
        }
    }
}

/// For every row `r`, an integer basis of the null space of `matrix` without row `r`, from one
/// elimination instead of one per row.
///
/// The reduced form of `[A | I]` is `[E | T]` with `T·A = E` and `T` invertible. Dropping row
/// `r` leaves the equations `A·x = t·e_r` for any `t`, that is `E·x = t·T·e_r`. When a zero
/// row of `E` has a nonzero entry in column `r` of `T`, `t` must be 0 and the null space is
/// that of `A`; otherwise back-substitution in `E` gives one more vector, with `t` the lcm of
/// the pivots involved. The spans are those of the separate eliminations (bases may differ by
/// an invertible change of basis, so callers compare spans, not vectors).
pub fn null_spaces_without_each_row(
    matrix: &IntegerMatrix,
    meter: &mut WorkMeter,
) -> Result<Vec<Vec<Vec<BigInt>>>, WorkLimitReached> {
    let (rows, columns) = (matrix.rows(), matrix.columns());
    let mut augmented = IntegerMatrix::zeros(rows, columns + rows);
    for r in 0..rows {
        for c in 0..columns {
            augmented.set(r, c, matrix.get(r, c));
        }
        augmented.set(r, columns + r, 1);
    }
    let reduced = RowEchelon::new_within(&augmented, meter)?;
    let reduced_rows = reduced.big_rows();
    // Rows whose pivot lies in A's columns form the reduced form of A; the others are the
    // zero rows of E.
    let mut pivot_rows: Vec<(usize, &Vec<BigInt>)> = Vec::new();
    let mut zero_rows: Vec<&Vec<BigInt>> = Vec::new();
    for (row, &pivot) in reduced_rows.iter().zip(&reduced.pivot_columns) {
        if pivot < columns {
            pivot_rows.push((pivot, row));
        } else {
            zero_rows.push(row);
        }
    }
    let own = RowEchelon::from_big_rows(
        columns,
        pivot_rows
            .iter()
            .map(|(_, row)| primitive_row(&row[..columns]))
            .collect(),
        pivot_rows.iter().map(|&(p, _)| p).collect(),
    );
    let null_space = own.null_space_within(meter)?;
    let mut out = Vec::with_capacity(rows);
    for r in 0..rows {
        let t_column = columns + r;
        let mut basis = null_space.clone();
        if zero_rows.iter().all(|row| Zero::is_zero(&row[t_column])) {
            let mut t = BigInt::from(1);
            for (pivot, row) in &pivot_rows {
                if !Zero::is_zero(&row[t_column]) {
                    t = t.lcm(&row[*pivot]);
                }
            }
            let mut extra = vec![BigInt::zero(); columns];
            let mut words = t.words();
            for (pivot, row) in &pivot_rows {
                if !Zero::is_zero(&row[t_column]) {
                    extra[*pivot] = &row[t_column] * (&t / &row[*pivot]);
                    words = words.max(extra[*pivot].words());
                }
            }
            meter.charge((pivot_rows.len() as u64 + 1) * words * words)?;
            basis.push(primitive_row(&extra));
        }
        out.push(basis);
    }
    Ok(out)
}

fn primitive_row(row: &[BigInt]) -> Vec<BigInt> {
    let content = row.iter().fold(BigInt::zero(), |g, x| Integer::gcd(&g, x));
    if Zero::is_zero(&content) {
        return row.to_vec();
    }
    row.iter().map(|x| x / &content).collect()
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

    /// The span of a basis, for comparing bases that differ by a change of basis: its reduced
    /// row echelon form.
    fn span(basis: &[Vec<BigInt>], columns: usize) -> Vec<Vec<BigInt>> {
        let rows: Vec<Vec<i128>> = basis
            .iter()
            .map(|v| v.iter().map(|x| i128::try_from(x).unwrap()).collect())
            .collect();
        if rows.is_empty() {
            return Vec::new();
        }
        let m = IntegerMatrix::from_rows(&rows).unwrap();
        assert_eq!(m.columns(), columns);
        RowEchelon::new_big(&m).reduced_rows()
    }

    #[test]
    fn one_elimination_gives_the_null_space_without_each_row() {
        // A wide matrix, a rank-deficient one and a square one of full rank: every row left
        // out in turn, compared with the separate elimination.
        let cases = [
            matrix(&[
                &[1, 0, 0, -1, 0, 0],
                &[4, 0, 0, 0, 0, -1],
                &[0, 1, 0, 0, -1, 0],
                &[0, 0, 1, 0, 0, -2],
                &[-1, 2, 1, -2, -3, 0],
            ]),
            matrix(&[&[1, 2, 3], &[2, 4, 6], &[0, 1, 1]]),
            matrix(&[&[2, 1, 0], &[0, 3, 1], &[1, 0, 5]]),
        ];
        for m in cases {
            let mut meter = WorkMeter::new(u64::MAX);
            let all = null_spaces_without_each_row(&m, &mut meter).unwrap();
            for (r, basis) in all.iter().enumerate() {
                let separate = RowEchelon::new(&m.without_row(r)).null_space();
                assert_eq!(basis.len(), separate.len(), "row {r} of {m:?}");
                assert_eq!(span(basis, m.columns()), span(&separate, m.columns()));
                let reduced = m.without_row(r);
                for v in basis {
                    assert!(reduced.times(v).iter().all(Zero::is_zero));
                }
            }
        }
    }

    #[test]
    fn a_spent_meter_stops_the_elimination() {
        let m = matrix(&[&[2, 1, 0, 4], &[0, 3, 1, 7], &[1, 0, 5, 9]]);
        let mut meter = WorkMeter::new(2);
        assert_eq!(
            RowEchelon::new_within(&m, &mut meter),
            Err(WorkLimitReached { limit: 2 })
        );
        let mut meter = WorkMeter::new(1_000);
        assert_eq!(
            RowEchelon::new_within(&m, &mut meter),
            Ok(RowEchelon::new(&m))
        );
        assert!(meter.used() > 0);
    }

    /// Matrices of our own from a fixed linear congruential sequence: `rows × columns`, about
    /// half the entries nonzero, magnitudes below `bound`.
    fn random_matrices(count: usize, bound: u64) -> Vec<IntegerMatrix> {
        let mut state: u64 = 0x5851_f42d_4c95_7f2d;
        let mut next = |n: u64| {
            state = state
                .wrapping_mul(6_364_136_223_846_793_005)
                .wrapping_add(1_442_695_040_888_963_407);
            (state >> 33) % n
        };
        (0..count)
            .map(|_| {
                let rows = 1 + next(12) as usize;
                let columns = 1 + next(14) as usize;
                let mut m = IntegerMatrix::zeros(rows, columns);
                for r in 0..rows {
                    for c in 0..columns {
                        if next(2) == 0 {
                            let x = next(bound) as i128;
                            m.set(r, c, if next(2) == 0 { x } else { -x });
                        }
                    }
                }
                m
            })
            .collect()
    }

    #[test]
    fn widening_mid_elimination_gives_the_big_integer_answer() {
        // Small entries stay in i64; entries to 2^20 overflow i64 and often i128 part-way
        // through, so the elimination moves ring at some row and goes on from there.
        let mut widened = [0usize; 2];
        for bound in [10, 1 << 20] {
            for m in random_matrices(300, bound) {
                let fast = RowEchelon::new(&m);
                let reference = RowEchelon::new_big(&m);
                widened[usize::from(fast.used_big_integers())] += 1;
                assert_eq!(fast.pivot_columns(), reference.pivot_columns(), "{m:?}");
                assert_eq!(fast.reduced_rows(), reference.reduced_rows(), "{m:?}");
                assert_eq!(fast.null_space(), reference.null_space(), "{m:?}");
                assert_null_space_identities(&m, &fast);
            }
        }
        assert!(widened[0] > 0 && widened[1] > 0, "{widened:?}");
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
