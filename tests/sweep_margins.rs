//! What a sweep row says beyond pass or fail: the tightest margin over every
//! rating the checks compare against, the parts' mass and cost, and how rows
//! stream, stop and refuse values. Margins are worked out by hand from
//! Ohm's law, the wire tables the checks cite and the 125 % fuse rule.

#[path = "common/command.rs"]
mod command;

use command::railcheck;
use railcheck::model::Library;
use railcheck::rules::{Margin, RatingKind};
use railcheck::sweep::{Outcome, Rank, Row, Summary, Sweep, order};
use std::sync::atomic::{AtomicBool, Ordering};

/// A greenhouse heater mat drawing a steady 3 A from a 3S pack through a
/// 5 A blade fuse and a metre of 22 AWG.
const HEATER: &str = "\
railcheck: 1
parts:
  pack: { use: battery/lipo-3s, with: { mass: 0.19 kg, cost: 30 } }
  fuse: { use: fuse/blade-5a }
  mat:
    class: load
    mass: 250 g
    cost: 12.50
    pins:
      vin: { role: supply-in, range: 6 V..20 V, max: 24 V, draw: 3 A }
      gnd: { role: ground }
nets:
  BATT+: [pack.pos, fuse.a]
  HEAT: { pins: [fuse.b, mat.vin], wire: 22 AWG, length: 1 m }
  GND: [pack.neg, mat.gnd]
";

fn margin(margins: &[Margin], kind: RatingKind) -> &Margin {
    margins
        .iter()
        .find(|m| m.kind == kind)
        .unwrap_or_else(|| panic!("no {kind:?} margin in {margins:#?}"))
}

fn close(a: f64, b: f64, tolerance: f64) -> bool {
    (a - b).abs() <= tolerance
}

#[test]
fn the_margins_are_the_comparisons_the_rules_make_worked_by_hand() {
    let checked = railcheck::check("heater.yaml", HEATER, &Library::builtin()).unwrap();
    let margins = &checked.margins;

    // Wire ampacity: the Handbook of Electronic Tables and Formulas chassis
    // column rates 22 AWG at 7 A; the mat takes 3 A, so 7 − 3 = 4 A is left,
    // 4 / 7 = 57.1 % of the rating.
    let wire = margin(margins, RatingKind::WireAmpacity);
    assert!(
        close(wire.limit, 7.0, 1e-9) && close(wire.value, 3.0, 1e-9),
        "{wire:?}"
    );
    assert!(close(wire.left(), 4.0, 1e-9));
    assert!(close(wire.share().unwrap(), 4.0 / 7.0, 1e-9));
    assert!(wire.at.contains("HEAT"), "{wire:?}");

    // Fuse: a fuse carries at most 80 % of its rating continuously (common
    // practice, NEC 210.20(A)), so 3 A asks for 1.25 × 3 = 3.75 A; the 5 A
    // blade leaves 5 − 3.75 = 1.25 A, 25 % of its rating.
    let fuse = margin(margins, RatingKind::FuseRating);
    assert!(
        close(fuse.value, 3.75, 1e-9) && close(fuse.limit, 5.0, 1e-9),
        "{fuse:?}"
    );
    assert!(close(fuse.share().unwrap(), 0.25, 1e-9));
    assert_eq!(fuse.at, "fuse");

    // Wire drop, Ohm's law: ASTM B258 gives 22 AWG a diameter of
    // 0.127 mm × 92^(14/39) = 0.6438 mm, 0.3255 mm²; annealed copper
    // (1/58 Ω·mm²/m, IEC 60028) makes that 52.96 mΩ/m, so 3 A over 1 m drops
    // 3 × 0.05296 = 0.159 V. The limit is 5 % of the source's voltage.
    let drop = margin(margins, RatingKind::WireDrop);
    assert!(close(drop.value, 0.159, 0.002), "{drop:?}");
    let source = drop.limit / 0.05;
    // The pack is between empty (3 × 3.0 V) and full (3 × 4.2 V), Linden &
    // Reddy, Handbook of Batteries.
    assert!((9.0 - 0.1..=12.6).contains(&source), "{drop:?}");

    // Battery discharge: 30C of 5 Ah is 150 A; 150 − 3 = 147 A left.
    let pack = margin(margins, RatingKind::BatteryDischarge);
    assert!(
        close(pack.limit, 150.0, 1e-9) && close(pack.left(), 147.0, 1e-9),
        "{pack:?}"
    );

    // Supply pin: at most a full pack, 12.6 V, under the 20 V top of the
    // mat's range: at least 7.4 V, 37 %, left.
    let top = margin(margins, RatingKind::SupplyRangeMax);
    assert!(top.value <= 12.6 && top.share().unwrap() >= 0.37, "{top:?}");
    assert_eq!(top.at, "mat.vin");
    assert_eq!(top.battery.map(|b| b.name()), Some("full"));

    // The tightest of them all is the fuse's 25 %, first in the list.
    assert_eq!(margins[0].kind, RatingKind::FuseRating);
}

#[test]
fn a_row_names_its_tightest_margin_and_it_moves_with_the_choice() {
    let library = Library::builtin();
    let base = railcheck::check("heater.yaml", HEATER, &library).unwrap();
    let vary = ["fuse=fuse/blade-3a,fuse/blade-5a,fuse/blade-7a5".to_string()];
    let sweep = Sweep::new(&base, &library, &vary, 100).unwrap();
    let rows = sweep.run(&library, 2);
    let tightest = |row: &Row| match &row.outcome {
        Outcome::Checked(v) => v.margin.clone().unwrap(),
        Outcome::Unreadable(m) => panic!("{m}"),
    };
    // 3 A fuse: 3 − 3.75 = −0.75 A, −25 % of its rating.
    let three = tightest(&rows[0]);
    assert_eq!(three.kind, RatingKind::FuseRating);
    assert!(close(three.left(), -0.75, 1e-9) && close(three.share().unwrap(), -0.25, 1e-9));
    // 5 A: +25 %, still the fuse.
    assert!(close(tightest(&rows[1]).share().unwrap(), 0.25, 1e-9));
    // 7.5 A: the fuse leaves 7.5 − 3.75 = 3.75 A (50 %), so the tightest is
    // now the mat's supply range (at least 37 %, see above) — no longer
    // the fuse.
    let seven = tightest(&rows[2]);
    assert_ne!(seven.kind, RatingKind::FuseRating, "{seven:?}");
    assert!(seven.share().unwrap() < 0.5);
}

#[test]
fn mass_and_cost_add_up_and_a_library_choice_brings_its_own() {
    // A part file of our own that gives its mass and cost (the built-in
    // library gives neither).
    let mut library = Library::builtin();
    library.insert(
        "battery/weighed-4s".into(),
        "battery/weighed-4s.yaml".into(),
        "class: battery\nchemistry: lipo\ncells: 4\ncapacity: 5000 mAh\nmax_discharge: 30C\n\
         internal_resistance: 0.015 ohm\nmass: 1.5 kg\ncost: 80\n"
            .into(),
    );
    let plan = HEATER.replace(
        "pack: { use: battery/lipo-3s, with: { mass: 0.19 kg, cost: 30 } }",
        "pack: { use: battery/lipo-3s }",
    );
    let base = railcheck::check("heater.yaml", &plan, &library).unwrap();
    let vary = ["pack=battery/lipo-3s,battery/weighed-4s".to_string()];
    let sweep = Sweep::new(&base, &library, &vary, 100).unwrap();
    let mut rows = sweep.run(&library, 1);
    let figures = |row: &Row| match &row.outcome {
        Outcome::Checked(v) => (
            v.mass.map(|m| m.value),
            v.without_mass,
            v.cost,
            v.without_cost,
        ),
        Outcome::Unreadable(m) => panic!("{m}"),
    };
    // 3S: only the mat's 250 g and 12.50; the pack and fuse give none.
    let (mass, no_mass, cost, no_cost) = figures(&rows[0]);
    assert!(
        close(mass.unwrap(), 0.25, 1e-12) && no_mass == 2,
        "{mass:?}"
    );
    assert!(close(cost.unwrap(), 12.5, 1e-12) && no_cost == 2);
    // The weighed pack: 1.5 kg + 0.25 kg = 1.75 kg, 80 + 12.50 = 92.50.
    let (mass, no_mass, cost, _) = figures(&rows[1]);
    assert!(
        close(mass.unwrap(), 1.75, 1e-12) && no_mass == 1,
        "{mass:?}"
    );
    assert!(close(cost.unwrap(), 92.5, 1e-12));
    // Lightest first.
    order(&mut rows, Some(Rank::Mass), false);
    assert_eq!(rows[0].index, 0);
    // The plan's own `with:` wins over the part file, as for any field.
    let base = railcheck::check("heater.yaml", HEATER, &library).unwrap();
    let sweep = Sweep::new(&base, &library, &vary, 100).unwrap();
    let rows = sweep.run(&library, 1);
    // 0.19 kg + 0.25 kg = 0.44 kg on both rows.
    for row in &rows {
        assert!(close(figures(row).0.unwrap(), 0.44, 1e-12));
    }
}

#[test]
fn a_cost_is_a_plain_number_and_a_mass_needs_its_unit() {
    let library = Library::builtin();
    for (bad, column) in [("cost: 12 EUR", "cost"), ("mass: 250", "mass")] {
        let plan = HEATER.replace("    cost: 12.50\n", &format!("    {bad}\n"));
        let plan = if column == "mass" {
            plan.replace("    mass: 250 g\n", "")
        } else {
            plan
        };
        let failure = railcheck::check("heater.yaml", &plan, &library).unwrap_err();
        let error = &failure.errors[0];
        let (line, _) = failure.sources.line_column(error.span);
        assert_eq!(
            line,
            if column == "cost" { 8 } else { 7 },
            "{}",
            error.message
        );
        assert!(error.hint.is_some(), "{}", error.message);
        if column == "cost" {
            assert!(error.message.contains("`12 EUR`"), "{}", error.message);
        }
    }
}

#[test]
fn a_key_of_several_nets_gives_each_net_the_value() {
    let library = Library::builtin();
    let plan = HEATER.replace(
        "  GND: [pack.neg, mat.gnd]\n",
        "  GND: { pins: [pack.neg, mat.gnd], wire: 22 AWG, length: 1 m }\n",
    );
    let base = railcheck::check("heater.yaml", &plan, &library).unwrap();
    let vary = ["HEAT+GND.wire=18 AWG,16 AWG".to_string()];
    let sweep = Sweep::new(&base, &library, &vary, 100).unwrap();
    let text = sweep.variant(0);
    assert!(text.contains("HEAT: { pins: [fuse.b, mat.vin], wire: 18 AWG, length: 1 m }"));
    assert!(text.contains("GND: { pins: [pack.neg, mat.gnd], wire: 18 AWG, length: 1 m }"));
    // The drop follows both: 18 AWG is 20.95 mΩ/m (ASTM B258 with
    // annealed copper), so 3 A over 1 m out and 1 m back drops
    // 2 × 3 × 0.02095 = 0.126 V.
    let rows = sweep.run(&library, 1);
    let Outcome::Checked(v) = &rows[0].outcome else {
        panic!("reads")
    };
    let checked = railcheck::check("v.yaml", &text, &library).unwrap();
    let drop = margin(&checked.margins, RatingKind::WireDrop);
    assert!(close(drop.value, 0.126, 0.002), "{drop:?}");
    assert!(v.margin.is_some());
    // A net name with a `+` of its own is found whole.
    let plan = plan.replace("BATT+", "PACK+");
    let base = railcheck::check("heater.yaml", &plan, &library).unwrap();
    let vary = ["PACK++GND.wire=14 AWG".to_string()];
    let sweep = Sweep::new(&base, &library, &vary, 100).unwrap();
    assert!(
        sweep
            .variant(0)
            .contains("PACK+: { pins: [pack.pos, fuse.a], wire: 14 AWG }")
    );
}

/// The heater plan written to a folder of its own (kept while the folder is).
fn heater_on_disk() -> (tempfile::TempDir, std::path::PathBuf) {
    let dir = tempfile::tempdir().unwrap();
    let plan = dir.path().join("heater.yaml");
    std::fs::write(&plan, HEATER).unwrap();
    (dir, plan)
}

#[test]
fn a_library_id_of_another_class_is_refused_up_front() {
    let (_dir, plan) = heater_on_disk();
    let out = railcheck()
        .args([
            "sweep",
            "--vary",
            "pack=battery/lipo-4s,regulator/buck-5v-5a",
        ])
        .arg(&plan)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(
        stderr.contains("`regulator/buck-5v-5a` is a regulator, but `pack` is a battery")
            && stderr.contains("battery/lipo-2s"),
        "{stderr}"
    );
    assert!(out.stdout.is_empty());
}

#[test]
fn a_stopped_sweep_hands_over_what_it_finished_in_order() {
    let library = Library::builtin();
    let base = railcheck::check("heater.yaml", HEATER, &library).unwrap();
    let vary = [
        "HEAT.length=1 m,2 m,3 m,4 m,5 m".to_string(),
        "HEAT.wire=22 AWG,20 AWG,18 AWG,16 AWG".to_string(),
    ];
    let sweep = Sweep::new(&base, &library, &vary, 100).unwrap();
    let stop = AtomicBool::new(false);
    let mut seen = Vec::new();
    let complete = sweep.run_streaming(
        &library,
        2,
        &stop,
        |row| {
            seen.push(row.index);
            if seen.len() == 3 {
                stop.store(true, Ordering::Relaxed);
            }
        },
        |_| {},
    );
    assert!(!complete);
    assert!(seen.len() < 20 && seen.len() >= 3, "{seen:?}");
    assert!(seen.windows(2).all(|w| w[0] < w[1]), "{seen:?}");
    // Unstopped, every row comes in order, and the summary keeps the best
    // the full ordering would put first.
    let never = AtomicBool::new(false);
    let mut summary = Summary::new(Some(Rank::Peak), false);
    let mut all = Vec::new();
    assert!(sweep.run_streaming(
        &library,
        2,
        &never,
        |row| {
            summary.add(&row);
            all.push(row);
        },
        |_| {}
    ));
    assert_eq!(summary.checked, 20);
    assert!(all.iter().enumerate().all(|(i, r)| r.index == i));
    order(&mut all, Some(Rank::Peak), false);
    assert_eq!(summary.best.unwrap().index, all[0].index);
}

#[test]
fn json_lines_stream_a_header_every_row_and_an_end() {
    let (_dir, plan) = heater_on_disk();
    let out = railcheck()
        .args([
            "sweep",
            "--format",
            "json-lines",
            "--vary",
            "fuse=fuse/blade-3a,fuse/blade-5a",
            "--rank",
            "cost",
        ])
        .arg(&plan)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(0));
    let lines: Vec<serde_json::Value> = String::from_utf8(out.stdout)
        .unwrap()
        .lines()
        .map(|l| serde_json::from_str(l).unwrap())
        .collect();
    assert_eq!(lines.len(), 4);
    assert_eq!(lines[0]["kind"], "sweep");
    assert_eq!(lines[0]["combinations"], 2);
    assert_eq!(lines[1]["combination"], 1);
    assert_eq!(
        lines[1]["margin"]["rating"],
        "fuse rating (125 % of continuous)"
    );
    // 0.19 kg + 0.25 kg, 30 + 12.50.
    assert_eq!(lines[2]["mass_kg"], 0.44);
    assert_eq!(lines[2]["cost"], 42.5);
    assert_eq!(lines[3]["end"], true);
    assert_eq!(lines[3]["best"], 2);
    assert_eq!(lines[3]["interrupted"], false);
}

#[cfg(unix)]
#[test]
fn ctrl_c_writes_the_rows_checked_so_far_and_exits_130() {
    let (_dir, plan) = heater_on_disk();
    // 10,000 combinations on one thread take far longer than the second
    // before the interrupt.
    let lengths: Vec<String> = (1..=100).map(|i| format!("{i} cm")).collect();
    let wires: Vec<String> = (1..=100).map(|i| format!("{i} mm2")).collect();
    let child = std::process::Command::new(env!("CARGO_BIN_EXE_railcheck"))
        .args(["sweep", "--format", "csv", "--jobs", "1", "--vary"])
        .arg(format!("HEAT.length={}", lengths.join(",")))
        .arg("--vary")
        .arg(format!("HEAT.wire={}", wires.join(",")))
        .arg(&plan)
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    std::thread::sleep(std::time::Duration::from_millis(1500));
    let status = std::process::Command::new("kill")
        .args(["-INT", &child.id().to_string()])
        .status()
        .unwrap();
    assert!(status.success());
    let out = child.wait_with_output().unwrap();
    assert_eq!(out.status.code(), Some(130));
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(stderr.contains("interrupted"), "{stderr}");
    let mut reader = csv::Reader::from_reader(&out.stdout[..]);
    let records: Vec<csv::StringRecord> = reader.records().map(Result::unwrap).collect();
    assert!(
        !records.is_empty() && records.len() < 10_000,
        "{}",
        records.len()
    );
    // Whole records, numbered in combination order.
    for (i, record) in records.iter().enumerate() {
        assert_eq!(record[0], (i + 1).to_string());
    }
}

#[test]
fn piped_output_has_no_progress_bar_and_quiet_says_nothing() {
    let (_dir, plan) = heater_on_disk();
    let lengths: Vec<String> = (1..=40).map(|i| format!("{i} cm")).collect();
    let run = |quiet: bool| {
        let mut command = railcheck();
        command
            .args(["sweep", "--format", "csv", "--vary"])
            .arg(format!("HEAT.length={}", lengths.join(",")));
        if quiet {
            command.arg("--quiet");
        }
        command.arg(&plan).output().unwrap()
    };
    let out = run(false);
    assert_eq!(out.status.code(), Some(0));
    let stderr = String::from_utf8(out.stderr).unwrap();
    // Standard error is a pipe here: one line saying what runs, no bar
    // and no carriage returns redrawing one.
    assert_eq!(stderr.lines().count(), 1, "{stderr}");
    assert!(stderr.starts_with("railcheck: checking 40 combinations"));
    assert!(!stderr.contains(['\r', '█', '░']), "{stderr:?}");
    // Rows stream in combination order.
    let mut reader = csv::Reader::from_reader(&out.stdout[..]);
    let numbers: Vec<String> = reader
        .records()
        .map(|r| r.unwrap()[0].to_string())
        .collect();
    let expected: Vec<String> = (1..=40).map(|i| i.to_string()).collect();
    assert_eq!(numbers, expected);
    let quiet = run(true);
    assert!(
        quiet.stderr.is_empty(),
        "{:?}",
        String::from_utf8_lossy(&quiet.stderr)
    );
    assert_eq!(quiet.stdout, out.stdout);
}

#[test]
fn logic_margins_are_the_noise_margins_of_the_levels() {
    // TTL levels as written on the pins: VOH 2.4 V, VOL 0.4 V out; VIH
    // 2.0 V, VIL 0.8 V in. The noise margins are NMH = VOH − VIH = 0.4 V
    // and NML = VIL − VOL = 0.4 V (JEDEC JESD8 definitions; the TTL values
    // are the standard TTL table's). As shares: 0.4 / 2.0 = 20 % of VIH,
    // 0.4 / 0.8 = 50 % of VIL.
    let plan = "\
railcheck: 1
parts:
  pack: { use: battery/lipo-3s }
  fuse: { use: fuse/blade-5a }
  buck: { use: regulator/buck-5v-3a }
  tx:
    class: sensor
    pins:
      vcc: { role: supply-in, range: 4.5 V..5.5 V, draw: 10 mA }
      gnd: { role: ground }
      out: { role: logic-out, voh: 2.4 V, vol: 0.4 V }
  rx:
    class: sensor
    pins:
      vcc: { role: supply-in, range: 4.5 V..5.5 V, draw: 10 mA }
      gnd: { role: ground }
      in: { role: logic-in, vih: 2.0 V, vil: 0.8 V, max: 7 V }
nets:
  BATT+: [pack.pos, fuse.a]
  VB: [fuse.b, buck.vin]
  5V: [buck.vout, tx.vcc, rx.vcc]
  GND: [pack.neg, buck.gnd, tx.gnd, rx.gnd]
  SIG: [tx.out, rx.in]
";
    let checked = railcheck::check("ttl.yaml", plan, &Library::builtin()).unwrap();
    let high = margin(&checked.margins, RatingKind::LogicHigh);
    assert!(!high.upper && close(high.left(), 0.4, 1e-9), "{high:?}");
    assert!(close(high.share().unwrap(), 0.2, 1e-9));
    assert_eq!(high.at, "rx.in");
    let low = margin(&checked.margins, RatingKind::LogicLow);
    assert!(low.upper && close(low.left(), 0.4, 1e-9), "{low:?}");
    assert!(close(low.share().unwrap(), 0.5, 1e-9));
    // The 3 A buck feeds 2 × 10 mA: 3 − 0.02 = 2.98 A left, 99.3 %.
    let buck = margin(&checked.margins, RatingKind::RegulatorCurrent);
    assert!(close(buck.left(), 2.98, 1e-9), "{buck:?}");
}
