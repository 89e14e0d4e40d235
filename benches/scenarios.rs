//! What the power scenarios add to `check`: the whole check of a generated
//! plan against the scenario work alone (deriving and solving every
//! scenario, then the three rules that read them: `safety/no-stop`,
//! `scenario/back-feed`, `scenario/phantom-power`), at 1,000 and 10,000
//! parts. Each generated domain of 40 parts has its own stop switch, so the
//! 1,000-part plan has 25 switch-open scenarios. docs/performance.md records
//! the ratio: check ÷ (check − scenario work).

use criterion::{BenchmarkId, Criterion, criterion_group, criterion_main};
use railcheck::model::Library;
use railcheck::rules::{Context, rule};
use railcheck::scenario::Scenarios;
use std::hint::black_box;

#[path = "../tests/common/generate.rs"]
mod generate;

const SIZES: [usize; 2] = [1_000, 10_000];
const SCENARIO_RULES: [&str; 3] = [
    "safety/no-stop",
    "scenario/back-feed",
    "scenario/phantom-power",
];

fn scenarios(c: &mut Criterion) {
    let library = Library::builtin();
    let mut group = c.benchmark_group("scenarios");
    group.sample_size(10);
    for parts in SIZES {
        let text = generate::plan(parts);
        let checked =
            railcheck::check("generated.yaml", &text, &library).expect("generated plans read");
        group.bench_with_input(BenchmarkId::new("check", parts), &text, |b, text| {
            b.iter(|| {
                black_box(
                    railcheck::check("generated.yaml", black_box(text), &library)
                        .map(|c| c.findings.len())
                        .unwrap_or(0),
                )
            })
        });
        group.bench_with_input(
            BenchmarkId::new("scenario work", parts),
            &checked,
            |b, checked| {
                b.iter(|| {
                    let scenarios = Scenarios::solve(&checked.plan, &checked.circuit);
                    let cx = Context {
                        plan: &checked.plan,
                        circuit: &checked.circuit,
                        analysis: checked.analysis.as_ref(),
                        scenarios: Some(&scenarios),
                        margins: None,
                        worked: Default::default(),
                    };
                    let mut findings = Vec::new();
                    for id in SCENARIO_RULES {
                        if let Some(rule) = rule(id) {
                            (rule.check)(&cx, &mut findings);
                        }
                    }
                    black_box(findings.len())
                })
            },
        );
    }
    group.finish();
}

criterion_group!(benches, scenarios);
criterion_main!(benches);
