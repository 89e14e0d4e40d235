//! The greenhouse picker (`examples/greenhouse-picker.yaml`): a realistic
//! robot of 47 parts with a mixed 5 V / 3.3 V I²C bus, brief stall modes and
//! six servos. Sound, it gives no finding at all; broken in one way at a
//! time, it gives exactly one finding, from the rule that owns that mistake.
//! Each mistake's hand calculation and source is beside it.

use railcheck::model::Library;

const PLAN: &str = "examples/greenhouse-picker.yaml";

fn plan() -> String {
    std::fs::read_to_string(std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join(PLAN))
        .expect("the example reads")
}

/// The plan with each `(from, to)` edit applied; every `from` must occur
/// exactly once, so a change to the example cannot turn a mistake into a
/// no-op.
fn broken(edits: &[(&str, &str)]) -> String {
    let mut text = plan();
    for (from, to) in edits {
        assert_eq!(
            text.matches(from).count(),
            1,
            "`{from}` occurs once in the example"
        );
        text = text.replacen(from, to, 1);
    }
    text
}

/// Rule ids of every finding, or `input` once per input problem.
fn verdict(text: &str) -> Vec<String> {
    match railcheck::check(PLAN, text, &Library::builtin()) {
        Ok(checked) => checked
            .findings
            .iter()
            .map(|f| format!("{} — {}", f.rule, f.message))
            .collect(),
        Err(failure) => failure
            .errors
            .iter()
            .map(|e| format!("input — {}", e.message))
            .collect(),
    }
}

#[test]
fn the_sound_robot_gives_no_finding() {
    let text = plan();
    let found = verdict(&text);
    assert!(found.is_empty(), "{found:#?}");
    // It is the size the example promises: 40–80 parts.
    let checked = railcheck::check(PLAN, &text, &Library::builtin()).expect("reads");
    let parts = checked.plan.parts.len();
    assert!((40..=80).contains(&parts), "{parts} parts");
}

struct Mistake {
    what: &'static str,
    edits: &'static [(&'static str, &'static str)],
    rule: &'static str,
}

const MISTAKES: &[Mistake] = &[
    Mistake {
        // The rear driver's 5 V logic supply left off the rail while the
        // controller drives its six inputs: back-powering through the input
        // clamps (VDD + 0.3 V with VDD = 0, JEDEC JESD8).
        what: "driver logic supply unconnected",
        edits: &[(
            "front_drive.vlogic, rear_drive.vlogic, ldo.vin",
            "front_drive.vlogic, ldo.vin",
        )],
        rule: "logic/unpowered-input",
    },
    Mistake {
        // The 3.3 V side's SDA pull-up taken to 5 V: the line idles at
        // 5.1 V, above the sensors' 3.37 + 0.3 = 3.67 V ceiling (JEDEC
        // JESD8). One finding for the signal, however many devices share it.
        what: "3.3 V-side pull-up on the 5 V rail",
        edits: &[
            (
                "i2c_shifter.lv, imu.vcc, leaf_temp.vcc, sda3_pullup.a,",
                "i2c_shifter.lv, imu.vcc, leaf_temp.vcc,",
            ),
            (
                "sda5_pullup.a, scl5_pullup.a]",
                "sda5_pullup.a, scl5_pullup.a, sda3_pullup.a]",
            ),
        ],
        rule: "logic/overvoltage",
    },
    Mistake {
        // The leaf sensor's SDA wired to the 5 V side of the translator:
        // the 5 V pull-up lifts its pin past its 3.3 V ceiling.
        what: "3.3 V sensor data on the 5 V side of the bus",
        edits: &[
            (
                "SDA5: [mcu.sda, i2c_shifter.b1, sda5_pullup.b]",
                "SDA5: [mcu.sda, i2c_shifter.b1, sda5_pullup.b, leaf_temp.sda]",
            ),
            (
                "imu.sda, leaf_temp.sda, sda3_pullup.b",
                "imu.sda, sda3_pullup.b",
            ),
        ],
        rule: "logic/overvoltage",
    },
    Mistake {
        // 3 m of 28 AWG (0.2129 Ω/m at 20 °C, ASTM B258) out and back, at the
        // plan's 30 °C (+3.9 %, IEC 60028 0.00393/K): 1.33 Ω × 250 mA
        // streaming = 0.33 V, 6.8 % of the port's 4.88 V: above 5 %.
        what: "camera on a 3 m thin cable",
        edits: &[(
            "{ usb: [sbc.usb2, camera.usb], wire: 28 AWG, length: 1 m }",
            "{ usb: [sbc.usb2, camera.usb], wire: 28 AWG, length: 3 m }",
        )],
        rule: "wire/drop",
    },
    Mistake {
        // The hand servos' branch taken ahead of the stop: three actuators
        // stay powered when it is struck.
        what: "servo supply ahead of the stop",
        edits: &[
            (
                "VSTOP: { pins: [estop.b, drive_fuse.a, arm_fuse.a, hand_fuse.a]",
                "VSTOP: { pins: [estop.b, drive_fuse.a, arm_fuse.a]",
            ),
            (
                "estop.a, logic_fuse.a, box_fan.vin]",
                "estop.a, logic_fuse.a, hand_fuse.a, box_fan.vin]",
            ),
        ],
        rule: "safety/no-stop",
    },
    Mistake {
        // A stop rated 12 V DC on a 3S pack: full charge is 3 × 4.20 V =
        // 12.6 V (Handbook of Batteries), which it must break.
        what: "stop switch rated below the pack's full voltage",
        edits: &[(
            "estop: { use: switch/estop-20a }",
            "estop: { use: switch/estop-20a, with: { voltage: 12 V } }",
        )],
        rule: "switch/voltage",
    },
    Mistake {
        // Two wheels pushed against a pipe for 3 s: 2 × 5 A × 12.6 V / 12 V
        // (stall current scales with voltage) + two wheels running ≈ 11 A
        // through a 10 A fast blade fuse; ISO 8820-3 lets it open from
        // 0.75 s at 110–135 % of its rating, so it may blow during the push.
        what: "drive fuse sized for cruising only",
        edits: &[(
            "drive_fuse: { use: fuse/blade-20a }",
            "drive_fuse: { use: fuse/blade-10a }",
        )],
        rule: "fuse/nuisance",
    },
    Mistake {
        // The arm branch carries 7.4 V × 1.8 A / (0.92 × 8.9 V) ≈ 1.65 A
        // continuously at an empty pack (power balance of a buck): a 1 A fuse
        // blows in normal work. One finding, not a second for the grip peak.
        what: "arm fuse below its steady current",
        edits: &[(
            "arm_fuse: { use: fuse/blade-15a }",
            "arm_fuse: { use: fuse/blade-1a }",
        )],
        rule: "fuse/undersized",
    },
    Mistake {
        // 18 AWG carries 16 A in chassis wiring (Handbook of Electronic
        // Tables and Formulas); 22 AWG only 7 A, below the 20 A drive fuse
        // that must protect it.
        what: "motor bus in thin wire behind a 20 A fuse",
        edits: &[(
            "VMOT: { pins: [drive_fuse.b, front_drive.vm, rear_drive.vm], wire: 14 AWG",
            "VMOT: { pins: [drive_fuse.b, front_drive.vm, rear_drive.vm], wire: 22 AWG",
        )],
        rule: "fuse/oversized",
    },
    Mistake {
        // Three servos stalled in `worst`: 3 × 1.5 A = 4.5 A from a 3 A buck.
        what: "hand servo buck too small",
        edits: &[(
            "hand_buck: { use: regulator/buck-5v-5a }",
            "hand_buck: { use: regulator/buck-5v-3a }",
        )],
        rule: "current/over-rating",
    },
    Mistake {
        // The hand servo lead in 20 AWG run past the lamp housing at 70 °C:
        // copper's resistance rises by 0.00393/K × 50 K = 20 % (IEC 60028),
        // and 4.5 A of stalled servos pull the 4.9 V rail below their 4.8 V
        // minimum. One finding for the rail, not one per servo, and none for
        // the pulses that follow the sagging servo supply.
        what: "thin servo lead in a hot spot",
        edits: &[(
            "SERVO_5V: { pins: [hand_buck.vout, wrist.vin, gripper.vin, tilt.vin], wire: 18 AWG, length: 60 cm }",
            "SERVO_5V: { pins: [hand_buck.vout, wrist.vin, gripper.vin, tilt.vin], wire: 20 AWG, length: 60 cm, ambient: 70 degC }",
        )],
        rule: "voltage/under-range",
    },
    Mistake {
        // A 3.3 V sensor (absolute maximum 4 V) on the 5 V rail: 5.1 V at the
        // buck's tolerance top. Its logic pins are not reported again.
        what: "3.3 V sensor on the 5 V rail",
        edits: &[
            (
                "3V3: [ldo.vout, i2c_shifter.lv, imu.vcc,",
                "3V3: [ldo.vout, i2c_shifter.lv,",
            ),
            (
                "sbc.vin, front_drive.vlogic",
                "sbc.vin, imu.vcc, front_drive.vlogic",
            ),
        ],
        rule: "voltage/over-max",
    },
    Mistake {
        what: "fan ground left off",
        edits: &[(
            "logic_buck.gnd, ldo.gnd, box_fan.gnd,",
            "logic_buck.gnd, ldo.gnd,",
        )],
        rule: "ground/floating",
    },
    Mistake {
        // Every wheel stalled at once in `worst` without the plan's bound:
        // about 4 × 5.25 A + the rest = 30 A through a 25 A fast fuse.
        what: "no bound on simultaneous stalls",
        edits: &[("limits:\n  stall_at_once: 2\n", "")],
        rule: "fuse/nuisance",
    },
    Mistake {
        what: "pack without a low-voltage cut-off",
        edits: &[("      cutoff: true\n", "      cutoff: false\n")],
        rule: "battery/no-cutoff",
    },
    Mistake {
        // The sensor's push-pull interrupt output joined to a servo pulse
        // line the controller also drives.
        what: "two outputs on one line",
        edits: &[(
            "GRIP_PWM: [mcu.d18, gripper_r.a]",
            "GRIP_PWM: [mcu.d18, gripper_r.a, imu.int]",
        )],
        rule: "logic/contention",
    },
    Mistake {
        what: "rangefinder trigger on an input pin",
        edits: &[(
            "TRIG: [mcu.d19, ranger.trig]",
            "TRIG: [mcu.rx, ranger.trig]",
        )],
        rule: "logic/undriven",
    },
    Mistake {
        // A length with no unit: one input error, suggesting centimetres.
        what: "a length without its unit",
        edits: &[(
            "FL_A: { pins: [front_drive.out1a, front_left.a], wire: 18 AWG, length: 40 cm }",
            "FL_A: { pins: [front_drive.out1a, front_left.a], wire: 18 AWG, length: 40 }",
        )],
        rule: "input",
    },
];

#[test]
fn each_mistake_gives_exactly_one_finding_from_its_rule() {
    let mut failures = Vec::new();
    for mistake in MISTAKES {
        let found = verdict(&broken(mistake.edits));
        let one_from_rule =
            found.len() == 1 && found[0].starts_with(&format!("{} — ", mistake.rule));
        if !one_from_rule {
            failures.push(format!(
                "{} (expected one {}): {found:#?}",
                mistake.what, mistake.rule
            ));
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

#[test]
fn the_unitless_length_is_read_as_centimetres() {
    // A robot's wire run of 40 is plausibly 40 cm, not 40 m.
    let text = broken(&[(
        "FL_A: { pins: [front_drive.out1a, front_left.a], wire: 18 AWG, length: 40 cm }",
        "FL_A: { pins: [front_drive.out1a, front_left.a], wire: 18 AWG, length: 40 }",
    )]);
    let failure = railcheck::check(PLAN, &text, &Library::builtin()).expect_err("an input error");
    assert_eq!(failure.errors.len(), 1);
    let hint = format!("{:?}", failure.errors[0].hint);
    assert!(hint.contains("40 cm"), "{hint}");
}
