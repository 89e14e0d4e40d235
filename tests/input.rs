//! Input problems in a plan: where they are reported and what the user is told.
//!
//! For: the format reference's promise about input errors (docs/format.md, the paragraph on input
//! problems after the §7 rule table, and the JSON form in §8): every problem in the plan (§1
//! file, §2 quantities, §3 parts, §4 nets, §5 links, §6 modes and profile) is reported at the
//! line and column of the offending text, with a hint that says how to fix it; a YAML syntax
//! error may stop at the first, every other problem comes in the same run; hostile input is
//! refused quickly and never panics.
//!
//! Not for: findings of the rules on a plan that was read (those have their own tests).
//!
//! Lines and columns are 1-based, columns counted in characters; every expected position
//! below was counted from the plan text beside it, independently of railcheck.

use assert_cmd::Command;
use proptest::prelude::*;
use railcheck::model::Library;
use railcheck::report::{self, HumanStyle};
use std::io::Write;
use std::sync::LazyLock;

const PLAN: &str = "plan.yaml";

static LIBRARY: LazyLock<Library> = LazyLock::new(Library::builtin);

/// One reported input problem, with its position resolved.
#[derive(Debug, Clone)]
struct Reported {
    file: String,
    line: usize,
    column: usize,
    /// The source text from the start of the span to the end of its line.
    at: String,
    message: String,
    hint: Option<String>,
}

/// Every input problem reported for `text`; fails the test if the plan was read.
fn input_errors(text: &str) -> Vec<Reported> {
    match railcheck::check(PLAN, text, &LIBRARY) {
        Ok(checked) => panic!(
            "expected input errors, but the plan was read ({} findings)",
            checked.findings.len()
        ),
        Err(failure) => failure
            .errors
            .iter()
            .map(|e| {
                let source = failure.sources.text(e.span.source);
                let (line, column) = failure.sources.line_column(e.span);
                let rest = source.get(e.span.start..).unwrap_or("");
                Reported {
                    file: failure.sources.name(e.span.source).to_string(),
                    line,
                    column,
                    at: rest.lines().next().unwrap_or("").to_string(),
                    message: e.message.clone(),
                    hint: e.hint.clone(),
                }
            })
            .collect(),
    }
}

/// The one input problem reported for `text`.
fn single_error(text: &str) -> Reported {
    let errors = input_errors(text);
    assert_eq!(errors.len(), 1, "expected exactly one error: {errors:#?}");
    errors.into_iter().next().unwrap()
}

/// The reported problem whose message mentions `needle`.
fn error_mentioning(errors: &[Reported], needle: &str) -> Reported {
    errors
        .iter()
        .find(|e| e.message.contains(needle))
        .unwrap_or_else(|| panic!("no error mentions {needle:?}: {errors:#?}"))
        .clone()
}

/// The problem is in the plan at `line`:`column`, and the text there starts with `token`.
fn assert_at(error: &Reported, line: usize, column: usize, token: &str) {
    assert_eq!(error.file, PLAN, "{error:#?}");
    assert_eq!((error.line, error.column), (line, column), "{error:#?}");
    assert!(
        error.at.starts_with(token),
        "expected the span to start at {token:?}: {error:#?}"
    );
}

/// The hint exists and names every piece of the fix.
fn assert_hint(error: &Reported, fix: &[&str]) {
    let Some(hint) = &error.hint else {
        panic!("no hint: {error:#?}");
    };
    for piece in fix {
        assert!(hint.contains(piece), "hint lacks {piece:?}: {error:#?}");
    }
}

// ----- YAML syntax (input-error paragraph: a syntax error may stop at the first) ------------

/// Input problems: bad YAML stops the run with a diagnostic at the offending line.
#[test]
fn yaml_unclosed_bracket_points_at_the_bracket() {
    let plan = "railcheck: 1\nparts: [pack, fuse\n";
    let error = single_error(plan);
    // The bracket opened on line 2 at column 8 and never closed.
    assert_at(&error, 2, 8, "[");
    assert!(error.message.contains("bracket"), "{error:#?}");
    assert_hint(&error, &["YAML"]);
}

/// Input problems: bad YAML, reported where the indentation goes wrong.
#[test]
fn yaml_bad_indentation_points_at_the_misplaced_key() {
    let plan = "\
railcheck: 1
parts:
  pack: { use: battery/lipo-3s }
 fuse: { use: fuse/blade-10a }
nets: {}
";
    let error = single_error(plan);
    // `fuse` is indented by one space where the mapping's keys sit at two.
    assert_at(&error, 4, 2, "fuse");
    assert_hint(&error, &["YAML"]);
}

/// §1 and input problems: a key given twice is bad YAML, reported at the repeat.
#[test]
fn yaml_duplicate_key_points_at_the_second_one() {
    let plan = "railcheck: 1\nparts: {}\nnets: {}\nparts: {}\n";
    let error = single_error(plan);
    assert_at(&error, 4, 1, "parts");
    assert!(error.message.contains("parts"), "{error:#?}");
    assert!(error.hint.is_some(), "{error:#?}");
}

/// Input problems: "a diagnostic at the offending line" that the plan's author can act on.
///
/// The reader's own vocabulary (its option names, its API, its debug output) means nothing to
/// someone writing a plan, and the position is shown beside the message already.
#[test]
fn yaml_messages_speak_of_the_plan_not_of_the_reader() {
    let cases = [
        (
            "duplicate key",
            "railcheck: 1\nparts: {}\nparts: {}\nnets: {}\n",
        ),
        ("two documents", "railcheck: 1\n---\nrailcheck: 1\n"),
        ("unclosed bracket", "railcheck: 1\nparts: [pack, fuse\n"),
    ];
    let mut problems = Vec::new();
    for (what, plan) in cases {
        let error = single_error(plan);
        let leaks = ["Policy", "Options", "from_str", "budget breached"];
        if leaks.iter().any(|l| error.message.contains(l)) {
            problems.push(format!(
                "{what}: names the reader's internals: {}",
                error.message
            ));
        }
        if error.message.contains(" at line ") {
            problems.push(format!("{what}: repeats the position: {}", error.message));
        }
    }
    assert!(problems.is_empty(), "{problems:#?}");
}

// ----- §1 the file ------------------------------------------------------------------------

/// §1: `railcheck:` is required.
#[test]
fn missing_format_version_points_at_the_first_key() {
    let plan = "name: Orchard scout\nparts: {}\nnets: {}\n";
    let error = single_error(plan);
    assert_at(&error, 1, 1, "name");
    assert_hint(&error, &["railcheck: 1"]);
}

/// §1: the format version is 1.
#[test]
fn wrong_format_version_points_at_the_number() {
    let plan = "railcheck: 2\nparts: {}\nnets: {}\n";
    let error = single_error(plan);
    assert_at(&error, 1, 12, "2");
    assert_hint(&error, &["railcheck: 1"]);
}

/// §1: unknown keys are an input error ("a typo must not pass silently").
#[test]
fn unknown_top_level_key_suggests_the_near_spelling() {
    let plan = "railcheck: 1\nambiant: 30 degC\nparts: {}\nnets: {}\n";
    let error = single_error(plan);
    assert_at(&error, 2, 1, "ambiant");
    assert_hint(&error, &["`ambient`"]);
}

/// §1: unknown keys are an input error; the hint names the near spelling.
///
/// Two swapped letters are the most common typo of all; `nest` is one step from `nets`.
#[test]
fn unknown_key_with_two_letters_swapped_suggests_the_key() {
    let plan = "railcheck: 1\nparts: {}\nnest: {}\n";
    let errors = input_errors(plan);
    let error = error_mentioning(&errors, "`nest`");
    assert_at(&error, 3, 1, "nest");
    assert_hint(&error, &["did you mean `nets`"]);
}

// ----- §3 parts ---------------------------------------------------------------------------

/// §1 and §3: unknown keys inside a part, library (`with:`) or inline.
#[test]
fn unknown_key_inside_a_part_suggests_the_field() {
    // Under `with:` of a library part.
    let plan = "\
railcheck: 1
parts:
  pack: { use: battery/lipo-3s, with: { capacty: 5 Ah } }
nets: {}
";
    let error = single_error(plan);
    assert_at(&error, 3, 41, "capacty");
    assert_hint(&error, &["`capacity`"]);

    // In a part written inline.
    let plan = "\
railcheck: 1
parts:
  pack:
    class: battery
    chemistry: lipo
    cells: 3
    capacty: 5 Ah
nets: {}
";
    let error = single_error(plan);
    assert_at(&error, 7, 5, "capacty");
    assert_hint(&error, &["`capacity`"]);
}

/// §3: `use:` names a library part id.
#[test]
fn unknown_library_part_suggests_the_near_id() {
    let plan = "railcheck: 1\nparts:\n  pack: { use: battery/lipo-3z }\nnets: {}\n";
    let error = single_error(plan);
    assert_at(&error, 3, 16, "battery/lipo-3z");
    assert_hint(&error, &["`battery/lipo-3s`"]);
}

/// §3: classes are the ones of the class table.
#[test]
fn unknown_class_suggests_the_near_class() {
    let plan = "\
railcheck: 1
parts:
  lamp: { class: lod, pins: { vin: { role: supply-in } } }
nets: {}
";
    let error = single_error(plan);
    assert_at(&error, 3, 18, "lod");
    assert_hint(&error, &["`load`"]);
}

/// §3 pin roles: a declared pin of a `load` needs a role.
#[test]
fn pin_without_role_points_at_the_pin_and_lists_roles() {
    let plan = "\
railcheck: 1
parts:
  lamp:
    class: load
    pins:
      vin: { range: 10 V..15 V }
      gnd: { role: ground }
nets: {}
";
    let error = single_error(plan);
    assert_at(&error, 6, 7, "vin");
    assert_hint(&error, &["role:", "`supply-in`"]);
}

/// §3 pin roles: the role is one of the table.
#[test]
fn unknown_role_suggests_the_near_role() {
    let plan = "\
railcheck: 1
parts:
  lamp: { class: load, pins: { vin: { role: supply-inn }, gnd: { role: ground } } }
nets: {}
";
    let error = single_error(plan);
    assert_at(&error, 3, 45, "supply-inn");
    assert_hint(&error, &["`supply-in`"]);
}

/// §3 battery: `cells` is the series count, a whole number.
#[test]
fn cells_that_are_not_a_whole_number_are_refused() {
    for (plan, token) in [
        (
            "railcheck: 1\nparts:\n  pack: { use: battery/lipo-3s, with: { cells: three } }\nnets: {}\n",
            "three",
        ),
        (
            "railcheck: 1\nparts:\n  pack: { use: battery/lipo-3s, with: { cells: 3.5 } }\nnets: {}\n",
            "3.5",
        ),
    ] {
        let error = single_error(plan);
        assert_at(&error, 3, 48, token);
        assert_hint(&error, &["cells: 3"]);
    }
}

/// §3 battery: `cutoff: true` if a cutoff is fitted.
#[test]
fn bad_boolean_says_true_or_false() {
    let plan =
        "railcheck: 1\nparts:\n  pack: { use: battery/lipo-3s, with: { cutoff: yes } }\nnets: {}\n";
    let error = single_error(plan);
    assert_at(&error, 3, 49, "yes");
    assert_hint(&error, &["`true`", "`false`"]);
}

/// §3 driver: each channel names two declared `bridge-out` pins.
#[test]
fn driver_channel_naming_a_pin_that_is_not_a_bridge_output() {
    let plan = "\
railcheck: 1
parts:
  drive: { use: driver/bipolar-dual-2a, with: { channels: { 1: [out1a, out1b], 2: [out2a, in1] } } }
nets: {}
";
    let error = single_error(plan);
    assert_at(&error, 3, 91, "in1");
    assert_hint(&error, &["bridge-out"]);
}

// ----- §2 quantities ----------------------------------------------------------------------

/// §2: "a bare number where a unit is needed is an input error that says which unit to add".
#[test]
fn value_without_unit_says_which_unit_to_add() {
    let plan =
        "railcheck: 1\nparts:\n  pack: { use: battery/lipo-3s, with: { capacity: 5 } }\nnets: {}\n";
    let error = single_error(plan);
    assert_at(&error, 3, 51, "5");
    assert_hint(&error, &["`5 Ah`"]);
}

/// §2: a voltage takes a voltage unit.
#[test]
fn wrong_kind_of_unit_points_at_the_unit() {
    let plan = "\
railcheck: 1
parts:
  lamp: { class: load, pins: { vin: { role: supply-in, max: 5 A } } }
nets: {}
";
    let error = single_error(plan);
    assert_at(&error, 3, 63, "A");
    assert!(error.message.contains("voltage"), "{error:#?}");
    assert_hint(&error, &["`5 V`"]);
}

/// §2: accepted units per quantity.
#[test]
fn unknown_unit_points_at_the_unit() {
    let plan = "\
railcheck: 1
parts:
  lamp: { class: load, pins: { vin: { role: supply-in, max: 16 Q } } }
nets: {}
";
    let error = single_error(plan);
    assert_at(&error, 3, 64, "Q");
    assert_hint(&error, &["`16 V`"]);
}

/// §2: ranges `4.5..5.5 V`, low end first.
#[test]
fn reversed_range_shows_it_the_right_way_round() {
    let plan = "\
railcheck: 1
parts:
  lamp: { class: load, pins: { vin: { role: supply-in, range: 5..4 V } } }
nets: {}
";
    let error = single_error(plan);
    assert_at(&error, 3, 63, "5..4 V");
    assert_hint(&error, &["`4..5 V`"]);
}

/// §2: nominal with tolerance, `5 V ±2%`.
#[test]
fn tolerance_without_unit_shows_a_tolerance() {
    let plan = "\
railcheck: 1
parts:
  mcu: { use: board/mcu-8bit-5v, pins: { 5v: { voltage: 5 V ±2 } } }
nets: {}
";
    let error = single_error(plan);
    // `±` is one character: the `2` after it is column 62.
    assert_at(&error, 3, 62, "2");
    assert_hint(&error, &["±2%"]);
}

/// §2: nominal with tolerance, `5 V ±2%`.
///
/// `5 V ±x%`: the value is fine, the tolerance has no number; a hint that shows only `5 V`
/// would lead the user to drop the tolerance.
#[test]
fn tolerance_without_number_hint_shows_a_tolerance() {
    let plan = "\
railcheck: 1
parts:
  mcu: { use: board/mcu-8bit-5v, pins: { 5v: { voltage: 5 V ±x% } } }
nets: {}
";
    let error = single_error(plan);
    assert_at(&error, 3, 62, "x%");
    assert_hint(&error, &["±"]);
}

/// §2 and input problems: the column is that of the offending text, not of the quote.
#[test]
fn quoted_value_error_column_skips_the_quote() {
    // Double quotes: the `5` sits one column right of the quote at 51.
    let plan = "railcheck: 1\nparts:\n  pack: { use: battery/lipo-3s, with: { capacity: \"5\" } }\nnets: {}\n";
    let error = single_error(plan);
    assert_at(&error, 3, 52, "5");
    assert_hint(&error, &["`5 Ah`"]);

    // Single quotes, with the error inside the scalar.
    let plan = "\
railcheck: 1
parts:
  lamp: { class: load, pins: { vin: { role: supply-in, max: '16 Q' } } }
nets: {}
";
    let error = single_error(plan);
    assert_at(&error, 3, 65, "Q");
    assert_hint(&error, &["`16 V`"]);
}

/// §2 (`µA`, `kΩ`) and §8 (`column`): columns count characters.
#[test]
fn columns_count_multibyte_characters_as_one() {
    // Two `µ` (2 bytes each in UTF-8) before the error: byte offset and column differ by 2.
    let plan = "\
railcheck: 1
parts:
  pump: { class: load, pins: { vin: { role: supply-in, draw: { idle: 50 µA, typical: 120 µA, peak: 2 µV } } } }
nets: {}
";
    let error = single_error(plan);
    assert_at(&error, 3, 102, "µV");
    assert_hint(&error, &["`2 µA`"]);

    // `Ω` is 3 bytes; the second one is a resistance unit where a power is needed.
    let plan = "\
railcheck: 1
parts:
  r1: { class: resistor, value: 10 kΩ, power: 0.25 Ω }
nets: {}
";
    let error = single_error(plan);
    assert_at(&error, 3, 52, "Ω");
    assert_hint(&error, &["W"]);
}

/// §3: a part names a library part and overrides some of its values; a bad override is
/// the plan's mistake.
#[test]
fn overrides_of_a_library_part_are_reported_in_the_plan() {
    // `with:` replaces a library field; the library file itself is fine.
    let plan = "\
railcheck: 1
parts:
  pack: { use: battery/lipo-3s, with: { capacity: 5 mA } }
nets: {}
";
    let error = single_error(plan);
    assert_at(&error, 3, 53, "mA");
    assert_hint(&error, &["Ah"]);

    // `pins:` beside `use:` overrides a pin field.
    let plan = "\
railcheck: 1
parts:
  buck: { use: regulator/buck-5v-3a, pins: { vin: { max: 40 } } }
nets: {}
";
    let error = single_error(plan);
    assert_at(&error, 3, 58, "40");
    assert_hint(&error, &["`40 V`"]);
}

/// §3: overrides are the plan's; input problems are reported at the offending line.
///
/// `with: { class: ... }` turns the library part's own fields into unknown keys; the user's
/// mistake is in the plan, so that is where it must be reported.
#[test]
fn changing_a_library_part_class_is_reported_in_the_plan() {
    let plan = "\
railcheck: 1
parts:
  pack: { use: battery/lipo-3s, with: { class: motor } }
nets: {}
";
    let errors = input_errors(plan);
    let outside: Vec<&Reported> = errors.iter().filter(|e| e.file != PLAN).collect();
    assert!(
        outside.is_empty(),
        "errors reported in library files: {outside:#?}"
    );
}

// ----- §4 nets ----------------------------------------------------------------------------

const NET_PARTS: &str = "\
railcheck: 1
parts:
  pack: { use: battery/lipo-3s }
  fuse: { use: fuse/blade-10a }
nets:
";

/// §4: a pin is written `part.pin` and must exist.
#[test]
fn unknown_pin_in_a_net_points_at_the_pin_name() {
    let plan = format!("{NET_PARTS}  BATT+: [pack.poss, fuse.a]\n");
    let error = single_error(&plan);
    assert_at(&error, 6, 16, "poss");
    assert_hint(&error, &["`pack.pos`"]);
}

/// §4: the part of `part.pin` must be declared.
#[test]
fn unknown_part_in_a_net_points_at_the_part_name() {
    let plan = format!("{NET_PARTS}  BATT+: [pak.pos, fuse.a]\n");
    let error = single_error(&plan);
    assert_at(&error, 6, 11, "pak");
    assert_hint(&error, &["`pack`"]);
}

/// §4 and input problems: the column is that of the offending name, not of the quote.
#[test]
fn quoted_pin_reference_columns_skip_the_quote() {
    let plan = format!("{NET_PARTS}  BATT+: [\"pack.poss\", fuse.a]\n");
    let error = single_error(&plan);
    assert_at(&error, 6, 17, "poss");
    assert_hint(&error, &["`pack.pos`"]);

    let plan = format!("{NET_PARTS}  BATT+: ['pak.pos', fuse.a]\n");
    let error = single_error(&plan);
    assert_at(&error, 6, 12, "pak");
    assert_hint(&error, &["`pack`"]);
}

/// §4: "a pin may appear in at most one net".
#[test]
fn pin_in_two_nets_points_at_the_second_and_names_the_first() {
    let plan = format!("{NET_PARTS}  BATT+: [pack.pos, fuse.a]\n  RAW: [fuse.b, pack.pos]\n");
    let error = single_error(&plan);
    assert_at(&error, 7, 17, "pack.pos");
    assert!(error.message.contains("BATT+"), "{error:#?}");
    assert_hint(&error, &["one net"]);
}

/// §1 and §4: a pin is written `part.pin`.
#[test]
fn pin_reference_without_a_dot_shows_the_form() {
    let plan = format!("{NET_PARTS}  BATT+: [packpos, fuse.a]\n");
    let error = single_error(&plan);
    assert_at(&error, 6, 11, "packpos");
    assert_hint(&error, &["part.pin"]);
}

/// §4: `wire` and `length` make the net's resistance only together.
#[test]
fn net_with_wire_but_no_length_asks_for_the_length() {
    let plan = format!("{NET_PARTS}  BATT+: {{ pins: [pack.pos, fuse.a], wire: 14 AWG }}\n");
    let error = single_error(&plan);
    assert_at(&error, 6, 3, "BATT+");
    assert_hint(&error, &["length:"]);
}

// ----- §5 links ---------------------------------------------------------------------------

/// §5: a USB link joins a host port to a device port.
#[test]
fn usb_link_between_two_host_ports() {
    let plan = "\
railcheck: 1
parts:
  brain: { use: board/sbc-5v }
  spare: { use: board/sbc-5v }
nets: {}
links:
  - { usb: [brain.usb1, spare.usb1] }
";
    let error = single_error(plan);
    assert_at(&error, 7, 5, "{ usb");
    assert_hint(&error, &["usb-device"]);
}

// ----- §6 modes and profile ---------------------------------------------------------------

const MODE_PARTS: &str = "\
railcheck: 1
parts:
  left: { use: motor/gearmotor-medium }
nets: {}
";

/// §6: motors have states `idle`, `running`, `stall`.
#[test]
fn unknown_motor_state_lists_the_motor_states() {
    let plan = format!("{MODE_PARTS}modes:\n  climb: {{ left: peak }}\n");
    let error = single_error(&plan);
    assert_at(&error, 6, 18, "peak");
    assert_hint(&error, &["`stall`"]);
}

/// §6: a mode picks a state per declared part.
#[test]
fn mode_naming_an_unknown_part_suggests_the_part() {
    let plan = format!("{MODE_PARTS}modes:\n  climb: {{ lft: stall }}\n");
    let error = single_error(&plan);
    assert_at(&error, 6, 12, "lft");
    assert_hint(&error, &["`left`"]);
}

/// §6: the profile shares the time between modes.
#[test]
fn profile_not_summing_to_one_hundred_percent() {
    let plan = format!(
        "{MODE_PARTS}modes:\n  climb: {{ left: stall }}\nprofile: {{ climb: 10 %, typical: 80 % }}\n"
    );
    let error = single_error(&plan);
    assert_at(&error, 7, 10, "{ climb");
    assert!(error.message.contains("90"), "{error:#?}");
    assert_hint(&error, &["100 %"]);
}

/// §6: the profile names `typical`, `worst` or the user's modes.
#[test]
fn profile_naming_an_unknown_mode_suggests_the_mode() {
    let plan = format!(
        "{MODE_PARTS}modes:\n  climb: {{ left: stall }}\nprofile: {{ clmb: 10 %, typical: 90 % }}\n"
    );
    let errors = input_errors(&plan);
    let error = error_mentioning(&errors, "`clmb`");
    assert_at(&error, 7, 12, "clmb");
    assert_hint(&error, &["`climb`"]);
}

/// §6: `typical` and `worst` always exist.
#[test]
fn user_mode_named_worst_is_refused() {
    let plan = format!("{MODE_PARTS}modes:\n  worst: {{ left: stall }}\n");
    let error = single_error(&plan);
    assert_at(&error, 6, 3, "worst");
    assert_hint(&error, &["another name"]);
}

// ----- every problem in one run, and no noise (input-error paragraph) ----------------------

/// Input problems: every problem is reported in the same run, and only problems.
///
/// Each case has exactly one mistake; a part, pin or mode that was refused must not come back
/// as "unknown" on every line that uses it, and a share that was refused must not make the
/// profile look short.
#[test]
fn one_mistake_is_reported_once() {
    let cases = [
        (
            "unknown library part, used in a net",
            "railcheck: 1\nparts:\n  pack: { use: battery/lipo-3z }\nnets:\n  BATT+: [pack.pos]\n",
        ),
        (
            "unknown class, used in a net",
            "railcheck: 1\nparts:\n  lamp: { class: lod, pins: { vin: { role: supply-in } } }\nnets:\n  V: [lamp.vin]\n",
        ),
        (
            "motor rating without unit, motor used in a net and a mode",
            "railcheck: 1\nparts:\n  left: { use: motor/gearmotor-medium, with: { rated_voltage: 12 } }\nnets:\n  M: [left.a]\nmodes:\n  climb: { left: stall }\n",
        ),
        (
            "unknown fuse speed, fuse used in a net",
            "railcheck: 1\nparts:\n  fuse: { use: fuse/blade-10a, with: { speed: quick } }\nnets:\n  F: [fuse.a]\n",
        ),
        (
            "unknown pin role, pin used in a net",
            "railcheck: 1\nparts:\n  lamp: { class: load, pins: { vin: { role: supply-inn }, gnd: { role: ground } } }\nnets:\n  V: [lamp.vin]\n",
        ),
        (
            "draw with a bad number",
            "railcheck: 1\nparts:\n  lamp: { class: load, pins: { vin: { role: supply-in, draw: { typical: µ5 A } } } }\nnets: {}\n",
        ),
        (
            "profile naming an unknown mode",
            "railcheck: 1\nparts:\n  left: { use: motor/gearmotor-medium }\nnets: {}\nmodes:\n  climb: { left: stall }\nprofile: { clmb: 10 %, typical: 90 % }\n",
        ),
    ];
    let mut problems = Vec::new();
    for (what, plan) in cases {
        let errors = input_errors(plan);
        if errors.len() != 1 {
            let lines: Vec<String> = errors
                .iter()
                .map(|e| format!("{}:{} {}", e.line, e.column, e.message))
                .collect();
            problems.push(format!("{what}: {lines:?}"));
        }
    }
    assert!(problems.is_empty(), "{problems:#?}");
}

/// Input problems: "every other input problem in the file is reported in the same run".
///
/// Each case has two independent mistakes; the first must not hide the second.
#[test]
fn one_bad_field_does_not_hide_the_others() {
    let cases = [
        (
            "unknown chemistry, then a capacity without unit",
            "railcheck: 1\nparts:\n  pack: { class: battery, chemistry: lipoo, cells: 3, capacity: 5 }\nnets: {}\n",
        ),
        (
            "unknown topology, then an output without unit",
            "railcheck: 1\nparts:\n  buck: { class: regulator, topology: bock, output: 5 }\nnets: {}\n",
        ),
        (
            "unknown pin role, then a maximum without unit",
            "railcheck: 1\nparts:\n  lamp: { class: load, pins: { vin: { role: supply-inn, max: 5 } } }\nnets: {}\n",
        ),
    ];
    let mut problems = Vec::new();
    for (what, plan) in cases {
        let errors = input_errors(plan);
        if errors.len() != 2 {
            let lines: Vec<String> = errors
                .iter()
                .map(|e| format!("{}:{} {}", e.line, e.column, e.message))
                .collect();
            problems.push(format!("{what}: {lines:?}"));
        }
    }
    assert!(problems.is_empty(), "{problems:#?}");
}

/// §2 and input problems: only a YAML syntax error may stop the run.
///
/// A number too large for a float is still a value without a unit, not a YAML syntax error
/// that stops the run before the fuse's bare rating is seen.
#[test]
fn a_huge_number_is_a_value_error_not_a_syntax_error() {
    let plan = "\
railcheck: 1
parts:
  pack: { use: battery/lipo-3s, with: { capacity: 1e999 } }
  fuse: { use: fuse/blade-10a, with: { rating: 5 } }
nets: {}
";
    let errors = input_errors(plan);
    assert_eq!(errors.len(), 2, "{errors:#?}");
    assert_at(&errors[0], 3, 51, "1e999");
    assert_hint(&errors[0], &["Ah"]);
    assert_at(&errors[1], 4, 48, "5");
    assert_hint(&errors[1], &["`5 A`"]);
}

/// Input problems with a hint (§8 JSON carries it as `hint`).
///
/// Every input problem comes with a hint (§8 carries it in JSON as `hint`).
#[test]
fn every_input_error_has_a_hint() {
    let cases = [
        (
            "link between two host ports",
            "railcheck: 1\nparts:\n  a: { use: board/sbc-5v }\n  b: { use: board/sbc-5v }\nnets: {}\nlinks:\n  - { usb: [a.usb1, b.usb1] }\n",
        ),
        (
            "link naming an unknown part",
            "railcheck: 1\nparts:\n  a: { use: board/sbc-5v }\nnets: {}\nlinks:\n  - { usb: [a.usb1, zz.usb] }\n",
        ),
        (
            "link without `usb:`",
            "railcheck: 1\nparts: {}\nnets: {}\nlinks:\n  - { wire: 28 AWG, length: 1 m }\n",
        ),
        (
            "mode naming a part with no near name",
            "railcheck: 1\nparts:\n  left: { use: motor/gearmotor-medium }\nnets: {}\nmodes:\n  climb: { zz: stall }\n",
        ),
        (
            "key that is not a name",
            "railcheck: 1\n? [a, b]\n: 1\nparts: {}\nnets: {}\n",
        ),
    ];
    let mut problems = Vec::new();
    for (what, plan) in cases {
        for error in input_errors(plan) {
            if error.hint.is_none() {
                problems.push(format!(
                    "{what}: {}:{} {}",
                    error.line, error.column, error.message
                ));
            }
        }
    }
    assert!(problems.is_empty(), "{problems:#?}");
}

/// The acceptance test of the issue: "a plan with 20 mistakes reports all 20 in one run, each
/// at its line". Twenty different kinds of mistake, one per line, each marked `# mistake`.
const TWENTY_MISTAKES: &str = "\
railcheck: 1
name: Greenhouse misting cart
ambiant: 30 degC                                            # mistake
limits:
  wire_drop: 5 V                                            # mistake
  derate: 80 %
parts:
  pack:
    use: battery/lipo-3s
    with:
      capacity: 5                                           # mistake
      cutoff: yes                                           # mistake
      max_dischrge: 30C                                     # mistake
  fuse:
    use: fuse/blade-10a
    with: { rating: 10 Q }                                  # mistake
  buck: { use: regulator/buck-5v-3a }
  pump:
    class: load
    pins:
      vin: { role: supply-in, range: 15 V..10 V, draw: 2 A }  # mistake
      gnd: { role: ground }
      flow: { role: sensor-out }                            # mistake
  mcu:
    use: board/mcu-8bit-5v
    pins:
      5v: { voltage: 5 V ±2 }                               # mistake
      d2: { family: cmos }                                  # mistake
  drive:
    use: driver/bipolar-dual-2a
    with: { channels: { 1: [out1a, out1b], 2: [out2a, in1] } }  # mistake
  left: { use: motor/gearmotor-medium }
nets:
  BATT+: [pack.pos, fuse.a]
  VF: [fuse.b, buck.vin, drive.vm, pump.vin, mcu.vin]
  5V: [buck.vout, drive.vlogic]
  GND: [pack.neg, buck.gnd, mcu.gnd, drive.gnd, pump.gnd]
  SENSE: [pack.poss, mcu.d3]                                # mistake
  SPARE: [fues.b]                                           # mistake
  SHIELD: [mcu.gnd]                                         # mistake
  M1A: [drive.out1a, left-a]                                # mistake
  M1B: { pins: [drive.out1b, left.b], wire: 18 AWG }        # mistake
modes:
  spray: { left: peak }                                     # mistake
  rest: { lefft: idle }                                     # mistake
  worst: { left: stall }                                    # mistake
profile: { spray: 30 %, rest: 60 % }                        # mistake
";

fn marked_lines(text: &str) -> Vec<usize> {
    text.lines()
        .enumerate()
        .filter(|(_, line)| line.trim_end().ends_with("# mistake"))
        .map(|(i, _)| i + 1)
        .collect()
}

/// Input problems: all in one run, each at its line, in file order.
#[test]
fn twenty_mistakes_are_all_reported_in_one_run_each_at_its_line() {
    let marked = marked_lines(TWENTY_MISTAKES);
    assert_eq!(marked.len(), 20, "the plan must carry 20 marked mistakes");
    let errors = input_errors(TWENTY_MISTAKES);
    let positions: Vec<(usize, usize)> = errors.iter().map(|e| (e.line, e.column)).collect();
    // File order: by line, then column.
    let mut sorted = positions.clone();
    sorted.sort();
    assert_eq!(
        positions, sorted,
        "errors are not in file order: {errors:#?}"
    );
    let lines: Vec<usize> = errors.iter().map(|e| e.line).collect();
    assert_eq!(lines, marked, "{errors:#?}");
    assert!(errors.iter().all(|e| e.file == PLAN), "{errors:#?}");
}

fn plan_file(bytes: &[u8]) -> tempfile::NamedTempFile {
    let mut file = tempfile::Builder::new()
        .suffix(".yaml")
        .tempfile()
        .expect("a temporary file");
    file.write_all(bytes).expect("write the plan");
    file.flush().expect("flush the plan");
    file
}

fn run_check(file: &tempfile::NamedTempFile, json: bool) -> std::process::Output {
    let mut command = Command::cargo_bin("railcheck").expect("the railcheck binary");
    command.arg("check").arg(file.path());
    if json {
        command.args(["--format", "json"]);
    }
    command.output().expect("railcheck runs")
}

/// §8: `{"file", "error", "errors": [...in file order]}`, `error` the first, exit code 2.
#[test]
fn twenty_mistakes_in_json_have_twenty_entries_in_file_order() {
    let file = plan_file(TWENTY_MISTAKES.as_bytes());
    let output = run_check(&file, true);
    // §8: input invalid → exit code 2.
    assert_eq!(output.status.code(), Some(2), "{output:?}");
    let document: serde_json::Value =
        serde_json::from_slice(&output.stdout).expect("stdout is one JSON object");
    let errors = document["errors"].as_array().expect("an `errors` list");
    assert_eq!(errors.len(), 20, "{document:#}");
    // §8: `error` is the first of `errors`.
    assert_eq!(document["error"], errors[0]);
    let lines: Vec<usize> = errors
        .iter()
        .map(|e| e["line"].as_u64().expect("a line") as usize)
        .collect();
    assert_eq!(lines, marked_lines(TWENTY_MISTAKES), "{document:#}");
    for error in errors {
        assert!(error["message"].is_string(), "{error:#}");
        assert!(
            error["column"].as_u64().is_some_and(|c| c >= 1),
            "{error:#}"
        );
    }
    assert_eq!(
        document["file"].as_str(),
        Some(file.path().display().to_string().as_str())
    );
}

// ----- hostile input: refused quickly, never a panic --------------------------------------
// No timing asserts: a hang shows up as a test that never finishes.

/// Refused as an input error; the diagnostic stays readable however big the input was.
fn assert_refused(text: &str) -> Reported {
    let errors = input_errors(text);
    assert!(!errors.is_empty());
    for error in &errors {
        assert!(
            error.message.chars().count() < 500,
            "message of {} characters",
            error.message.chars().count()
        );
    }
    errors.into_iter().next().unwrap()
}

/// Input problems: hostile YAML is bad input (exit 2), never a crash.
#[test]
fn deeply_nested_flow_collections_are_refused() {
    assert_refused(&"[".repeat(100_000));
    assert_refused(&"{".repeat(100_000));
    assert_refused(&format!("railcheck: 1\nparts: {}\n", "[".repeat(100_000)));
}

/// Input problems: hostile YAML is bad input (exit 2), never a crash or a hang.
///
/// Billion laughs: nine levels of nine aliases each expand to 9⁹ ≈ 387 million strings.
#[test]
fn alias_bomb_is_refused() {
    let mut bomb =
        String::from("railcheck: 1\na: &a [lol, lol, lol, lol, lol, lol, lol, lol, lol]\n");
    let mut previous = 'a';
    for level in 'b'..='i' {
        let refs = vec![format!("*{previous}"); 9].join(", ");
        bomb.push_str(&format!("{level}: &{level} [{refs}]\n"));
        previous = level;
    }
    bomb.push_str("parts: {}\nnets: {}\n");
    assert_refused(&bomb);
}

/// §2 and input problems: a huge value is refused with a readable diagnostic.
#[test]
fn five_megabyte_scalar_is_refused_with_a_short_message() {
    let text = format!(
        "railcheck: 1\nambient: {}\nparts: {{}}\nnets: {{}}\n",
        "x".repeat(5 << 20)
    );
    let error = assert_refused(&text);
    assert_at(&error, 2, 10, "x");
    assert!(error.hint.is_some(), "{:?}", error.message);
}

/// §2 and input problems: a huge value is refused with a readable diagnostic.
///
/// A 5 MB number: too big for a float, still a value without a unit, and its message must
/// not quote all 5 MB.
#[test]
fn five_megabyte_number_is_refused_with_a_short_message() {
    let text = format!(
        "railcheck: 1\nambient: {}\nparts: {{}}\nnets: {{}}\n",
        "9".repeat(5 << 20)
    );
    let error = assert_refused(&text);
    assert_at(&error, 2, 10, "9");
    assert_hint(&error, &["degC"]);
}

/// §1: a plan is a mapping that starts with `railcheck: 1`.
#[test]
fn empty_and_non_mapping_files_are_refused_with_a_hint() {
    for text in [
        "",
        "\n\n",
        "# only a comment\n",
        "- pack\n- fuse\n",
        "just text",
    ] {
        let error = assert_refused(text);
        assert_eq!(error.file, PLAN);
        assert_hint(&error, &["railcheck: 1"]);
    }
}

/// §1: `parts:` is a mapping `{ <part name>: <part> }`.
#[test]
fn parts_as_a_list_is_refused_at_the_list() {
    let plan = "railcheck: 1\nparts:\n  - pack\n  - fuse\nnets: {}\n";
    let error = single_error(plan);
    assert_at(&error, 3, 3, "- pack");
    assert!(error.message.contains("mapping"), "{error:#?}");
    assert!(error.hint.is_some(), "{error:#?}");
}

/// §8: input invalid → exit code 2, with a message, never a panic.
#[test]
fn invalid_utf8_is_an_input_error_from_the_command() {
    let file = plan_file(b"railcheck: 1\nname: caf\xe9 \xff\xfe\nparts: {}\nnets: {}\n");
    let output = run_check(&file, false);
    assert_eq!(output.status.code(), Some(2), "{output:?}");
    let stderr = String::from_utf8_lossy(&output.stderr);
    assert!(!stderr.contains("panicked"), "{stderr}");
    assert!(
        !stderr.trim().is_empty() || !output.stdout.is_empty(),
        "no message at all"
    );
}

/// §8: under `--format json` an input error is a JSON object; bytes that are not UTF-8 are an
/// input problem at a known line and column (here line 2, column 10, the first bad byte).
#[test]
fn invalid_utf8_under_json_is_a_json_input_error() {
    let file = plan_file(b"railcheck: 1\nname: caf\xe9 \xff\xfe\nparts: {}\nnets: {}\n");
    let output = run_check(&file, true);
    assert_eq!(output.status.code(), Some(2), "{output:?}");
    let document: serde_json::Value = serde_json::from_slice(&output.stdout)
        .unwrap_or_else(|e| panic!("stdout is not JSON ({e}): {output:?}"));
    assert_eq!(document["error"]["line"], 2, "{document:#}");
    assert_eq!(document["error"]["column"], 10, "{document:#}");
}

/// §8: input invalid → exit code 2, in both output formats.
#[test]
fn hostile_files_through_the_command_exit_2_without_panic() {
    let cases: Vec<(&str, Vec<u8>)> = vec![
        ("brackets", "[".repeat(100_000).into_bytes()),
        ("empty", Vec::new()),
        ("list", b"- pack\n- fuse\n".to_vec()),
        (
            "parts list",
            b"railcheck: 1\nparts: [pack]\nnets: {}\n".to_vec(),
        ),
    ];
    for (what, bytes) in cases {
        let file = plan_file(&bytes);
        for json in [false, true] {
            let output = run_check(&file, json);
            let stderr = String::from_utf8_lossy(&output.stderr);
            assert_eq!(output.status.code(), Some(2), "{what}: {output:?}");
            assert!(!stderr.contains("panicked"), "{what}: {stderr}");
        }
    }
}

/// Input problems: hostile YAML is bad input, never a crash.
///
/// Nested mappings read by the library on a thread with the standard 2 MiB stack (as every
/// `cargo test` thread and most spawned threads have): 60 levels is within the reader's depth
/// budget and must be read, deeper must be refused. A stack overflow aborts the whole process,
/// so each case runs in a child copy of this test binary.
#[test]
fn deep_mapping_nesting_does_not_overflow_a_thread_stack() {
    let mut problems = Vec::new();
    for case in NESTING_CASES {
        let output = std::process::Command::new(std::env::current_exe().expect("test binary"))
            .args(["deep_nesting_child", "--exact", "--test-threads", "1"])
            .env(NESTING_CASE_VARIABLE, case)
            .env("RUST_MIN_STACK", (2usize << 20).to_string())
            .output()
            .expect("the child test runs");
        if !output.status.success() {
            let stderr = String::from_utf8_lossy(&output.stderr);
            let reason = stderr
                .lines()
                .find(|l| l.contains("overflow") || l.contains("panicked"))
                .unwrap_or("failed");
            problems.push(format!("{case}: {} ({reason})", output.status));
        }
    }
    assert!(problems.is_empty(), "{problems:#?}");
}

const NESTING_CASE_VARIABLE: &str = "RAILCHECK_NESTING_CASE";
const NESTING_CASES: [&str; 3] = [
    "flow mappings 60 deep",
    "flow mappings 100000 deep",
    "block mappings 200 deep",
];

/// Runs one nesting case when started by the test above; does nothing otherwise.
#[test]
fn deep_nesting_child() {
    let Some(case) = std::env::var_os(NESTING_CASE_VARIABLE) else {
        return;
    };
    match case.to_str() {
        Some("flow mappings 60 deep") => {
            // Valid YAML within the reader's depth budget; the plan is wrong (a part `a` with
            // no class), or the nesting may be refused as too deep, but without a crash.
            let plan = format!(
                "railcheck: 1\nparts: {}1{}\nnets: {{}}\n",
                "{ a: ".repeat(60),
                " }".repeat(60)
            );
            assert_refused(&plan);
        }
        Some("flow mappings 100000 deep") => {
            assert_refused(&format!(
                "railcheck: 1\nparts: {}\n",
                "{ a: ".repeat(100_000)
            ));
        }
        Some("block mappings 200 deep") => {
            let mut plan = String::from("railcheck: 1\nparts:\n");
            for depth in 0..200 {
                plan.push_str(&" ".repeat(2 * depth + 2));
                plan.push_str("a:\n");
            }
            assert_refused(&plan);
        }
        other => panic!("unknown nesting case {other:?}"),
    }
}

// ----- property: any damage to a valid plan is handled ------------------------------------

/// A small valid plan with multibyte characters, so that damage can land inside them.
const VALID: &str = "\
railcheck: 1
name: Serre µ-pompe
ambient: 35 °C
parts:
  pack: { use: battery/lipo-3s, with: { cutoff: true } }
  fuse: { use: fuse/blade-10a }
  buck: { use: regulator/buck-5v-3a }
  mcu: { use: board/mcu-8bit-5v }
  lamp:
    class: load
    pins:
      vin: { role: supply-in, range: 10 V..13 V, max: 16 V, draw: { idle: 50 µA, typical: 0.4 A } }
      gnd: { role: ground }
  r1: { class: resistor, value: 10 kΩ, power: 0.25 W }
nets:
  BATT+: [pack.pos, fuse.a]
  VF: { pins: [fuse.b, buck.vin, mcu.vin, lamp.vin], wire: 18 AWG, length: 0.5 m }
  GND: [pack.neg, buck.gnd, mcu.gnd, lamp.gnd]
modes:
  dark: { lamp: idle }
profile: { dark: 40 %, typical: 60 % }
";

fn floor_boundary(text: &str, mut index: usize) -> usize {
    index = index.min(text.len());
    while !text.is_char_boundary(index) {
        index -= 1;
    }
    index
}

/// The property below starts from a plan that is read without input errors.
#[test]
fn the_property_base_plan_is_valid() {
    let checked = railcheck::check(PLAN, VALID, &LIBRARY);
    assert!(checked.is_ok(), "{:#?}", checked.err().map(|f| f.errors));
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]

    /// Input problems are reported, never a panic; spans feed §8's `line` and `column`.
    ///
    /// Replacing any range of a valid plan with any text never panics (reading, checking, and
    /// both renderings of the errors), and every error span lies inside its text on
    /// character boundaries.
    #[test]
    fn damaged_plans_never_panic_and_spans_stay_in_the_text(
        start in 0..VALID.len(),
        length in 0usize..24,
        replacement in "[ -~\n\tµ°±²Ωé😀]{0,16}",
    ) {
        let from = floor_boundary(VALID, start);
        let to = floor_boundary(VALID, from + length);
        let text = format!("{}{}{}", &VALID[..from], replacement, &VALID[to..]);
        if let Err(failure) = railcheck::check(PLAN, &text, &LIBRARY) {
            prop_assert!(!failure.errors.is_empty());
            for error in &failure.errors {
                let source = failure.sources.text(error.span.source);
                prop_assert!(
                    error.span.start <= error.span.end && error.span.end <= source.len(),
                    "span {:?} outside a text of {} bytes", error.span, source.len()
                );
                prop_assert!(
                    source.is_char_boundary(error.span.start)
                        && source.is_char_boundary(error.span.end),
                    "span {:?} splits a character", error.span
                );
                let (line, column) = failure.sources.line_column(error.span);
                prop_assert!(line >= 1 && column >= 1);
            }
            let _ = report::input_errors_json(&failure.sources, failure.plan_source, &failure.errors);
            let _ = report::render_input_errors(&failure.sources, &failure.errors, HumanStyle::default());
        }
    }
}

// ----- values no part can have --------------------------------------------------------------

/// §3 motor: the winding resistance is rated_voltage / stall_current (brushed DC
/// motor equation), so a zero stall current is no motor; a stall below the running
/// current is a slip of the pen.
#[test]
fn motor_values_must_describe_a_motor() {
    let plan = "railcheck: 1\nparts:\n  m: { class: motor, rated_voltage: 12 V, rated_current: 1 A, stall_current: 0 A }\nnets: {}\n";
    let error = single_error(plan);
    assert_at(&error, 3, 78, "0 A");
    assert_hint(&error, &["stall current"]);
    let plan = "railcheck: 1\nparts:\n  m: { class: motor, rated_voltage: 12 V, rated_current: 2 A, stall_current: 1 A }\nnets: {}\n";
    let error = single_error(plan);
    assert_at(&error, 3, 78, "1 A");
}

/// §3 driver: each channel names two different bridge outputs, once.
#[test]
fn driver_channels_name_two_outputs_once() {
    let plan = "railcheck: 1\nparts:\n  d:\n    class: driver\n    channels: { 1: [o1, o1] }\n    pins: { vm: { role: supply-in }, gnd: { role: ground }, o1: { role: bridge-out }, o2: { role: bridge-out } }\nnets: {}\n";
    let error = single_error(plan);
    assert_at(&error, 5, 20, "[o1, o1]");
    assert_hint(&error, &["two different"]);
}

/// §3 ports: `feeds` names the supply pin VBUS joins, never a ground.
#[test]
fn usb_feeds_names_a_supply_pin() {
    let plan = "railcheck: 1\nparts:\n  b:\n    class: board\n    pins: { vin: { role: supply-in }, gnd: { role: ground } }\n    ports: { usb: { kind: usb-device, feeds: gnd } }\nnets: {}\n";
    let error = single_error(plan);
    assert_at(&error, 6, 46, "gnd");
    assert_hint(&error, &["supply"]);
}

/// §3 logic pins: a low level at or above the high level is no logic pin.
#[test]
fn logic_low_level_is_below_the_high_level() {
    let plan = "railcheck: 1\nparts:\n  s:\n    class: sensor\n    pins: { out: { role: logic-out, voh: 2.4 V, vol: 2.5 V } }\nnets: {}\n";
    let error = single_error(plan);
    assert_at(&error, 5, 54, "2.5 V");
}

/// §3 battery and §1 ambient: a thousand cells in series or a temperature
/// below absolute zero (−273.15 °C, SI) is a typing slip.
#[test]
fn impossible_cells_and_temperatures_are_refused() {
    let plan = "railcheck: 1\nambient: -300 degC\nparts:\n  p: { use: battery/lipo-3s, with: { cells: 4294967295 } }\nnets: {}\n";
    let errors = input_errors(plan);
    assert_eq!(errors.len(), 2, "{errors:#?}");
    assert_at(&errors[0], 2, 10, "-300 degC");
    assert_at(&errors[1], 4, 45, "4294967295");
}

/// A value refused for its own mistake is one error: the net is not also
/// said to lack its length (or its wire).
#[test]
fn a_length_without_its_unit_is_one_error_with_a_plausible_unit() {
    let plan = "railcheck: 1
parts:
  pack: { use: battery/lipo-3s }
  fuse: { use: fuse/blade-5a }
nets:
  LEAD: { pins: [pack.pos, fuse.a], wire: 18 AWG, length: 30 }
";
    let error = single_error(plan);
    assert_at(&error, 6, 59, "30");
    // A robot's wire run is centimetres to metres: 30 is 30 cm, not 30 m.
    assert_hint(&error, &["30 cm"]);
}

#[test]
fn an_impossible_wire_size_is_one_error() {
    let plan = "railcheck: 1
parts:
  pack: { use: battery/lipo-3s }
  fuse: { use: fuse/blade-5a }
nets:
  LEAD: { pins: [pack.pos, fuse.a], wire: 1000 AWG, length: 30 cm }
";
    let error = single_error(plan);
    assert_at(&error, 6, 43, "1000 AWG");
}

#[test]
fn bare_numbers_get_the_unit_that_makes_them_plausible() {
    // (written, field, the unit the hint must suggest): a 2200 capacity is a
    // 2200 mAh pack, a 7500 draw 7.5 A in mA, a 600 length 600 mm; small
    // numbers keep the plain unit.
    for (value, field, unit) in [
        ("2200", "capacity", "2200 mAh"),
        ("5", "capacity", "5 Ah"),
        ("7500", "max_discharge", "7500 A"),
    ] {
        let plan = format!(
            "railcheck: 1\nparts:\n  pack: {{ use: battery/lipo-3s, with: {{ {field}: {value} }} }}\nnets: {{}}\n"
        );
        let error = single_error(&plan);
        assert_hint(&error, &[unit]);
    }
    for (value, unit) in [("600", "600 mm"), ("2", "2 m"), ("45", "45 cm")] {
        let plan = format!(
            "railcheck: 1\nparts:\n  pack: {{ use: battery/lipo-3s }}\n  fuse: {{ use: fuse/blade-5a }}\n\
             nets:\n  LEAD: {{ pins: [pack.pos, fuse.a], wire: 18 AWG, length: {value} }}\n"
        );
        assert_hint(&single_error(&plan), &[unit]);
    }
    let plan = "railcheck: 1\nparts:\n  lamp: { class: load, pins: { vin: { role: supply-in, draw: 120 } } }\nnets: {}\n";
    assert_hint(&single_error(plan), &["120 mA"]);
}

/// §1: `date` is an ISO 8601 calendar date that exists (Gregorian calendar:
/// February has 29 days in years divisible by 4, except centuries not
/// divisible by 400).
#[test]
fn the_title_date_is_a_calendar_date() {
    let with_date = |date: &str| {
        format!(
            "railcheck: 1\nname: lab cart\nrevision: B\nauthor: lab crew\ndate: {date}\nparts:\n  pack: {{ use: battery/lipo-3s, with: {{ cutoff: true }} }}\nnets: {{}}\n"
        )
    };
    for good in ["2024-02-29", "2000-02-29", "2026-12-31"] {
        let checked = railcheck::check(PLAN, &with_date(good), &LIBRARY)
            .unwrap_or_else(|_| panic!("{good} is a date"));
        assert_eq!(checked.plan.date.as_deref(), Some(good));
        assert_eq!(checked.plan.revision.as_deref(), Some("B"));
        assert_eq!(checked.plan.author.as_deref(), Some("lab crew"));
    }
    for bad in [
        "1900-02-29",
        "2026-02-30",
        "2026-13-01",
        "2026-1-5",
        "05/12/2026",
    ] {
        let reported = input_errors(&with_date(bad));
        assert_eq!(reported.len(), 1, "{bad}: {reported:?}");
        assert_eq!(reported[0].line, 5, "{bad}");
        assert!(reported[0].message.contains("not a calendar date"), "{bad}");
        assert!(
            reported[0]
                .hint
                .as_deref()
                .unwrap_or("")
                .contains("YYYY-MM-DD")
        );
    }
}

/// §1 limits: a wire drop limit of nothing would report every wire; it is
/// refused at its value with the default offered.
#[test]
fn a_wire_drop_limit_of_zero_is_refused() {
    for zero in ["0 %", "-0 %", "0"] {
        let plan = format!(
            "railcheck: 1\nlimits:\n  wire_drop: {zero}\nparts:\n  pack: {{ use: battery/lipo-3s, with: {{ cutoff: true }} }}\nnets: {{}}\n"
        );
        let reported = input_errors(&plan);
        assert_eq!(reported.len(), 1, "{zero}: {reported:?}");
        assert_eq!(reported[0].line, 3, "{zero}");
        assert!(reported[0].message.contains("above 0 %"), "{zero}");
        assert!(
            reported[0].hint.as_deref().unwrap_or("").contains("5 %"),
            "{zero}"
        );
    }
}

/// §1: `notes:` is free text; a list there is a misplaced block, refused at
/// its place.
#[test]
fn notes_must_be_text() {
    let plan = "railcheck: 1\nnotes:\n  - pack: { use: battery/lipo-3s }\nparts:\n  pack: { use: battery/lipo-3s, with: { cutoff: true } }\nnets: {}\n";
    let reported = input_errors(plan);
    assert_eq!(reported.len(), 1, "{reported:?}");
    assert_eq!(reported[0].line, 3);
    assert!(
        reported[0].message.contains("must be text"),
        "{}",
        reported[0].message
    );
}
