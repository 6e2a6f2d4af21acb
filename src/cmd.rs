//! Headless commands, one file each: its arguments and its `run`.

pub mod checks;
pub mod fold;
pub mod generate;
pub mod odds;
pub mod summary;
