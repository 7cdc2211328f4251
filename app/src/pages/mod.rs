//! One module per screen.

pub mod cautions;
pub mod job;
pub mod jobs;
mod loads;
pub mod owner;
mod panel;
mod readings;
mod results;
mod runs;
mod service;
mod whatif;
