//! Rounding for people. JSON keeps every bit; tables show what a reader
//! can compare at a glance.

/// `x` with `sig` significant digits, plain notation for ordinary sizes,
/// thousands not separated (so values paste into spreadsheets).
pub fn sig(x: f64, sig: usize) -> String {
    if !x.is_finite() {
        return "—".into();
    }
    if x == 0.0 {
        return "0".into();
    }
    let mag = x.abs().log10().floor() as i32;
    if !(-4..=9).contains(&mag) {
        return format!("{:.*e}", sig.saturating_sub(1), x);
    }
    let decimals = (sig as i32 - 1 - mag).max(0) as usize;
    format!("{x:.decimals$}")
}

/// A figure such as R or z with a fixed number of decimals, switching to
/// four significant digits in scientific notation from 10⁶ on, so that an
/// extreme row (R = 1.1·10¹², from a tiny `--area`) stays a short cell.
pub fn fixed(x: f64, decimals: usize) -> String {
    if x.is_finite() && x.abs() >= 1e6 {
        sig(x, 4)
    } else {
        format!("{x:.decimals$}")
    }
}

/// p-values: three decimals, and "< 0.001" below that.
pub fn p_value(p: f64) -> String {
    if !p.is_finite() {
        "—".into()
    } else if p < 0.001 {
        "< 0.001".into()
    } else {
        format!("{p:.3}")
    }
}

/// An optional number, with a dash for "no value".
pub fn opt(x: Option<f64>, digits: usize) -> String {
    x.map_or_else(|| "—".into(), |v| sig(v, digits))
}

/// Percent with one decimal.
pub fn percent(x: f64) -> String {
    format!("{:.1} %", 100.0 * x)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rounding_examples() {
        assert_eq!(sig(12345.678, 4), "12346");
        assert_eq!(sig(0.071234, 3), "0.0712");
        assert_eq!(sig(-4.28525, 3), "-4.29");
        assert_eq!(sig(1.5e12, 3), "1.50e12");
        assert_eq!(p_value(0.0004), "< 0.001");
        assert_eq!(fixed(1.2804, 3), "1.280");
        assert_eq!(fixed(-12.104, 2), "-12.10");
        assert_eq!(fixed(1116687350529.397, 3), "1.117e12");
        assert_eq!(p_value(0.04999), "0.050");
    }
}
