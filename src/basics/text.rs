//! Numbers as people read them in reports: fixed decimals, no "-0.0".

/// `v` with `decimals` decimals; a value that rounds to zero is written without a sign.
pub fn fixed(v: f64, decimals: usize) -> String {
    let s = format!("{v:.decimals$}");
    if s.starts_with('-') && s[1..].chars().all(|c| c == '0' || c == '.') {
        s[1..].to_string()
    } else {
        s
    }
}

/// A volume in litres as people write it: "146 L", "4 L", "0.5 L", "0.025 L".
pub fn litres(l: f64) -> String {
    let s = format!("{l:.3}");
    let s = s.trim_end_matches('0').trim_end_matches('.');
    format!("{} L", if s.is_empty() || s == "-" { "0" } else { s })
}

/// A concentration as people read it: "0.12 mol/L", "0.30 mM", "4.5 µM", "2.0e-9 mol/L".
pub fn molar(c: f64) -> String {
    if c >= 0.1 {
        format!("{c:.2} mol/L")
    } else if c >= 1e-4 {
        format!("{:.2} mM", c * 1e3)
    } else if c >= 1e-7 {
        format!("{:.2} µM", c * 1e6)
    } else {
        format!("{c:.1e} mol/L")
    }
}

/// `s` with its first letter in capitals, to open a sentence.
pub fn sentence_start(s: &str) -> String {
    let mut c = s.chars();
    match c.next() {
        Some(first) => first.to_uppercase().chain(c).collect(),
        None => String::new(),
    }
}

#[cfg(test)]
mod tests {
    use super::{fixed, litres};

    #[test]
    fn litres_without_trailing_zeros() {
        assert_eq!(litres(146.0), "146 L");
        assert_eq!(litres(0.5), "0.5 L");
        assert_eq!(litres(0.025), "0.025 L");
        assert_eq!(litres(4.0004), "4 L");
    }

    #[test]
    fn no_negative_zero() {
        assert_eq!(fixed(-0.0, 1), "0.0");
        assert_eq!(fixed(-0.04, 1), "0.0");
        assert_eq!(fixed(-0.4, 0), "0");
        assert_eq!(fixed(-0.06, 1), "-0.1");
        assert_eq!(fixed(12.345, 2), "12.35");
    }
}
