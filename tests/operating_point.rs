//! Operating-point tests: every expected number is worked out by hand in the
//! comment beside it, from a published formula or a worked example of a
//! published source, and reached through the library's public API.

use railcheck::analysis::{BatteryState, Corner, ModeId, OperatingPoint, battery_voltage};
use railcheck::model::Library;
use uom::si::electric_current::ampere;
use uom::si::electric_potential::volt;

fn checked(text: &str) -> railcheck::Checked {
    match railcheck::check("test.yaml", text, &Library::builtin()) {
        Ok(c) => c,
        Err(e) => panic!("input errors: {:?}", e.errors),
    }
}

fn point(
    c: &railcheck::Checked,
    mode: ModeId,
    battery: BatteryState,
    corner: Corner,
) -> &OperatingPoint {
    c.analysis
        .as_ref()
        .expect("operating point solved")
        .points
        .iter()
        .find(|p| p.mode == mode && p.battery == battery && p.corner == corner)
        .expect("point exists")
}

fn part(c: &railcheck::Checked, name: &str) -> usize {
    c.plan
        .parts
        .iter()
        .position(|p| p.name == name)
        .expect("part exists")
}

fn pin(c: &railcheck::Checked, part_name: &str, pin_name: &str) -> (usize, usize) {
    let p = part(c, part_name);
    (p, c.plan.parts[p].pin(pin_name).expect("pin exists"))
}

fn volts_in(p: &OperatingPoint, (part, pin): (usize, usize)) -> f64 {
    p.pin_voltage
        .get(part, pin)
        .expect("pin has a voltage")
        .get::<volt>()
}

fn amps_in(p: &OperatingPoint, (part, pin): (usize, usize)) -> f64 {
    p.pin_current.get(part, pin).get::<ampere>()
}

fn close(actual: f64, expected: f64, relative: f64) {
    assert!(
        (actual - expected).abs() <= expected.abs() * relative,
        "{actual} is not within {:.2} % of {expected}",
        relative * 100.0
    );
}

/// A constant-current load `name` with the given draw, inline.
fn load(name: &str, draw: &str) -> String {
    format!(
        "  {name}: {{ class: load, pins: {{ vin: {{ role: supply-in, draw: {draw} }}, gnd: {{ role: ground }} }} }}\n"
    )
}

#[test]
fn pack_windows_follow_the_handbook_cell_windows() {
    // Handbook of Batteries pack-window worked example (handbook per-cell windows, format reference §3):
    // 3S LiPo 12.6 / 11.1 / 9.00 V; 4S LiFePO4 14.6 / 12.8 / 10.0 V;
    // 6-cell lead-acid nominal 12.0 V, cut-off 10.5 V (1.75 V per cell).
    let c = checked(
        "railcheck: 1\nparts:\n  a: { use: battery/lipo-3s }\n  b: { use: battery/lifepo4-4s }\n  c: { use: battery/lead-acid-12v }\nnets: {}\n",
    );
    let window = |name: &str| {
        BatteryState::ALL.map(|s| {
            battery_voltage(&c.plan, part(&c, name), s)
                .unwrap()
                .get::<volt>()
        })
    };
    let [full, nominal, empty] = window("a");
    close(full, 12.6, 1e-9);
    close(nominal, 11.1, 1e-9);
    close(empty, 9.0, 1e-9);
    let [full, nominal, empty] = window("b");
    close(full, 14.6, 1e-9);
    close(nominal, 12.8, 1e-9);
    close(empty, 10.0, 1e-9);
    let [_, nominal, empty] = window("c");
    close(nominal, 12.0, 1e-9);
    close(empty, 10.5, 1e-9);
}

#[test]
fn buck_input_current_by_energy_balance_w10() {
    // Buck energy-balance worked example: 5 V × 3 A out, η = 0.90, Vin = 11.1 V (3S nominal):
    // Iin = Vout·Iout / (η·Vin) = 15 / (0.9 × 11.1) = 1.5015 A ≈ 1.50 A.
    let text = format!(
        "railcheck: 1\nparts:\n  pack: {{ use: battery/lipo-3s, with: {{ internal_resistance: 0 ohm }} }}\n  buck: {{ class: regulator, topology: buck, output: 5 V, efficiency: 90 %, current: 5 A }}\n{}nets:\n  VBAT: [pack.pos, buck.vin]\n  5V: [buck.vout, cam.vin]\n  GND: [pack.neg, buck.gnd, cam.gnd]\n",
        load("cam", "3 A")
    );
    let c = checked(&text);
    let p = point(&c, ModeId::TYPICAL, BatteryState::Nominal, Corner::Low);
    close(amps_in(p, pin(&c, "buck", "vin")), 1.5015, 0.001);
    close(amps_in(p, pin(&c, "pack", "pos")), 1.5015, 0.001);
    // Loss = Pout (1/η − 1) = 15 × 0.111 = 1.67 W (Buck energy-balance worked example): input power less output power.
    let input_power = 11.1 * amps_in(p, pin(&c, "buck", "vin"));
    close(input_power - 15.0, 1.6667, 0.002);
}

#[test]
fn linear_regulator_input_is_output_plus_quiescent() {
    // Energy conservation for a series pass element: Iin = Iout + Iq
    // (Kirchhoff's current law): 0.5 A + 5 mA = 0.505 A.
    let text = format!(
        "railcheck: 1\nparts:\n  pack: {{ use: battery/lipo-3s }}\n  reg: {{ class: regulator, topology: linear, output: 5 V, dropout: 2 V, quiescent: 5 mA }}\n{}nets:\n  VBAT: [pack.pos, reg.vin]\n  5V: [reg.vout, lamp.vin]\n  GND: [pack.neg, reg.gnd, lamp.gnd]\n",
        load("lamp", "0.5 A")
    );
    let c = checked(&text);
    let p = point(&c, ModeId::TYPICAL, BatteryState::Full, Corner::High);
    close(amps_in(p, pin(&c, "reg", "vin")), 0.505, 1e-9);
}

#[test]
fn battery_sags_by_current_times_internal_resistance() {
    // Ohm's law: 3S nominal 11.1 V − 2 A × 0.1 Ω = 10.9 V at the terminal.
    let text = format!(
        "railcheck: 1\nparts:\n  pack: {{ use: battery/lipo-3s, with: {{ internal_resistance: 0.1 ohm }} }}\n{}nets:\n  VBAT: [pack.pos, lamp.vin]\n  GND: [pack.neg, lamp.gnd]\n",
        load("lamp", "2 A")
    );
    let c = checked(&text);
    let p = point(&c, ModeId::TYPICAL, BatteryState::Nominal, Corner::Low);
    close(volts_in(p, pin(&c, "lamp", "vin")), 10.9, 1e-9);
}

#[test]
fn supply_and_return_wire_drop_w2() {
    // Voltage-drop worked example (Ohm's law): 1 m of 22 AWG out and 1 m back, 2.0 A:
    // R = 2 × 0.0530 Ω = 0.106 Ω, ΔV = 0.212 V; on a 5 V rail the load sees
    // 4.788 V (4.24 % drop).
    let text = format!(
        "railcheck: 1\nparts:\n  supply: {{ class: battery, chemistry: lipo, voltage: 5 V }}\n{}nets:\n  V5: {{ pins: [supply.pos, dev.vin], wire: 22 AWG, length: 1 m }}\n  GND: {{ pins: [supply.neg, dev.gnd], wire: 22 AWG, length: 1 m }}\n",
        load("dev", "2 A")
    );
    let c = checked(&text);
    let p = point(&c, ModeId::TYPICAL, BatteryState::Nominal, Corner::Low);
    close(volts_in(p, pin(&c, "dev", "vin")), 5.0 - 0.212, 0.0005);
}

#[test]
fn motor_stall_through_bridges_w11() {
    // Motor-equation worked example: 12 V, R_winding = 1.5 Ω (12 V / 8 A stall).
    // Bipolar bridge dropping 2.0 V: (12 − 2) / 1.5 = 6.67 A.
    // MOSFET bridge with 2 × 20 mΩ: 12 / 1.54 = 7.79 A.
    for (bridge, expected) in [("drop: 2 V", 6.6667), ("rds_on: 20 mohm", 7.7922)] {
        let text = format!(
            "railcheck: 1\nparts:\n  supply: {{ class: battery, chemistry: lead-acid, voltage: 12 V }}\n  drv:\n    class: driver\n    {bridge}\n    channels: {{ 1: [o1, o2] }}\n    pins: {{ vm: {{ role: supply-in }}, gnd: {{ role: ground }}, o1: {{ role: bridge-out }}, o2: {{ role: bridge-out }} }}\n  m: {{ class: motor, rated_voltage: 12 V, rated_current: 1 A, stall_current: 8 A }}\nnets:\n  VM: [supply.pos, drv.vm]\n  GND: [supply.neg, drv.gnd]\n  A: [drv.o1, m.a]\n  B: [drv.o2, m.b]\n"
        );
        let c = checked(&text);
        let p = point(&c, ModeId::WORST, BatteryState::Nominal, Corner::Low);
        let motor = p.motors[part(&c, "m")].expect("motor solved");
        close(motor.current.get::<ampere>(), expected, 0.001);
        // The driver's supply carries the motor current (format reference §3).
        close(amps_in(p, pin(&c, "drv", "vm")), expected, 0.001);
        // Running: the rated current, whatever the bridge.
        let typical = point(&c, ModeId::TYPICAL, BatteryState::Nominal, Corner::Low);
        close(
            typical.motors[part(&c, "m")]
                .unwrap()
                .current
                .get::<ampere>(),
            1.0,
            1e-9,
        );
    }
}

#[test]
fn linear_regulator_below_dropout_follows_its_input() {
    // Format reference §3: below output + dropout the output is Vin − dropout.
    // 2S LiPo empty = 2 × 3.00 V = 6.0 V; 6.0 − 2 V dropout = 4.0 V.
    let text = format!(
        "railcheck: 1\nparts:\n  pack: {{ use: battery/lipo-2s, with: {{ internal_resistance: 0 ohm }} }}\n  reg: {{ class: regulator, topology: linear, output: 5 V, dropout: 2 V }}\n{}nets:\n  VBAT: [pack.pos, reg.vin]\n  5V: [reg.vout, mcu.vin]\n  GND: [pack.neg, reg.gnd, mcu.gnd]\n",
        load("mcu", "50 mA")
    );
    let c = checked(&text);
    let p = point(&c, ModeId::TYPICAL, BatteryState::Empty, Corner::Low);
    let reg = p.regulators[part(&c, "reg")].unwrap();
    assert!(reg.out_of_regulation);
    close(reg.output_voltage.get::<volt>(), 4.0, 1e-9);
    close(volts_in(p, pin(&c, "mcu", "vin")), 4.0, 1e-9);
    assert!(c.findings.iter().any(|f| f.rule == "regulator/dropout"));
    // At full charge (8.4 V) the regulator holds 5 V.
    let full = point(&c, ModeId::TYPICAL, BatteryState::Full, Corner::Low);
    close(volts_in(full, pin(&c, "mcu", "vin")), 5.0, 1e-9);
}

fn constant_power_plan(internal_resistance: &str, topology: &str) -> String {
    format!(
        "railcheck: 1\nparts:\n  supply: {{ class: battery, chemistry: lipo, voltage: 12 V, internal_resistance: {internal_resistance} }}\n  buck: {{ class: regulator, topology: {topology}, output: 5 V, efficiency: 90 % }}\n{}nets:\n  VIN: [supply.pos, buck.vin]\n  5V: [buck.vout, load.vin]\n  GND: [supply.neg, buck.gnd, load.gnd]\n",
        load("load", "3 A")
    )
}

#[test]
fn constant_power_load_settles_on_the_upper_root() {
    // A switching regulator draws P = Vout·Iout/η = 15 / 0.9 = 16.67 W. From a
    // 12 V source behind R = 0.5 Ω: V = 12 − R·P/V, so V² − 12·V + R·P = 0 and
    // the stable operating point is the upper root
    // V = (12 + √(144 − 4 × 0.5 × 16.67)) / 2 = 11.260 V (quadratic formula).
    let c = checked(&constant_power_plan("0.5 ohm", "buck"));
    let p = point(&c, ModeId::TYPICAL, BatteryState::Nominal, Corner::Low);
    assert!(p.unsettled.is_none());
    let power = 15.0 / 0.9;
    let expected = (12.0 + (144.0f64 - 4.0 * 0.5 * power).sqrt()) / 2.0;
    close(volts_in(p, pin(&c, "buck", "vin")), expected, 1e-6);
    assert!(
        !c.findings
            .iter()
            .any(|f| f.rule == "analysis/no-convergence")
    );
}

#[test]
fn constant_power_beyond_the_source_does_not_settle() {
    // A buck-boost holds its output at any input, so it draws constant power
    // P = 15 / 0.9 = 16.67 W. A real solution needs R·P ≤ V²/4 (discriminant
    // of V² − V·Vb + R·P): with R = 3 Ω, R·P = 50 W·Ω > 144/4 = 36: no
    // operating point.
    let c = checked(&constant_power_plan("3 ohm", "buck-boost"));
    let p = point(&c, ModeId::TYPICAL, BatteryState::Nominal, Corner::Low);
    assert!(p.unsettled.is_some());
    let finding = c
        .findings
        .iter()
        .find(|f| f.rule == "analysis/no-convergence")
        .expect("no-convergence reported");
    assert_eq!(finding.parts, vec!["buck".to_string()]);
}

#[test]
fn a_buck_beyond_its_source_settles_in_dropout() {
    // The same load on a buck (dropout 0): below 5 V in it passes its input
    // through, Vout = Vin, so Iin = Vout·Iout/(η·Vin) = Iout/η = 3.333 A, a
    // constant current: Vin = 12 − 3 Ω × 3.333 A = 2.0 V (Ohm's law), and the
    // rail browns out instead of collapsing.
    let c = checked(&constant_power_plan("3 ohm", "buck"));
    let p = point(&c, ModeId::TYPICAL, BatteryState::Nominal, Corner::Low);
    assert!(p.unsettled.is_none());
    close(volts_in(p, pin(&c, "buck", "vin")), 2.0, 1e-6);
    close(volts_in(p, pin(&c, "load", "vin")), 2.0, 1e-6);
    assert!(c.findings.iter().any(|f| f.rule == "regulator/dropout"));
}

#[test]
fn onboard_output_load_is_added_to_the_board_input() {
    // Format reference §3: what is drawn from a board's supply-out is added to the
    // board's own supply-in draw: 50 mA own + 120 mA sensor = 170 mA
    // (Kirchhoff's current law through the board).
    let text = format!(
        "railcheck: 1\nparts:\n  pack: {{ use: battery/lipo-3s }}\n  mcu:\n    class: board\n    pins:\n      vin: {{ role: supply-in, draw: 50 mA }}\n      out: {{ role: supply-out, voltage: 5 V, current: 500 mA }}\n      gnd: {{ role: ground }}\n{}nets:\n  VBAT: [pack.pos, mcu.vin]\n  5V: [mcu.out, sensor.vin]\n  GND: [pack.neg, mcu.gnd, sensor.gnd]\n",
        load("sensor", "120 mA")
    );
    let c = checked(&text);
    let p = point(&c, ModeId::TYPICAL, BatteryState::Nominal, Corner::Low);
    close(amps_in(p, pin(&c, "mcu", "vin")), 0.170, 1e-9);
    close(amps_in(p, pin(&c, "mcu", "out")), 0.120, 1e-9);
}

#[test]
fn usb_device_draw_is_paid_by_the_host_supply() {
    // Format reference §3/§5: what a host port delivers is added to its part's supply
    // draw: 1.2 A own + 100 mA device typical = 1.3 A.
    let text = "railcheck: 1\nparts:\n  pack: { use: battery/lipo-3s }\n  buck: { class: regulator, topology: buck, output: 5 V, efficiency: 100 % }\n  host:\n    class: board\n    pins: { vin: { role: supply-in, draw: 1.2 A }, gnd: { role: ground } }\n    ports: { usb1: { kind: usb-host, current: 500 mA } }\n  dev:\n    class: board\n    pins: { gnd: { role: ground } }\n    ports: { usb: { kind: usb-device, draw: { typical: 100 mA, peak: 400 mA } } }\nnets:\n  VBAT: [pack.pos, buck.vin]\n  5V: [buck.vout, host.vin]\n  GND: [pack.neg, buck.gnd, host.gnd]\nlinks:\n  - { usb: [host.usb1, dev.usb] }\n";
    let c = checked(text);
    let p = point(&c, ModeId::TYPICAL, BatteryState::Nominal, Corner::Low);
    close(amps_in(p, pin(&c, "host", "vin")), 1.3, 1e-9);
    // Worst: 1.2 A (no peak given: peak takes typical) + 400 mA = 1.6 A.
    let w = point(&c, ModeId::WORST, BatteryState::Nominal, Corner::Low);
    close(amps_in(w, pin(&c, "host", "vin")), 1.6, 1e-9);
    // The device is grounded through its cable (format reference §5).
    assert!(
        !c.findings.iter().any(|f| f.rule == "ground/floating"),
        "{:?}",
        c.findings
    );
}

#[test]
fn through_parts_carry_the_current_of_everything_below_them() {
    // Kirchhoff's current law: a fuse feeding two loads of 1 A and 2 A
    // carries 3 A; the net between the battery and the fuse carries 3 A too.
    let text = format!(
        "railcheck: 1\nparts:\n  pack: {{ use: battery/lipo-3s }}\n  f: {{ use: fuse/blade-10a }}\n{}{}nets:\n  BATT: [pack.pos, f.a]\n  LOAD: [f.b, a.vin, b.vin]\n  GND: [pack.neg, a.gnd, b.gnd]\n",
        load("a", "1 A"),
        load("b", "2 A")
    );
    let c = checked(&text);
    let p = point(&c, ModeId::TYPICAL, BatteryState::Nominal, Corner::Low);
    let net = |name: &str| c.plan.nets.iter().position(|n| n.name == name).unwrap();
    close(p.net_current[net("BATT")].get::<ampere>(), 3.0, 1e-9);
    close(p.net_current[net("LOAD")].get::<ampere>(), 3.0, 1e-9);
    close(p.net_current[net("GND")].get::<ampere>(), 3.0, 1e-9);
}

#[test]
fn usb_cable_feeding_a_rail_carries_it_and_drops_over_both_conductors() {
    // Format reference §5: a device port that `feeds` a pin joins VBUS to that pin's
    // net; the cable's wire spec applies to VBUS and ground. 28 AWG is
    // 213 mΩ/m (ASTM B258 gauge table): 1 m of cable carrying
    // 0.1 A (hub) + 0.4 A (fan) = 0.5 A drops 2 × 0.5 × 0.213 = 0.213 V, so
    // the hub sees 5.000 − 0.213 = 4.787 V; the host's 5 V input carries its
    // own 1 A plus the cable's 0.5 A.
    let text = "railcheck: 1\nparts:\n  supply: { class: battery, chemistry: lipo, voltage: 5 V }\n  host:\n    class: board\n    pins: { vin: { role: supply-in, draw: 1 A }, gnd: { role: ground } }\n    ports: { usb1: { kind: usb-host, current: 900 mA } }\n  hub:\n    class: board\n    pins: { vin: { role: supply-in, draw: 100 mA }, gnd: { role: ground } }\n    ports: { up: { kind: usb-device, feeds: vin } }\n  fan: { class: load, pins: { vin: { role: supply-in, draw: 400 mA }, gnd: { role: ground } } }\nnets:\n  V5: [supply.pos, host.vin]\n  GND: [supply.neg, host.gnd]\n  HUB5V: [hub.vin, fan.vin]\n  HUBGND: [hub.gnd, fan.gnd]\nlinks:\n  - { usb: [host.usb1, hub.up], wire: 28 AWG, length: 1 m }\n";
    let c = checked(text);
    let p = point(&c, ModeId::TYPICAL, BatteryState::Nominal, Corner::Low);
    close(p.link_current[0].get::<ampere>(), 0.5, 1e-9);
    close(amps_in(p, pin(&c, "host", "vin")), 1.5, 1e-9);
    close(volts_in(p, pin(&c, "hub", "vin")), 5.0 - 0.213, 0.001);
    assert!(
        !c.findings
            .iter()
            .any(|f| f.rule == "power/unfed" || f.rule == "ground/floating"),
        "{:?}",
        c.findings
    );
}
