//! Outcomes: what the voltage an appliance gets means for it, judged twice and the worse kept.
//!
//! 1. Against the **system**: the voltage band of the service's standard, referred to the system
//!    nominal voltage of the appliance's connection (120, 208, 240, 277, 480 V, …): ANSI C84.1
//!    utilization ranges on 60 Hz services, IEC 60038 on 50 Hz services.
//! 2. Against the **appliance's nameplate**: its own tolerance (a motor ±10 % of its rating, an
//!    electronic supply's input range, a lamp's life, a heater's power).
//!
//! The report names the rule that decided. A 115 V motor on a 120 V circuit is normal on both.

use crate::figures::fixed;
use crate::loads::{Load, Model, State, LAMP_LIFE_EXPONENT};
use crate::system::System;
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
            Outcome::Normal => "voltage OK",
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

/// ANSI C84.1 voltage ranges, as fractions of the system nominal voltage (from memory; the
/// standard tabulates them on a 120 V base, the figures in brackets, and for each nominal system
/// voltage; the fractions carry the 120 V figures to the others). Range A is the design range for
/// normal operation; outside Range B calls for prompt corrective action.
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

/// IEC 60038 voltage tolerances, as fractions of the nominal voltage (from memory): ±10 % at the
/// supply terminals under normal conditions, and a further 4 % allowed for the drop inside the
/// installation, so −14 % to +10 % at the point of utilization.
pub mod iec {
    /// Supply terminals: 0.90–1.10 of nominal (230 V: 207–253 V).
    pub const SUPPLY: (f64, f64) = (0.90, 1.10);
    /// Point of utilization: 0.86–1.10 of nominal.
    pub const UTILIZATION: (f64, f64) = (0.86, 1.10);
}

/// The voltage standard a service is judged by.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
pub enum Standard {
    /// ANSI C84.1, for 60 Hz (North American) services.
    #[serde(rename = "ANSI C84.1")]
    AnsiC84_1,
    /// IEC 60038, for 50 Hz services.
    #[serde(rename = "IEC 60038")]
    Iec60038,
}

impl Standard {
    /// The standard for a system: IEC 60038 at 50 Hz, ANSI C84.1 otherwise.
    pub fn of(system: &System) -> Standard {
        if (system.frequency_hz() - 50.0).abs() < 1.0 {
            Standard::Iec60038
        } else {
            Standard::AnsiC84_1
        }
    }

    pub fn name(self) -> &'static str {
        match self {
            Standard::AnsiC84_1 => "ANSI C84.1",
            Standard::Iec60038 => "IEC 60038",
        }
    }
}

/// A voltage's place in its standard's bands.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
pub enum Band {
    /// ANSI Range A, or inside the IEC tolerance.
    A,
    /// ANSI Range B, or (IEC, utilization) inside the allowance for the installation's drop.
    B,
    Outside,
}

impl Band {
    pub fn code(self) -> &'static str {
        match self {
            Band::A => "A",
            Band::B => "B",
            Band::Outside => "outside",
        }
    }
}

/// The band type under its earlier name, for the ANSI C84.1 table tests.
pub type AnsiRange = Band;

/// A service (panel) voltage's band under the system's standard, against `nominal`.
pub fn service_band(standard: Standard, volts: f64, nominal: f64) -> Band {
    let f = volts / nominal;
    let within = |r: (f64, f64)| (r.0..=r.1).contains(&f);
    match standard {
        Standard::AnsiC84_1 if within(ansi::SERVICE_A) => Band::A,
        Standard::AnsiC84_1 if within(ansi::SERVICE_B) => Band::B,
        Standard::Iec60038 if within(iec::SUPPLY) => Band::A,
        _ => Band::Outside,
    }
}

/// The ANSI C84.1 service range of a voltage against `nominal`.
pub fn service_range(volts: f64, nominal: f64) -> Band {
    service_band(Standard::AnsiC84_1, volts, nominal)
}

/// A utilization voltage's band: ANSI Range A and B (the lighting or non-lighting minimum), or
/// IEC 60038's supply tolerance (A) and utilization allowance (B).
pub fn utilization_band(standard: Standard, volts: f64, nominal: f64, lighting: bool) -> Band {
    let f = volts / nominal;
    match standard {
        Standard::AnsiC84_1 => {
            let (a_min, b_min) = if lighting {
                (ansi::UTILIZATION_A.0, ansi::UTILIZATION_B.0)
            } else {
                (
                    ansi::UTILIZATION_A_MIN_NONLIGHTING,
                    ansi::UTILIZATION_B_MIN_NONLIGHTING,
                )
            };
            if f >= a_min && f <= ansi::UTILIZATION_A.1 {
                Band::A
            } else if f >= b_min && f <= ansi::UTILIZATION_B.1 {
                Band::B
            } else {
                Band::Outside
            }
        }
        Standard::Iec60038 => {
            if (iec::SUPPLY.0..=iec::SUPPLY.1).contains(&f) {
                Band::A
            } else if (iec::UTILIZATION.0..=iec::UTILIZATION.1).contains(&f) {
                Band::B
            } else {
                Band::Outside
            }
        }
    }
}

/// An appliance's own tolerance, as fractions of its nameplate voltage.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Tolerance {
    /// Normal operation from `low` to `high`.
    pub low: f64,
    pub high: f64,
    /// At or above this an over-voltage becomes likely damage.
    pub damage_above: f64,
    /// What wears out, for the sentence ("heating element").
    pub part: &'static str,
    pub source: &'static str,
}

/// Heaters and other resistive loads: power rises as V², so at 110 % an element runs at 121 %
/// power and at 120 % at 144 % (P = V²/R); the thresholds are common practice, no source.
pub const RESISTIVE: Tolerance = Tolerance {
    low: 0.90,
    high: 1.10,
    damage_above: 1.20,
    part: "heating element",
    source: "P = V²/R; thresholds common practice, no source",
};
/// Constant-impedance loads (transformers, ballasts): core saturation and overheating above
/// about 115 % (common practice, no source).
pub const IMPEDANCE: Tolerance = Tolerance {
    low: 0.90,
    high: 1.10,
    damage_above: 1.15,
    part: "windings",
    source: "common practice, no source",
};
/// Tungsten lamps: life ∝ V^−13 (IES Lighting Handbook, from memory): at 105 % life is about half,
/// at 115 % about a sixth.
pub const LAMP: Tolerance = Tolerance {
    low: 0.90,
    high: 1.05,
    damage_above: 1.15,
    part: "filament",
    source: "life ∝ V^-13, IES Lighting Handbook (from memory)",
};
/// Motors: rated load within ±10 % of rated voltage (NEMA MG 1 §12.44, from memory); insulation
/// and saturation stress well above it (damage threshold common practice, no source).
pub const MOTOR: Tolerance = Tolerance {
    low: 1.0 - MOTOR_TOLERANCE,
    high: 1.0 + MOTOR_TOLERANCE,
    damage_above: 1.20,
    part: "motor",
    source: "NEMA MG 1 §12.44 (±10 %, from memory); damage threshold common practice, no source",
};
/// NEMA MG 1 §12.44 tolerance for motors running at rated load, ± fraction of rated voltage.
pub const MOTOR_TOLERANCE: f64 = 0.10;

/// Below this fraction of its rating an appliance gets no usable voltage at all.
pub const NO_VOLTAGE_FRACTION: f64 = 0.05;
/// Below this fraction of its rating a tungsten lamp gives no useful light (its light falls
/// roughly as V^3.4, so at a quarter of its voltage it gives under 1 %; IES Lighting Handbook
/// exponent, from memory).
pub const LAMP_DARK_FRACTION: f64 = 0.25;
/// Below this fraction of its rating a stalled motor draws little current (locked-rotor current
/// scales with voltage), so it is not described as drawing locked-rotor current.
pub const MOTOR_FEEBLE_FRACTION: f64 = 0.30;
/// A switched-off appliance with more than this multiple of its rating across its open switch has
/// terminals that are live at a dangerous voltage (common practice, no source).
pub const OFF_LIVE_MULTIPLE: f64 = 1.5;

fn tolerance_of(model: Model) -> Tolerance {
    match model {
        Model::Resistive => RESISTIVE,
        Model::Lamp => LAMP,
        Model::Motor => MOTOR,
        _ => IMPEDANCE,
    }
}

/// Why an outcome was given: the facts for the one-line sentence, which is only written when asked
/// for (the sweep needs thousands of outcomes and no sentences).
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Why {
    Off,
    /// Switched off, with `v` across its open switch: its terminals are live.
    OffLive {
        v: f64,
    },
    /// Too little voltage to do anything.
    NoVoltage {
        v: f64,
    },
    /// A lamp too low to give light.
    Dark {
        v: f64,
        f: f64,
    },
    /// Stalled because its voltage is below the stall point.
    StalledLow {
        v: f64,
        f: f64,
    },
    /// Stalled at a voltage so low it barely draws current.
    StalledFeeble {
        v: f64,
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
    /// Normal on its nameplate.
    Rated {
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
    /// The appliance is fine on its nameplate, but the system band is not.
    SystemBand {
        v: f64,
        standard: Standard,
        band: Band,
        nominal: f64,
        high: bool,
    },
}

impl Why {
    /// The voltage the reason is about, volts (none for an appliance switched off with no voltage
    /// across its switch).
    fn volts(&self) -> Option<f64> {
        match *self {
            Why::Off => None,
            Why::OffLive { v }
            | Why::NoVoltage { v }
            | Why::Dark { v, .. }
            | Why::StalledLow { v, .. }
            | Why::StalledFeeble { v }
            | Why::StalledCollapse { v }
            | Why::DroppedLow { v, .. }
            | Why::DroppedCollapse { v }
            | Why::AboveInput { v, .. }
            | Why::NearInputEdge { v, .. }
            | Why::InsideInput { v, .. }
            | Why::Rated { v, .. }
            | Why::Damage { v, .. }
            | Why::Over { v, .. }
            | Why::Under { v, .. }
            | Why::SystemBand { v, .. } => Some(v),
        }
    }
}

impl std::fmt::Display for Why {
    fn fmt(&self, out: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        // Every figure of a reason is printed whole: volts, and percent of the rating or power.
        let whole = |x: f64| fixed(x, 0);
        let v = whole(self.volts().unwrap_or(0.0));
        match *self {
            Why::Off => write!(out, "switched off"),
            Why::OffLive { .. } => write!(
                out,
                "switched off, but {v} V stands across its switch: its terminals are live and can shock"
            ),
            Why::NoVoltage { .. } => write!(out, "gets no voltage ({v} V): does not run"),
            Why::Dark { f, .. } => write!(out, "gets {v} V ({} %): dark", whole(f * 100.0)),
            Why::StalledLow { f, .. } => write!(
                out,
                "gets {v} V ({} %): too low to keep turning; it stalls and draws locked-rotor current until its overload trips",
                whole(f * 100.0)
            ),
            Why::StalledFeeble { .. } => write!(
                out,
                "gets {v} V: far too little to turn; it sits stalled and may hum until the voltage returns or its overload trips"
            ),
            Why::StalledCollapse { .. } => write!(
                out,
                "the supply sags too far when it runs, so it stalls (locked-rotor, {v} V) until its overload trips"
            ),
            Why::DroppedLow { min_v, .. } => write!(
                out,
                "gets {v} V: below its {min_v} V input range, so it shuts off or keeps restarting",
                min_v = whole(min_v)
            ),
            Why::DroppedCollapse { .. } => write!(
                out,
                "the supply sags too far at its full power, so it shuts off or keeps restarting ({v} V while off)"
            ),
            Why::AboveInput { max_v, .. } => write!(
                out,
                "gets {v} V: above its {max_v} V input limit; its power supply is likely to fail",
                max_v = whole(max_v)
            ),
            Why::NearInputEdge { min_v, max_v, .. } => write!(
                out,
                "gets {v} V: near the edge of its {min_v}–{max_v} V input range",
                min_v = whole(min_v),
                max_v = whole(max_v)
            ),
            Why::InsideInput { min_v, max_v, .. } => write!(
                out,
                "gets {v} V: inside its {min_v}–{max_v} V input range",
                min_v = whole(min_v),
                max_v = whole(max_v)
            ),
            Why::Rated { f, .. } => write!(
                out,
                "gets {v} V ({} % of its rating): within its tolerance",
                whole(f * 100.0)
            ),
            Why::Damage { model, f, .. } => match model {
                Model::Resistive => write!(
                    out,
                    "gets {v} V ({} % power): its {} overheats and is likely to fail early",
                    whole(f * f * 100.0),
                    RESISTIVE.part
                ),
                Model::Lamp => write!(
                    out,
                    "gets {v} V: its {} runs so hot it keeps {} of its life and is likely to burn out soon",
                    LAMP.part,
                    life_left(f)
                ),
                _ => write!(
                    out,
                    "gets {v} V ({} %): its {} is likely to be damaged",
                    whole(f * 100.0),
                    tolerance_of(model).part
                ),
            },
            Why::Over { model, f, .. } => match model {
                Model::Resistive => write!(
                    out,
                    "gets {v} V: runs at {} % power and overheats",
                    whole(f * f * 100.0)
                ),
                Model::Lamp => write!(
                    out,
                    "gets {v} V: burns brighter with {} of its normal life",
                    life_left(f)
                ),
                _ => write!(
                    out,
                    "gets {v} V ({} %): over-voltage stresses its {}",
                    whole(f * 100.0),
                    tolerance_of(model).part
                ),
            },
            Why::Under { model, f, .. } => match model {
                Model::Resistive => write!(
                    out,
                    "gets {v} V: heats slowly at {} % power",
                    whole(f * f * 100.0)
                ),
                Model::Lamp => write!(out, "gets {v} V ({} %): dim", whole(f * 100.0)),
                Model::Motor => write!(
                    out,
                    "gets {v} V ({} %): runs slow and hot, drawing extra current",
                    whole(f * 100.0)
                ),
                _ => write!(out, "gets {v} V ({} %): under-voltage", whole(f * 100.0)),
            },
            Why::SystemBand {
                standard,
                band,
                nominal,
                high,
                ..
            } => {
                let side = if high { "high" } else { "low" };
                match band {
                    Band::A => write!(
                        out,
                        "gets {v} V: within {} Range A for {nominal} V",
                        standard.name(),
                        nominal = whole(nominal)
                    ),
                    Band::B if standard == Standard::AnsiC84_1 => write!(
                        out,
                        "gets {v} V: {side}, within ANSI C84.1 Range B for {nominal} V; the service needs attention",
                        nominal = whole(nominal)
                    ),
                    Band::B => write!(
                        out,
                        "gets {v} V: {side}, outside IEC 60038's ±10 % for {nominal} V but within the installation's allowance",
                        nominal = whole(nominal)
                    ),
                    Band::Outside => write!(
                        out,
                        "gets {v} V: {side}, outside the {} range for {nominal} V",
                        standard.name(),
                        nominal = whole(nominal)
                    ),
                }
            }
        }
    }
}

/// A lamp's remaining life at voltage fraction `f`, as words: life ∝ V^−13.
fn life_left(f: f64) -> String {
    let pct = f.powf(LAMP_LIFE_EXPONENT) * 100.0;
    if pct < 1.0 {
        "less than 1 %".to_string()
    } else {
        format!("about {pct} %", pct = fixed(pct, 0))
    }
}

/// What a classification is judged against: the system's standard and the nominal voltage of the
/// appliance's connection (line to neutral, or line to line).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Context {
    pub standard: Standard,
    pub nominal: f64,
}

impl Context {
    /// The context of `load` on `system`.
    pub fn of(system: &System, load: &Load) -> Context {
        let nominal = match load.connection() {
            crate::loads::Connection::ToNeutral(_) => system.volts_to_neutral(),
            crate::loads::Connection::Across(..) => system.volts_line_to_line(),
        };
        Context {
            standard: Standard::of(system),
            nominal,
        }
    }
}

/// Which rule decided an outcome.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Decider {
    /// The appliance is off.
    Switch,
    /// The appliance's own nameplate tolerance or behaviour (stall, drop-out, input range).
    Nameplate,
    /// The system's voltage band (ANSI C84.1 or IEC 60038) at its nominal voltage.
    SystemBand,
}

/// The outcome for a load at terminal voltage `volts` (its own terminals, after any branch drop)
/// in `state`, with the facts behind it and the rule that decided. `Why` prints the one-line
/// reason.
pub fn classify(
    load: &Load,
    volts: f64,
    state: State,
    on: bool,
    ctx: Context,
) -> (Outcome, Why, Decider) {
    if !on {
        if volts > OFF_LIVE_MULTIPLE * load.rated_v() {
            return (Outcome::Off, Why::OffLive { v: volts }, Decider::Switch);
        }
        return (Outcome::Off, Why::Off, Decider::Switch);
    }
    let (own, why) = nameplate(load, volts, state);
    if matches!(state, State::Stalled | State::DroppedOut) || matches!(why, Why::NoVoltage { .. }) {
        return (own, why, Decider::Nameplate);
    }
    let lighting = matches!(load.model(), Model::Lamp);
    let band = utilization_band(ctx.standard, volts, ctx.nominal, lighting);
    let system = match band {
        Band::A => Outcome::Normal,
        Band::B => Outcome::Marginal,
        Band::Outside if volts > ctx.nominal => Outcome::OverVoltage,
        Band::Outside => Outcome::UnderVoltage,
    };
    if system.severity() > own.severity() {
        (
            system,
            Why::SystemBand {
                v: volts,
                standard: ctx.standard,
                band,
                nominal: ctx.nominal,
                high: volts > ctx.nominal,
            },
            Decider::SystemBand,
        )
    } else {
        (own, why, Decider::Nameplate)
    }
}

/// The outcome on the appliance's own nameplate alone.
fn nameplate(load: &Load, volts: f64, state: State) -> (Outcome, Why) {
    let f = volts / load.rated_v();
    let v = volts;
    match (load.model(), state) {
        (Model::Motor, State::Stalled) if f < MOTOR_FEEBLE_FRACTION => {
            (Outcome::Stall, Why::StalledFeeble { v })
        }
        (Model::Motor, State::Stalled)
            if f < crate::loads::MOTOR_BREAKDOWN_TORQUE.sqrt().recip() =>
        {
            (Outcome::Stall, Why::StalledLow { v, f })
        }
        (Model::Motor, State::Stalled) => (Outcome::Stall, Why::StalledCollapse { v }),
        (_, _) if f < NO_VOLTAGE_FRACTION => (Outcome::UnderVoltage, Why::NoVoltage { v }),
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
        (Model::Lamp, _) if f < LAMP_DARK_FRACTION => (Outcome::UnderVoltage, Why::Dark { v, f }),
        (model, _) => {
            let t = tolerance_of(model);
            if f >= t.damage_above {
                (Outcome::LikelyDamage, Why::Damage { model, v, f })
            } else if f > t.high {
                (Outcome::OverVoltage, Why::Over { model, v, f })
            } else if f < t.low {
                (Outcome::UnderVoltage, Why::Under { model, v, f })
            } else {
                (Outcome::Normal, Why::Rated { v, f })
            }
        }
    }
}
