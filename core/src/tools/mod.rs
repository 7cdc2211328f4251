//! Field tools built on the pipeline: loose-neutral diagnosis from meter readings, panel
//! balancing, the dip when a motor starts, sizing a run for its drop, and planned additions.

pub mod balance;
pub mod diagnose;
pub mod plan;
pub mod size;
pub mod start;
