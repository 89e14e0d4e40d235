//! A short, bounded pass of the structured mutation fuzzer with a fixed
//! seed: every mutated plan goes through reading, checking, every report
//! format, the budget and the diagram without a panic, a slow run or a
//! document that does not parse. Long runs: `cargo run --release --example
//! fuzz -- --seconds 3600` (docs/reliability.md).

#[path = "fuzzing/engine.rs"]
mod engine;

use std::time::{Duration, Instant};

#[test]
fn a_short_fuzz_pass_finds_nothing() {
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR"));
    let seeds = engine::seeds(root);
    assert!(seeds.len() > 100, "{} seeds", seeds.len());
    std::panic::set_hook(Box::new(|_| {}));
    let deadline = Instant::now() + Duration::from_secs(4);
    let (runs, findings) = engine::run(20_261_205, &seeds, deadline, 3_000, 0);
    let _ = std::panic::take_hook();
    assert!(runs > 20, "only {runs} runs");
    assert!(
        findings.is_empty(),
        "{} of {runs} runs failed; first: {} on\n{}",
        findings.len(),
        findings[0].what,
        findings[0].input.chars().take(2_000).collect::<String>()
    );
}
