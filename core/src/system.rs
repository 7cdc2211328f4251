//! The service's source: its kind, legs and the phasor convention every other module follows.
//!
//! Phase convention (angles of the open-circuit line-to-neutral voltages, positive counter-clockwise):
//! split-phase L1 at 0°, L2 at 180°; wye L1 at 0°, L2 at −120°, L3 at +120° (sequence L1-L2-L3).
//! Currents are positive flowing from the source into the panel on a hot leg, and from the panel
//! back towards the source on the neutral.

use crate::figures::fixed;
use num_complex::Complex64;
use std::f64::consts::PI;

/// A hot leg (phase) of the service.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Leg {
    L1,
    L2,
    L3,
}

impl Leg {
    /// All three legs in order.
    pub const ALL: [Leg; 3] = [Leg::L1, Leg::L2, Leg::L3];

    /// Zero-based index: L1 → 0.
    pub fn index(self) -> usize {
        match self {
            Leg::L1 => 0,
            Leg::L2 => 1,
            Leg::L3 => 2,
        }
    }

    /// `"L1"`, `"L2"`, `"L3"`.
    pub fn name(self) -> &'static str {
        match self {
            Leg::L1 => "L1",
            Leg::L2 => "L2",
            Leg::L3 => "L3",
        }
    }

    /// Reads `L1`, `L2`, `L3` (also `A`, `B`, `C`), any case.
    pub fn parse(s: &str) -> Option<Leg> {
        match s.trim().to_ascii_uppercase().as_str() {
            "L1" | "A" => Some(Leg::L1),
            "L2" | "B" => Some(Leg::L2),
            "L3" | "C" => Some(Leg::L3),
            _ => None,
        }
    }
}

/// The kind of service.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum SystemKind {
    /// Single-phase three-wire from a center-tapped winding: L1 and L2 180° apart about the tap.
    SplitPhase,
    /// A wye secondary with `phases` hot legs (2: two phases and neutral, as in 120/208 V apartment
    /// services; 3: the full four-wire system).
    Wye { phases: u8 },
}

/// A validated system: kind, line-to-neutral voltage and frequency.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct System {
    kind: SystemKind,
    volts_to_neutral: f64,
    frequency_hz: f64,
}

impl System {
    /// Builds a system; `None` unless the voltage and frequency are finite and positive and a wye has
    /// two or three phases.
    pub fn new(kind: SystemKind, volts_to_neutral: f64, frequency_hz: f64) -> Option<System> {
        let ok_phases = match kind {
            SystemKind::SplitPhase => true,
            SystemKind::Wye { phases } => phases == 2 || phases == 3,
        };
        (ok_phases
            && volts_to_neutral.is_finite()
            && volts_to_neutral > 0.0
            && frequency_hz.is_finite()
            && frequency_hz > 0.0)
            .then_some(System {
                kind,
                volts_to_neutral,
                frequency_hz,
            })
    }

    pub fn kind(&self) -> SystemKind {
        self.kind
    }

    /// Nominal line-to-neutral voltage, volts rms.
    pub fn volts_to_neutral(&self) -> f64 {
        self.volts_to_neutral
    }

    pub fn frequency_hz(&self) -> f64 {
        self.frequency_hz
    }

    /// The hot legs present.
    pub fn legs(&self) -> &'static [Leg] {
        match self.kind {
            SystemKind::SplitPhase => &[Leg::L1, Leg::L2],
            SystemKind::Wye { phases: 2 } => &[Leg::L1, Leg::L2],
            SystemKind::Wye { .. } => &[Leg::L1, Leg::L2, Leg::L3],
        }
    }

    /// True when the system has this leg.
    pub fn has_leg(&self, leg: Leg) -> bool {
        self.legs().contains(&leg)
    }

    /// Angle of a leg's line-to-neutral voltage, radians (see the module's convention).
    pub fn leg_angle(&self, leg: Leg) -> f64 {
        match (self.kind, leg) {
            (SystemKind::SplitPhase, Leg::L1) => 0.0,
            (SystemKind::SplitPhase, _) => PI,
            (SystemKind::Wye { .. }, Leg::L1) => 0.0,
            (SystemKind::Wye { .. }, Leg::L2) => -2.0 * PI / 3.0,
            (SystemKind::Wye { .. }, Leg::L3) => 2.0 * PI / 3.0,
        }
    }

    /// Unit phasor of a leg.
    pub fn leg_unit(&self, leg: Leg) -> Complex64 {
        Complex64::from_polar(1.0, self.leg_angle(leg))
    }

    /// Nominal line-to-line voltage: 2·V for split-phase (the full winding), √3·V for a wye.
    pub fn volts_line_to_line(&self) -> f64 {
        match self.kind {
            SystemKind::SplitPhase => 2.0 * self.volts_to_neutral,
            SystemKind::Wye { .. } => 3f64.sqrt() * self.volts_to_neutral,
        }
    }

    /// A short label such as `120/240 V split-phase` or `120/208 V wye, 2 phases`.
    pub fn label(&self) -> String {
        let v = self.volts_to_neutral;
        let ll = self.volts_line_to_line();
        match self.kind {
            SystemKind::SplitPhase => {
                format!("{v}/{ll} V split-phase", v = fixed(v, 0), ll = fixed(ll, 0))
            }
            SystemKind::Wye { phases } => format!(
                "{v}/{ll} V wye, {phases} phases",
                v = fixed(v, 0),
                ll = fixed(ll, 0)
            ),
        }
    }
}
