//! `railcheck wires`: the runs a builder cuts, the metres to buy and the
//! connector pinouts, checked against hand calculations from published
//! tables and against the plan's own lengths.

use assert_cmd::Command;
use railcheck::model::Library;
use railcheck::wirelist::{RunRole, WireList, wire_list};
use uom::si::electric_current::ampere;
use uom::si::electric_potential::volt;
use uom::si::length::meter;

fn list_of(path: &str) -> WireList {
    let text = std::fs::read_to_string(std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join(path))
        .unwrap();
    let checked = railcheck::check(path, &text, &Library::builtin()).expect("reads");
    wire_list(&checked)
}

fn railcheck() -> Command {
    Command::cargo_bin("railcheck").unwrap()
}

#[test]
fn the_battery_lead_drop_is_current_times_copper_resistance() {
    // 12 AWG: d = 0.127 mm × 92^((36 − 12)/39) = 2.053 mm (ASTM B258), area
    // 3.309 mm²; annealed copper 0.017241 Ω·mm²/m (IACS) → 5.210 mΩ/m at
    // 20 °C; the rover's 35 °C adds 0.00393/K × 15 K = 5.9 % (IEC 60028):
    // 5.517 mΩ/m. 5 cm of it at the lead's peak current I: V = I × 0.2759 mΩ.
    let list = list_of("examples/orchard-rover.yaml");
    let lead = list.runs.iter().find(|r| r.net == "BATT+").unwrap();
    assert_eq!(lead.from, "pack.pos");
    assert_eq!(lead.to, vec!["main_fuse.a".to_string()]);
    let peak = lead.peak.unwrap().get::<ampere>();
    let expected = peak * 0.2759e-3;
    let drop = lead.drop_at_peak.unwrap().get::<volt>();
    assert!(
        (drop - expected).abs() / expected < 0.01,
        "{drop} V vs {expected} V"
    );
    // Ahead of the fuse: nothing protects it, and the list says so.
    assert!(lead.fuses.is_empty());
}

#[test]
fn the_metres_to_buy_add_up_the_plans_lengths() {
    // The rover's 12 AWG runs: BATT+ 5 cm, PACK_LEAD 15 cm, BATT- 20 cm = 0.40 m;
    // 18 AWG: 5V 40 cm + four motor leads of 50 cm = 2.40 m; USB cable:
    // 0.5 + 0.8 + 0.8 + 1 = 3.1 m (the plan's own numbers).
    let list = list_of("examples/orchard-rover.yaml");
    let total = |size: &str, cable: bool| {
        list.totals
            .iter()
            .find(|t| t.wire.to_string() == size && t.cable == cable)
            .map(|t| (t.length.get::<meter>(), t.runs))
    };
    let (m12, runs12) = total("12 AWG", false).unwrap();
    assert!(
        (m12 - 0.40).abs() < 1e-9 && runs12 == 3,
        "{m12} m, {runs12} runs"
    );
    let (m18, runs18) = total("18 AWG", false).unwrap();
    assert!(
        (m18 - 2.40).abs() < 1e-9 && runs18 == 5,
        "{m18} m, {runs18} runs"
    );
    let (usb, cables) = total("28 AWG", true).unwrap();
    assert!(
        (usb - 3.1).abs() < 1e-9 && cables == 4,
        "{usb} m, {cables} cables"
    );
}

#[test]
fn runs_are_listed_thickest_first_then_unsized_then_usb() {
    // A builder cuts from one reel at a time: conductor area never grows
    // down the list (ASTM B258 areas: 12 AWG 3.31 mm² > 14 AWG 2.08 mm² >
    // 18 AWG 0.823 mm²).
    let list = list_of("examples/greenhouse-picker.yaml");
    let area = |size: &str| match size {
        "12 AWG" => 3.31,
        "14 AWG" => 2.08,
        "16 AWG" => 1.31,
        "18 AWG" => 0.823,
        "28 AWG" => 0.081,
        other => panic!("unexpected size {other}"),
    };
    let sized: Vec<f64> = list
        .runs
        .iter()
        .filter(|r| r.role != RunRole::Usb)
        .map_while(|r| r.wire.map(|w| area(&w.to_string())))
        .collect();
    assert!(sized.windows(2).all(|w| w[0] >= w[1]), "{sized:?}");
    let first_usb = list
        .runs
        .iter()
        .position(|r| r.role == RunRole::Usb)
        .unwrap();
    assert!(
        list.runs[first_usb..]
            .iter()
            .all(|r| r.role == RunRole::Usb)
    );
    assert!(
        list.runs[..first_usb]
            .iter()
            .all(|r| r.role != RunRole::Usb)
    );
    // The first run is the battery's positive lead.
    assert_eq!(list.runs[0].from, "pack.pos");
}

#[test]
fn a_motor_lead_carries_its_motor_current_and_its_drivers_fuse() {
    // The picker's front-left lead: 0.5 A running (the motor's rated
    // current, its continuous state in `drive`) and the brief push stall at
    // peak, about 12.2 V / 2.4 Ω ≈ 5.1 A (stall current V / R_winding with
    // R = 12 V / 5 A), behind the drive fuse.
    let list = list_of("examples/greenhouse-picker.yaml");
    let lead = list.runs.iter().find(|r| r.net == "FL_A").unwrap();
    assert_eq!(lead.role, RunRole::Motor);
    assert!((lead.continuous.unwrap().get::<ampere>() - 0.5).abs() < 1e-6);
    let peak = lead.peak.unwrap().get::<ampere>();
    assert!((4.8..5.3).contains(&peak), "{peak} A");
    assert_eq!(lead.fuses, vec!["drive_fuse".to_string()]);
}

#[test]
fn a_pinout_gives_each_contacts_nets_and_current() {
    // Every ampere the pack gives passes the plug's positive contact and
    // returns through its negative one (Kirchhoff's current law).
    let list = list_of("examples/orchard-rover.yaml");
    let plug = list
        .pinouts
        .iter()
        .find(|p| p.connector == "pack_plug")
        .unwrap();
    assert_eq!(plug.library_id.as_deref(), Some("connector/power-2pin-30a"));
    let positive = &plug.contacts[0];
    assert_eq!((positive.a.as_str(), positive.b.as_str()), ("a1", "b1"));
    assert_eq!(positive.net_a.as_deref(), Some("PACK_LEAD"));
    assert_eq!(positive.net_b.as_deref(), Some("VBAT"));
    let negative = &plug.contacts[1];
    let (p, n) = (positive.peak.unwrap(), negative.peak.unwrap());
    assert!((p - n).get::<ampere>().abs() < 1e-6, "{p:?} vs {n:?}");
    let lead = list.runs.iter().find(|r| r.net == "BATT+").unwrap();
    assert!((lead.peak.unwrap() - p).get::<ampere>().abs() < 1e-6);
}

#[test]
fn csv_has_one_row_per_run_and_quotes_what_needs_it() {
    // RFC 4180: a field holding a comma or a quote is quoted, quotes doubled.
    let plan = "railcheck: 1\nparts:\n  pack: { use: battery/lipo-3s, with: { cutoff: true } }\n  fuse: { use: fuse/blade-2a }\n  fan: { use: load/fan-12v }\nnets:\n  BATT+: { pins: [pack.pos, fuse.a], wire: 18 AWG, length: 10 cm, colour: 'red, \"hot\" stripe' }\n  FAN: { pins: [fuse.b, fan.vin], wire: 20 AWG, length: 1 m }\n  GND: { pins: [pack.neg, fan.gnd], wire: 20 AWG, length: 1 m, colour: black }\n";
    let output = railcheck()
        .args(["wires", "--format", "csv", "-"])
        .write_stdin(plan)
        .output()
        .unwrap();
    assert_eq!(output.status.code(), Some(0));
    let text = String::from_utf8(output.stdout).unwrap();
    let mut reader = csv::Reader::from_reader(text.as_bytes());
    let headers = reader.headers().unwrap().clone();
    assert_eq!(&headers[1], "net");
    let rows: Vec<csv::StringRecord> = reader.records().map(Result::unwrap).collect();
    assert_eq!(rows.len(), 3, "{text}");
    let colour = headers.iter().position(|h| h == "colour").unwrap();
    assert_eq!(&rows[0][colour], "red, \"hot\" stripe");
    assert!(text.contains("\"red, \"\"hot\"\" stripe\""), "{text}");
    // Lengths in metres, so a spreadsheet can add them: 0.1 + 1 + 1.
    let length = headers.iter().position(|h| h == "length_m").unwrap();
    let sum: f64 = rows.iter().map(|r| r[length].parse::<f64>().unwrap()).sum();
    assert!((sum - 2.1).abs() < 1e-9);
}

#[test]
fn wires_refuses_sarif_and_keeps_csv_output_clean_of_errors() {
    let sarif = railcheck()
        .args(["wires", "--format", "sarif", "examples/orchard-rover.yaml"])
        .output()
        .unwrap();
    assert_eq!(sarif.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&sarif.stderr).contains("SARIF"));
    // A plan that cannot be read: the problem goes to standard error, so
    // nothing that is not CSV reaches standard output.
    let broken = railcheck()
        .args(["wires", "--format", "csv", "-"])
        .write_stdin("railcheck: 1\nparts: { pack: { use: battery/lipo-9s } }\nnets: {}\n")
        .output()
        .unwrap();
    assert_eq!(broken.status.code(), Some(2));
    assert!(broken.stdout.is_empty());
    assert!(String::from_utf8_lossy(&broken.stderr).contains("lipo-9s"));
}
