//! How long the main commands take on generated plans of 100, 1,000 and
//! 10,000 parts, each from the plan's text to its output, as a user waits
//! for them: `check` (reading, graph, operating point over every mode and
//! battery state, all rules), `check --format json`, `budget` (its table)
//! and `draw` (the SVG). docs/performance.md has the figures and how they
//! compare with the parse floor (`cargo bench --bench floor`).

use criterion::{BenchmarkId, Criterion, criterion_group, criterion_main};
use railcheck::model::Library;
use std::hint::black_box;

#[path = "../tests/common/generate.rs"]
mod generate;

const SIZES: [usize; 3] = [100, 1_000, 10_000];

fn checked(text: &str, library: &Library) -> railcheck::Checked {
    match railcheck::check("generated.yaml", text, library) {
        Ok(checked) => checked,
        Err(failure) => panic!("generated plan has input errors: {:?}", failure.errors),
    }
}

fn commands(c: &mut Criterion) {
    let library = Library::builtin();
    for (name, run) in [
        ("check", run_check as fn(&str, &Library) -> usize),
        ("check --format json", run_json),
        ("budget", run_budget),
        ("draw", run_draw),
    ] {
        let mut group = c.benchmark_group(name);
        group.sample_size(10);
        for parts in SIZES {
            let text = generate::plan(parts);
            group.bench_with_input(BenchmarkId::from_parameter(parts), &text, |b, text| {
                b.iter(|| black_box(run(black_box(text), &library)))
            });
        }
        group.finish();
    }
}

fn run_check(text: &str, library: &Library) -> usize {
    checked(text, library).findings.len()
}

fn run_json(text: &str, library: &Library) -> usize {
    let checked = checked(text, library);
    let cautions = railcheck::safety::cautions(&checked.plan);
    railcheck::report::findings_json(
        &checked.sources,
        checked.plan_source,
        &checked.findings,
        &cautions,
    )
    .len()
}

fn run_budget(text: &str, library: &Library) -> usize {
    let checked = checked(text, library);
    let budget = railcheck::budget::budget(&checked);
    railcheck::report::budget_table("generated.yaml", &budget).len()
}

fn run_draw(text: &str, library: &Library) -> usize {
    railcheck::diagram::draw(&checked(text, library)).len()
}

criterion_group!(benches, commands);
criterion_main!(benches);
