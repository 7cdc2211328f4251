//! Ampacity of insulated conductors, NEC Table 310.16 (not more than three current-carrying
//! conductors in a raceway, cable or earth, 30 °C ambient), by insulation temperature column.
//!
//! Source: NFPA 70 (NEC) Table 310.16 (numbered 310.15(B)(16) before 2020), from memory: the table
//! was not at hand when these rows were written. Small conductors are further limited by 240.4(D)
//! (14 AWG copper 15 A, 12 AWG 20 A, 10 AWG 30 A overcurrent protection).

use super::Material;

/// One row: size, copper 60/75/90 °C, aluminum 60/75/90 °C (`None` where the table has none).
type Row = (&'static str, [f64; 3], Option<[f64; 3]>);

const ROWS: &[Row] = &[
    ("14", [15.0, 20.0, 25.0], None),
    ("12", [20.0, 25.0, 30.0], Some([15.0, 20.0, 25.0])),
    ("10", [30.0, 35.0, 40.0], Some([25.0, 30.0, 35.0])),
    ("8", [40.0, 50.0, 55.0], Some([35.0, 40.0, 45.0])),
    ("6", [55.0, 65.0, 75.0], Some([40.0, 50.0, 55.0])),
    ("4", [70.0, 85.0, 95.0], Some([55.0, 65.0, 75.0])),
    ("3", [85.0, 100.0, 115.0], Some([65.0, 75.0, 85.0])),
    ("2", [95.0, 115.0, 130.0], Some([75.0, 90.0, 100.0])),
    ("1", [110.0, 130.0, 145.0], Some([85.0, 100.0, 115.0])),
    ("1/0", [125.0, 150.0, 170.0], Some([100.0, 120.0, 135.0])),
    ("2/0", [145.0, 175.0, 195.0], Some([115.0, 135.0, 150.0])),
    ("3/0", [165.0, 200.0, 225.0], Some([130.0, 155.0, 175.0])),
    ("4/0", [195.0, 230.0, 260.0], Some([150.0, 180.0, 205.0])),
    ("250", [215.0, 255.0, 290.0], Some([170.0, 205.0, 230.0])),
    ("300", [240.0, 285.0, 320.0], Some([195.0, 230.0, 260.0])),
    ("350", [260.0, 310.0, 350.0], Some([210.0, 250.0, 280.0])),
    ("400", [280.0, 335.0, 380.0], Some([225.0, 270.0, 305.0])),
    ("500", [320.0, 380.0, 430.0], Some([260.0, 310.0, 350.0])),
    ("600", [350.0, 420.0, 475.0], Some([285.0, 340.0, 385.0])),
    ("750", [400.0, 475.0, 535.0], Some([320.0, 385.0, 435.0])),
    ("1000", [455.0, 545.0, 615.0], Some([375.0, 445.0, 500.0])),
];

/// The temperature columns of the table, °C.
pub const COLUMNS_C: [f64; 3] = [60.0, 75.0, 90.0];

/// Ampacity in amperes for an AWG/kcmil size (`"12"`, `"4/0"`, `"250"`) and a column (60, 75 or
/// 90 °C); `None` when the table has no such entry.
pub fn ampacity(material: Material, size: &str, column_c: f64) -> Option<f64> {
    let col = COLUMNS_C.iter().position(|c| (c - column_c).abs() < 1e-9)?;
    let row = ROWS.iter().find(|r| r.0 == size)?;
    match material {
        Material::Copper => Some(row.1[col]),
        Material::Aluminum => row.2.map(|a| a[col]),
    }
}
