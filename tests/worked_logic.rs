//! Worked examples of the logic-level rules, reproduced through the library's
//! public API: JEDEC logic-level worked examples and the noise margins they
//! define, each number worked by hand in the comment beside its check.
//!
//! Rails are batteries with an exact `voltage:` (no internal resistance, no
//! wires), so the worst case the rules take (driver's VOH at its rail's
//! minimum, receiver's VIH at its rail's maximum, format reference §3) is the
//! textbook case. A link that passes produces no finding to read its margins
//! from, so those plans add a "probe" receiver that moves one threshold past
//! the driver: its finding then carries the other margin, worked out from the
//! family levels alone.

use railcheck::model::Library;
use railcheck::rules::Finding;
use std::fmt::Write as _;

/// A driver on a rail of `driver_vdd` and receivers on a rail of
/// `receiver_vdd`, all on one signal `SIG` and one ground.
fn link_plan(
    driver_vdd: &str,
    driver: &str,
    receiver_vdd: &str,
    receivers: &[(&str, &str)],
) -> String {
    let mut text = format!(
        "railcheck: 1
name: logic bench
parts:
  dsup: {{ class: battery, chemistry: nimh, voltage: {driver_vdd} }}
  rsup: {{ class: battery, chemistry: nimh, voltage: {receiver_vdd} }}
  drv:
    class: sensor
    pins:
      vcc: {{ role: supply-in, draw: 1 mA }}
      gnd: {{ role: ground }}
      out: {{ role: logic-out, ref: vcc, {driver} }}
"
    );
    for (name, spec) in receivers {
        let _ = write!(
            text,
            "  {name}:
    class: sensor
    pins:
      vcc: {{ role: supply-in, draw: 1 mA }}
      gnd: {{ role: ground }}
      in: {{ role: logic-in, ref: vcc, {spec} }}
"
        );
    }
    let names: Vec<&str> = receivers.iter().map(|(n, _)| *n).collect();
    let list = |pin: &str| {
        names
            .iter()
            .map(|n| format!(", {n}.{pin}"))
            .collect::<String>()
    };
    let _ = write!(
        text,
        "nets:
  DV: [dsup.pos, drv.vcc]
  RV: [rsup.pos{}]
  GND: [dsup.neg, rsup.neg, drv.gnd{}]
  SIG: [drv.out{}]
",
        list("vcc"),
        list("gnd"),
        list("in")
    );
    text
}

fn logic_findings(text: &str) -> Vec<Finding> {
    let checked = match railcheck::check("bench.yaml", text, &Library::builtin()) {
        Ok(c) => c,
        Err(e) => panic!("input errors: {:?}\n{text}", e.errors),
    };
    checked
        .findings
        .into_iter()
        .filter(|f| f.rule.starts_with("logic/"))
        .collect()
}

/// The one finding of `rule` about receiver part `receiver`.
fn finding<'f>(findings: &'f [Finding], rule: &str, receiver: &str) -> &'f Finding {
    let found: Vec<&Finding> = findings
        .iter()
        .filter(|f| f.rule == rule && f.message.contains(&format!("`{receiver}.in`")))
        .collect();
    match found.as_slice() {
        [one] => one,
        _ => panic!("expected one {rule} about `{receiver}`, got {findings:#?}"),
    }
}

fn about<'f>(findings: &'f [Finding], receiver: &str) -> Vec<&'f Finding> {
    findings
        .iter()
        .filter(|f| f.message.contains(&format!("`{receiver}.in`")))
        .collect()
}

fn value(finding: &Finding, key: &str) -> f64 {
    *finding
        .values
        .get(key)
        .unwrap_or_else(|| panic!("no value `{key}` in {finding:#?}"))
}

/// Within 1 % of the published value.
fn close(actual: f64, expected: f64) {
    assert!(
        (actual - expected).abs() <= expected.abs() * 0.01,
        "{actual} is not within 1 % of {expected}"
    );
}

#[test]
fn w14_lvcmos_output_into_hc_input_fails_the_high_margin() {
    // JEDEC logic-level worked example: 3.3 V LVCMOS output, VOH = VDD − 0.2 V (JEDEC
    // JESD8C) at its minimum VDD of 3.0 V = 2.80 V; 5 V HC input, VIH =
    // 0.7 × 5.0 V = 3.50 V (JESD7). NMH = 2.80 − 3.50 = −0.70 V.
    let text = link_plan(
        "3.0 V..3.6 V",
        "family: lvcmos33",
        "5 V",
        &[("hc", "family: cmos5")],
    );
    let findings = logic_findings(&text);
    let high = finding(&findings, "logic/high-margin", "hc");
    close(value(high, "voh"), 2.80);
    close(value(high, "vih"), 3.50);
    close(value(high, "nmh"), -0.70);
    // The driver's lowest rail is the empty battery (format reference §3 worst case).
    assert_eq!(high.battery.map(|b| b.name()), Some("empty"));
    // NML = 0.3 × 5.0 − 0.2 = 1.30 V (JESD7 VIL, JESD8C VOL): passes.
    close(value(high, "nml"), 1.30);
    assert_eq!(about(&findings, "hc").len(), 1, "{findings:#?}");
}

#[test]
fn w14_lvcmos_output_into_ttl_input_passes_with_0v80() {
    // JEDEC logic-level worked example: the same output (VOH 2.80 V) into an HCT/TTL input
    // (VIH 2.0 V, 54/74 TTL levels): NMH = +0.80 V, passes.
    // The probe is the same input with its VIL written below the driver's
    // VOL (0.2 V, JESD8C), so its low-margin finding shows the NMH.
    let text = link_plan(
        "3.0 V..3.6 V",
        "family: lvcmos33",
        "5 V",
        &[
            ("hct", "family: ttl5"),
            ("probe", "family: ttl5, vil: 0.1 V"),
        ],
    );
    let findings = logic_findings(&text);
    assert!(about(&findings, "hct").is_empty(), "{findings:#?}");
    let low = finding(&findings, "logic/low-margin", "probe");
    close(value(low, "nmh"), 0.80);
    close(value(low, "vih"), 2.0);
}

#[test]
fn w14_5v_output_into_3v3_input_exceeds_its_ceiling() {
    // JEDEC logic-level worked example: a 5.0 V push-pull output into a 3.3 V input that
    // is not 5 V-tolerant: 5.0 V > 3.3 + 0.3 = 3.6 V (VDD + 0.3 V, JESD8;
    // as an absolute maximum, common practice).
    let text = link_plan(
        "5 V",
        "family: cmos5",
        "3.3 V",
        &[
            ("mcu", "family: lvcmos33"),
            ("tolerant", "family: lvcmos33, tolerant: 5 V"),
        ],
    );
    let findings = logic_findings(&text);
    let over = finding(&findings, "logic/overvoltage", "mcu");
    close(value(over, "high_level"), 5.0);
    close(value(over, "ceiling"), 3.6);
    // A 5 V-tolerant input withstands up to 5.5 V (JEDEC JESD8 logic levels,
    // common practice): 5.0 V ≤ 5.5 V.
    assert!(about(&findings, "tolerant").is_empty(), "{findings:#?}");
}

#[test]
fn w14_levels_on_a_1v8_rail() {
    // JEDEC logic-level worked example, JEDEC JESD8-7 at VDD = 1.8 V: VIH = 0.65 × 1.8 =
    // 1.17 V, VIL = 0.35 × 1.8 = 0.630 V, VOH ≥ 1.8 − 0.45 = 1.35 V,
    // VOL 0.45 V. Between two such pins NMH = NML = 0.18 V: passes.
    let text = link_plan(
        "1.8 V",
        "family: lvcmos18",
        "1.8 V",
        &[
            ("peer", "family: lvcmos18"),
            ("probe_hi", "family: lvcmos18, vih: 1.5 V"),
            ("probe_lo", "family: lvcmos18, vil: 0.3 V"),
        ],
    );
    let findings = logic_findings(&text);
    assert!(about(&findings, "peer").is_empty(), "{findings:#?}");
    let high = finding(&findings, "logic/high-margin", "probe_hi");
    close(value(high, "voh"), 1.35);
    close(value(high, "vil"), 0.630);
    close(value(high, "nml"), 0.18);
    let low = finding(&findings, "logic/low-margin", "probe_lo");
    close(value(low, "vih"), 1.17);
    close(value(low, "vol"), 0.45);
    close(value(low, "nmh"), 0.18);
}

/// Runs a link that passes, and reads its two margins from the probes.
fn margins(
    vdd: &str,
    driver: &str,
    receiver: &str,
    probe_vih: &str,
    probe_vil: &str,
) -> (f64, f64) {
    let probe_hi = format!("{receiver}, vih: {probe_vih}");
    let probe_lo = format!("{receiver}, vil: {probe_vil}");
    let text = link_plan(
        vdd,
        driver,
        vdd,
        &[
            ("peer", receiver),
            ("probe_hi", &probe_hi),
            ("probe_lo", &probe_lo),
        ],
    );
    let findings = logic_findings(&text);
    assert!(about(&findings, "peer").is_empty(), "{findings:#?}");
    let nml = value(finding(&findings, "logic/high-margin", "probe_hi"), "nml");
    let nmh = value(finding(&findings, "logic/low-margin", "probe_lo"), "nmh");
    (nmh, nml)
}

#[test]
fn noise_margin_lvcmos_into_lvttl_at_3v3() {
    // JEDEC JESD8 logic levels: LVCMOS → LVTTL at VDD = 3.3 V: NMH = 3.1 − 2.0 =
    // 1.1 V; NML = 0.8 − 0.2 = 0.6 V (JEDEC JESD8C).
    let (nmh, nml) = margins(
        "3.3 V",
        "family: lvcmos33",
        "family: lvttl33",
        "3.2 V",
        "0.1 V",
    );
    close(nmh, 1.1);
    close(nml, 0.6);
}

#[test]
fn noise_margin_ttl_into_ttl() {
    // JEDEC JESD8 logic levels: TTL → TTL: NMH = 2.4 − 2.0 = 0.4 V; NML = 0.8 −
    // 0.4 = 0.4 V (54/74 bipolar TTL levels).
    let (nmh, nml) = margins("5 V", "family: ttl5", "family: ttl5", "3 V", "0.1 V");
    close(nmh, 0.4);
    close(nml, 0.4);
}

#[test]
fn noise_margin_hc_into_hc_at_5v() {
    // JEDEC JESD8 logic levels: HC → HC at 5 V: NMH = 4.9 − 3.5 = 1.4 V; NML =
    // 1.5 − 0.1 = 1.4 V (JESD7, 0.7/0.3 × VDD).
    let (nmh, nml) = margins("5 V", "family: cmos5", "family: cmos5", "4.95 V", "0.05 V");
    close(nmh, 1.4);
    close(nml, 1.4);
}
