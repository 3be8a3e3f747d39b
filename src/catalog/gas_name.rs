//! The formula of a gas as the engine carries it from the catalog into every result.

use serde::{Deserialize, Serialize};
use std::fmt;
use std::sync::Arc;

/// A gas formula ("HCN", "Cl2") shared between the catalog and every equilibrium that
/// reports it: a solve copies a pointer, not the text, so the headspace costs no
/// allocation per gas.
#[derive(Debug, Clone, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(transparent)]
pub struct GasName(Arc<str>);

impl GasName {
    pub fn as_str(&self) -> &str {
        &self.0
    }
}

impl std::ops::Deref for GasName {
    type Target = str;
    fn deref(&self) -> &str {
        &self.0
    }
}

impl std::borrow::Borrow<str> for GasName {
    fn borrow(&self) -> &str {
        &self.0
    }
}

impl AsRef<str> for GasName {
    fn as_ref(&self) -> &str {
        &self.0
    }
}

impl fmt::Display for GasName {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.0)
    }
}

impl From<&str> for GasName {
    fn from(s: &str) -> Self {
        GasName(Arc::from(s))
    }
}

impl From<GasName> for String {
    fn from(g: GasName) -> String {
        g.0.to_string()
    }
}

impl PartialEq<str> for GasName {
    fn eq(&self, other: &str) -> bool {
        &*self.0 == other
    }
}

impl PartialEq<&str> for GasName {
    fn eq(&self, other: &&str) -> bool {
        &*self.0 == *other
    }
}

impl PartialEq<String> for GasName {
    fn eq(&self, other: &String) -> bool {
        *self.0 == **other
    }
}

impl PartialEq<GasName> for String {
    fn eq(&self, other: &GasName) -> bool {
        **self == *other.0
    }
}

impl PartialEq<GasName> for str {
    fn eq(&self, other: &GasName) -> bool {
        *self == *other.0
    }
}
