//! How numbers are written for people: fixed rules, so reports are reproducible and
//! the Markdown and other renderings of a number agree.

/// `x` with `digits` significant digits; scientific notation outside [1e-4, 1e6).
pub fn sig(x: f64, digits: usize) -> String {
    if !x.is_finite() {
        return "n/a".into();
    }
    if x == 0.0 {
        return "0".into();
    }
    let digits = digits.max(1);
    let a = x.abs();
    if !(1e-4..1e6).contains(&a) {
        return format!("{:.*e}", digits - 1, x);
    }
    // The exponent after rounding to `digits`, so 9.99996 counts as 10.00.
    let sci = format!("{:.*e}", digits - 1, a);
    let exponent: i32 = sci
        .split('e')
        .nth(1)
        .and_then(|e| e.parse().ok())
        .unwrap_or(0);
    let decimals = (digits as i32 - 1 - exponent).max(0) as usize;
    format!("{x:.decimals$}")
}

/// `x` with at most `digits` significant digits and no trailing zeros, for settings
/// such as levels (0.05) and confidence (95%).
pub fn trimmed(x: f64, digits: usize) -> String {
    let s = sig(x, digits);
    if s.contains('.') && !s.contains('e') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

/// A p-value in a sentence: "p = 0.0123" or "p < 0.0001".
pub fn p_equation(p: f64) -> String {
    if p.is_finite() && p < 0.0001 {
        "p < 0.0001".into()
    } else {
        format!("p = {}", p_value(p))
    }
}

/// A p-value: four decimals, or "< 0.0001".
pub fn p_value(p: f64) -> String {
    if !p.is_finite() {
        return "n/a".into();
    }
    if p < 0.0001 {
        "< 0.0001".into()
    } else {
        format!("{p:.4}")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn significant_digits() {
        assert_eq!(sig(0.0123449, 4), "0.01234");
        assert_eq!(sig(12.3456, 4), "12.35");
        assert_eq!(sig(-1234.5, 4), "-1234");
        assert_eq!(sig(123456.7, 4), "123457");
        assert_eq!(sig(9.99996, 4), "10.00");
        assert_eq!(sig(0.00001234, 3), "1.23e-5");
        assert_eq!(sig(2.5e7, 3), "2.50e7");
        assert_eq!(sig(0.0, 4), "0");
        assert_eq!(p_value(0.00003), "< 0.0001");
        assert_eq!(p_value(0.04567), "0.0457");
        assert_eq!(p_equation(0.00003), "p < 0.0001");
        assert_eq!(p_equation(0.5), "p = 0.5000");
        assert_eq!(trimmed(0.05, 4), "0.05");
        assert_eq!(trimmed(95.0, 4), "95");
        assert_eq!(trimmed(100.0 * (1.0 - 0.1), 4), "90");
    }
}
