//! The service neutral as found on site (saved with the job), and the what-if states explored
//! apart from it (never saved).

use super::{number_from_text, text_of, text_of_number};
use tapline_core::job::{JobFile, NeutralFile, Raw};

/// One edit of the neutral as found.
#[derive(Clone, Debug, PartialEq)]
pub enum NeutralEdit {
    /// `intact`, `loose` or `open`; the numbers typed for the others are kept.
    State(String),
    /// The loose connection's resistance, ohms, as typed.
    Ohms(String),
    /// The earth path beside the neutral, ohms, as typed (blank for none).
    EarthOhms(String),
    /// How the state was found ("0.35 Ω measured at the meter base").
    Found(String),
}

/// The neutral as found, as the form shows it.
#[derive(Clone, Debug, PartialEq)]
pub struct NeutralText {
    pub state: String,
    pub ohms: String,
    pub earth_ohms: String,
    pub found: String,
}

/// The neutral as found in `job`.
pub fn neutral_of(job: &JobFile) -> NeutralText {
    let n = job.neutral.given().cloned().unwrap_or_default();
    NeutralText {
        state: n
            .state
            .given()
            .cloned()
            .unwrap_or_else(|| "intact".to_string()),
        ohms: text_of_number(&n.ohms),
        earth_ohms: text_of_number(&n.earth_return_ohms),
        found: text_of(&n.found),
    }
}

/// Applies one edit to the neutral as found.
pub fn apply(job: &mut JobFile, edit: NeutralEdit) {
    let mut n = job.neutral.given().cloned().unwrap_or_default();
    match edit {
        NeutralEdit::State(state) => {
            if state == "loose" && n.ohms.is_absent() {
                n.ohms = Raw::Given(1.0);
            }
            n.state = Raw::Given(state);
        }
        NeutralEdit::Ohms(t) => n.ohms = number_from_text(&t),
        NeutralEdit::EarthOhms(t) => n.earth_return_ohms = number_from_text(&t),
        NeutralEdit::Found(t) => {
            n.found = if t.trim().is_empty() {
                Raw::Absent
            } else {
                Raw::Given(t)
            }
        }
    }
    job.neutral = Raw::Given(n);
}

/// What the what-if explores, apart from the job: the neutral as found, or a loose connection of
/// some resistance (as typed), or an open neutral.
#[derive(Clone, Debug, PartialEq)]
pub enum Explore {
    AsFound,
    Loose(String),
    Open,
}

impl Explore {
    /// The neutral this state stands for, in the file's words, for the engine to check; `None` for
    /// the neutral as found.
    pub fn to_file(&self) -> Option<NeutralFile> {
        let (state, ohms) = match self {
            Explore::AsFound => return None,
            Explore::Loose(t) => ("loose", number_from_text(t)),
            Explore::Open => ("open", Raw::Absent),
        };
        Some(NeutralFile {
            state: Raw::Given(state.to_string()),
            ohms,
            ..NeutralFile::default()
        })
    }

    /// A loose neutral to explore, starting from the resistance found on site when the neutral
    /// was found loose, or else the engine's what-if default
    /// ([`tapline_core::whatif::DEFAULT_LOOSE_OHMS`]).
    pub fn loose_from(found: &NeutralText) -> Explore {
        Explore::Loose(if found.state == "loose" && !found.ohms.trim().is_empty() {
            found.ohms.clone()
        } else {
            crate::format::plain(tapline_core::whatif::DEFAULT_LOOSE_OHMS)
        })
    }

    /// The resistance typed for a loose neutral, if this is one.
    pub fn loose_text(&self) -> Option<&str> {
        match self {
            Explore::Loose(t) => Some(t),
            _ => None,
        }
    }

    /// `as-found`, `loose` or `open`.
    pub fn code(&self) -> &'static str {
        match self {
            Explore::AsFound => "as-found",
            Explore::Loose(_) => "loose",
            Explore::Open => "open",
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::edit::new_job;
    use tapline_core::validate::{validate, what_if_neutral};
    use tapline_core::validated::NeutralState;

    #[test]
    fn the_neutral_as_found_is_edited_field_by_field() {
        let mut job = new_job("Test");
        apply(&mut job, NeutralEdit::State("loose".into()));
        assert_eq!(neutral_of(&job).ohms, "1");
        apply(&mut job, NeutralEdit::Ohms(String::new()));
        assert!(validate(&job).is_err());
        apply(&mut job, NeutralEdit::State("open".into()));
        apply(&mut job, NeutralEdit::EarthOhms("25".into()));
        apply(
            &mut job,
            NeutralEdit::Found("no neutral at the meter base".into()),
        );
        assert!(validate(&job).is_ok());
        let n = neutral_of(&job);
        assert_eq!((n.state.as_str(), n.earth_ohms.as_str()), ("open", "25"));
        assert_eq!(n.found, "no neutral at the meter base");
        apply(&mut job, NeutralEdit::Found("  ".into()));
        assert_eq!(neutral_of(&job).found, "");
    }

    #[test]
    fn an_exploration_is_checked_by_the_engine_and_leaves_the_job_alone() {
        assert_eq!(Explore::AsFound.to_file(), None);
        let mut found = neutral_of(&new_job("t"));
        assert_eq!(Explore::loose_from(&found), Explore::Loose("2".into()));
        found.state = "loose".into();
        found.ohms = "0.8".into();
        assert_eq!(Explore::loose_from(&found), Explore::Loose("0.8".into()));
        let loose = Explore::Loose("2.5".into()).to_file().unwrap();
        assert_eq!(
            what_if_neutral(&loose),
            Ok(NeutralState::Loose { ohms: 2.5 })
        );
        let bad = Explore::Loose("lots".into()).to_file().unwrap();
        assert_eq!(what_if_neutral(&bad).unwrap_err()[0].path, "neutral.ohms");
        assert_eq!(
            what_if_neutral(&Explore::Open.to_file().unwrap()),
            Ok(NeutralState::Open)
        );
    }
}
