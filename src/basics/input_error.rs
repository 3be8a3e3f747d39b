//! A mistake in something the user wrote, with the file, the line where it can be found,
//! and the fix.
//!
//! It stands on its own (no other module of the crate) so that the modules which check
//! files before parsing them (`input_shape`) compile into the build script as well.

use std::fmt;

/// A mistake in something the user wrote.
#[derive(Debug, Clone, PartialEq)]
pub struct InputError {
    pub file: String,
    pub line: Option<usize>,
    pub message: String,
    pub fix: Option<String>,
}

impl fmt::Display for InputError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self.line {
            Some(l) => write!(f, "{}:{}: {}", self.file, l, self.message)?,
            None => write!(f, "{}: {}", self.file, self.message)?,
        }
        if let Some(fix) = &self.fix {
            write!(f, "\n  fix: {fix}")?;
        }
        Ok(())
    }
}

impl std::error::Error for InputError {}
