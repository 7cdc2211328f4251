//! Outcomes: what the voltage an appliance gets means for it, from bands kept here as data.
//!
//! Each band is a range of the voltage as a fraction of the appliance's rated voltage, with the
//! outcome and its source. The utilization limits of ANSI C84.1 set "normal" (Range A) and
//! "marginal" (Range B) for every kind of load; beyond them each kind has its own limits.

use crate::loads::{Load, Model, State, LAMP_LIFE_EXPONENT};
use serde::Serialize;

/// What an appliance's voltage means for it, mildest first.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Outcome {
    /// Switched off in the job.
    Off,
    Normal,
    Marginal,
    UnderVoltage,
    OverVoltage,
    Stall,
    LikelyDamage,
}

impl Outcome {
    /// The job-file and report spelling.
    pub fn code(self) -> &'static str {
        match self {
            Outcome::Off => "off",
            Outcome::Normal => "normal",
            Outcome::Marginal => "marginal",
            Outcome::UnderVoltage => "under_voltage",
            Outcome::OverVoltage => "over_voltage",
            Outcome::Stall => "stall",
            Outcome::LikelyDamage => "likely_damage",
        }
    }

    /// A short label for people.
    pub fn label(self) -> &'static str {
        match self {
            Outcome::Off => "off",
            Outcome::Normal => "normal",
            Outcome::Marginal => "marginal",
            Outcome::UnderVoltage => "under-voltage",
            Outcome::OverVoltage => "over-voltage stress",
            Outcome::Stall => "stall",
            Outcome::LikelyDamage => "likely damage",
        }
    }

    /// Severity on a scale where higher is worse for the appliance: normal 0, marginal 1,
    /// under- or over-voltage 2, stall 3, likely damage 4 (off counts as 0).
    pub fn severity(self) -> u8 {
        match self {
            Outcome::Off | Outcome::Normal => 0,
            Outcome::Marginal => 1,
            Outcome::UnderVoltage | Outcome::OverVoltage => 2,
            Outcome::Stall => 3,
            Outcome::LikelyDamage => 4,
        }
    }
}

/// ANSI C84.1 voltage ranges, as fractions of nominal (from memory; 120 V base figures in
/// brackets). Range A is the design range for normal operation; outside Range B calls for prompt
/// corrective action.
pub mod ansi {
    /// Range A service voltage: 114–126 V (0.95–1.05).
    pub const SERVICE_A: (f64, f64) = (114.0 / 120.0, 126.0 / 120.0);
    /// Range B service voltage: 110–127 V.
    pub const SERVICE_B: (f64, f64) = (110.0 / 120.0, 127.0 / 120.0);
    /// Range A utilization voltage: 110–125 V for circuits with lighting (108 V minimum for
    /// circuits without lighting).
    pub const UTILIZATION_A: (f64, f64) = (110.0 / 120.0, 125.0 / 120.0);
    /// Range A minimum for non-lighting circuits, 108 V.
    pub const UTILIZATION_A_MIN_NONLIGHTING: f64 = 108.0 / 120.0;
    /// Range B utilization voltage: 106–127 V (104 V minimum without lighting).
    pub const UTILIZATION_B: (f64, f64) = (106.0 / 120.0, 127.0 / 120.0);
    /// Range B minimum for non-lighting circuits, 104 V.
    pub const UTILIZATION_B_MIN_NONLIGHTING: f64 = 104.0 / 120.0;
}

/// The ANSI C84.1 range a service voltage falls in.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
pub enum AnsiRange {
    A,
    B,
    Outside,
}

impl AnsiRange {
    pub fn code(self) -> &'static str {
        match self {
            AnsiRange::A => "A",
            AnsiRange::B => "B",
            AnsiRange::Outside => "outside",
        }
    }
}

/// Classifies a service (panel) voltage against ANSI C84.1 service ranges.
pub fn service_range(volts: f64, nominal: f64) -> AnsiRange {
    let f = volts / nominal;
    if (ansi::SERVICE_A.0..=ansi::SERVICE_A.1).contains(&f) {
        AnsiRange::A
    } else if (ansi::SERVICE_B.0..=ansi::SERVICE_B.1).contains(&f) {
        AnsiRange::B
    } else {
        AnsiRange::Outside
    }
}

/// Limits beyond the ANSI ranges, per kind of load, as fractions of rated voltage.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct KindLimits {
    /// At or above this an over-voltage becomes likely damage.
    pub damage_above: f64,
    /// What wears out, for the sentence ("heating element").
    pub part: &'static str,
    pub source: &'static str,
}

/// Heaters and other resistive loads: power rises as V²; at 120 % voltage an element runs at 144 %
/// power (common practice, no source).
pub const RESISTIVE: KindLimits = KindLimits {
    damage_above: 1.20,
    part: "heating element",
    source: "P = V²/R; damage threshold common practice, no source",
};
/// Constant-impedance loads (transformers, ballasts): core saturation and overheating above
/// about 115 % (common practice, no source).
pub const IMPEDANCE: KindLimits = KindLimits {
    damage_above: 1.15,
    part: "windings",
    source: "common practice, no source",
};
/// Tungsten lamps: life ∝ V^−13 (IES Lighting Handbook, from memory); at 115 % voltage life falls
/// to about a sixth.
pub const LAMP: KindLimits = KindLimits {
    damage_above: 1.15,
    part: "filament",
    source: "life ∝ V^-13, IES Lighting Handbook (from memory)",
};
/// Motors: rated load within ±10 % of rated voltage (NEMA MG 1 §12.44); insulation and
/// saturation stress well above it (damage threshold common practice, no source).
pub const MOTOR: KindLimits = KindLimits {
    damage_above: 1.20,
    part: "motor",
    source: "NEMA MG 1 §12.44 (±10 %); damage threshold common practice, no source",
};
/// NEMA MG 1 §12.44 tolerance for motors running at rated load, ± fraction of rated voltage.
pub const MOTOR_TOLERANCE: f64 = 0.10;

/// Why an outcome was given: the facts for the one-line sentence, which is only written when asked
/// for (the sweep needs thousands of outcomes and no sentences).
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Why {
    Off,
    /// Stalled because its voltage is below the stall point.
    StalledLow {
        v: f64,
        f: f64,
    },
    /// Stalled because the supply collapses when it runs.
    StalledCollapse {
        v: f64,
    },
    DroppedLow {
        v: f64,
        min_v: f64,
    },
    DroppedCollapse {
        v: f64,
    },
    AboveInput {
        v: f64,
        max_v: f64,
    },
    NearInputEdge {
        v: f64,
        min_v: f64,
        max_v: f64,
    },
    InsideInput {
        v: f64,
        min_v: f64,
        max_v: f64,
    },
    RangeA {
        v: f64,
        f: f64,
    },
    HighRangeB {
        v: f64,
        f: f64,
    },
    LowRangeB {
        v: f64,
        f: f64,
    },
    Damage {
        model: Model,
        v: f64,
        f: f64,
    },
    Over {
        model: Model,
        v: f64,
        f: f64,
    },
    Under {
        model: Model,
        v: f64,
        f: f64,
    },
}

impl std::fmt::Display for Why {
    fn fmt(&self, out: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match *self {
            Why::Off => write!(out, "switched off"),
            Why::StalledLow { v, f } => write!(
                out,
                "gets {v:.0} V ({:.0} %): too low to keep turning; it stalls and draws locked-rotor current until its overload trips",
                f * 100.0
            ),
            Why::StalledCollapse { v } => write!(
                out,
                "the supply sags too far when it runs, so it stalls (locked-rotor, {v:.0} V) until its overload trips"
            ),
            Why::DroppedLow { v, min_v } => write!(
                out,
                "gets {v:.0} V: below its {min_v:.0} V input range, so it shuts off or keeps restarting"
            ),
            Why::DroppedCollapse { v } => write!(
                out,
                "the supply sags too far at its full power, so it shuts off or keeps restarting ({v:.0} V while off)"
            ),
            Why::AboveInput { v, max_v } => write!(
                out,
                "gets {v:.0} V: above its {max_v:.0} V input limit; its power supply is likely to fail"
            ),
            Why::NearInputEdge { v, min_v, max_v } => write!(
                out,
                "gets {v:.0} V: near the edge of its {min_v:.0}–{max_v:.0} V input range"
            ),
            Why::InsideInput { v, min_v, max_v } => write!(
                out,
                "gets {v:.0} V: inside its {min_v:.0}–{max_v:.0} V input range"
            ),
            Why::RangeA { v, f } => write!(
                out,
                "gets {v:.0} V ({:.0} % of rated): within ANSI C84.1 Range A",
                f * 100.0
            ),
            Why::HighRangeB { v, f } => write!(
                out,
                "gets {v:.0} V ({:.0} %): high, within ANSI C84.1 Range B",
                f * 100.0
            ),
            Why::LowRangeB { v, f } => write!(
                out,
                "gets {v:.0} V ({:.0} %): low, within ANSI C84.1 Range B",
                f * 100.0
            ),
            Why::Damage { model, v, f } => match model {
                Model::Resistive => write!(
                    out,
                    "gets {v:.0} V ({:.0} % power): its {} is likely to burn out within minutes",
                    f * f * 100.0,
                    RESISTIVE.part
                ),
                Model::Lamp => write!(
                    out,
                    "gets {v:.0} V: its {} runs so hot it keeps {} of its life and is likely to burn out soon",
                    LAMP.part,
                    life_left(f)
                ),
                _ => write!(
                    out,
                    "gets {v:.0} V ({:.0} %): its {} is likely to be damaged",
                    f * 100.0,
                    limits_of(model).part
                ),
            },
            Why::Over { model, v, f } => match model {
                Model::Resistive => write!(out, "gets {v:.0} V: runs at {:.0} % power and overheats", f * f * 100.0),
                Model::Lamp => write!(out, "gets {v:.0} V: burns brighter with {} of its normal life", life_left(f)),
                _ => write!(
                    out,
                    "gets {v:.0} V ({:.0} %): over-voltage stresses its {}",
                    f * 100.0,
                    limits_of(model).part
                ),
            },
            Why::Under { model, v, f } => match model {
                Model::Resistive => write!(out, "gets {v:.0} V: heats slowly at {:.0} % power", f * f * 100.0),
                Model::Lamp => write!(out, "gets {v:.0} V ({:.0} %): dim", f * 100.0),
                Model::Motor => write!(
                    out,
                    "gets {v:.0} V ({:.0} %): runs slow and hot, drawing extra current",
                    f * 100.0
                ),
                _ => write!(out, "gets {v:.0} V ({:.0} %): under-voltage", f * 100.0),
            },
        }
    }
}

/// A lamp's remaining life at voltage fraction `f`, as words: life ∝ V^−13.
fn life_left(f: f64) -> String {
    let pct = f.powf(LAMP_LIFE_EXPONENT) * 100.0;
    if pct < 1.0 {
        "less than 1 %".to_string()
    } else {
        format!("about {pct:.0} %")
    }
}

fn limits_of(model: Model) -> KindLimits {
    match model {
        Model::Resistive => RESISTIVE,
        Model::Lamp => LAMP,
        Model::Motor => MOTOR,
        _ => IMPEDANCE,
    }
}

/// The outcome for a load at terminal voltage `volts` (its own terminals, after any branch drop) in
/// `state`, with the facts behind it. `Why` prints the one-line reason.
pub fn classify(load: &Load, volts: f64, state: State, on: bool) -> (Outcome, Why) {
    if !on {
        return (Outcome::Off, Why::Off);
    }
    let f = volts / load.rated_v();
    let v = volts;
    let lighting = matches!(load.model(), Model::Lamp);
    let ua_min = if lighting {
        ansi::UTILIZATION_A.0
    } else {
        ansi::UTILIZATION_A_MIN_NONLIGHTING
    };
    let ub_min = if lighting {
        ansi::UTILIZATION_B.0
    } else {
        ansi::UTILIZATION_B_MIN_NONLIGHTING
    };
    let in_a = f >= ua_min && f <= ansi::UTILIZATION_A.1;
    let in_b = f >= ub_min && f <= ansi::UTILIZATION_B.1;
    match (load.model(), state) {
        (Model::Motor, State::Stalled)
            if f < crate::loads::MOTOR_BREAKDOWN_TORQUE.sqrt().recip() =>
        {
            (Outcome::Stall, Why::StalledLow { v, f })
        }
        (Model::Motor, State::Stalled) => (Outcome::Stall, Why::StalledCollapse { v }),
        (Model::Electronic { min_v, .. }, State::DroppedOut) if volts < min_v => {
            (Outcome::UnderVoltage, Why::DroppedLow { v, min_v })
        }
        (Model::Electronic { .. }, State::DroppedOut) => {
            (Outcome::UnderVoltage, Why::DroppedCollapse { v })
        }
        (Model::Electronic { min_v, max_v }, _) => {
            if volts > max_v {
                (Outcome::LikelyDamage, Why::AboveInput { v, max_v })
            } else if volts > 0.95 * max_v || volts < 1.05 * min_v {
                (Outcome::Marginal, Why::NearInputEdge { v, min_v, max_v })
            } else {
                (Outcome::Normal, Why::InsideInput { v, min_v, max_v })
            }
        }
        (model, _) => {
            let limits = limits_of(model);
            if in_a {
                return (Outcome::Normal, Why::RangeA { v, f });
            }
            if f > 1.0 {
                if f >= limits.damage_above {
                    return (Outcome::LikelyDamage, Why::Damage { model, v, f });
                }
                if in_b && !(model == Model::Motor && f > 1.0 + MOTOR_TOLERANCE) {
                    return (Outcome::Marginal, Why::HighRangeB { v, f });
                }
                return (Outcome::OverVoltage, Why::Over { model, v, f });
            }
            // A motor below NEMA's −10 % runs hot at rated load even inside Range B.
            let ok = if model == Model::Motor {
                f >= 1.0 - MOTOR_TOLERANCE
            } else {
                in_b
            };
            if ok {
                return (Outcome::Marginal, Why::LowRangeB { v, f });
            }
            (Outcome::UnderVoltage, Why::Under { model, v, f })
        }
    }
}
