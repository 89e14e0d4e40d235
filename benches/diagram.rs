//! How long laying out and writing the block diagram takes for a generated
//! plan of 1,000 parts, and the whole build notes beside it (the check
//! itself is done once, outside the timing).

use criterion::{Criterion, criterion_group, criterion_main};
use railcheck::model::Library;
use std::hint::black_box;

#[path = "../tests/common/generate.rs"]
mod generate;

fn draw_generated(c: &mut Criterion) {
    let text = generate::plan(1_000);
    let checked = match railcheck::check("generated.yaml", &text, &Library::builtin()) {
        Ok(checked) => checked,
        Err(failure) => panic!("generated plan has input errors: {:?}", failure.errors),
    };
    let mut group = c.benchmark_group("diagram");
    group.sample_size(10);
    group.bench_function("draw 1000 parts", |b| {
        b.iter(|| black_box(railcheck::diagram::draw(black_box(&checked))).len())
    });
    // The build notes draw the same diagram and add the budget, the wire
    // list and the templates: the target is within 2× of `draw` alone.
    group.bench_function("notes 1000 parts", |b| {
        b.iter(|| {
            black_box(railcheck::report::notes_html(
                black_box(&checked),
                railcheck::report::NotesPage::A4,
            ))
            .len()
        })
    });
    group.finish();
}

criterion_group!(benches, draw_generated);
criterion_main!(benches);
