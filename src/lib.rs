//! sheaf: descriptive-statistics summaries of a workbook, from a recipe.
//!
//! The crate is laid out in the order a run goes through it:
//! `recipe` (parse and check the recipe), `load` (read the data),
//! `eval` (evaluate the recipe over the columns), `stats` (the pure
//! statistics every figure comes from) and `write` (the result workbook).

#![warn(missing_docs)]

pub mod cli;
pub mod eval;
pub mod format;
pub mod history;
pub mod load;
pub mod recipe;
pub mod report;
pub mod stats;
pub mod write;
