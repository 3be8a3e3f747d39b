//! A course in one line of text: Unicode block characters, or ASCII where the terminal
//! cannot show them.

/// Characters from lowest to highest.
const BLOCKS: [char; 8] = ['▁', '▂', '▃', '▄', '▅', '▆', '▇', '█'];
const ASCII: [char; 8] = ['_', '.', '-', '~', '=', '+', '*', '#'];

/// Which characters a line may use.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Charset {
    Unicode,
    Ascii,
}

impl Charset {
    /// Unicode when the locale says UTF-8 (LC_ALL, then LC_CTYPE, then LANG, the first that
    /// is set), ASCII otherwise.
    pub fn from_locale(get: impl Fn(&str) -> Option<String>) -> Charset {
        let locale = ["LC_ALL", "LC_CTYPE", "LANG"]
            .iter()
            .find_map(|k| get(k).filter(|v| !v.is_empty()))
            .unwrap_or_default()
            .to_ascii_lowercase();
        if locale.contains("utf-8") || locale.contains("utf8") {
            Charset::Unicode
        } else {
            Charset::Ascii
        }
    }
}

/// `values` sampled at `width` evenly spaced points of `x` (0-1, rising), by straight lines
/// between the given points.
pub fn resample(points: &[(f64, f64)], width: usize) -> Vec<f64> {
    (0..width)
        .map(|i| {
            let x = if width > 1 {
                i as f64 / (width - 1) as f64
            } else {
                1.0
            };
            interpolate(points, x)
        })
        .collect()
}

fn interpolate(points: &[(f64, f64)], x: f64) -> f64 {
    match points.iter().position(|p| p.0 >= x) {
        None => points.last().map_or(f64::NAN, |p| p.1),
        Some(0) => points[0].1,
        Some(i) => {
            let (a, b) = (points[i - 1], points[i]);
            if b.0 > a.0 {
                a.1 + (b.1 - a.1) * (x - a.0) / (b.0 - a.0)
            } else {
                b.1
            }
        }
    }
}

/// One character per value, scaled between `lo` and `hi`; the column `mark` (if any) is set
/// between brackets so it stands out without colour.
pub fn line(values: &[f64], lo: f64, hi: f64, mark: Option<usize>, charset: Charset) -> String {
    let set = match charset {
        Charset::Unicode => &BLOCKS,
        Charset::Ascii => &ASCII,
    };
    let span = (hi - lo).max(f64::MIN_POSITIVE);
    let mut out = String::with_capacity(values.len() * 3 + 2);
    for (i, v) in values.iter().enumerate() {
        let level = if v.is_finite() {
            (((v - lo) / span) * (set.len() - 1) as f64)
                .round()
                .clamp(0.0, (set.len() - 1) as f64) as usize
        } else {
            0
        };
        if mark == Some(i) {
            out.push('[');
            out.push(set[level]);
            out.push(']');
        } else {
            out.push(set[level]);
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_hump_reads_as_a_hump() {
        let v = [0.0, 1.0, 3.0, 7.0, 3.0, 1.0, 0.0];
        assert_eq!(line(&v, 0.0, 7.0, Some(3), Charset::Unicode), "▁▂▄[█]▄▂▁");
        assert_eq!(line(&v, 0.0, 7.0, None, Charset::Ascii), "_.~#~._");
    }

    #[test]
    fn resampling_follows_the_points() {
        let v = resample(&[(0.0, 0.0), (0.5, 10.0), (1.0, 0.0)], 5);
        assert_eq!(v, vec![0.0, 5.0, 10.0, 5.0, 0.0]);
    }

    #[test]
    fn locale_decides_the_characters() {
        let env = |pairs: &'static [(&'static str, &'static str)]| {
            move |k: &str| pairs.iter().find(|p| p.0 == k).map(|p| p.1.to_string())
        };
        assert_eq!(
            Charset::from_locale(env(&[("LANG", "en_GB.UTF-8")])),
            Charset::Unicode
        );
        assert_eq!(
            Charset::from_locale(env(&[("LC_ALL", "C"), ("LANG", "en_GB.UTF-8")])),
            Charset::Ascii
        );
        assert_eq!(Charset::from_locale(env(&[])), Charset::Ascii);
    }
}
