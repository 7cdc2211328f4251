//! Where the person is, as an address: every screen and tab has one, so the back button, a
//! reload and a link keep the place. Addresses live in the fragment (`#/job/<id>/panel`), which
//! no server sees: the app works from any static server under any sub-path, and offline from the
//! service worker, with no server configuration. [`crate::nav`] moves between them.
//!
//! - `#/`: the job list
//! - `#/cautions`: the cautions
//! - `#/job/<id>`: a job on its results
//! - `#/job/<id>/<tab>`: a job on `service`, `appliances`, `results`, `what-if`, `panel` or
//!   `readings`
//! - `#/job/<id>/appliances/<n>`: appliance `n` (from 1) opened on the appliances tab

use crate::state::Tab;

/// A place in the app.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Route {
    Jobs,
    Cautions,
    Job {
        id: String,
        tab: Tab,
        /// The appliance (index in the job's loads) whose details are open.
        detail: Option<usize>,
    },
}

impl Tab {
    /// The tab's name in an address.
    pub fn code(self) -> &'static str {
        match self {
            Tab::Service => "service",
            Tab::Loads => "appliances",
            Tab::Results => "results",
            Tab::WhatIf => "what-if",
            Tab::Panel => "panel",
            Tab::Readings => "readings",
        }
    }

    /// The tab an address names.
    pub fn from_code(code: &str) -> Option<Tab> {
        [
            Tab::Service,
            Tab::Loads,
            Tab::Results,
            Tab::WhatIf,
            Tab::Panel,
            Tab::Readings,
        ]
        .into_iter()
        .find(|t| t.code() == code)
    }
}

impl Route {
    /// A job on one of its tabs.
    pub fn job(id: &str, tab: Tab) -> Route {
        Route::Job {
            id: id.to_string(),
            tab,
            detail: None,
        }
    }

    /// The address path (what follows the `#`).
    pub fn path(&self) -> String {
        match self {
            Route::Jobs => "/".to_string(),
            Route::Cautions => "/cautions".to_string(),
            Route::Job { id, tab, detail } => {
                let mut p = format!("/job/{id}/{}", tab.code());
                if let (Tab::Loads, Some(i)) = (tab, detail) {
                    p.push_str(&format!("/{}", i + 1));
                }
                p
            }
        }
    }

    /// The place an address path names; `None` for an address the app does not have.
    pub fn parse(path: &str) -> Option<Route> {
        let parts: Vec<&str> = path
            .trim_start_matches('#')
            .split('/')
            .filter(|p| !p.is_empty())
            .collect();
        match parts.as_slice() {
            [] => Some(Route::Jobs),
            ["cautions"] => Some(Route::Cautions),
            ["job", id] => Some(Route::job(&decode(id)?, Tab::Results)),
            ["job", id, tab] => Some(Route::job(&decode(id)?, Tab::from_code(tab)?)),
            ["job", id, "appliances", n] => {
                let n: usize = n.parse().ok().filter(|n| *n >= 1)?;
                Some(Route::Job {
                    id: decode(id)?,
                    tab: Tab::Loads,
                    detail: Some(n - 1),
                })
            }
            _ => None,
        }
    }

    /// The open appliance, on the appliances tab.
    pub fn detail(&self) -> Option<usize> {
        match self {
            Route::Job {
                tab: Tab::Loads,
                detail,
                ..
            } => *detail,
            _ => None,
        }
    }

    /// The same place without an open detail.
    pub fn without_detail(&self) -> Route {
        match self {
            Route::Job { id, tab, .. } => Route::job(id, *tab),
            other => other.clone(),
        }
    }
}

/// Job ids are the app's own (hex digits), but an address may be typed or pasted: anything
/// outside letters, digits, `-` and `_` is refused rather than trusted.
fn decode(id: &str) -> Option<String> {
    (!id.is_empty()
        && id
            .chars()
            .all(|c| c.is_ascii_alphanumeric() || c == '-' || c == '_'))
    .then(|| id.to_string())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_place_has_an_address_that_reads_back_as_itself() {
        let places = [
            Route::Jobs,
            Route::Cautions,
            Route::job("19bd3f0a1c2d", Tab::Service),
            Route::job("19bd3f0a1c2d", Tab::Loads),
            Route::job("19bd3f0a1c2d", Tab::Results),
            Route::job("19bd3f0a1c2d", Tab::WhatIf),
            Route::job("19bd3f0a1c2d", Tab::Panel),
            Route::job("19bd3f0a1c2d", Tab::Readings),
            Route::Job {
                id: "ab".into(),
                tab: Tab::Loads,
                detail: Some(2),
            },
        ];
        for p in places {
            assert_eq!(Route::parse(&p.path()), Some(p.clone()), "{}", p.path());
        }
        assert_eq!(Route::job("ab", Tab::Loads).path(), "/job/ab/appliances");
        assert_eq!(
            Route::Job {
                id: "ab".into(),
                tab: Tab::Loads,
                detail: Some(0)
            }
            .path(),
            "/job/ab/appliances/1"
        );
    }

    #[test]
    fn addresses_people_type_or_paste() {
        assert_eq!(Route::parse(""), Some(Route::Jobs));
        assert_eq!(Route::parse("#/"), Some(Route::Jobs));
        assert_eq!(
            Route::parse("/job/ab"),
            Some(Route::job("ab", Tab::Results))
        );
        assert_eq!(Route::parse("/job/ab/nowhere"), None);
        assert_eq!(Route::parse("/job/ab/appliances/0"), None);
        assert_eq!(Route::parse("/job/a%20b/results"), None);
        assert_eq!(Route::parse("/elsewhere"), None);
        let open = Route::parse("/job/ab/appliances/3").unwrap();
        assert_eq!(open.detail(), Some(2));
        assert_eq!(open.without_detail(), Route::job("ab", Tab::Loads));
    }
}
