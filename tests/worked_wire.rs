//! Worked examples from published sources (ASTM B258, IEC 60228, NEC, 33 CFR) for the
//! wire, heat and ground-offset rules, reproduced within 1 % through the
//! library's public API: whole plans through `railcheck::check`, read back
//! from the findings' computed values, and the ampacity tables through
//! `railcheck::wire`. Each expected number is worked out by hand in the
//! comment beside it, with its source.
//!
//! Where a worked example passes its limit (no finding to read a number
//! from), the plan is run twice: once as published (no finding), once with
//! the limit moved just below the published value so the finding reports
//! the number.

use railcheck::model::Library;
use railcheck::rules::{Finding, Severity};
use railcheck::units::WireSize;
use railcheck::wire::{AmpacityTable, ampacity, awg_area, awg_diameter, resistance_per_meter};
use uom::si::area::square_millimeter;
use uom::si::electric_current::ampere;
use uom::si::electrical_resistance::ohm;
use uom::si::f64::{Area, ThermodynamicTemperature};
use uom::si::length::millimeter;
use uom::si::thermodynamic_temperature::degree_celsius;

fn findings(text: &str) -> Vec<Finding> {
    match railcheck::check("worked.yaml", text, &Library::builtin()) {
        Ok(checked) => checked.findings,
        Err(failure) => panic!("the plan could not be read: {:?}", failure.errors),
    }
}

/// The findings of one rule.
fn of_rule(text: &str, rule: &str) -> Vec<Finding> {
    findings(text)
        .into_iter()
        .filter(|f| f.rule == rule)
        .collect()
}

/// The one finding of a rule; fails when there is none or more than one.
fn only(text: &str, rule: &str) -> Finding {
    let mut found = of_rule(text, rule);
    assert_eq!(found.len(), 1, "expected one `{rule}` finding: {found:#?}");
    found.remove(0)
}

fn value(finding: &Finding, key: &str) -> f64 {
    *finding
        .values
        .get(key)
        .unwrap_or_else(|| panic!("no value `{key}` in {finding:#?}"))
}

/// Within 1 % of the published figure.
fn near(actual: f64, published: f64) {
    assert!(
        (actual - published).abs() <= published.abs() * 0.01,
        "{actual} is not within 1 % of {published}"
    );
}

// ----- wires -------------------------------------------------------------------------------

/// A load on a fixed-voltage source, `length` one way out on `wire` and the
/// same back.
fn loop_plan(source: &str, wire: &str, length: &str, draw: &str, limit: &str) -> String {
    format!(
        "railcheck: 1
limits: {{ wire_drop: {limit} }}
parts:
  pack: {{ class: battery, chemistry: lead-acid, voltage: {source} }}
  load:
    class: load
    pins:
      vin: {{ role: supply-in, draw: {draw} }}
      gnd: {{ role: ground }}
nets:
  FEED: {{ pins: [pack.pos, load.vin], wire: {wire}, length: {length} }}
  GND: {{ pins: [pack.neg, load.gnd], wire: {wire}, length: {length} }}
"
    )
}

#[test]
fn w1_18_awg_resistance() {
    // ASTM B258 worked example (ASTM B258 diameter formula, IACS annealed-copper resistivity):
    // d = 0.127 × 92^(18/39) = 1.02 mm, A = 0.823 mm², R = 20.9 mΩ/m.
    near(awg_diameter(18).get::<millimeter>(), 1.02);
    near(awg_area(18).get::<square_millimeter>(), 0.823);
    near(
        resistance_per_meter(WireSize::Awg(18)).get::<ohm>() * 1000.0,
        20.9,
    );
    // The same resistance as the drop rule sees it: 1 A over 1 m out and
    // 1 m back of 18 AWG loses 2 × 20.9 mΩ × 1 A = 41.9 mV; against a 1 V
    // source with a 1 % limit that is 4.19 % and fires.
    let drop = only(
        &loop_plan("1 V", "18 AWG", "1 m", "1 A", "1 %"),
        "wire/drop",
    );
    near(value(&drop, "drop"), 0.0419);
}

#[test]
fn w2_drop_on_22_awg_fails_3_percent_on_5_volts() {
    // Voltage-drop worked example (Ohm's law): 22 AWG (53.0 mΩ/m), 1 m out and 1 m back, 2.0 A: R = 0.106 Ω,
    // ΔV = 0.212 V; on 5 V that is 4.24 %, above the 3 % critical limit
    // (ABYC E-11; NEC 210.19(A) Informational Note No. 4).
    let drop = only(
        &loop_plan("5 V", "22 AWG", "1 m", "2 A", "3 %"),
        "wire/drop",
    );
    assert_eq!(drop.severity, Severity::Warning);
    near(value(&drop, "drop"), 0.212);
    near(value(&drop, "supply_drop"), 0.106);
    near(value(&drop, "return_drop"), 0.106);
    near(
        value(&drop, "drop") / value(&drop, "source_voltage"),
        0.0424,
    );
    assert!(drop.message.contains("4.24 %"), "{}", drop.message);
}

#[test]
fn w2_drop_on_22_awg_passes_3_percent_on_12_volts() {
    // Voltage-drop worked example (Ohm's law): the same 0.212 V on a 12 V rail is 1.77 % → passes 3 %.
    assert!(
        of_rule(
            &loop_plan("12 V", "22 AWG", "1 m", "2 A", "3 %"),
            "wire/drop"
        )
        .is_empty()
    );
    // With the limit at 1.7 % the finding shows the 1.77 %.
    let drop = only(
        &loop_plan("12 V", "22 AWG", "1 m", "2 A", "1.7 %"),
        "wire/drop",
    );
    near(
        value(&drop, "drop") / value(&drop, "source_voltage"),
        0.0177,
    );
}

#[test]
fn w4_metric_flexible_wire() {
    // IEC 60228 class 5 worked example: 0.5 mm² class 5 (IEC 60228 maximum 39.0 mΩ/m), 2 m loop, 3 A:
    // R = 0.078 Ω, ΔV = 0.234 V — 4.68 % of 5 V: inside the default 5 %,
    // over a 3 % limit.
    assert!(
        of_rule(
            &loop_plan("5 V", "0.5 mm2", "1 m", "3 A", "5 %"),
            "wire/drop"
        )
        .is_empty()
    );
    let drop = only(
        &loop_plan("5 V", "0.5 mm2", "1 m", "3 A", "3 %"),
        "wire/drop",
    );
    near(value(&drop, "drop"), 0.234);
}

#[test]
fn w5_longest_run_on_18_awg() {
    // Longest-run worked example (Ohm's law): 12 V, 3 % limit (0.36 V), 5 A, 18 AWG (20.95 mΩ/m): loop
    // 0.36 / (5 × 0.02095) = 3.44 m → 1.72 m one way. Just under passes,
    // just over fires.
    for length in ["1.7 m", "1.71 m"] {
        assert!(
            of_rule(
                &loop_plan("12 V", "18 AWG", length, "5 A", "3 %"),
                "wire/drop"
            )
            .is_empty(),
            "{length} one way is within 1.72 m"
        );
    }
    for length in ["1.73 m", "1.75 m"] {
        let drop = only(
            &loop_plan("12 V", "18 AWG", length, "5 A", "3 %"),
            "wire/drop",
        );
        near(value(&drop, "limit"), 0.36);
    }
}

#[test]
fn w6_22_awg_chassis_rating_is_7_amperes() {
    // NEC 210.20(A) fuse-sizing worked example, Handbook of Electronic Tables and Formulas chassis wiring column: 22 AWG = 7 A;
    // a 7.5 A continuous load (the 7.5 A fuse's load) is over it, 20 AWG
    // (11 A) is not.
    let (rating, table) = ampacity(WireSize::Awg(22), None).expect("22 AWG is tabled");
    assert_eq!(rating.get::<ampere>(), 7.0);
    assert_eq!(table, AmpacityTable::HandbookChassis);
    let plan = |wire: &str| {
        format!(
            "railcheck: 1
parts:
  pack: {{ class: battery, chemistry: lead-acid, voltage: 12 V }}
  heater: {{ class: load, pins: {{ vin: {{ role: supply-in, draw: 7.5 A }}, gnd: {{ role: ground }} }} }}
nets:
  HEAT: {{ pins: [pack.pos, heater.vin], wire: {wire}, length: 0.3 m }}
  GND: [pack.neg, heater.gnd]
"
        )
    };
    let over = only(&plan("22 AWG"), "wire/ampacity");
    near(value(&over, "ampacity"), 7.0);
    near(value(&over, "current"), 7.5);
    assert!(over.message.contains("chassis wiring"), "{}", over.message);
    assert!(of_rule(&plan("20 AWG"), "wire/ampacity").is_empty());
}

#[test]
fn w7_16_awg_105c_table_5_is_25_amperes() {
    // 33 CFR 183.425 Table 5 worked example: 16 AWG at 105 °C
    // = 25 A; 18 AWG at 105 °C = 20 A; 18 AWG at 60 °C = 10 A.
    let at = |gauge: i32, celsius: f64| {
        ampacity(
            WireSize::Awg(gauge),
            Some(ThermodynamicTemperature::new::<degree_celsius>(celsius)),
        )
        .map(|(i, _)| i.get::<ampere>())
    };
    assert_eq!(at(16, 105.0), Some(25.0));
    assert_eq!(at(18, 105.0), Some(20.0));
    assert_eq!(at(18, 60.0), Some(10.0));
    let plan = |draw: &str| {
        format!(
            "railcheck: 1
parts:
  pack: {{ class: battery, chemistry: lead-acid, voltage: 12 V }}
  winch: {{ class: load, pins: {{ vin: {{ role: supply-in, draw: {draw} }}, gnd: {{ role: ground }} }} }}
nets:
  WINCH: {{ pins: [pack.pos, winch.vin], wire: 16 AWG, length: 0.2 m, insulation: 105 degC }}
  GND: [pack.neg, winch.gnd]
"
        )
    };
    let over = only(&plan("26 A"), "wire/ampacity");
    near(value(&over, "ampacity"), 25.0);
    assert!(
        over.message.contains("33 CFR 183.425 Table 5"),
        "{}",
        over.message
    );
    // 25 A is at the rating, not above it.
    assert!(of_rule(&plan("25 A"), "wire/ampacity").is_empty());
}

#[test]
fn metric_size_rates_as_next_smaller_awg() {
    // Format reference §4: 0.75 mm² lies between 19 AWG (0.653 mm²) and 18 AWG
    // (0.823 mm²) (ASTM B258 areas), so it takes the
    // 19 AWG chassis rating of 14 A (Handbook, §2.1).
    let size = WireSize::Metric(Area::new::<square_millimeter>(0.75));
    assert_eq!(
        ampacity(size, None).map(|(i, _)| i.get::<ampere>()),
        Some(14.0)
    );
}

// ----- heat ----------------------------------------------------------------------------------

fn regulator_plan(ambient: &str, source: &str, regulator: &str, draw: &str) -> String {
    format!(
        "railcheck: 1
ambient: {ambient}
parts:
  pack: {{ class: battery, chemistry: lipo, voltage: {source} }}
  reg: {{ class: regulator, {regulator} }}
  load: {{ class: load, pins: {{ vin: {{ role: supply-in, draw: {draw} }}, gnd: {{ role: ground }} }} }}
nets:
  VIN: [pack.pos, reg.vin]
  VOUT: [reg.vout, load.vin]
  GND: [pack.neg, reg.gnd, load.gnd]
"
    )
}

#[test]
fn w8_linear_regulator_overheats() {
    // Linear-regulator heat worked example (thermal Ohm's law): 12 V → 5 V, 0.5 A, Iq 5 mA,
    // θJA 50 °C/W, Ta 25 °C: P = 7 × 0.5 + 12 × 0.005 = 3.56 W;
    // Tj = 25 + 3.56 × 50 = 203 °C > 125 °C; largest load
    // (125 − 25) / (50 × 7) = 0.286 A.
    let hot = only(
        &regulator_plan(
            "25 degC",
            "12 V",
            "topology: linear, output: 5 V, quiescent: 5 mA, theta_ja: 50 degC/W, tj_max: 125 degC",
            "0.5 A",
        ),
        "thermal/overheat",
    );
    assert_eq!(hot.severity, Severity::Error);
    near(value(&hot, "power"), 3.56);
    near(value(&hot, "junction"), 203.0);
    near(value(&hot, "max_current"), 0.286);
    // Margin: 125 − 203 = −78 °C.
    near(value(&hot, "margin"), -78.0);
}

#[test]
fn w8_with_65_degrees_per_watt() {
    // Linear-regulator heat worked example (thermal Ohm's law): with θJA = 65 °C/W, Tj = 25 + 3.56 × 65 = 256 °C.
    let hot = only(
        &regulator_plan(
            "25 degC",
            "12 V",
            "topology: linear, output: 5 V, quiescent: 5 mA, theta_ja: 65 degC/W",
            "0.5 A",
        ),
        "thermal/overheat",
    );
    near(value(&hot, "junction"), 256.0);
}

#[test]
fn w9_linear_regulator_passes() {
    // Linear-regulator heat worked example (thermal Ohm's law): 7.4 V → 5 V, 0.3 A, θJA 60 °C/W, Ta 40 °C: P = 0.720 W,
    // Tj = 83.2 °C, passing 125 °C with a 41.8 °C margin.
    let regulator = |tj_max: &str| {
        regulator_plan(
            "40 degC",
            "7.4 V",
            &format!("topology: linear, output: 5 V, theta_ja: 60 degC/W, tj_max: {tj_max}"),
            "0.3 A",
        )
    };
    assert!(of_rule(&regulator("125 degC"), "thermal/overheat").is_empty());
    // With tj_max under 83.2 °C the finding reports the numbers: 82.5 °C is
    // 0.7 K under, beyond the 0.1 % tolerance of the limit (0.36 K of
    // 355.65 K, format reference §6, temperatures in kelvin).
    let hot = only(&regulator("82.5 degC"), "thermal/overheat");
    near(value(&hot, "power"), 0.720);
    near(value(&hot, "junction"), 83.2);
    near(125.0 - value(&hot, "junction"), 41.8);
}

#[test]
fn w10_buck_converter_loss() {
    // Buck energy-balance worked example: 5 V × 3 A out, η = 0.90, Vin 11.1 V: loss = 15 × (1/0.9 − 1) =
    // 1.67 W (energy balance and thermal Ohm's law). In a 40 °C box at θJA 60 °C/W:
    // Tj = 40 + 1.67 × 60 = 140 °C; largest load 85 / 60 / (5 × 0.111) = 2.55 A.
    let hot = only(
        &regulator_plan(
            "40 degC",
            "11.1 V",
            "topology: buck, output: 5 V, efficiency: 90 %, theta_ja: 60 degC/W",
            "3 A",
        ),
        "thermal/overheat",
    );
    near(value(&hot, "power"), 1.67);
    near(value(&hot, "junction"), 140.0);
    near(value(&hot, "max_current"), 2.55);
}

#[test]
fn unrated_regulator_note_gives_the_dissipation() {
    // Linear-regulator heat worked example (thermal Ohm's law)'s regulator with no θJA: P = (7.4 − 5) × 0.3 = 0.720 W, reported
    // as a note instead of a temperature.
    let note = only(
        &regulator_plan("40 degC", "7.4 V", "topology: linear, output: 5 V", "0.3 A"),
        "thermal/unrated",
    );
    assert_eq!(note.severity, Severity::Note);
    near(value(&note, "power"), 0.720);
}

// ----- ground offset -----------------------------------------------------------------------

/// JEDEC logic-level worked example's layout: the controller's ground on its own return, the flow
/// sensor's on the pump's 3 A return wire.
fn offset_plan(wire: &str, receiver_levels: &str) -> String {
    format!(
        "railcheck: 1
parts:
  pack: {{ class: battery, chemistry: lead-acid, voltage: 12 V }}
  term:
    class: connector
    pins: {{ a1: {{ role: through }}, b1: {{ role: through }}, a2: {{ role: through }}, b2: {{ role: through }} }}
  ctrl: {{ class: board, pins: {{ gnd: {{ role: ground }}, out: {{ role: logic-out, family: ttl5 }} }} }}
  flow: {{ class: sensor, pins: {{ gnd: {{ role: ground }}, in: {{ role: logic-in, family: ttl5{receiver_levels} }} }} }}
  pump: {{ class: load, pins: {{ vin: {{ role: supply-in, draw: 3 A }}, gnd: {{ role: ground }} }} }}
nets:
  VBAT: [pack.pos, pump.vin]
  BATT-: [pack.neg, term.a1, term.a2]
  LOGIC_GND: [term.b1, ctrl.gnd]
  MOTOR_GND: {{ pins: [term.b2, pump.gnd, flow.gnd], wire: {wire}, length: 0.5 m }}
  SIG: [ctrl.out, flow.in]
"
    )
}

#[test]
fn w14_ground_shift_on_22_awg_stays_below_half_the_ttl_margin() {
    // JEDEC logic-level worked example: 3 A over 0.5 m of 22 AWG (53.0 mΩ/m) = 0.0794 V, below half the
    // 0.4 V TTL margin (54/74 TTL levels) → no warning.
    assert!(of_rule(&offset_plan("22 AWG", ""), "ground/offset").is_empty());
    // The same shift against a receiver whose VIH is 2.3 V (NMH = 2.4 − 2.3
    // = 0.1 V, half 0.05 V) is reported, with the 0.0794 V.
    let shift = only(&offset_plan("22 AWG", ", vih: 2.3 V"), "ground/offset");
    near(value(&shift, "offset"), 0.0794);
    near(value(&shift, "margin"), 0.1);
}

#[test]
fn w14_ground_shift_on_26_awg_warns() {
    // JEDEC logic-level worked example: on 26 AWG (134 mΩ/m) the shift is 0.201 V, half the 0.4 V TTL
    // margin (NMH = 2.4 − 2.0, NML = 0.8 − 0.4; §4) → warn.
    let shift = only(&offset_plan("26 AWG", ""), "ground/offset");
    assert_eq!(shift.severity, Severity::Warning);
    near(value(&shift, "offset"), 0.201);
    near(value(&shift, "nmh"), 0.4);
    near(value(&shift, "nml"), 0.4);
    near(value(&shift, "limit"), 0.2);
}
