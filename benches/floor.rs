//! The parse floor: how long reading a plan's YAML alone takes, with the
//! same serde-saphyr settings as `syntax::parse`, into a generic value. The
//! whole check is measured against it (docs/performance.md).
//!
//! `cargo bench --bench floor` times the floor on generated plans.
//! `cargo bench --bench floor -- --parse FILE` parses one file and exits
//! (for timing whole processes beside `railcheck check FILE`);
//! `cargo bench --bench floor -- --generate PARTS FILE` writes a generated
//! plan of that many parts.

use criterion::{BenchmarkId, Criterion};
use std::hint::black_box;

#[path = "../tests/common/generate.rs"]
mod generate;

/// Parses YAML text the way `syntax::parse` does (same budget, same float
/// policy), into a generic value instead of the spanned tree.
fn parse_floor(text: &str) -> Result<serde_json::Value, serde_saphyr::Error> {
    serde_saphyr::from_str_with_options::<serde_json::Value>(
        text,
        railcheck::syntax::reader_options(text),
    )
}

fn bench_floor(c: &mut Criterion) {
    let mut group = c.benchmark_group("floor");
    group.sample_size(10);
    for parts in [100, 1_000, 10_000] {
        let text = generate::plan(parts);
        group.bench_with_input(BenchmarkId::from_parameter(parts), &text, |b, text| {
            b.iter(|| parse_floor(black_box(text)).is_ok())
        });
    }
    group.finish();
}

fn main() {
    let args: Vec<String> = std::env::args().skip(1).collect();
    match args
        .iter()
        .map(String::as_str)
        .collect::<Vec<_>>()
        .as_slice()
    {
        ["--parse", file, ..] => {
            let text = std::fs::read_to_string(file).expect("readable UTF-8 plan");
            if let Err(e) = parse_floor(&text) {
                eprintln!("{e}");
                std::process::exit(2);
            }
        }
        ["--generate", parts, file, ..] => {
            let parts: usize = parts.parse().expect("a number of parts");
            std::fs::write(file, generate::plan(parts)).expect("writable output");
        }
        _ => {
            let mut criterion = Criterion::default().configure_from_args();
            bench_floor(&mut criterion);
            criterion.final_summary();
        }
    }
}
