//! The outputs, the top of the library: every report laid out for a terminal, markdown or
//! one self-contained HTML page. `page` is the shell every printable page shares and the
//! escaping; `render` lays out a pour check for the terminal and markdown, `check_page` as
//! a page; `sheet` is the procedure's approval sheet; `tag` a carboy's contents and waste
//! tag.
//! Layout only: every number comes from a report, and nothing here computes chemistry.

pub mod audit;
pub mod audit_drawing;
pub mod check_page;
pub mod page;
pub mod plot;
pub mod render;
pub mod sheet;
pub mod tag;
