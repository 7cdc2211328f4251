//! The demo job the app opens with on first start and the README's run command shows: an invented
//! house at an invented address, with a loose service neutral.

/// The demo job, in the job format (version 1).
pub const DEMO_JOB: &str = r#"{
  "version": 1,
  "name": "27 Larkspur Row (demo)",
  "notes": "Invented demo: lights flicker when the kettle runs; neutral lug suspected at the meter base.",
  "system": { "kind": "split-phase", "volts_to_neutral": 120, "frequency_hz": 60 },
  "transformer": { "kva": 37.5, "primary_v": 7200, "impedance_pct": 2.2, "x_over_r": 1.6 },
  "service": { "hot": { "material": "al", "size": "2/0", "length_m": 28 },
               "neutral": { "material": "al", "size": "1/0", "length_m": 28 } },
  "neutral": { "state": "loose", "ohms": 1.5, "found": "lights dim when the kettle runs; the neutral lug at the meter base is warm" },
  "loads": [
    { "name": "Electric kettle", "connect": "L1-N", "model": "resistive", "watts": 1500, "rated_v": 120, "appliance": "kettle", "circuit": "3" },
    { "name": "Refrigerator", "connect": "L1-N", "model": "motor", "watts": 180, "rated_v": 120, "power_factor": 0.8, "appliance": "fridge", "circuit": "5" },
    { "name": "Aquarium heater", "connect": "L2-N", "model": "resistive", "watts": 150, "rated_v": 120, "appliance": "aquarium-heater", "circuit": "4" },
    { "name": "Television", "connect": "L2-N", "model": "electronic", "watts": 120, "rated_v": 120, "power_factor": 0.95, "input_min_v": 90, "input_max_v": 264, "harmonics": [[3, 0.81], [5, 0.61], [7, 0.37], [9, 0.16], [11, 0.06]], "appliance": "tv", "circuit": "6" },
    { "name": "Hall lamp", "connect": "L2-N", "model": "lamp", "watts": 60, "rated_v": 120, "appliance": "incandescent-lamp", "circuit": "6" },
    { "name": "Water heater", "connect": "L1-L2", "model": "resistive", "watts": 4500, "rated_v": 240, "appliance": "water-heater", "on": false, "circuit": "1", "movable": false }
  ]
}"#;
