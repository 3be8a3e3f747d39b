//! offgas: what gas comes out if these meet?
//!
//! The library holds all the chemistry and knows nothing of files, terminals or command
//! lines: callers hand it the text of data and batch files and get reports back.

pub mod basics;
pub mod catalog;
pub mod check;
pub mod chem;
pub mod embedded;
pub mod judge;
pub mod output;
pub mod pour;
pub mod procedure;
pub mod record;
pub mod report;
pub mod store;
