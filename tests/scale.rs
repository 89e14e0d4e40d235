//! Generated plans of a few thousand parts read and solve: no input errors,
//! every operating point settles, and parts inside their ratings raise no
//! errors however many there are.

#[path = "common/generate.rs"]
mod generate;

use railcheck::model::Library;

#[test]
fn a_thousand_part_plan_reads_and_solves() {
    let text = generate::plan(1_000);
    let checked = match railcheck::check("generated.yaml", &text, &Library::builtin()) {
        Ok(c) => c,
        Err(f) => panic!(
            "generated plan has input errors: {:?}",
            &f.errors[..f.errors.len().min(3)]
        ),
    };
    assert!(checked.plan.parts.len() >= 1_000);
    let analysis = checked.analysis.as_ref().expect("no shorts or loops");
    assert!(analysis.points.iter().all(|p| p.unsettled.is_none()));
    // Each drive module is inside its ratings (e.g. 6 V gearmotor stalled
    // on 14.6 V through 2 × 5 mΩ: 14.6 / (3.75 + 0.01) = 3.9 A, below the
    // 30 A channel peak; brushed DC motor equation), so nothing is an error.
    let errors: Vec<&String> = checked
        .findings
        .iter()
        .filter(|f| f.severity == railcheck::rules::Severity::Error)
        .map(|f| &f.message)
        .collect();
    assert!(errors.is_empty(), "{errors:?}");
}

/// A plan refused for what its aliases expand to says so, with the limit
/// and the file's size, and points at the file's start rather than at the
/// line where the count happened to run out.
#[test]
fn an_expanding_plan_is_refused_as_too_large_with_its_limit_and_size() {
    // Ten values, then seven levels of ten aliases each: 10^8 values from
    // a file of a few hundred bytes.
    let mut text = String::from("railcheck: 1\nx0: &a0 [1,1,1,1,1,1,1,1,1,1]\n");
    for level in 1..8 {
        let aliases = vec![format!("*a{}", level - 1); 10].join(",");
        text.push_str(&format!("x{level}: &a{level} [{aliases}]\n"));
    }
    let failure = match railcheck::check("aliases.yaml", &text, &Library::builtin()) {
        Ok(_) => panic!("an expansion of 10^8 values was read"),
        Err(f) => f,
    };
    assert_eq!(failure.errors.len(), 1);
    let error = &failure.errors[0];
    assert!(
        error.message.starts_with("the plan is too large"),
        "{}",
        error.message
    );
    assert!(
        error
            .message
            .contains(&format!("a file of {} bytes", text.len())),
        "{}",
        error.message
    );
    assert!(
        error.message.contains("more than 1000000 "),
        "{}",
        error.message
    );
    assert_eq!((error.span.start, error.span.end), (0, 0));
}

/// Operating points solved side by side on several threads are the same,
/// to the last bit and in the same order, as points solved one after
/// another: each point depends only on the plan.
#[test]
fn points_solved_on_several_threads_match_points_solved_on_one() {
    use railcheck::analysis::Analysis;
    use railcheck::graph::Circuit;
    let library = Library::builtin();
    let orchard = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/examples/orchard-rover.yaml"
    ))
    .expect("the example plan");
    for text in [generate::plan(400), orchard] {
        let (_, _, plan) = match railcheck::read("plan.yaml", &text, &library) {
            Ok(read) => read,
            Err(f) => panic!("plan has input errors: {:?}", f.errors),
        };
        let circuit = Circuit::build(&plan);
        let serial = Analysis::solve_on(&plan, &circuit, 1);
        assert_eq!(
            serial.points.len(),
            30,
            "5 modes x 3 battery states x 2 corners"
        );
        // Debug output writes each number exactly (shortest round trip).
        let expected = format!("{:?}", serial.points);
        for threads in [2, 3, 8] {
            let parallel = Analysis::solve_on(&plan, &circuit, threads);
            assert!(
                format!("{:?}", parallel.points) == expected,
                "{threads} threads gave other points"
            );
        }
    }
}

/// Parts that share no conductor, part or cable are separate circuits: by
/// Kirchhoff's laws nothing one draws reaches the other, so a module's
/// voltages and currents are the same, to the last bit, whatever else the
/// plan holds — here beside a module whose pack has twenty times the
/// library's internal resistance (0.3 Ω, a value chosen only to make it sag
/// deeper), which takes more passes to settle.
#[test]
fn a_module_solves_the_same_alone_and_beside_others() {
    use railcheck::analysis::Analysis;
    use railcheck::graph::Circuit;
    let library = Library::builtin();
    let solved = |text: &str| {
        let (_, _, plan) = match railcheck::read("plan.yaml", text, &library) {
            Ok(read) => read,
            Err(f) => panic!("plan has input errors: {:?}", f.errors),
        };
        let circuit = Circuit::build(&plan);
        let analysis = Analysis::solve_on(&plan, &circuit, 1);
        (plan, analysis)
    };
    let alone = generate::plan(generate::DOMAIN_PARTS);
    let fresh_pack = "pack_1: { use: battery/lipo-3s, with: { cutoff: true } }";
    let three = generate::plan(3 * generate::DOMAIN_PARTS);
    assert!(three.contains(fresh_pack));
    let three = three.replace(
        fresh_pack,
        "pack_1: { use: battery/lipo-3s, with: { cutoff: true, internal_resistance: 0.3 ohm } }",
    );
    let (plan_alone, alone) = solved(&alone);
    let (plan_three, three) = solved(&three);
    assert_eq!(alone.points.len(), three.points.len());
    let net_named = |plan: &railcheck::model::Plan, name: &str| {
        plan.nets
            .iter()
            .position(|n| n.name == name)
            .unwrap_or_else(|| panic!("no net {name}"))
    };
    let mut worn_differs = false;
    for (single, joint) in alone.points.iter().zip(&three.points) {
        assert!(single.unsettled.is_none() && joint.unsettled.is_none());
        for (net, n) in plan_alone.nets.iter().enumerate() {
            let base = n
                .name
                .strip_suffix("_0")
                .expect("module 0's nets end in _0");
            for module in ["0", "2"] {
                let other = net_named(&plan_three, &format!("{base}_{module}"));
                assert_eq!(
                    (single.net_potential[net], single.net_current[net]),
                    (joint.net_potential[other], joint.net_current[other]),
                    "net {base}_{module} at {:?} {:?} {:?}",
                    single.mode,
                    single.battery,
                    single.corner
                );
            }
            let worn = net_named(&plan_three, &format!("{base}_1"));
            worn_differs |= single.net_potential[net] != joint.net_potential[worn];
        }
    }
    // The worn pack really does sag its own module.
    assert!(worn_differs);
}
