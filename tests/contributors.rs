//! A finding that sums currents names what it summed: an overloaded
//! regulator, USB port or battery lists the loads behind the current,
//! largest first with each one's share, and points at where they were added.
//! Shares are worked by hand (Kirchhoff's current law: the loads add up to
//! the total) beside each check.

use railcheck::model::Library;

fn findings(plan: &str, rule: &str) -> Vec<railcheck::rules::Finding> {
    let checked = railcheck::check("plan.yaml", plan, &Library::builtin()).expect("plan reads");
    checked
        .findings
        .into_iter()
        .filter(|f| f.rule == rule)
        .collect()
}

#[test]
fn an_overloaded_regulator_names_its_loads_and_their_shares() {
    let plan = "railcheck: 1
parts:
  pack:  { use: battery/lipo-3s, with: { cutoff: true } }
  fuse:  { use: fuse/blade-3a }
  buck:  { use: regulator/buck-5v-3a }
  brain: { class: load, pins: { vin: { role: supply-in, range: 4.75 V..5.25 V, draw: { typical: 1 A, peak: 1.8 A } }, gnd: { role: ground } } }
  cam:   { class: load, pins: { vin: { role: supply-in, range: 4.75 V..5.25 V, draw: { typical: 0.5 A, peak: 1.5 A } }, gnd: { role: ground } } }
nets:
  BATT+: [pack.pos, fuse.a]
  VBAT:  [fuse.b, buck.vin]
  5V:    [buck.vout, brain.vin, cam.vin]
  GND:   [pack.neg, buck.gnd, brain.gnd, cam.gnd]
";
    let found = findings(plan, "current/over-rating");
    assert_eq!(found.len(), 1, "{found:#?}");
    let message = &found[0].message;
    // 1.8 A + 1.5 A = 3.3 A at peak: 1.8 / 3.3 = 54.5 % → 55 %, 1.5 / 3.3 = 45.5 % → 45 %.
    assert!(message.contains("carries 3.3 A peak"), "{message}");
    assert!(
        message.contains("`brain.vin` 1.8 A (55 %), `cam.vin` 1.5 A (45 %)"),
        "{message}"
    );
    // The net the loads were added to is pointed at too.
    assert!(
        found[0]
            .labels
            .iter()
            .any(|(_, label)| label == "`5V` carries 3.3 A"),
        "{:#?}",
        found[0].labels
    );
}

#[test]
fn an_overloaded_usb_port_names_its_devices_and_offers_a_powered_hub() {
    let plan = "railcheck: 1
parts:
  pack:  { use: battery/lipo-3s, with: { cutoff: true } }
  fuse:  { use: fuse/blade-5a }
  buck:  { use: regulator/buck-5v-5a }
  host:
    class: board
    pins: { vin: { role: supply-in, range: 4.75 V..5.25 V, draw: 200 mA }, gnd: { role: ground } }
    ports:
      a: { kind: usb-host, current: 900 mA, shared: true }
      b: { kind: usb-host, current: 900 mA, shared: true }
  lidar:  { class: sensor, ports: { usb: { kind: usb-device, draw: { typical: 0.5 A, peak: 0.7 A } } } }
  camera: { class: sensor, ports: { usb: { kind: usb-device, draw: { typical: 0.3 A, peak: 0.5 A } } } }
nets:
  BATT+: [pack.pos, fuse.a]
  VBAT:  [fuse.b, buck.vin]
  5V:    [buck.vout, host.vin]
  GND:   [pack.neg, buck.gnd, host.gnd]
links:
  - { usb: [host.a, lidar.usb] }
  - { usb: [host.b, camera.usb] }
";
    let found = findings(plan, "current/over-rating");
    assert_eq!(found.len(), 1, "{found:#?}");
    let f = &found[0];
    // 0.7 A + 0.5 A = 1.2 A at peak against the shared 900 mA: 0.7 / 1.2 = 58 %,
    // 0.5 / 1.2 = 42 %.
    assert!(
        f.message
            .contains("`lidar` 700 mA (58 %), `camera` 500 mA (42 %)"),
        "{}",
        f.message
    );
    assert!(f.parts.iter().any(|p| p == "lidar") && f.parts.iter().any(|p| p == "camera"));
    assert_eq!(
        f.labels.len(),
        2,
        "each cable is pointed at: {:#?}",
        f.labels
    );
    let help = f.help.as_deref().unwrap_or("");
    assert!(
        help.contains("powered USB hub") && help.contains("board/usb-hub-powered"),
        "{help}"
    );
}

#[test]
fn a_battery_over_its_discharge_names_the_branches() {
    // A 2S 2200 mAh pack rated 25C can deliver 2.2 Ah x 25 = 55 A. Three
    // motors wired straight across it stall in `worst`: each stalls at 20 A at
    // its 7.4 V rating (R = 7.4 / 20 = 0.37 ohm), so at most 8.4 / 0.37 =
    // 22.7 A each at full charge (less the pack's sag), well over 55 A
    // together (Ohm's law).
    let plan = "railcheck: 1
parts:
  pack: { use: battery/lipo-2s, with: { cutoff: true } }
  fuse: { use: fuse/blade-30a, with: { speed: slow } }
  m1: { class: motor, rated_voltage: 7.4 V, rated_current: 2 A, stall_current: 20 A }
  m2: { class: motor, rated_voltage: 7.4 V, rated_current: 2 A, stall_current: 20 A }
  m3: { class: motor, rated_voltage: 7.4 V, rated_current: 2 A, stall_current: 20 A }
nets:
  BATT+: [pack.pos, fuse.a]
  MOT: [fuse.b, m1.a, m2.a, m3.a]
  GND: [pack.neg, m1.b, m2.b, m3.b]
";
    let found = findings(plan, "battery/discharge");
    assert_eq!(found.len(), 1, "{found:#?}");
    let message = &found[0].message;
    // Three equal stalls: each a third of the total.
    for motor in ["`m1`", "`m2`", "`m3`"] {
        assert!(message.contains(motor), "{message}");
    }
    assert_eq!(message.matches("(33 %)").count(), 3, "{message}");
}
