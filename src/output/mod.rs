//! The outputs, the top of the library: every report laid out for a terminal, markdown or
//! one self-contained HTML page. `render` lays out a pour check for the terminal and
//! markdown, `html` holds the page shell every printable page shares and the check's page,
//! `sheet` the procedure's approval sheet, `tag` a carboy's contents and waste tag.
//! Layout only: every number comes from a report, and nothing here computes chemistry.

pub mod html;
pub mod render;
pub mod sheet;
pub mod tag;
