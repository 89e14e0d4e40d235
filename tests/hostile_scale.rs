//! Work that grows with the plan grows linearly: many pins on one part and
//! one net, many input errors on a large plan. Each bound is several times
//! what the linear code needs in a debug build, and a fraction of what the
//! quadratic versions took.

use railcheck::model::Library;
use std::time::{Duration, Instant};

#[test]
fn a_connector_of_forty_thousand_pins_on_one_net_reads_in_linear_time() {
    let n = 40_000;
    let pins = (0..n)
        .map(|i| format!("p{i}: {{ role: ground }}"))
        .collect::<Vec<_>>()
        .join(", ");
    let refs = (0..n)
        .map(|i| format!("plug.p{i}"))
        .collect::<Vec<_>>()
        .join(", ");
    let text = format!(
        "railcheck: 1\nname: x\nparts:\n  plug: {{ class: connector, pins: {{ {pins} }} }}\nnets:\n  N: [{refs}]\n"
    );
    let started = Instant::now();
    let (_, _, plan) = railcheck::read("plan.yaml", &text, &Library::builtin()).expect("reads");
    let took = started.elapsed();
    assert_eq!(plan.parts[0].pins.len(), n);
    assert_eq!(plan.nets[0].pins.len(), n);
    // Two lookups by name per pin were linear scans: 40,000² comparisons.
    assert!(took < Duration::from_secs(15), "{took:?}");
}

#[test]
fn fifty_thousand_input_errors_get_their_positions_from_one_index() {
    let parts: String = (0..50_000)
        .map(|i| format!("  p{i}: {{ use: nope/x }}\n"))
        .collect();
    let text = format!("railcheck: 1\nparts:\n{parts}nets: {{}}\n");
    let failure = railcheck::check("plan.yaml", &text, &Library::builtin()).unwrap_err();
    assert_eq!(failure.errors.len(), 50_000);
    let started = Instant::now();
    let json = railcheck::report::input_errors_json(
        &failure.sources,
        failure.plan_source,
        &failure.errors,
    );
    let took = started.elapsed();
    let document: serde_json::Value = serde_json::from_str(&json).unwrap();
    let last = &document["errors"][49_999];
    assert_eq!(last["line"], 50_002);
    assert_eq!(last["column"], 18); // `  p49999: { use: ` is 17 characters
    // A scan from the start per error reads 50,000 × 0.7 MB on average.
    assert!(took < Duration::from_secs(10), "{took:?}");
}
