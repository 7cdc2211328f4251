//! The distribution transformer: ratios, ratings, source impedance and available fault current.
//!
//! Impedances are referred to the secondary, in ohms. A transformer's nameplate %Z is on its own kVA
//! and voltage base: Z_base = V_LL² / S, with V_LL the full secondary winding voltage (240 V for a
//! 120/240 V unit) for single-phase, and the line-to-line voltage for three-phase (per-phase wye
//! equivalent). X/R splits |Z| into R = |Z|/√(1 + (X/R)²) and X = R·(X/R).

use crate::system::{System, SystemKind};
use num_complex::Complex64;

/// Primary tap settings a distribution transformer usually offers: two steps of 2.5 % each way
/// (common practice, no source).
pub const TAP_STEPS_PCT: [f64; 5] = [-5.0, -2.5, 0.0, 2.5, 5.0];

/// How the transformer's windings are connected.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Connection {
    /// One primary winding and a center-tapped secondary: the split-phase service's unit.
    SinglePhase,
    /// Primary windings across the primary lines (delta), secondary windings to the star point.
    DeltaWye,
    /// Primary windings to the primary's neutral, secondary windings to the star point.
    WyeWye,
}

impl Connection {
    /// Reads `single-phase`, `delta-wye` (also `delta-y`, `dy`), `wye-wye` (`y-y`, `yy`).
    pub fn parse(s: &str) -> Option<Connection> {
        match s
            .trim()
            .to_ascii_lowercase()
            .replace(['_', ' '], "-")
            .as_str()
        {
            "single-phase" | "single" | "center-tapped" => Some(Connection::SinglePhase),
            "delta-wye" | "delta-y" | "dy" => Some(Connection::DeltaWye),
            "wye-wye" | "y-y" | "yy" => Some(Connection::WyeWye),
            _ => None,
        }
    }

    /// The job-file spelling.
    pub fn code(self) -> &'static str {
        match self {
            Connection::SinglePhase => "single-phase",
            Connection::DeltaWye => "delta-wye",
            Connection::WyeWye => "wye-wye",
        }
    }
}

/// A validated transformer.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Transformer {
    pub(crate) kva: f64,
    pub(crate) primary_v: f64,
    pub(crate) impedance_pct: f64,
    pub(crate) x_over_r: f64,
    pub(crate) tap_pct: f64,
    pub(crate) supply_v: f64,
    pub(crate) connection: Connection,
}

impl Transformer {
    /// Builds a transformer from nameplate values; `None` unless kVA, primary volts and %Z are
    /// positive and finite, X/R is finite and not negative, the tap is one of [`TAP_STEPS_PCT`] and
    /// the supply voltage is positive.
    pub fn new(
        kva: f64,
        primary_v: f64,
        impedance_pct: f64,
        x_over_r: f64,
        tap_pct: f64,
        supply_v: f64,
        connection: Connection,
    ) -> Option<Transformer> {
        let pos = |v: f64| v.is_finite() && v > 0.0;
        (pos(kva)
            && pos(primary_v)
            && pos(impedance_pct)
            && impedance_pct < 100.0
            && x_over_r.is_finite()
            && x_over_r >= 0.0
            && TAP_STEPS_PCT.iter().any(|t| (t - tap_pct).abs() < 1e-9)
            && pos(supply_v))
        .then_some(Transformer {
            kva,
            primary_v,
            impedance_pct,
            x_over_r,
            tap_pct,
            supply_v,
            connection,
        })
    }

    pub fn connection(&self) -> Connection {
        self.connection
    }

    pub fn kva(&self) -> f64 {
        self.kva
    }

    pub fn primary_v(&self) -> f64 {
        self.primary_v
    }

    pub fn impedance_pct(&self) -> f64 {
        self.impedance_pct
    }

    pub fn x_over_r(&self) -> f64 {
        self.x_over_r
    }

    pub fn tap_pct(&self) -> f64 {
        self.tap_pct
    }

    /// The winding (turns) ratio at the selected tap, as a turns-ratio tester reads it across one
    /// primary winding and the secondary winding on the same core leg:
    /// a = (V_primary winding / V_secondary winding)·(1 + tap/100).
    ///
    /// Single-phase: the primary voltage over the full center-tapped secondary (7200 : 240 → 30).
    /// Delta-wye: the primary line-to-line voltage over the secondary's line-to-neutral voltage
    /// (4160 : 120 → 34.67). Wye-wye: the primary line-to-neutral voltage (V_p/√3) over the
    /// secondary's line-to-neutral voltage. `primary_v` is the primary's line-to-line voltage on a
    /// three-phase unit. Raising the primary tap adds primary turns and lowers the secondary
    /// voltage.
    pub fn turns_ratio(&self, system: &System) -> f64 {
        let tap = 1.0 + self.tap_pct / 100.0;
        let v_ln = system.volts_to_neutral();
        match self.connection {
            Connection::SinglePhase => {
                turns_ratio(self.primary_v, system.volts_line_to_line()) * tap
            }
            Connection::DeltaWye => turns_ratio(self.primary_v, v_ln) * tap,
            Connection::WyeWye => turns_ratio(self.primary_v / 3f64.sqrt(), v_ln) * tap,
        }
    }

    /// The ratio of the primary's line-to-line voltage to the secondary's at the selected tap
    /// (for a single-phase unit, primary voltage over the full secondary): what a voltmeter on
    /// the lines shows, whatever the winding connection.
    pub fn line_voltage_ratio(&self, system: &System) -> f64 {
        turns_ratio(self.primary_v, system.volts_line_to_line()) * (1.0 + self.tap_pct / 100.0)
    }

    /// Open-circuit secondary line-to-neutral voltage with the actual supply voltage and tap:
    /// V = V_nominal · (V_supply / V_primary) / (1 + tap/100).
    pub fn open_circuit_volts_to_neutral(&self, system: &System) -> f64 {
        system.volts_to_neutral() * (self.supply_v / self.primary_v) / (1.0 + self.tap_pct / 100.0)
    }

    /// Full-load secondary current, amperes (see [`full_load_current`]).
    pub fn full_load_a(&self, system: &System) -> f64 {
        full_load_current(self.kva, system)
    }

    /// Series impedance of the whole winding (split-phase: L1 to L2) or of one phase (wye),
    /// referred to the secondary, ohms: |Z| = (%Z/100)·V_LL²/S for single-phase and
    /// (%Z/100)·V_LL²/S per phase of the wye equivalent for three-phase. A delta-wye and a
    /// wye-wye unit of the same kVA and %Z present the same per-phase impedance to the secondary;
    /// the connection changes the turns ratio, not this figure.
    pub fn winding_impedance(&self, system: &System) -> Complex64 {
        let v_ll = system.volts_line_to_line();
        let z_base = v_ll * v_ll / (self.kva * 1000.0);
        let z_mag = self.impedance_pct / 100.0 * z_base;
        split_x_over_r(z_mag, self.x_over_r)
    }

    /// The source impedance matrix Z_s (3 × 3, legs L1..L3, ohms) such that the terminal voltages
    /// to the neutral are V = E − Z_s·I, with I the currents out of the hot terminals.
    ///
    /// Wye: diagonal, each phase's winding impedance. Split-phase: the center-tapped model of
    /// W. H. Kersting (Distribution System Modeling and Analysis, center-tapped transformer; from
    /// memory for the attribution), which in ohms on the secondary is a shared primary part
    /// Z₀ = 0.5·R + j0.8·X and half-winding parts Z₁ = Z₂ = 0.25·R + j0.1·X, where R + jX is the
    /// full-winding impedance. The primary part carries (I₁ − I₂)/2 on the 240 V base, so
    /// Z_s = [[Z₀/4 + Z₁, −Z₀/4], [−Z₀/4, Z₀/4 + Z₂]]. It makes the line-to-line impedance R + jX and
    /// the line-to-neutral impedance (1.5·R + j1.2·X)/4, the textbook rule that the half winding on
    /// the full rating has about 1.5 times the resistance and 1.2 times the reactance of the whole.
    pub fn source_matrix(&self, system: &System) -> [[Complex64; 3]; 3] {
        let z = self.winding_impedance(system);
        let mut m = [[Complex64::new(0.0, 0.0); 3]; 3];
        match system.kind() {
            SystemKind::SplitPhase => {
                let (z0, z1) = center_tap_parts(z);
                m[0][0] = z0 / 4.0 + z1;
                m[1][1] = z0 / 4.0 + z1;
                m[0][1] = -z0 / 4.0;
                m[1][0] = -z0 / 4.0;
            }
            SystemKind::Wye { .. } => {
                for leg in system.legs() {
                    m[leg.index()][leg.index()] = z;
                }
            }
        }
        m
    }

    /// Bolted fault currents at the secondary terminals with an infinite primary, amperes.
    pub fn terminal_faults(&self, system: &System) -> Faults {
        self.faults_through(system, Complex64::new(0.0, 0.0), Complex64::new(0.0, 0.0))
    }

    /// Bolted fault currents with an infinite primary, amperes, at the end of service conductors
    /// of one-way impedance `hot` (each hot) and `neutral`, at nominal voltage:
    ///
    /// - Split-phase: line to line I = V_LL/|Z + 2·Z_hot| with Z the full winding's impedance;
    ///   line to neutral I = V_LN/|Z_LN + Z_hot + Z_n| with Z_LN the center-tapped half's
    ///   impedance from [`Transformer::source_matrix`].
    /// - Wye: three-phase I = V_LN/|Z_ph + Z_hot| (three-phase services only); line to line
    ///   I = V_LL/(2·|Z_ph + Z_hot|)
    ///   (positive and negative sequence alike); line to neutral I = V_LN/|Z_ph + Z_hot + Z_n|,
    ///   taking the transformer's zero-sequence impedance equal to its positive-sequence one, as
    ///   for a delta-wye unit and for a wye-wye bank whose primary neutral is solidly grounded
    ///   (common practice, no source); the neutral return carries the whole fault current.
    ///
    /// Over a long service the line-to-line figure can exceed the line-to-neutral one although
    /// at the terminals of a center-tapped unit it is the other way round: the line-to-neutral loop
    /// runs out and back over two conductors at half the voltage.
    pub fn faults_through(&self, system: &System, hot: Complex64, neutral: Complex64) -> Faults {
        let v = system.volts_to_neutral();
        let v_ll = system.volts_line_to_line();
        match system.kind() {
            SystemKind::SplitPhase => {
                let m = self.source_matrix(system);
                let z_ll = self.winding_impedance(system) + hot * 2.0;
                let z_ln = m[0][0] + hot + neutral;
                Faults {
                    line_to_line_a: v_ll / z_ll.norm(),
                    line_to_neutral_a: v / z_ln.norm(),
                    three_phase_a: None,
                }
            }
            SystemKind::Wye { phases } => {
                let z = self.winding_impedance(system) + hot;
                Faults {
                    line_to_line_a: v_ll / (2.0 * z.norm()),
                    line_to_neutral_a: v / (z + neutral).norm(),
                    // A service of two phases has no three-phase fault to mark.
                    three_phase_a: (phases == 3).then(|| v / z.norm()),
                }
            }
        }
    }
}

/// Bolted fault currents at one place, amperes (symmetrical rms, infinite primary).
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct Faults {
    pub line_to_line_a: f64,
    pub line_to_neutral_a: f64,
    /// All three phases together (wye services only).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub three_phase_a: Option<f64>,
}

/// Turns (voltage) ratio primary : secondary, a = V_p / V_s (7200 : 240 → 30).
pub fn turns_ratio(primary_v: f64, secondary_v: f64) -> f64 {
    primary_v / secondary_v
}

/// Secondary voltage from primary voltage and turns ratio, V_s = V_p / a.
pub fn secondary_from_ratio(primary_v: f64, ratio: f64) -> f64 {
    primary_v / ratio
}

/// Full-load current, amperes: single-phase I = kVA·1000/V_LL (the full winding, 240 V for
/// 120/240 V); three-phase I = kVA·1000/(√3·V_LL). A two-phase wye service is fed by a three-phase
/// unit, so it uses the three-phase rating.
pub fn full_load_current(kva: f64, system: &System) -> f64 {
    match system.kind() {
        SystemKind::SplitPhase => kva * 1000.0 / system.volts_line_to_line(),
        SystemKind::Wye { .. } => kva * 1000.0 / (3f64.sqrt() * system.volts_line_to_line()),
    }
}

/// Splits an impedance magnitude by X/R into R + jX.
pub fn split_x_over_r(z_mag: f64, x_over_r: f64) -> Complex64 {
    let r = z_mag / (1.0 + x_over_r * x_over_r).sqrt();
    Complex64::new(r, r * x_over_r)
}

/// The center-tapped winding's parts (Z₀, Z₁) from the full-winding impedance R + jX, ohms on the
/// secondary: Z₀ = 0.5·R + j0.8·X, Z₁ = 0.25·R + j0.1·X (see [`Transformer::source_matrix`]).
pub fn center_tap_parts(z_full: Complex64) -> (Complex64, Complex64) {
    (
        Complex64::new(0.5 * z_full.re, 0.8 * z_full.im),
        Complex64::new(0.25 * z_full.re, 0.1 * z_full.im),
    )
}
