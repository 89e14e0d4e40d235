//! Motor drivers against the motors they drive: stall current against the
//! channel's peak rating.

use super::{
    Context, Finding, Margin, RatingKind, Rule, RuleDoc, Severity, Unit, exceeds, mode_label,
    worst_point,
};
use crate::model::{Class, MotorState};
use crate::units::{show_current, show_voltage};
use uom::si::electric_current::ampere;
use uom::si::f64::ElectricCurrent;

pub const STALL: Rule = Rule {
    id: "driver/stall",
    severity: Severity::Error,
    summary: "a motor's stall current exceeds its driver channel's peak rating",
    doc: RuleDoc {
        what: "The current each motor draws when stalled — its stall current scaled to the voltage its driver actually applies (supply less the bridge drop) — against the driver channel's `channel_peak`.",
        why: "Every start is a stall for a few tens of milliseconds, and a jammed wheel is a stall for as long as it lasts: a driver whose peak rating is below the stall current trips, or burns out, at exactly the moment the robot needs torque.",
        example: "railcheck: 1\nname: orchard scout, wheel drive\nparts:\n  pack:  { use: battery/lipo-3s, with: { cutoff: true } }\n  fuse:  { use: fuse/blade-10a }\n  estop: { use: switch/estop-20a }\n  drive: { use: driver/bipolar-dual-2a }   # 3 A peak per channel, 2 V bridge drop\n  left:  { use: motor/gearmotor-medium }   # 12 V / 5 A = 2.4 ohm: stalls at (12.6 V − 2 V) / 2.4 ohm ≈ 4.4 A > 3 A\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, estop.a]\n  VMOT:  [estop.b, drive.vm]\n  GND:   [pack.neg, drive.gnd]\n  M1A:   [drive.out1a, left.a]\n  M1B:   [drive.out1b, left.b]\n",
        fix: "railcheck: 1\nname: orchard scout, wheel drive\nparts:\n  pack:  { use: battery/lipo-3s, with: { cutoff: true } }\n  fuse:  { use: fuse/blade-10a }\n  estop: { use: switch/estop-20a }\n  drive: { use: driver/mosfet-dual-hbridge }   # 30 A peak per channel, 2 × 5 mohm\n  left:  { use: motor/gearmotor-medium }   # 12 V / 5 A = 2.4 ohm: stalls at 12.6 V / 2.41 ohm = 5.2 A < 30 A\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, estop.a]\n  VMOT:  [estop.b, drive.vm]\n  GND:   [pack.neg, drive.gnd]\n  M1A:   [drive.out1a, left.a]\n  M1B:   [drive.out1b, left.b]\n",
        references: "Stall current I = V / R_winding (brushed DC motor equation with zero back-EMF; worked example: 12 V across 1.5 Ω stalls at 8.00 A, 6.67 A through a 2 V bipolar bridge) and start-up inrush equal to stall; driver peak ≥ stall, common practice.",
    },
    needs_operating_point: true,
    check: check_stall,
};

fn check_stall(cx: &Context, out: &mut Vec<Finding>) {
    let plan = cx.plan;
    for (driver_id, driver_part) in plan.parts.iter().enumerate() {
        let Class::Driver(spec) = &driver_part.class else {
            continue;
        };
        let Some(peak) = spec.channel_peak else {
            continue;
        };
        for channel in &spec.channels {
            let number = channel.number;
            // Motors in parallel on one channel add up (Kirchhoff's current law).
            let motors: &[usize] = cx
                .circuit
                .channel_motors
                .get(&(driver_id, number))
                .map_or(&[], Vec::as_slice);
            let Some(&first) = motors.first() else {
                continue;
            };
            let stalled = |p: &crate::analysis::OperatingPoint| {
                let any_stalled = motors
                    .iter()
                    .any(|&m| p.motors[m].is_some_and(|m| m.state == MotorState::Stall));
                any_stalled
                    .then(|| p.channels[driver_id].iter().find(|(n, _)| *n == number))
                    .flatten()
                    .map(|(_, i)| i.get::<ampere>())
            };
            let Some((point, stall)) = worst_point(cx.points(), stalled) else {
                continue;
            };
            cx.margin(
                Margin::below(
                    RatingKind::DriverPeak,
                    STALL.id,
                    stall,
                    peak.value.get::<ampere>(),
                    Unit::Ampere,
                ),
                |m| {
                    m.at(&format!("{} channel {number}", driver_part.name))
                        .at_point(plan, point)
                },
            );
            if !exceeds(stall, peak.value.get::<ampere>()) {
                continue;
            }
            let Some(motor) = point.motors[first] else {
                continue;
            };
            let motor_part = &plan.parts[first];
            let span = motor_part
                .pin("a")
                .and_then(|p| motor_part.pins[p].net_span)
                .unwrap_or(motor_part.span);
            let who = if motors.len() == 1 {
                format!("`{}` stalls at", motor_part.name)
            } else {
                let names: Vec<String> = motors
                    .iter()
                    .map(|&m| format!("`{}`", plan.parts[m].name))
                    .collect();
                format!("{} in parallel stall at", names.join(" and "))
            };
            let mut finding = Finding::new(
                &STALL,
                span,
                format!(
                    "{who} {} ({} across the winding {}); `{}` channel {number} peak rating is {}",
                    show_current(ElectricCurrent::new::<ampere>(stall)),
                    show_voltage(motor.voltage),
                    mode_label(plan, point.mode, point.battery),
                    driver_part.name,
                    show_current(peak.value)
                ),
            )
            .label(peak.span, "peak rating")
            .at_point(plan, point)
            .help("use a driver whose channel peak covers the stall current, or one with current limiting set below its peak")
            .value("stall_current", stall)
            .value("voltage", motor.voltage.get::<uom::si::electric_potential::volt>())
            .value("channel_peak", peak.value.get::<ampere>());
            for &m in motors {
                finding = finding.part(&plan.parts[m].name);
            }
            out.push(finding.part(&driver_part.name));
        }
    }
}
