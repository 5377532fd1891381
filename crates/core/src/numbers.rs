//! Numbers for people: the one formatter of every table, page, picture
//! label and sentence. JSON keeps every bit; these show what a reader can
//! compare at a glance.
//!
//! It lives here, under every analysis, because the analyses write
//! numbers into their own sentences (a verdict, a caution, a window id)
//! and must not depend on the presentation crate; `patternproof-report`
//! re-exports it as `numbers`.
//!
//! The roundings below differ on purpose; changing one changes outputs:
//! - [`sig`] (with [`fixed`], [`p_value`], [`opt`], [`percent`]): table
//!   cells, kept at a fixed width, trailing zeros kept ("1.50e12");
//! - [`trimmed`]: distances in sentences and axis labels, [`sig`] without
//!   trailing zeros ("50 m", not "50.0 m");
//! - [`figure`]: a published figure or an interval end in a recheck, with
//!   plain integers from 10^`sig` on and scientific notation only below
//!   0.001, so that an implied count or area reads as a count;
//! - [`compact`]: a buffer distance inside a window id (`hull+0.00441`),
//!   three significant digits with trailing zeros dropped even in
//!   scientific notation, since the id is typed back on the command line;
//! - [`full`]: every digit, for CSV files.

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

/// Every digit (Rust's shortest round-trip form), or an empty cell for
/// "no value": the CSV files, which are read by programs.
pub fn full(x: Option<f64>) -> String {
    x.map_or_else(String::new, |v| format!("{v}"))
}

/// [`sig`] without trailing zeros in plain notation: a distance in a
/// sentence or on an axis ("up to 50 m").
pub fn trimmed(x: f64, digits: usize) -> String {
    let s = sig(x, digits);
    if s.contains('.') && !s.contains('e') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

/// A figure with `sig` significant digits, trailing zeros dropped, no
/// decimals from 10^`sig` on, scientific notation below 0.001, and ∞ for
/// the open end of an interval.
pub fn figure(x: f64, sig: i32) -> String {
    if !x.is_finite() {
        return if x > 0.0 { "∞".into() } else { "-∞".into() };
    }
    if x == 0.0 {
        return "0".into();
    }
    let a = x.abs();
    if a < 1e-3 {
        let d = (sig - 2).max(0) as usize;
        return format!("{x:.d$e}");
    }
    let magnitude = a.log10().floor() as i32;
    if magnitude >= sig {
        return format!("{x:.0}");
    }
    let decimals = (sig - 1 - magnitude).max(0) as usize;
    let s = format!("{x:.decimals$}");
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

/// A buffer distance written compactly for an id: three significant
/// digits, no trailing zeros, scientific below 10⁻⁴ and from 10⁶ on (so
/// a buffer of 0.0044 km is `hull+0.0044`, not `hull+0`).
pub fn compact(x: f64) -> String {
    let trim = |s: String| {
        if s.contains('.') {
            s.trim_end_matches('0').trim_end_matches('.').to_string()
        } else {
            s
        }
    };
    let a = x.abs();
    if x == 0.0 || !x.is_finite() {
        return format!("{x}");
    }
    if !(1e-4..1e6).contains(&a) {
        // Scientific, three significant digits: 1e100, 2.5e-7.
        let s = format!("{x:.2e}");
        let (mantissa, exponent) = s.split_once('e').unwrap_or((&s, "0"));
        return format!("{}e{exponent}", trim(mantissa.to_string()));
    }
    // Three significant digits, at least as many decimals as before for
    // numbers of 1 and more (12.5, 4.41), more below 1 (0.00441, not 0).
    let decimals = (2 - a.log10().floor() as i32).clamp(0, 6) as usize;
    trim(format!("{x:.decimals$}"))
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

    #[test]
    fn the_four_roundings_differ_where_they_should() {
        // trimmed: sig(·, 3) without trailing zeros.
        assert_eq!(trimmed(50.0, 3), "50");
        assert_eq!(trimmed(12.5, 3), "12.5");
        assert_eq!(trimmed(1.5e12, 3), "1.50e12");
        // figure: plain integers from 10^sig on, scientific below 0.001.
        assert_eq!(figure(0.705, 4), "0.705");
        assert_eq!(figure(-4.515_23, 4), "-4.515");
        assert_eq!(figure(18_282.4, 4), "18282");
        assert_eq!(figure(9.6e-7, 4), "9.60e-7");
        assert_eq!(figure(5.0, 4), "5");
        assert_eq!(figure(f64::INFINITY, 4), "∞");
        // compact: ids.
        assert_eq!(compact(4.4135), "4.41");
        assert_eq!(compact(17.66), "17.7");
        assert_eq!(compact(176.6), "177");
        assert_eq!(compact(0.5), "0.5");
        assert_eq!(compact(0.0044135), "0.00441");
        assert_eq!(compact(1e100), "1e100");
        assert_eq!(compact(2.5e-7), "2.5e-7");
        assert_eq!(compact(1234567.0), "1.23e6");
        // full: every digit, empty for none.
        assert_eq!(full(Some(0.1 + 0.2)), "0.30000000000000004");
        assert_eq!(full(None), "");
        // The same number four ways.
        assert_eq!(sig(1234567.0, 3), "1234567");
        assert_eq!(figure(1234567.0, 3), "1234567");
        assert_eq!(compact(1234567.0), "1.23e6");
    }
}
