//! How long laying out and writing the block diagram takes for generated
//! plans of 100, 1,000 and 10,000 parts (the check itself is done once,
//! outside the timing; `cargo bench --bench check` times `draw` whole), and
//! the whole build notes beside it at 1,000 parts: the notes draw the same
//! diagram and add the budget, the wire list, the bring-up procedure and the
//! templates, with a target of at most 2× `draw` alone.

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
        if parts == 1_000 {
            group.bench_with_input(BenchmarkId::new("notes", parts), &checked, |b, checked| {
                b.iter(|| {
                    black_box(railcheck::report::notes_html(
                        black_box(checked),
                        railcheck::report::NotesPage::A4,
                    ))
                    .len()
                })
            });
        }
    }
    group.finish();
}

criterion_group!(benches, draw_generated);
criterion_main!(benches);
