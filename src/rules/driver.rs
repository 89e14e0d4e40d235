//! Motor drivers against the motors they drive: stall current against the
//! channel's peak rating.

use super::{Context, Finding, Rule, RuleDoc, Severity, exceeds, mode_label, worst_point};
use crate::graph::MotorFeed;
use crate::model::{Class, MotorState};
use crate::units::{show_current, show_voltage};
use uom::si::electric_current::ampere;

pub const STALL: Rule = Rule {
    id: "driver/stall",
    severity: Severity::Error,
    summary: "a motor's stall current exceeds its driver channel's peak rating",
    doc: RuleDoc {
        what: "The current each motor draws when stalled — its stall current scaled to the voltage its driver actually applies (supply less the bridge drop) — against the driver channel's `channel_peak`.",
        why: "Every start is a stall for a few tens of milliseconds, and a jammed wheel is a stall for as long as it lasts: a driver whose peak rating is below the stall current trips, or burns out, at exactly the moment the robot needs torque.",
        example: "parts:\n  drive: { use: driver/bipolar-dual-2a }     # 3 A peak per channel\n  left:  { use: motor/gearmotor-medium }     # stalls at several amperes on 12 V",
        fix: "parts:\n  drive: { use: driver/mosfet-dual-hbridge } # 30 A peak per channel",
        references: "Stall current I = V / R_winding and start-up inrush equal to stall (reference sheet §8, W11); driver peak ≥ stall, common practice.",
    },
    needs_operating_point: true,
    check: check_stall,
};

fn check_stall(cx: &Context, out: &mut Vec<Finding>) {
    for (motor_id, feed) in cx.circuit.motor_feed.iter().enumerate() {
        let Some(MotorFeed::Driver { driver, channel }) = *feed else {
            continue;
        };
        let Class::Driver(spec) = &cx.plan.parts[driver].class else {
            continue;
        };
        let Some(peak) = spec.channel_peak else {
            continue;
        };
        let Some((point, stall)) = worst_point(cx.points(), |p| {
            p.motors[motor_id]
                .filter(|m| m.state == MotorState::Stall)
                .map(|m| m.current.get::<ampere>())
        }) else {
            continue;
        };
        if !exceeds(stall, peak.value.get::<ampere>()) {
            continue;
        }
        let Some(motor) = point.motors[motor_id] else {
            continue;
        };
        let motor_part = &cx.plan.parts[motor_id];
        let driver_part = &cx.plan.parts[driver];
        let span = motor_part
            .pin("a")
            .and_then(|p| motor_part.pins[p].net_span)
            .unwrap_or(motor_part.span);
        out.push(
            Finding::new(
                &STALL,
                span,
                format!(
                    "`{}` stalls at {} ({} across the winding {}); `{}` channel {channel} peak rating is {}",
                    motor_part.name,
                    show_current(motor.current),
                    show_voltage(motor.voltage),
                    mode_label(cx.plan, point.mode, point.battery),
                    driver_part.name,
                    show_current(peak.value)
                ),
            )
            .label(peak.span, "peak rating")
            .at_point(cx.plan, point)
            .help("use a driver whose channel peak covers the stall current, or one with current limiting set below its peak")
            .part(&motor_part.name)
            .part(&driver_part.name)
            .value("stall_current", stall)
            .value("voltage", motor.voltage.get::<uom::si::electric_potential::volt>())
            .value("channel_peak", peak.value.get::<ampere>()),
        );
    }
}
