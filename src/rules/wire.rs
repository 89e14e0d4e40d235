//! Wires: each conductor's continuous current against its ampacity, and the
//! supply-plus-return voltage drop each load loses to its wiring.
//!
//! Reads wire sizes and lengths from nets and USB links; resistance and
//! ampacity come from `crate::wire`. Not for fuses against the wire they
//! protect (`fuse/oversized`), nor for what a load's supply voltage does to
//! its operating range (`voltage/under-range`).

use super::{
    Context, Finding, Margin, RatingKind, Rule, RuleDoc, Severity, Unit, continuous, exceeds,
    mode_label, worst_point,
};
use crate::analysis::{OperatingPoint, net_resistance, usb_link_resistance};
use crate::graph::MotorFeed;
use crate::model::{Class, NetId, PartId, PinRef, PinRole};
use crate::syntax::Span;
use crate::units::show_duration;
use crate::units::{WireSize, show_current, show_length, show_share, show_voltage};
use crate::wire::{AmpacityTable, adiabatic_limit, ampacity_at};
use uom::si::electric_current::ampere;
use uom::si::electric_potential::volt;
use uom::si::f64::{
    ElectricCurrent, ElectricPotential, ElectricalResistance, Ratio, ThermodynamicTemperature,
};
use uom::si::ratio::ratio;

pub const AMPACITY: Rule = Rule {
    id: "wire/ampacity",
    severity: Severity::Error,
    summary: "a net's current exceeds its wire's ampacity",
    doc: RuleDoc {
        what: "The continuous current (the `typical` mode and the user's modes that are not brief, never `worst`) through each net that names a `wire`, and through each USB cable that names one, against that wire's ampacity: the Handbook \"chassis wiring\" column (single wire in free air) for 10–30 AWG, or 33 CFR 183.425 Table 5 at the net's `insulation` rating for 8–18 AWG, corrected for a written `ambient` above its 30 °C by the NEC 310.15(B) formula; a metric size is rated as the next smaller AWG by area. A brief mode's current (`lasts` 5 s or less) meets the adiabatic short-time limit instead: I²t ≤ k²S², k = 115 for PVC-insulated copper. A motor lead carries its motor's current. The table in force is named in the finding.",
        why: "A wire above its ampacity heats until its insulation softens, smokes or melts, and it can start a fire long before any fuse sized for the load reacts.",
        example: "railcheck: 1\nname: lab camera rig\nparts:\n  pack: { use: battery/lead-acid-12v }\n  main_fuse: { use: fuse/blade-3a }\n  buck: { use: regulator/buck-5v-5a }\n  cams: { class: load, pins: { vin: { role: supply-in, draw: 4 A }, gnd: { role: ground } } }\nnets:\n  BATT+: [pack.pos, main_fuse.a]\n  VBAT: [main_fuse.b, buck.vin]\n  5V: { pins: [buck.vout, cams.vin], wire: 24 AWG, length: 0.3 m }   # 4 A > the 3.5 A of 24 AWG\n  GND: [pack.neg, buck.gnd, cams.gnd]",
        fix: "railcheck: 1\nname: lab camera rig\nparts:\n  pack: { use: battery/lead-acid-12v }\n  main_fuse: { use: fuse/blade-3a }\n  buck: { use: regulator/buck-5v-5a }\n  cams: { class: load, pins: { vin: { role: supply-in, draw: 4 A }, gnd: { role: ground } } }\nnets:\n  BATT+: [pack.pos, main_fuse.a]\n  VBAT: [main_fuse.b, buck.vin]\n  5V: { pins: [buck.vout, cams.vin], wire: 22 AWG, length: 0.3 m }   # 22 AWG carries 7 A\n  GND: [pack.neg, buck.gnd, cams.gnd]",
        references: "Handbook of Electronic Tables and Formulas for American Wire Gauge, chassis wiring column; 33 CFR 183.425 Table 5 with the NEC 310.15(B) ambient correction; IEC 60364-4-43 §434.5.2 and Table 43A (k = 115) for brief peaks; metric sizes by the next smaller AWG (format reference §4); worked examples: 22 AWG carries 7 A on the chassis column, 16 AWG with 105 °C insulation 25 A in Table 5.",
    },
    needs_operating_point: true,
    check: check_ampacity,
};

pub const DROP: Rule = Rule {
    id: "wire/drop",
    severity: Severity::Warning,
    summary: "supply-plus-return drop above limits.wire_drop",
    doc: RuleDoc {
        what: "For each supply input, the voltage lost in the wiring: the drop (I × R, each net carrying its total current) on every supply net from its source down to the input, plus the rise on the ground nets between its source's ground and its own (from the battery negative for a load fed by the battery; from the regulator's ground for a load on a regulated rail, which holds its output above its own ground), as a share of the voltage its source gives (the battery terminal, or the regulator output feeding the rail); a motor wired straight across a rail and a ground counts as such an input; and for each USB cable, the drop over its VBUS and ground conductors as a share of the host's supply. Checked in the `typical` mode and the user's modes at every battery state, against `limits.wire_drop` (default 5 %). Momentary peaks of the `worst` mode are left to `voltage/under-range`. A ground net carries every part's return current, so a load is charged with the drop other parts' return current makes on a ground wire it shares with them.",
        why: "Voltage lost in the wiring is heat in the harness and a lower supply at the load: a 3.3 V or 5 V logic rail has little room before the part browns out, and a long thin motor feed robs the motors of torque.",
        example: "railcheck: 1\nname: greenhouse irrigation pump\nparts:\n  pack: { use: battery/lead-acid-12v }   # empty: 10.5 V, 10.4 V at 5 A\n  main_fuse: { use: fuse/blade-7a5 }\n  pump: { class: load, pins: { vin: { role: supply-in, draw: 5 A }, gnd: { role: ground } } }\nnets:\n  BATT+: [pack.pos, main_fuse.a]\n  # 5 A over 3 m out and 3 m back of 18 AWG (20.95 mohm/m): 0.63 V, 6 % > 5 %\n  PUMP+: { pins: [main_fuse.b, pump.vin], wire: 18 AWG, length: 3 m }\n  PUMP-: { pins: [pump.gnd, pack.neg], wire: 18 AWG, length: 3 m }",
        fix: "railcheck: 1\nname: greenhouse irrigation pump\nparts:\n  pack: { use: battery/lead-acid-12v }   # empty: 10.5 V, 10.4 V at 5 A\n  main_fuse: { use: fuse/blade-7a5 }\n  pump: { class: load, pins: { vin: { role: supply-in, draw: 5 A }, gnd: { role: ground } } }\nnets:\n  BATT+: [pack.pos, main_fuse.a]\n  # 5 A over 3 m out and 3 m back of 16 AWG (13.17 mohm/m): 0.40 V, 3.8 %\n  PUMP+: { pins: [main_fuse.b, pump.vin], wire: 16 AWG, length: 3 m }\n  PUMP-: { pins: [pump.gnd, pack.neg], wire: 16 AWG, length: 3 m }",
        references: "Drop ΔV = I × R_per_m × loop length (Ohm's law; worked example: 2.0 A over 1 m out and 1 m back of 22 AWG drops 0.212 V, 4.24 % of 5 V); copper resistance from the ASTM B258 gauge formula with annealed-copper resistivity (IEC 60028) and IEC 60228 class 5 for metric sizes; 3 % branch / 5 % total are the NEC 210.19(A) Informational Note No. 4 recommendations, and 3 % for electronics is ABYC E-11.",
    },
    needs_operating_point: true,
    check: check_drop,
};

fn amps(i: ElectricCurrent) -> f64 {
    i.get::<ampere>()
}

fn volts(v: ElectricPotential) -> f64 {
    v.get::<volt>()
}

/// Reads a conductor's current out of an operating point.
type CurrentAt<'a> = Box<dyn Fn(&OperatingPoint) -> ElectricCurrent + 'a>;

/// A conductor with a wire size: a net's wire or a USB cable.
struct Conductor<'a> {
    subject: String,
    span: Span,
    size: WireSize,
    insulation: Option<ThermodynamicTemperature>,
    /// The air around it when the plan gives one (ampacity correction).
    ambient: Option<ThermodynamicTemperature>,
    nets: Vec<String>,
    parts: Vec<String>,
    current: CurrentAt<'a>,
}

/// Driver-fed motors whose winding pins sit on each net: their current runs
/// in the motor leads, which the supply tree does not count.
fn motor_leads(cx: &Context) -> Vec<Vec<PartId>> {
    let plan = cx.plan;
    let mut leads = vec![Vec::new(); plan.nets.len()];
    for (motor, feed) in cx.circuit.motor_feed.iter().enumerate() {
        if !matches!(feed, Some(MotorFeed::Driver { .. })) {
            continue;
        }
        for (_, pin) in plan.parts[motor].pins_with_role(PinRole::Winding) {
            if let Some(net) = pin.net
                && !leads[net].contains(&motor)
            {
                leads[net].push(motor);
            }
        }
    }
    leads
}

fn conductors<'a>(cx: &'a Context) -> Vec<Conductor<'a>> {
    let plan = cx.plan;
    let leads = motor_leads(cx);
    let mut found = Vec::new();
    for (net_id, net) in plan.nets.iter().enumerate() {
        let Some(wire) = net.wire else { continue };
        let motors = leads[net_id].clone();
        found.push(Conductor {
            subject: format!("net `{}`", net.name),
            span: wire.span,
            size: wire.value,
            insulation: net.insulation,
            ambient: plan.conductor_ambient(net_id),
            nets: vec![net.name.clone()],
            parts: motors.iter().map(|&m| plan.parts[m].name.clone()).collect(),
            current: Box::new(move |p| {
                let in_leads = motors
                    .iter()
                    .filter_map(|&m| p.motors[m].map(|m| m.current.abs()))
                    .fold(ElectricCurrent::new::<ampere>(0.0), |sum, i| sum + i);
                p.net_current[net_id].abs().max(in_leads)
            }),
        });
    }
    for (link_id, link) in plan.links.iter().enumerate() {
        let Some(wire) = link.wire else { continue };
        let (host, device) = (link.host.0, link.device.0);
        found.push(Conductor {
            subject: format!(
                "USB cable `{}.{}` → `{}.{}`",
                plan.parts[host].name,
                plan.parts[host].ports[link.host.1].name,
                plan.parts[device].name,
                plan.parts[device].ports[link.device.1].name
            ),
            span: link.span,
            size: wire.value,
            insulation: None,
            ambient: plan.cable_ambient(),
            nets: Vec::new(),
            parts: vec![
                plan.parts[host].name.clone(),
                plan.parts[device].name.clone(),
            ],
            current: Box::new(move |p| p.link_current[link_id].abs()),
        });
    }
    found
}

/// The thinnest AWG that the same table lets carry `current`, with its
/// ampacity; `None` when no size the tables cover is enough.
fn thinnest_carrying(
    current: ElectricCurrent,
    insulation: Option<ThermodynamicTemperature>,
    ambient: Option<ThermodynamicTemperature>,
) -> Option<(WireSize, ElectricCurrent, AmpacityTable)> {
    (8..=30).rev().find_map(|gauge| {
        let size = WireSize::Awg(gauge);
        ampacity_at(size, insulation, ambient)
            .filter(|(rating, _)| !exceeds(amps(current), amps(*rating)))
            .map(|(rating, table)| (size, rating, table))
    })
}

fn check_ampacity(cx: &Context, out: &mut Vec<Finding>) {
    for conductor in conductors(cx) {
        check_brief_peaks(cx, &conductor, out);
        let Some((rating, table)) =
            ampacity_at(conductor.size, conductor.insulation, conductor.ambient)
        else {
            continue;
        };
        let Some((point, current)) = worst_point(cx.points().filter(continuous), |p| {
            Some(amps((conductor.current)(p)))
        }) else {
            continue;
        };
        cx.margin(
            Margin::below(
                RatingKind::WireAmpacity,
                AMPACITY.id,
                current,
                amps(rating),
                Unit::Ampere,
            ),
            |m| m.at(&conductor.subject).at_point(cx.plan, point),
        );
        if !exceeds(current, amps(rating)) {
            continue;
        }
        let current_q = ElectricCurrent::new::<ampere>(current);
        let help = match thinnest_carrying(current_q, conductor.insulation, conductor.ambient) {
            Some((size, carries, _)) => format!(
                "use {size} or heavier ({} by the same table), or split the load over more conductors",
                show_current(carries)
            ),
            None => "no single size the tables cover carries this current: split the load over parallel conductors".to_string(),
        };
        let mut finding = Finding::new(
            &AMPACITY,
            conductor.span,
            format!(
                "{} carries {} continuous {}; its {} wire is rated {} ({}{})",
                conductor.subject,
                show_current(current_q),
                mode_label(cx.plan, point.mode, point.battery),
                conductor.size,
                show_current(rating),
                table.describe(),
                ambient_note(&conductor, table)
            ),
        )
        .at_point(cx.plan, point)
        .help(help)
        .value("current", current)
        .value("ampacity", amps(rating));
        for net in &conductor.nets {
            finding = finding.net(net);
        }
        for part in &conductor.parts {
            finding = finding.part(part);
        }
        out.push(finding);
    }
}

/// How a finding names the air an ampacity was corrected for.
fn ambient_note(conductor: &Conductor, table: AmpacityTable) -> String {
    match conductor.ambient {
        Some(air) if crate::wire::ambient_factor(table, Some(air)) < 1.0 => format!(
            ", corrected to {} air by the NEC 310.15(B) ambient formula",
            crate::units::show_temperature(air)
        ),
        _ => String::new(),
    }
}

/// A brief mode's current against the wire's adiabatic short-time limit
/// (IEC 60364-4-43 §434.5.2: I²t ≤ k²S², k = 115 for PVC-insulated copper):
/// a peak that lasts a few seconds heats the copper with no time to shed it.
fn check_brief_peaks(cx: &Context, conductor: &Conductor, out: &mut Vec<Finding>) {
    let over = cx
        .points()
        .filter_map(|p| p.brief.map(|lasts| (p, lasts)))
        .map(|(p, lasts)| {
            let current = (conductor.current)(p);
            (p, lasts, current, adiabatic_limit(conductor.size, lasts))
        })
        .filter(|(_, _, current, limit)| exceeds(amps(*current), amps(*limit)))
        .max_by(|a, b| (amps(a.2) / amps(a.3)).total_cmp(&(amps(b.2) / amps(b.3))));
    let Some((point, lasts, current, limit)) = over else {
        return;
    };
    let mut finding = Finding::new(
        &AMPACITY,
        conductor.span,
        format!(
            "{} carries {} for {} {}; its {} wire may carry {} for that long (IEC 60364-4-43 adiabatic limit, k = 115)",
            conductor.subject,
            show_current(current),
            show_duration(lasts),
            mode_label(cx.plan, point.mode, point.battery),
            conductor.size,
            show_current(limit)
        ),
    )
    .at_point(cx.plan, point)
    .help("use a heavier wire, or shorten the peak (a current limit in the driver)")
    .value("current", amps(current))
    .value("short_time_limit", amps(limit));
    for net in &conductor.nets {
        finding = finding.net(net);
    }
    for part in &conductor.parts {
        finding = finding.part(part);
    }
    out.push(finding);
}

/// Voltage lost along a net's path to the root of its tree (I·R per net,
/// each net carrying its total current), and the nets with a resistance on
/// the way.
fn path_drop(
    cx: &Context,
    resistance: &[Option<ElectricalResistance>],
    point: &OperatingPoint,
    start: NetId,
) -> (ElectricPotential, Vec<NetId>) {
    let mut drop = ElectricPotential::new::<volt>(0.0);
    let mut nets = Vec::new();
    let mut at = Some(start);
    // A tree has no cycles; the bound only guards against a malformed one.
    for _ in 0..cx.plan.nets.len() {
        let Some(net) = at else { break };
        if let Some(r) = resistance[net] {
            drop += point.net_current[net] * r;
            nets.push(net);
        }
        at = cx.circuit.parent[net].map(|p| p.net);
    }
    (drop, nets)
}

/// What a load loses to its wiring at one point.
#[derive(Clone, Debug, PartialEq)]
struct WiringDrop {
    supply: ElectricPotential,
    supply_nets: Vec<NetId>,
    ground: ElectricPotential,
    ground_nets: Vec<NetId>,
    /// What the source gives: the battery terminal or the regulator output.
    source: ElectricPotential,
}

impl WiringDrop {
    fn total(&self) -> ElectricPotential {
        self.supply + self.ground
    }

    fn share(&self) -> Option<Ratio> {
        (volts(self.source) > 0.0).then(|| self.total() / self.source)
    }
}

/// The supply-out pin on the root net of the node a supply net belongs to.
fn source_of(cx: &Context, net: NetId) -> Option<PinRef> {
    cx.circuit.source[cx.circuit.node_of_net[net]]
}

fn wiring_drop(
    cx: &Context,
    resistance: &[Option<ElectricalResistance>],
    point: &OperatingPoint,
    load: &Load,
) -> Option<WiringDrop> {
    point.net_potential[load.supply]?;
    let source_voltage = point.pin_voltage.get(load.source.part, load.source.pin)?;
    let (supply, supply_nets) = path_drop(cx, resistance, point, load.supply);
    // The return side counts from the source's own ground: a regulator's
    // load sharing its ground net loses nothing there, whatever the battery
    // return carries (the regulator holds its output above its own ground).
    let rise = |net: Option<NetId>| match net {
        Some(g) => path_drop(cx, resistance, point, g),
        None => (ElectricPotential::new::<volt>(0.0), Vec::new()),
    };
    let source_ground = if matches!(cx.plan.parts[load.source.part].class, Class::Battery(_)) {
        None
    } else {
        cx.circuit.ground_net[load.source.part]
    };
    let (load_rise, load_nets) = rise(load.ground);
    let (source_rise, source_nets) = rise(source_ground);
    let ground = load_rise - source_rise;
    let ground_nets: Vec<NetId> = load_nets
        .into_iter()
        .filter(|n| !source_nets.contains(n))
        .collect();
    Some(WiringDrop {
        supply,
        supply_nets,
        ground,
        ground_nets,
        source: source_voltage,
    })
}

fn names(cx: &Context, nets: &[NetId]) -> String {
    let named: Vec<String> = nets
        .iter()
        .map(|&n| format!("`{}`", cx.net_name(n)))
        .collect();
    named.join(", ")
}

/// Something that takes current from a rail and returns it to ground.
struct Load {
    /// The pin named in the finding.
    pin: PinRef,
    supply: NetId,
    ground: Option<NetId>,
    source: PinRef,
}

/// Every supply input on a rail with a source, and every motor wired
/// straight across a rail and a ground.
fn loads(cx: &Context) -> Vec<Load> {
    let plan = cx.plan;
    let mut found = Vec::new();
    for (part_id, part) in plan.parts.iter().enumerate() {
        for (pin_id, pin) in part.pins_with_role(PinRole::SupplyIn) {
            let Some(net) = pin.net else { continue };
            let Some(source) = source_of(cx, net) else {
                continue;
            };
            found.push(Load {
                pin: PinRef {
                    part: part_id,
                    pin: pin_id,
                },
                supply: net,
                ground: cx.circuit.ground_net[part_id],
                source,
            });
        }
    }
    for (motor, feed) in cx.circuit.motor_feed.iter().enumerate() {
        let Some(MotorFeed::Direct { supply, ground }) = *feed else {
            continue;
        };
        let Some(source) = source_of(cx, supply) else {
            continue;
        };
        let Some((pin, _)) = plan.parts[motor]
            .pins_with_role(PinRole::Winding)
            .find(|(_, p)| p.net == Some(supply))
        else {
            continue;
        };
        found.push(Load {
            pin: PinRef { part: motor, pin },
            supply,
            ground: Some(ground),
            source,
        });
    }
    found
}

fn load_current(point: &OperatingPoint, load: &Load) -> ElectricCurrent {
    match point.motors[load.pin.part] {
        Some(motor) => motor.current,
        None => point.pin_current.get(load.pin.part, load.pin.pin),
    }
}

fn check_drop(cx: &Context, out: &mut Vec<Finding>) {
    let plan = cx.plan;
    let limit = plan.limits.wire_drop;
    let resistance: Vec<Option<ElectricalResistance>> = (0..plan.nets.len())
        .map(|n| net_resistance(plan, n))
        .collect();
    for load in loads(cx) {
        let Some((point, share)) = worst_point(cx.points().filter(continuous), |p| {
            wiring_drop(cx, &resistance, p, &load)
                .and_then(|d| d.share())
                .map(|s| s.get::<ratio>())
        }) else {
            continue;
        };
        let Some(drop) = wiring_drop(cx, &resistance, point, &load) else {
            continue;
        };
        cx.margin(
            Margin::below(
                RatingKind::WireDrop,
                DROP.id,
                volts(drop.total()),
                volts(drop.source) * limit.get::<ratio>(),
                Unit::Volt,
            ),
            |m| {
                m.at(&format!("to {}", cx.pin_name(load.pin)))
                    .at_point(plan, point)
            },
        );
        if !exceeds(share, limit.get::<ratio>()) {
            continue;
        }
        let mut sides = Vec::new();
        if !drop.supply_nets.is_empty() {
            sides.push(format!(
                "{} on the supply side ({})",
                show_voltage(drop.supply),
                names(cx, &drop.supply_nets)
            ));
        }
        if !drop.ground_nets.is_empty() {
            sides.push(format!(
                "{} on the return ({})",
                show_voltage(drop.ground),
                names(cx, &drop.ground_nets)
            ));
        }
        let mut finding = Finding::new(
            &DROP,
            cx.pin_span(load.pin),
            format!(
                "`{}` loses {} to its wiring {}: {}; {} of the {} from `{}`, above the {} limit",
                cx.pin_name(load.pin),
                show_voltage(drop.total()),
                mode_label(plan, point.mode, point.battery),
                sides.join(" and "),
                show_share(Ratio::new::<ratio>(share)),
                show_voltage(drop.source),
                cx.pin_name(load.source),
                show_share(limit),
            ),
        )
        .at_point(plan, point)
        .help("use heavier or shorter wire on the nets named (three gauges heavier halves the drop), give this load its own return wire, or raise `limits.wire_drop` if it tolerates more")
        .part(cx.part_name(load.pin.part))
        .part(cx.part_name(load.source.part))
        .value("drop", volts(drop.total()))
        .value("supply_drop", volts(drop.supply))
        .value("return_drop", volts(drop.ground))
        .value("source_voltage", volts(drop.source))
        .value("limit", volts(drop.source) * limit.get::<ratio>())
        .value("current", amps(load_current(point, &load)));
        for &n in drop.supply_nets.iter().chain(&drop.ground_nets) {
            finding = finding.net(cx.net_name(n));
        }
        out.push(finding);
    }
    check_cable_drop(cx, out);
}

/// The voltage a part's own supply gives it: its first supply input on a
/// fed rail (where a USB host takes the power it passes on).
fn supply_of(cx: &Context, point: &OperatingPoint, part: PartId) -> Option<ElectricPotential> {
    let (pin, _) = cx.plan.parts[part]
        .pins_with_role(PinRole::SupplyIn)
        .find(|(_, pin)| pin.net.is_some_and(|n| point.net_potential[n].is_some()))?;
    point.pin_voltage.get(part, pin)
}

fn check_cable_drop(cx: &Context, out: &mut Vec<Finding>) {
    let plan = cx.plan;
    let limit = plan.limits.wire_drop;
    for (link_id, link) in plan.links.iter().enumerate() {
        let Some(resistance) = usb_link_resistance(plan, link_id) else {
            continue;
        };
        let host = link.host.0;
        if matches!(plan.parts[host].class, Class::Battery(_)) {
            continue;
        }
        // VBUS out and ground back: the wire spec applies to both (format reference §5).
        let cable_drop = |p: &OperatingPoint| p.link_current[link_id] * resistance * 2.0;
        let Some((point, share)) = worst_point(cx.points().filter(continuous), |p| {
            let supply = supply_of(cx, p, host).filter(|v| volts(*v) > 0.0)?;
            Some((cable_drop(p) / supply).get::<ratio>())
        }) else {
            continue;
        };
        if !exceeds(share, limit.get::<ratio>()) {
            continue;
        }
        let Some(supply) = supply_of(cx, point, host) else {
            continue;
        };
        let drop = cable_drop(point);
        let device = link.device.0;
        let size = link
            .wire
            .map(|w| format!("{} ", w.value))
            .unwrap_or_default();
        let length = link
            .length
            .map(|l| format!(", {}", show_length(l.value)))
            .unwrap_or_default();
        out.push(
            Finding::new(
                &DROP,
                link.span,
                format!(
                    "USB cable `{}.{}` → `{}.{}` ({size}wire{length}) loses {} over VBUS and ground at {} {}: {} of the host's {}, above the {} limit",
                    plan.parts[host].name,
                    plan.parts[host].ports[link.host.1].name,
                    plan.parts[device].name,
                    plan.parts[device].ports[link.device.1].name,
                    show_voltage(drop),
                    show_current(point.link_current[link_id]),
                    mode_label(plan, point.mode, point.battery),
                    show_share(Ratio::new::<ratio>(share)),
                    show_voltage(supply),
                    show_share(limit),
                ),
            )
            .at_point(plan, point)
            .help("use a shorter cable or one with heavier power conductors")
            .part(&plan.parts[host].name)
            .part(&plan.parts[device].name)
            .value("drop", volts(drop))
            .value("source_voltage", volts(supply))
            .value("limit", volts(supply) * limit.get::<ratio>())
            .value("current", amps(point.link_current[link_id])),
        );
    }
}
