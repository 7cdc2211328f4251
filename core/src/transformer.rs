//! The distribution transformer: ratios, ratings, source impedance and available fault current.
//!
//! Impedances are referred to the secondary, in ohms. A transformer's nameplate %Z is on its own kVA
//! and voltage base: Z_base = V_LL² / S, with V_LL the full secondary winding voltage (240 V for a
//! 120/240 V unit) for single-phase, and the line-to-line voltage for three-phase (per-phase wye
//! equivalent). X/R splits |Z| into R = |Z|/√(1 + (X/R)²) and X = R·(X/R).

use crate::system::{Leg, System, SystemKind};
use num_complex::Complex64;

/// Primary tap settings a distribution transformer usually offers: two steps of 2.5 % each way
/// (common practice, no source).
pub const TAP_STEPS_PCT: [f64; 5] = [-5.0, -2.5, 0.0, 2.5, 5.0];

/// A validated transformer.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Transformer {
    pub(crate) kva: f64,
    pub(crate) primary_v: f64,
    pub(crate) impedance_pct: f64,
    pub(crate) x_over_r: f64,
    pub(crate) tap_pct: f64,
    pub(crate) supply_v: f64,
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
        })
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

    /// Turns ratio at the selected tap: primary volts over the full secondary winding's volts,
    /// a = (V_p / V_s)·(1 + tap/100). Raising the primary tap adds primary turns and lowers the
    /// secondary voltage.
    pub fn turns_ratio(&self, system: &System) -> f64 {
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
    /// (%Z/100)·V_LL²/S per phase for three-phase.
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

    /// Available bolted fault current at the secondary terminals with an infinite primary, amperes.
    ///
    /// Split-phase, line to line: I = V_LL/|Z|, which equals I_FL/(%Z/100). Wye: the three-phase
    /// bolted fault, I = V_LN/|Z_phase| = I_FL/(%Z/100).
    pub fn available_fault_a(&self, system: &System) -> f64 {
        self.full_load_a(system) / (self.impedance_pct / 100.0)
    }

    /// Available bolted fault current line to neutral at the terminals, amperes.
    ///
    /// Split-phase: I = V_LN/|Z₀/4 + Z₁| with the center-tap model above. Wye: with the phase
    /// impedance used for all sequences the line-to-neutral fault equals the three-phase fault.
    pub fn available_fault_ln_a(&self, system: &System) -> f64 {
        let m = self.source_matrix(system);
        let leg = Leg::L1.index();
        system.volts_to_neutral() / m[leg][leg].norm()
    }
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
