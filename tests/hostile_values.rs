//! Physically impossible values are input errors at their line: zero
//! capacities, ratings, limits, lengths and wire sizes, a zero-ohm pull
//! resistor, and nonzero numbers too small for a float. Also the messages for
//! a version or a pin list that is not what the format wants.

use railcheck::model::{InputError, Library};

const BASE: &str = include_str!("../docs/base-plan.yaml");

fn errors(text: &str) -> (Vec<InputError>, railcheck::syntax::Sources) {
    match railcheck::check("plan.yaml", text, &Library::builtin()) {
        Ok(_) => panic!("the plan must not read:\n{text}"),
        Err(failure) => (failure.errors, failure.sources),
    }
}

/// The base plan with one line replaced; the error must be on that line.
fn error_on_line(from: &str, to: &str) -> InputError {
    assert!(BASE.contains(from), "{from}");
    let text = BASE.replacen(from, to, 1);
    let line = text[..text.find(to).unwrap()].matches('\n').count() + 1;
    let (errors, sources) = errors(&text);
    assert_eq!(errors.len(), 1, "{errors:?}");
    assert_eq!(sources.line_column(errors[0].span).0, line, "{errors:?}");
    errors[0].clone()
}

#[test]
fn a_battery_of_zero_capacity_is_an_input_error() {
    let e = error_on_line(
        "{ use: battery/lipo-3s, with: { cutoff: true } }",
        "{ use: battery/lipo-3s, with: { cutoff: true, capacity: 0 Ah } }",
    );
    assert!(
        e.message.contains("capacity: 0 Ah") && e.message.contains("above zero"),
        "{}",
        e.message
    );
}

#[test]
fn a_fuse_rated_zero_amperes_is_an_input_error() {
    let e = error_on_line(
        "{ use: fuse/blade-15a }",
        "{ use: fuse/blade-15a, with: { rating: 0 A } }",
    );
    assert!(e.message.contains("above zero"), "{}", e.message);
    let e = error_on_line(
        "{ use: fuse/blade-15a }",
        "{ use: fuse/blade-15a, with: { rating: -0.0 mA } }",
    );
    assert!(e.message.contains("above zero"), "{}", e.message);
}

#[test]
fn a_wire_of_zero_length_or_zero_section_is_an_input_error() {
    let e = error_on_line(
        "wire: 14 AWG, length: 10 cm }",
        "wire: 14 AWG, length: 0 cm }",
    );
    assert!(e.message.contains("length: 0 cm"), "{}", e.message);
    let e = error_on_line(
        "wire: 14 AWG, length: 10 cm }",
        "wire: 0 mm2, length: 10 cm }",
    );
    assert!(
        e.message.contains("above zero") || e.message.contains("mm"),
        "{}",
        e.message
    );
}

#[test]
fn zero_awg_is_a_thick_wire_not_zero() {
    // ASTM B258: 0 AWG (1/0) is 8.25 mm across.
    let text = BASE.replacen(
        "wire: 14 AWG, length: 10 cm",
        "wire: 0 AWG, length: 10 cm",
        1,
    );
    assert!(railcheck::check("plan.yaml", &text, &Library::builtin()).is_ok());
}

#[test]
fn a_nonzero_value_that_underflows_is_an_input_error() {
    // IEEE 754 binary64: the smallest subnormal is about 4.9e-324, so 5e-400
    // rounds to zero.
    for written in ["5e-400 V", "0.5e-330 V"] {
        let e = error_on_line(
            "{ use: regulator/buck-5v-5a }",
            &format!("{{ use: regulator/buck-5v-5a, with: {{ output: {written} }} }}"),
        );
        assert!(e.message.contains("too small"), "{}", e.message);
    }
}

#[test]
fn a_zero_ohm_pull_resistor_is_an_input_error() {
    let text = BASE.replacen(
        "  mcu:       { use: board/mcu-3v3 }\n",
        "  mcu:       { use: board/mcu-3v3 }\n  pull: { class: resistor, value: 0 ohm, pins: { a: { role: passive }, b: { role: passive } } }\n",
        1,
    );
    let (errors, sources) = errors(&text);
    assert!(
        errors
            .iter()
            .any(|e| e.message.contains("above zero") && sources.line_column(e.span).0 == 13),
        "{errors:?}"
    );
}

#[test]
fn a_version_that_is_not_a_number_says_what_was_found() {
    for (written, found) in [
        ("[1]", "a list"),
        ("~", "an empty value"),
        ("{ v: 1 }", "a mapping"),
    ] {
        let text = BASE.replacen("railcheck: 1", &format!("railcheck: {written}"), 1);
        let (errors, _) = errors(&text);
        assert!(
            errors[0].message.contains(found),
            "{written}: {}",
            errors[0].message
        );
        assert!(errors[0].hint.as_deref().unwrap().contains("railcheck: 1"));
    }
}

#[test]
fn a_part_with_no_pins_says_so() {
    let text = BASE
        .replacen(
            "  mcu:       { use: board/mcu-3v3 }\n",
            "  mcu:       { use: board/mcu-3v3 }\n  plug: { class: connector, pins: {} }\n",
            1,
        )
        .replacen("mcu.gnd]", "mcu.gnd, plug.x]", 1);
    let (errors, _) = errors(&text);
    let hint = errors
        .iter()
        .find(|e| e.message.contains("plug"))
        .and_then(|e| e.hint.clone())
        .unwrap();
    assert!(hint.contains("no pins") && hint.contains("pins:"), "{hint}");
}

#[test]
fn a_name_that_shows_as_blank_is_refused_with_its_code_point() {
    let text = BASE.replacen(
        "  mcu:",
        "  \"\u{3164}\": { use: board/mcu-3v3 }\n  mcu:",
        1,
    );
    let (errors, _) = errors(&text);
    let e = errors
        .iter()
        .find(|e| e.message.contains("not a valid part name"))
        .unwrap();
    assert!(e.hint.as_deref().unwrap().contains("U+3164"), "{e:?}");
}
