//! The terminal report on hostile plans: very long lines, very many
//! problems and control codes stay bounded, readable and inert.

use railcheck::model::Library;
use railcheck::report::{self, HumanStyle};

fn input_report(text: &str) -> String {
    let failure = railcheck::check("plan.yaml", text, &Library::builtin())
        .expect_err("the plan has input errors");
    report::render_input_errors(&failure.sources, &failure.errors, HumanStyle::default())
}

fn findings_report(text: &str) -> String {
    let checked = railcheck::check("plan.yaml", text, &Library::builtin()).expect("the plan reads");
    let cautions = railcheck::safety::cautions(&checked.plan);
    report::render_findings(
        &checked.sources,
        checked.plan_source,
        &checked.findings,
        &cautions,
        HumanStyle::default(),
    )
}

/// `n` batteries written flow style on one line.
fn one_line_parts(n: usize) -> String {
    (0..n)
        .map(|i| format!("p{i}: {{ use: battery/lipo-3s }}"))
        .collect::<Vec<_>>()
        .join(", ")
}

#[test]
fn an_error_past_column_65535_is_drawn_with_its_position() {
    let text = format!(
        "railcheck: 1\nparts: {{ {}, bad: {{ use: nope/x }} }}\nnets: {{}}\n",
        one_line_parts(3_000)
    );
    let column = text.lines().nth(1).unwrap().find("nope/x").unwrap() + 1;
    assert!(column > 65_535);
    let out = input_report(&text);
    assert!(out.contains(&format!("line 2, column {column}")), "{out}");
    assert!(out.contains(&format!("plan.yaml:2:{column}]")), "{out}");
    assert!(out.contains("nope/x"), "{out}");
    // A window of the line, not the line: well under a kilobyte of snippet.
    assert!(out.len() < 2_000, "{} bytes", out.len());
}

#[test]
fn a_finding_past_column_65535_is_drawn() {
    // A buck regulator whose input net is missing its battery: a finding on
    // the one long line.
    let text = format!(
        "railcheck: 1\nparts: {{ {}, reg: {{ use: regulator/buck-5v-3a }} }}\nnets: {{ n1: [reg.vin, p0.pos] }}\n",
        one_line_parts(3_000)
    );
    let out = findings_report(&text);
    assert!(
        out.contains("─[plan.yaml:2:"),
        "a finding on the long line: {out}"
    );
    assert!(out.lines().all(|l| l.chars().count() < 400), "{out}");
    assert!(out.len() < 200_000, "{} bytes", out.len());
}

#[test]
fn a_long_line_is_cut_to_a_window_around_the_mark() {
    let text = format!(
        "railcheck: 1\nname: x\nparts: {{ {}, bad: {{ use: nope/x }}, {} }}\nnets: {{}}\n",
        one_line_parts(500),
        (0..500)
            .map(|i| format!("q{i}: {{ use: battery/lipo-3s }}"))
            .collect::<Vec<_>>()
            .join(", ")
    );
    let out = input_report(&text);
    let shown = out
        .lines()
        .find(|l| l.contains("nope/x") && l.contains('│'))
        .expect("the marked line is shown");
    assert!(shown.contains('…'), "{shown}");
    // 80 characters each side of a 6-character mark, two ellipses, the gutter.
    assert!(shown.chars().count() <= 80 + 6 + 80 + 2 + 10, "{shown}");
}

#[test]
fn many_input_problems_show_a_bounded_number_then_a_count() {
    let parts = (0..5_000)
        .map(|i| format!("  p{i}: {{ use: nope/x{i} }}\n"))
        .collect::<String>();
    let text = format!("railcheck: 1\nparts:\n{parts}nets: {{}}\n");
    let out = input_report(&text);
    let shown = out.matches("× unknown library part").count();
    assert_eq!(shown, report::MAX_SHOWN, "diagnostics drawn");
    assert!(
        out.contains(&format!(
            "… and {} more input problems",
            5_000 - report::MAX_SHOWN
        )),
        "{}",
        &out[out.len() - 300..]
    );
    assert!(out.contains("5000 input problems"));
    assert!(out.len() < 100 * 1_000, "{} bytes", out.len());
}

#[test]
fn control_codes_in_a_key_never_reach_the_terminal() {
    // ECMA-48: ESC ] 0 ; … BEL retitles a terminal window, ESC [ 2 J clears
    // the screen; U+202E (Unicode UAX #9) reverses what follows.
    let text =
        "railcheck: 1\nname: x\nparts: {}\nnets: {}\n\"evil\\e]0;pwned\\a\\e[2J\\u202E\": 1\n";
    let out = input_report(text);
    assert!(!out.contains('\u{1b}'), "{out:?}");
    assert!(!out.contains('\u{7}'), "{out:?}");
    assert!(!out.contains('\u{202e}'), "{out:?}");
    assert!(out.contains("\\u{1b}"), "{out}");
}

#[test]
fn control_codes_in_the_file_name_never_reach_the_terminal() {
    let failure = railcheck::check(
        "plan\u{1b}[2J.yaml",
        "railcheck: 1\nparts: {}\nnets: {}\nbogus: 1\n",
        &Library::builtin(),
    )
    .unwrap_err();
    let out = report::render_input_errors(&failure.sources, &failure.errors, HumanStyle::default());
    assert!(!out.contains('\u{1b}'), "{out:?}");
}

fn decode_error(bytes: Vec<u8>) -> railcheck::model::InputError {
    let failure = railcheck::decode("plan.yaml", bytes).expect_err("not UTF-8");
    assert_eq!(failure.errors.len(), 1);
    let error = failure.errors[0].clone();
    assert_eq!(failure.sources.line_column(error.span), (1, 1));
    error
}

fn utf16(text: &str, big_endian: bool, mark: bool) -> Vec<u8> {
    let mut units: Vec<u16> = text.encode_utf16().collect();
    if mark {
        units.insert(0, 0xFEFF); // Unicode §23.8 byte order mark
    }
    units
        .iter()
        .flat_map(|u| {
            if big_endian {
                u.to_be_bytes()
            } else {
                u.to_le_bytes()
            }
        })
        .collect()
}

#[test]
fn utf16_with_or_without_a_byte_order_mark_is_named() {
    let text = "railcheck: 1\nname: x\nparts: {}\nnets: {}\n";
    for (big, mark) in [(false, true), (true, true), (false, false), (true, false)] {
        let error = decode_error(utf16(text, big, mark));
        let endian = if big { "big-endian" } else { "little-endian" };
        assert_eq!(
            error.message,
            format!("the file is UTF-16 ({endian}) text, not UTF-8")
        );
    }
    let error = decode_error(vec![0xFF, 0xFE, 0, 0, b'r', 0, 0, 0]);
    assert!(error.message.contains("UTF-32"), "{}", error.message);
}

#[test]
fn a_utf8_byte_order_mark_is_read_past() {
    let mut bytes = vec![0xEF, 0xBB, 0xBF];
    bytes.extend_from_slice(b"railcheck: 1\nname: x\nparts: {}\nnets: {}\n");
    let text = railcheck::decode("plan.yaml", bytes).expect("UTF-8 with a mark");
    assert!(text.starts_with("railcheck"));
}
