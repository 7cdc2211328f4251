//! Checks against outside references: standards tables, handbook formulas and textbook worked
//! examples. Each test names its source; `README.md` beside this file lists them all.

#[path = "../common/mod.rs"]
mod common;

mod tables;
mod truth;
mod worked;
