//! `logic/unpowered-input`: inputs driven high while their part's logic
//! supply has no voltage. The input's ceiling follows VDD down to 0 V, so any
//! high level forward-biases its clamp diode and powers the part through the
//! signal.
//!
//! Not for inputs of a powered part driven past their ceiling
//! (`logic/overvoltage`), nor for an unfed rail as such (`power/unfed`).

use super::{
    DriverSide, Level, Source, driver_side, logic_of, net_of, powered, quoted, role_of,
    shares_ground, signals, supply_voltage, v,
};
use crate::analysis::OperatingPoint;
use crate::model::{PartId, PinRef, PinRole};
use crate::rules::{Context, Finding, Rule, RuleDoc, Severity, exceeds, mode_label};
use crate::units::show_voltage;
use uom::si::f64::ElectricPotential;

pub const UNPOWERED_INPUT: Rule = Rule {
    id: "logic/unpowered-input",
    severity: Severity::Error,
    summary: "an input driven high while its part's logic supply is unpowered",
    doc: RuleDoc {
        what: "For every part with logic inputs, whether something drives an input high at an operating point where the input's logic supply has no voltage: its `ref` pin is in no net or its rail is unfed, or (with no `ref`) none of the part's supply inputs is fed and no USB cable powers it. With VDD = 0 V an input's ceiling is VDD + 0.3 V = 0.3 V, or its written `max`; `tolerant:` does not count (a tolerant input still needs its VDD, unless the part's `max` says otherwise). One finding per part, naming the driven inputs, their drivers, the highest level and the limit. A part powered another way — its `ref` an onboard regulator fed over a USB cable or through `feeds:` — has a supply and is not reported.",
        why: "An input driven above an unpowered part's rail conducts through its clamp diode into that rail: the signal powers the part. It half-starts, draws its supply current through a pin rated for microamperes, and can latch up or burn the input. A motor driver whose logic supply was left unwired while the controller drives its inputs is the common case.",
        example: "railcheck: 1\nparts:\n  pack:  { use: battery/lipo-3s, with: { cutoff: true } }\n  fuse:  { use: fuse/blade-15a }\n  buck:  { use: regulator/buck-5v-5a }\n  mcu:   { use: board/mcu-3v3 }\n  drive: { use: driver/mosfet-dual-hbridge }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, buck.vin, drive.vm]\n  GND:   [pack.neg, buck.gnd, drive.gnd, mcu.gnd]\n  5V:    [buck.vout, mcu.vin]   # drive.vlogic left out: VDD = 0 V, ceiling 0.3 V\n  DIR_A: [mcu.gpio1, drive.in1]   # driven to 3.3 V\n  DIR_B: [mcu.gpio2, drive.in2]",
        fix: "railcheck: 1\nparts:\n  pack:  { use: battery/lipo-3s, with: { cutoff: true } }\n  fuse:  { use: fuse/blade-15a }\n  buck:  { use: regulator/buck-5v-5a }\n  mcu:   { use: board/mcu-3v3 }\n  drive: { use: driver/mosfet-dual-hbridge }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, buck.vin, drive.vm]\n  GND:   [pack.neg, buck.gnd, drive.gnd, mcu.gnd]\n  5V:    [buck.vout, mcu.vin, drive.vlogic]   # the driver's logic supply wired\n  DIR_A: [mcu.gpio1, drive.in1]\n  DIR_B: [mcu.gpio2, drive.in2]",
        references: "Input ceiling VDD + 0.3 V with VDD = 0 V: JEDEC JESD8 input range, taken as the absolute maximum (common practice, the same limit as `logic/overvoltage`); back-powering through input clamp diodes is the reason the limit follows VDD.",
    },
    needs_operating_point: true,
    check: check_unpowered_input,
};

/// Whether the supply behind a logic input has no voltage at a point. `None`
/// when the pin names no supply and its part has none (its levels are the
/// family's nominal: powered as far as the plan says).
fn supply_dead(cx: &Context, point: &OperatingPoint, pin: PinRef) -> Option<bool> {
    match logic_of(cx, pin).reference {
        Some(reference) => {
            Some(supply_voltage(cx, point, pin.part, reference).is_none_or(|vdd| v(vdd) <= 0.0))
        }
        None => {
            let has_supply = cx.plan.parts[pin.part]
                .pins
                .iter()
                .any(|p| p.role == PinRole::SupplyIn);
            has_supply.then(|| !powered(cx, point, pin.part))
        }
    }
}

/// The highest level a source puts on the signal at one point, if it has one
/// there (a driver whose own rail is dead puts nothing).
fn level_at<'p>(
    cx: &Context,
    side: &DriverSide<'p>,
    point: &'p OperatingPoint,
) -> Option<Level<'p>> {
    let ends = match &side.rail {
        Some(rail) if rail.id.is_some() => {
            let at = rail.at(point)?;
            Some((at, at))
        }
        Some(rail) => Some(rail.ends()),
        None => None,
    };
    super::drive(cx, side, ends).highest
}

/// Each unpowered part's [`Back`], in the order they are found, and where
/// each part's sits.
#[derive(Default)]
struct Backs<'p> {
    list: Vec<Back<'p>>,
    index: std::collections::HashMap<PartId, usize>,
}

/// What drives one unpowered part's inputs, gathered over its pins.
struct Back<'p> {
    part: PartId,
    inputs: Vec<PinRef>,
    drivers: Vec<Source>,
    /// The highest level over its limit, with the input and limit it is
    /// measured against.
    worst: Option<(Level<'p>, PinRef, ElectricPotential, &'p OperatingPoint)>,
}

fn source_name(cx: &Context, source: Source) -> String {
    match source {
        Source::Pin(pin) => format!("`{}`", cx.pin_name(pin)),
        Source::PullUp { resistor, .. } => format!("pull-up `{}`", cx.part_name(resistor)),
        Source::Tied(net) => format!("rail `{}`", cx.net_name(net)),
    }
}

/// The input's ceiling with no VDD: its written absolute maximum, else
/// 0 V + 0.3 V.
fn unpowered_ceiling(cx: &Context, pin: PinRef) -> ElectricPotential {
    cx.plan.parts[pin.part].pins[pin.pin]
        .max
        .unwrap_or_else(super::ceiling_above_vdd)
}

/// Records every point where `source` drives `receiver` past its limit
/// while the receiver's supply is dead.
fn note<'p>(
    cx: &'p Context,
    backs: &mut Backs<'p>,
    receiver: PinRef,
    source: Source,
    side: &DriverSide<'p>,
) {
    let limit = unpowered_ceiling(cx, receiver);
    for point in cx.points() {
        if supply_dead(cx, point, receiver) != Some(true) {
            continue;
        }
        let Some(level) = level_at(cx, side, point) else {
            continue;
        };
        if !exceeds(v(level.value), v(limit)) {
            continue;
        }
        let list = &mut backs.list;
        let index = *backs.index.entry(receiver.part).or_insert_with(|| {
            list.push(Back {
                part: receiver.part,
                inputs: Vec::new(),
                drivers: Vec::new(),
                worst: None,
            });
            list.len() - 1
        });
        let back = &mut list[index];
        if !back.inputs.contains(&receiver) {
            back.inputs.push(receiver);
        }
        if !back.drivers.contains(&source) {
            back.drivers.push(source);
        }
        let over = v(level.value) - v(limit);
        if back
            .worst
            .as_ref()
            .is_none_or(|(l, _, lim, _)| over > v(l.value) - v(*lim) + 1e-12)
        {
            back.worst = Some((level, receiver, limit, point));
        }
    }
}

fn check_unpowered_input(cx: &Context, out: &mut Vec<Finding>) {
    let mut backs = Backs::default();
    let is_input = |pin: PinRef| role_of(cx, pin).is_input();
    for signal in signals(cx) {
        if !shares_ground(cx, &signal.pins) {
            continue;
        }
        for &receiver in signal.pins.iter().filter(|&&p| is_input(p)) {
            // A part with every supply input open is reported once, by
            // `power/unfed`, whose hint names the inputs this would list.
            if net_of(cx, receiver).is_none()
                || crate::rules::power::wholly_unwired(cx, receiver.part)
            {
                continue;
            }
            let pins = signal
                .pins
                .iter()
                .copied()
                .filter(|&p| p.part != receiver.part && role_of(cx, p).drives_high());
            let sources: Vec<Source> = pins
                .map(Source::Pin)
                .chain(
                    signal
                        .pull_ups
                        .iter()
                        .map(|&(resistor, rail)| Source::PullUp { resistor, rail }),
                )
                .collect();
            for source in sources {
                if let Some(side) = driver_side(cx, source, &signal.pull_ups, receiver.part) {
                    note(cx, &mut backs, receiver, source, &side);
                }
            }
        }
    }
    // Inputs wired straight onto a rail.
    for (net_id, net) in cx.plan.nets.iter().enumerate() {
        let node = cx.circuit.node_of_net[net_id];
        if !super::is_power_node(cx, node) || cx.circuit.nodes[node].is_ground() {
            continue;
        }
        for &receiver in net.pins.iter().filter(|&&p| is_input(p)) {
            if !shares_ground(cx, &[receiver]) {
                continue;
            }
            let source = Source::Tied(net_id);
            if let Some(side) = driver_side(cx, source, &[], receiver.part) {
                note(cx, &mut backs, receiver, source, &side);
            }
        }
    }
    out.extend(backs.list.iter().filter_map(|back| finding(cx, back)));
}

fn finding(cx: &Context, back: &Back) -> Option<Finding> {
    let (level, receiver, limit, point) = back.worst.as_ref()?;
    let spec = logic_of(cx, *receiver);
    let part = &cx.plan.parts[back.part];
    let (span, supply) = match spec.reference {
        Some(reference) => {
            let supply = PinRef {
                part: back.part,
                pin: reference,
            };
            let state = match net_of(cx, supply) {
                None => format!("`{}` is in no net", cx.pin_name(supply)),
                Some(net) => format!(
                    "`{}` on `{}` has no voltage",
                    cx.pin_name(supply),
                    cx.net_name(net)
                ),
            };
            (cx.pin_span(supply), state)
        }
        None => (part.span, "none of its supply inputs is fed".to_string()),
    };
    let inputs: Vec<String> = back.inputs.iter().map(|&p| cx.pin_name(p)).collect();
    let drivers: Vec<String> = back.drivers.iter().map(|&s| source_name(cx, s)).collect();
    let limit_basis = if cx.plan.parts[receiver.part].pins[receiver.pin]
        .max
        .is_some()
    {
        format!("the written `max` of `{}`", cx.pin_name(*receiver))
    } else {
        "VDD + 0.3 V with VDD = 0 V".to_string()
    };
    let message = format!(
        "`{}` has no logic supply ({supply}) yet {} {} {} driven high by {}, up to {} ({}) {}, above the {} an unpowered input takes ({limit_basis}): the inputs' clamp diodes power the part through its signals",
        part.name,
        if inputs.len() == 1 { "input" } else { "inputs" },
        quoted(&inputs),
        if inputs.len() == 1 { "is" } else { "are" },
        super::joined(&drivers),
        show_voltage(level.value),
        level.basis.text(cx),
        mode_label(cx.plan, point.mode, point.battery),
        show_voltage(*limit),
    );
    let mut finding = Finding::new(&UNPOWERED_INPUT, span, message)
        .at_point(cx.plan, point)
        .help("wire the part's logic supply (its `ref` pin) to its rail, or keep its inputs low until it is powered (a buffer with power-off protection between them)")
        .part(&part.name)
        .value("high_level", v(level.value))
        .value("ceiling", v(*limit));
    for &input in &back.inputs {
        finding = finding.label(cx.pin_span(input), "driven while unpowered");
        if let Some(net) = net_of(cx, input) {
            finding = finding.net(cx.net_name(net));
        }
    }
    for &source in &back.drivers {
        match source {
            Source::Pin(pin) => finding = finding.part(cx.part_name(pin.part)),
            Source::PullUp { resistor, rail } => {
                finding = finding.part(cx.part_name(resistor)).net(cx.net_name(rail));
            }
            Source::Tied(net) => finding = finding.net(cx.net_name(net)),
        }
    }
    Some(finding)
}
