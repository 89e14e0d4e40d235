//! One root cause, one finding: a signal on which many driver–receiver pairs
//! fail for one reason is reported once, naming every pin involved, not once
//! per pair. The plans are the rule fixtures that show it; their hand
//! calculations and sources are in their header comments.

use railcheck::model::Library;
use std::path::Path;

fn count(fixture: &str, rule: &str) -> usize {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join(fixture);
    let text = std::fs::read_to_string(&path).expect("fixture reads");
    let checked = railcheck::check(fixture, &text, &Library::builtin())
        .unwrap_or_else(|_| panic!("{fixture} is a readable plan"));
    checked.findings.iter().filter(|f| f.rule == rule).count()
}

#[test]
fn one_wrong_rail_on_a_seven_device_line_is_one_overvoltage() {
    // JEDEC JESD8 ceiling VDD + 0.3 V = 3.6 V against a 5.1 V driver, six
    // receivers harmed by one driver: one finding, not six.
    let fixture = "tests/fixtures/logic__overvoltage/fires-seven-device-bus-one-wrong-ref.yaml";
    assert_eq!(count(fixture, "logic/overvoltage"), 1);
    assert_eq!(count(fixture, "logic/high-margin"), 0);
}

#[test]
fn one_wrong_rail_on_a_seven_device_bus_is_one_high_margin() {
    // JEDEC JESD7 HC VIH 0.7 × 5.1 V = 3.57 V above a 3.3 V pull-up: six
    // open-drain drivers fail one receiver, one finding, not six.
    let fixture = "tests/fixtures/logic__high-margin/fires-seven-device-bus-one-wrong-ref.yaml";
    assert_eq!(count(fixture, "logic/high-margin"), 1);
    assert_eq!(count(fixture, "logic/overvoltage"), 0);
}

#[test]
fn one_shared_return_under_three_receivers_is_one_offset() {
    // 3 A × 0.5 m of 26 AWG (ASTM B258) = 0.201 V, above half the 0.4 V TTL
    // margin for each of three receivers: one warning.
    let fixture = "tests/fixtures/ground__offset/fires-one-driver-three-receivers.yaml";
    assert_eq!(count(fixture, "ground/offset"), 1);
}

#[test]
fn an_unpowered_part_is_one_finding_for_all_its_inputs() {
    // Two inputs of one driver back-powered (VDD + 0.3 V with VDD = 0 V):
    // one finding for the part.
    let fixture = "tests/fixtures/logic__unpowered-input/fires-driver-logic-supply-open.yaml";
    assert_eq!(count(fixture, "logic/unpowered-input"), 1);
}

fn messages(fixture: &str, rule: &str) -> Vec<String> {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join(fixture);
    let text = std::fs::read_to_string(&path).expect("fixture reads");
    let checked = railcheck::check(fixture, &text, &Library::builtin())
        .unwrap_or_else(|_| panic!("{fixture} is a readable plan"));
    checked
        .findings
        .iter()
        .filter(|f| f.rule == rule)
        .map(|f| f.message.clone())
        .collect()
}

#[test]
fn two_inputs_over_their_maximum_on_one_rail_are_one_finding() {
    // Buck at the top of its tolerance: 5 V + 2 % = 5.1 V, above the IMU's
    // 4 V and the probe's 5.05 V absolute maxima. One rail, one finding,
    // quoting each pin's own limit.
    let fixture = "tests/fixtures/voltage__over-max/fires-regulator-tolerance-top.yaml";
    let found = messages(fixture, "voltage/over-max");
    assert_eq!(found.len(), 1, "{found:?}");
    assert!(found[0].contains("`imu.vcc` (4 V)"), "{}", found[0]);
    assert!(found[0].contains("`probe.vcc` (5.05 V)"), "{}", found[0]);
}

#[test]
fn two_inputs_above_their_range_on_one_rail_are_one_finding() {
    // 3S full: 3 × 4.20 V = 12.6 V (Handbook of Batteries), above the boost's
    // 11 V and the board's 12 V operating maxima: one finding for the rail.
    let fixture = "tests/fixtures/voltage__over-range/fires-board-and-boost-input.yaml";
    let found = messages(fixture, "voltage/over-range");
    assert_eq!(found.len(), 1, "{found:?}");
    assert!(found[0].contains("`boost.vin` (11 V)"), "{}", found[0]);
    assert!(found[0].contains("`brain.vin` (12 V)"), "{}", found[0]);
}

#[test]
fn a_part_with_no_supply_wired_is_one_finding_that_names_its_driven_input() {
    // Its only supply open: VDD = 0 V, so the driven input back-powers it
    // (JEDEC JESD8 ceiling VDD + 0.3 V). One finding, not three.
    let fixture = "tests/fixtures/ground__offset/passes-receiver-unpowered.yaml";
    assert_eq!(count(fixture, "power/unfed"), 1);
    assert_eq!(count(fixture, "logic/unpowered-input"), 0);
    assert_eq!(count(fixture, "ground/offset"), 0);
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join(fixture);
    let text = std::fs::read_to_string(&path).unwrap();
    let checked = railcheck::check(fixture, &text, &Library::builtin()).unwrap();
    let unfed = checked
        .findings
        .iter()
        .find(|f| f.rule == "power/unfed")
        .unwrap();
    let help = unfed.help.as_deref().unwrap_or_default();
    assert!(
        help.contains("`valve.in`") && help.contains("clamp"),
        "{help}"
    );
}
