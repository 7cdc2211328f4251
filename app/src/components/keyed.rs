//! One keyed list for every list of the app whose rows hold state of their own (an open field,
//! a rename box): a row is rebuilt only when its key changes.
//!
//! Leptos's `For` is generic over the item, the key and the three closures, so each use compiled
//! its own copy of the list-diffing code (9–14 KB of the module apiece). Here every list passes
//! the same types (a text key and a boxed builder of the row's view), so that code is compiled
//! once.

use leptos::prelude::*;

/// One row of a [`KeyedList`]: its key and what builds its view.
pub struct Keyed {
    key: String,
    build: Box<dyn FnOnce() -> AnyView + Send>,
}

impl Keyed {
    /// A row with key `key` whose view `build` makes when the row is first shown.
    pub fn new<V: IntoView + 'static>(
        key: String,
        build: impl FnOnce() -> V + Send + 'static,
    ) -> Keyed {
        Keyed {
            key,
            build: Box::new(move || build().into_any()),
        }
    }
}

/// The rows `rows` returns, rebuilt one by one when their keys change.
#[component]
pub fn KeyedList(rows: Box<dyn Fn() -> Vec<Keyed> + Send>) -> impl IntoView {
    view! {
        <For each=rows key=|r: &Keyed| r.key.clone() children=|r: Keyed| (r.build)() />
    }
}
