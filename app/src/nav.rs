//! The only module that touches the browser's history: the place is the address's fragment
//! (`#/job/…/results`), going to a place pushes a history entry for it, the back button and the
//! forward button, and an address edited by hand, come back here as a `popstate` event (which a
//! change of fragment fires as well), and the state follows the address (see [`crate::route`]).

use crate::route::Route;
use crate::state::AppState;
use leptos::prelude::*;

#[cfg(target_arch = "wasm32")]
mod browser {
    use super::*;
    use wasm_bindgen::{closure::Closure, JsCast, JsValue};

    fn window() -> web_sys::Window {
        web_sys::window().expect("the app runs in a browser window")
    }

    /// The place the address names now (`None` for an address the app does not have): the
    /// fragment's path, without a query; no fragment is the job list.
    pub fn current() -> Option<Route> {
        let hash = window().location().hash().unwrap_or_default();
        let path = hash.strip_prefix('#').unwrap_or(&hash);
        let path = path.split('?').next().unwrap_or_default();
        Route::parse(if path.is_empty() { "/" } else { path })
    }

    /// Writes the place into the address, in a new history entry or in the current one. A
    /// browser that refuses (it limits how often a page may change its address) leaves the
    /// address as it was; the screen has moved all the same.
    fn set(route: &Route, new_entry: bool) {
        let Ok(history) = window().history() else {
            return;
        };
        let url = format!("#{}", route.path());
        let _ = if new_entry {
            history.push_state_with_url(&JsValue::NULL, "", Some(&url))
        } else {
            history.replace_state_with_url(&JsValue::NULL, "", Some(&url))
        };
    }

    pub fn push(route: &Route) {
        set(route, true);
    }

    pub fn replace(route: &Route) {
        set(route, false);
    }

    pub fn back() {
        if let Ok(history) = window().history() {
            let _ = history.back();
        }
    }

    /// Follows every change of address for as long as the app runs. Pushing and replacing do
    /// not fire it, so only the back and forward buttons and an edited address arrive here.
    pub fn listen(state: AppState) {
        let on_change = Closure::<dyn Fn()>::new(move || follow(state));
        let _ = window()
            .add_event_listener_with_callback("popstate", on_change.as_ref().unchecked_ref());
        // The app lives as long as the page: the listener must too.
        on_change.forget();
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
