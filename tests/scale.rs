//! Generated plans of a few thousand parts read and solve: no input errors,
//! every operating point settles, and parts inside their ratings raise no
//! errors however many there are.

#[path = "common/generate.rs"]
mod generate;

use railcheck::model::Library;

#[test]
fn a_thousand_part_plan_reads_and_solves() {
    let text = generate::plan(1_000);
    let checked = match railcheck::check("generated.yaml", &text, &Library::builtin()) {
        Ok(c) => c,
        Err(f) => panic!(
            "generated plan has input errors: {:?}",
            &f.errors[..f.errors.len().min(3)]
        ),
    };
    assert!(checked.plan.parts.len() >= 1_000);
    let analysis = checked.analysis.as_ref().expect("no shorts or loops");
    assert!(analysis.points.iter().all(|p| p.unsettled.is_none()));
    // Each drive module is inside its ratings (e.g. 6 V gearmotor stalled
    // on 14.6 V through 2 × 5 mΩ: 14.6 / (3.75 + 0.01) = 3.9 A, below the
    // 30 A channel peak; brushed DC motor equation), so nothing is an error.
    let errors: Vec<&String> = checked
        .findings
        .iter()
        .filter(|f| f.severity == railcheck::rules::Severity::Error)
        .map(|f| &f.message)
        .collect();
    assert!(errors.is_empty(), "{errors:?}");
}
