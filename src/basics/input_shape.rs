//! Limits on what a user's file may look like before it is parsed: its size, how deeply it
//! nests, and how long a name in it may be.
//!
//! The YAML parser's time grows with the square of the nesting depth, and the name search
//! compares a name with every known one: a file that is a megabyte of brackets or a
//! megabyte-long name would keep the program busy for minutes. Real files are far inside
//! these limits, so a file outside them is a mistake and gets a clear error at once.

use crate::basics::input_error::InputError;

/// Largest batch, procedure, rule or thresholds file accepted, bytes.
pub const MAX_FILE_BYTES: usize = 1 << 20;
/// Largest storeroom inventory accepted, bytes (an inventory lists many containers).
pub const MAX_INVENTORY_BYTES: usize = 256 << 20;
/// Deepest nesting of mappings and lists accepted.
pub const MAX_DEPTH: usize = 64;
/// Longest substance name (or synonym, formula, CAS number) accepted, characters.
pub const MAX_NAME_CHARS: usize = 200;

/// Refuses a file that is too large or nests too deeply to be a real one.
pub fn check_yaml_shape(file: &str, text: &str, max_bytes: usize) -> Result<(), InputError> {
    if text.len() > max_bytes {
        return Err(InputError {
            file: file.to_string(),
            line: None,
            message: format!(
                "the file is {} bytes, more than the {} this kind of file may have",
                text.len(),
                max_bytes
            ),
            fix: Some("check that this is the file you meant; split a very large one".into()),
        });
    }
    if let Some((line, depth)) = too_deep(text) {
        return Err(InputError {
            file: file.to_string(),
            line: Some(line),
            message: format!(
                "the file nests {depth} levels deep here, more than the {MAX_DEPTH} offgas accepts"
            ),
            fix: Some(
                "a batch, procedure or inventory needs only a few levels: check the brackets and indentation".into(),
            ),
        });
    }
    Ok(())
}

/// The first line where the nesting passes `MAX_DEPTH`, with the depth there. Flow brackets
/// count one level each; block indentation counts one level per step of indentation.
fn too_deep(text: &str) -> Option<(usize, usize)> {
    let mut flow = 0usize;
    let mut indents: Vec<usize> = Vec::new();
    for (i, line) in text.lines().enumerate() {
        let content = line.trim_start();
        if flow == 0 && !content.is_empty() && !content.starts_with('#') {
            let indent = line.len() - content.len();
            while indents.last().is_some_and(|&d| d >= indent) {
                indents.pop();
            }
            indents.push(indent);
        }
        let mut quote: Option<char> = None;
        for c in content.chars() {
            match (quote, c) {
                (Some(q), c) if c == q => quote = None,
                (Some(_), _) => {}
                (None, '"' | '\'') => quote = Some(c),
                (None, '#') => break,
                (None, '[' | '{') => flow += 1,
                (None, ']' | '}') => flow = flow.saturating_sub(1),
                _ => {}
            }
            let depth = flow + indents.len();
            if depth > MAX_DEPTH {
                return Some((i + 1, depth));
            }
        }
    }
    None
}

/// Refuses a name too long to be a substance's, showing only its start.
pub fn check_name_length(name: &str) -> Result<(), String> {
    let chars = name.chars().count();
    if chars > MAX_NAME_CHARS {
        let start: String = name.chars().take(40).collect();
        return Err(format!(
            "the name `{start}...` is {chars} characters long, more than the {MAX_NAME_CHARS} a substance name may have"
        ));
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ordinary_batch_passes() {
        let t = "name: a\nvolume: 1 L\ncontents:\n  - sodium chloride: 1 g/L\n  - {substance: water, amount: 1 L}\n";
        assert!(check_yaml_shape("f", t, MAX_FILE_BYTES).is_ok());
    }

    #[test]
    fn deep_flow_nesting_is_refused_with_its_line() {
        let t = format!(
            "name: a\ncontents: {}{}\n",
            "[".repeat(100),
            "]".repeat(100)
        );
        let e = check_yaml_shape("f.yaml", &t, MAX_FILE_BYTES).unwrap_err();
        assert_eq!(e.line, Some(2));
        assert!(e.message.contains("nests"));
    }

    #[test]
    fn brackets_inside_quotes_do_not_count() {
        let t = format!("name: \"{}\"\nvolume: 1 L\n", "[".repeat(500));
        assert!(check_yaml_shape("f", &t, MAX_FILE_BYTES).is_ok());
    }

    #[test]
    fn size_limit() {
        let t = "#".repeat(MAX_FILE_BYTES + 1);
        assert!(check_yaml_shape("f", &t, MAX_FILE_BYTES).is_err());
    }

    #[test]
    fn long_names_are_refused_briefly() {
        let long = "x".repeat(10_000);
        let e = check_name_length(&long).unwrap_err();
        assert!(e.len() < 200, "{e}");
    }
}
