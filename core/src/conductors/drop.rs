//! Voltage drop along conductors, by the formulas electricians and handbooks use.
//!
//! The network solver computes drops exactly from phasors; these closed forms exist for quick sizing
//! and so the tests can check the solver against the handbook.

use super::{Conductor, Conduit, Material, Size};

/// How the load current returns, which sets the multiplier from one conductor's drop to the
/// circuit's drop.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum CircuitKind {
    /// Two-wire single-phase (hot and neutral, or two hots): the current flows out and back, ×2.
    SinglePhase,
    /// Balanced three-phase, line-to-line drop: ×√3.
    ThreePhase,
}

impl CircuitKind {
    /// Multiplier from a line-to-neutral (one conductor) drop to the circuit's drop.
    pub fn multiplier(self) -> f64 {
        match self {
            CircuitKind::SinglePhase => 2.0,
            CircuitKind::ThreePhase => 3f64.sqrt(),
        }
    }
}

/// Circular-mil constant K, Ω·cmil/ft at 75 °C: 12.9 copper, 21.2 aluminum, derived from the
/// 1000 kcmil row of NEC Chapter 9 Table 8 (R·CM/1000).
pub fn k_constant(material: Material) -> f64 {
    match material {
        Material::Copper => 12.9,
        Material::Aluminum => 21.2,
    }
}

/// Circular-mil method, volts: VD = m·K·I·L/CM, with m = 2 single-phase or √3 three-phase,
/// L the one-way length in feet and CM the area in circular mils (common trade form).
pub fn circular_mil_drop(
    kind: CircuitKind,
    material: Material,
    amps: f64,
    one_way_ft: f64,
    cmil: f64,
) -> f64 {
    kind.multiplier() * k_constant(material) * amps * one_way_ft / cmil
}

/// Approximate drop of one conductor, volts: VD ≈ I·(R·cos θ + X·sin θ), with θ the load's lagging
/// power-factor angle. Source: IEEE Std 141 (Red Book), chapter 3.
pub fn approximate_drop(amps: f64, r_ohm: f64, x_ohm: f64, power_factor: f64) -> f64 {
    let pf = power_factor.clamp(0.0, 1.0);
    let sin = (1.0 - pf * pf).sqrt();
    amps * (r_ohm * pf + x_ohm * sin)
}

/// Exact magnitude drop of one conductor for a load at sending-end voltage `es` (line to neutral):
/// VD = Es + I·R·cos θ + I·X·sin θ − √(Es² − (I·X·cos θ − I·R·sin θ)²).
/// Returns `None` when the square root has no real value (the load cannot be supplied).
pub fn exact_drop(es: f64, amps: f64, r_ohm: f64, x_ohm: f64, power_factor: f64) -> Option<f64> {
    let pf = power_factor.clamp(0.0, 1.0);
    let sin = (1.0 - pf * pf).sqrt();
    let q = amps * x_ohm * pf - amps * r_ohm * sin;
    let disc = es * es - q * q;
    (disc >= 0.0).then(|| es + amps * r_ohm * pf + amps * x_ohm * sin - disc.sqrt())
}

/// A request for the smallest conductor that keeps a circuit's drop within a target.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SizingRequest {
    pub material: Material,
    pub conduit: Conduit,
    pub kind: CircuitKind,
    pub amps: f64,
    pub one_way_ft: f64,
    pub power_factor: f64,
    /// Circuit voltage the percentage refers to (120 for a 120 V branch, 240 across two legs).
    pub circuit_v: f64,
    /// Largest allowed drop, percent of `circuit_v` (for example 3 for a branch circuit).
    pub max_drop_pct: f64,
    pub temperature_c: f64,
    pub frequency_hz: f64,
}

/// The smallest AWG/kcmil size whose approximate circuit drop (Table 9 R and X) meets the target,
/// with that drop in volts; `None` when even the largest size does not.
pub fn smallest_awg_size(req: &SizingRequest) -> Option<(Size, f64)> {
    Size::all()
        .filter(|s| matches!(s, Size::Awg(_)))
        .filter_map(|size| {
            let c = Conductor::from_table(
                req.material,
                size,
                req.conduit,
                req.one_way_ft,
                1,
                req.temperature_c,
                req.frequency_hz,
            )
            .ok()?;
            let z = c.impedance();
            let vd =
                req.kind.multiplier() * approximate_drop(req.amps, z.re, z.im, req.power_factor);
            Some((size, vd))
        })
        .find(|(_, vd)| *vd <= req.circuit_v * req.max_drop_pct / 100.0)
}
