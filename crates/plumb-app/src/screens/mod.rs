//! The screens other than the bench, and the frame around them: the tool bar and status line,
//! the columns of a file, the co-movement map, and the one-pass view.

pub mod chrome;
pub mod columns;
pub mod map;
pub mod one_pass;
