//! Supply voltage against each supply input's absolute maximum and operating
//! range, over every mode, battery state and regulator tolerance.

use super::{
    Context, Finding, Rule, RuleDoc, Severity, exceeds, falls_below, mode_label,
    show_voltages_apart, worst_point,
};
use crate::analysis::BatteryState;
use crate::model::{PinRef, PinRole};
use crate::units::show_voltage;
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

fn check_over(cx: &Context, out: &mut Vec<Finding>) {
    for pin_ref in supply_inputs(cx) {
        let pin = &cx.plan.parts[pin_ref.part].pins[pin_ref.pin];
        let Some((point, highest)) = worst_point(cx.points(), |p| {
            p.pin_voltage.get(pin_ref.part, pin_ref.pin).map(volts)
        }) else {
            continue;
        };
        let rail = cx.net_name(pin.net.unwrap_or(0)).to_string();
        let at = mode_label(cx.plan, point.mode, point.battery);
        let highest_v = ElectricPotential::new::<volt>(highest);
        if let Some(max) = pin.max
            && exceeds(highest, volts(max))
        {
            let (shown, limit) = show_voltages_apart(highest_v, max);
            out.push(
                Finding::new(
                    &OVER_MAX,
                    cx.pin_span(pin_ref),
                    format!(
                        "rail `{rail}` reaches {shown} {at}; `{}` absolute maximum is {limit}",
                        cx.pin_name(pin_ref),
                    ),
                )
                .at_point(cx.plan, point)
                .help("feed this part from a lower rail (a regulator), or choose a part rated for the full battery voltage")
                .part(&cx.plan.parts[pin_ref.part].name)
                .net(&rail)
                .value("voltage", highest)
                .value("max", volts(max)),
            );
            continue;
        }
        if let Some(range) = pin.range
            && exceeds(highest, volts(range.max))
        {
            let (shown, top) = show_voltages_apart(highest_v, range.max);
            out.push(
                Finding::new(
                    &OVER_RANGE,
                    cx.pin_span(pin_ref),
                    format!(
                        "rail `{rail}` reaches {shown} {at}, above the {}–{top} operating range of `{}`",
                        show_voltage(range.min),
                        cx.pin_name(pin_ref)
                    ),
                )
                .at_point(cx.plan, point)
                .help("regulate this rail, or choose a part whose operating range covers the full battery voltage")
                .part(&cx.plan.parts[pin_ref.part].name)
                .net(&rail)
                .value("voltage", highest)
                .value("range_max", volts(range.max)),
            );
        }
    }
}

fn check_under(cx: &Context, out: &mut Vec<Finding>) {
    for pin_ref in supply_inputs(cx) {
        let pin = &cx.plan.parts[pin_ref.part].pins[pin_ref.pin];
        let Some(range) = pin.range else { continue };
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
        let lowest = -negated;
        let rail = cx.net_name(pin.net.unwrap_or(0)).to_string();
        let (shown, bottom) =
            show_voltages_apart(ElectricPotential::new::<volt>(lowest), range.min);
        let mut finding = Finding::new(
            &UNDER_RANGE,
            cx.pin_span(pin_ref),
            format!(
                "rail `{rail}` falls to {shown} {}, below the {bottom} minimum of `{}`",
                mode_label(cx.plan, point.mode, point.battery),
                cx.pin_name(pin_ref)
            ),
        )
        .at_point(cx.plan, point)
        .help(if severity == Severity::Error {
            "reduce the drop (heavier wire, a battery with lower internal resistance, a regulator with less dropout) or feed this part from a rail that stays in range"
        } else {
            "only an empty battery gets here: set the low-voltage cut-off above this point, or accept a brown-out near the end of a run"
        })
        .part(&cx.plan.parts[pin_ref.part].name)
        .net(&rail)
        .value("voltage", lowest)
        .value("range_min", volts(range.min));
        finding.severity = severity;
        out.push(finding);
    }
}
