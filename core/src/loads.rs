//! Load models: how much current an appliance draws at the voltage it actually gets.
//!
//! Every model is defined by its real power `P` at its rated voltage `V_r` and its lagging
//! displacement power factor `pf` (θ = acos pf, reactive power Q = P·tan θ). The solver asks each
//! load for its admittance Y at the present terminal voltage magnitude |V| (siemens, Y = G − jB with
//! B > 0 for lagging current), so that I = Y·V.

use crate::conductors::Conductor;
use crate::system::Leg;
use num_complex::Complex64;

/// Current of a tungsten filament lamp rises as I ∝ V^0.54, so its conductance falls as
/// G ∝ V^(0.54 − 1). Source: IES Lighting Handbook exponents for incandescent lamps (from memory).
pub const LAMP_CURRENT_EXPONENT: f64 = 0.54;

/// Life of a tungsten lamp falls as life ∝ V^−13. Source: IES Lighting Handbook (from memory).
pub const LAMP_LIFE_EXPONENT: f64 = -13.0;

/// Below this fraction of rated voltage a lamp is treated as a fixed (cold-ish) resistance, which
/// keeps the conductance finite: a cold filament has roughly a tenth of its hot resistance
/// (common practice, no source).
pub const LAMP_MIN_FRACTION: f64 = 0.01;

/// Breakdown torque of a small induction motor as a multiple of rated torque (NEMA design B
/// motors are at least about 2×; from memory). Torque ∝ V² (NEMA MG 1 §12.44), so the motor
/// stalls at V/V_r = 1/√2 ≈ 0.71 with rated load torque.
pub const MOTOR_BREAKDOWN_TORQUE: f64 = 2.0;

/// Locked-rotor current as a multiple of rated current when the job gives neither the current nor
/// a code letter, and its power factor (common practice, no source: small single-phase and
/// compressor motors draw about five to six times running current at a power factor near 0.35
/// when stalled or starting).
pub const LOCKED_ROTOR_MULTIPLE: f64 = 5.0;
/// See [`LOCKED_ROTOR_MULTIPLE`].
pub const LOCKED_ROTOR_PF: f64 = 0.35;

/// A switched-mode supply that has dropped out still draws a little standby power; it is modelled as
/// a resistor taking this fraction of rated power at rated voltage (common practice, no source).
pub const ELECTRONIC_STANDBY_FRACTION: f64 = 0.01;

/// A stalled motor restarts once its voltage is back to 90 % of rated: NEMA MG 1 §12.44 has a
/// motor operate successfully within ±10 % of rated voltage (from memory), so 90 % is the lowest
/// voltage at which starting is assured. Against the stall point of 1/√2 ≈ 71 % this is the
/// motor's hysteresis.
pub const MOTOR_RESTART_FRACTION: f64 = 0.90;

/// A supply that dropped out restarts once its voltage is this fraction of its rating above the
/// bottom of its input range: switched-mode controllers turn on a few percent above the voltage
/// at which they turn off (under-voltage lockout hysteresis; common practice, no source).
pub const ELECTRONIC_RESTART_MARGIN: f64 = 0.05;

/// Default input range of an electronic supply as fractions of rated voltage when the job gives
/// none: 75 % to 115 % (common practice, no source; "100–240 V" supplies state their own range).
pub const ELECTRONIC_DEFAULT_RANGE: (f64, f64) = (0.75, 1.15);

/// How a load is connected at the panel.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Connection {
    /// Between a hot leg and the neutral (a 120 V load on 120/240 V).
    ToNeutral(Leg),
    /// Between two hot legs (a 240 V or 208 V load).
    Across(Leg, Leg),
}

impl Connection {
    /// Reads `L1-N`, `L2-N`, `L3-N`, `L1-L2`, `L2-L3`, `L3-L1` (and the reversed order).
    pub fn parse(s: &str) -> Option<Connection> {
        let t = s.trim().to_ascii_uppercase().replace(' ', "");
        let (a, b) = t.split_once('-')?;
        match (Leg::parse(a), Leg::parse(b), b) {
            (Some(l), None, "N") => Some(Connection::ToNeutral(l)),
            (None, Some(l), _) if a == "N" => Some(Connection::ToNeutral(l)),
            (Some(x), Some(y), _) if x != y => Some(Connection::Across(x.min(y), x.max(y))),
            _ => None,
        }
    }

    /// `L1-N`, `L1-L2`, ...
    pub fn label(self) -> String {
        match self {
            Connection::ToNeutral(l) => format!("{}-N", l.name()),
            Connection::Across(a, b) => format!("{}-{}", a.name(), b.name()),
        }
    }

    /// The legs this connection uses.
    pub fn legs(self) -> Vec<Leg> {
        match self {
            Connection::ToNeutral(l) => vec![l],
            Connection::Across(a, b) => vec![a, b],
        }
    }
}

/// The physical behaviour of a load.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Model {
    /// Constant resistance, R = V_r²/P (heaters, kettles, water-heater elements).
    Resistive,
    /// Constant impedance with a lagging power factor, Y = (P − jQ)/V_r².
    Impedance,
    /// Tungsten filament: G = (P/V_r²)·(|V|/V_r)^(0.54 − 1), see [`LAMP_CURRENT_EXPONENT`].
    Lamp,
    /// Induction motor: constant power P + jQ while running (Y = (P − jQ)/|V|²); below
    /// 1/√[`MOTOR_BREAKDOWN_TORQUE`] of rated voltage it stalls and draws locked-rotor current.
    Motor,
    /// Switched-mode supply: constant power inside `[min_v, max_v]`; below it drops out to
    /// standby; above it the supply is over-stressed (it is still modelled at constant power).
    Electronic { min_v: f64, max_v: f64 },
}

impl Model {
    /// The job-file name of the model.
    pub fn code(self) -> &'static str {
        match self {
            Model::Resistive => "resistive",
            Model::Impedance => "impedance",
            Model::Lamp => "lamp",
            Model::Motor => "motor",
            Model::Electronic { .. } => "electronic",
        }
    }

    /// True for models whose current depends non-linearly on voltage.
    pub fn is_nonlinear(self) -> bool {
        matches!(self, Model::Lamp | Model::Motor | Model::Electronic { .. })
    }
}

/// Operating state of a load after a solve. A stalled motor draws locked-rotor current and pulls
/// the voltage further down; a dropped-out supply draws only standby power. Either runs again
/// when its voltage comes back above its restart threshold ([`Load::restart_v`]).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum State {
    Running,
    Stalled,
    DroppedOut,
}

/// NEC Table 430.7(B): locked-rotor kVA per horsepower by code letter, the top of each letter's
/// range (from memory; the table gives ranges, and the top is the conservative figure for a
/// voltage dip). V is "22.4 and up"; 25 is used.
// 3.14 is the table's top of letter A, not an approximation of π.
#[allow(clippy::approx_constant)]
pub const CODE_LETTERS: [(char, f64); 20] = [
    ('A', 3.14),
    ('B', 3.54),
    ('C', 3.99),
    ('D', 4.49),
    ('E', 4.99),
    ('F', 5.59),
    ('G', 6.29),
    ('H', 7.09),
    ('J', 7.99),
    ('K', 8.99),
    ('L', 9.99),
    ('M', 11.19),
    ('N', 12.49),
    ('P', 13.99),
    ('R', 15.99),
    ('S', 17.99),
    ('T', 19.99),
    ('U', 22.39),
    ('V', 25.0),
    // Keeps the array's length fixed; no letter W exists.
    ('-', 0.0),
];

/// Where a motor's locked-rotor current came from.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum LockedRotorBasis {
    /// Given in amperes.
    Given,
    /// From the NEC Table 430.7(B) code letter and the horsepower.
    CodeLetter { letter: char, hp: f64 },
    /// A multiple of running current (given, or [`LOCKED_ROTOR_MULTIPLE`]).
    Multiple(f64),
}

/// A motor's starting (locked-rotor) draw at rated voltage.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct LockedRotor {
    pub amps: f64,
    pub power_factor: f64,
    pub basis: LockedRotorBasis,
}

/// A validated load.
#[derive(Clone, Debug, PartialEq)]
pub struct Load {
    pub(crate) name: String,
    pub(crate) connection: Connection,
    pub(crate) model: Model,
    pub(crate) rated_w: f64,
    pub(crate) rated_v: f64,
    pub(crate) power_factor: f64,
    pub(crate) on: bool,
    /// The branch circuit in series with the load: its loop (outgoing plus return conductor), or,
    /// for a load on a shared-neutral circuit, its hot conductor alone (the shared neutral is a
    /// branch of the network). `None` when the job gives none.
    pub(crate) branch: Option<Conductor>,
    /// (order, fraction of fundamental current) for odd orders 3..=49.
    pub(crate) harmonics: Vec<(u32, f64)>,
    pub(crate) circuit: Option<String>,
    pub(crate) movable: bool,
    pub(crate) slot: Option<u32>,
    pub(crate) multiwire: Option<String>,
    /// A motor's locked-rotor draw; `None` for other models.
    pub(crate) locked_rotor: Option<LockedRotor>,
    /// Where the load stands in the job file's `loads` list.
    pub(crate) file_index: usize,
    /// True for an appliance planned but not installed yet.
    pub(crate) planned: bool,
}

impl Load {
    pub fn name(&self) -> &str {
        &self.name
    }
    pub fn connection(&self) -> Connection {
        self.connection
    }
    pub fn model(&self) -> Model {
        self.model
    }
    /// Real power at rated voltage, watts.
    pub fn rated_w(&self) -> f64 {
        self.rated_w
    }
    pub fn rated_v(&self) -> f64 {
        self.rated_v
    }
    /// Lagging displacement power factor, in (0, 1].
    pub fn power_factor(&self) -> f64 {
        self.power_factor
    }
    pub fn is_on(&self) -> bool {
        self.on
    }
    pub fn branch(&self) -> Option<&Conductor> {
        self.branch.as_ref()
    }
    pub fn harmonics(&self) -> &[(u32, f64)] {
        &self.harmonics
    }
    pub fn circuit(&self) -> Option<&str> {
        self.circuit.as_deref()
    }
    pub fn movable(&self) -> bool {
        self.movable
    }
    pub fn slot(&self) -> Option<u32> {
        self.slot
    }
    /// The shared-neutral branch circuit this load is on, if any.
    pub fn multiwire(&self) -> Option<&str> {
        self.multiwire.as_deref()
    }

    /// Where the load stands in the job file's `loads` list (planned appliances are kept apart
    /// from the job's loads, so this can differ from its index in [`crate::validated::Job::loads`]).
    pub fn file_index(&self) -> usize {
        self.file_index
    }

    /// A motor's locked-rotor (starting) draw at rated voltage.
    pub fn locked_rotor(&self) -> Option<LockedRotor> {
        self.locked_rotor
    }

    /// Complex power at rated voltage, S = P + jP·tan θ (VA).
    pub fn rated_complex_power(&self) -> Complex64 {
        let pf = self.power_factor;
        let q = self.rated_w * (1.0 - pf * pf).sqrt() / pf;
        Complex64::new(self.rated_w, q)
    }

    /// Current at rated voltage, amperes: I = P/(pf·V_r).
    pub fn rated_current(&self) -> f64 {
        self.rated_w / (self.power_factor * self.rated_v)
    }

    /// The voltage below which a constant-power model leaves its running state, volts.
    pub fn low_limit_v(&self) -> Option<f64> {
        match self.model {
            Model::Motor => Some(self.rated_v / MOTOR_BREAKDOWN_TORQUE.sqrt()),
            Model::Electronic { min_v, .. } => Some(min_v),
            _ => None,
        }
    }

    /// The voltage at which a load that stalled or dropped out runs again, volts: above its low
    /// limit by the hysteresis of [`MOTOR_RESTART_FRACTION`] or [`ELECTRONIC_RESTART_MARGIN`].
    pub fn restart_v(&self) -> Option<f64> {
        match self.model {
            Model::Motor => Some(MOTOR_RESTART_FRACTION * self.rated_v),
            Model::Electronic { min_v, .. } => {
                Some(min_v + ELECTRONIC_RESTART_MARGIN * self.rated_v)
            }
            _ => None,
        }
    }

    /// Admittance at terminal voltage magnitude `v` (volts) in `state`, siemens.
    ///
    /// Constant-power models are evaluated no lower than their low limit, so the running solution
    /// stays finite; a load whose converged voltage is below that limit is moved to its low state by
    /// the solver and solved again.
    pub fn admittance(&self, v: f64, state: State) -> Complex64 {
        self.characteristic().admittance(v, state)
    }

    /// The load's voltage–current characteristic with its constants worked out once, for the
    /// solver's inner loop.
    pub fn characteristic(&self) -> Characteristic {
        let vr2 = self.rated_v * self.rated_v;
        let s_conj = self.rated_complex_power().conj();
        let (i_lr, pf_lr) = match self.locked_rotor {
            Some(lr) => (lr.amps, lr.power_factor),
            None => (
                LOCKED_ROTOR_MULTIPLE * self.rated_current(),
                LOCKED_ROTOR_PF,
            ),
        };
        Characteristic {
            model: self.model,
            rated_v: self.rated_v,
            g_rated: self.rated_w / vr2,
            s_conj,
            floor_v: self.low_limit_v().unwrap_or(0.0).max(1e-3 * self.rated_v),
            y_stalled: Complex64::from_polar(i_lr / self.rated_v, -pf_lr.acos()),
        }
    }
}

/// A load's admittance as a function of its terminal voltage, with the constants precomputed.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Characteristic {
    model: Model,
    rated_v: f64,
    /// P/V_r², siemens.
    g_rated: f64,
    /// (P + jQ)* at rated voltage, VA.
    s_conj: Complex64,
    /// Lowest voltage a constant-power model is evaluated at, volts.
    floor_v: f64,
    /// Locked-rotor admittance of a motor, siemens.
    y_stalled: Complex64,
}

/// How a voltage-dependent admittance scales with the terminal voltage: Y(v) = coefficient ·
/// factor(v), with the coefficient a constant of the load (see [`Characteristic::split`]). Loads
/// of one shape on the same two nodes share the factor, so the solver works it out once for all.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Shape {
    /// factor(v) = max(v/V_r, [`LAMP_MIN_FRACTION`])^(0.54 − 1); coefficient P/V_r².
    Lamp { rated_v: f64 },
    /// factor(v) = 1/max(v, floor)²; coefficient (P + jQ)*.
    ConstantPower { floor_v: f64 },
}

impl Shape {
    /// The factor at terminal voltage magnitude `v`, volts.
    #[inline]
    pub fn factor(self, v: f64) -> f64 {
        match self {
            Shape::Lamp { rated_v } => {
                let x = (v / rated_v).max(LAMP_MIN_FRACTION);
                // 1^p is exactly 1; every solve starts each lamp at its rated voltage, and a
                // general power costs more than the rest of the step.
                if x == 1.0 {
                    1.0
                } else {
                    x.powf(LAMP_CURRENT_EXPONENT - 1.0)
                }
            }
            Shape::ConstantPower { floor_v } => {
                let v_eff = v.max(floor_v);
                1.0 / (v_eff * v_eff)
            }
        }
    }
}

impl Characteristic {
    /// The admittance in `state` as a [`Shape`] and its coefficient, when it depends on the
    /// voltage: `admittance(v, state)` = coefficient · factor(v) (`None` for the linear models, a
    /// stalled motor and a dropped-out supply, whose admittance is a constant of the state).
    pub fn split(&self, state: State) -> Option<(Shape, Complex64)> {
        match (self.model, state) {
            (Model::Resistive | Model::Impedance, _) => None,
            (Model::Lamp, _) => Some((
                Shape::Lamp {
                    rated_v: self.rated_v,
                },
                Complex64::new(self.g_rated, 0.0),
            )),
            (Model::Motor, State::Stalled) => None,
            (Model::Electronic { .. }, State::DroppedOut) => None,
            (Model::Motor | Model::Electronic { .. }, _) => Some((
                Shape::ConstantPower {
                    floor_v: self.floor_v,
                },
                self.s_conj,
            )),
        }
    }

    /// See [`Load::admittance`].
    pub fn admittance(&self, v: f64, state: State) -> Complex64 {
        match self.split(state) {
            Some((shape, coefficient)) => coefficient * shape.factor(v),
            None => self.constant(state),
        }
    }

    /// The admittance of a load whose admittance does not depend on its voltage in `state`.
    fn constant(&self, state: State) -> Complex64 {
        match (self.model, state) {
            (Model::Resistive, _) => Complex64::new(self.g_rated, 0.0),
            (Model::Impedance, _) => self.s_conj / (self.rated_v * self.rated_v),
            (Model::Motor, _) => self.y_stalled,
            (Model::Electronic { .. }, _) => {
                Complex64::new(ELECTRONIC_STANDBY_FRACTION * self.g_rated, 0.0)
            }
            // A lamp always depends on its voltage ([`Self::split`]); at rated voltage it is P/V_r².
            (Model::Lamp, _) => Complex64::new(self.g_rated, 0.0),
        }
    }
}
