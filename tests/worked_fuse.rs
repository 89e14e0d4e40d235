//! Worked examples for fuses and batteries (NEC 210.20(A) fuse sizing,
//! 33 CFR 183.425 Table 5, Handbook of Batteries pack windows), NEC 240.4 applied to return conductors, and the fuse's place on the
//! battery positive (33 CFR 183.455(b)), reproduced through the public API:
//! `railcheck::check` on small plans, read back from the findings' rule ids
//! and values, and `railcheck::wire::ampacity` for the table lookups.
//! Expected numbers are worked by hand from the published rules named beside
//! each check.

use railcheck::model::Library;
use railcheck::rules::Finding;
use railcheck::units::WireSize;
use railcheck::wire::{AmpacityTable, ampacity};
use uom::si::electric_current::ampere;
use uom::si::f64::ThermodynamicTemperature;
use uom::si::thermodynamic_temperature::degree_celsius;

/// Findings of one rule on a plan; the plan must read cleanly.
fn findings(plan: &str, rule: &str) -> Vec<Finding> {
    let checked = railcheck::check("worked.yaml", plan, &Library::builtin())
        .unwrap_or_else(|f| panic!("plan did not read: {:?}\n{plan}", f.errors));
    checked
        .findings
        .into_iter()
        .filter(|f| f.rule == rule)
        .collect()
}

fn value(finding: &Finding, key: &str) -> f64 {
    *finding
        .values
        .get(key)
        .unwrap_or_else(|| panic!("no `{key}` in {:?}", finding.values))
}

fn within_one_percent(actual: f64, expected: f64) -> bool {
    (actual - expected).abs() <= expected.abs() * 0.01
}

/// A lead-acid battery feeding one constant-current load through one fuse:
/// `fuse` is the fuse part written inline, `wire` the load lead's net keys.
fn fused_load(fuse: &str, continuous_amps: f64, wire: &str) -> String {
    format!(
        "railcheck: 1
parts:
  pack: {{ use: battery/lead-acid-12v, with: {{ max_discharge: 100 A }} }}
  fuse: {fuse}
  load:
    class: load
    pins:
      vin: {{ role: supply-in, draw: {{ typical: {continuous_amps} A }} }}
      gnd: {{ role: ground }}
nets:
  BATT+: [pack.pos, fuse.a]
  LEAD: {{ pins: [fuse.b, load.vin], {wire} }}
  GND: [pack.neg, load.gnd]
"
    )
}

fn blade(rating: &str) -> String {
    format!("{{ class: fuse, rating: {rating}, voltage: 32 V, speed: slow }}")
}

// ----- NEC 210.20(A) fuse-sizing worked example: fuse for a 6 A continuous load ------------------------------------

#[test]
fn w6_six_amp_load_needs_a_seven_and_a_half_amp_blade_that_22_awg_cannot_take() {
    // NEC 210.20(A) fuse-sizing worked example: I_min = 1.25 × 6 A = 7.5 A (NEC 210.20(A)) → standard blade 7.5 A;
    // on 22 AWG (Handbook chassis 7 A) 7.5 A > 7 A fails NEC 240.4.
    let plan = fused_load(&blade("7.5 A"), 6.0, "wire: 22 AWG, length: 0.5 m");
    let over = findings(&plan, "fuse/oversized");
    assert_eq!(over.len(), 1, "{over:?}");
    let f = &over[0];
    assert!(within_one_percent(value(f, "rating"), 7.5));
    assert!(within_one_percent(value(f, "ampacity"), 7.0));
    assert!(within_one_percent(value(f, "minimum_rating"), 7.5));
    // No standard blade both carries 7.5 A and stays within 7 A: the finding
    // says a heavier wire is needed instead of naming a rating.
    assert!(!f.values.contains_key("suggested_rating"), "{:?}", f.values);
    let help = f.help.as_deref().unwrap_or_default();
    assert!(help.contains("heavier wire"), "{help}");
    assert!(help.contains("7.5 A fuse"), "{help}");
    // The same 7.5 A is exactly 125 % of 6 A: not undersized.
    assert!(findings(&plan, "fuse/undersized").is_empty());
}

#[test]
fn w6_twenty_awg_carries_the_seven_and_a_half_amp_blade() {
    // NEC 210.20(A) fuse-sizing worked example: on 20 AWG (Handbook chassis 11 A) the 7.5 A blade passes.
    let plan = fused_load(&blade("7.5 A"), 6.0, "wire: 20 AWG, length: 0.5 m");
    assert!(findings(&plan, "fuse/oversized").is_empty());
    assert!(findings(&plan, "fuse/undersized").is_empty());
}

#[test]
fn w6_a_five_amp_blade_on_the_six_amp_load_is_undersized_and_seven_and_a_half_is_suggested() {
    // NEC 210.20(A) fuse-sizing worked example: 1.25 × 6 A = 7.5 A > 5 A; the smallest standard blade ≥ 7.5 A is
    // 7.5 A, and 20 AWG (11 A) allows it.
    let plan = fused_load(&blade("5 A"), 6.0, "wire: 20 AWG, length: 0.5 m");
    let under = findings(&plan, "fuse/undersized");
    assert_eq!(under.len(), 1, "{under:?}");
    assert!(within_one_percent(value(&under[0], "continuous"), 6.0));
    assert!(within_one_percent(value(&under[0], "minimum_rating"), 7.5));
    assert!(within_one_percent(
        value(&under[0], "suggested_rating"),
        7.5
    ));
    assert!(within_one_percent(value(&under[0], "ampacity"), 11.0));
}

#[test]
fn w6_twelve_amp_load_needs_a_fifteen_amp_fuse_and_a_fifteen_amp_conductor() {
    // NEC 210.20(A) fuse-sizing worked example: 12 A continuous → I_min = 15 A → 15 A blade, which needs a
    // conductor of at least 15 A: 16 AWG chassis 22 A.
    let plan = fused_load(&blade("10 A"), 12.0, "wire: 16 AWG, length: 0.5 m");
    let under = findings(&plan, "fuse/undersized");
    assert_eq!(under.len(), 1, "{under:?}");
    assert!(within_one_percent(value(&under[0], "minimum_rating"), 15.0));
    assert!(within_one_percent(
        value(&under[0], "suggested_rating"),
        15.0
    ));
    assert!(within_one_percent(value(&under[0], "ampacity"), 22.0));

    let fixed = fused_load(&blade("15 A"), 12.0, "wire: 16 AWG, length: 0.5 m");
    assert!(findings(&fixed, "fuse/undersized").is_empty());
    assert!(findings(&fixed, "fuse/oversized").is_empty());

    // NEC 210.20(A) fuse-sizing worked example: "or 33 CFR 18 AWG 80 °C 15 A": Table 5 gives 15 A, enough for the
    // 15 A fuse; the same gauge with 60 °C insulation (10 A) is not.
    let table5 = fused_load(
        &blade("15 A"),
        12.0,
        "wire: 18 AWG, insulation: 80 degC, length: 0.5 m",
    );
    assert!(findings(&table5, "fuse/oversized").is_empty());
    let cooler = fused_load(
        &blade("15 A"),
        12.0,
        "wire: 18 AWG, insulation: 60 degC, length: 0.5 m",
    );
    let over = findings(&cooler, "fuse/oversized");
    assert_eq!(over.len(), 1, "{over:?}");
    assert!(within_one_percent(value(&over[0], "ampacity"), 10.0));
}

// ----- NEC 240.4 on the return conductor -------------------------------------

/// The same lead-acid battery, fuse and load, with the feed in 14 AWG and the
/// load's return written as `return_wire` (net keys).
fn fused_load_with_return(fuse: &str, continuous_amps: f64, return_wire: &str) -> String {
    format!(
        "railcheck: 1
parts:
  pack: {{ use: battery/lead-acid-12v, with: {{ max_discharge: 100 A }} }}
  fuse: {fuse}
  load:
    class: load
    pins:
      vin: {{ role: supply-in, draw: {{ typical: {continuous_amps} A }} }}
      gnd: {{ role: ground }}
nets:
  BATT+: [pack.pos, fuse.a]
  LEAD: {{ pins: [fuse.b, load.vin], wire: 14 AWG, length: 1 m }}
  RETURN: {{ pins: [load.gnd, pack.neg], {return_wire} }}
"
    )
}

#[test]
fn a_fifteen_amp_fuse_is_oversized_for_a_26_awg_return() {
    // NEC 240.4 protects every conductor of the circuit, the return included.
    // Handbook chassis column: 26 AWG carries 2.2 A, and 15 A > 2.2 A; the
    // 14 AWG feed (32 A) alone would pass.
    let plan = fused_load_with_return(&blade("15 A"), 1.0, "wire: 26 AWG, length: 1 m");
    let over = findings(&plan, "fuse/oversized");
    assert_eq!(over.len(), 1, "{over:?}");
    let f = &over[0];
    assert!(within_one_percent(value(f, "rating"), 15.0));
    assert!(within_one_percent(value(f, "ampacity"), 2.2));
    assert!(
        f.message.contains("return conductor `RETURN`"),
        "{}",
        f.message
    );
    assert!(
        f.labels.iter().any(|(_, l)| l.contains("return conductor")),
        "{:?}",
        f.labels
    );
    assert_eq!(f.nets, ["RETURN"]);
    // 1 A continuous → 1.25 A minimum (NEC 210.20(A)) → 2 A blade, within
    // the 2.2 A of the return.
    assert!(within_one_percent(value(f, "suggested_rating"), 2.0));
}

#[test]
fn a_fifteen_amp_fuse_fits_a_14_awg_return() {
    // Handbook chassis column: 14 AWG carries 32 A ≥ 15 A, feed and return.
    let plan = fused_load_with_return(&blade("15 A"), 1.0, "wire: 14 AWG, length: 1 m");
    assert!(findings(&plan, "fuse/oversized").is_empty());
}

#[test]
fn a_return_fuse_suggestion_stays_within_the_return_ampacity() {
    // A 6 A load (NEC 210.20(A) fuse-sizing worked example: 1.25 × 6 A = 7.5 A blade) returning through 22 AWG
    // (Handbook chassis 7 A): 7.5 A > 7 A, so no blade fits both and the
    // undersized 5 A fuse's advice asks for a heavier wire, naming the return.
    let plan = fused_load_with_return(&blade("5 A"), 6.0, "wire: 22 AWG, length: 0.5 m");
    let under = findings(&plan, "fuse/undersized");
    assert_eq!(under.len(), 1, "{under:?}");
    assert!(within_one_percent(value(&under[0], "ampacity"), 7.0));
    assert!(!under[0].values.contains_key("suggested_rating"));
    let help = under[0].help.as_deref().unwrap_or_default();
    assert!(help.contains("heavier wire"), "{help}");
    assert!(help.contains("return conductor `RETURN`"), "{help}");
}

// ----- placement: a fuse is the first element on the battery positive ---------

/// A pack and a lamp, with the extra `parts` lines and the positive lead
/// from the terminal to the lamp written as `nets` lines.
fn lead_through(parts: &str, nets: &str) -> String {
    format!(
        "railcheck: 1
parts:
  pack: {{ use: battery/lead-acid-12v }}
  lamp: {{ use: load/lamp-12v }}
{parts}nets:
{nets}  GND: [pack.neg, lamp.gnd]
"
    )
}

#[test]
fn a_switch_ahead_of_the_fuse_is_reported_and_a_plug_is_not() {
    // 33 CFR 183.455(b): the overcurrent device sits at the source of power.
    // A switch between the terminal and the fuse leaves the switch and its
    // wiring unprotected; the pack's own connector is part of its lead.
    let switch_first = lead_through(
        "  master: { use: switch/toggle-20a }\n  fuse: { use: fuse/blade-3a }\n",
        "  BATT+: [pack.pos, master.a]\n  SWITCHED: [master.b, fuse.a]\n  LAMP: [fuse.b, lamp.vin]\n",
    );
    let missing = findings(&switch_first, "fuse/missing");
    assert_eq!(missing.len(), 1, "{missing:?}");
    let message = &missing[0].message;
    assert!(
        message.contains("the first element on `pack.pos` is switch `master`, not a fuse"),
        "{message}"
    );
    assert!(message.contains("unprotected"), "{message}");

    let plug_first = lead_through(
        "  plug: { use: connector/power-2pin-30a }\n  fuse: { use: fuse/blade-3a }\n",
        "  BATT+: [pack.pos, plug.a1]\n  PLUGGED: [plug.b1, fuse.a]\n  LAMP: [fuse.b, lamp.vin]\n",
    );
    assert!(findings(&plug_first, "fuse/missing").is_empty());

    let fuse_then_switch = lead_through(
        "  master: { use: switch/toggle-20a }\n  fuse: { use: fuse/blade-3a }\n",
        "  BATT+: [pack.pos, fuse.a]\n  FUSED: [fuse.b, master.a]\n  LAMP: [master.b, lamp.vin]\n",
    );
    assert!(findings(&fuse_then_switch, "fuse/missing").is_empty());
}

// ----- 33 CFR 183.425 Table 5 worked example: Table 5 lookup with insulation, no 150 % allowance -----------------

fn celsius(t: f64) -> Option<ThermodynamicTemperature> {
    Some(ThermodynamicTemperature::new::<degree_celsius>(t))
}

#[test]
fn w7_table5_ampacities_by_insulation() {
    // 33 CFR 183.425 Table 5 worked example: 16 AWG 105 °C = 25 A; 18 AWG 105 °C = 20 A;
    // 18 AWG 60 °C = 10 A.
    for (gauge, insulation, amps) in [(16, 105.0, 25.0), (18, 105.0, 20.0), (18, 60.0, 10.0)] {
        let (limit, table) = ampacity(WireSize::Awg(gauge), celsius(insulation)).unwrap();
        assert!(
            within_one_percent(limit.get::<ampere>(), amps),
            "{gauge} AWG"
        );
        assert!(
            matches!(table, AmpacityTable::CfrTable5 { .. }),
            "{table:?}"
        );
    }
}

#[test]
fn w7_the_150_percent_allowance_is_not_applied() {
    // 33 CFR 183.425 Table 5 worked example allows a boat 1.5 × 25 A = 37.5 A on 16 AWG 105 °C (33 CFR
    // 183.455(c)); railcheck holds the fuse to the 25 A ampacity (NEC 240.4).
    let wire = "wire: 16 AWG, insulation: 105 degC, length: 1 m";
    let thirty = fused_load(&blade("30 A"), 12.0, wire);
    let over = findings(&thirty, "fuse/oversized");
    assert_eq!(over.len(), 1, "{over:?}");
    assert!(within_one_percent(value(&over[0], "ampacity"), 25.0));
    let twenty_five = fused_load(&blade("25 A"), 12.0, wire);
    assert!(findings(&twenty_five, "fuse/oversized").is_empty());
}

// ----- Handbook of Batteries pack-window worked example: pack discharge and full voltage -----------------------------------

/// A lithium pack written in the plan feeding one load through a large fuse.
fn pack_and_load(pack: &str, peak_amps: f64) -> String {
    format!(
        "railcheck: 1
parts:
  pack: {pack}
  fuse: {{ class: fuse, rating: 100 A, voltage: 58 V, speed: slow }}
  load:
    class: load
    pins:
      vin: {{ role: supply-in, draw: {{ typical: 1 A, peak: {peak_amps} A }} }}
      gnd: {{ role: ground }}
nets:
  BATT+: [pack.pos, fuse.a]
  LOAD: [fuse.b, load.vin]
  GND: [pack.neg, load.gnd]
"
    )
}

#[test]
fn w13_twenty_five_c_on_2_2_ah_is_55_amperes() {
    // Handbook of Batteries pack-window worked example: I_max = 25 × 2.2 Ah = 55.0 A (C-rate definition, Linden & Reddy, Handbook of Batteries).
    let pack =
        "{ use: battery/lipo-3s, with: { capacity: 2200 mAh, max_discharge: 25C, cutoff: true } }";
    let above = findings(&pack_and_load(pack, 55.1), "battery/discharge");
    assert_eq!(above.len(), 1, "{above:?}");
    assert!(within_one_percent(value(&above[0], "max_discharge"), 55.0));
    assert!(within_one_percent(value(&above[0], "current"), 55.1));
    assert!(within_one_percent(value(&above[0], "capacity"), 2.2));
    assert_eq!(above[0].mode.as_deref(), Some("worst"));
    // At 55.0 A the limit is met, not broken (format reference §6: only beyond 0.1 %).
    assert!(findings(&pack_and_load(pack, 55.0), "battery/discharge").is_empty());
}

#[test]
fn w13_one_c_on_2_2_ah_is_2_2_amperes() {
    // Handbook of Batteries pack-window worked example: 1C = 2.20 A for a 2.2 Ah pack.
    let pack =
        "{ use: battery/lipo-3s, with: { capacity: 2200 mAh, max_discharge: 1C, cutoff: true } }";
    let above = findings(&pack_and_load(pack, 2.3), "battery/discharge");
    assert_eq!(above.len(), 1, "{above:?}");
    assert!(within_one_percent(value(&above[0], "max_discharge"), 2.2));
    assert!(findings(&pack_and_load(pack, 2.2), "battery/discharge").is_empty());
}

/// A pack and a fuse of the given voltage rating feeding a small load.
fn fuse_on_pack(pack: &str, fuse_voltage: &str) -> String {
    format!(
        "railcheck: 1
parts:
  pack: {{ use: {pack}, with: {{ cutoff: true }} }}
  fuse: {{ class: fuse, rating: 5 A, voltage: {fuse_voltage}, speed: slow }}
  load:
    class: load
    pins:
      vin: {{ role: supply-in, draw: {{ typical: 1 A }} }}
      gnd: {{ role: ground }}
nets:
  BATT+: [pack.pos, fuse.a]
  LOAD: [fuse.b, load.vin]
  GND: [pack.neg, load.gnd]
"
    )
}

#[test]
fn w13_a_full_3s_pack_is_12_6_volts_above_a_12_volt_fuse() {
    // Handbook of Batteries pack-window worked example: 3S LiPo full = 3 × 4.20 V = 12.6 V; 33 CFR 183.455(d) / NEC 240.60
    // and NEC 210.20(A) and 33 CFR 183.455 step 4: the fuse's voltage rating ≥ the
    // full-charge pack voltage.
    let low = findings(&fuse_on_pack("battery/lipo-3s", "12 V"), "fuse/voltage");
    assert_eq!(low.len(), 1, "{low:?}");
    assert!(within_one_percent(value(&low[0], "circuit_voltage"), 12.6));
    assert!(within_one_percent(value(&low[0], "voltage_rating"), 12.0));
    assert!(findings(&fuse_on_pack("battery/lipo-3s", "32 V"), "fuse/voltage").is_empty());
}

#[test]
fn blade_fuses_at_32_volts_carry_a_6s_pack() {
    // A 6S lithium pack is 6 × 4.20 V = 25.2 V full (Linden & Reddy, Handbook of Batteries);
    // blade fuses are rated 32 V (ISO 8820-3 scope). A 24 V fuse is below it.
    let low = findings(&fuse_on_pack("battery/lipo-6s", "24 V"), "fuse/voltage");
    assert_eq!(low.len(), 1, "{low:?}");
    assert!(within_one_percent(value(&low[0], "circuit_voltage"), 25.2));
    let library_blade = "railcheck: 1
parts:
  pack: { use: battery/lipo-6s, with: { cutoff: true } }
  fuse: { use: fuse/blade-10a }
  load:
    class: load
    pins:
      vin: { role: supply-in, draw: { typical: 1 A } }
      gnd: { role: ground }
nets:
  BATT+: [pack.pos, fuse.a]
  LOAD: [fuse.b, load.vin]
  GND: [pack.neg, load.gnd]
";
    assert!(findings(library_blade, "fuse/voltage").is_empty());
}
