//! Typical household and small-shop appliances: ratings and the model that best describes each.
//!
//! All figures are typical values, common practice, no source: a nameplate always wins. Power
//! factors are displacement power factors; harmonic spectra are fractions of the fundamental
//! current typical of the supply type (a rectifier with a capacitor and no power-factor correction
//! draws a large third harmonic; one with correction draws little).

use crate::job::{LoadFile, Raw};

/// Which voltage an appliance is built for.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Hookup {
    /// Between a hot leg and neutral (120 V class).
    ToNeutral,
    /// Between two hot legs (240 V or 208 V class).
    Across,
}

/// An appliance template.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Appliance {
    /// Stable identifier used in job files (`appliance`) and the app.
    pub id: &'static str,
    pub name: &'static str,
    pub watts: f64,
    pub rated_v: f64,
    pub hookup: Hookup,
    /// `resistive`, `impedance`, `lamp`, `motor` or `electronic`.
    pub model: &'static str,
    pub power_factor: f64,
    /// Input range of an electronic supply, volts.
    pub input_range: Option<(f64, f64)>,
    pub harmonics: &'static [(u32, f64)],
}

/// A capacitor-input rectifier without power-factor correction (typical spectrum, common
/// practice, from memory).
const RECTIFIER: &[(u32, f64)] = &[(3, 0.81), (5, 0.61), (7, 0.37), (9, 0.16), (11, 0.06)];
/// Small LED drivers without correction (typical, common practice, from memory).
const LED_DRIVER: &[(u32, f64)] = &[(3, 0.70), (5, 0.45), (7, 0.25), (9, 0.12)];
/// A supply with active power-factor correction: little left (typical, common practice).
const CORRECTED: &[(u32, f64)] = &[(3, 0.05), (5, 0.03)];

#[allow(clippy::too_many_arguments)] // One positional row per appliance keeps the table readable.
const fn a(
    id: &'static str,
    name: &'static str,
    watts: f64,
    rated_v: f64,
    hookup: Hookup,
    model: &'static str,
    power_factor: f64,
    input_range: Option<(f64, f64)>,
    harmonics: &'static [(u32, f64)],
) -> Appliance {
    Appliance {
        id,
        name,
        watts,
        rated_v,
        hookup,
        model,
        power_factor,
        input_range,
        harmonics,
    }
}

use Hookup::{Across, ToNeutral};

/// The library (typical values, common practice).
pub const APPLIANCES: &[Appliance] = &[
    a(
        "kettle",
        "Electric kettle",
        1500.0,
        120.0,
        ToNeutral,
        "resistive",
        1.0,
        None,
        &[],
    ),
    a(
        "space-heater",
        "Space heater",
        1500.0,
        120.0,
        ToNeutral,
        "resistive",
        1.0,
        None,
        &[],
    ),
    a(
        "toaster",
        "Toaster",
        1100.0,
        120.0,
        ToNeutral,
        "resistive",
        1.0,
        None,
        &[],
    ),
    a(
        "hair-dryer",
        "Hair dryer",
        1200.0,
        120.0,
        ToNeutral,
        "resistive",
        1.0,
        None,
        &[],
    ),
    a(
        "aquarium-heater",
        "Aquarium heater",
        150.0,
        120.0,
        ToNeutral,
        "resistive",
        1.0,
        None,
        &[],
    ),
    a(
        "fridge",
        "Refrigerator",
        180.0,
        120.0,
        ToNeutral,
        "motor",
        0.80,
        None,
        &[],
    ),
    a(
        "freezer",
        "Chest freezer",
        150.0,
        120.0,
        ToNeutral,
        "motor",
        0.75,
        None,
        &[],
    ),
    a(
        "furnace-blower",
        "Furnace blower",
        400.0,
        120.0,
        ToNeutral,
        "motor",
        0.85,
        None,
        &[],
    ),
    a(
        "sump-pump",
        "Sump pump",
        800.0,
        120.0,
        ToNeutral,
        "motor",
        0.80,
        None,
        &[],
    ),
    a(
        "window-ac",
        "Window air conditioner",
        900.0,
        120.0,
        ToNeutral,
        "motor",
        0.90,
        None,
        &[],
    ),
    a(
        "washer",
        "Clothes washer",
        500.0,
        120.0,
        ToNeutral,
        "motor",
        0.70,
        None,
        &[],
    ),
    a(
        "microwave",
        "Microwave oven",
        1500.0,
        120.0,
        ToNeutral,
        "impedance",
        0.95,
        None,
        &[],
    ),
    a(
        "tv",
        "Television",
        120.0,
        120.0,
        ToNeutral,
        "electronic",
        0.95,
        Some((90.0, 264.0)),
        RECTIFIER,
    ),
    a(
        "computer",
        "Desktop computer",
        250.0,
        120.0,
        ToNeutral,
        "electronic",
        0.98,
        Some((90.0, 264.0)),
        CORRECTED,
    ),
    a(
        "router",
        "Internet router",
        15.0,
        120.0,
        ToNeutral,
        "electronic",
        0.90,
        Some((90.0, 264.0)),
        RECTIFIER,
    ),
    a(
        "phone-charger",
        "Phone charger",
        20.0,
        120.0,
        ToNeutral,
        "electronic",
        0.90,
        Some((90.0, 264.0)),
        RECTIFIER,
    ),
    a(
        "led-lamp",
        "LED lamp",
        10.0,
        120.0,
        ToNeutral,
        "electronic",
        0.90,
        Some((90.0, 140.0)),
        LED_DRIVER,
    ),
    a(
        "incandescent-lamp",
        "Incandescent lamp",
        60.0,
        120.0,
        ToNeutral,
        "lamp",
        1.0,
        None,
        &[],
    ),
    a(
        "water-heater",
        "Water heater (240 V)",
        4500.0,
        240.0,
        Across,
        "resistive",
        1.0,
        None,
        &[],
    ),
    a(
        "dryer",
        "Clothes dryer (240 V)",
        5000.0,
        240.0,
        Across,
        "resistive",
        1.0,
        None,
        &[],
    ),
    a(
        "range",
        "Range, one element on (240 V)",
        3000.0,
        240.0,
        Across,
        "resistive",
        1.0,
        None,
        &[],
    ),
    a(
        "heat-pump",
        "Heat pump (240 V)",
        3500.0,
        240.0,
        Across,
        "motor",
        0.90,
        None,
        &[],
    ),
    a(
        "ev-charger",
        "EV charger, level 2 (240 V)",
        7200.0,
        240.0,
        Across,
        "electronic",
        0.99,
        Some((200.0, 264.0)),
        CORRECTED,
    ),
    a(
        "table-saw",
        "Table saw",
        1800.0,
        120.0,
        ToNeutral,
        "motor",
        0.80,
        None,
        &[],
    ),
    a(
        "air-compressor",
        "Shop air compressor",
        1500.0,
        120.0,
        ToNeutral,
        "motor",
        0.75,
        None,
        &[],
    ),
    a(
        "well-pump",
        "Well pump (1 hp, 240 V)",
        1400.0,
        240.0,
        Across,
        "motor",
        0.80,
        None,
        &[],
    ),
    a(
        "dehumidifier",
        "Dehumidifier",
        600.0,
        120.0,
        ToNeutral,
        "motor",
        0.85,
        None,
        &[],
    ),
    a(
        "garage-door",
        "Garage door opener",
        500.0,
        120.0,
        ToNeutral,
        "motor",
        0.70,
        None,
        &[],
    ),
    a(
        "dishwasher",
        "Dishwasher (heating)",
        1200.0,
        120.0,
        ToNeutral,
        "resistive",
        1.0,
        None,
        &[],
    ),
    a(
        "induction-range",
        "Induction range",
        7200.0,
        240.0,
        Across,
        "electronic",
        0.98,
        Some((200.0, 264.0)),
        CORRECTED,
    ),
    a(
        "welder",
        "Stick welder (240 V, transformer type)",
        5000.0,
        240.0,
        Across,
        "impedance",
        0.55,
        None,
        &[],
    ),
    a(
        "fluorescent",
        "Fluorescent fixture (electronic ballast)",
        64.0,
        120.0,
        ToNeutral,
        "electronic",
        0.98,
        Some((108.0, 305.0)),
        CORRECTED,
    ),
];

/// Starting draw of the library's motors: locked-rotor current as a multiple of running current
/// (typical values, common practice, no source; a nameplate's code letter or locked-rotor amperes
/// always wins). A motor not listed starts at the engine's default multiple, 5.
const STARTS: &[(&str, f64)] = &[
    ("fridge", 6.0),
    ("freezer", 6.0),
    ("window-ac", 6.0),
    ("heat-pump", 6.0),
    ("well-pump", 6.0),
    ("sump-pump", 5.0),
    ("dehumidifier", 5.0),
    ("furnace-blower", 4.0),
    ("washer", 4.0),
    ("garage-door", 4.0),
    ("table-saw", 6.0),
    ("air-compressor", 6.0),
];

/// Finds an appliance by id.
pub fn find(id: &str) -> Option<&'static Appliance> {
    APPLIANCES.iter().find(|a| a.id == id)
}

/// Appliances whose name or id contains `query` (case-insensitive); all for an empty query.
///
/// The library's names are ASCII (a test holds it), so folding the case of ASCII letters alone
/// finds every match a full Unicode fold would: a query letter outside ASCII matches no name
/// either way. It keeps the standard library's Unicode case tables out of the phone app.
pub fn search(query: &str) -> Vec<&'static Appliance> {
    let q = query.trim().to_ascii_lowercase();
    APPLIANCES
        .iter()
        .filter(|a| q.is_empty() || a.name.to_ascii_lowercase().contains(&q) || a.id.contains(&q))
        .collect()
}

impl Appliance {
    /// A motor's locked-rotor current as a multiple of its running current, when the library
    /// states one (see `STARTS`).
    pub fn starts(&self) -> Option<f64> {
        STARTS
            .iter()
            .find(|(id, _)| *id == self.id)
            .map(|(_, m)| *m)
    }

    /// A job-file load for this appliance on `connect` (`L1-N`, `L1-L2`, ...).
    pub fn to_load(&self, name: &str, connect: &str) -> LoadFile {
        LoadFile {
            name: Raw::Given(name.to_string()),
            connect: Raw::Given(connect.to_string()),
            model: Raw::Given(self.model.to_string()),
            watts: Raw::Given(self.watts),
            rated_v: Raw::Given(self.rated_v),
            power_factor: if self.power_factor < 1.0 {
                Raw::Given(self.power_factor)
            } else {
                Raw::Absent
            },
            input_min_v: self
                .input_range
                .map(|r| Raw::Given(r.0))
                .unwrap_or_default(),
            input_max_v: self
                .input_range
                .map(|r| Raw::Given(r.1))
                .unwrap_or_default(),
            harmonics: if self.harmonics.is_empty() {
                Raw::Absent
            } else {
                Raw::Given(self.harmonics.to_vec())
            },
            locked_rotor_multiple: self.starts().map(Raw::Given).unwrap_or_default(),
            appliance: Raw::Given(self.id.to_string()),
            ..LoadFile::default()
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_starting_multiple_names_a_motor_of_the_library() {
        for (id, m) in STARTS {
            let a = find(id).unwrap_or_else(|| panic!("{id} is not in the library"));
            assert_eq!(a.model, "motor", "{id}");
            assert!((2.0..=10.0).contains(m), "{id}: {m}");
            assert_eq!(a.to_load("x", "L1-N").locked_rotor_multiple, Raw::Given(*m));
        }
        // A motor without a row leaves the multiple to the engine's default.
        assert!(find("microwave").unwrap().starts().is_none());
    }

    #[test]
    fn ids_are_unique_and_every_entry_is_searchable_by_id() {
        for a in APPLIANCES {
            assert_eq!(
                APPLIANCES.iter().filter(|b| b.id == a.id).count(),
                1,
                "{}",
                a.id
            );
            assert!(search(a.id).iter().any(|b| b.id == a.id));
        }
    }

    #[test]
    fn names_are_ascii_and_found_in_any_case() {
        // `search` folds ASCII letters only, which is a full fold only while every name is ASCII.
        for a in APPLIANCES {
            assert!(a.name.is_ascii(), "{}", a.name);
            let shouted = a.name.to_uppercase();
            assert!(search(&shouted).iter().any(|b| b.id == a.id), "{shouted}");
        }
    }
}
