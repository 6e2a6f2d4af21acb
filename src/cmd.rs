//! Headless commands, one file each: its arguments and its `run`.

pub mod checks;
pub mod decide;
pub mod export;
pub mod fold;
pub mod generate;
pub mod history;
pub mod odds;
pub mod plot;
pub mod report;
pub mod summary;
