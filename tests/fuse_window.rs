//! The fuse every fuse finding suggests satisfies every fuse rule at once:
//! at least 125 % of the continuous current (NEC 210.20(A)), no higher than
//! the ampacity of any wire it protects (NEC 240.4, Handbook chassis column),
//! not opened by a brief mode within the time it lasts (ISO 8820-3 blade
//! bands, IEC 60127-2 time-lag sheet), and for a fast fuse not below the
//! motor-start peak. Worked cases by hand, then a property: applying any
//! suggestion to a plan never creates a new fuse finding.

use proptest::prelude::*;
use railcheck::model::Library;
use railcheck::rules::{Finding, Severity};

fn check(plan: &str) -> Vec<Finding> {
    railcheck::check("window.yaml", plan, &Library::builtin())
        .unwrap_or_else(|f| panic!("plan did not read: {:?}\n{plan}", f.errors))
        .findings
}

fn fuse_findings(findings: &[Finding]) -> Vec<&Finding> {
    findings
        .iter()
        .filter(|f| f.rule.starts_with("fuse/"))
        .collect()
}

/// A 3S rover: `fuse` inline, VBAT of `gauge` AWG, two gearmotors (12 V,
/// 0.5 A running, 5 A stall) on a MOSFET bridge, `extra` appended.
fn rover(fuse: &str, gauge: u32, extra: &str) -> String {
    format!(
        "railcheck: 1
parts:
  pack: {{ use: battery/lipo-3s, with: {{ cutoff: true }} }}
  main_fuse: {fuse}
  estop: {{ use: switch/estop-20a }}
  drive: {{ use: driver/mosfet-dual-hbridge }}
  left: {{ use: motor/gearmotor-medium }}
  right: {{ use: motor/gearmotor-medium }}
nets:
  BATT+: [pack.pos, main_fuse.a]
  VBAT: {{ pins: [main_fuse.b, estop.a], wire: {gauge} AWG, length: 0.3 m }}
  VMOT: [estop.b, drive.vm]
  GND: [pack.neg, drive.gnd]
  LA: [drive.out1a, left.a]
  LB: [drive.out1b, left.b]
  RA: [drive.out2a, right.a]
  RB: [drive.out2b, right.b]
{extra}"
    )
}

fn value(f: &Finding, key: &str) -> Option<f64> {
    f.values.get(key).copied()
}

#[test]
fn an_oversized_fuse_on_a_motor_rail_is_told_a_rating_that_rides_through_the_stall() {
    // Continuous: 2 × 0.5 A + 0.02 A = 1.02 A; 1.25 × 1.02 = 1.28 A (NEC
    // 210.20(A)). Both motors stalled in `worst`: 12.6 V / (2.4 + 0.01 +
    // 2 × 0.0166) ohm ≈ 5.15 A each, 10.3 A (brushed DC motor equation).
    // VBAT is 20 AWG: 11 A (Handbook chassis column). A fast fuse must be
    // rated at least the 10.3 A peak (10 A is below it, 15 A above the wire);
    // a time-delay fuse must not open within a 100 ms motor start: up to
    // 275 % of its rating it takes at least 0.2 s (IEC 60127-2 time-lag,
    // from memory), so 10.3 / 2.75 = 3.75 A → a 4 A time-delay fuse, not the
    // 2 A that 125 % of the running current alone would give.
    let plan = rover("{ class: fuse, rating: 15 A, voltage: 32 V }", 20, "");
    let findings = check(&plan);
    let over: Vec<&Finding> = findings
        .iter()
        .filter(|f| f.rule == "fuse/oversized")
        .collect();
    assert_eq!(over.len(), 1, "{findings:#?}");
    assert_eq!(value(over[0], "suggested_rating"), Some(4.0));
    assert_eq!(value(over[0], "suggested_time_delay"), Some(1.0));
    let help = over[0].help.as_deref().unwrap_or_default();
    assert!(help.contains("4 A fuse, time-delay"), "{help}");
    // Every fuse finding on it quotes the same suggestion.
    for f in fuse_findings(&findings) {
        assert_eq!(value(f, "suggested_rating"), Some(4.0), "{f:?}");
    }
}

#[test]
fn when_no_blade_fits_the_wire_the_finding_names_the_gauge_that_would() {
    // The same rover on 24 AWG (3.5 A, Handbook chassis column): the 4 A
    // time-delay fuse the stall needs is above 3.5 A, so no standard blade
    // fits; 22 AWG (7 A) would carry it.
    let plan = rover("{ class: fuse, rating: 15 A, voltage: 32 V }", 24, "");
    let findings = check(&plan);
    let over = findings
        .iter()
        .find(|f| f.rule == "fuse/oversized")
        .expect("15 A on 24 AWG is oversized");
    assert_eq!(value(over, "suggested_rating"), None, "{over:?}");
    let help = over.help.as_deref().unwrap_or_default();
    assert!(help.contains("no standard blade fuse"), "{help}");
    assert!(help.contains("22 AWG"), "{help}");
    assert!(help.contains("4 A fuse, time-delay"), "{help}");
}

#[test]
fn a_fuse_below_its_steady_current_is_an_error_and_below_125_percent_a_warning() {
    // A 5.5 A heater: on a 5 A fuse the steady current is above the rating
    // (it blows in normal work): an error. On 6.5 A it is below the rating
    // but above 80 % of it (1.25 × 5.5 = 6.875 A > 6.5 A): a warning. On
    // 7.5 A (≥ 6.875 A) no finding (NEC 210.20(A)).
    let heater = |rating: &str| {
        format!(
            "railcheck: 1
parts:
  pack: {{ use: battery/lead-acid-12v, with: {{ max_discharge: 100 A }} }}
  fuse: {{ class: fuse, rating: {rating}, voltage: 32 V, speed: slow }}
  heater: {{ class: load, pins: {{ vin: {{ role: supply-in, draw: 5.5 A }}, gnd: {{ role: ground }} }} }}
nets:
  BATT+: [pack.pos, fuse.a]
  HEAT: [fuse.b, heater.vin]
  GND: [pack.neg, heater.gnd]
"
        )
    };
    let under = |rating: &str| -> Vec<Severity> {
        check(&heater(rating))
            .into_iter()
            .filter(|f| f.rule == "fuse/undersized")
            .map(|f| f.severity)
            .collect()
    };
    assert_eq!(under("5 A"), vec![Severity::Error]);
    assert_eq!(under("6.5 A"), vec![Severity::Warning]);
    assert!(under("7.5 A").is_empty());
}

#[test]
fn nuisance_speaks_of_motor_start_only_with_a_motor_behind_the_fuse() {
    // A fast 7.5 A fuse on a lamp bank running at 3 A and peaking at 8 A in
    // `worst` (no motor behind it): "at that peak", not "motor start".
    let plan = "railcheck: 1
parts:
  pack: { use: battery/lead-acid-12v, with: { max_discharge: 100 A } }
  fuse: { class: fuse, rating: 7.5 A, voltage: 32 V }
  lamps: { class: load, pins: { vin: { role: supply-in, draw: { typical: 3 A, peak: 8 A } }, gnd: { role: ground } } }
nets:
  BATT+: [pack.pos, fuse.a]
  LAMPS: [fuse.b, lamps.vin]
  GND: [pack.neg, lamps.gnd]
";
    let nuisance: Vec<Finding> = check(plan)
        .into_iter()
        .filter(|f| f.rule == "fuse/nuisance")
        .collect();
    assert_eq!(nuisance.len(), 1, "{nuisance:?}");
    assert!(
        !nuisance[0].message.contains("motor"),
        "{}",
        nuisance[0].message
    );
    assert!(nuisance[0].message.contains("at that peak"));
}

/// The plan with `main_fuse` replaced by the suggestion.
fn apply(plan: &str, old: &str, rating: f64, slow: Option<bool>, old_slow: bool) -> String {
    let slow = slow.unwrap_or(old_slow);
    let speed = if slow { "slow" } else { "fast" };
    plan.replace(
        old,
        &format!("{{ class: fuse, rating: {rating} A, voltage: 32 V, speed: {speed} }}"),
    )
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(48))]

    #[test]
    fn applying_a_suggested_fuse_never_creates_a_new_fuse_finding(
        rating in prop::sample::select(vec![1.0, 2.0, 3.0, 5.0, 7.5, 10.0, 15.0, 20.0, 30.0]),
        slow in any::<bool>(),
        gauge in prop::sample::select(vec![14u32, 16, 18, 20, 22, 24]),
        brief in prop::option::of(prop::sample::select(vec!["200 ms", "1 s", "2 s", "5 s", "30 s"])),
        stall_at_once in prop::option::of(0u32..3),
    ) {
        let speed = if slow { "slow" } else { "fast" };
        let fuse = format!("{{ class: fuse, rating: {rating} A, voltage: 32 V, speed: {speed} }}");
        let mut extra = String::new();
        if let Some(n) = stall_at_once {
            extra.push_str(&format!("limits: {{ stall_at_once: {n} }}\n"));
        }
        if let Some(lasts) = brief {
            extra.push_str(&format!(
                "modes:\n  kerb: {{ lasts: {lasts}, left: stall, right: stall }}\nprofile: {{ typical: 95 %, kerb: 5 % }}\n"
            ));
        }
        let plan = rover(&fuse, gauge, &extra);
        let before = check(&plan);
        let fuse_before = fuse_findings(&before);
        // Every fuse finding quotes one suggestion.
        let suggestions: Vec<(Option<f64>, Option<f64>)> = fuse_before
            .iter()
            .filter(|f| f.rule != "fuse/missing")
            .map(|f| (value(f, "suggested_rating"), value(f, "suggested_time_delay")))
            .collect();
        prop_assert!(suggestions.windows(2).all(|w| w[0] == w[1]), "{suggestions:?}");
        let Some(&(Some(suggested), time_delay)) = suggestions.first() else {
            return Ok(());
        };
        let fixed = apply(&plan, &fuse, suggested, time_delay.map(|t| t == 1.0), slow);
        let after = check(&fixed);
        let before_rules: Vec<&str> = fuse_before.iter().map(|f| f.rule).collect();
        for f in fuse_findings(&after) {
            prop_assert!(
                before_rules.contains(&f.rule)
                    && !matches!(f.rule, "fuse/undersized" | "fuse/oversized" | "fuse/nuisance"),
                "{suggested} A ({time_delay:?}) raised {}: {}\n{fixed}",
                f.rule,
                f.message
            );
        }
    }
}
