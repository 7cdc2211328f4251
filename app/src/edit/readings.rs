//! Editing a job's meter readings: dated sets, each a list of readings, kept as typed so a
//! half-entered reading is saved with the job and named by the diagnosis rather than lost.

use super::{entries, entries_mut, number_from_text, text_of, text_of_number};
use tapline_core::job::{JobFile, Raw, ReadingFile, ReadingSetFile};

/// One field of a reading, with the text typed into it.
#[derive(Clone, Debug, PartialEq)]
pub enum ReadingEdit {
    Label(String),
    /// `panel` or `meter`.
    At(String),
    L1Volts(String),
    L2Volts(String),
    L1Amps(String),
    L2Amps(String),
    L1Pf(String),
    L2Pf(String),
}

/// The job's sets of readings as given.
pub fn sets(job: &JobFile) -> Vec<ReadingSetFile> {
    entries(&job.readings)
}

/// The readings of one set as given.
pub fn readings_of(set: &ReadingSetFile) -> Vec<ReadingFile> {
    entries(&set.readings)
}

fn set_mut(job: &mut JobFile, s: usize) -> Option<&mut ReadingSetFile> {
    match entries_mut(&mut job.readings).get_mut(s) {
        Some(Raw::Given(set)) => Some(set),
        _ => None,
    }
}

fn labelled(label: &str) -> Raw<ReadingFile> {
    Raw::Given(ReadingFile {
        label: Raw::Given(label.to_string()),
        at: Raw::Given("panel".to_string()),
        ..ReadingFile::default()
    })
}

/// Starts a new dated set (the first test, or a re-test after a repair) with the two readings a
/// test needs: before, and with a known load switched on. Earlier sets are kept as they are.
pub fn add_set(job: &mut JobFile, taken: &str, note: &str) {
    entries_mut(&mut job.readings).push(Raw::Given(ReadingSetFile {
        taken: Raw::Given(taken.to_string()),
        note: Raw::Given(note.to_string()),
        readings: Raw::Given(vec![labelled("Before"), labelled("Known load switched on")]),
        ..ReadingSetFile::default()
    }));
}

/// Removes set `s`.
pub fn remove_set(job: &mut JobFile, s: usize) {
    let list = entries_mut(&mut job.readings);
    if s < list.len() {
        list.remove(s);
    }
    if list.is_empty() {
        job.readings = Raw::Absent;
    }
}

/// Changes what set `s` was for.
pub fn set_note(job: &mut JobFile, s: usize, text: &str) {
    if let Some(set) = set_mut(job, s) {
        set.note = Raw::Given(text.to_string());
    }
}

/// Adds a reading to set `s`.
pub fn add_reading(job: &mut JobFile, s: usize) {
    if let Some(set) = set_mut(job, s) {
        let n = entries(&set.readings).len() + 1;
        entries_mut(&mut set.readings).push(labelled(&format!("Reading {n}")));
    }
}

/// Removes reading `k` of set `s`.
pub fn remove_reading(job: &mut JobFile, s: usize, k: usize) {
    if let Some(set) = set_mut(job, s) {
        let list = entries_mut(&mut set.readings);
        if k < list.len() {
            list.remove(k);
        }
    }
}

/// Corrects one field of reading `k` in set `s`.
pub fn edit_reading(job: &mut JobFile, s: usize, k: usize, edit: ReadingEdit) {
    let Some(set) = set_mut(job, s) else {
        return;
    };
    let Some(Raw::Given(r)) = entries_mut(&mut set.readings).get_mut(k) else {
        return;
    };
    match edit {
        ReadingEdit::Label(t) => r.label = Raw::Given(t),
        ReadingEdit::At(t) => r.at = Raw::Given(t),
        ReadingEdit::L1Volts(t) => r.l1_n_v = number_from_text(&t),
        ReadingEdit::L2Volts(t) => r.l2_n_v = number_from_text(&t),
        ReadingEdit::L1Amps(t) => r.l1_a = number_from_text(&t),
        ReadingEdit::L2Amps(t) => r.l2_a = number_from_text(&t),
        ReadingEdit::L1Pf(t) => r.l1_pf = number_from_text(&t),
        ReadingEdit::L2Pf(t) => r.l2_pf = number_from_text(&t),
    }
}

/// The texts a reading's fields show: label, place, L1-N, L2-N, L1 A, L2 A, L1 pf, L2 pf.
pub fn texts(r: &ReadingFile) -> [String; 8] {
    [
        text_of(&r.label),
        text_of(&r.at),
        text_of_number(&r.l1_n_v),
        text_of_number(&r.l2_n_v),
        text_of_number(&r.l1_a),
        text_of_number(&r.l2_a),
        text_of_number(&r.l1_pf),
        text_of_number(&r.l2_pf),
    ]
}

/// The job-file path of a reading's field, as the diagnosis names its problems.
pub fn path(s: usize, k: usize, field: &str) -> String {
    format!("readings[{s}].readings[{k}].{field}")
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::edit::new_job;
    use tapline_core::tools::diagnose::history;
    use tapline_core::validate::validate;

    fn fill(job: &mut JobFile, s: usize, k: usize, v: [&str; 4]) {
        edit_reading(job, s, k, ReadingEdit::L1Volts(v[0].into()));
        edit_reading(job, s, k, ReadingEdit::L2Volts(v[1].into()));
        edit_reading(job, s, k, ReadingEdit::L1Amps(v[2].into()));
        edit_reading(job, s, k, ReadingEdit::L2Amps(v[3].into()));
    }

    /// Source: exam problem on unbalanced drop with the neutral (104 V halves, 0.1 Ω in each
    /// wire, 20 A and 10 A give 101 V and 104 V): typed into a set of the job, the diagnosis
    /// recovers 0.1 Ω; a re-test keeps the first set, and a reading can be removed.
    #[test]
    fn readings_typed_into_a_job_feed_its_diagnosis() {
        let mut job = new_job("Test");
        add_set(&mut job, "2026-12-02 09:00", "first test");
        fill(&mut job, 0, 0, ["104", "104", "0", "0"]);
        fill(&mut job, 0, 1, ["101", "104", "20", "10"]);
        let valid = validate(&job).unwrap();
        let h = history(&valid, &job);
        let d = h.sets[0].diagnosis.as_ref().unwrap();
        assert!((d.neutral_ohms - 0.1).abs() < 1e-9);

        add_set(&mut job, "2026-12-03 09:00", "re-test");
        fill(&mut job, 1, 0, ["104", "10x", "0", "0"]);
        // The job stays valid (and so is saved) while a reading is half typed.
        let valid = validate(&job).unwrap();
        let h = history(&valid, &job);
        assert_eq!(h.sets.len(), 2);
        assert!(h.sets[0].diagnosis.is_some());
        assert!(h.sets[1]
            .problems
            .iter()
            .any(|p| p.path == path(1, 0, "l2_n_v")));
        assert_eq!(texts(&readings_of(&sets(&job)[1])[0])[3], "10x");

        add_reading(&mut job, 1);
        assert_eq!(readings_of(&sets(&job)[1]).len(), 3);
        remove_reading(&mut job, 1, 2);
        assert_eq!(readings_of(&sets(&job)[1]).len(), 2);
        remove_set(&mut job, 1);
        assert_eq!(sets(&job).len(), 1);
        remove_set(&mut job, 0);
        assert!(job.readings.is_absent());
    }
}
