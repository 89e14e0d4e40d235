//! `railcheck init`: the starter plan passes `check` with no finding at all
//! for every battery of the library, its fuse suits the pack by the published
//! sizing rules, and the command never overwrites a file.

use assert_cmd::Command;
use predicates::prelude::*;
use railcheck::model::{Class, Library, Plan};
use uom::si::electric_current::ampere;
use uom::si::electric_potential::volt;

fn railcheck() -> Command {
    let mut command = Command::cargo_bin("railcheck").expect("the railcheck binary is built");
    command.env("NO_COLOR", "1");
    command
}

fn starter(battery: &str) -> String {
    let output = railcheck()
        .args(["init", "--battery", battery])
        .output()
        .unwrap();
    assert_eq!(output.status.code(), Some(0), "init --battery {battery}");
    String::from_utf8(output.stdout).unwrap()
}

fn read(text: &str) -> Plan {
    let (_, _, plan) =
        railcheck::read("starter.yaml", text, &Library::builtin()).expect("the starter reads");
    plan
}

fn part<'p>(plan: &'p Plan, name: &str) -> &'p Class {
    &plan
        .parts
        .iter()
        .find(|p| p.name == name)
        .unwrap_or_else(|| panic!("the starter has a part `{name}`"))
        .class
}

/// Full-charge cell voltage per chemistry (Linden & Reddy, Handbook of
/// Batteries: 4.20 V lithium cobalt/polymer, 3.65 V LiFePO4, about 1.45 V
/// NiMH on charge, 2.30 V lead-acid at float-to-absorption).
fn full_cell_volts(chemistry: &str) -> f64 {
    match chemistry {
        "lipo" | "li-ion" => 4.20,
        "lifepo4" => 3.65,
        "nimh" => 1.45,
        "lead-acid" => 2.30,
        other => panic!("unknown chemistry {other}"),
    }
}

fn batteries() -> Vec<String> {
    let ids = railcheck::starter::battery_ids(&Library::builtin());
    // The library's battery folder holds eight packs (parts/battery/).
    assert_eq!(ids.len(), 8, "{ids:?}");
    ids
}

#[test]
fn every_battery_gets_a_starter_with_no_finding_at_all() {
    for battery in batteries() {
        let plan = starter(&battery);
        let output = railcheck()
            .args(["check", "--strict", "--format", "json", "-"])
            .write_stdin(plan.clone())
            .output()
            .unwrap();
        let document: serde_json::Value = serde_json::from_slice(&output.stdout).unwrap();
        let findings = document["findings"].as_array().expect("findings");
        assert!(
            findings.is_empty(),
            "{battery}: errors, warnings and notes must all be zero:\n{findings:#?}\n{plan}"
        );
        assert_eq!(output.status.code(), Some(0), "{battery}");
    }
}

#[test]
fn every_starter_fuses_the_battery_positive_for_the_pack_voltage() {
    for battery in batteries() {
        let text = starter(&battery);
        let plan = read(&text);
        let Class::Battery(pack) = part(&plan, "pack") else {
            panic!("`pack` is a battery");
        };
        let full = pack.cells.expect("library packs give cells") as f64
            * full_cell_volts(pack.chemistry.name());
        let Class::Fuse(fuse) = part(&plan, "main_fuse") else {
            panic!("`main_fuse` is a fuse");
        };
        // A fuse must be rated for the voltage it breaks (ISO 8820-3 scope,
        // IEC 60127): at least the pack's full voltage.
        let rated = fuse.voltage.expect("rated voltage").value.get::<volt>();
        assert!(rated >= full, "{battery}: fuse {rated} V below {full} V");
        // The fuse sits right at the battery positive: nothing else on that net.
        let net = plan.nets.iter().find(|n| n.name == "BATT+").unwrap();
        let pins: Vec<String> = net
            .pins
            .iter()
            .map(|p| {
                let part = &plan.parts[p.part];
                format!("{}.{}", part.name, part.pins[p.pin].name)
            })
            .collect();
        assert_eq!(pins, ["pack.pos", "main_fuse.a"], "{battery}");
        // A stop switch rated for the pack's voltage (a DC switch breaks its
        // rated voltage at most; common practice) follows the fuse.
        let Class::Switch(stop) = part(&plan, "stop") else {
            panic!("`stop` is a switch");
        };
        assert!(stop.stop, "{battery}: the switch is a stop switch");
        let switch_volts = stop.voltage.expect("rated voltage").value.get::<volt>();
        assert!(
            switch_volts >= full,
            "{battery}: stop switch {switch_volts} V"
        );
        assert!(text.contains("docs/format.md"));
    }
}

/// The fuse for a 3S lipo worked by hand: the buck converter (5 V ±2 %, 3 A,
/// 90 % efficient) at full output from an empty pack draws
/// I = P_out / (η · V_in) = 5.1 V × 3 A / (0.9 × 9.0 V) = 1.89 A (power
/// balance of a switching converter); the fuse needs 125 % of that,
/// 2.36 A (NEC 210.20(A)), so the next blade rating, 3 A (SAE J1284 series).
/// 22 AWG carries 7 A in chassis wiring (Handbook of Electronic Tables and
/// Formulas), enough for the 3 A the fuse lets through.
#[test]
fn the_3s_fuse_follows_the_125_percent_rule() {
    let text = starter("battery/lipo-3s");
    let plan = read(&text);
    let Class::Fuse(fuse) = part(&plan, "main_fuse") else {
        panic!("`main_fuse` is a fuse");
    };
    assert_eq!(fuse.rating.unwrap().value.get::<ampere>(), 3.0);
    assert!(
        text.contains("1.89 A"),
        "the comment shows the sum:\n{text}"
    );
    assert!(text.contains("wire: 22 AWG"));
}

/// A 2S pack is empty at 6.0 V: 5.1 V × 3 A / (0.9 × 6.0 V) = 2.83 A, and
/// 125 % of it is 3.54 A, above 3 A: the library's next blade fuse is 5 A.
#[test]
fn a_2s_pack_needs_a_larger_fuse_by_the_same_rule() {
    let plan = read(&starter("battery/lipo-2s"));
    let Class::Fuse(fuse) = part(&plan, "main_fuse") else {
        panic!("`main_fuse` is a fuse");
    };
    assert_eq!(fuse.rating.unwrap().value.get::<ampere>(), 5.0);
}

#[test]
fn the_default_battery_is_a_3s_lipo_with_its_cutoff_spelled_out() {
    let output = railcheck().arg("init").output().unwrap();
    assert_eq!(output.status.code(), Some(0));
    let text = String::from_utf8(output.stdout).unwrap();
    assert!(text.contains("use: battery/lipo-3s, with: { cutoff: true }"));
    // The newcomer is told what `cutoff: true` promises.
    assert!(text.contains("protection board is fitted"));
    // A pack that is not lithium has no cut-off line to explain.
    assert!(!starter("battery/nimh-8cell").contains("cutoff"));
}

#[test]
fn an_unknown_or_wrong_battery_is_refused_with_the_list() {
    railcheck()
        .args(["init", "--battery", "battery/lipo3s"])
        .assert()
        .code(2)
        .stdout(predicate::str::is_empty())
        .stderr(
            predicate::str::contains("did you mean `battery/lipo-3s`?")
                .and(predicate::str::contains("battery/nimh-8cell")),
        );
    railcheck()
        .args(["init", "--battery", "fuse/blade-3a"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("is not a battery"));
}

#[test]
fn init_writes_a_new_file_and_never_overwrites_one() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("robot.yaml");
    railcheck()
        .args(["init", "-o"])
        .arg(&target)
        .assert()
        .code(0)
        .stdout(predicate::str::is_empty())
        .stderr(predicate::str::contains(format!(
            "wrote {}",
            target.display()
        )));
    assert_eq!(
        std::fs::read_to_string(&target).unwrap(),
        starter(railcheck::starter::DEFAULT_BATTERY)
    );
    let names: Vec<_> = std::fs::read_dir(dir.path()).unwrap().collect();
    assert_eq!(names.len(), 1, "no temporary file left: {names:?}");

    std::fs::write(&target, "my own plan\n").unwrap();
    railcheck()
        .args(["init", "-o"])
        .arg(&target)
        .assert()
        .code(2)
        .stderr(predicate::str::contains("already exists"));
    assert_eq!(std::fs::read_to_string(&target).unwrap(), "my own plan\n");
}
