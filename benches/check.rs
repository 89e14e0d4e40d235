//! How long the main job takes on generated plans of growing size: reading,
//! graph, operating point over every mode and battery state, and all rules.

use criterion::{BenchmarkId, Criterion, criterion_group, criterion_main};
use railcheck::model::Library;
use std::hint::black_box;

#[path = "../tests/common/generate.rs"]
mod generate;

fn check_generated(c: &mut Criterion) {
    let library = Library::builtin();
    let mut group = c.benchmark_group("check");
    group.sample_size(10);
    for parts in [100, 1_000] {
        let text = generate::plan(parts);
        group.bench_with_input(BenchmarkId::from_parameter(parts), &text, |b, text| {
            b.iter(|| {
                let checked = railcheck::check("generated.yaml", black_box(text), &library);
                black_box(checked.map(|c| c.findings.len()).unwrap_or(0))
            })
        });
    }
    group.finish();
}

criterion_group!(benches, check_generated);
criterion_main!(benches);
