//! Published conductor tables, kept as data with their sources.
//!
//! Values are ohms per 1000 ft at 75 °C. Rows marked `from memory` in the comments were not read
//! from the document while writing this file; `core/tests/reference/README.md` lists which rows the
//! tests check and against what.

/// One size row of NFPA 70 (NEC) Chapter 9, Tables 8 and 9.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct AwgRow {
    /// The trade designation: `"12"`, `"4/0"`, `"250"` (kcmil).
    pub size: &'static str,
    /// Cross-section in circular mils (Table 8).
    pub cmil: f64,
    /// Table 8 DC resistance, uncoated copper (stranded where the table lists both), Ω/kft.
    pub dc_cu: f64,
    /// Table 8 DC resistance, aluminum, Ω/kft.
    pub dc_al: f64,
    /// Table 9 reactance X_L: PVC or aluminum conduit, then steel conduit, Ω/kft.
    pub x_l: [f64; 2],
    /// Table 9 AC resistance of copper in PVC, aluminum and steel conduit, Ω/kft.
    pub ac_cu: [f64; 3],
    /// Table 9 AC resistance of aluminum wire in PVC, aluminum and steel conduit, Ω/kft; `None` where
    /// the table has no entry (14 AWG).
    pub ac_al: Option<[f64; 3]>,
}

/// NEC Chapter 9 Table 8 (DC, stranded) and Table 9 (AC, 60 Hz, three single conductors in
/// conduit), 75 °C.
///
/// Source: NFPA 70, National Electrical Code, Chapter 9, Tables 8 and 9 (2008 edition for 14 AWG
/// through 1/0 and the Table 8 columns listed in the project's reference notes; the 3 AWG, 1 AWG,
/// 300, 400, 600, 750 and 1000 kcmil Table 9 rows and the Table 8 areas from 6 AWG up are from memory).
#[allow(clippy::approx_constant)] // 3.14 Ω/kft is the table value for 14 AWG, not π.
pub const AWG_TABLE: &[AwgRow] = &[
    AwgRow {
        size: "14",
        cmil: 4110.0,
        dc_cu: 3.14,
        dc_al: 5.17,
        x_l: [0.058, 0.073],
        ac_cu: [3.1, 3.1, 3.1],
        ac_al: None,
    },
    AwgRow {
        size: "12",
        cmil: 6530.0,
        dc_cu: 1.98,
        dc_al: 3.25,
        x_l: [0.054, 0.068],
        ac_cu: [2.0, 2.0, 2.0],
        ac_al: Some([3.2, 3.2, 3.2]),
    },
    AwgRow {
        size: "10",
        cmil: 10380.0,
        dc_cu: 1.24,
        dc_al: 2.04,
        x_l: [0.050, 0.063],
        ac_cu: [1.2, 1.2, 1.2],
        ac_al: Some([2.0, 2.0, 2.0]),
    },
    AwgRow {
        size: "8",
        cmil: 16510.0,
        dc_cu: 0.778,
        dc_al: 1.28,
        x_l: [0.052, 0.065],
        ac_cu: [0.78, 0.78, 0.78],
        ac_al: Some([1.3, 1.3, 1.3]),
    },
    AwgRow {
        size: "6",
        cmil: 26240.0,
        dc_cu: 0.491,
        dc_al: 0.808,
        x_l: [0.051, 0.064],
        ac_cu: [0.49, 0.49, 0.49],
        ac_al: Some([0.81, 0.81, 0.81]),
    },
    AwgRow {
        size: "4",
        cmil: 41740.0,
        dc_cu: 0.308,
        dc_al: 0.508,
        x_l: [0.048, 0.060],
        ac_cu: [0.31, 0.31, 0.31],
        ac_al: Some([0.51, 0.51, 0.51]),
    },
    AwgRow {
        size: "3",
        cmil: 52620.0,
        dc_cu: 0.245,
        dc_al: 0.403,
        x_l: [0.047, 0.059],
        ac_cu: [0.25, 0.25, 0.25],
        ac_al: Some([0.40, 0.41, 0.40]),
    },
    AwgRow {
        size: "2",
        cmil: 66360.0,
        dc_cu: 0.194,
        dc_al: 0.319,
        x_l: [0.045, 0.057],
        ac_cu: [0.19, 0.20, 0.20],
        ac_al: Some([0.32, 0.32, 0.32]),
    },
    AwgRow {
        size: "1",
        cmil: 83690.0,
        dc_cu: 0.154,
        dc_al: 0.253,
        x_l: [0.046, 0.057],
        ac_cu: [0.15, 0.16, 0.16],
        ac_al: Some([0.25, 0.26, 0.25]),
    },
    AwgRow {
        size: "1/0",
        cmil: 105600.0,
        dc_cu: 0.122,
        dc_al: 0.201,
        x_l: [0.044, 0.055],
        ac_cu: [0.12, 0.13, 0.12],
        ac_al: Some([0.20, 0.21, 0.20]),
    },
    AwgRow {
        size: "2/0",
        cmil: 133100.0,
        dc_cu: 0.0967,
        dc_al: 0.159,
        x_l: [0.043, 0.054],
        ac_cu: [0.10, 0.10, 0.10],
        ac_al: Some([0.16, 0.16, 0.16]),
    },
    AwgRow {
        size: "3/0",
        cmil: 167800.0,
        dc_cu: 0.0766,
        dc_al: 0.126,
        x_l: [0.042, 0.052],
        ac_cu: [0.077, 0.082, 0.079],
        ac_al: Some([0.13, 0.13, 0.13]),
    },
    AwgRow {
        size: "4/0",
        cmil: 211600.0,
        dc_cu: 0.0608,
        dc_al: 0.100,
        x_l: [0.041, 0.051],
        ac_cu: [0.062, 0.067, 0.063],
        ac_al: Some([0.10, 0.11, 0.10]),
    },
    AwgRow {
        size: "250",
        cmil: 250000.0,
        dc_cu: 0.0515,
        dc_al: 0.0847,
        x_l: [0.041, 0.052],
        ac_cu: [0.052, 0.057, 0.054],
        ac_al: Some([0.085, 0.090, 0.086]),
    },
    AwgRow {
        size: "300",
        cmil: 300000.0,
        dc_cu: 0.0429,
        dc_al: 0.0707,
        x_l: [0.041, 0.051],
        ac_cu: [0.044, 0.049, 0.045],
        ac_al: Some([0.071, 0.076, 0.072]),
    },
    AwgRow {
        size: "350",
        cmil: 350000.0,
        dc_cu: 0.0367,
        dc_al: 0.0605,
        x_l: [0.040, 0.050],
        ac_cu: [0.038, 0.043, 0.039],
        ac_al: Some([0.061, 0.066, 0.063]),
    },
    AwgRow {
        size: "400",
        cmil: 400000.0,
        dc_cu: 0.0321,
        dc_al: 0.0529,
        x_l: [0.040, 0.049],
        ac_cu: [0.033, 0.038, 0.035],
        ac_al: Some([0.052, 0.057, 0.054]),
    },
    AwgRow {
        size: "500",
        cmil: 500000.0,
        dc_cu: 0.0258,
        dc_al: 0.0424,
        x_l: [0.039, 0.048],
        ac_cu: [0.027, 0.032, 0.029],
        ac_al: Some([0.043, 0.048, 0.045]),
    },
    AwgRow {
        size: "600",
        cmil: 600000.0,
        dc_cu: 0.0214,
        dc_al: 0.0353,
        x_l: [0.039, 0.048],
        ac_cu: [0.023, 0.028, 0.025],
        ac_al: Some([0.036, 0.041, 0.038]),
    },
    AwgRow {
        size: "750",
        cmil: 750000.0,
        dc_cu: 0.0171,
        dc_al: 0.0282,
        x_l: [0.038, 0.048],
        ac_cu: [0.019, 0.024, 0.021],
        ac_al: Some([0.029, 0.034, 0.031]),
    },
    AwgRow {
        size: "1000",
        cmil: 1000000.0,
        dc_cu: 0.0129,
        dc_al: 0.0212,
        x_l: [0.037, 0.046],
        ac_cu: [0.015, 0.019, 0.018],
        ac_al: Some([0.023, 0.027, 0.025]),
    },
];

/// One row of IEC 60228, class 2 (stranded) conductors: maximum DC resistance at 20 °C, Ω/km.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct MetricRow {
    /// Nominal cross-section, mm².
    pub mm2: f64,
    /// Plain copper, Ω/km at 20 °C.
    pub cu: f64,
    /// Aluminum, Ω/km at 20 °C; `None` below 10 mm², where the standard lists no class-2 aluminum.
    pub al: Option<f64>,
}

/// IEC 60228 Table 2 (class 2 stranded conductors), maximum resistance at 20 °C (from memory).
pub const METRIC_TABLE: &[MetricRow] = &[
    MetricRow {
        mm2: 1.5,
        cu: 12.1,
        al: None,
    },
    MetricRow {
        mm2: 2.5,
        cu: 7.41,
        al: None,
    },
    MetricRow {
        mm2: 4.0,
        cu: 4.61,
        al: None,
    },
    MetricRow {
        mm2: 6.0,
        cu: 3.08,
        al: None,
    },
    MetricRow {
        mm2: 10.0,
        cu: 1.83,
        al: Some(3.08),
    },
    MetricRow {
        mm2: 16.0,
        cu: 1.15,
        al: Some(1.91),
    },
    MetricRow {
        mm2: 25.0,
        cu: 0.727,
        al: Some(1.20),
    },
    MetricRow {
        mm2: 35.0,
        cu: 0.524,
        al: Some(0.868),
    },
    MetricRow {
        mm2: 50.0,
        cu: 0.387,
        al: Some(0.641),
    },
    MetricRow {
        mm2: 70.0,
        cu: 0.268,
        al: Some(0.443),
    },
    MetricRow {
        mm2: 95.0,
        cu: 0.193,
        al: Some(0.320),
    },
    MetricRow {
        mm2: 120.0,
        cu: 0.153,
        al: Some(0.253),
    },
    MetricRow {
        mm2: 150.0,
        cu: 0.124,
        al: Some(0.206),
    },
    MetricRow {
        mm2: 185.0,
        cu: 0.0991,
        al: Some(0.164),
    },
    MetricRow {
        mm2: 240.0,
        cu: 0.0754,
        al: Some(0.125),
    },
    MetricRow {
        mm2: 300.0,
        cu: 0.0601,
        al: Some(0.100),
    },
];

/// Reactance assumed for metric cables, Ω/km at 50 Hz: a typical value for single-core cables laid
/// close together (common practice, no source). IEC 60228 gives resistance only.
pub const METRIC_X_OHM_PER_KM_50HZ: f64 = 0.08;
