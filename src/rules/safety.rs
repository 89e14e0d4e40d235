//! Safety: every actuator's supply path passes through a stop switch.
//!
//! Actuators are motors, servos and loads marked `moves: true`. Their power
//! enters at the motor's driver `vm` pin (or the rail a motor sits on
//! directly; a servo's or moving load's own supply input). The rule reads the
//! power scenarios (`crate::scenario`): an actuator is stopped when opening one
//! `stop: true` switch on its own leaves that entry with no power — through
//! converters and USB cables too. Only the supply side counts: a switch in
//! the return lead leaves the motor wiring live at pack voltage.
//! Not for the plan's printed cautions (that is `crate::safety`).

use super::{Context, Finding, Rule, RuleDoc, Severity};
use crate::graph::{MotorFeed, Stage};
use crate::model::{Class, NetId, PartId, PinRef, PinRole};
use crate::scenario::{Origin, Scenarios};
use petgraph::visit::{Dfs, Reversed};
use std::collections::{HashMap, HashSet};

pub const NO_STOP: Rule = Rule {
    id: "safety/no-stop",
    severity: Severity::Warning,
    summary: "motors, servos or other actuators with no stop switch in their supply path",
    doc: RuleDoc {
        what: "Takes each actuator's supply — a motor's driver `vm` pin or the rail it sits on directly, a servo's or a `moves: true` load's own supply input — and opens each switch marked `stop: true` in turn (the switch-open power scenarios of format reference §12): one of them alone must leave that supply with no power, through the net wiring, any converters and USB cables. Two stops in parallel, or a second battery that bypasses the stop, leave the actuator running.",
        why: "A robot that runs away, pins a hand or drives off a bench must be stoppable at once, whatever the software is doing; a stop switch that cuts the motors' power is the one control that does not depend on the firmware.",
        example: "railcheck: 1\nname: warehouse tug\nparts:\n  pack:  { use: battery/lipo-3s, with: { cutoff: true } }\n  fuse:  { use: fuse/blade-15a }\n  buck:  { use: regulator/buck-5v-3a }\n  drive: { use: driver/mosfet-dual-hbridge }\n  left:  { use: motor/gearmotor-medium }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, buck.vin, drive.vm]   # nothing but the fuse between the pack and the motor\n  5V:    [buck.vout, drive.vlogic]\n  GND:   [pack.neg, buck.gnd, drive.gnd]\n  LA:    [drive.out1a, left.a]\n  LB:    [drive.out1b, left.b]\n",
        fix: "railcheck: 1\nname: warehouse tug\nparts:\n  pack:  { use: battery/lipo-3s, with: { cutoff: true } }\n  fuse:  { use: fuse/blade-15a }\n  estop: { use: switch/estop-20a }\n  buck:  { use: regulator/buck-5v-3a }\n  drive: { use: driver/mosfet-dual-hbridge }\n  left:  { use: motor/gearmotor-medium }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, estop.a, buck.vin]\n  VMOT:  [estop.b, drive.vm]   # the stop cuts the motor; the electronics stay up\n  5V:    [buck.vout, drive.vlogic]\n  GND:   [pack.neg, buck.gnd, drive.gnd]\n  LA:    [drive.out1a, left.a]\n  LB:    [drive.out1b, left.b]\n",
        references: "Emergency stop function: ISO 13850 and IEC 60204-1 §9.2.5.4 (from memory); a latching red mushroom-head switch that cuts motor power directly is common practice for mobile robots.",
    },
    needs_operating_point: false,
    check: check_no_stop,
};

/// A battery whose power reaches `net`: the first found walking the
/// power-flow graph upstream from the net's rail.
fn feeding_battery(cx: &Context, net: NetId) -> Option<PartId> {
    let plan = cx.plan;
    let circuit = cx.circuit;
    let start = circuit.rail_stage[circuit.node_of_net[net]]?;
    let upstream = Reversed(&circuit.flow);
    let mut dfs = Dfs::new(upstream, start);
    while let Some(stage) = dfs.next(upstream) {
        if let Stage::Rail(node) = circuit.flow[stage]
            && let Some(pin) = circuit.nodes[node]
                .supply_outs
                .iter()
                .find(|p| matches!(plan.parts[p.part].class, Class::Battery(_)))
        {
            return Some(pin.part);
        }
    }
    None
}

/// The nets that opening some stop switch on its own leaves with no power.
fn stopped_nets(cx: &Context, scenarios: &Scenarios) -> HashSet<NetId> {
    scenarios
        .iter()
        .filter(|powered| {
            matches!(powered.scenario.origin, Origin::SwitchOpen(switch) if is_stop(cx, switch))
        })
        .flat_map(|powered| powered.nets_turned_off())
        .collect()
}

fn is_stop(cx: &Context, part: PartId) -> bool {
    matches!(&cx.plan.parts[part].class, Class::Switch(s) if s.stop)
}

/// Where an actuator's power enters: a motor's driver and its supply pin,
/// or the motor's own pin on the rail; a servo's or moving load's own
/// supply input.
fn supply_entries(cx: &Context) -> Vec<(PinRef, Vec<PartId>)> {
    let plan = cx.plan;
    let mut entries: Vec<(PinRef, Vec<PartId>)> = Vec::new();
    let mut index: HashMap<PinRef, usize> = HashMap::new();
    for (part_id, part) in plan.parts.iter().enumerate() {
        if !part.actuator || matches!(part.class, Class::Motor(_)) {
            continue;
        }
        if let Some((pin, _)) = part
            .pins_with_role(PinRole::SupplyIn)
            .find(|(_, p)| p.net.is_some())
        {
            let entry = PinRef { part: part_id, pin };
            index.insert(entry, entries.len());
            entries.push((entry, vec![part_id]));
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
        match index.get(&entry) {
            Some(&i) => entries[i].1.push(motor),
            None => {
                index.insert(entry, entries.len());
                entries.push((entry, vec![motor]));
            }
        }
    }
    entries
}

fn check_no_stop(cx: &Context, out: &mut Vec<Finding>) {
    let plan = cx.plan;
    // Actuators whose power enters on one rail share one cause: that rail's
    // path from the battery misses the stop. One finding per rail.
    let mut rails: Vec<(NetId, Vec<PinRef>, Vec<PartId>)> = Vec::new();
    let mut rail_index: HashMap<NetId, usize> = HashMap::new();
    for (entry, actuators) in supply_entries(cx) {
        let Some(net) = plan.parts[entry.part].pins[entry.pin].net else {
            continue;
        };
        match rail_index.get(&net) {
            Some(&i) => {
                rails[i].1.push(entry);
                rails[i].2.extend(actuators);
            }
            None => {
                rail_index.insert(net, rails.len());
                rails.push((net, vec![entry], actuators));
            }
        }
    }
    let Some(scenarios) = cx.scenarios else {
        return;
    };
    let stopped = stopped_nets(cx, scenarios);
    for (net, entries, actuators) in rails {
        // Off in normal running too: `power/unfed` says so.
        if !scenarios.running_net_on(net) || stopped.contains(&net) {
            continue;
        }
        let Some(battery) = feeding_battery(cx, net) else {
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
                "{who}{through} {verb} power from `{}` and no stop switch cuts {them} off on its own: in an emergency nothing stops {them} short of unplugging the battery",
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
