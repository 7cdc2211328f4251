//! Views only: props in, callbacks out. No arithmetic on electrical values happens here.

mod fields;
mod keyed;
mod plot;
mod result;

pub use fields::{choices, NumberField, SelectField, TextField};
pub use keyed::{Keyed, KeyedList};
pub use plot::{PlotReadout, SweepPlot};
pub use result::{CautionList, OutcomeBadge};
