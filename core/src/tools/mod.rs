//! Field tools built on the pipeline: loose-neutral diagnosis from meter readings, panel
//! balancing, and the dip when a motor starts.

pub mod balance;
pub mod diagnose;
pub mod start;
