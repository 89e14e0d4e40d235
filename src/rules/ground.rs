//! Ground topology: every part's ground must reach a battery negative, and
//! parts that exchange signals must share a ground; and, on the operating
//! point, how far return current shifts a logic receiver's ground from its
//! driver's.

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
        example: "railcheck: 1\nparts:\n  pack:   { use: battery/nimh-8cell }\n  fuse:   { use: fuse/blade-1a }\n  base:   { use: board/mcu-8bit-5v }\n  ranger: { use: sensor/rangefinder-5v }   # greenhouse canopy ranger\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, base.vin]\n  5V:    [base.5v, ranger.vcc]\n  GND:   [pack.neg, base.gnd]   # ranger.gnd left in no net",
        fix: "railcheck: 1\nparts:\n  pack:   { use: battery/nimh-8cell }\n  fuse:   { use: fuse/blade-1a }\n  base:   { use: board/mcu-8bit-5v }\n  ranger: { use: sensor/rangefinder-5v }   # greenhouse canopy ranger\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, base.vin]\n  5V:    [base.5v, ranger.vcc]\n  GND:   [pack.neg, base.gnd, ranger.gnd]",
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
        // Logic levels are measured from a part's ground: without one they
        // cannot be judged, so say that they wait for this fix.
        let signals = part
            .pins
            .iter()
            .any(|p| p.role.is_logic() && p.net.is_some());
        let mut finding = Finding::new(&FLOATING, span, message)
            .help(if signals {
                "join this ground to the battery negative, directly or through a connector contact; its logic levels are checked once it has a ground"
            } else {
                "join this ground to the battery negative, directly or through a connector contact"
            })
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
        example: "railcheck: 1\nparts:\n  pack:  { use: battery/nimh-8cell }\n  aux:   { use: battery/nimh-8cell }   # the orchard picker arm's own pack\n  fuse:  { use: fuse/blade-1a }\n  fuse2: { use: fuse/blade-1a }\n  base:  { use: board/mcu-8bit-5v }\n  arm:   { use: board/mcu-8bit-5v }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  AUX+:  [aux.pos, fuse2.a]\n  VBAT:  [fuse.b, base.vin]\n  VAUX:  [fuse2.b, arm.vin]\n  GND:   [pack.neg, base.gnd]\n  AUX-:  [aux.neg, arm.gnd]   # never joined to GND\n  CMD:   [base.tx, arm.rx]",
        fix: "railcheck: 1\nparts:\n  pack:  { use: battery/nimh-8cell }\n  aux:   { use: battery/nimh-8cell }   # the orchard picker arm's own pack\n  fuse:  { use: fuse/blade-1a }\n  fuse2: { use: fuse/blade-1a }\n  base:  { use: board/mcu-8bit-5v }\n  arm:   { use: board/mcu-8bit-5v }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  AUX+:  [aux.pos, fuse2.a]\n  VBAT:  [fuse.b, base.vin]\n  VAUX:  [fuse2.b, arm.vin]\n  GND:   [pack.neg, aux.neg, base.gnd, arm.gnd]   # both negatives joined\n  CMD:   [base.tx, arm.rx]",
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

// ----- ground/offset ---------------------------------------------------------
//
// What a "shared ground wire" is in this model: every part on a ground net
// sits at the load end of that net's one conductor, so two parts on the same
// ground net see no offset between them. An offset appears between parts whose
// grounds are on different ground nets of one tree (branches joined through
// connector contacts or a switch) or at different ends of a USB cable: the
// nets between the two grounds carry the return current of every part below
// them — motors included — and the receiver's ground rises or falls against
// the driver's by that current times those nets' resistance.

use super::{exceeds, mode_label, worst_point};
use crate::analysis::{OperatingPoint, usb_link_resistance};
use crate::model::{LogicFamily, NetId, PartId, PinRef};
use crate::units::show_voltage;
use uom::si::electric_potential::volt;
use uom::si::f64::ElectricPotential;

pub const OFFSET: Rule = Rule {
    id: "ground/offset",
    severity: Severity::Warning,
    summary: "return current through a shared ground wire shifts a logic receiver's ground by more than half the link's noise margin",
    doc: RuleDoc {
        what: "For each logic signal, the difference between the driver's ground and the receiver's ground — the drop that return current makes on the ground nets between them — against half the smaller noise margin of the link (NMH = driver VOH − receiver VIH, NML = receiver VIL − driver VOL, from the pins' families at the rails' voltages, or their explicit levels; an open-drain driver's VOH is the rail its pull-up goes to). The margins are the static ones, with no offset in them: the offset is weighed against them once. One finding per net, written from its worst pair and naming every pair that exceeds. Checked in every mode, `worst` included, at every battery state: a logic input misreads during a motor's start-up surge as readily as in steady running. Parts on one ground net sit at the same point of the model (the net's far end), so the offset shows between grounds on different ground nets: draw the motor return and the logic return as the separate wires they are, joined where they meet (a connector contact or terminal block at the battery negative).",
        why: "A logic level is a voltage against the receiver's own ground. When motor current returns through a wire that also carries the logic ground, the receiver's ground lifts by I × R and eats into the noise margin: encoder counts are lost, a driver input sees a phantom edge, a controller resets.",
        example: "railcheck: 1\nparts:\n  pack: { use: battery/lead-acid-12v }\n  fuse: { use: fuse/blade-2a }\n  term: { use: connector/header-2pin-3a }   # the two returns meet at the battery negative\n  pump: { class: load, pins: { vin: { role: supply-in, draw: 1.5 A }, gnd: { role: ground } } }\n  ctrl: { class: board, pins: { gnd: { role: ground }, out: { role: logic-out, family: ttl5 } } }\n  flow: { class: sensor, pins: { gnd: { role: ground }, in: { role: logic-in, family: ttl5 } } }\nnets:\n  BATT+:     [pack.pos, fuse.a]\n  VBAT:      [fuse.b, pump.vin]\n  BATT-:     [pack.neg, term.a1, term.a2]\n  LOGIC_GND: [term.b1, ctrl.gnd]\n  PUMP_GND:  { pins: [term.b2, pump.gnd, flow.gnd], wire: 26 AWG, length: 1.5 m }   # 1.5 A × 0.20 ohm = 0.30 V\n  SIG:       [ctrl.out, flow.in]   # TTL to TTL: half the 0.4 V margin is 0.2 V",
        fix: "railcheck: 1\nparts:\n  pack: { use: battery/lead-acid-12v }\n  fuse: { use: fuse/blade-2a }\n  term: { use: connector/header-2pin-3a }   # the two returns meet at the battery negative\n  pump: { class: load, pins: { vin: { role: supply-in, draw: 1.5 A }, gnd: { role: ground } } }\n  ctrl: { class: board, pins: { gnd: { role: ground }, out: { role: logic-out, family: ttl5 } } }\n  flow: { class: sensor, pins: { gnd: { role: ground }, in: { role: logic-in, family: ttl5 } } }\nnets:\n  BATT+:     [pack.pos, fuse.a]\n  VBAT:      [fuse.b, pump.vin]\n  BATT-:     [pack.neg, term.a1, term.a2]\n  LOGIC_GND: [term.b1, ctrl.gnd, flow.gnd]   # the sensor's ground on the logic return\n  PUMP_GND:  { pins: [term.b2, pump.gnd], wire: 26 AWG, length: 1.5 m }\n  SIG:       [ctrl.out, flow.in]",
        references: "Noise margins NMH = VOH − VIH, NML = VIL − VOL, and ground offset counting against them (worked example: a 3 A return over 0.5 m of 26 AWG shifts ground by 0.201 V, half the 0.4 V TTL margin; warn above 50 % of the margin, common practice); family levels per JEDEC JESD8 and 54/74 TTL (format reference §3); wire resistance from the ASTM B258 gauge formula with annealed-copper resistivity (IEC 60028).",
    },
    needs_operating_point: true,
    check: check_offset,
};

/// Logic levels of one pin at one point; `None` where the pin has no such level.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
struct Levels {
    voh: Option<ElectricPotential>,
    vol: Option<ElectricPotential>,
    vih: Option<ElectricPotential>,
    vil: Option<ElectricPotential>,
}

/// A family's thresholds at a supply voltage (format reference §3 table);
/// without a reference rail the family's nominal supply.
fn family_levels(family: LogicFamily, vdd: Option<ElectricPotential>) -> Levels {
    let table = family.levels();
    let vdd = vdd.unwrap_or(table.nominal_vdd);
    Levels {
        voh: Some(table.voh.at(vdd)),
        vol: Some(table.vol.at(vdd)),
        vih: Some(table.vih.at(vdd)),
        vil: Some(table.vil.at(vdd)),
    }
}

/// A pin's levels at a point: its family at its reference rail's voltage,
/// overridden by explicit levels.
fn pin_levels(cx: &Context, point: &OperatingPoint, pin: PinRef) -> Option<Levels> {
    let spec = cx.plan.parts[pin.part].pins[pin.pin].logic.as_ref()?;
    // The same VDD the logic rules read, an unwired onboard output included;
    // a reference rail with no voltage leaves the pin unjudged here (the
    // logic rules report an input driven while its part is unpowered).
    let vdd = match spec.reference {
        Some(reference) => Some(super::logic::supply_voltage(
            cx, point, pin.part, reference,
        )?),
        None => None,
    };
    let base = spec
        .family
        .map(|f| family_levels(f, vdd))
        .unwrap_or_default();
    Some(Levels {
        voh: spec.voh.or(base.voh),
        vol: spec.vol.or(base.vol),
        vih: spec.vih.or(base.vih),
        vil: spec.vil.or(base.vil),
    })
}

/// Where a part's ground sits at a point: the electrical node its potential
/// is measured in, and that potential. A part grounded only through a USB
/// cable sits one cable-ground drop away from the part at the other end.
fn ground_at(
    cx: &Context,
    point: &OperatingPoint,
    part: PartId,
) -> Option<(usize, ElectricPotential)> {
    let own = |part: PartId| {
        let net = cx.circuit.ground_net[part]?;
        let node = cx.circuit.node_of_net[net];
        if matches!(cx.plan.parts[part].class, Class::Battery(_)) {
            return Some((node, ElectricPotential::new::<volt>(0.0)));
        }
        Some((node, point.net_potential[net]?))
    };
    if cx.circuit.ground_net[part].is_some() {
        return own(part);
    }
    cx.circuit.part_links[part]
        .iter()
        .map(|&link_id| (link_id, &cx.plan.links[link_id]))
        .find_map(|(link_id, link)| {
            let drop = usb_link_resistance(cx.plan, link_id)
                .map_or(ElectricPotential::new::<volt>(0.0), |r| {
                    point.link_current[link_id] * r
                });
            if link.device.0 == part {
                own(link.host.0).map(|(node, v)| (node, v + drop))
            } else if link.host.0 == part {
                own(link.device.0).map(|(node, v)| (node, v - drop))
            } else {
                None
            }
        })
}

/// A logic link's ground offset and noise margins at one point.
#[derive(Clone, Copy, Debug, PartialEq)]
struct Shift {
    /// Receiver's ground minus driver's ground.
    offset: ElectricPotential,
    nmh: Option<ElectricPotential>,
    nml: Option<ElectricPotential>,
}

impl Shift {
    fn margin(&self) -> Option<ElectricPotential> {
        match (self.nmh, self.nml) {
            (Some(h), Some(l)) => Some(h.min(l)),
            (h, l) => h.or(l),
        }
    }

    /// The offset as a share of half the margin; `None` when the margin is
    /// already gone (the logic rules report that).
    fn severity(&self) -> Option<f64> {
        let half = self.margin()?.get::<volt>() / 2.0;
        (half > 0.0).then(|| self.offset.get::<volt>().abs() / half)
    }
}

fn shift_at(
    cx: &Context,
    point: &OperatingPoint,
    pull_up: Option<NetId>,
    driver: PinRef,
    receiver: PinRef,
) -> Option<Shift> {
    let (driver_node, driver_ground) = ground_at(cx, point, driver.part)?;
    let (receiver_node, receiver_ground) = ground_at(cx, point, receiver.part)?;
    if driver_node != receiver_node {
        return None;
    }
    let mut out = pin_levels(cx, point, driver)?;
    let input = pin_levels(cx, point, receiver)?;
    if cx.plan.parts[driver.part].pins[driver.pin]
        .role
        .is_open_drain()
    {
        // Its high level is the pull-up's rail as that rail's own source makes
        // it: the static margin, with no ground offset in it (the offset is
        // weighed against the margin once, below).
        out.voh = pull_up.and_then(|rail| rail_level(cx, point, rail));
    }
    let difference = |a: Option<ElectricPotential>, b: Option<ElectricPotential>| Some(a? - b?);
    Some(Shift {
        offset: receiver_ground - driver_ground,
        nmh: difference(out.voh, input.vih),
        nml: difference(input.vil, out.vol),
    })
}

/// A rail's voltage above the ground of the part that makes it (a battery's
/// negative is 0 V); above 0 V when no part on the plan feeds it.
fn rail_level(cx: &Context, point: &OperatingPoint, rail: NetId) -> Option<ElectricPotential> {
    let potential = point.net_potential[rail]?;
    let source = cx.circuit.source[cx.circuit.node_of_net[rail]];
    let ground = source
        .and_then(|pin| ground_at(cx, point, pin.part))
        .map_or(ElectricPotential::new::<volt>(0.0), |(_, g)| g);
    Some(potential - ground)
}

/// Every failing driver and receiver, each named once, when more than one
/// pair on the net fails.
fn in_all_text(cx: &Context, failing: &[(PinRef, PinRef, &OperatingPoint, f64)]) -> String {
    if failing.len() < 2 {
        return String::new();
    }
    let mut drivers: Vec<String> = Vec::new();
    let mut receivers: Vec<String> = Vec::new();
    for &(driver, receiver, _, _) in failing {
        for (pin, names) in [(driver, &mut drivers), (receiver, &mut receivers)] {
            let name = format!("`{}`", cx.pin_name(pin));
            if !names.contains(&name) {
                names.push(name);
            }
        }
    }
    format!(
        "; {} pairs on this net exceed it in all, from {} into {}",
        failing.len(),
        super::logic::joined(&drivers),
        super::logic::joined(&receivers)
    )
}

fn ground_name(cx: &Context, part: PartId) -> String {
    match cx.circuit.ground_net[part] {
        Some(net) => format!("net `{}`", cx.net_name(net)),
        None => "through its USB cable".to_string(),
    }
}

fn check_offset(cx: &Context, out: &mut Vec<Finding>) {
    let plan = cx.plan;
    let pull_ups = super::logic::pull_up_rails(cx);
    for (net_id, net) in plan.nets.iter().enumerate() {
        let logic = |keep: fn(PinRole) -> bool| -> Vec<PinRef> {
            net.pins
                .iter()
                .copied()
                .filter(|p| keep(plan.parts[p.part].pins[p.pin].role))
                .collect()
        };
        let drivers = logic(PinRole::is_output);
        let receivers = logic(PinRole::is_input);
        // One finding per net, written from its worst pair, naming every pair
        // whose offset exceeds half its margin: one root cause, one finding.
        let mut failing: Vec<(PinRef, PinRef, &OperatingPoint, f64)> = Vec::new();
        for &driver in &drivers {
            for &receiver in &receivers {
                if driver.part == receiver.part {
                    continue;
                }
                let Some((point, severity)) = worst_point(cx.points(), |p| {
                    shift_at(cx, p, pull_ups[net_id], driver, receiver).and_then(|s| s.severity())
                }) else {
                    continue;
                };
                let Some(shift) = shift_at(cx, point, pull_ups[net_id], driver, receiver) else {
                    continue;
                };
                let Some(margin) = shift.margin() else {
                    continue;
                };
                if exceeds(
                    shift.offset.get::<volt>().abs(),
                    (margin / 2.0).get::<volt>(),
                ) {
                    failing.push((driver, receiver, point, severity));
                }
            }
        }
        let mut worst: Option<(PinRef, PinRef, &OperatingPoint, f64)> = None;
        for &entry in &failing {
            if worst.is_none_or(|w| entry.3 > w.3 + 1e-12) {
                worst = Some(entry);
            }
        }
        if let Some((driver, receiver, point, _)) = worst {
            let Some(shift) = shift_at(cx, point, pull_ups[net_id], driver, receiver) else {
                continue;
            };
            let Some(margin) = shift.margin() else {
                continue;
            };
            let half = margin / 2.0;
            let offset = shift.offset.get::<volt>();
            let show = |v: Option<ElectricPotential>| v.map_or("—".to_string(), show_voltage);
            let mut finding = Finding::new(
                &OFFSET,
                cx.pin_span(receiver),
                format!(
                    "the ground of `{}` ({}) sits {} {} that of `{}` ({}) {}: more than half the {} noise margin of `{}` → `{}` (NMH {}, NML {}){}",
                    cx.part_name(receiver.part),
                    ground_name(cx, receiver.part),
                    show_voltage(shift.offset.abs()),
                    if offset >= 0.0 { "above" } else { "below" },
                    cx.part_name(driver.part),
                    ground_name(cx, driver.part),
                    mode_label(plan, point.mode, point.battery),
                    show_voltage(margin),
                    cx.pin_name(driver),
                    cx.pin_name(receiver),
                    show(shift.nmh),
                    show(shift.nml),
                    in_all_text(cx, &failing),
                ),
            )
            .at_point(plan, point)
            .label(cx.pin_span(driver), "driven from here")
            .help("give the logic its own ground return that meets the motor return only at the battery negative, use a heavier ground wire, or choose logic levels with more margin")
            .part(cx.part_name(driver.part))
            .part(cx.part_name(receiver.part))
            .net(&net.name)
            .value("offset", offset)
            .value("margin", margin.get::<volt>())
            .value("limit", half.get::<volt>());
            if let Some(h) = shift.nmh {
                finding = finding.value("nmh", h.get::<volt>());
            }
            if let Some(l) = shift.nml {
                finding = finding.value("nml", l.get::<volt>());
            }
            for &(d, r, _, _) in &failing {
                for part in [r.part, d.part] {
                    finding = finding.part(cx.part_name(part));
                    if let Some(g) = cx.circuit.ground_net[part] {
                        finding = finding.net(cx.net_name(g));
                    }
                }
            }
            out.push(finding);
        }
    }
}
