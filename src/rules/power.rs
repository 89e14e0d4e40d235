//! Power topology rules, decided on the graph before any current is solved:
//! shorts, sources fighting on one rail, loads with no source, converters
//! feeding themselves.

use super::{Context, Finding, Rule, RuleDoc, Severity};
use crate::graph::Stage;
use crate::model::{PartId, PinRole, PortKind};
use petgraph::algo::kosaraju_scc;

pub const SHORT: Rule = Rule {
    id: "power/short",
    severity: Severity::Error,
    summary: "a supply output and a ground on the same node",
    doc: RuleDoc {
        what: "Whether any electrical node (nets joined through fuses, switches and connector contacts count as one) holds both a `supply-out` pin and a `ground` pin.",
        why: "A source wired straight to ground is a dead short: a battery delivers hundreds of amperes, melts wire insulation and can start a fire before any fuse clears.",
        example: "railcheck: 1\nname: greenhouse lamp cart\nparts:\n  pack: { use: battery/lead-acid-12v }\n  fuse: { use: fuse/blade-5a }\n  lamp: { use: load/lamp-12v }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  LAMP:  [lamp.vin]\n  GND:   [pack.neg, lamp.gnd, fuse.b]   # fused lead crimped into ground",
        fix: "railcheck: 1\nname: greenhouse lamp cart\nparts:\n  pack: { use: battery/lead-acid-12v }\n  fuse: { use: fuse/blade-5a }\n  lamp: { use: load/lamp-12v }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  LAMP:  [fuse.b, lamp.vin]\n  GND:   [pack.neg, lamp.gnd]",
        references: "Kirchhoff's laws; prospective short-circuit current I = V / (R_pack + R_wires) (Ohm's law worked example: 12.6 V through 10 mΩ and 2 m of 14 AWG gives 474 A, within the 1000 A breaking capacity of ISO 8820-3 blade fuses).",
    },
    needs_operating_point: false,
    check: check_short,
};

fn check_short(cx: &Context, out: &mut Vec<Finding>) {
    for node in &cx.circuit.nodes {
        let (Some(&source), Some(&ground)) = (node.supply_outs.first(), node.grounds.first())
        else {
            continue;
        };
        let mut finding = Finding::new(
            &SHORT,
            cx.pin_span(source),
            format!(
                "`{}` (a supply output) and `{}` (a ground) are on the same node: a short circuit",
                cx.pin_name(source),
                cx.pin_name(ground)
            ),
        )
        .label(cx.pin_span(ground), "ground joined here")
        .help(
            if source.part != ground.part
                && [source.part, ground.part]
                    .iter()
                    .all(|&p| matches!(cx.plan.parts[p].class, crate::model::Class::Battery(_)))
            {
                "if these are two packs wired in series, describe them as one battery with the total `cells:` (or a `voltage:` window); otherwise separate the supply from the ground"
            } else {
                "separate the supply and the ground into different nets; check which pin each wire lands on"
            },
        )
        .part(cx.part_name(source.part))
        .part(cx.part_name(ground.part));
        for &net in &node.nets {
            finding = finding.net(cx.net_name(net));
        }
        out.push(finding);
    }
}

pub const CONFLICT: Rule = Rule {
    id: "power/conflict",
    severity: Severity::Error,
    summary: "two supply outputs feed one rail",
    doc: RuleDoc {
        what: "Whether two sources, neither marked `or: diode`, drive the same rail: two `supply-out` pins, or a supply-out and the VBUS of a USB cable whose device port `feeds` that rail.",
        why: "Two regulated outputs tied together fight: the higher one back-feeds the lower, which can destroy a regulator or a USB port and makes the rail voltage undefined.",
        example: "railcheck: 1\nname: orchard scout\nparts:\n  pack:   { use: battery/nimh-8cell }\n  fuse:   { use: fuse/blade-2a }\n  buck:   { use: regulator/buck-5v-3a }\n  brain:  { use: board/mcu-8bit-5v }\n  ranger: { use: sensor/rangefinder-5v }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, buck.vin, brain.vin]\n  5V:    [buck.vout, brain.5v, ranger.vcc]   # two 5 V outputs tied together\n  GND:   [pack.neg, buck.gnd, brain.gnd, ranger.gnd]",
        fix: "railcheck: 1\nname: orchard scout\nparts:\n  pack:   { use: battery/nimh-8cell }\n  fuse:   { use: fuse/blade-2a }\n  buck:   { use: regulator/buck-5v-3a }\n  brain:  { use: board/mcu-8bit-5v }\n  ranger: { use: sensor/rangefinder-5v }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, buck.vin, brain.vin]\n  5V:    [buck.vout, ranger.vcc]\n  GND:   [pack.neg, buck.gnd, brain.gnd, ranger.gnd]",
        references: "Kirchhoff's voltage law (two ideal sources in parallel are undefined); diode-OR power sharing, common practice.",
    },
    needs_operating_point: false,
    check: check_conflict,
};

fn check_conflict(cx: &Context, out: &mut Vec<Finding>) {
    let plan = cx.plan;
    for (node_id, node) in cx.circuit.nodes.iter().enumerate() {
        if node.is_ground() {
            continue;
        }
        // Each source that can back-feed: a supply-out not marked `or: diode`,
        // or a USB cable's VBUS fed into the rail without a diode.
        let mut sources: Vec<(String, crate::syntax::Span, usize)> = node
            .supply_outs
            .iter()
            .filter(|p| !plan.parts[p.part].pins[p.pin].diode_or)
            .map(|p| (format!("`{}`", cx.pin_name(*p)), cx.pin_span(*p), p.part))
            .collect();
        for &link in &cx.circuit.vbus[node_id] {
            let (device, port) = plan.links[link].device;
            if let PortKind::UsbDevice {
                diode_or: false, ..
            } = plan.parts[device].ports[port].kind
            {
                let (host, _) = plan.links[link].host;
                sources.push((
                    format!("USB VBUS from `{}`", cx.part_name(host)),
                    plan.links[link].span,
                    device,
                ));
            }
        }
        if sources.len() < 2 {
            continue;
        }
        let names: Vec<&str> = sources.iter().map(|s| s.0.as_str()).collect();
        let mut finding = Finding::new(
            &CONFLICT,
            sources[1].1,
            format!(
                "{} {} drive one rail",
                names.join(" and "),
                if names.len() == 2 { "both" } else { "all" }
            ),
        )
        .label(sources[0].1, "first source")
        .help("keep one source per rail, or mark sources that cannot back-feed with `or: diode`");
        for s in &sources {
            finding = finding.part(cx.part_name(s.2));
        }
        for &net in &node.nets {
            finding = finding.net(cx.net_name(net));
        }
        out.push(finding);
    }
}

pub const UNFED: Rule = Rule {
    id: "power/unfed",
    severity: Severity::Error,
    summary: "a supply input on a rail with no source",
    doc: RuleDoc {
        what: "Whether every `supply-in` pin that is wired sits on a rail that some `supply-out` feeds, and whether every part that needs power has at least one fed supply input (or a USB cable that powers it).",
        why: "A load on a rail with no source never powers up; often a net name was mistyped or a wire forgotten.",
        example: "railcheck: 1\nname: greenhouse climate logger\nparts:\n  pack:   { use: battery/nimh-8cell }\n  fuse:   { use: fuse/blade-2a }\n  buck:   { use: regulator/buck-5v-3a }\n  ranger: { use: sensor/rangefinder-5v }\nnets:\n  BATT+:   [pack.pos, fuse.a]\n  VBAT:    [fuse.b, buck.vin]\n  5V:      [buck.vout]\n  5V_SENS: [ranger.vcc]   # no source on this rail\n  GND:     [pack.neg, buck.gnd, ranger.gnd]",
        fix: "railcheck: 1\nname: greenhouse climate logger\nparts:\n  pack:   { use: battery/nimh-8cell }\n  fuse:   { use: fuse/blade-2a }\n  buck:   { use: regulator/buck-5v-3a }\n  ranger: { use: sensor/rangefinder-5v }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, buck.vin]\n  5V:    [buck.vout, ranger.vcc]\n  GND:   [pack.neg, buck.gnd, ranger.gnd]",
        references: "Kirchhoff's current law: a node with loads and no source carries no current.",
    },
    needs_operating_point: false,
    check: check_unfed,
};

/// Whether every supply input of `part` is in no net and no USB cable
/// powers it: the part is not powered at all.
pub(crate) fn wholly_unwired(cx: &Context, part_id: PartId) -> bool {
    let part = &cx.plan.parts[part_id];
    let mut supply_ins = part.pins_with_role(PinRole::SupplyIn).peekable();
    let has_supply = supply_ins.peek().is_some();
    has_supply
        && supply_ins.all(|(_, pin)| pin.net.is_none())
        && !cx.circuit.part_links[part_id].iter().any(|&link| {
            let l = &cx.plan.links[link];
            l.device.0 == part_id
                && matches!(part.ports[l.device.1].kind, PortKind::UsbDevice { .. })
        })
}

fn check_unfed(cx: &Context, out: &mut Vec<Finding>) {
    let plan = cx.plan;
    for (part_id, part) in plan.parts.iter().enumerate() {
        let supply_ins: Vec<usize> = part
            .pins_with_role(PinRole::SupplyIn)
            .map(|(i, _)| i)
            .collect();
        if supply_ins.is_empty() {
            continue;
        }
        let powered_by_cable = cx.circuit.part_links[part_id].iter().any(|&l| {
            let l = &plan.links[l];
            l.device.0 == part_id
                && matches!(part.ports[l.device.1].kind, PortKind::UsbDevice { .. })
        });
        let mut any_fed = false;
        for &pin in &supply_ins {
            let pin_ref = crate::model::PinRef { part: part_id, pin };
            let Some(node_id) = cx.circuit.node_of_pin(plan, pin_ref) else {
                continue;
            };
            let node = &cx.circuit.nodes[node_id];
            let fed = !node.supply_outs.is_empty() || !cx.circuit.vbus[node_id].is_empty();
            if fed && !node.is_ground() {
                any_fed = true;
                continue;
            }
            if node.is_ground() {
                // A supply input wired to ground: its own kind of mistake.
                out.push(
                    Finding::new(
                        &UNFED,
                        cx.pin_span(pin_ref),
                        format!(
                            "supply input `{}` is wired to ground, not to a rail",
                            cx.pin_name(pin_ref)
                        ),
                    )
                    .help("connect it to the rail that should power it")
                    .part(&part.name)
                    .net(cx.net_name(part.pins[pin].net.unwrap_or(0))),
                );
                continue;
            }
            let mut finding = Finding::new(
                &UNFED,
                cx.pin_span(pin_ref),
                format!(
                    "`{}` is on rail `{}`, which no source feeds",
                    cx.pin_name(pin_ref),
                    cx.net_name(part.pins[pin].net.unwrap_or(0))
                ),
            )
            .help("add the regulator or battery output that should feed this rail to its net")
            .part(&part.name);
            for &net in &node.nets {
                finding = finding.net(cx.net_name(net));
            }
            out.push(finding);
        }
        let all_open = supply_ins.iter().all(|&p| part.pins[p].net.is_none());
        if !any_fed && all_open && !powered_by_cable {
            let names: Vec<String> = supply_ins
                .iter()
                .map(|&p| format!("`{}`", part.pins[p].name))
                .collect();
            out.push(
                Finding::new(
                    &UNFED,
                    part.span,
                    format!(
                        "`{}` is not powered: its supply input {} is in no net",
                        part.name,
                        names.join(", ")
                    ),
                )
                .help({
                    let fix = format!(
                        "add `{}.{}` to the rail that should power it",
                        part.name, part.pins[supply_ins[0]].name
                    );
                    // Until then, a signal driven into one of its inputs
                    // powers it through the input's clamp diode.
                    let inputs: Vec<String> = part
                        .pins
                        .iter()
                        .filter(|p| p.role.is_input() && p.net.is_some())
                        .map(|p| format!("`{}.{}`", part.name, p.name))
                        .collect();
                    match inputs.as_slice() {
                        [] => fix,
                        [one] => format!("{fix}; until then, a signal driven into {one} powers the part through that input's clamp diode"),
                        _ => format!("{fix}; until then, signals driven into {} power the part through those inputs' clamp diodes", inputs.join(", ")),
                    }
                })
                .part(&part.name),
            );
        }
    }
}

pub const LOOP: Rule = Rule {
    id: "power/loop",
    severity: Severity::Error,
    summary: "a converter's output feeds its own input",
    doc: RuleDoc {
        what: "Whether power can flow from a converter's output back to its own input (directly or through other converters).",
        why: "A regulator that powers itself has no real source: the rail either collapses or latches in an undefined state, and the plan cannot be solved.",
        example: "railcheck: 1\nname: lab lamp rig\nparts:\n  pack:  { use: battery/nimh-8cell }\n  fuse:  { use: fuse/blade-3a }\n  buck:  { use: regulator/buck-5v-3a }\n  boost: { use: regulator/boost-12v }\n  lamp:  { use: load/lamp-12v }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b]\n  12V:   [boost.vout, lamp.vin, buck.vin]   # buck fed from the boost's output\n  5V:    [buck.vout, boost.vin]\n  GND:   [pack.neg, buck.gnd, boost.gnd, lamp.gnd]",
        fix: "railcheck: 1\nname: lab lamp rig\nparts:\n  pack:  { use: battery/nimh-8cell }\n  fuse:  { use: fuse/blade-3a }\n  buck:  { use: regulator/buck-5v-3a }\n  boost: { use: regulator/boost-12v }\n  lamp:  { use: load/lamp-12v }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, buck.vin]\n  12V:   [boost.vout, lamp.vin]\n  5V:    [buck.vout, boost.vin]\n  GND:   [pack.neg, buck.gnd, boost.gnd, lamp.gnd]",
        references: "Conservation of energy: a converter chain cannot supply its own input.",
    },
    needs_operating_point: false,
    check: check_loop,
};

fn check_loop(cx: &Context, out: &mut Vec<Finding>) {
    let flow = &cx.circuit.flow;
    // A graph with a topological order has no loop (a graph with a
    // self-loop has no such order); most plans stop here, without one
    // component list per stage.
    // Both walk the graph iteratively: a long converter chain cannot exhaust
    // the stack.
    if petgraph::algo::toposort(flow, None).is_ok() {
        return;
    }
    for component in kosaraju_scc(flow) {
        let self_loop = component.len() == 1 && flow.contains_edge(component[0], component[0]);
        if component.len() < 2 && !self_loop {
            continue;
        }
        let mut converters: Vec<usize> = component
            .iter()
            .filter_map(|&n| match flow[n] {
                Stage::Converter(part) => Some(part),
                Stage::Rail(_) => None,
            })
            .collect();
        converters.sort_unstable();
        let mut rails: Vec<usize> = component
            .iter()
            .filter_map(|&n| match flow[n] {
                Stage::Rail(node) => Some(node),
                Stage::Converter(_) => None,
            })
            .collect();
        rails.sort_unstable();
        let Some(&first) = converters.first() else {
            continue;
        };
        let names: Vec<String> = converters
            .iter()
            .map(|&p| format!("`{}`", cx.part_name(p)))
            .collect();
        let mut finding = Finding::new(
            &LOOP,
            cx.plan.parts[first].span,
            format!("power loops back: {} feed their own input", names.join(", ")),
        )
        .help("every converter's input must trace back to a battery without passing through its own output");
        for &p in &converters {
            finding = finding.part(cx.part_name(p));
        }
        for &rail in &rails {
            for &net in &cx.circuit.nodes[rail].nets {
                finding = finding.net(cx.net_name(net));
            }
        }
        out.push(finding);
    }
}
