//! `railcheck rules`: every rule of the registry is listed, and each
//! explanation is the rule's own documentation in the fixed shape.

use assert_cmd::Command;
use railcheck::rules::RULES;

fn run(args: &[&str]) -> (bool, String) {
    let output = Command::cargo_bin("railcheck")
        .unwrap()
        .args(args)
        .output()
        .unwrap();
    (
        output.status.success(),
        String::from_utf8(output.stdout).unwrap(),
    )
}

#[test]
fn the_list_names_every_rule_with_its_severity() {
    let (ok, text) = run(&["rules"]);
    assert!(ok);
    for rule in RULES {
        let line = text
            .lines()
            .find(|l| l.split_whitespace().next() == Some(rule.id))
            .unwrap_or_else(|| panic!("{} missing from:\n{text}", rule.id));
        assert!(line.contains(rule.severity.name()), "{line}");
        assert!(line.contains(rule.summary), "{line}");
    }
}

#[test]
fn each_explanation_is_the_rules_own_documentation() {
    for rule in RULES {
        let (ok, text) = run(&["rules", rule.id]);
        assert!(ok, "{}", rule.id);
        for heading in [
            "What it checks",
            "Why it matters",
            "Example",
            "Fix",
            "References",
        ] {
            assert!(text.contains(heading), "{}: no {heading}", rule.id);
        }
        for section in [rule.doc.what, rule.doc.why, rule.doc.references] {
            assert!(
                text.contains(section),
                "{}: section text not shown",
                rule.id
            );
        }
        for line in rule.doc.example.lines().chain(rule.doc.fix.lines()) {
            assert!(
                text.contains(line),
                "{}: example line {line:?} not shown",
                rule.id
            );
        }
    }
}

#[test]
fn an_unknown_rule_is_refused_with_exit_2() {
    let output = Command::cargo_bin("railcheck")
        .unwrap()
        .args(["rules", "fuse/undersize"])
        .output()
        .unwrap();
    assert_eq!(output.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&output.stderr).contains("railcheck rules"));
}

/// Each rule's documented example is a whole plan on which the rule fires,
/// and its documented fix a whole plan on which it does not, so the
/// catalogue teaches with examples that are true.
#[test]
fn every_doc_example_fires_and_its_fix_does_not() {
    let library = railcheck::model::Library::builtin();
    let mut problems = Vec::new();
    for rule in RULES {
        for (what, text, should_fire) in [
            ("example", rule.doc.example, true),
            ("fix", rule.doc.fix, false),
        ] {
            match railcheck::check(&format!("{} {what}", rule.id), text, &library) {
                Err(failure) => problems.push(format!(
                    "{} {what} does not read: {}",
                    rule.id,
                    failure
                        .errors
                        .iter()
                        .map(|e| e.message.as_str())
                        .collect::<Vec<_>>()
                        .join("; ")
                )),
                Ok(checked) => {
                    let fired = checked.findings.iter().any(|f| f.rule == rule.id);
                    if fired != should_fire {
                        problems.push(format!(
                            "{} {what}: the rule {} (findings: {:?})",
                            rule.id,
                            if fired { "fires" } else { "does not fire" },
                            checked.findings.iter().map(|f| f.rule).collect::<Vec<_>>()
                        ));
                    }
                }
            }
        }
    }
    assert!(
        problems.is_empty(),
        "{} problems:\n{}",
        problems.len(),
        problems.join("\n")
    );
}
