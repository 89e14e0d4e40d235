//! Safety: every actuator's supply path passes through a stop switch.
//!
//! Actuators are motors, servos and loads marked `moves: true`. The path is
//! traced from the motor's driver `vm` pin (or the rail a motor sits on
//! directly; a servo's or moving load's own supply input) back to every
//! battery that can power it: up its net
//! tree to the rail's source, and through converters (regulators, boards,
//! USB hosts) to their own inputs. A `stop: true` switch anywhere on a path
//! clears it; every path must be cleared. Only the supply side counts: a
//! switch in the return lead leaves the motor wiring live at pack voltage.
//! Not for the plan's printed cautions (that is `crate::safety`).

use super::{Context, Finding, Rule, RuleDoc, Severity};
use crate::graph::MotorFeed;
use crate::model::{Class, NetId, PartId, PinRef, PinRole};

pub const NO_STOP: Rule = Rule {
    id: "safety/no-stop",
    severity: Severity::Warning,
    summary: "motors, servos or other actuators with no stop switch in their supply path",
    doc: RuleDoc {
        what: "Traces each actuator's supply — a motor's driver `vm` pin or the rail it sits on directly, a servo's or a `moves: true` load's own supply input — back through the net wiring and any converters to every battery that powers it, and looks for a switch marked `stop: true` on the way. Every such path must pass one.",
        why: "A robot that runs away, pins a hand or drives off a bench must be stoppable at once, whatever the software is doing; a stop switch that cuts the motors' power is the one control that does not depend on the firmware.",
        example: "railcheck: 1\nname: warehouse tug\nparts:\n  pack:  { use: battery/lipo-3s, with: { cutoff: true } }\n  fuse:  { use: fuse/blade-15a }\n  buck:  { use: regulator/buck-5v-3a }\n  drive: { use: driver/mosfet-dual-hbridge }\n  left:  { use: motor/gearmotor-medium }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, buck.vin, drive.vm]   # nothing but the fuse between the pack and the motor\n  5V:    [buck.vout, drive.vlogic]\n  GND:   [pack.neg, buck.gnd, drive.gnd]\n  LA:    [drive.out1a, left.a]\n  LB:    [drive.out1b, left.b]\n",
        fix: "railcheck: 1\nname: warehouse tug\nparts:\n  pack:  { use: battery/lipo-3s, with: { cutoff: true } }\n  fuse:  { use: fuse/blade-15a }\n  estop: { use: switch/estop-20a }\n  buck:  { use: regulator/buck-5v-3a }\n  drive: { use: driver/mosfet-dual-hbridge }\n  left:  { use: motor/gearmotor-medium }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, estop.a, buck.vin]\n  VMOT:  [estop.b, drive.vm]   # the stop cuts the motor; the electronics stay up\n  5V:    [buck.vout, drive.vlogic]\n  GND:   [pack.neg, buck.gnd, drive.gnd]\n  LA:    [drive.out1a, left.a]\n  LB:    [drive.out1b, left.b]\n",
        references: "Emergency stop function: ISO 13850 and IEC 60204-1 §9.2.5.4 (from memory); a latching red mushroom-head switch that cuts motor power directly is common practice for mobile robots.",
    },
    needs_operating_point: false,
    check: check_no_stop,
};

/// The parts a current passes between two nets of one electrical node: the
/// edges from each up to their common ancestor in the node's tree. `None`
/// when the nets do not meet in one tree.
fn parts_between(cx: &Context, a: NetId, b: NetId) -> Option<Vec<PartId>> {
    let ancestors = |start: NetId| {
        let mut chain = vec![(start, None)];
        let mut net = start;
        while let Some(parent) = cx.circuit.parent[net] {
            // A through loop cannot make a tree cycle, but never trust a walk.
            if chain.len() > cx.plan.nets.len() {
                break;
            }
            chain.push((parent.net, Some(parent.part)));
            net = parent.net;
        }
        chain
    };
    let up_a = ancestors(a);
    let up_b = ancestors(b);
    let (i, j) = up_a
        .iter()
        .enumerate()
        .find_map(|(i, (net, _))| up_b.iter().position(|(n, _)| n == net).map(|j| (i, j)))?;
    // Each entry holds the part that joins it to the entry before it.
    Some(
        up_a[1..=i]
            .iter()
            .chain(&up_b[1..=j])
            .filter_map(|(_, part)| *part)
            .collect(),
    )
}

fn is_stop(cx: &Context, part: PartId) -> bool {
    matches!(&cx.plan.parts[part].class, Class::Switch(s) if s.stop)
}

/// Follows power back from `net` toward the batteries; returns a battery it
/// reaches with no stop switch on the way.
fn unstopped_battery(cx: &Context, net: NetId, visited: &mut Vec<PartId>) -> Option<PartId> {
    let plan = cx.plan;
    let node_id = cx.circuit.node_of_net[net];
    let node = &cx.circuit.nodes[node_id];
    // Sources on this rail, and the host parts of USB cables that feed it.
    let mut feeders: Vec<(PartId, NetId)> = node
        .supply_outs
        .iter()
        .filter_map(|p: &PinRef| plan.parts[p.part].pins[p.pin].net.map(|n| (p.part, n)))
        .collect();
    for &link in &cx.circuit.vbus[node_id] {
        let (device, port) = plan.links[link].device;
        let fed = match plan.parts[device].ports[port].kind {
            crate::model::PortKind::UsbDevice {
                feeds: Some(pin), ..
            } => plan.parts[device].pins[pin].net,
            _ => None,
        };
        if let Some(fed) = fed {
            feeders.push((plan.links[link].host.0, fed));
        }
    }
    for (source, source_net) in feeders {
        let Some(between) = parts_between(cx, net, source_net) else {
            continue;
        };
        if between.iter().any(|&p| is_stop(cx, p)) {
            continue;
        }
        if let Some(found) = unstopped_part(cx, source, visited) {
            return Some(found);
        }
    }
    None
}

/// A battery reached from `part` (itself, or through its inputs) with no stop.
fn unstopped_part(cx: &Context, part: PartId, visited: &mut Vec<PartId>) -> Option<PartId> {
    let plan = cx.plan;
    if matches!(plan.parts[part].class, Class::Battery(_)) {
        return Some(part);
    }
    if visited.contains(&part) {
        return None;
    }
    visited.push(part);
    for (_, pin) in plan.parts[part].pins_with_role(PinRole::SupplyIn) {
        if let Some(input) = pin.net
            && let Some(found) = unstopped_battery(cx, input, visited)
        {
            return Some(found);
        }
    }
    // A part powered through a USB cable: its host feeds it.
    let links = cx.circuit.part_links[part].iter().map(|&l| &plan.links[l]);
    for link in links.filter(|l| l.device.0 == part) {
        if let Some(found) = unstopped_part(cx, link.host.0, visited) {
            return Some(found);
        }
    }
    None
}

/// Where an actuator's power enters: a motor's driver and its supply pin,
/// or the motor's own pin on the rail; a servo's or moving load's own
/// supply input.
fn supply_entries(cx: &Context) -> Vec<(PinRef, Vec<PartId>)> {
    let plan = cx.plan;
    let mut entries: Vec<(PinRef, Vec<PartId>)> = Vec::new();
    for (part_id, part) in plan.parts.iter().enumerate() {
        if !part.actuator || matches!(part.class, Class::Motor(_)) {
            continue;
        }
        if let Some((pin, _)) = part
            .pins_with_role(PinRole::SupplyIn)
            .find(|(_, p)| p.net.is_some())
        {
            entries.push((PinRef { part: part_id, pin }, vec![part_id]));
        }
    }
    for (motor, feed) in cx.circuit.motor_feed.iter().enumerate() {
        let entry = match *feed {
            Some(MotorFeed::Driver { driver, .. }) => {
                let part = &plan.parts[driver];
                let pin = part.pin("vm").or_else(|| {
                    part.pins_with_role(PinRole::SupplyIn)
                        .map(|(i, _)| i)
                        .next()
                });
                pin.map(|pin| PinRef { part: driver, pin })
            }
            Some(MotorFeed::Direct { supply, .. }) => plan.parts[motor]
                .pins
                .iter()
                .position(|p| p.net == Some(supply))
                .map(|pin| PinRef { part: motor, pin }),
            None => None,
        };
        let Some(entry) = entry else { continue };
        match entries.iter_mut().find(|(e, _)| *e == entry) {
            Some((_, motors)) => motors.push(motor),
            None => entries.push((entry, vec![motor])),
        }
    }
    entries
}

fn check_no_stop(cx: &Context, out: &mut Vec<Finding>) {
    let plan = cx.plan;
    // Actuators whose power enters on one rail share one cause: that rail's
    // path from the battery misses the stop. One finding per rail.
    let mut rails: Vec<(NetId, Vec<PinRef>, Vec<PartId>)> = Vec::new();
    for (entry, actuators) in supply_entries(cx) {
        let Some(net) = plan.parts[entry.part].pins[entry.pin].net else {
            continue;
        };
        match rails.iter_mut().find(|(n, _, _)| *n == net) {
            Some((_, entries, all)) => {
                entries.push(entry);
                all.extend(actuators);
            }
            None => rails.push((net, vec![entry], actuators)),
        }
    }
    for (net, entries, actuators) in rails {
        let Some(battery) = unstopped_battery(cx, net, &mut Vec::new()) else {
            continue;
        };
        let names: Vec<String> = actuators
            .iter()
            .map(|&m| format!("`{}`", cx.part_name(m)))
            .collect();
        let noun = |part: PartId| match plan.parts[part].class {
            Class::Motor(_) => "motor",
            Class::Servo => "servo",
            _ => "actuator",
        };
        let first_noun = noun(actuators[0]);
        let plural = if actuators.iter().all(|&a| noun(a) == first_noun) {
            format!("{first_noun}s")
        } else {
            "actuators".to_string()
        };
        let (who, verb, them) = match names.as_slice() {
            [one] => (format!("{} {one}", noun(actuators[0])), "takes", "it"),
            [init @ .., last] => (
                format!("{plural} {} and {last}", init.join(", ")),
                "take",
                "them",
            ),
            [] => continue,
        };
        let through: Vec<String> = entries
            .iter()
            .filter(|e| !actuators.contains(&e.part))
            .map(|&e| format!("`{}`", cx.pin_name(e)))
            .collect();
        let through = if through.is_empty() {
            String::new()
        } else {
            format!(" (through {})", through.join(" and "))
        };
        let mut finding = Finding::new(
            &NO_STOP,
            cx.pin_span(entries[0]),
            format!(
                "{who}{through} {verb} power from `{}` with no stop switch on the way: in an emergency nothing cuts {them} off short of unplugging the battery",
                cx.part_name(battery)
            ),
        )
        .help(if actuators.iter().all(|&m| matches!(plan.parts[m].class, Class::Motor(_))) {
            "put a latching stop switch (`stop: true`) in the motors' supply, between the battery's fuse and the driver, rated for the motors' stall current"
        } else if actuators.len() == 1 {
            "put a latching stop switch (`stop: true`) in its supply, between the battery's fuse and the actuator (or its regulator), rated for its stall current"
        } else {
            "put a latching stop switch (`stop: true`) in their supply, between the battery's fuse and the actuators (or their regulator), rated for their stall current"
        })
        .part(cx.part_name(battery))
        .net(cx.net_name(net));
        for &m in &actuators {
            finding = finding.part(cx.part_name(m));
        }
        for (i, &entry) in entries.iter().enumerate() {
            if !actuators.contains(&entry.part) {
                finding = finding.part(cx.part_name(entry.part));
            }
            if i > 0 {
                finding =
                    finding.label(cx.pin_span(entry), format!("`{}` too", cx.pin_name(entry)));
            }
        }
        out.push(finding);
    }
}
