//! Golden files for the rendered reports: the terminal report of both
//! examples, without colour at a fixed width, and the first draft's JSON.
//! Review a changed snapshot before accepting it (`cargo insta review`, or
//! `INSTA_UPDATE=always cargo test --test report` and read the diff).

use railcheck::model::Library;
use railcheck::report::{self, HumanStyle};

fn checked(path: &str) -> railcheck::Checked {
    let text = std::fs::read_to_string(path).expect("example exists");
    railcheck::check(path, &text, &Library::builtin()).unwrap_or_else(|f| panic!("{:?}", f.errors))
}

fn human(path: &str) -> String {
    let c = checked(path);
    report::render_findings(
        &c.sources,
        c.plan_source,
        &c.findings,
        &railcheck::safety::cautions(&c.plan),
        HumanStyle {
            color: false,
            width: 100,
        },
    )
}

#[test]
fn first_draft_terminal_report() {
    insta::assert_snapshot!(human("examples/first-draft.yaml"));
}

#[test]
fn orchard_rover_terminal_report() {
    let text = human("examples/orchard-rover.yaml");
    // A clean plan still ends with its cautions (issue: cautions in every report).
    assert!(text.contains("0 errors, 0 warnings, 0 notes"));
    insta::assert_snapshot!(text);
}

#[test]
fn first_draft_json_report() {
    let c = checked("examples/first-draft.yaml");
    insta::assert_snapshot!(report::findings_json(
        &c.sources,
        c.plan_source,
        &c.findings,
        &railcheck::safety::cautions(&c.plan),
    ));
}

#[test]
fn input_errors_terminal_report() {
    let text = "railcheck: 1\nparts:\n  pack: { use: battery/lipo-3s, with: { capacty: 5 Ah } }\n  reg: { class: regulator, topology: linear, output: 5 }\nnets:\n  VBAT: [pack.pos, reg.vinn]\n";
    let failure =
        railcheck::check("broken.yaml", text, &Library::builtin()).expect_err("input errors");
    insta::assert_snapshot!(report::render_input_errors(
        &failure.sources,
        &failure.errors,
        HumanStyle {
            color: false,
            width: 100,
        },
    ));
}
