//! Numbers written for people: a measured or computed value rounded to significant figures,
//! so that `3.9000000000000004` reads `3.9` and `1.2559999999999998` reads `1.256`.
//!
//! JSON and CSV keep full precision; this is for text a person reads (reports, notes, errors).

/// Significant figures of a figure written for people, unless a caller says otherwise.
pub const SIGNIFICANT: usize = 6;

/// `value` rounded to `digits` significant figures (at least 1), without trailing zeros:
/// plain notation from 1e-4 up to 1e9, scientific beyond; `inf`, `-inf`, `NaN` as Rust writes
/// them.
///
/// ```
/// use couplet::figures::significant;
/// assert_eq!(significant(3.9000000000000004, 6), "3.9");
/// assert_eq!(significant(1.2559999999999998, 4), "1.256");
/// assert_eq!(significant(-0.000012345, 3), "-1.23e-5");
/// assert_eq!(significant(298.15, 6), "298.15");
/// ```
pub fn significant(value: f64, digits: usize) -> String {
    let digits = digits.max(1);
    if !value.is_finite() {
        return value.to_string();
    }
    if value == 0.0 {
        return "0".to_owned();
    }
    // Round first, so that 9.9999996 to 6 figures counts as 10 (one more digit before the point).
    let rounded: f64 = format!("{:.*e}", digits - 1, value)
        .parse()
        .expect("Rust reads what it writes");
    let exponent = rounded.abs().log10().floor() as i32;
    if !(-4..9).contains(&exponent) {
        let text = format!("{:.*e}", digits - 1, rounded);
        let (mantissa, power) = text.split_once('e').expect("scientific notation has an e");
        return format!("{}e{power}", trim_zeros(mantissa));
    }
    let decimals = (digits as i32 - 1 - exponent).max(0) as usize;
    trim_zeros(&format!("{rounded:.decimals$}")).to_owned()
}

/// `1.2300` → `1.23`, `5.000` → `5`; text without a decimal point is left alone.
fn trim_zeros(text: &str) -> &str {
    if text.contains('.') {
        text.trim_end_matches('0').trim_end_matches('.')
    } else {
        text
    }
}

#[cfg(test)]
mod tests {
    use super::significant;

    #[test]
    fn rounds_to_significant_figures() {
        assert_eq!(significant(0.30000000000000004, 6), "0.3");
        assert_eq!(significant(9.9999996, 6), "10");
        assert_eq!(significant(123456789.0, 3), "123000000");
        assert_eq!(significant(1.5e12, 3), "1.5e12");
        assert_eq!(significant(-2.6, 1), "-3");
        assert_eq!(significant(f64::NAN, 3), "NaN");
        assert_eq!(significant(1e-4, 3), "0.0001");
    }
}
