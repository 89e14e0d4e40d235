//! How long laying out and writing the block diagram takes for generated
//! plans of 100, 1,000 and 10,000 parts (the check itself is done once,
//! outside the timing; `cargo bench --bench check` times `draw` whole).

use criterion::{BenchmarkId, Criterion, criterion_group, criterion_main};
use railcheck::model::Library;
use std::hint::black_box;

#[path = "../tests/common/generate.rs"]
mod generate;

fn draw_generated(c: &mut Criterion) {
    let library = Library::builtin();
    let mut group = c.benchmark_group("diagram");
    group.sample_size(10);
    for parts in [100, 1_000, 10_000] {
        let text = generate::plan(parts);
        let checked = match railcheck::check("generated.yaml", &text, &library) {
            Ok(checked) => checked,
            Err(failure) => panic!("generated plan has input errors: {:?}", failure.errors),
        };
        group.bench_with_input(
            BenchmarkId::from_parameter(parts),
            &checked,
            |b, checked| b.iter(|| black_box(railcheck::diagram::draw(black_box(checked))).len()),
        );
    }
    group.finish();
}

criterion_group!(benches, draw_generated);
criterion_main!(benches);
