//! Field tools built on the pipeline: loose-neutral diagnosis from meter readings, panel
//! balancing, the dip when a motor starts, and sizing a run for its drop.

pub mod balance;
pub mod diagnose;
pub mod size;
pub mod start;
