//! Amounts, volumes and temperatures as people write them ("12 L", "0.1 mol/L", "22 °C").
//!
//! One parser for every unit the batch files accept, so that every file speaks the same
//! language and every mistake gets the same kind of message.

use std::fmt;

/// A liquid or gas volume, stored in litres.
#[derive(Debug, Clone, Copy, PartialEq, PartialOrd)]
pub struct Litres(pub f64);

/// A temperature, stored in kelvin.
#[derive(Debug, Clone, Copy, PartialEq, PartialOrd)]
pub struct Kelvin(pub f64);

impl Kelvin {
    pub const STANDARD: Kelvin = Kelvin(298.15);
    pub fn from_celsius(c: f64) -> Self {
        Kelvin(c + 273.15)
    }
    pub fn celsius(self) -> f64 {
        self.0 - 273.15
    }
}

/// How much of a substance a batch holds, in the form the user wrote it.
///
/// Concentrations are per litre of the batch; totals are for the whole batch.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Amount {
    MolPerLitre(f64),
    GramPerLitre(f64),
    /// Mass percent of the batch; needs the batch density.
    PercentWeightPerWeight(f64),
    /// Grams per 100 mL of the batch.
    PercentWeightPerVolume(f64),
    /// Millilitres of the (liquid) substance per litre of batch; needs its density.
    MillilitrePerLitre(f64),
    Moles(f64),
    Grams(f64),
    /// A volume of a liquid or solution substance; needs its density.
    Millilitres(f64),
}

#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum QuantityError {
    #[error("`{0}` has no number; write it like `{1}`")]
    NoNumber(String, &'static str),
    #[error("`{text}` has no unit; write it like `{example}`")]
    NoUnit { text: String, example: &'static str },
    #[error("unit `{unit}` in `{text}` is not one offgas knows; use one of: {known}")]
    UnknownUnit {
        text: String,
        unit: String,
        known: &'static str,
    },
    #[error("`{0}` must be a finite number")]
    NotFinite(String),
    #[error("`{0}` is negative; amounts and volumes cannot be below zero")]
    Negative(String),
    #[error("`{0}` is above 100 %")]
    OverHundredPercent(String),
}

const AMOUNT_UNITS: &str =
    "mol/L, mmol/L, M, mM, g/L, mg/L, % w/w, % w/v, % v/v, mL/L, mol, mmol, g, kg, mg, L, mL";
const VOLUME_UNITS: &str = "L, mL, m3";
const TEMPERATURE_UNITS: &str = "°C, C, K, °F";
const PRESSURE_UNITS: &str = "kPa, Pa, bar, mbar, psi, atm";
const AREA_UNITS: &str = "m2, cm2, ft2";

/// Parses a gauge pressure ("30 kPa", "0.3 bar", "5 psi") into kPa.
pub fn parse_pressure_kpa(text: &str) -> Result<f64, QuantityError> {
    const EXAMPLE: &str = "30 kPa";
    let (v, unit) = measured(text, EXAMPLE, true)?;
    let kpa = match unit.to_lowercase().as_str() {
        "kpa" => v,
        "pa" => v / 1e3,
        "bar" => v * 100.0,
        "mbar" => v / 10.0,
        "psi" | "psig" => v * 6.894757,
        "atm" => v * 101.325,
        _ => {
            return Err(QuantityError::UnknownUnit {
                text: text.to_string(),
                unit,
                known: PRESSURE_UNITS,
            })
        }
    };
    Ok(kpa)
}

/// Parses an area ("0.05 m2", "400 cm2") into m2.
pub fn parse_area_m2(text: &str) -> Result<f64, QuantityError> {
    const EXAMPLE: &str = "0.5 m2";
    let (v, unit) = measured(text, EXAMPLE, true)?;
    let m2 = match unit.as_str() {
        "m2" | "m²" | "m^2" => v,
        "cm2" | "cm²" | "cm^2" => v / 1e4,
        "ft2" | "ft²" | "ft^2" => v * 0.09290304,
        _ => {
            return Err(QuantityError::UnknownUnit {
                text: text.to_string(),
                unit,
                known: AREA_UNITS,
            })
        }
    };
    Ok(m2)
}

/// Parses a room volume ("50 m3", "2000 L") into m3.
pub fn parse_room_volume_m3(text: &str) -> Result<f64, QuantityError> {
    let t = text.trim();
    const EXAMPLE: &str = "50 m3";
    let (v, unit) = measured(t, EXAMPLE, true)?;
    match unit.as_str() {
        "m3" | "m³" | "m^3" => Ok(v),
        _ => parse_volume(t)
            .map(|l| l.0 / 1e3)
            .map_err(|_| QuantityError::UnknownUnit {
                text: text.to_string(),
                unit,
                known: "m3, L",
            }),
    }
}

/// Splits "0.1 mol/L" into (0.1, "mol/L"); the unit has its inner spaces removed.
fn split_number(text: &str, example: &'static str) -> Result<(f64, String), QuantityError> {
    let t = text.trim();
    let end = t
        .char_indices()
        .find(|(_, c)| !(c.is_ascii_digit() || matches!(c, '.' | '-' | '+' | 'e' | 'E')))
        .map(|(i, _)| i)
        .unwrap_or(t.len());
    // "e" may start a unit only after a complete number, never here: units never start with e.
    let (num, unit) = t.split_at(end);
    if num.is_empty() {
        return Err(QuantityError::NoNumber(text.to_string(), example));
    }
    let value: f64 = num
        .parse()
        .map_err(|_| QuantityError::NoNumber(text.to_string(), example))?;
    if !value.is_finite() {
        return Err(QuantityError::NotFinite(text.to_string()));
    }
    let unit: String = unit.chars().filter(|c| !c.is_whitespace()).collect();
    Ok((value, unit))
}

/// A number with a unit, both required; `non_negative` refuses values below zero.
fn measured(
    text: &str,
    example: &'static str,
    non_negative: bool,
) -> Result<(f64, String), QuantityError> {
    let (v, unit) = split_number(text, example)?;
    if unit.is_empty() {
        return Err(QuantityError::NoUnit {
            text: text.to_string(),
            example,
        });
    }
    if non_negative && v < 0.0 {
        return Err(QuantityError::Negative(text.to_string()));
    }
    Ok((v, unit))
}

/// Parses an amount of a component: a concentration per litre of batch or a total.
pub fn parse_amount(text: &str) -> Result<Amount, QuantityError> {
    const EXAMPLE: &str = "0.1 mol/L";
    let (v, unit) = measured(text, EXAMPLE, true)?;
    let percent = |v: f64| {
        if v > 100.0 {
            Err(QuantityError::OverHundredPercent(text.to_string()))
        } else {
            Ok(v)
        }
    };
    let lower = unit.to_lowercase();
    let amount = match unit.as_str() {
        "M" => Amount::MolPerLitre(v),
        "mM" => Amount::MolPerLitre(v / 1e3),
        _ => match lower.as_str() {
            "mol/l" | "mol/dm3" => Amount::MolPerLitre(v),
            "mmol/l" => Amount::MolPerLitre(v / 1e3),
            "µmol/l" | "umol/l" => Amount::MolPerLitre(v / 1e6),
            "g/l" | "kg/m3" => Amount::GramPerLitre(v),
            "mg/l" => Amount::GramPerLitre(v / 1e3),
            "%w/w" | "%(w/w)" | "wt%" | "%wt" | "%" => Amount::PercentWeightPerWeight(percent(v)?),
            "%w/v" | "%(w/v)" => Amount::PercentWeightPerVolume(percent(v)?),
            "%v/v" | "%(v/v)" => Amount::MillilitrePerLitre(percent(v)? * 10.0),
            "ml/l" => {
                if v > 1000.0 {
                    return Err(QuantityError::OverHundredPercent(text.to_string()));
                }
                Amount::MillilitrePerLitre(v)
            }
            "mol" => Amount::Moles(v),
            "mmol" => Amount::Moles(v / 1e3),
            "g" => Amount::Grams(v),
            "kg" => Amount::Grams(v * 1e3),
            "mg" => Amount::Grams(v / 1e3),
            "l" => Amount::Millilitres(v * 1e3),
            "ml" => Amount::Millilitres(v),
            _ => {
                return Err(QuantityError::UnknownUnit {
                    text: text.to_string(),
                    unit,
                    known: AMOUNT_UNITS,
                })
            }
        },
    };
    Ok(amount)
}

/// Parses a volume ("12 L", "500 mL").
pub fn parse_volume(text: &str) -> Result<Litres, QuantityError> {
    const EXAMPLE: &str = "12 L";
    let (v, unit) = measured(text, EXAMPLE, true)?;
    let litres = match unit.to_lowercase().as_str() {
        "l" | "dm3" => v,
        "ml" | "cm3" => v / 1e3,
        "m3" => v * 1e3,
        _ => {
            return Err(QuantityError::UnknownUnit {
                text: text.to_string(),
                unit,
                known: VOLUME_UNITS,
            })
        }
    };
    Ok(Litres(litres))
}

/// Parses a temperature ("22 °C", "295 K").
pub fn parse_temperature(text: &str) -> Result<Kelvin, QuantityError> {
    const EXAMPLE: &str = "22 °C";
    let (v, unit) = measured(text, EXAMPLE, false)?;
    let k = match unit.as_str() {
        "°C" | "C" | "degC" | "℃" | "ºC" => Kelvin::from_celsius(v),
        "K" => Kelvin(v),
        "°F" | "F" | "degF" => Kelvin::from_celsius((v - 32.0) * 5.0 / 9.0),
        _ => {
            return Err(QuantityError::UnknownUnit {
                text: text.to_string(),
                unit,
                known: TEMPERATURE_UNITS,
            })
        }
    };
    Ok(k)
}

impl fmt::Display for Litres {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.0 < 1.0 {
            write!(f, "{:.0} mL", self.0 * 1e3)
        } else {
            write!(f, "{:.3} L", self.0)
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parses_the_units_a_batch_file_accepts() {
        assert_eq!(parse_amount("0.1 mol/L").unwrap(), Amount::MolPerLitre(0.1));
        assert_eq!(parse_amount("5 mM").unwrap(), Amount::MolPerLitre(0.005));
        assert_eq!(parse_amount("2 M").unwrap(), Amount::MolPerLitre(2.0));
        assert_eq!(parse_amount("20 mg/L").unwrap(), Amount::GramPerLitre(0.02));
        assert_eq!(
            parse_amount("5 % w/w").unwrap(),
            Amount::PercentWeightPerWeight(5.0)
        );
        assert_eq!(
            parse_amount("3 %w/v").unwrap(),
            Amount::PercentWeightPerVolume(3.0)
        );
        assert_eq!(parse_amount("250 mg").unwrap(), Amount::Grams(0.25));
        assert_eq!(parse_amount("3 mmol").unwrap(), Amount::Moles(0.003));
        assert_eq!(parse_amount("0.5 L").unwrap(), Amount::Millilitres(500.0));
        assert_eq!(parse_volume("500 mL").unwrap(), Litres(0.5));
        assert!((parse_temperature("22 °C").unwrap().0 - 295.15).abs() < 1e-9);
        assert!((parse_temperature("300 K").unwrap().0 - 300.0).abs() < 1e-9);
    }

    #[test]
    fn rejects_what_it_cannot_read() {
        assert!(matches!(
            parse_amount("5 furlongs"),
            Err(QuantityError::UnknownUnit { .. })
        ));
        assert!(matches!(
            parse_amount("0.1"),
            Err(QuantityError::NoUnit { .. })
        ));
        assert!(matches!(
            parse_amount("-1 g/L"),
            Err(QuantityError::Negative(_))
        ));
        assert!(matches!(
            parse_amount("120 % w/w"),
            Err(QuantityError::OverHundredPercent(_))
        ));
        assert!(matches!(
            parse_temperature("22"),
            Err(QuantityError::NoUnit { .. })
        ));
        assert!(matches!(
            parse_volume("lots L"),
            Err(QuantityError::NoNumber(..))
        ));
    }
}
