//! Power scenarios: what happens beyond normal running, when a switch is
//! open, a battery is out or a supply from outside is connected
//! (`crate::scenario` decides what each scenario powers).
//!
//! - `scenario/back-feed`: a powered rail pushes current backward into a
//!   source: the output of a converter that is off, a battery from a bench
//!   supply, a laptop's USB port from the robot's own rail.
//! - `scenario/phantom-power`: a part that is off is driven through its
//!   logic inputs by a part that is still on, and powered through its
//!   input clamp diodes.

use super::{Context, Finding, Rule, RuleDoc, Severity};
use crate::graph::through_pairs;
use crate::model::{
    Class, NetId, PartId, PinIndex, PinRef, PinRole, PortKind, SupplyAttach, SupplyKind,
};
use crate::scenario::Powered;
use crate::units::{show_current, show_resistance};
use std::collections::{BTreeMap, HashMap, HashSet};
use uom::si::electric_current::milliampere;
use uom::si::electric_potential::volt;
use uom::si::f64::{ElectricCurrent, ElectricPotential, ElectricalResistance};

pub const BACK_FEED: Rule = Rule {
    id: "scenario/back-feed",
    severity: Severity::Error,
    summary: "a scenario in which a powered rail pushes current backward into a source",
    doc: RuleDoc {
        what: "In every power scenario — the plan's own `scenarios:`, each switch open, each supply from `supplies:` connected with the batteries in and with them removed — whether a powered rail reaches a source that is not marked `or: diode` and cannot take current: the output of a regulator or board that is off (its input has no power), a battery that a bench supply is clipped onto, or a computer's USB port whose VBUS the robot's own rail drives.",
        why: "Current pushed into an output runs backward through the pass transistor's body diode, lifts the converter's input and everything on it, and can destroy the converter. A bench supply on a lithium pack charges it with no charge control. A USB host port must never be driven: the robot's 5 V rail pushing into a laptop's VBUS can damage the laptop's port.",
        example: "railcheck: 1\nname: lab cart\nparts:\n  pack: { use: battery/lipo-3s, with: { cutoff: true } }\n  fuse: { use: fuse/blade-10a }\n  buck: { use: regulator/buck-5v-3a }\n  brain: { use: board/sbc-5v }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT: [fuse.b, buck.vin]\n  5V: [buck.vout, brain.vin]\n  GND: [pack.neg, buck.gnd, brain.gnd]\nsupplies:\n  bench: { kind: bench, net: VBAT, voltage: 12 V, current: 3 A }   # clipped on with the pack still in\n",
        fix: "railcheck: 1\nname: lab cart\nparts:\n  pack: { use: battery/lipo-3s, with: { cutoff: true } }\n  fuse: { use: fuse/blade-10a }\n  buck: { use: regulator/buck-5v-3a }\n  brain: { use: board/sbc-5v }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT: [fuse.b, buck.vin]\n  5V: [buck.vout, brain.vin]\n  GND: [pack.neg, buck.gnd, brain.gnd]\nsupplies:\n  bench: { kind: bench, net: VBAT, voltage: 12 V, current: 3 A, replaces: [pack] }   # only ever on the bench with the pack out\n",
        references: "Two sources joined without a diode: Kirchhoff's voltage law; diode-OR power sharing, common practice. USB 2.0 §7.2.1: a device must not drive VBUS toward its host (from memory). Charging lithium cells only with a charger that limits voltage and current: IEC 62133-2 (from memory).",
    },
    needs_operating_point: false,
    check: check_back_feed,
};

pub const PHANTOM_POWER: Rule = Rule {
    id: "scenario/phantom-power",
    severity: Severity::Error,
    summary: "a scenario in which a part that is off is powered through its logic inputs",
    doc: RuleDoc {
        what: "In every power scenario, each logic input whose supply (its `ref` pin, else the part's supply inputs) has lost power while a part that is still on drives it high: a push-pull output straight on the line, a pull-up resistor to a powered rail, or an output behind a series resistor. Inputs with a `tolerant` level at or above the drive are skipped. Straight drive is an error; through a resistor the clamp current is estimated as (V − 0.3 V) / R, taking the input at its absolute maximum of VDD + 0.3 V with VDD at 0 V, and reported as a warning above 1 mA.",
        why: "An input driven above its own dead supply conducts through its protection diode into that supply: the part runs half-powered from the signal line, corrupts its memory or latches up, and the diode can be destroyed. The classic case is a controller kept on by a laptop while the battery is out, still driving the motor driver or a sensor on the switched rail.",
        example: "railcheck: 1\nname: greenhouse probe\nparts:\n  pack: { use: battery/lipo-2s, with: { cutoff: true } }\n  fuse: { use: fuse/blade-5a }\n  power: { use: switch/rocker-10a }\n  buck: { use: regulator/buck-5v-3a }\n  probe_reg: { use: regulator/linear-5v-1a }\n  brain: { use: board/mcu-8bit-5v }\n  ranger: { use: sensor/rangefinder-5v }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT: [fuse.b, buck.vin, power.a]\n  PROBE_IN: [power.b, probe_reg.vin]\n  5V: [buck.vout, brain.vin]\n  PROBE_5V: [probe_reg.vout, ranger.vcc]\n  GND: [pack.neg, buck.gnd, probe_reg.gnd, brain.gnd, ranger.gnd]\n  TRIG: [brain.d2, ranger.trig]   # the brain keeps driving it with the probe switched off\n  ECHO: [ranger.echo, brain.d3]\n",
        fix: "railcheck: 1\nname: greenhouse probe\nparts:\n  pack: { use: battery/lipo-2s, with: { cutoff: true } }\n  fuse: { use: fuse/blade-5a }\n  power: { use: switch/rocker-10a }\n  buck: { use: regulator/buck-5v-3a }\n  probe_reg: { use: regulator/linear-5v-1a }\n  brain: { use: board/mcu-8bit-5v }\n  ranger: { use: sensor/rangefinder-5v }\n  trig_r: { class: resistor, value: 10 kohm }   # 4.7 V / 10 kohm = 0.47 mA into the clamp at most\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT: [fuse.b, buck.vin, power.a]\n  PROBE_IN: [power.b, probe_reg.vin]\n  5V: [buck.vout, brain.vin]\n  PROBE_5V: [probe_reg.vout, ranger.vcc]\n  GND: [pack.neg, buck.gnd, probe_reg.gnd, brain.gnd, ranger.gnd]\n  TRIG_OUT: [brain.d2, trig_r.a]\n  TRIG: [trig_r.b, ranger.trig]\n  ECHO: [ranger.echo, brain.d3]\n",
        references: "Input ceiling VDD + 0.3 V: JEDEC JESD8 family, as stated in datasheets' absolute-maximum tables. Keeping injected clamp current below about 1 mA (some controllers allow 0.5 mA): common practice.",
    },
    needs_operating_point: false,
    check: check_phantom_power,
};

/// The clamp current above which a resistive path is reported (common
/// practice: many parts tolerate about 1 mA into an input clamp).
fn clamp_limit() -> ElectricCurrent {
    ElectricCurrent::new::<milliampere>(1.0)
}

/// JESD8: an input may go to VDD + 0.3 V; with VDD at 0 V, 0.3 V.
fn clamp_voltage() -> ElectricPotential {
    ElectricPotential::new::<volt>(0.3)
}

/// The supply pins that set a logic pin's levels: its `ref`, else every
/// supply input of its part.
fn vdd_pins(cx: &Context, pin: PinRef) -> Vec<PinIndex> {
    let part = &cx.plan.parts[pin.part];
    match part.pins[pin.pin].logic.as_ref().and_then(|l| l.reference) {
        Some(reference) => vec![reference],
        None => part
            .pins_with_role(PinRole::SupplyIn)
            .map(|(i, _)| i)
            .collect(),
    }
}

/// Whether the pin's levels have a supply (`None` when it has no supply
/// pin, or an input is unwired: other rules judge those). An onboard output
/// left unwired is on while its own part is.
fn logic_supplied(
    cx: &Context,
    pin: PinRef,
    net_on: impl Fn(NetId) -> bool,
    part_on: impl Fn(PartId) -> bool,
) -> Option<bool> {
    let pins = vdd_pins(cx, pin);
    if pins.is_empty() {
        return None;
    }
    let mut any = false;
    for vdd in pins {
        let spec = &cx.plan.parts[pin.part].pins[vdd];
        any |= match spec.net {
            Some(net) => net_on(net),
            None if spec.role == PinRole::SupplyOut => part_on(pin.part),
            None => return None,
        };
    }
    Some(any)
}

/// The highest voltage a net reaches in normal running, else the highest a
/// supply from outside connected in this scenario gives it.
fn rail_voltage(cx: &Context, powered: &Powered, net: NetId) -> Option<ElectricPotential> {
    let running = cx
        .points()
        .filter_map(|p| p.net_potential[net])
        .fold(None, |best: Option<ElectricPotential>, v| {
            Some(best.map_or(v, |b| if v > b { v } else { b }))
        });
    running.or_else(|| {
        powered
            .scenario
            .connected
            .iter()
            .map(|&s| &cx.plan.supplies[s])
            .filter(|s| attach_net(cx, s.attach) == Some(net))
            .map(|s| s.voltage.max)
            .fold(None, |best, v| {
                Some(best.map_or(v, |b: ElectricPotential| b.max(v)))
            })
    })
}

/// The net a supply from outside powers: its own net, or the pin its USB
/// port feeds.
fn attach_net(cx: &Context, attach: SupplyAttach) -> Option<NetId> {
    match attach {
        SupplyAttach::Net(net) => Some(net),
        SupplyAttach::Port(part, port) => cx.plan.fed_net(part, port),
    }
}

/// One way a powered part drives an input of a part that is off.
struct Drive {
    /// `` `mcu.d8` `` or `` `pullup.a` to `3V3` ``.
    by: String,
    /// The part doing it.
    part: PartId,
    /// The resistance in the path, when there is one.
    resistance: Option<ElectricalResistance>,
    /// The voltage behind it.
    voltage: Option<ElectricPotential>,
}

impl Drive {
    /// The clamp current through a resistive path, (V − 0.3 V) / R.
    fn current(&self) -> Option<ElectricCurrent> {
        let (r, v) = (self.resistance?, self.voltage?);
        let across = v - clamp_voltage();
        (across.get::<volt>() > 0.0).then(|| across / r)
    }
}

/// Push-pull outputs on `net` whose own supply is on, other than `except`.
fn powered_outputs(cx: &Context, powered: &Powered, net: NetId, except: PartId) -> Vec<PinRef> {
    let ground = cx.circuit.ground_group[except];
    cx.plan.nets[net]
        .pins
        .iter()
        .copied()
        .filter(|p| p.part != except)
        .filter(|p| cx.plan.parts[p.part].pins[p.pin].role.drives_high())
        .filter(|p| ground.is_some() && cx.circuit.ground_group[p.part] == ground)
        .filter(|&p| {
            logic_supplied(cx, p, |n| powered.net_on(n), |q| powered.part_on(q)) == Some(true)
        })
        .collect()
}

/// The highest level an output drives: its supply's highest voltage (an
/// onboard output left unwired at the top of its own band).
fn drive_voltage(cx: &Context, powered: &Powered, output: PinRef) -> Option<ElectricPotential> {
    let part = &cx.plan.parts[output.part];
    vdd_pins(cx, output)
        .into_iter()
        .filter_map(|i| {
            let spec = &part.pins[i];
            match spec.net {
                Some(net) => rail_voltage(cx, powered, net),
                None => spec.voltage().map(|band| band.max),
            }
        })
        .fold(None, |best: Option<ElectricPotential>, v| {
            Some(best.map_or(v, |b| b.max(v)))
        })
}

/// Everything that drives the input `pin` high while its part is off.
fn drives_into(cx: &Context, powered: &Powered, pin: PinRef, net: NetId) -> Vec<Drive> {
    let plan = cx.plan;
    let mut drives = Vec::new();
    for output in powered_outputs(cx, powered, net, pin.part) {
        let voltage = drive_voltage(cx, powered, output);
        drives.push(Drive {
            by: format!("`{}`", cx.pin_name(output)),
            part: output.part,
            resistance: None,
            voltage,
        });
    }
    for resistor_pin in &plan.nets[net].pins {
        let Class::Resistor(resistor) = &plan.parts[resistor_pin.part].class else {
            continue;
        };
        let other = plan.parts[resistor_pin.part]
            .pins
            .iter()
            .enumerate()
            .find(|(i, p)| *i != resistor_pin.pin && p.net.is_some())
            .and_then(|(_, p)| p.net);
        let Some(other) = other else { continue };
        if !powered.net_on(other) {
            // A rail with no power, or a signal: look for an output behind it.
            for output in powered_outputs(cx, powered, other, pin.part) {
                let voltage = drive_voltage(cx, powered, output);
                drives.push(Drive {
                    by: format!(
                        "`{}` through `{}` ({})",
                        cx.pin_name(output),
                        cx.part_name(resistor_pin.part),
                        show_resistance(resistor.value)
                    ),
                    part: output.part,
                    resistance: Some(resistor.value),
                    voltage,
                });
            }
            continue;
        }
        if cx.circuit.nodes[cx.circuit.node_of_net[other]].is_ground() {
            continue;
        }
        drives.push(Drive {
            by: format!(
                "pull-up `{}` ({}) to `{}`",
                cx.part_name(resistor_pin.part),
                show_resistance(resistor.value),
                cx.net_name(other)
            ),
            part: resistor_pin.part,
            resistance: Some(resistor.value),
            voltage: rail_voltage(cx, powered, other),
        });
    }
    drives
}

fn check_phantom_power(cx: &Context, out: &mut Vec<Finding>) {
    let plan = cx.plan;
    let Some(scenarios) = cx.scenarios else {
        return;
    };
    // One finding per rail that goes off: the first scenario that drives
    // inputs on it, with every such input; later scenarios are counted.
    let mut found: BTreeMap<OffSupply, (Finding, usize)> = BTreeMap::new();
    for powered in scenarios.iter() {
        let mut candidates: Vec<PartId> = Vec::new();
        for net in powered.nets_turned_off() {
            for pin in &plan.nets[net].pins {
                let role = plan.parts[pin.part].pins[pin.pin].role;
                if matches!(role, PinRole::SupplyIn | PinRole::SupplyOut) {
                    candidates.push(pin.part);
                }
            }
        }
        candidates.sort_unstable();
        candidates.dedup();
        let mut groups: BTreeMap<OffSupply, Vec<(PinRef, Vec<Drive>)>> = BTreeMap::new();
        for part_id in candidates {
            let part = &plan.parts[part_id];
            for (pin_index, pin) in part.pins.iter().enumerate() {
                if !pin.role.is_input() {
                    continue;
                }
                let Some(net) = pin.net else { continue };
                let pin_ref = PinRef {
                    part: part_id,
                    pin: pin_index,
                };
                // Off here, on in normal running (an input that is never
                // powered is `logic/unpowered-input`'s).
                if logic_supplied(cx, pin_ref, |n| powered.net_on(n), |q| powered.part_on(q))
                    != Some(false)
                    || logic_supplied(
                        cx,
                        pin_ref,
                        |n| scenarios.running_net_on(n),
                        |q| scenarios.running_part_on(q),
                    ) != Some(true)
                {
                    continue;
                }
                let tolerant = pin.logic.as_ref().and_then(|l| l.tolerant);
                let drives: Vec<Drive> = drives_into(cx, &powered, pin_ref, net)
                    .into_iter()
                    .filter(|d| match (tolerant, d.voltage) {
                        (Some(t), Some(v)) => v.get::<volt>() > t.get::<volt>() * 1.001,
                        (Some(_), None) => false,
                        (None, _) => match d.current() {
                            Some(i) => i > clamp_limit(),
                            None => d.resistance.is_none(),
                        },
                    })
                    .collect();
                if !drives.is_empty() {
                    groups
                        .entry(off_supply(cx, pin_ref))
                        .or_default()
                        .push((pin_ref, drives));
                }
            }
        }
        for (key, inputs) in groups {
            if let Some((_, also)) = found.get_mut(&key) {
                *also += 1;
                continue;
            }
            found.insert(key, (phantom_finding(cx, &powered, &inputs), 0));
        }
    }
    for (_, (mut finding, also)) in found {
        if also > 0 {
            finding.message.push_str(&format!(
                " (and in {also} other scenario{})",
                if also == 1 { "" } else { "s" }
            ));
        }
        out.push(finding);
    }
}

/// The supply an input lost: the rail of its first supply pin, or its own
/// part for an onboard output left unwired.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord)]
enum OffSupply {
    Rail(usize),
    Part(PartId),
}

fn off_supply(cx: &Context, pin: PinRef) -> OffSupply {
    vdd_pins(cx, pin)
        .into_iter()
        .find_map(|i| cx.plan.parts[pin.part].pins[i].net)
        .map_or(OffSupply::Part(pin.part), |net| {
            OffSupply::Rail(cx.circuit.node_of_net[net])
        })
}

fn phantom_finding(cx: &Context, powered: &Powered, inputs: &[(PinRef, Vec<Drive>)]) -> Finding {
    let mut parts: Vec<PartId> = Vec::new();
    for (pin, _) in inputs {
        if !parts.contains(&pin.part) {
            parts.push(pin.part);
        }
    }
    let part_names: Vec<String> = parts
        .iter()
        .map(|&p| format!("`{}`", cx.part_name(p)))
        .collect();
    let (who, has, their, them) = match part_names.as_slice() {
        [one] => (one.clone(), "has", "its", one.clone()),
        [init @ .., last] => (
            format!("{} and {last}", init.join(", ")),
            "have",
            "their",
            "them".to_string(),
        ),
        [] => (String::new(), "has", "its", String::new()),
    };
    let straight = inputs
        .iter()
        .any(|(_, drives)| drives.iter().any(|d| d.resistance.is_none()));
    let mut largest: Option<ElectricCurrent> = None;
    let described: Vec<String> = inputs
        .iter()
        .map(|(pin, drives)| {
            let by: Vec<String> = drives
                .iter()
                .map(|d| match d.current() {
                    Some(i) => {
                        largest = Some(largest.map_or(i, |l: ElectricCurrent| l.max(i)));
                        format!("{} (about {})", d.by, show_current(i))
                    }
                    None => d.by.clone(),
                })
                .collect();
            format!("`{}` by {}", cx.pin_name(*pin), by.join(" and "))
        })
        .collect();
    let message = format!(
        "{}, {who} {has} no power but {their} input{} driven high: {}; each input's clamp diode conducts into the dead supply (an input may go to VDD + 0.3 V, here 0.3 V) and powers {them} through {their} signal pins{}",
        powered.scenario.label,
        if inputs.len() == 1 { " is" } else { "s are" },
        described.join("; "),
        if straight {
            ", limited only by the outputs' drive"
        } else {
            ""
        }
    );
    let mut finding = Finding::new(&PHANTOM_POWER, cx.pin_span(inputs[0].0), message)
        .help(if straight {
            "put a series resistor in each line that keeps the clamp current under 1 mA ((V − 0.3 V) / 1 mA), power the part from the same switched rail as the part that drives it, or use a part whose inputs are rated `tolerant` when unpowered"
        } else {
            "raise the resistor until (V − 0.3 V) / R is under 1 mA, or take the pull-up from the part's own switched rail"
        })
        ;
    for &p in &parts {
        finding = finding.part(cx.part_name(p));
    }
    if !straight {
        finding.severity = Severity::Warning;
    }
    if let Some(i) = largest {
        finding = finding.value("clamp_current", i);
    }
    for (pin, drives) in inputs {
        if let Some(net) = cx.plan.parts[pin.part].pins[pin.pin].net {
            finding = finding.net(cx.net_name(net));
        }
        for d in drives {
            finding = finding.part(cx.part_name(d.part));
        }
    }
    for (pin, _) in &inputs[1..] {
        finding = finding.label(cx.pin_span(*pin), format!("`{}` too", cx.pin_name(*pin)));
    }
    finding
}

/// Rails where `power/conflict` already reports two sources that can
/// back-feed each other.
fn conflict_nodes(cx: &Context) -> HashSet<usize> {
    let plan = cx.plan;
    let mut nodes = HashSet::new();
    for (node_id, node) in cx.circuit.nodes.iter().enumerate() {
        let outputs = node
            .supply_outs
            .iter()
            .filter(|p| !plan.parts[p.part].pins[p.pin].diode_or)
            .count();
        let cables = cx.circuit.vbus[node_id]
            .iter()
            .filter(|&&link| {
                let (device, port) = plan.links[link].device;
                matches!(
                    plan.parts[device].ports[port].kind,
                    PortKind::UsbDevice {
                        diode_or: false,
                        ..
                    }
                )
            })
            .count();
        if outputs + cables >= 2 {
            nodes.insert(node_id);
        }
    }
    nodes
}

/// The nets joined to `start` through contacts closed in this scenario.
fn joined_nets(cx: &Context, powered: &Powered, start: NetId) -> Vec<NetId> {
    let plan = cx.plan;
    let mut seen = vec![start];
    let mut known: HashSet<NetId> = HashSet::from([start]);
    let mut stack = vec![start];
    while let Some(net) = stack.pop() {
        for pin in &plan.nets[net].pins {
            if plan.parts[pin.part].pins[pin.pin].role != PinRole::Through
                || powered.scenario.open.contains(&pin.part)
            {
                continue;
            }
            for (a, b) in through_pairs(plan, pin.part) {
                let partner = if a == pin.pin {
                    b
                } else if b == pin.pin {
                    a
                } else {
                    continue;
                };
                if let Some(next) = plan.parts[pin.part].pins[partner].net
                    && known.insert(next)
                {
                    seen.push(next);
                    stack.push(next);
                }
            }
        }
    }
    seen
}

/// What gives power on the nets joined to `net` in this scenario: present
/// batteries, outputs of parts that are on, supplies from outside.
fn sources_on(cx: &Context, powered: &Powered, nets: &[NetId]) -> Vec<(String, PartId)> {
    let plan = cx.plan;
    let mut sources = Vec::new();
    for &net in nets {
        for pin in &plan.nets[net].pins {
            let spec = &plan.parts[pin.part].pins[pin.pin];
            if spec.role != PinRole::SupplyOut || !powered.part_on(pin.part) {
                continue;
            }
            let name = match plan.parts[pin.part].class {
                Class::Battery(_) => format!("`{}`", cx.part_name(pin.part)),
                _ => format!("`{}`", cx.pin_name(*pin)),
            };
            sources.push((name, pin.part));
        }
    }
    sources
}

fn check_back_feed(cx: &Context, out: &mut Vec<Finding>) {
    let plan = cx.plan;
    let Some(scenarios) = cx.scenarios else {
        return;
    };
    let conflicts = conflict_nodes(cx);
    // Each cause once, at the first scenario that shows it, with how many
    // other scenarios show it too.
    let mut pending: Vec<(Finding, usize)> = Vec::new();
    let mut seen: HashMap<(u8, usize, usize), usize> = HashMap::new();
    for powered in scenarios.iter() {
        // An output of a part that is off, on a rail something else powers.
        for part_id in powered.changed_parts() {
            let part = &plan.parts[part_id];
            if powered.part_on(part_id) || matches!(part.class, Class::Battery(_)) {
                continue;
            }
            for (pin_index, pin) in part.pins_with_role(PinRole::SupplyOut) {
                let Some(net) = pin.net else { continue };
                if pin.diode_or
                    || !powered.net_on(net)
                    || conflicts.contains(&cx.circuit.node_of_net[net])
                {
                    continue;
                }
                if let Some(&i) = seen.get(&(0, part_id, pin_index)) {
                    pending[i].1 += 1;
                    continue;
                }
                let pin_ref = PinRef {
                    part: part_id,
                    pin: pin_index,
                };
                let joined = joined_nets(cx, &powered, net);
                let mut feeders: Vec<String> = sources_on(cx, &powered, &joined)
                    .into_iter()
                    .map(|(name, _)| name)
                    .collect();
                for &s in &powered.scenario.connected {
                    if attach_net(cx, plan.supplies[s].attach).is_some_and(|n| joined.contains(&n))
                    {
                        feeders.push(format!("`{}`", plan.supplies[s].name));
                    }
                }
                let from = if feeders.is_empty() {
                    String::new()
                } else {
                    format!(" from {}", feeders.join(" and "))
                };
                let inputs: Vec<String> = part
                    .pins_with_role(PinRole::SupplyIn)
                    .map(|(i, _)| {
                        format!(
                            "`{}`",
                            cx.pin_name(PinRef {
                                part: part_id,
                                pin: i
                            })
                        )
                    })
                    .collect();
                let finding = Finding::new(
                    &BACK_FEED,
                    cx.pin_span(pin_ref),
                    format!(
                        "{}, `{}` has no power{} but `{}` still has power{from}: current runs backward into `{}` and through the converter toward its input",
                        powered.scenario.label,
                        part.name,
                        if inputs.is_empty() {
                            String::new()
                        } else {
                            format!(" at {}", inputs.join(" and "))
                        },
                        cx.net_name(net),
                        cx.pin_name(pin_ref),
                    ),
                )
                .help(format!(
                    "fit a diode or an ideal-diode controller in `{}`'s output and write `or: diode` on it, or keep the other source off this rail while `{}` is unpowered",
                    part.name, part.name
                ))
                .part(&part.name)
                .net(cx.net_name(net));
                seen.insert((0, part_id, pin_index), pending.len());
                pending.push((finding, 0));
            }
        }
        // A supply from outside on a rail another source drives.
        for &s in &powered.scenario.connected {
            let supply = &plan.supplies[s];
            let port_diode = match supply.attach {
                SupplyAttach::Port(part, port) => matches!(
                    plan.parts[part].ports[port].kind,
                    PortKind::UsbDevice { diode_or: true, .. }
                ),
                SupplyAttach::Net(_) => false,
            };
            if supply.diode_or || port_diode {
                continue;
            }
            let Some(net) = attach_net(cx, supply.attach) else {
                continue;
            };
            let joined = joined_nets(cx, &powered, net);
            let others: Vec<(String, PartId)> = sources_on(cx, &powered, &joined)
                .into_iter()
                .filter(|(_, part)| {
                    // A charger is meant to push current into its battery.
                    !(supply.kind == SupplyKind::Charger
                        && matches!(plan.parts[*part].class, Class::Battery(_)))
                })
                .filter(|(_, part)| {
                    !plan.parts[*part]
                        .pins_with_role(PinRole::SupplyOut)
                        .any(|(_, p)| p.diode_or && p.net.is_some_and(|n| joined.contains(&n)))
                })
                .collect();
            if others.is_empty() {
                continue;
            }
            if let Some(&i) = seen.get(&(1, s, 0)) {
                pending[i].1 += 1;
                continue;
            }
            let names: Vec<&str> = others.iter().map(|(n, _)| n.as_str()).collect();
            let battery = others
                .iter()
                .any(|(_, p)| matches!(plan.parts[*p].class, Class::Battery(_)));
            let at = match supply.attach {
                SupplyAttach::Port(part, port) => format!(
                    "`{}.{}`",
                    cx.part_name(part),
                    plan.parts[part].ports[port].name,
                ),
                SupplyAttach::Net(_) => String::new(),
            };
            let message = match supply.kind {
                SupplyKind::UsbHost => format!(
                    "{}, {} drive{} `{}`, which {at} joins to `{}`'s VBUS with no diode: current runs back into the host's port, which a USB host port must never take",
                    powered.scenario.label,
                    names.join(" and "),
                    if names.len() == 1 { "s" } else { "" },
                    cx.net_name(net),
                    supply.name
                ),
                _ => format!(
                    "{}, `{}` and {} both drive `{}`: whichever is higher pushes current into the other{}",
                    powered.scenario.label,
                    supply.name,
                    names.join(" and "),
                    cx.net_name(net),
                    if battery {
                        format!(
                            ", and the pack is charged from `{}` with no charge control",
                            supply.name
                        )
                    } else {
                        String::new()
                    }
                ),
            };
            let fix = match supply.kind {
                SupplyKind::UsbHost => format!(
                    "feed VBUS into the rail through a diode or power switch and write `or: diode` on the port, or write `or: diode` on `{}` if its cable has one",
                    supply.name
                ),
                _ if battery => {
                    let packs: Vec<&str> = others
                        .iter()
                        .filter(|(_, p)| matches!(plan.parts[*p].class, Class::Battery(_)))
                        .map(|(_, p)| cx.part_name(*p))
                        .collect();
                    format!(
                        "connect `{}` only with the pack out and write `replaces: [{}]` on it, or feed it through a diode and write `or: diode`",
                        supply.name,
                        packs.join(", ")
                    )
                }
                _ => format!(
                    "feed `{}` through a diode and write `or: diode` on it, or connect it where no other source drives",
                    supply.name
                ),
            };
            let mut finding = Finding::new(&BACK_FEED, supply.span, message)
                .help(fix)
                .net(cx.net_name(net));
            for (_, part) in &others {
                finding = finding.part(cx.part_name(*part));
            }
            seen.insert((1, s, 0), pending.len());
            pending.push((finding, 0));
        }
    }
    for (mut finding, also) in pending {
        if also > 0 {
            finding.message.push_str(&format!(
                " (and in {also} other scenario{})",
                if also == 1 { "" } else { "s" }
            ));
        }
        out.push(finding);
    }
}
