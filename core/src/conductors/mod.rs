//! Conductors: table lookup, temperature correction, run impedance and voltage drop.
//!
//! Sign convention: impedances are series R + jX per conductor for the whole one-way run, in ohms,
//! at the system frequency. A circuit's loop impedance is the sum of its outgoing and return
//! conductors.

pub mod ampacity;
pub mod drop;
pub mod tables;

use crate::figures::plain;
use num_complex::Complex64;
use tables::{AwgRow, MetricRow, AWG_TABLE, METRIC_TABLE, METRIC_X_OHM_PER_KM_50HZ};

/// Feet in one metre's worth of conductor (exact by definition of the foot).
pub const FEET_PER_METRE: f64 = 1.0 / 0.3048;

/// Conductor metal.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Material {
    Copper,
    Aluminum,
}

impl Material {
    /// Reads `cu`, `copper`, `al`, `aluminum`, `aluminium`.
    pub fn parse(s: &str) -> Option<Material> {
        match s.trim().to_ascii_lowercase().as_str() {
            "cu" | "copper" => Some(Material::Copper),
            "al" | "aluminum" | "aluminium" => Some(Material::Aluminum),
            _ => None,
        }
    }

    /// The short code used in job files.
    pub fn code(self) -> &'static str {
        match self {
            Material::Copper => "cu",
            Material::Aluminum => "al",
        }
    }

    /// Temperature coefficient of resistance referred to 75 °C, per °C:
    /// R₂ = R₁·[1 + α(T₂ − 75)], α = 0.00323 copper, 0.00330 aluminum.
    /// Source: NEC Chapter 9 Table 8, note 2 (as quoted in secondary sources).
    pub fn alpha_75(self) -> f64 {
        match self {
            Material::Copper => 0.00323,
            Material::Aluminum => 0.00330,
        }
    }

    /// Temperature coefficient referred to 20 °C, per °C: 0.00393 copper, 0.00403 aluminum
    /// (common practice, from memory).
    pub fn alpha_20(self) -> f64 {
        match self {
            Material::Copper => 0.00393,
            Material::Aluminum => 0.00403,
        }
    }
}

/// Raceway around the conductors, which sets Table 9's reactance and AC resistance column.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Default)]
pub enum Conduit {
    /// PVC (non-metallic) conduit, also the closest column for cable and overhead runs.
    #[default]
    Pvc,
    Aluminum,
    Steel,
}

impl Conduit {
    /// Reads `pvc`, `aluminum`/`al`, `steel`.
    pub fn parse(s: &str) -> Option<Conduit> {
        match s.trim().to_ascii_lowercase().as_str() {
            "pvc" | "nonmetallic" | "none" => Some(Conduit::Pvc),
            "al" | "aluminum" | "aluminium" => Some(Conduit::Aluminum),
            "steel" => Some(Conduit::Steel),
            _ => None,
        }
    }

    fn column(self) -> usize {
        match self {
            Conduit::Pvc => 0,
            Conduit::Aluminum => 1,
            Conduit::Steel => 2,
        }
    }
}

/// A conductor size: a row of the NEC tables or of IEC 60228.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Size {
    Awg(&'static AwgRow),
    Metric(&'static MetricRow),
}

impl Size {
    /// Reads `"12"`, `"12 AWG"`, `"4/0"`, `"250"`, `"250 kcmil"`, `"16 mm2"`, `"16mm²"`.
    /// A bare number is an AWG or kcmil size; metric sizes need their unit.
    pub fn parse(text: &str) -> Option<Size> {
        let t = text.trim().to_ascii_lowercase();
        let metric = ["mm²", "mm2", "mm^2", "sq mm", "mm"]
            .iter()
            .find_map(|u| t.strip_suffix(u));
        if let Some(num) = metric {
            let mm2 = crate::fields::decimal(num.trim())?;
            return METRIC_TABLE
                .iter()
                .find(|r| (r.mm2 - mm2).abs() < 1e-9)
                .map(Size::Metric);
        }
        let core = t
            .trim_end_matches("kcmil")
            .trim_end_matches("mcm")
            .trim_end_matches("awg")
            .trim()
            .trim_start_matches('#');
        AWG_TABLE.iter().find(|r| r.size == core).map(Size::Awg)
    }

    /// The spelling job files use for it: `12`, `4/0`, `250`, `35 mm2`.
    pub fn code(self) -> String {
        match self {
            Size::Awg(r) => r.size.to_string(),
            Size::Metric(r) => format!("{} mm2", plain(r.mm2)),
        }
    }

    /// The label shown to a user: `12 AWG`, `4/0 AWG`, `250 kcmil`, `16 mm²`.
    pub fn label(self) -> String {
        match self {
            Size::Awg(r) if r.cmil >= 250_000.0 => format!("{} kcmil", r.size),
            Size::Awg(r) => format!("{} AWG", r.size),
            Size::Metric(r) => format!("{} mm²", plain(r.mm2)),
        }
    }

    /// Every size this engine knows, smallest first within each family: AWG/kcmil then metric.
    pub fn all() -> impl Iterator<Item = Size> {
        AWG_TABLE
            .iter()
            .map(Size::Awg)
            .chain(METRIC_TABLE.iter().map(Size::Metric))
    }
}

/// Where a conductor's impedance came from, carried into reports.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Basis {
    /// NEC Chapter 9 Table 9 AC R and X, corrected to the stated temperature.
    NecTable9,
    /// IEC 60228 DC resistance corrected to temperature, with an assumed reactance.
    Iec60228,
    /// An impedance the user gave for the whole run.
    Explicit,
}

/// A validated conductor run (one conductor, one way).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Conductor {
    impedance: Complex64,
    basis: Basis,
}

/// Why a conductor could not be looked up.
#[derive(Clone, Debug, PartialEq)]
pub enum ConductorError {
    /// The size is missing from the table for this material (14 AWG aluminum in Table 9, small
    /// metric aluminum sizes).
    NotTabulated { size: String, material: Material },
}

impl std::fmt::Display for ConductorError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            ConductorError::NotTabulated { size, material } => write!(
                f,
                "{size} is not tabulated for {} conductors",
                match material {
                    Material::Copper => "copper",
                    Material::Aluminum => "aluminum",
                }
            ),
        }
    }
}

impl Conductor {
    /// A run from the tables.
    ///
    /// AWG and kcmil sizes use NEC Table 9 AC resistance and reactance (Ω/kft at 75 °C, 60 Hz),
    /// with R corrected by R_T = R₇₅·[1 + α(T − 75)] and X scaled by f/60. Metric sizes use IEC 60228
    /// DC resistance at 20 °C corrected by R_T = R₂₀·[1 + α₂₀(T − 20)], and an assumed reactance of
    /// 0.08 Ω/km at 50 Hz scaled by f/50. Parallel sets divide the impedance by their number.
    ///
    /// # Errors
    /// [`ConductorError::NotTabulated`] for a size the table lacks for this material.
    pub fn from_table(
        material: Material,
        size: Size,
        conduit: Conduit,
        length_ft: f64,
        sets: u32,
        temperature_c: f64,
        frequency_hz: f64,
    ) -> Result<Conductor, ConductorError> {
        let sets = f64::from(sets.max(1));
        match size {
            Size::Awg(row) => {
                let r75 = match material {
                    Material::Copper => row.ac_cu[conduit.column()],
                    Material::Aluminum => {
                        row.ac_al.ok_or_else(|| ConductorError::NotTabulated {
                            size: size.label(),
                            material,
                        })?[conduit.column()]
                    }
                };
                let x60 = row.x_l[if conduit == Conduit::Steel { 1 } else { 0 }];
                let kft = length_ft / 1000.0;
                let r = r75 * (1.0 + material.alpha_75() * (temperature_c - 75.0)) * kft;
                let x = x60 * (frequency_hz / 60.0) * kft;
                Ok(Conductor {
                    impedance: Complex64::new(r, x) / sets,
                    basis: Basis::NecTable9,
                })
            }
            Size::Metric(row) => {
                let r20 = match material {
                    Material::Copper => row.cu,
                    Material::Aluminum => row.al.ok_or_else(|| ConductorError::NotTabulated {
                        size: size.label(),
                        material,
                    })?,
                };
                let km = length_ft / FEET_PER_METRE / 1000.0;
                let r = r20 * (1.0 + material.alpha_20() * (temperature_c - 20.0)) * km;
                let x = METRIC_X_OHM_PER_KM_50HZ * (frequency_hz / 50.0) * km;
                Ok(Conductor {
                    impedance: Complex64::new(r, x) / sets,
                    basis: Basis::Iec60228,
                })
            }
        }
    }

    /// A run whose whole impedance the user measured or knows, in ohms (R ≥ 0, X ≥ 0).
    pub fn explicit(r_ohm: f64, x_ohm: f64) -> Conductor {
        Conductor {
            impedance: Complex64::new(r_ohm.max(0.0), x_ohm.max(0.0)),
            basis: Basis::Explicit,
        }
    }

    /// A conductor of no impedance, for a service or branch the job leaves out.
    pub fn ideal() -> Conductor {
        Conductor::explicit(0.0, 0.0)
    }

    /// Series impedance of the whole run, ohms, at the system frequency.
    pub fn impedance(&self) -> Complex64 {
        self.impedance
    }

    /// Where the impedance came from.
    pub fn basis(&self) -> Basis {
        self.basis
    }
}

/// NEC Table 8 DC resistance, Ω/kft at 75 °C, for a table size (stranded copper or aluminum).
pub fn table8_dc_ohm_per_kft(material: Material, size: &str) -> Option<f64> {
    let row = AWG_TABLE.iter().find(|r| r.size == size)?;
    Some(match material {
        Material::Copper => row.dc_cu,
        Material::Aluminum => row.dc_al,
    })
}
