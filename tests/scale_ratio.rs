//! Check time grows in step with the plan: a plan ten times larger takes at
//! most twenty times as long, measured in the same run so the machine's
//! speed cancels out. Linear work gives a ratio near 10; one step that scans
//! the whole plan for each part gives about 100.

#[path = "common/generate.rs"]
mod generate;

use railcheck::model::Library;
use std::time::{Duration, Instant};

/// The shortest of `runs` checks of `text`: the least disturbed by other
/// work on the machine.
fn fastest_check(text: &str, library: &Library, runs: usize) -> Duration {
    (0..runs)
        .map(|_| {
            let start = Instant::now();
            let checked = railcheck::check("generated.yaml", text, library);
            let elapsed = start.elapsed();
            assert!(checked.is_ok(), "a generated plan reads without errors");
            elapsed
        })
        .min()
        .expect("at least one run")
}

#[test]
fn a_plan_ten_times_larger_takes_at_most_twenty_times_as_long() {
    let library = Library::builtin();
    let small = generate::plan(2_000);
    let large = generate::plan(20_000);
    // The small plan twice (the first run also warms the library and the
    // allocator), the large one once: about 40 s in a debug build.
    let small_time = fastest_check(&small, &library, 2);
    let large_time = fastest_check(&large, &library, 1);
    let ratio = large_time.as_secs_f64() / small_time.as_secs_f64();
    eprintln!("2,000 parts: {small_time:?}; 20,000 parts: {large_time:?}; ratio {ratio:.1}");
    assert!(
        ratio <= 20.0,
        "20,000 parts took {large_time:?}, {ratio:.1} times the {small_time:?} of 2,000 parts (at most 20)"
    );
}
