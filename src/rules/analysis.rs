//! The operating point itself: points that did not settle.

use super::{Context, Finding, Rule, RuleDoc, Severity, mode_label};

pub const NO_CONVERGENCE: Rule = Rule {
    id: "analysis/no-convergence",
    severity: Severity::Error,
    summary: "the operating point did not settle",
    doc: RuleDoc {
        what: "Whether currents and voltages settle to a consistent operating point in every mode and battery state.",
        why: "A switching converter draws constant power: as its input sags it draws more current, which sags the input further. Beyond what the source can deliver through its resistance there is no operating point — in the real robot the rail collapses and everything resets.",
        example: "parts:\n  pack: { use: battery/lipo-2s, with: { internal_resistance: 2 ohm } }\n  boost: { use: regulator/boost-12v }   # 12 V × 2 A from a soft pack",
        fix: "parts:\n  pack: { use: battery/lipo-3s }        # stiffer source\n  boost: { use: regulator/boost-12v }",
        references: "Constant-power load on a source with resistance R: a solution exists only while P/η ≤ V²/(4R) (maximum power transfer, Ohm's law); switching input current by energy balance, reference sheet §7.",
    },
    needs_operating_point: true,
    check: check_no_convergence,
};

fn check_no_convergence(cx: &Context, out: &mut Vec<Finding>) {
    let Some(analysis) = cx.analysis else { return };
    let mut reported: Vec<Option<usize>> = Vec::new();
    for point in analysis.points.iter() {
        let Some(failure) = &point.unsettled else {
            continue;
        };
        if reported.contains(&failure.part) {
            continue;
        }
        reported.push(failure.part);
        let span = failure.part.map_or(cx.plan.span, |p| cx.plan.parts[p].span);
        let subject = failure
            .part
            .map(|p| format!(" at `{}`", cx.part_name(p)))
            .unwrap_or_default();
        let mut finding = Finding::new(
            &NO_CONVERGENCE,
            span,
            format!(
                "no operating point {}{subject}: {}",
                mode_label(cx.plan, point.mode, point.battery),
                failure.reason
            ),
        )
        .at_point(cx.plan, point)
        .help("lower the load on this source, or use a source with less internal and wiring resistance")
        .value("iterations", failure.iterations as f64);
        if let Some(p) = failure.part {
            finding = finding.part(cx.part_name(p));
        }
        out.push(finding);
    }
}
