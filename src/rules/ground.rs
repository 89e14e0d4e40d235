//! Ground topology: every part's ground must reach a battery negative, and
//! parts that exchange signals must share a ground.

use super::{Context, Finding, Rule, RuleDoc, Severity};
use crate::model::{Class, PinRole};
use std::collections::BTreeMap;

pub const FLOATING: Rule = Rule {
    id: "ground/floating",
    severity: Severity::Error,
    summary: "a part's ground does not reach any battery negative",
    doc: RuleDoc {
        what: "Whether each part that has a ground pin (or needs one because it takes power) is joined — through nets, connector contacts or a USB cable — to a battery's negative terminal.",
        why: "A part with no return path either does not power up or finds a return through its signal pins, which pushes supply current through logic inputs and destroys them.",
        example: "nets:\n  GND: [pack.neg, buck.gnd]\n# sensor.gnd is in no net",
        fix: "nets:\n  GND: [pack.neg, buck.gnd, sensor.gnd]",
        references: "Kirchhoff's current law: supply current needs a return path.",
    },
    needs_operating_point: false,
    check: check_floating,
};

fn check_floating(cx: &Context, out: &mut Vec<Finding>) {
    let plan = cx.plan;
    for (part_id, part) in plan.parts.iter().enumerate() {
        if matches!(part.class, Class::Battery(_)) {
            continue;
        }
        let ground_pins: Vec<usize> = part
            .pins_with_role(PinRole::Ground)
            .map(|(i, _)| i)
            .collect();
        let needs_ground = !ground_pins.is_empty()
            || part
                .pins
                .iter()
                .any(|p| matches!(p.role, PinRole::SupplyIn | PinRole::SupplyOut));
        if !needs_ground || cx.circuit.is_grounded(part_id) {
            continue;
        }
        let (span, message) = match ground_pins.first() {
            None => (
                part.span,
                format!(
                    "`{}` takes power but has no ground pin or cable to return it",
                    part.name
                ),
            ),
            Some(&pin) => match part.pins[pin].net {
                None => (
                    part.span,
                    format!(
                        "ground pin `{}.{}` is in no net",
                        part.name, part.pins[pin].name
                    ),
                ),
                Some(net) => (
                    part.pins[pin].net_span.unwrap_or(part.span),
                    format!(
                        "ground of `{}` (net `{}`) does not reach any battery negative",
                        part.name,
                        cx.net_name(net)
                    ),
                ),
            },
        };
        let mut finding = Finding::new(&FLOATING, span, message)
            .help(
                "join this ground to the battery negative, directly or through a connector contact",
            )
            .part(&part.name);
        if let Some(net) = ground_pins.first().and_then(|&p| part.pins[p].net) {
            finding = finding.net(cx.net_name(net));
        }
        out.push(finding);
    }
}

pub const NOT_SHARED: Rule = Rule {
    id: "ground/not-shared",
    severity: Severity::Error,
    summary: "a signal joins two parts whose grounds are not joined",
    doc: RuleDoc {
        what: "For each net carrying logic signals, whether all the parts on it share one ground.",
        why: "A logic level is a voltage against ground; between two grounds that are not joined the receiver sees an undefined level, and the signal wire becomes the only return path.",
        example: "nets:\n  GND:  [pack.neg, mcu.gnd]\n  GND2: [aux.neg, sensor.gnd]\n  SIG:  [mcu.d2, sensor.out]",
        fix: "nets:\n  GND:  [pack.neg, aux.neg, mcu.gnd, sensor.gnd]\n  SIG:  [mcu.d2, sensor.out]",
        references: "Logic levels are referred to ground (JEDEC JESD8 defines VIH/VIL against the device's ground).",
    },
    needs_operating_point: false,
    check: check_not_shared,
};

fn check_not_shared(cx: &Context, out: &mut Vec<Finding>) {
    let plan = cx.plan;
    for (net_id, net) in plan.nets.iter().enumerate() {
        // Ground group → the first logic pin on this net whose part uses it.
        let mut groups: BTreeMap<usize, crate::model::PinRef> = BTreeMap::new();
        for &pin_ref in &net.pins {
            let pin = &plan.parts[pin_ref.part].pins[pin_ref.pin];
            if !pin.role.is_logic() {
                continue;
            }
            if let Some(group) = cx.circuit.ground_group[pin_ref.part] {
                groups.entry(group).or_insert(pin_ref);
            }
        }
        if groups.len() < 2 {
            continue;
        }
        let mut pins: Vec<_> = groups.values().copied().collect();
        pins.sort();
        let names: Vec<String> = pins
            .iter()
            .map(|p| format!("`{}`", cx.part_name(p.part)))
            .collect();
        let mut finding = Finding::new(
            &NOT_SHARED,
            cx.pin_span(pins[1]),
            format!(
                "signal `{}` joins {} whose grounds are not joined",
                net.name,
                names.join(" and ")
            ),
        )
        .label(cx.pin_span(pins[0]), "other end")
        .help("join the grounds of both parts (a ground wire alongside the signal)")
        .net(cx.net_name(net_id));
        for p in &pins {
            finding = finding.part(cx.part_name(p.part));
        }
        out.push(finding);
    }
}

/// STUB: to be written with the wire rules.
pub const OFFSET: Rule = Rule {
    id: "ground/offset",
    severity: Severity::Warning,
    summary: "return current through a shared ground wire shifts a logic receiver's ground by more than half the link's noise margin",
    doc: RuleDoc {
        what: "",
        why: "",
        example: "",
        fix: "",
        references: "",
    },
    needs_operating_point: true,
    check: |_, _| {},
};
