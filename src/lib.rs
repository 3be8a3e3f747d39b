//! offgas: what gas comes out if these meet?
//!
//! The library holds all the chemistry and knows nothing of files, terminals or command
//! lines: callers hand it the text of data and batch files and get reports back.

pub mod assess;
pub mod batch;
pub mod boiling;
pub mod catalog;
pub mod check;
pub mod chem;
pub mod composition;
pub mod embedded;
pub mod heat;
pub mod html;
pub mod input_error;
pub mod input_shape;
pub mod notation;
pub mod pairs;
pub mod path;
pub mod plot;
pub mod pour;
pub mod procedure;
pub mod quantity;
pub mod record;
pub mod release;
pub mod render;
pub mod report;
pub mod room;
pub mod rules;
pub mod sheet;
pub mod store;
pub mod tag;
pub mod text;
pub mod thresholds;
