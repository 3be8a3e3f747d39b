//! Chemical formulas as chemists write them.
//!
//! The data files and the JSON carry one plain-ASCII form: the charge after the formula,
//! its size after a caret where it is more than one (`Na+`, `HCO3-`, `CO3^2-`, `Fe^3+`,
//! `Fe(CN)6^4-`). Terminals, markdown and HTML show the usual typeset form: subscript counts
//! and a superscript charge (CO₃²⁻, Fe³⁺, Fe(CN)₆⁴⁻). A hydrate's water follows a dot
//! (`CuSO4.5H2O` → CuSO₄·5H₂O).

/// Splits an ASCII formula into its body and its charge ("CO3^2-" → ("CO3", -2)).
pub fn split_charge(formula: &str) -> (&str, i32) {
    if let Some(pos) = formula.rfind('^') {
        let (body, tail) = formula.split_at(pos);
        let tail = &tail[1..];
        let sign = match tail.chars().last() {
            Some('+') => 1,
            Some('-') => -1,
            _ => return (formula, 0),
        };
        if let Ok(n) = tail[..tail.len() - 1].parse::<i32>() {
            return (body, sign * n);
        }
        return (formula, 0);
    }
    match formula.chars().last() {
        Some('+') if formula.len() > 1 => (&formula[..formula.len() - 1], 1),
        Some('-') if formula.len() > 1 => (&formula[..formula.len() - 1], -1),
        _ => (formula, 0),
    }
}

/// The ASCII form of a charge after a body ("CO3", -2 → "CO3^2-").
pub fn with_charge(body: &str, charge: i32) -> String {
    match charge {
        0 => body.to_string(),
        1 => format!("{body}+"),
        -1 => format!("{body}-"),
        z if z > 0 => format!("{body}^{z}+"),
        z => format!("{body}^{}-", -z),
    }
}

fn subscript(d: char) -> char {
    match d {
        '0' => '₀',
        '1' => '₁',
        '2' => '₂',
        '3' => '₃',
        '4' => '₄',
        '5' => '₅',
        '6' => '₆',
        '7' => '₇',
        '8' => '₈',
        '9' => '₉',
        other => other,
    }
}

fn superscript(c: char) -> char {
    match c {
        '0' => '⁰',
        '1' => '¹',
        '2' => '²',
        '3' => '³',
        '4' => '⁴',
        '5' => '⁵',
        '6' => '⁶',
        '7' => '⁷',
        '8' => '⁸',
        '9' => '⁹',
        '+' => '⁺',
        '-' => '⁻',
        other => other,
    }
}

/// The typeset form of an ASCII formula: CO₃²⁻, Fe³⁺, H₂O, CuSO₄·5H₂O.
pub fn pretty(formula: &str) -> String {
    let (body, charge) = split_charge(formula);
    let mut out = String::with_capacity(formula.len() + 8);
    let mut after_atom = false;
    for c in body.chars() {
        match c {
            '.' => {
                out.push('·');
                after_atom = false;
            }
            d if d.is_ascii_digit() && after_atom => out.push(subscript(d)),
            d if d.is_ascii_digit() => out.push(d),
            c => {
                out.push(c);
                after_atom = c.is_ascii_alphabetic() || c == ')' || c == ']';
            }
        }
    }
    match charge {
        0 => {}
        1 => out.push('⁺'),
        -1 => out.push('⁻'),
        z => {
            out.extend(z.abs().to_string().chars().map(superscript));
            out.push(if z > 0 { '⁺' } else { '⁻' });
        }
    }
    out
}

/// Every formula in a line of text typeset ("HS- + H2O" → "HS⁻ + H₂O"): each word that
/// reads as a formula is converted, other words are left alone.
pub fn pretty_words(text: &str) -> String {
    text.split(' ')
        .map(|w| {
            if looks_like_formula(w) {
                pretty(w)
            } else {
                w.to_string()
            }
        })
        .collect::<Vec<_>>()
        .join(" ")
}

fn looks_like_formula(w: &str) -> bool {
    let first_upper = w.chars().next().is_some_and(|c| c.is_ascii_uppercase());
    first_upper
        && w.chars()
            .all(|c| c.is_ascii_alphanumeric() || "()[].^+-".contains(c))
        && (w.chars().any(|c| c.is_ascii_digit()) || w.ends_with('+') || w.ends_with('-'))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn typesets_charges_and_counts() {
        assert_eq!(pretty("CO3^2-"), "CO₃²⁻");
        assert_eq!(pretty("Fe^3+"), "Fe³⁺");
        assert_eq!(pretty("Na+"), "Na⁺");
        assert_eq!(pretty("HCO3-"), "HCO₃⁻");
        assert_eq!(pretty("Fe(CN)6^4-"), "Fe(CN)₆⁴⁻");
        assert_eq!(pretty("H2O"), "H₂O");
        assert_eq!(pretty("CuSO4.5H2O"), "CuSO₄·5H₂O");
        assert_eq!(pretty("H6Y^2+"), "H₆Y²⁺");
    }

    #[test]
    fn splits_and_rebuilds_the_ascii_form() {
        for (f, body, z) in [
            ("CO3^2-", "CO3", -2),
            ("Fe^3+", "Fe", 3),
            ("Na+", "Na", 1),
            ("Cl-", "Cl", -1),
            ("H2S", "H2S", 0),
        ] {
            assert_eq!(split_charge(f), (body, z));
            assert_eq!(with_charge(body, z), f);
        }
    }

    #[test]
    fn words_in_a_line() {
        assert_eq!(pretty_words("HS- + H2O"), "HS⁻ + H₂O");
        assert_eq!(pretty_words("pH 7 and Cl2"), "pH 7 and Cl₂");
    }
}

/// How many atoms of `element` a formula holds ("B(OH)4-", "O" → 4), counting groups in
/// parentheses and a hydrate's water after a dot; None where the formula cannot be read.
pub fn atom_count(formula: &str, element: &str) -> Option<u32> {
    let (body, _) = split_charge(formula);
    let mut total = 0;
    for part in body.split('.') {
        let digits = part.chars().take_while(|c| c.is_ascii_digit()).count();
        let times: u32 = if digits > 0 {
            part[..digits].parse().ok()?
        } else {
            1
        };
        total += times * count_in_group(&part[digits..], element)?;
    }
    Some(total)
}

/// Atoms of `element` in a formula without charge or hydrate dots.
fn count_in_group(s: &str, element: &str) -> Option<u32> {
    let bytes = s.as_bytes();
    let mut stack: Vec<u32> = vec![0];
    let mut i = 0;
    let number_at = |i: &mut usize| -> u32 {
        let start = *i;
        while *i < bytes.len() && bytes[*i].is_ascii_digit() {
            *i += 1;
        }
        s[start..*i].parse().unwrap_or(1)
    };
    while i < bytes.len() {
        match bytes[i] {
            b'(' | b'[' => {
                stack.push(0);
                i += 1;
            }
            b')' | b']' => {
                i += 1;
                let inner = stack.pop()?;
                let n = number_at(&mut i);
                *stack.last_mut()? += inner * n;
            }
            c if c.is_ascii_uppercase() => {
                let start = i;
                i += 1;
                while i < bytes.len() && bytes[i].is_ascii_lowercase() {
                    i += 1;
                }
                let symbol = &s[start..i];
                let n = number_at(&mut i);
                if symbol == element {
                    *stack.last_mut()? += n;
                }
            }
            _ => return None,
        }
    }
    (stack.len() == 1).then(|| stack[0])
}

#[cfg(test)]
mod atom_tests {
    use super::atom_count;

    #[test]
    fn atoms_are_counted_through_groups_charges_and_water() {
        assert_eq!(atom_count("CO2", "O"), Some(2));
        assert_eq!(atom_count("HCO3-", "H"), Some(1));
        assert_eq!(atom_count("B(OH)4-", "O"), Some(4));
        assert_eq!(atom_count("B(OH)4-", "H"), Some(4));
        assert_eq!(atom_count("CO3^2-", "O"), Some(3));
        assert_eq!(atom_count("Fe(CN)6^4-", "N"), Some(6));
        assert_eq!(atom_count("CuSO4.5H2O", "O"), Some(9));
        assert_eq!(atom_count("CH3COOH", "H"), Some(4));
        assert_eq!(atom_count("Cl-", "O"), Some(0));
        assert_eq!(atom_count("H2O2", "O"), Some(2));
        assert_eq!(atom_count("(OH", "O"), None);
    }
}
