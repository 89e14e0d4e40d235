//! The structured mutation fuzzer, for long runs:
//! `cargo run --release --example fuzz -- --seconds 3600 [--seed N]`.
//! Prints the runs made and each finding; a finding's input is saved under
//! `target/fuzz-findings/`. `cargo test --test hostile_fuzz` runs a short
//! bounded pass with a fixed seed.

#[path = "../tests/fuzzing/engine.rs"]
mod engine;

use std::time::{Duration, Instant};

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let value = |flag: &str, default: u64| {
        args.iter()
            .position(|a| a == flag)
            .and_then(|i| args.get(i + 1))
            .and_then(|v| v.parse().ok())
            .unwrap_or(default)
    };
    let seconds = value("--seconds", 60);
    let seed = value("--seed", 1);
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR"));
    let seeds = engine::seeds(root);
    // The hook would print every caught panic; the findings list them.
    std::panic::set_hook(Box::new(|_| {}));
    let started = Instant::now();
    let deadline = started + Duration::from_secs(seconds);
    let out = root.join("target/fuzz-findings");
    let mut total = 0u64;
    let mut found = 0usize;
    let mut round = 0u64;
    // Rounds of 10,000 runs, each with its own seed, so progress is printed.
    while Instant::now() < deadline {
        let (runs, findings) = engine::run(
            seed.wrapping_mul(1_000_003).wrapping_add(round),
            &seeds,
            deadline,
            10_000,
            1_000,
        );
        total += runs;
        round += 1;
        for finding in &findings {
            found += 1;
            let _ = std::fs::create_dir_all(&out);
            let file = out.join(format!("finding-{found}.yaml"));
            let _ = std::fs::write(&file, &finding.input);
            println!("finding {found}: {} ({})", finding.what, file.display());
        }
        println!(
            "{total} runs, {found} findings, {:.0} s, {} seeds",
            started.elapsed().as_secs_f64(),
            seeds.len()
        );
    }
}
