//! Faults and switching at the battery: the current a short can draw
//! against what must interrupt or survive it, how far the first fuse sits
//! from the battery, the surge of closing a switch onto capacitors, and the
//! current a coasting motor sends back when its supply opens.
//!
//! Fault currents are worked with copper at 20 °C, the coldest the tables
//! give, and with only the resistances certainly in the path (the pack's own
//! and the wires the plan sizes): the largest current the plan allows.

use super::{Context, Finding, Rule, RuleDoc, Severity, exceeds};
use crate::analysis::{BatteryState, battery_voltage};
use crate::graph::MotorFeed;
use crate::model::{Class, NetId, PartId, PinRole};
use crate::units::{show_current, show_length, show_voltage};
use uom::si::capacitance::farad;
use uom::si::electric_current::ampere;
use uom::si::electric_potential::volt;
use uom::si::electrical_resistance::ohm;
use uom::si::energy::joule;
use uom::si::f64::{
    Capacitance, ElectricCurrent, ElectricPotential, ElectricalResistance, Energy, Length,
};
use uom::si::length::meter;
use uom::si::time::second;

pub const SHORT_CIRCUIT: Rule = Rule {
    id: "fault/short-circuit",
    severity: Severity::Error,
    summary: "a short just past a fuse draws more than the fuse can break or the pack may give",
    doc: RuleDoc {
        what: "For each fuse fed straight from a battery: the prospective short-circuit current of a short at its load side, I = V_full / (R_pack + R_supply + R_return + R_contacts), with the pack's full open-circuit voltage, its `internal_resistance`, the sized wires from the battery's positive terminal to the fuse and the battery's negative lead (copper at 20 °C), and the `contact_resistance` of the fuse and of the switches and connector contacts on the way, where the plan gives them. Against the fuse's `breaking` capacity (an error when exceeded) and the battery's `short_circuit` rating (a warning when only that is exceeded). Without a pack resistance or any sized wire the current is not bounded by the plan and the check is skipped.",
        why: "A fuse asked to interrupt more current than its breaking capacity may not clear the fault: the arc inside it keeps conducting, or the fuse bursts. A lithium pack shorted through thick, short leads can deliver more than a thousand amperes.",
        example: "railcheck: 1\nname: warehouse tug, 6S\nparts:\n  pack: { use: battery/lipo-6s, with: { cutoff: true, internal_resistance: 5 mohm } }   # 25.2 V / (5 + 0.31) mohm = 4750 A\n  fuse: { use: fuse/blade-30a }   # breaks 1000 A (ISO 8820-3)\n  lamp: { class: load, pins: { vin: { role: supply-in, range: 18..26 V, draw: 1 A }, gnd: { role: ground } } }\nnets:\n  BATT+: { pins: [pack.pos, fuse.a], wire: 8 AWG, length: 5 cm }\n  LAMP:  [fuse.b, lamp.vin]\n  BATT-: { pins: [pack.neg, lamp.gnd], wire: 8 AWG, length: 10 cm }\n",
        fix: "railcheck: 1\nname: warehouse tug, 6S\nparts:\n  pack: { use: battery/lipo-6s, with: { cutoff: true, internal_resistance: 5 mohm } }\n  fuse: { class: fuse, rating: 30 A, voltage: 58 V, breaking: 6000 A }   # a high-breaking-capacity fuse\n  lamp: { class: load, pins: { vin: { role: supply-in, range: 18..26 V, draw: 1 A }, gnd: { role: ground } } }\nnets:\n  BATT+: { pins: [pack.pos, fuse.a], wire: 8 AWG, length: 5 cm }\n  LAMP:  [fuse.b, lamp.vin]\n  BATT-: { pins: [pack.neg, lamp.gnd], wire: 8 AWG, length: 10 cm }\n",
        references: "Prospective short-circuit current I = V / R (Ohm's law); the interrupting rating must cover it: NEC 110.9; blade fuses break 1000 A (ISO 8820-3 scope); copper resistance from ASTM B258 diameters and annealed-copper resistivity.",
    },
    needs_operating_point: false,
    check: check_short_circuit,
};

pub const FUSE_DISTANCE: Rule = Rule {
    id: "fault/fuse-distance",
    severity: Severity::Warning,
    summary: "the first fuse sits too far along the lead from the battery",
    doc: RuleDoc {
        what: "For each first fuse on a battery's positive lead, where every net between the terminal and the fuse gives its `length`: the length of conductor between them against 7 in (178 mm), or 40 in (1016 mm) when every one of those nets is `sheathed: true`.",
        why: "The wire between the battery and its first fuse has no protection at all: a chafed or pinched spot there shorts the pack with nothing to open. Keeping that stretch short and enclosed is the only defence.",
        example: "railcheck: 1\nname: greenhouse cart\nparts:\n  pack: { use: battery/lead-acid-12v }\n  fuse: { use: fuse/blade-10a }\n  lamp: { use: load/lamp-12v }\nnets:\n  BATT+: { pins: [pack.pos, fuse.a], wire: 14 AWG, length: 60 cm }   # fuse at the far end of the lead\n  LAMP:  [fuse.b, lamp.vin]\n  GND:   [pack.neg, lamp.gnd]\n",
        fix: "railcheck: 1\nname: greenhouse cart\nparts:\n  pack: { use: battery/lead-acid-12v }\n  fuse: { use: fuse/blade-10a }\n  lamp: { use: load/lamp-12v }\nnets:\n  BATT+: { pins: [pack.pos, fuse.a], wire: 14 AWG, length: 10 cm }   # fuse holder at the battery\n  LAMP:  { pins: [fuse.b, lamp.vin], wire: 14 AWG, length: 50 cm }\n  GND:   [pack.neg, lamp.gnd]\n",
        references: "33 CFR 183.455(b): overcurrent protection at the source, or within 7 inches of it along the conductor, 40 inches when the conductor is sheathed or enclosed all the way (1 in = 25.4 mm).",
    },
    needs_operating_point: false,
    check: check_fuse_distance,
};

pub const INRUSH: Rule = Rule {
    id: "fault/inrush",
    severity: Severity::Warning,
    summary: "closing a switch onto capacitors draws a surge beyond a rating",
    doc: RuleDoc {
        what: "For each switch with converters or drivers below it that declare input `capacitance`: closing it charges that capacitance with a peak of I = V_full / (R_pack + R_wires + R_contacts), the battery's full voltage over the pack's resistance, the sized wires from its terminals to the switch's load side and the `contact_resistance` of the contacts on the way where given (no capacitor ESR: the largest surge), and leaves ½CV² of heat in the charging path. Against the switch's `surge` rating and the battery's `short_circuit` rating when given; with neither, against the pack's voltage: above 20 V (common practice) the spark at closing pits the contacts. The fix names a precharge resistor: its value, its pulse energy and the time to 5τ (99.3 % charged).",
        why: "A capacitor bank looks like a short for its first microseconds: the switch closes into hundreds of amperes, its contacts spark and weld, and a battery protection board may take it for a short and shut the pack off on every power-up.",
        example: "railcheck: 1\nname: orchard mower, 6S\nparts:\n  pack:  { use: battery/lipo-6s, with: { cutoff: true } }\n  fuse:  { use: fuse/blade-20a }\n  stop:  { use: switch/estop-20a, with: { voltage: 48 V, surge: 100 A } }\n  drive: { use: driver/mosfet-dual-hbridge, with: { capacitance: 1000 uF, clamp: true } }\nnets:\n  BATT+: { pins: [pack.pos, fuse.a], wire: 12 AWG, length: 10 cm }\n  VBAT:  { pins: [fuse.b, stop.a], wire: 12 AWG, length: 20 cm }\n  VMOT:  { pins: [stop.b, drive.vm], wire: 12 AWG, length: 30 cm }\n  GND:   { pins: [pack.neg, drive.gnd], wire: 12 AWG, length: 60 cm }\n",
        fix: "railcheck: 1\nname: orchard mower, 6S\nparts:\n  pack:  { use: battery/lipo-6s, with: { cutoff: true } }\n  fuse:  { use: fuse/blade-20a }\n  stop:  { use: switch/estop-20a, with: { voltage: 48 V, surge: 1000 A } }   # a contactor rated to make into capacitors\n  drive: { use: driver/mosfet-dual-hbridge, with: { capacitance: 1000 uF, clamp: true } }\nnets:\n  BATT+: { pins: [pack.pos, fuse.a], wire: 12 AWG, length: 10 cm }\n  VBAT:  { pins: [fuse.b, stop.a], wire: 12 AWG, length: 20 cm }\n  VMOT:  { pins: [stop.b, drive.vm], wire: 12 AWG, length: 30 cm }\n  GND:   { pins: [pack.neg, drive.gnd], wire: 12 AWG, length: 60 cm }\n",
        references: "RC charging: peak i = V / R at closing, ½CV² dissipated in the path whatever R, 99.3 % charged after 5τ with τ = RC (circuit theory); precharge above about 20 V is common practice.",
    },
    needs_operating_point: false,
    check: check_inrush,
};

pub const REGENERATION: Rule = Rule {
    id: "fault/regeneration",
    severity: Severity::Warning,
    summary: "motors can push current back into a driver whose supply may open, with no clamp",
    doc: RuleDoc {
        what: "For each driver with motors on its channels and no `clamp: true`: whether something between it and its battery can open while the motors turn — a switch (a stop included) or the pack's own protection (`cutoff: true`). The message gives each motor's back-EMF at rated speed, V_rated − I_rated × R_winding with R_winding = V_rated / I_stall (common practice).",
        why: "A turning motor is a generator. While the battery is connected it takes the current the motor sends back when it brakes or coasts; once a stop switch or a protection board opens the supply, that current has only the driver's capacitors to charge, and the bus can rise past the driver's and the capacitors' maximum.",
        example: "railcheck: 1\nname: orchard cart\nparts:\n  pack:  { use: battery/lipo-3s, with: { cutoff: true } }\n  fuse:  { use: fuse/blade-15a }\n  stop:  { use: switch/estop-20a }\n  drive: { use: driver/mosfet-dual-hbridge }\n  left:  { use: motor/gearmotor-medium }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, stop.a]\n  VMOT:  [stop.b, drive.vm]\n  GND:   [pack.neg, drive.gnd]\n  LEFT_A: [drive.out1a, left.a]\n  LEFT_B: [drive.out1b, left.b]\n",
        fix: "railcheck: 1\nname: orchard cart\nparts:\n  pack:  { use: battery/lipo-3s, with: { cutoff: true } }\n  fuse:  { use: fuse/blade-15a }\n  stop:  { use: switch/estop-20a }\n  drive: { use: driver/mosfet-dual-hbridge, with: { clamp: true } }   # a TVS across VMOT at the driver\n  left:  { use: motor/gearmotor-medium }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, stop.a]\n  VMOT:  [stop.b, drive.vm]\n  GND:   [pack.neg, drive.gnd]\n  LEFT_A: [drive.out1a, left.a]\n  LEFT_B: [drive.out1b, left.b]\n",
        references: "Brushed DC motor equation V = E + I·R, so the back-EMF at rated load is E = V − I·R and the winding resistance R = V / I_stall (motor physics); the bus rise itself depends on inertia, which a plan does not give.",
    },
    needs_operating_point: false,
    check: check_regeneration,
};

/// 33 CFR 183.455(b): 7 in, and 40 in for a sheathed or enclosed conductor.
fn fuse_distance_limit(sheathed: bool) -> Length {
    let inches = if sheathed { 40.0 } else { 7.0 };
    Length::new::<meter>(inches * 0.0254)
}

/// Above this a closing contact's spark pits it (common practice for
/// precharging a capacitor bank).
fn precharge_voltage() -> ElectricPotential {
    ElectricPotential::new::<volt>(20.0)
}

/// A sized net's copper at 20 °C; zero when the plan gives no size or length.
fn net_resistance(cx: &Context, net: NetId) -> ElectricalResistance {
    let spec = &cx.plan.nets[net];
    match (spec.wire, spec.length) {
        (Some(wire), Some(length)) => crate::wire::resistance(wire.value, length.value),
        _ => ElectricalResistance::new::<ohm>(0.0),
    }
}

/// The nets from `net` up to its node's root, `net` first.
fn chain_up(cx: &Context, net: NetId) -> Vec<NetId> {
    let mut chain = vec![net];
    let mut here = net;
    while let Some(parent) = cx.circuit.parent[here] {
        // The net tree has no cycle; the bound only guards against one.
        if chain.len() > cx.plan.nets.len() {
            break;
        }
        chain.push(parent.net);
        here = parent.net;
    }
    chain
}

/// The battery whose positive terminal feeds `net`'s node, if a battery does.
fn battery_feeding(cx: &Context, net: NetId) -> Option<PartId> {
    let node = cx.circuit.node_of_net[net];
    let source = cx.circuit.source[node]?;
    matches!(cx.plan.parts[source.part].class, Class::Battery(_)).then_some(source.part)
}

/// The battery's negative lead: the resistance of the net on its `neg` pin.
fn negative_lead(cx: &Context, battery: PartId) -> ElectricalResistance {
    let part = &cx.plan.parts[battery];
    part.pin("neg")
        .and_then(|p| part.pins[p].net)
        .map_or(ElectricalResistance::new::<ohm>(0.0), |n| {
            net_resistance(cx, n)
        })
}

fn internal_resistance(cx: &Context, battery: PartId) -> ElectricalResistance {
    match &cx.plan.parts[battery].class {
        Class::Battery(b) => b.internal_resistance,
        _ => ElectricalResistance::new::<ohm>(0.0),
    }
}

/// Where a fault or a surge meets the battery: the pack's full voltage and
/// the resistance of the loop (pack, supply nets from `net` up to the
/// terminal, negative lead), with its parts for the message.
struct Loop {
    battery: PartId,
    voltage: ElectricPotential,
    pack: ElectricalResistance,
    wires: ElectricalResistance,
    /// Closed contacts on the way (fuses, switches, connectors) whose
    /// resistance the plan gives.
    contacts: ElectricalResistance,
}

impl Loop {
    fn to(cx: &Context, net: NetId) -> Option<Loop> {
        let battery = battery_feeding(cx, net)?;
        let voltage = battery_voltage(cx.plan, battery, BatteryState::Full)?;
        let chain = chain_up(cx, net);
        let supply: ElectricalResistance = chain
            .iter()
            .map(|&n| net_resistance(cx, n))
            .fold(ElectricalResistance::new::<ohm>(0.0), |a, b| a + b);
        // Each net below the root hangs from the contact that joins it up.
        let contact = |part: PartId| {
            cx.plan.parts[part]
                .class
                .contact_resistance()
                .unwrap_or(ElectricalResistance::new::<ohm>(0.0))
        };
        let mut contacts = chain
            .iter()
            .filter_map(|&n| cx.circuit.parent[n].map(|p| contact(p.part)))
            .fold(ElectricalResistance::new::<ohm>(0.0), |a, b| a + b);
        // The negative lead's own contact (a plug on the pack lead).
        let part = &cx.plan.parts[battery];
        if let Some(neg) = part.pin("neg").and_then(|p| part.pins[p].net) {
            let mut seen = Vec::new();
            for pin in &cx.plan.nets[neg].pins {
                let class = &cx.plan.parts[pin.part].class;
                if cx.plan.parts[pin.part].pins[pin.pin].role == crate::model::PinRole::Through
                    && !seen.contains(&pin.part)
                {
                    seen.push(pin.part);
                    if let Some(r) = class.contact_resistance() {
                        contacts += r;
                    }
                }
            }
        }
        Some(Loop {
            battery,
            voltage,
            pack: internal_resistance(cx, battery),
            wires: supply + negative_lead(cx, battery),
            contacts,
        })
    }

    fn total(&self) -> ElectricalResistance {
        self.pack + self.wires + self.contacts
    }

    /// `None` when the plan gives no resistance at all: the current is not
    /// bounded by anything it says.
    fn current(&self) -> Option<ElectricCurrent> {
        let total = self.total().get::<ohm>();
        (total > 0.0).then(|| ElectricCurrent::new::<ampere>(self.voltage.get::<volt>() / total))
    }

    fn explained(&self, cx: &Context) -> String {
        let contacts = if self.contacts.get::<ohm>() > 0.0 {
            format!(
                " + {} of contacts",
                crate::units::show_resistance(self.contacts)
            )
        } else {
            String::new()
        };
        format!(
            "{} (full `{}`) / ({} pack + {} of wire{contacts})",
            show_voltage(self.voltage),
            cx.part_name(self.battery),
            crate::units::show_resistance(self.pack),
            crate::units::show_resistance(self.wires)
        )
    }
}

fn battery_limit(cx: &Context, battery: PartId) -> Option<ElectricCurrent> {
    match &cx.plan.parts[battery].class {
        Class::Battery(b) => b.short_circuit.map(|r| r.value),
        _ => None,
    }
}

fn check_short_circuit(cx: &Context, out: &mut Vec<Finding>) {
    for (part_id, part) in cx.plan.parts.iter().enumerate() {
        let Class::Fuse(fuse) = &part.class else {
            continue;
        };
        let Some(downstream) = cx.load_side(part_id) else {
            continue;
        };
        let Some(upstream) = cx.circuit.parent[downstream].map(|p| p.net) else {
            continue;
        };
        let Some(mut fault) = Loop::to(cx, upstream) else {
            continue;
        };
        // The fault current runs through the fuse's own contact too.
        if let Some(r) = fuse.contact_resistance {
            fault.contacts += r.value;
        }
        let Some(current) = fault.current() else {
            continue;
        };
        let amps = current.get::<ampere>();
        let breaking = fuse
            .breaking
            .filter(|r| exceeds(amps, r.value.get::<ampere>()));
        let pack_limit =
            battery_limit(cx, fault.battery).filter(|l| exceeds(amps, l.get::<ampere>()));
        if breaking.is_none() && pack_limit.is_none() {
            continue;
        }
        let mut over = Vec::new();
        if let Some(rated) = breaking {
            over.push(format!("the {} it can break", show_current(rated.value)));
        }
        if let Some(limit) = pack_limit {
            over.push(format!(
                "the {} `{}` is rated to give into a short",
                show_current(limit),
                cx.part_name(fault.battery)
            ));
        }
        let span = match breaking {
            Some(rated) => cx.rated_span(&rated, part_id),
            None => part.span,
        };
        // Resistance that would bring the current down to the lower limit.
        let limit = [breaking.map(|r| r.value), pack_limit]
            .into_iter()
            .flatten()
            .map(|i| i.get::<ampere>())
            .fold(f64::INFINITY, f64::min);
        let needed =
            ElectricalResistance::new::<ohm>(fault.voltage.get::<volt>() / limit) - fault.total();
        let mut finding = Finding::new(
            &SHORT_CIRCUIT,
            span,
            format!(
                "a short just past `{}` draws {} = {}, above {}",
                part.name,
                show_current(current),
                fault.explained(cx),
                over.join(" and ")
            ),
        )
        .help(if breaking.is_some() {
            format!(
                "use a fuse with a higher breaking capacity (a high-breaking-capacity or DC-rated cartridge fuse), or add {} of resistance to the battery leads (longer or thinner leads raise their drop too)",
                crate::units::show_resistance(needed)
            )
        } else {
            format!(
                "the fuse can break it, but the pack must survive until it does: choose a pack (or protection board) rated for the fault current, or add {} of resistance to its leads",
                crate::units::show_resistance(needed)
            )
        })
        .part(&part.name)
        .part(cx.part_name(fault.battery))
        .net(cx.net_name(upstream))
        .value("current", current)
        .value("resistance", fault.total());
        if breaking.is_none() {
            finding.severity = Severity::Warning;
        }
        if let Some(rated) = breaking {
            finding = finding.value("breaking", rated.value);
        }
        out.push(finding);
    }
}

fn check_fuse_distance(cx: &Context, out: &mut Vec<Finding>) {
    for (part_id, part) in cx.plan.parts.iter().enumerate() {
        if !matches!(part.class, Class::Fuse(_)) {
            continue;
        }
        let Some(downstream) = cx.load_side(part_id) else {
            continue;
        };
        let Some(upstream) = cx.circuit.parent[downstream].map(|p| p.net) else {
            continue;
        };
        let Some(battery) = battery_feeding(cx, upstream) else {
            continue;
        };
        let chain = chain_up(cx, upstream);
        // Only the first fuse: no other fuse between it and the battery.
        let behind_fuse = chain.iter().any(|&n| {
            cx.circuit.parent[n]
                .is_some_and(|p| matches!(cx.plan.parts[p.part].class, Class::Fuse(_)))
        });
        if behind_fuse {
            continue;
        }
        let lengths: Option<Vec<Length>> = chain
            .iter()
            .map(|&n| cx.plan.nets[n].length.map(|l| l.value))
            .collect();
        let Some(lengths) = lengths else {
            continue;
        };
        let distance = lengths
            .into_iter()
            .fold(Length::new::<meter>(0.0), |a, b| a + b);
        let sheathed = chain.iter().all(|&n| cx.plan.nets[n].sheathed);
        let limit = fuse_distance_limit(sheathed);
        if !exceeds(distance.get::<meter>(), limit.get::<meter>()) {
            continue;
        }
        let nets: Vec<String> = chain
            .iter()
            .rev()
            .map(|&n| format!("`{}`", cx.net_name(n)))
            .collect();
        let span = cx.plan.nets[upstream]
            .length
            .map_or(cx.plan.nets[upstream].span, |l| l.span);
        out.push(
            Finding::new(
                &FUSE_DISTANCE,
                span,
                format!(
                    "`{}` sits {} of lead from the terminal of `{}` ({}), beyond the {} allowed{}: that stretch has no protection",
                    part.name,
                    show_length(distance),
                    cx.part_name(battery),
                    nets.join(" then "),
                    show_length(limit),
                    if sheathed { " for a sheathed lead" } else { "" }
                ),
            )
            .help(if sheathed {
                "move the fuse holder to the battery terminal"
            } else {
                "move the fuse holder to within 178 mm (7 in) of the battery terminal, or run the lead in a sheath all the way (`sheathed: true`, up to 1016 mm)"
            })
            .part(&part.name)
            .part(cx.part_name(battery))
            .net(cx.net_name(upstream))
            .value("length", distance)
            .value("limit", limit),
        );
    }
}

/// The drivers and converters below a switch's load side, in its node's
/// tree, with the capacitance across their inputs.
fn capacitors_below(cx: &Context, start: NetId) -> Vec<(PartId, Capacitance)> {
    let mut found = Vec::new();
    let mut stack = vec![start];
    // A set, not a flag per net of the plan: one switch's subtree is small.
    let mut seen = std::collections::HashSet::new();
    while let Some(net) = stack.pop() {
        if !seen.insert(net) {
            continue;
        }
        for pin in &cx.plan.nets[net].pins {
            let part = &cx.plan.parts[pin.part];
            if part.pins[pin.pin].role != PinRole::SupplyIn {
                continue;
            }
            let capacitance = match &part.class {
                Class::Driver(d) => d.capacitance,
                Class::Regulator(r) => r.capacitance,
                _ => None,
            };
            if let Some(c) = capacitance
                && !found.iter().any(|(p, _)| *p == pin.part)
            {
                found.push((pin.part, c.value));
            }
        }
        stack.extend(cx.circuit.children[net].iter().copied());
    }
    found
}

fn check_inrush(cx: &Context, out: &mut Vec<Finding>) {
    for (part_id, part) in cx.plan.parts.iter().enumerate() {
        let Class::Switch(switch) = &part.class else {
            continue;
        };
        let Some(downstream) = cx.load_side(part_id) else {
            continue;
        };
        let capacitors = capacitors_below(cx, downstream);
        if capacitors.is_empty() {
            continue;
        }
        let Some(surge_loop) = Loop::to(cx, downstream) else {
            continue;
        };
        let Some(peak) = surge_loop.current() else {
            continue;
        };
        let capacitance = capacitors
            .iter()
            .map(|(_, c)| *c)
            .fold(Capacitance::new::<farad>(0.0), |a, b| a + b);
        let voltage = surge_loop.voltage;
        let energy =
            Energy::new::<joule>(0.5 * capacitance.get::<farad>() * voltage.get::<volt>().powi(2));
        // What the surge must stay within, the tightest first.
        let mut limits: Vec<(ElectricCurrent, String)> = Vec::new();
        if let Some(surge) = switch.surge {
            limits.push((
                surge.value,
                format!("its {} surge rating", show_current(surge.value)),
            ));
        }
        if let Some(limit) = battery_limit(cx, surge_loop.battery) {
            limits.push((
                limit,
                format!(
                    "the {} `{}` is rated to give into a short (its protection may trip)",
                    show_current(limit),
                    cx.part_name(surge_loop.battery)
                ),
            ));
        }
        let broken: Vec<&(ElectricCurrent, String)> = limits
            .iter()
            .filter(|(limit, _)| exceeds(peak.get::<ampere>(), limit.get::<ampere>()))
            .collect();
        let high_voltage =
            limits.is_empty() && exceeds(voltage.get::<volt>(), precharge_voltage().get::<volt>());
        if broken.is_empty() && !high_voltage {
            continue;
        }
        // The precharge resistor that keeps the surge within the tightest
        // limit broken (or the switch's continuous rating for a spark).
        let target = broken
            .iter()
            .map(|(l, _)| *l)
            .min_by(|x, y| x.get::<ampere>().total_cmp(&y.get::<ampere>()))
            .or(switch.rating.map(|r| r.value));
        let precharge = target.map(|limit| {
            let resistance = ElectricalResistance::new::<ohm>(
                (voltage.get::<volt>() / limit.get::<ampere>()
                    - surge_loop.total().get::<ohm>())
                .max(0.0),
            );
            let five_tau = 5.0 * resistance.get::<ohm>() * capacitance.get::<farad>();
            format!(
                "; or close it through a precharge resistor of at least {} (it takes {:.3} J per closing; 5τ = {} to 99.3 % charge) bridged once charged",
                crate::units::show_resistance(resistance),
                energy.get::<joule>(),
                crate::units::show_duration(uom::si::f64::Time::new::<second>(five_tau))
            )
        });
        let against = if broken.is_empty() {
            format!(
                "and on a {} pack the spark at closing pits the contacts (above {}, common practice)",
                show_voltage(voltage),
                show_voltage(precharge_voltage())
            )
        } else {
            let named: Vec<&str> = broken.iter().map(|(_, text)| text.as_str()).collect();
            format!("above {}", named.join(" and "))
        };
        let parts: Vec<String> = capacitors
            .iter()
            .map(|(p, c)| {
                format!(
                    "`{}` {}",
                    cx.part_name(*p),
                    crate::units::show_capacitance(*c)
                )
            })
            .collect();
        let kind = if switch.stop { "stop switch" } else { "switch" };
        let mut finding = Finding::new(
            &INRUSH,
            part.span,
            format!(
                "closing {kind} `{}` charges {} ({}) with a surge of {} = {}, {}; {:.3} J is left as heat in the path",
                part.name,
                crate::units::show_capacitance(capacitance),
                parts.join(", "),
                show_current(peak),
                surge_loop.explained(cx),
                against,
                energy.get::<joule>()
            ),
        )
        .help(format!(
            "use a switch or contactor rated to make into a capacitive load{}",
            precharge.unwrap_or_default()
        ))
        .part(&part.name)
        .net(cx.net_name(downstream))
        .value("current", peak)
        .value("voltage", voltage);
        for (p, _) in &capacitors {
            finding = finding.part(cx.part_name(*p));
        }
        out.push(finding);
    }
}

/// What can open between a net and its battery while the motors run: the
/// switches on the way up, and the pack's own protection.
fn openers(cx: &Context, net: NetId) -> Vec<String> {
    let mut found = Vec::new();
    for n in chain_up(cx, net) {
        if let Some(parent) = cx.circuit.parent[n]
            && let Class::Switch(switch) = &cx.plan.parts[parent.part].class
        {
            let kind = if switch.stop { "stop switch" } else { "switch" };
            found.push(format!("{kind} `{}`", cx.part_name(parent.part)));
        }
    }
    if let Some(battery) = battery_feeding(cx, net)
        && let Class::Battery(b) = &cx.plan.parts[battery].class
        && b.cutoff
    {
        found.push(format!("the protection of `{}`", cx.part_name(battery)));
    }
    found
}

fn check_regeneration(cx: &Context, out: &mut Vec<Finding>) {
    // Each driver's motors, gathered in one pass over the motors.
    let mut motors_of: std::collections::HashMap<PartId, Vec<PartId>> =
        std::collections::HashMap::new();
    for (motor, feed) in cx.circuit.motor_feed.iter().enumerate() {
        if let Some(MotorFeed::Driver { driver, .. }) = feed {
            motors_of.entry(*driver).or_default().push(motor);
        }
    }
    for (part_id, part) in cx.plan.parts.iter().enumerate() {
        let Class::Driver(driver) = &part.class else {
            continue;
        };
        if driver.clamp {
            continue;
        }
        let Some(motors) = motors_of.get(&part_id) else {
            continue;
        };
        let Some((vm, net)) = part
            .pins_with_role(PinRole::SupplyIn)
            .find_map(|(i, p)| p.net.map(|n| (i, n)))
        else {
            continue;
        };
        let can_open = openers(cx, net);
        if can_open.is_empty() {
            continue;
        }
        let emfs: Vec<String> = motors
            .iter()
            .filter_map(|&m| match &cx.plan.parts[m].class {
                Class::Motor(motor) => {
                    let winding =
                        motor.rated_voltage.get::<volt>() / motor.stall_current.get::<ampere>();
                    let emf = motor.rated_voltage.get::<volt>()
                        - motor.rated_current.get::<ampere>() * winding;
                    Some(format!(
                        "`{}` about {}",
                        cx.part_name(m),
                        show_voltage(ElectricPotential::new::<volt>(emf))
                    ))
                }
                _ => None,
            })
            .collect();
        out.push(
            Finding::new(
                &REGENERATION,
                part.span,
                format!(
                    "`{}` has no clamp on its motor supply, yet {} can open it while its motors turn: their back-EMF at rated speed ({}) then drives current into the driver's capacitors alone",
                    part.name,
                    can_open.join(" or "),
                    emfs.join(", ")
                ),
            )
            .help("fit a clamp across the motor supply at the driver — a TVS diode or a braking resistor with its switch rated for the bus — and write `clamp: true`; brake the motors before the supply opens where the firmware can")
            .part(&part.name)
            .net(cx.net_name(net))
                .label(cx.pin_span(crate::model::PinRef { part: part_id, pin: vm }), "its motor supply"),
        );
    }
}
