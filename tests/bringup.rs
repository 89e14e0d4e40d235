//! `railcheck bringup`: the first power-on procedure. Every number it
//! quotes is checked here against a hand calculation from a published
//! source or against the plan's operating point.

use assert_cmd::Command;
use railcheck::bringup::{CURRENT_LIMIT_SHARE, Figure, Procedure, procedure};
use railcheck::model::Library;
use uom::si::electric_current::ampere;
use uom::si::electric_potential::volt;
use uom::si::electrical_resistance::ohm;

fn checked(path: &str) -> railcheck::Checked {
    let text = std::fs::read_to_string(std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join(path))
        .unwrap();
    railcheck::check(path, &text, &Library::builtin()).expect("reads")
}

/// Every figure of one name, in step order, with its step's text.
fn figures<'p>(procedure: &'p Procedure, name: &str) -> Vec<(&'p str, &'p Figure)> {
    procedure
        .stages
        .iter()
        .flat_map(|s| &s.steps)
        .flat_map(|step| {
            step.figures
                .iter()
                .filter(move |(n, _)| *n == name)
                .map(move |(_, f)| (step.text.as_str(), f))
        })
        .collect()
}

fn volts(f: &Figure) -> f64 {
    match f {
        Figure::Voltage(v) => v.get::<volt>(),
        other => panic!("not a voltage: {other:?}"),
    }
}

fn amps(f: &Figure) -> f64 {
    match f {
        Figure::Current(i) => i.get::<ampere>(),
        other => panic!("not a current: {other:?}"),
    }
}

#[test]
fn the_bench_supply_is_set_to_the_packs_nominal_voltage_and_a_safe_limit() {
    // 3S lithium polymer: 3 × 3.7 V = 11.1 V nominal (Handbook of Batteries
    // per-cell window). The limit is 150 % of the idle draw and never above
    // the main fuse (15 A on the rover, 10 A on the first draft).
    for (example, fuse) in [
        ("examples/orchard-rover.yaml", 15.0),
        ("examples/first-draft.yaml", 10.0),
    ] {
        let procedure = procedure(&checked(example));
        let voltage = figures(&procedure, "bench_voltage");
        assert!((volts(voltage[0].1) - 11.1).abs() < 1e-9, "{example}");
        let idle = amps(figures(&procedure, "idle_current")[0].1);
        let limit = amps(figures(&procedure, "current_limit")[0].1);
        assert!(idle > 0.0, "{example}");
        assert!(limit <= fuse, "{example}: {limit} A above the fuse");
        assert!(
            (limit - (idle * CURRENT_LIMIT_SHARE).min(fuse)).abs() < 1e-9,
            "{example}"
        );
    }
}

#[test]
fn a_small_main_fuse_caps_the_current_limit() {
    // 900 mA of idle draw × 150 % = 1.35 A, above the 1 A fuse: the limit is
    // the fuse's rating.
    let plan = "railcheck: 1\nparts:\n  pack: { use: battery/lead-acid-12v }\n  fuse: { use: fuse/blade-1a }\n  heater: { class: load, pins: { vin: { role: supply-in, draw: { idle: 900 mA, typical: 900 mA, peak: 900 mA } }, gnd: { role: ground } } }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  HEAT: [fuse.b, heater.vin]\n  GND: [pack.neg, heater.gnd]\n";
    let checked = railcheck::check("heater.yaml", plan, &Library::builtin()).unwrap();
    let procedure = procedure(&checked);
    let idle = amps(figures(&procedure, "idle_current")[0].1);
    assert!((idle - 0.9).abs() < 1e-6, "{idle}");
    let limit = amps(figures(&procedure, "current_limit")[0].1);
    assert!((limit - 1.0).abs() < 1e-9, "{limit}");
}

#[test]
fn rail_readings_are_the_regulators_tolerance_band() {
    // The rover's 5 V buck: 5 V ± 2 % = 4.9 V to 5.1 V; its onboard 3.3 V
    // output: 3.3 V ± 3 % = 3.201 V to 3.399 V (the parts' own tolerance).
    let procedure = procedure(&checked("examples/orchard-rover.yaml"));
    let lows = figures(&procedure, "expected_low");
    let highs = figures(&procedure, "expected_high");
    let five = lows.iter().position(|(t, _)| t.contains("`5V`")).unwrap();
    assert!((volts(lows[five].1) - 4.9).abs() < 1e-6);
    assert!((volts(highs[five].1) - 5.1).abs() < 1e-6);
    let three = lows.iter().position(|(t, _)| t.contains("`3V3`")).unwrap();
    assert!((volts(lows[three].1) - 3.201).abs() < 1e-6);
    assert!((volts(highs[three].1) - 3.399).abs() < 1e-6);
    // In the order power flows: the 5 V rail before the 3.3 V one it feeds.
    assert!(five < three);
}

#[test]
fn the_ground_path_is_the_copper_of_its_leads() {
    // The rover's GND: 60 cm of 14 AWG (8.286 mΩ/m) and the pack's 20 cm
    // negative lead of 12 AWG (5.211 mΩ/m), ASTM B258 with annealed copper,
    // at the plan's 35 °C (× (1 + 0.00393 × 15), IEC 60028): 6.37 mΩ.
    let procedure = procedure(&checked("examples/orchard-rover.yaml"));
    let path = figures(&procedure, "ground_path");
    let (_, figure) = path
        .iter()
        .find(|(t, _)| t.contains("Ground `GND`"))
        .unwrap();
    let Figure::Resistance(r) = figure else {
        panic!()
    };
    let expected = (0.6 * 8.286e-3 + 0.2 * 5.211e-3) * (1.0 + 0.00393 * 15.0);
    assert!(
        (r.get::<ohm>() - expected).abs() / expected < 0.01,
        "{:?}",
        r
    );
}

#[test]
fn the_short_threshold_is_the_rails_full_draw_resistance() {
    // Ohm's law: the loads of a rail at their peak present V / I; the rover's
    // 5 V rail carries at most 3.01 A (its budget), so a cold reading below
    // 5 / 3.01 = 1.66 Ω is a short.
    let checked = checked("examples/orchard-rover.yaml");
    let budget = railcheck::budget::budget(&checked);
    let rail = budget.rails.iter().find(|r| r.nets[0] == "5V").unwrap();
    let expected = rail.voltage_nominal.get::<volt>() / rail.peak_current.get::<ampere>();
    assert!((expected - 5.0 / 3.01).abs() < 0.01);
    let procedure = procedure(&checked);
    let shorts = figures(&procedure, "short_below");
    let (_, figure) = shorts
        .iter()
        .find(|(t, _)| t.contains("Rail `5V`"))
        .unwrap();
    let Figure::Resistance(r) = figure else {
        panic!()
    };
    assert!((r.get::<ohm>() - expected).abs() < 1e-9);
}

#[test]
fn stalled_modes_are_not_bench_steps_and_the_stop_is_tested_first() {
    let procedure = procedure(&checked("examples/orchard-rover.yaml"));
    let texts: Vec<&str> = procedure
        .stages
        .iter()
        .flat_map(|s| &s.steps)
        .map(|s| s.text.as_str())
        .collect();
    assert!(
        !texts.iter().any(|t| t.contains("mode `climb`")),
        "climb stalls both motors"
    );
    assert!(!texts.iter().any(|t| t.contains("mode `worst`")));
    let stop = texts
        .iter()
        .position(|t| t.contains("strike `estop`"))
        .unwrap();
    let first_drive = texts
        .iter()
        .position(|t| t.contains("mode `cruise`"))
        .unwrap();
    assert!(stop < first_drive);
    assert!(
        texts
            .iter()
            .any(|t| t.contains("qualified practice take precedence"))
    );
}

#[test]
fn the_procedure_is_the_same_on_every_run_in_every_format() {
    for format in ["human", "markdown", "json"] {
        let run = || {
            Command::cargo_bin("railcheck")
                .unwrap()
                .args(["bringup", "--format", format, "examples/orchard-rover.yaml"])
                .current_dir(env!("CARGO_MANIFEST_DIR"))
                .output()
                .unwrap()
        };
        let (a, b) = (run(), run());
        assert_eq!(a.status.code(), Some(0), "{format}");
        assert_eq!(a.stdout, b.stdout, "{format}");
    }
    let json = Command::cargo_bin("railcheck")
        .unwrap()
        .args(["bringup", "--format", "json", "examples/first-draft.yaml"])
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .output()
        .unwrap();
    let document: serde_json::Value = serde_json::from_slice(&json.stdout).unwrap();
    assert_eq!(document["kind"], "bringup");
    assert_eq!(document["format_version"], 1);
}
