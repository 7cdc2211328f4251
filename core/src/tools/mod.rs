//! Field tools built on the pipeline: loose-neutral diagnosis from meter readings and panel
//! balancing.

pub mod balance;
pub mod diagnose;
