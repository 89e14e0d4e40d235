//! The power budget and port limits against worked examples
//! of Peukert's law, the Handbook of Batteries pack windows and the USB 2.0 port budget, through the library and the command.

use assert_cmd::Command;
use railcheck::model::Library;
use uom::si::electric_current::ampere;
use uom::si::energy::watt_hour;
use uom::si::time::hour;

fn checked(text: &str) -> railcheck::Checked {
    railcheck::check("plan.yaml", text, &Library::builtin())
        .unwrap_or_else(|f| panic!("{:?}", f.errors))
}

fn within(actual: f64, expected: f64, relative: f64) {
    assert!(
        (actual - expected).abs() <= expected.abs() * relative,
        "{actual} is not within {}% of {expected}",
        relative * 100.0
    );
}

/// A pack feeding one constant-current load.
fn pack_and_load(pack: &str, draw: &str) -> String {
    format!(
        "railcheck: 1\nparts:\n  pack: {pack}\n  main_fuse: {{ use: fuse/blade-20a }}\n  load: {{ class: load, pins: {{ vin: {{ role: supply-in, draw: {draw} }}, gnd: {{ role: ground }} }} }}\nnets:\n  BATT: [pack.pos, main_fuse.a]\n  FUSED: [main_fuse.b, load.vin]\n  GND: [pack.neg, load.gnd]\n"
    )
}

#[test]
fn lead_acid_runtime_follows_peukert_w12() {
    // Peukert's law worked example: SLA rated 7 Ah at 20 h, k = 1.2, 2.0 A load:
    // t = 20 × (7 / (2 × 20))^1.2 = 2.47 h, not the naive 3.50 h.
    let c = checked(&pack_and_load(
        "{ class: battery, chemistry: lead-acid, cells: 6, capacity: 7 Ah, cutoff: true }",
        "2 A",
    ));
    let budget = railcheck::budget::budget(&c);
    let runtime = budget.batteries[0].runtime.as_ref().expect("a runtime");
    within(runtime.time.get::<hour>(), 2.47, 0.01);
    assert!(runtime.method.contains("Peukert"), "{}", runtime.method);
}

#[test]
fn lithium_energy_and_runtime_w13() {
    // Handbook of Batteries pack-window worked example: 3S 5 Ah → 11.1 V × 5 Ah = 55.5 Wh; 5.0 Ah at
    // 1.5 A average with 80 % usable → 4.0 / 1.5 = 2.67 h.
    let c = checked(&pack_and_load(
        "{ use: battery/lipo-3s, with: { capacity: 5 Ah, usable: 80 %, internal_resistance: 0 ohm, cutoff: true } }",
        "1.5 A",
    ));
    let budget = railcheck::budget::budget(&c);
    let pack = &budget.batteries[0];
    within(pack.energy.expect("energy").get::<watt_hour>(), 55.5, 0.001);
    within(pack.average_current.get::<ampere>(), 1.5, 1e-9);
    within(
        pack.runtime.as_ref().expect("runtime").time.get::<hour>(),
        2.667,
        0.001,
    );
}

#[test]
fn c_rate_sets_the_discharge_limit_w13() {
    // Handbook of Batteries pack-window worked example: a 2.2 Ah pack at 25C may deliver 25 × 2.2 = 55.0 A.
    let c = checked(&pack_and_load(
        "{ use: battery/lipo-2s, with: { capacity: 2200 mAh, max_discharge: 25C } }",
        "1 A",
    ));
    let budget = railcheck::budget::budget(&c);
    within(
        budget.batteries[0]
            .max_discharge
            .expect("limit")
            .get::<ampere>(),
        55.0,
        1e-9,
    );
}

#[test]
fn five_usb_loads_overload_a_usb_2_port_w15() {
    // USB 2.0 port-budget worked example: five 150 mA loads on one USB 2.0 port (500 mA,
    // USB 2.0 §7.2.1) draw 0.750 A → fail; a USB 3.x port (900 mA) carries them.
    for (port_limit, fires) in [("500 mA", true), ("900 mA", false)] {
        let text = format!(
            "railcheck: 1\nparts:\n  pack: {{ use: battery/lifepo4-4s }}\n  f: {{ use: fuse/blade-5a }}\n  buck: {{ use: regulator/buck-5v-3a }}\n  hub_host:\n    class: board\n    pins: {{ vin: {{ role: supply-in, draw: 100 mA }}, gnd: {{ role: ground }} }}\n    ports: {{ usb1: {{ kind: usb-host, current: {port_limit} }} }}\n  bank:\n    class: board\n    pins: {{ gnd: {{ role: ground }} }}\n    ports: {{ usb: {{ kind: usb-device, draw: 750 mA }} }}\nnets:\n  BATT: [pack.pos, f.a]\n  VIN: [f.b, buck.vin]\n  5V: [buck.vout, hub_host.vin]\n  GND: [pack.neg, buck.gnd, hub_host.gnd]\nlinks:\n  - {{ usb: [hub_host.usb1, bank.usb] }}\n"
        );
        let c = checked(&text);
        let port = c
            .findings
            .iter()
            .find(|f| f.rule == "current/over-rating" && f.message.contains("USB port"));
        assert_eq!(port.is_some(), fires, "{port_limit}: {:?}", c.findings);
        if let Some(f) = port {
            within(f.values["current"], 0.750, 1e-9);
            within(f.values["rating"], 0.500, 1e-9);
        }
    }
}

#[test]
fn budget_command_prints_both_examples() {
    // The budget of the shipped rover: a 3S 5 Ah pack is 55.5 Wh (Handbook of Batteries pack-window worked example).
    for (example, needle) in [
        ("examples/orchard-rover.yaml", "55.5 Wh"),
        ("examples/first-draft.yaml", "Batteries:"),
    ] {
        let output = Command::cargo_bin("railcheck")
            .unwrap()
            .args(["budget", example])
            .output()
            .unwrap();
        assert!(output.status.success(), "{example}: {output:?}");
        let text = String::from_utf8(output.stdout).unwrap();
        assert!(text.contains(needle), "{example}:\n{text}");
    }
    let output = Command::cargo_bin("railcheck")
        .unwrap()
        .args(["budget", "examples/orchard-rover.yaml", "--format", "json"])
        .output()
        .unwrap();
    let json: serde_json::Value = serde_json::from_slice(&output.stdout).unwrap();
    within(
        json["batteries"][0]["energy_wh"].as_f64().unwrap(),
        55.5,
        0.001,
    );
    assert!(json["rails"].as_array().is_some_and(|r| !r.is_empty()));
}

#[test]
fn no_budget_without_an_operating_point() {
    // Format reference §7: a short is decided on the graph, and no operating point is
    // solved; the budget then has nothing to add up and says so.
    let c = checked(
        "railcheck: 1\nparts:\n  pack: { use: battery/lipo-3s }\nnets:\n  OOPS: [pack.pos, pack.neg]\n",
    );
    let budget = railcheck::budget::budget(&c);
    assert!(!budget.solved);
    let table = railcheck::report::budget_table("plan.yaml", &budget);
    assert!(table.contains("No operating point"), "{table}");
    assert!(!table.contains("0 A"), "{table}");
}

#[test]
fn unsolved_modes_are_named_not_counted_as_zero() {
    // A 5 V buck-boost (it holds its output at any input) at 90 % drawing
    // 3 A in `worst` takes 16.7 W; from 12 V behind 3 Ω the most a source can
    // deliver is V²/(4R) = 12 W (maximum power transfer), so `worst` has no
    // operating point while `typical` (0.5 A, 2.8 W) does.
    let c = checked(
        "railcheck: 1\nparts:\n  supply: { class: battery, chemistry: lipo, voltage: 12 V, internal_resistance: 3 ohm, cutoff: true }\n  buck: { class: regulator, topology: buck-boost, output: 5 V, efficiency: 90 % }\n  load: { class: load, pins: { vin: { role: supply-in, draw: { typical: 0.5 A, peak: 3 A } }, gnd: { role: ground } } }\nnets:\n  VB: [supply.pos, buck.vin]\n  5V: [buck.vout, load.vin]\n  GND: [supply.neg, buck.gnd, load.gnd]\n",
    );
    let budget = railcheck::budget::budget(&c);
    assert!(budget.solved);
    assert!(
        budget.unsolved.iter().all(|u| u.contains("`worst`")),
        "{:?}",
        budget.unsolved
    );
    assert_eq!(budget.unsolved.len(), 3, "{:?}", budget.unsolved);
    let table = railcheck::report::budget_table("plan.yaml", &budget);
    assert!(table.contains("Not solved"), "{table}");
}
