//! Supply voltage against each supply input's absolute maximum and operating
//! range, over every mode, battery state and regulator tolerance.

use super::{
    Context, Finding, Margin, RatingKind, Rule, RuleDoc, Severity, Unit, exceeds, falls_below,
    mode_label, show_voltages_apart, worst_point,
};
use crate::analysis::{BatteryState, OperatingPoint};
use crate::model::{NetId, PinRef, PinRole};
use crate::units::show_voltage;
use std::collections::HashMap;
use uom::si::electric_potential::volt;
use uom::si::f64::ElectricPotential;

pub const OVER_MAX: Rule = Rule {
    id: "voltage/over-max",
    severity: Severity::Error,
    summary: "a rail exceeds a pin's absolute maximum",
    doc: RuleDoc {
        what: "The highest voltage a supply input sees (full battery, lightest load, regulator at the top of its tolerance) against the pin's absolute maximum `max`.",
        why: "Above the absolute maximum a part can fail at once or degrade silently; a 3S pack at full charge is 12.6 V, not 11.1 V.",
        example: "railcheck: 1\nname: greenhouse sensor mast\nparts:\n  pack: { use: battery/lipo-4s, with: { cutoff: true } }   # 4S full = 16.8 V\n  fuse: { use: fuse/blade-1a }\n  ldo:  { use: regulator/linear-3v3-800ma }                # input max 15 V\n  imu:  { use: sensor/imu-3v3 }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, ldo.vin]\n  3V3:   [ldo.vout, imu.vcc]\n  GND:   [pack.neg, ldo.gnd, imu.gnd]",
        fix: "railcheck: 1\nname: greenhouse sensor mast\nparts:\n  pack: { use: battery/lipo-3s, with: { cutoff: true } }   # 3S full = 12.6 V\n  fuse: { use: fuse/blade-1a }\n  ldo:  { use: regulator/linear-3v3-800ma }                # input max 15 V\n  imu:  { use: sensor/imu-3v3 }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, ldo.vin]\n  3V3:   [ldo.vout, imu.vcc]\n  GND:   [pack.neg, ldo.gnd, imu.gnd]",
        references: "Pack windows: cells × the per-cell window of Linden & Reddy, Handbook of Batteries (cells × 4.20 V at full charge for lithium cobalt cells: 12.6 V for 3S).",
    },
    needs_operating_point: true,
    check: check_over,
};

pub const OVER_RANGE: Rule = Rule {
    id: "voltage/over-range",
    severity: Severity::Warning,
    summary: "a rail is above a pin's operating range, below its absolute maximum",
    doc: RuleDoc {
        what: "The highest voltage a supply input sees against the top of its operating `range`, when it stays below the absolute maximum.",
        why: "Outside the operating range the part is not specified: it may run hot or misbehave even though it is not immediately damaged.",
        example: "railcheck: 1\nname: orchard work lamp\nparts:\n  pack: { use: battery/lead-acid-12v }   # full 6 × 2.30 V = 13.8 V\n  fuse: { use: fuse/blade-2a }\n  lamp:\n    class: load\n    pins:\n      vin: { role: supply-in, range: 10 V..12 V, max: 16 V, draw: 0.4 A }\n      gnd: { role: ground }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  LAMP:  [fuse.b, lamp.vin]\n  GND:   [pack.neg, lamp.gnd]",
        fix: "railcheck: 1\nname: orchard work lamp\nparts:\n  pack: { use: battery/lead-acid-12v }   # full 6 × 2.30 V = 13.8 V\n  fuse: { use: fuse/blade-2a }\n  lamp: { use: load/lamp-12v }   # rated 10 V..15 V\nnets:\n  BATT+: [pack.pos, fuse.a]\n  LAMP:  [fuse.b, lamp.vin]\n  GND:   [pack.neg, lamp.gnd]",
        references: "Pack windows: cells × the per-cell window of Linden & Reddy, Handbook of Batteries (3S LiPo 12.6 / 11.1 / 9.00 V).",
    },
    needs_operating_point: true,
    // Decided together with over-max in `check_over`, so a pin gets one of the two.
    check: |_, _| {},
};

pub const UNDER_RANGE: Rule = Rule {
    id: "voltage/under-range",
    severity: Severity::Error,
    summary: "a rail falls below a pin's operating range",
    doc: RuleDoc {
        what: "The lowest voltage a supply input sees (battery sag, wire drops, regulators dropping out, motors stalling) against the bottom of its operating `range`. An error when it happens at nominal battery; a warning when only an empty battery brings it there.",
        why: "Below its range a controller browns out and resets — typically the moment the motors stall and pull the battery down.",
        example: "railcheck: 1\nname: orchard cart\nparts:\n  pack:  { use: battery/lead-acid-12v, with: { internal_resistance: 0.5 ohm } }   # worn\n  fuse:  { use: fuse/blade-10a }\n  stop:  { use: switch/estop-20a }\n  wheel: { use: motor/gearmotor-medium }   # winding 12 V / 5 A = 2.4 ohm\n  lamp:  { use: load/lamp-12v }            # vin 10 V..15 V\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, stop.a]\n  VMOT:  [stop.b, wheel.a, lamp.vin]       # a stall sags 12 V to 9.7 V\n  GND:   [pack.neg, wheel.b, lamp.gnd]",
        fix: "railcheck: 1\nname: orchard cart\nparts:\n  pack:  { use: battery/lead-acid-12v }   # healthy: 0.025 ohm\n  fuse:  { use: fuse/blade-10a }\n  stop:  { use: switch/estop-20a }\n  wheel: { use: motor/gearmotor-medium }   # winding 12 V / 5 A = 2.4 ohm\n  lamp:  { use: load/lamp-12v }            # vin 10 V..15 V\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, stop.a]\n  VMOT:  [stop.b, wheel.a, lamp.vin]       # a stall at empty: 10.4 V\n  GND:   [pack.neg, wheel.b, lamp.gnd]",
        references: "Battery sag V = Voc − I·R (Ohm's law); pack windows per Linden & Reddy, Handbook of Batteries; stall current I = V / R_winding (brushed DC motor equation).",
    },
    needs_operating_point: true,
    check: check_under,
};

fn supply_inputs<'a>(cx: &'a Context) -> impl Iterator<Item = PinRef> + 'a {
    cx.plan.parts.iter().enumerate().flat_map(|(part, p)| {
        p.pins_with_role(PinRole::SupplyIn)
            .filter(|(_, pin)| pin.net.is_some())
            .map(move |(pin, _)| PinRef { part, pin })
            .collect::<Vec<_>>()
    })
}

fn volts(v: ElectricPotential) -> f64 {
    v.get::<volt>()
}

/// One supply input past a limit: where, how far, and the limit it passes.
struct Hit<'p> {
    pin: PinRef,
    point: &'p OperatingPoint,
    voltage: f64,
    limit: ElectricPotential,
    severity: Severity,
}

/// Pins past a limit on the same rail share one cause (the rail), so they
/// are reported as one finding: hits grouped by rail, in the order found.
fn by_rail<'p>(cx: &Context, hits: Vec<Hit<'p>>) -> Vec<Vec<Hit<'p>>> {
    let mut groups: Vec<Vec<Hit<'p>>> = Vec::new();
    let mut group_of_rail: HashMap<(NetId, Severity), usize> = HashMap::new();
    for hit in hits {
        let net = cx.plan.parts[hit.pin.part].pins[hit.pin.pin]
            .net
            .unwrap_or(0);
        match group_of_rail.entry((net, hit.severity)) {
            std::collections::hash_map::Entry::Occupied(at) => groups[*at.get()].push(hit),
            std::collections::hash_map::Entry::Vacant(slot) => {
                slot.insert(groups.len());
                groups.push(vec![hit]);
            }
        }
    }
    groups
}

/// `` the 4.8 V minimum of `a.vin` and `b.vin` `` when the pins share their
/// limit, else `` the minimum of `a.vin` (4.8 V) and `b.vin` (4.75 V) ``.
fn limits_of(cx: &Context, hits: &[Hit], what: &str, shown_first: &str) -> String {
    let same = hits
        .iter()
        .all(|h| show_voltage(h.limit) == show_voltage(hits[0].limit));
    let names: Vec<String> = hits
        .iter()
        .enumerate()
        .map(|(i, h)| {
            if same {
                format!("`{}`", cx.pin_name(h.pin))
            } else {
                let limit = if i == 0 {
                    shown_first.to_string()
                } else {
                    show_voltage(h.limit)
                };
                format!("`{}` ({limit})", cx.pin_name(h.pin))
            }
        })
        .collect();
    let listed = match names.as_slice() {
        [one] => one.clone(),
        [init @ .., last] => format!("{} and {last}", init.join(", ")),
        [] => String::new(),
    };
    if same {
        format!("the {shown_first} {what} of {listed}")
    } else {
        format!("the {what} of {listed}")
    }
}

/// Orders a rail's hits worst first (the largest excess over its limit), so
/// the finding points at, and quotes, the pin that fails by most.
fn worst_first(hits: &mut [Hit], sign: f64) {
    hits.sort_by(|a, b| {
        let excess = |h: &Hit| sign * (h.voltage - volts(h.limit));
        excess(b).total_cmp(&excess(a))
    });
}

fn check_over(cx: &Context, out: &mut Vec<Finding>) {
    let mut over_max = Vec::new();
    let mut over_range = Vec::new();
    for pin_ref in supply_inputs(cx) {
        let pin = &cx.plan.parts[pin_ref.part].pins[pin_ref.pin];
        let Some((point, highest)) = worst_point(cx.points(), |p| {
            p.pin_voltage.get(pin_ref.part, pin_ref.pin).map(volts)
        }) else {
            continue;
        };
        let hit = |limit, severity| Hit {
            pin: pin_ref,
            point,
            voltage: highest,
            limit,
            severity,
        };
        if let Some(max) = pin.max {
            cx.margin(
                Margin::below(
                    RatingKind::SupplyMax,
                    OVER_MAX.id,
                    highest,
                    volts(max),
                    Unit::Volt,
                ),
                |m| m.at(&cx.pin_name(pin_ref)).at_point(cx.plan, point),
            );
        }
        if let Some(range) = pin.range() {
            cx.margin(
                Margin::below(
                    RatingKind::SupplyRangeMax,
                    OVER_RANGE.id,
                    highest,
                    volts(range.max),
                    Unit::Volt,
                ),
                |m| m.at(&cx.pin_name(pin_ref)).at_point(cx.plan, point),
            );
        }
        if let Some(max) = pin.max
            && exceeds(highest, volts(max))
        {
            over_max.push(hit(max, OVER_MAX.severity));
        } else if let Some(range) = pin.range()
            && exceeds(highest, volts(range.max))
        {
            over_range.push(hit(range.max, OVER_RANGE.severity));
        }
    }
    for hits in by_rail(cx, over_max) {
        out.push(rail_finding(
            cx,
            &OVER_MAX,
            hits,
            Side::Above,
            ("absolute maximum", "max"),
            "feed this part from a lower rail (a regulator), or choose a part rated for the full battery voltage",
        ));
    }
    for hits in by_rail(cx, over_range) {
        out.push(rail_finding(
            cx,
            &OVER_RANGE,
            hits,
            Side::Above,
            ("operating maximum", "range_max"),
            "regulate this rail, or choose a part whose operating range covers the full battery voltage",
        ));
    }
}

/// Which side of its limits a rail goes.
#[derive(Clone, Copy, PartialEq)]
enum Side {
    Above,
    Below,
}

/// One finding for a rail's hits, written from the pin past its limit by
/// most and naming every pin; `limit` is how the message names the limit
/// and the key its value is stored under.
fn rail_finding(
    cx: &Context,
    rule: &Rule,
    mut hits: Vec<Hit>,
    side: Side,
    (limit_name, limit_key): (&str, &str),
    help: &str,
) -> Finding {
    worst_first(&mut hits, if side == Side::Above { 1.0 } else { -1.0 });
    let first = &hits[0];
    let rail = cx.net_name(net_of(cx, first.pin)).to_string();
    let (shown, limit) =
        show_voltages_apart(ElectricPotential::new::<volt>(first.voltage), first.limit);
    let (goes, past) = match side {
        Side::Above => ("reaches", "above"),
        Side::Below => ("falls to", "below"),
    };
    let mut finding = Finding::new(
        rule,
        cx.pin_span(first.pin),
        format!(
            "rail `{rail}` {goes} {shown} {}, {past} {}",
            mode_label(cx.plan, first.point.mode, first.point.battery),
            limits_of(cx, &hits, limit_name, &limit),
        ),
    )
    .at_point(cx.plan, first.point)
    .help(help)
    .net(&rail)
    .value("voltage", first.voltage)
    .value(limit_key, volts(first.limit));
    finding.severity = first.severity;
    with_pins(cx, finding, &hits)
}

fn net_of(cx: &Context, pin: PinRef) -> NetId {
    cx.plan.parts[pin.part].pins[pin.pin].net.unwrap_or(0)
}

/// Names every part of a rail's hits and marks each further pin in the plan.
fn with_pins(cx: &Context, mut finding: Finding, hits: &[Hit]) -> Finding {
    for (i, hit) in hits.iter().enumerate() {
        finding = finding.part(&cx.plan.parts[hit.pin.part].name);
        if i > 0 {
            finding = finding.label(
                cx.pin_span(hit.pin),
                format!("`{}` too", cx.pin_name(hit.pin)),
            );
        }
    }
    finding
}

fn check_under(cx: &Context, out: &mut Vec<Finding>) {
    let mut hits = Vec::new();
    for pin_ref in supply_inputs(cx) {
        let pin = &cx.plan.parts[pin_ref.part].pins[pin_ref.pin];
        let Some(range) = pin.range() else { continue };
        if let Some((point, negated)) = worst_point(cx.points(), |p| {
            p.pin_voltage
                .get(pin_ref.part, pin_ref.pin)
                .map(|v| -volts(v))
        }) {
            cx.margin(
                Margin::above(
                    RatingKind::SupplyRangeMin,
                    UNDER_RANGE.id,
                    -negated,
                    volts(range.min),
                    Unit::Volt,
                ),
                |m| m.at(&cx.pin_name(pin_ref)).at_point(cx.plan, point),
            );
        }
        let lowest_where = |keep: fn(BatteryState) -> bool| {
            worst_point(cx.points().filter(|p| keep(p.battery)), |p| {
                p.pin_voltage
                    .get(pin_ref.part, pin_ref.pin)
                    .map(|v| -volts(v))
            })
            .filter(|(_, negated)| falls_below(-negated, volts(range.min)))
        };
        // An error when it happens with a healthy battery; a warning when only
        // an empty (cut-off) battery brings it there.
        let (severity, found) = match lowest_where(|b| b != BatteryState::Empty) {
            Some(hit) => (Severity::Error, Some(hit)),
            None => (
                Severity::Warning,
                lowest_where(|b| b == BatteryState::Empty),
            ),
        };
        let Some((point, negated)) = found else {
            continue;
        };
        hits.push(Hit {
            pin: pin_ref,
            point,
            voltage: -negated,
            limit: range.min,
            severity,
        });
    }
    for hits in by_rail(cx, hits) {
        let help = if hits[0].severity == Severity::Error {
            "reduce the drop (heavier wire, a battery with lower internal resistance, a regulator with less dropout) or feed this part from a rail that stays in range"
        } else {
            "only an empty battery gets here: set the low-voltage cut-off above this point, or accept a brown-out near the end of a run"
        };
        out.push(rail_finding(
            cx,
            &UNDER_RANGE,
            hits,
            Side::Below,
            ("minimum", "range_min"),
            help,
        ));
    }
}
