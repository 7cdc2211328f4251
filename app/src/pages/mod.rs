//! One module per screen.

pub mod cautions;
pub mod diagnose;
pub mod job;
pub mod jobs;
mod loads;
mod panel;
mod results;
mod service;
mod whatif;
