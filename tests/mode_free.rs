//! A problem that does not depend on the mode is not blamed on one: a 5 V
//! push-pull output into a 3.3 V input on regulated rails fails the same in
//! every mode and at every battery state, so its finding names neither; a
//! comparison on a rail that sags with the load keeps its mode.

use railcheck::model::Library;

fn logic_findings(plan: &str) -> Vec<railcheck::rules::Finding> {
    railcheck::check("plan.yaml", plan, &Library::builtin())
        .expect("plan reads")
        .findings
        .into_iter()
        .filter(|f| f.rule == "logic/overvoltage")
        .collect()
}

/// An 8-bit 5 V board's TX into a 3.3 V board's RX, each on its own buck.
const REGULATED: &str = "railcheck: 1
modes:
  idle: { big: idle, small: idle }
parts:
  pack:  { use: battery/lipo-3s, with: { cutoff: true } }
  fuse:  { use: fuse/blade-5a }
  buck:  { use: regulator/buck-5v-3a }
  ldo:   { use: regulator/linear-3v3-800ma }
  big:   { use: board/mcu-8bit-5v }
  small: { class: board, pins: { vin: { role: supply-in, range: 3..3.6 V, draw: { idle: 5 mA, typical: 40 mA } }, gnd: { role: ground }, rx: { role: logic-in, ref: vin, family: lvcmos33 } } }
nets:
  BATT+: [pack.pos, fuse.a]
  VBAT:  [fuse.b, buck.vin]
  5V:    [buck.vout, big.vin, ldo.vin]
  3V3:   [ldo.vout, small.vin]
  GND:   [pack.neg, buck.gnd, ldo.gnd, big.gnd, small.gnd]
  LINK:  [big.tx, small.rx]
";

#[test]
fn a_regulated_overvoltage_names_no_mode_and_no_battery_state() {
    let found = logic_findings(REGULATED);
    assert_eq!(found.len(), 1, "{found:#?}");
    let f = &found[0];
    // cmos5 VOH = VDD − 0.1 V follows the 5 V ±2 % buck: at most 5.1 V, the
    // same in every mode and battery state; the 3.3 V input's ceiling is
    // VDD + 0.3 V (JESD8C) on a regulated rail too.
    assert_eq!(f.mode, None, "{f:#?}");
    assert_eq!(f.battery, None, "{f:#?}");
    assert!(
        f.message.contains("in every mode and battery state"),
        "{}",
        f.message
    );
    assert!(!f.message.contains("mode `"), "{}", f.message);
}

#[test]
fn an_input_tied_to_a_sagging_rail_keeps_its_mode() {
    // The same input wired straight to the battery rail: the pack's voltage
    // depends on the load (sag = I × R_internal), so mode and state matter.
    let plan = REGULATED
        .replace("  LINK:  [big.tx, small.rx]\n", "")
        .replace(
            "  VBAT:  [fuse.b, buck.vin]",
            "  VBAT:  [fuse.b, buck.vin, small.rx]",
        )
        .replace(
            "battery/lipo-3s, with: { cutoff: true }",
            "battery/lipo-3s, with: { cutoff: true, internal_resistance: 50 mohm }",
        );
    let found = logic_findings(&plan);
    assert_eq!(found.len(), 1, "{found:#?}");
    assert!(
        found[0].mode.is_some() && found[0].battery.is_some(),
        "{:#?}",
        found[0]
    );
}
