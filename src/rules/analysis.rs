//! The operating point itself: points that did not settle.

use super::{Context, Finding, Rule, RuleDoc, Severity, mode_label};

pub const NO_CONVERGENCE: Rule = Rule {
    id: "analysis/no-convergence",
    severity: Severity::Error,
    summary: "the operating point did not settle",
    doc: RuleDoc {
        what: "Whether currents and voltages settle to a consistent operating point in every mode and battery state.",
        why: "A switching converter draws constant power: as its input sags it draws more current, which sags the input further. Beyond what the source can deliver through its resistance there is no operating point — in the real robot the rail collapses and everything resets.",
        example: "railcheck: 1\nname: lab lamp rig\nparts:\n  pack:  { use: battery/lipo-2s, with: { cutoff: true, internal_resistance: 2 ohm } }   # worn\n  fuse:  { use: fuse/blade-3a }\n  boost: { use: regulator/boost-12v }   # 12 V × 0.4 A / 85 % = 5.6 W in\n  lamp:  { use: load/lamp-12v }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, boost.vin]\n  12V:   [boost.vout, lamp.vin]\n  GND:   [pack.neg, boost.gnd, lamp.gnd]\n# the empty pack gives at most 6.0² / (4 × 2 ohm) = 4.5 W",
        fix: "railcheck: 1\nname: lab lamp rig\nparts:\n  pack:  { use: battery/lipo-2s, with: { cutoff: true } }   # healthy: 0.025 ohm\n  fuse:  { use: fuse/blade-3a }\n  boost: { use: regulator/boost-12v }   # 12 V × 0.4 A / 85 % = 5.6 W in\n  lamp:  { use: load/lamp-12v }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, boost.vin]\n  12V:   [boost.vout, lamp.vin]\n  GND:   [pack.neg, boost.gnd, lamp.gnd]",
        references: "Constant-power load on a source with resistance R: a solution exists only while P/η ≤ V²/(4R) (maximum power transfer, Ohm's law); switching input current Iin = Vout·Iout/(η·Vin) by conservation of energy.",
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
