//! Editing a job's panel: each load's breaker position, circuit, whether it stays, and its
//! shared-neutral circuit; a circuit added at a position; balancing moves applied.

use super::{circuit_of, entries_mut, loads_mut};
use serde_json::Value;
use tapline_core::job::{JobFile, LoadFile, Raw};
use tapline_core::tools::balance::Move;

/// One panel field of a load, with the text or choice made.
#[derive(Clone, Debug, PartialEq)]
pub enum CircuitEdit {
    /// The breaker position, as typed (empty for none).
    Position(String),
    /// The circuit id shared by the loads on one breaker (empty: the load is its own circuit).
    Circuit(String),
    /// True when the circuit must stay where it is.
    Stays(bool),
    /// The shared-neutral circuit's id (empty for none).
    Multiwire(String),
}

fn optional(text: &str) -> Raw<String> {
    let t = text.trim();
    if t.is_empty() {
        Raw::Absent
    } else {
        Raw::Given(t.to_string())
    }
}

/// A position as typed: a whole number, or the text kept for validation to name.
fn position(text: &str) -> Raw<u32> {
    let t = text.trim();
    if t.is_empty() {
        return Raw::Absent;
    }
    match t.parse::<u32>() {
        Ok(p) => Raw::Given(p),
        Err(_) => Raw::Invalid(Value::String(t.to_string())),
    }
}

/// Applies one panel edit to load `i`.
pub fn edit_circuit(job: &mut JobFile, i: usize, edit: CircuitEdit) {
    let Some(Raw::Given(load)) = loads_mut(job).get_mut(i) else {
        return;
    };
    match edit {
        CircuitEdit::Position(t) => load.slot = position(&t),
        CircuitEdit::Circuit(t) => load.circuit = optional(&t),
        CircuitEdit::Stays(stays) => {
            load.movable = if stays {
                Raw::Given(false)
            } else {
                Raw::Absent
            }
        }
        CircuitEdit::Multiwire(t) => load.multiwire = optional(&t),
    }
}

/// The text of a load's position field.
pub fn position_text(load: &LoadFile) -> String {
    match &load.slot {
        Raw::Given(p) => p.to_string(),
        Raw::Invalid(Value::String(s)) => s.clone(),
        Raw::Invalid(v) => v.to_string(),
        Raw::Absent => String::new(),
    }
}

/// Adds a resistive circuit of `watts` at breaker `position` on `leg` (`L1`), named `name`: a
/// load entered from the panel schedule joins the same job as one from the loads screen.
pub fn add_at_position(job: &mut JobFile, position: u32, leg: &str, name: &str, watts: f64) {
    let name = if name.trim().is_empty() {
        format!("Circuit {position}")
    } else {
        name.trim().to_string()
    };
    loads_mut(job).push(Raw::Given(LoadFile {
        name: Raw::Given(name),
        connect: Raw::Given(format!("{leg}-N")),
        model: Raw::Given("resistive".to_string()),
        watts: Raw::Given(watts),
        circuit: Raw::Given(position.to_string()),
        slot: Raw::Given(position),
        ..LoadFile::default()
    }));
}

/// Applies balancing moves: every load of a moved circuit goes to its new leg and, when the
/// engine named one, its new breaker position.
pub fn apply_moves(job: &mut JobFile, moves: &[Move]) {
    for raw in entries_mut(&mut job.loads).iter_mut() {
        if let Raw::Given(load) = raw {
            if let Some(m) = moves.iter().find(|m| m.circuit == circuit_of(load)) {
                load.connect = Raw::Given(format!("{}-N", m.to));
                if let Some(p) = m.to_slot {
                    load.slot = Raw::Given(p);
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::edit::{add_custom, loads, new_job, problem_at, text_of};
    use tapline_core::tools::balance::{balance, schedule, Layout};
    use tapline_core::validate::validate;

    #[test]
    fn balancing_moves_apply_to_every_load_of_a_circuit() {
        let mut job = new_job("Test");
        add_custom(&mut job);
        add_custom(&mut job);
        edit_circuit(&mut job, 0, CircuitEdit::Circuit("7".into()));
        edit_circuit(&mut job, 1, CircuitEdit::Circuit("7".into()));
        let m = Move {
            circuit: "7".to_string(),
            from: "L1",
            to: "L2",
            slot: Some(7),
            to_slot: Some(4),
            appliances: Vec::new(),
            multiwire: None,
        };
        apply_moves(&mut job, &[m]);
        assert!(loads(&job).iter().all(|l| text_of(&l.connect) == "L2-N"));
        assert!(loads(&job).iter().all(|l| l.slot == Raw::Given(4)));
        assert!(validate(&job).is_ok());
    }

    /// Circuits entered on the schedule balance, and the applied moves leave no line on the
    /// wrong leg for its position: 1500 W, 1200 W and 1000 W at positions 1, 2 and 5 (all L1 on
    /// the usual bus) and 100 W at position 3 (L2).
    #[test]
    fn a_schedule_filled_by_position_balances_and_stays_consistent() {
        let mut job = new_job("Test");
        add_at_position(&mut job, 1, "L1", "Kitchen", 1500.0);
        add_at_position(&mut job, 2, "L1", "Laundry", 1200.0);
        add_at_position(&mut job, 5, "L1", "Bath", 1000.0);
        add_at_position(&mut job, 3, "L2", "Hall", 100.0);
        let valid = validate(&job).unwrap();
        let b = balance(&valid, Layout::Standard);
        assert!(b.after.neutral_current_a < b.before.neutral_current_a);
        apply_moves(&mut job, &b.moves);
        let valid = validate(&job).unwrap();
        assert!(schedule(&valid, Layout::Standard)
            .iter()
            .all(|r| r.mismatch.is_none()));
        let again = balance(&valid, Layout::Standard);
        assert!(again.moves.is_empty());
    }

    #[test]
    fn panel_fields_are_typed_and_a_bad_position_is_named() {
        let mut job = new_job("Test");
        add_custom(&mut job);
        edit_circuit(&mut job, 0, CircuitEdit::Position("9".into()));
        edit_circuit(&mut job, 0, CircuitEdit::Stays(true));
        assert_eq!(loads(&job)[0].movable, Raw::Given(false));
        assert_eq!(position_text(&loads(&job)[0]), "9");
        edit_circuit(&mut job, 0, CircuitEdit::Position("nine".into()));
        assert!(problem_at(&validate(&job).unwrap_err(), "loads[0].slot").is_some());
        assert_eq!(position_text(&loads(&job)[0]), "nine");
        edit_circuit(&mut job, 0, CircuitEdit::Position(String::new()));
        edit_circuit(&mut job, 0, CircuitEdit::Stays(false));
        assert!(validate(&job).is_ok());
    }
}
