//! Regulators that cannot hold their output: input below output + dropout
//! (linear, buck), or above the output of a boost.

use super::{
    Context, Finding, Rule, RuleDoc, Severity, exceeds, falls_below, mode_label, worst_point,
};
use crate::model::{Class, Topology};
use crate::units::show_voltage;
use uom::si::electric_potential::volt;

pub const DROPOUT: Rule = Rule {
    id: "regulator/dropout",
    severity: Severity::Warning,
    summary: "a regulator's input falls below output + dropout",
    doc: RuleDoc {
        what: "In every mode and battery state, whether a linear or buck regulator's input stays at or above its nominal output plus its `dropout`, and whether a boost's input stays below its nominal output.",
        why: "Below output + dropout the regulator passes its input through less the dropout: the rail it feeds sags with the battery, and the loads on it may brown out.",
        example: "railcheck: 1\nname: greenhouse sensor node\nparts:\n  pack:   { use: battery/lipo-2s, with: { cutoff: true } }   # 6.0 V when empty\n  fuse:   { use: fuse/blade-1a }\n  reg:    { use: regulator/linear-5v-1a }                    # 5 V + 2 V dropout = 7 V\n  ranger: { use: sensor/rangefinder-5v }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, reg.vin]\n  5V:    [reg.vout, ranger.vcc]\n  GND:   [pack.neg, reg.gnd, ranger.gnd]",
        fix: "railcheck: 1\nname: greenhouse sensor node\nparts:\n  pack:   { use: battery/lipo-3s, with: { cutoff: true } }   # 9.0 V when empty\n  fuse:   { use: fuse/blade-1a }\n  reg:    { use: regulator/linear-5v-1a }                    # 5 V + 2 V dropout = 7 V\n  ranger: { use: sensor/rangefinder-5v }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, reg.vin]\n  5V:    [reg.vout, ranger.vcc]\n  GND:   [pack.neg, reg.gnd, ranger.gnd]",
        references: "Dropout requirement Vin ≥ Vout + Vdropout; typical dropout ≈ 2 V for an NPN linear regulator, 0.1–0.6 V for an LDO (common practice).",
    },
    needs_operating_point: true,
    check: check_dropout,
};

fn check_dropout(cx: &Context, out: &mut Vec<Finding>) {
    for (part_id, part) in cx.plan.parts.iter().enumerate() {
        let Class::Regulator(regulator) = &part.class else {
            continue;
        };
        // The regulator needs its input at or above its nominal output plus
        // its dropout (a boost: below its nominal output); the worst point is
        // the largest shortfall.
        let needed = regulator.output.nominal + regulator.dropout;
        let Some((point, _)) = worst_point(cx.points(), |p| {
            let input = p.regulators[part_id]?.input_voltage;
            match regulator.topology {
                Topology::Boost => {
                    exceeds(input.get::<volt>(), regulator.output.nominal.get::<volt>())
                        .then(|| (input - regulator.output.nominal).get::<volt>())
                }
                Topology::BuckBoost => None,
                _ => falls_below(input.get::<volt>(), needed.get::<volt>())
                    .then(|| (needed - input).get::<volt>()),
            }
        }) else {
            continue;
        };
        let Some(r) = point.regulators[part_id] else {
            continue;
        };
        let at = mode_label(cx.plan, point.mode, point.battery);
        let message = match regulator.topology {
            Topology::Boost => format!(
                "boost `{}` gets {} at its input {at}, above its {} output: it cannot regulate down, and the output follows the input",
                part.name,
                show_voltage(r.input_voltage),
                show_voltage(regulator.output.nominal)
            ),
            _ => format!(
                "`{}` needs {} at its input to hold {} (dropout {}) but gets {} {at}; its output falls to {}",
                part.name,
                show_voltage(needed),
                show_voltage(regulator.output.nominal),
                show_voltage(regulator.dropout),
                show_voltage(r.input_voltage),
                show_voltage(r.output_voltage)
            ),
        };
        let span = part
            .pin("vin")
            .and_then(|p| part.pins[p].net_span)
            .unwrap_or(part.span);
        let mut finding = Finding::new(&DROPOUT, span, message)
            .at_point(cx.plan, point)
            .help(match regulator.topology {
                Topology::Boost => "use a buck-boost, or a boost whose output is above the highest input",
                _ => "use a regulator with less dropout (an LDO or a buck), or a battery with more cells",
            })
            .part(&part.name)
            .value("input_voltage", r.input_voltage.get::<volt>())
            .value("output_voltage", r.output_voltage.get::<volt>())
            .value("dropout", regulator.dropout.get::<volt>());
        if let Some(net) = part.pin("vin").and_then(|p| part.pins[p].net) {
            finding = finding.net(cx.net_name(net));
        }
        out.push(finding);
    }
}
