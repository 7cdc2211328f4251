//! Field tools built on the engine: loose-neutral diagnosis from meter readings, panel balancing,
//! and shared-neutral (multiwire) branch circuit checks.

pub mod balance;
pub mod diagnose;
pub mod multiwire;
