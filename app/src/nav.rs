//! The only module that touches the browser's history, through `gloo-history`'s hash history:
//! going to a place pushes its address, the back button and the forward button come back here
//! as a location change, and the state follows the address (see [`crate::route`]).

use crate::route::Route;
use crate::state::AppState;
use leptos::prelude::*;

#[cfg(target_arch = "wasm32")]
mod browser {
    use super::*;
    use gloo_history::{HashHistory, History};

    fn history() -> HashHistory {
        HashHistory::new()
    }

    /// The place the address names now (`None` for an address the app does not have).
    pub fn current() -> Option<Route> {
        Route::parse(history().location().path())
    }

    pub fn push(route: &Route) {
        history().push(route.path());
    }

    pub fn replace(route: &Route) {
        history().replace(route.path());
    }

    pub fn back() {
        history().back();
    }

    /// Follows every change of address for as long as the app runs.
    pub fn listen(state: AppState) {
        let listener = history().listen(move || follow(state));
        // The app lives as long as the page: the listener must too.
        std::mem::forget(listener);
    }
}

#[cfg(not(target_arch = "wasm32"))]
mod browser {
    //! Outside a browser (the native tests of the state) there is no history: places are
    //! applied directly.
    use super::*;
    pub fn current() -> Option<Route> {
        Some(Route::Jobs)
    }
    pub fn push(_: &Route) {}
    pub fn replace(_: &Route) {}
    pub fn back() {}
    pub fn listen(_: AppState) {}
}

/// Starts following the address. Opened straight at a place inside the app (a link, a reload),
/// the job list is put beneath it, so the back button returns to the list instead of leaving
/// the app; an address the app does not have becomes the job list.
pub fn start(state: AppState) {
    match browser::current() {
        Some(Route::Jobs) => {}
        Some(route) => {
            browser::replace(&Route::Jobs);
            browser::push(&route);
        }
        None => browser::replace(&Route::Jobs),
    }
    follow(state);
    browser::listen(state);
}

fn follow(state: AppState) {
    state.apply_route(browser::current().unwrap_or(Route::Jobs));
}

/// Goes to a place: a new entry in the history, so the back button returns here.
pub fn go(state: AppState, route: Route) {
    if state.route.with_untracked(|r| *r != route) {
        browser::push(&route);
        state.apply_route(route);
    }
}

/// Moves to a place in the same history entry (a detail that no longer exists, say).
pub fn replace_with(state: AppState, route: Route) {
    if state.route.with_untracked(|r| *r != route) {
        browser::replace(&route);
        state.apply_route(route);
    }
}

/// Goes back one place (closing a detail, leaving the cautions).
pub fn back() {
    browser::back();
}
