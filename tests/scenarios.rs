//! Power scenarios: which scenarios a plan gets and what each leaves
//! powered, against the wiring read by hand.
//!
//! A rail has power when a present source reaches it through closed
//! contacts (a battery, a supply from outside, the output of a part that has
//! power, the VBUS of a cable whose host has power): Kirchhoff's current law
//! needs a closed path from a source, and an open switch breaks it.

use railcheck::model::Library;
use railcheck::scenario::{Origin, Powered};
use std::path::Path;

fn example(name: &str) -> String {
    std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("examples")
            .join(name),
    )
    .expect("the example is shipped")
}

fn checked(text: &str) -> railcheck::Checked {
    railcheck::check("plan.yaml", text, &Library::builtin()).expect("the plan reads")
}

/// The net of this name.
fn net(checked: &railcheck::Checked, name: &str) -> usize {
    let nets = &checked.plan.nets;
    nets.iter().position(|n| n.name == name).unwrap()
}

/// The part of this name.
fn part(checked: &railcheck::Checked, name: &str) -> usize {
    let parts = &checked.plan.parts;
    parts.iter().position(|p| p.name == name).unwrap()
}

/// The first scenario that comes from `origin` (a switch-open scenario
/// when `origin` is `None`).
fn scenario(checked: &railcheck::Checked, origin: Option<Origin>) -> Powered<'_> {
    checked
        .scenarios
        .iter()
        .find(|p| match origin {
            Some(origin) => p.scenario.origin == origin,
            None => matches!(p.scenario.origin, Origin::SwitchOpen(_)),
        })
        .expect("the scenario is derived or declared")
}

/// Two scenarios leave the same nets and parts powered.
fn assert_same_power(checked: &railcheck::Checked, a: Powered, b: Powered) {
    for (n, spec) in checked.plan.nets.iter().enumerate() {
        assert_eq!(a.net_on(n), b.net_on(n), "net {}", spec.name);
    }
    for (p, spec) in checked.plan.parts.iter().enumerate() {
        assert_eq!(a.part_on(p), b.part_on(p), "part {}", spec.name);
    }
}

#[test]
fn the_rover_gets_its_own_and_the_derived_scenarios() {
    let rover = checked(&example("orchard-rover.yaml"));
    let labels: Vec<&str> = rover
        .scenarios
        .iter()
        .map(|p| p.scenario.label.as_str())
        .collect();
    // The plan's `flashing`; its one switch, the stop; the laptop with the
    // pack in and with it out.
    assert_eq!(
        labels,
        [
            "in scenario `flashing`",
            "with `estop` open",
            "with `laptop` connected",
            "with `laptop` connected and `pack` removed",
        ]
    );
}

#[test]
fn the_stop_takes_the_motor_bus_and_nothing_else() {
    let rover = checked(&example("orchard-rover.yaml"));
    let stop = scenario(&rover, None);
    // VMOT hangs on the stop's load side only; VBAT keeps the pack through
    // the fuse and the plug, and the buck (on VBAT) keeps 5 V up.
    assert!(!stop.net_on(net(&rover, "VMOT")));
    assert!(stop.net_on(net(&rover, "VBAT")));
    assert!(stop.net_on(net(&rover, "5V")));
    assert!(stop.net_on(net(&rover, "3V3")));
    // The driver keeps its logic supply (`vlogic` on 5 V): it has power.
    assert!(stop.part_on(part(&rover, "drive")));
    assert!(stop.part_on(part(&rover, "sbc")));
    // What changed from normal running: only the motor bus.
    assert_eq!(stop.nets_turned_off(), vec![net(&rover, "VMOT")]);
}

#[test]
fn flashing_from_the_laptop_powers_the_controller_side_only() {
    let rover = checked(&example("orchard-rover.yaml"));
    let flashing = scenario(&rover, Some(Origin::Declared(0)));
    // Pack out: nothing on the battery side has a source.
    for off in ["BATT+", "VBAT", "VMOT", "5V"] {
        assert!(!flashing.net_on(net(&rover, off)), "{off} has no source");
    }
    for off in ["sbc", "buck", "drive", "ranger", "left_enc", "camera"] {
        assert!(!flashing.part_on(part(&rover, off)), "{off} is off");
    }
    // The laptop's VBUS powers the controller through its socket (the
    // computer's cable is unplugged there); its onboard 3.3 V regulator
    // feeds 3V3, the inertial sensor and the shifters' low sides.
    assert!(flashing.part_on(part(&rover, "mcu")));
    assert!(flashing.net_on(net(&rover, "3V3")));
    assert!(flashing.part_on(part(&rover, "imu")));
    assert!(flashing.part_on(part(&rover, "enc_shifter")));
}

/// A switch-open scenario is solved over what the switch can reach only;
/// the same switch opened in a declared scenario is solved over the whole
/// plan. Both must agree on every net and part.
#[test]
fn a_switch_opened_alone_agrees_with_the_whole_plan_solved() {
    let picker = example("greenhouse-picker.yaml");
    let mut text = picker.clone();
    text.push_str("\nscenarios:\n  stop_struck: { open: [estop] }\n");
    let plan = checked(&text);
    let whole = scenario(&plan, Some(Origin::Declared(0)));
    let alone = scenario(&plan, None);
    assert_same_power(&plan, whole, alone);
    // And the stop does take the wheels and both servo rails.
    for off in ["VSTOP", "VMOT", "7V4", "SERVO_5V"] {
        assert!(!alone.net_on(net(&plan, off)), "{off}");
    }
    assert!(alone.net_on(net(&plan, "5V")));
}

/// (3.3 V × 1.03 − 0.3 V) / 1 kΩ = 3.099 mA: the controller's 3.3 V ± 3 %
/// output at its highest into an input held at VDD + 0.3 V with VDD = 0 V
/// (JEDEC JESD8), through the series resistor (Ohm's law).
#[test]
fn the_clamp_current_through_a_series_resistor_is_ohms_law() {
    let text = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("tests/fixtures/scenario__phantom-power/fires-series-1k-warning.yaml"),
    )
    .unwrap();
    let plan = checked(&text);
    let finding = plan
        .findings
        .iter()
        .find(|f| f.rule == "scenario/phantom-power")
        .unwrap();
    let amps = finding.values["clamp_current"];
    assert!((amps - 3.099e-3).abs() < 1e-6, "{amps}");
    assert_eq!(finding.severity, railcheck::rules::Severity::Warning);
}

#[test]
fn a_usb_host_supply_gives_the_usb_window_unless_told() {
    let rover = checked(&example("orchard-rover.yaml"));
    let laptop = &rover.plan.supplies[0];
    assert_eq!(laptop.name, "laptop");
    // USB 2.0 §7.2.1: a host port gives 4.75 V to 5.25 V.
    use uom::si::electric_potential::volt;
    assert!((laptop.voltage.min.get::<volt>() - 4.75).abs() < 1e-12);
    assert!((laptop.voltage.max.get::<volt>() - 5.25).abs() < 1e-12);
}

#[test]
fn supplies_and_scenarios_refuse_names_they_cannot_mean() {
    let base = example("orchard-rover.yaml");
    let cases = [
        // A bench supply on a net that does not exist.
        (
            "laptop: { kind: usb-host, port: mcu.usb, current: 500 mA }",
            "laptop: { kind: bench, net: VBATT, voltage: 12 V }",
            "unknown net `VBATT`",
        ),
        // A USB host into a host port.
        (
            "laptop: { kind: usb-host, port: mcu.usb, current: 500 mA }",
            "laptop: { kind: usb-host, port: sbc.usb2 }",
            "is a host port",
        ),
        // A bench supply with no voltage.
        (
            "laptop: { kind: usb-host, port: mcu.usb, current: 500 mA }",
            "laptop: { kind: bench, net: VBAT }",
            "needs `voltage`",
        ),
        // Removing a part that is no battery.
        (
            "removed: [pack]",
            "removed: [buck]",
            "`buck` is a regulator, not a battery",
        ),
        // Opening a part that is no switch.
        (
            "removed: [pack] }",
            "removed: [pack], open: [main_fuse] }",
            "`main_fuse` is a fuse, not a switch",
        ),
        // Connecting a supply never declared.
        (
            "connected: [laptop]",
            "connected: [lapto]",
            "unknown supply `lapto`",
        ),
    ];
    for (from, to, expected) in cases {
        assert!(base.contains(from), "{from}");
        let text = base.replace(from, to);
        let failure = railcheck::check("plan.yaml", &text, &Library::builtin())
            .err()
            .unwrap_or_else(|| panic!("{to} is refused"));
        let errors: Vec<String> = failure.errors.iter().map(|e| e.message.clone()).collect();
        assert!(
            errors.iter().any(|m| m.contains(expected)),
            "{to}: {errors:?}"
        );
        // Each error points at the offending name, on the line it is written.
        let error = failure
            .errors
            .iter()
            .find(|e| e.message.contains(expected))
            .unwrap();
        let line = failure.sources.line_column(error.span).0;
        let written = text.lines().nth(line - 1).unwrap();
        assert!(written.contains(to), "line {line}: {written}");
    }
}

#[test]
fn the_listing_names_what_each_scenario_takes_away() {
    let rover = checked(&example("orchard-rover.yaml"));
    let text = railcheck::report::scenarios_table("orchard-rover.yaml", &rover);
    // The stop's block: VMOT is the one net it takes; no part goes off
    // (the driver keeps its logic supply on 5 V).
    let stop = text
        .split("\n\n")
        .find(|block| block.starts_with("with `estop` open"))
        .expect("the stop's block");
    assert!(stop.contains("nets without power: VMOT\n"), "{stop}");
    assert!(stop.contains("parts off: none"), "{stop}");
    // Pack out, laptop in: the battery side is dark, the controller is not.
    let alone = text
        .split("\n\n")
        .find(|block| block.starts_with("with `laptop` connected and `pack` removed"))
        .expect("the laptop's block");
    assert!(
        alone.contains("nets without power: BATT+, PACK_LEAD, VBAT, VMOT, 5V"),
        "{alone}"
    );
    assert!(!alone.contains("mcu"), "{alone}");
}

/// Two packs: one for the electronics, one behind the stop for the motors.
/// Opening the stop takes the motor supply only; the driver keeps its logic
/// supply from the other pack, which the stop's region does not reach, so it
/// still has power and the controller driving its inputs is not feeding a
/// dead part. The region solution must agree with the whole plan solved.
#[test]
fn a_part_fed_from_outside_the_switchs_region_keeps_its_power() {
    let text = "\
railcheck: 1
name: two-pack tug
parts:
  logic_pack: { use: battery/lipo-2s, with: { cutoff: true } }
  logic_fuse: { use: fuse/blade-5a }
  buck: { use: regulator/buck-5v-3a }
  brain: { use: board/mcu-3v3 }
  motor_pack: { use: battery/lipo-3s, with: { cutoff: true } }
  motor_fuse: { use: fuse/blade-15a }
  stop: { use: switch/estop-20a }
  drive: { use: driver/mosfet-dual-hbridge, with: { clamp: true } }
  left: { use: motor/gearmotor-medium }
nets:
  LOGIC+: [logic_pack.pos, logic_fuse.a]
  LOGIC_BAT: [logic_fuse.b, buck.vin]
  5V: [buck.vout, brain.vin, drive.vlogic]
  MOTOR+: [motor_pack.pos, motor_fuse.a]
  MOTOR_BAT: [motor_fuse.b, stop.a]
  VMOT: [stop.b, drive.vm]
  GND: [logic_pack.neg, motor_pack.neg, buck.gnd, brain.gnd, drive.gnd]
  LA: [drive.out1a, left.a]
  LB: [drive.out1b, left.b]
  IN1: [brain.gpio1, drive.in1]
scenarios:
  struck: { open: [stop] }
";
    let plan = checked(text);
    let alone = scenario(&plan, None);
    let whole = scenario(&plan, Some(Origin::Declared(0)));
    assert!(!alone.net_on(net(&plan, "VMOT")));
    assert!(alone.part_on(part(&plan, "drive")), "vlogic keeps it on");
    assert_same_power(&plan, alone, whole);
    assert!(
        !plan
            .findings
            .iter()
            .any(|f| f.rule.starts_with("scenario/")),
        "{:?}",
        plan.findings.iter().map(|f| &f.message).collect::<Vec<_>>()
    );
}
