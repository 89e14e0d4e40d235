//! Batteries: the peak current drawn from each pack against its maximum
//! discharge rating, and lithium packs with no low-voltage cut-off.
//!
//! Not for the pack's voltage window (that is `analysis`) nor for runtime
//! (that is `budget`).

use super::{
    Context, Finding, Margin, RatingKind, Rule, RuleDoc, Severity, Unit, exceeds, mode_label,
    show_contributors, worst_point,
};
use crate::model::Class;
use crate::units::{DischargeRate, show_charge, show_current};
use uom::si::electric_charge::ampere_hour;
use uom::si::electric_current::ampere;
use uom::si::f64::ElectricCurrent;

pub const DISCHARGE: Rule = Rule {
    id: "battery/discharge",
    severity: Severity::Error,
    summary: "total peak current above the battery's maximum discharge",
    doc: RuleDoc {
        what: "The total current out of each battery at its highest over every mode and battery state, `worst` included (every load at peak, every motor stalled), against its `max_discharge`: a current, or a C-rate times `capacity`.",
        why: "A pack driven past its discharge rating sags hard, heats, and ages fast; a lithium pack can swell or vent. The sag can also brown out the electronics just as the motors start.",
        example: "railcheck: 1\nname: orchard platform winch\nparts:\n  pack:  { use: battery/lipo-3s, with: { capacity: 2200 mAh, max_discharge: 25C, cutoff: true } }   # 25 × 2.2 Ah = 55 A\n  fuse:  { use: fuse/blade-20a, with: { speed: slow } }\n  winch: { class: load, pins: { vin: { role: supply-in, range: 7 V..13 V, draw: { typical: 10 A, peak: 60 A } }, gnd: { role: ground } } }   # 60 A > 55 A\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, winch.vin]\n  GND:   [pack.neg, winch.gnd]\n",
        fix: "railcheck: 1\nname: orchard platform winch\nparts:\n  pack:  { use: battery/lipo-3s, with: { capacity: 2200 mAh, max_discharge: 35C, cutoff: true } }   # 35 × 2.2 Ah = 77 A\n  fuse:  { use: fuse/blade-20a, with: { speed: slow } }\n  winch: { class: load, pins: { vin: { role: supply-in, range: 7 V..13 V, draw: { typical: 10 A, peak: 60 A } }, gnd: { role: ground } } }   # 60 A ≤ 77 A\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, winch.vin]\n  GND:   [pack.neg, winch.gnd]\n",
        references: "C-rate: I = C-rate × rated capacity (IEC 61434 reference current 'It'; worked example: 2.2 Ah at 25C gives 55.0 A); discharge within the labelled rating, common practice; peak current per the format reference §6.",
    },
    needs_operating_point: true,
    check: check_discharge,
};

pub const NO_CUTOFF: Rule = Rule {
    id: "battery/no-cutoff",
    severity: Severity::Warning,
    summary: "lithium battery with no low-voltage cutoff",
    doc: RuleDoc {
        what: "Whether each lithium battery (`lipo`, `li-ion`, `lifepo4`) declares `cutoff: true`: a low-voltage cut-off or protection board that disconnects it before its cells are over-discharged.",
        why: "A robot left running drains its pack below the cells' discharge floor; an over-discharged lithium cell is damaged, and recharging it risks internal shorts, swelling and fire. The loads keep drawing long after the robot has stopped moving.",
        example: "railcheck: 1\nname: orchard soil logger\nparts:\n  pack:   { use: battery/lipo-3s }   # cutoff: false, no protection board\n  fuse:   { use: fuse/blade-3a }\n  logger: { class: load, pins: { vin: { role: supply-in, range: 8 V..18 V, draw: 400 mA }, gnd: { role: ground } } }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, logger.vin]\n  GND:   [pack.neg, logger.gnd]\n",
        fix: "railcheck: 1\nname: orchard soil logger\nparts:\n  pack:   { use: battery/lipo-3s, with: { cutoff: true } }   # a cut-off board fitted\n  fuse:   { use: fuse/blade-3a }\n  logger: { class: load, pins: { vin: { role: supply-in, range: 8 V..18 V, draw: 400 mA }, gnd: { role: ground } } }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, logger.vin]\n  GND:   [pack.neg, logger.gnd]\n",
        references: "Recommended discharge cut-off 3.0 V per Li-ion/LiPo cell and 2.5 V per LiFePO4 cell, with the cells' absolute floor below that (Linden & Reddy, Handbook of Batteries).",
    },
    needs_operating_point: false,
    check: check_no_cutoff,
};

fn check_discharge(cx: &Context, out: &mut Vec<Finding>) {
    let plan = cx.plan;
    for (part_id, part) in plan.parts.iter().enumerate() {
        let Class::Battery(battery) = &part.class else {
            continue;
        };
        let (Some(rate), Some(limit)) = (battery.max_discharge, battery.max_discharge_current())
        else {
            continue;
        };
        let Some((point, peak)) = worst_point(cx.points(), |p| {
            p.batteries[part_id].map(|b| b.current.get::<ampere>())
        }) else {
            continue;
        };
        cx.margin(
            Margin::below(
                RatingKind::BatteryDischarge,
                DISCHARGE.id,
                peak,
                limit.get::<ampere>(),
                Unit::Ampere,
            ),
            |m| m.at(&part.name).at_point(plan, point),
        );
        if !exceeds(peak, limit.get::<ampere>()) {
            continue;
        }
        let how = match (rate.value, battery.capacity) {
            (DischargeRate::CRate(c), Some(capacity)) => {
                format!(" ({c}C × {})", show_charge(capacity.value))
            }
            _ => String::new(),
        };
        // Point at `max_discharge` where the plan writes it, else the part.
        let span = if rate.span.source == part.span.source {
            rate.span
        } else {
            part.span
        };
        let total = ElectricCurrent::new::<ampere>(peak);
        let pos_net = part.pin("pos").and_then(|p| part.pins[p].net);
        let made_of = pos_net
            .map(|net| cx.loads_below(net, point))
            .filter(|loads| !loads.is_empty())
            .map(|loads| format!(": {}", show_contributors(&loads, total)))
            .unwrap_or_default();
        let mut finding = Finding::new(
            &DISCHARGE,
            span,
            format!(
                "`{}` delivers {} peak {}; its maximum discharge is {}{how}{made_of}",
                part.name,
                show_current(total),
                mode_label(plan, point.mode, point.battery),
                show_current(limit)
            ),
        )
        .at_point(plan, point)
        .help("use a pack with a higher discharge rating (C-rate or capacity), or keep the motors from stalling together (current limiting in the drivers)")
        .part(&part.name)
        .value("current", peak)
        .value("max_discharge", limit.get::<ampere>());
        if let Some(capacity) = battery.capacity {
            finding = finding.value("capacity", capacity.value.get::<ampere_hour>());
        }
        if let Some(net) = part.pin("pos").and_then(|p| part.pins[p].net) {
            finding = finding.net(cx.net_name(net));
        }
        out.push(finding);
    }
}

fn check_no_cutoff(cx: &Context, out: &mut Vec<Finding>) {
    for part in &cx.plan.parts {
        let Class::Battery(battery) = &part.class else {
            continue;
        };
        if !battery.chemistry.is_lithium() || battery.cutoff {
            continue;
        }
        out.push(
            Finding::new(
                &NO_CUTOFF,
                part.span,
                format!(
                    "`{}` is a {} pack with no low-voltage cut-off: left running, the loads drain its cells below their discharge floor",
                    part.name,
                    battery.pack_name()
                ),
            )
            .help("fit a low-voltage cut-off or a protection board (or a battery monitor that switches the load off) and write `cutoff: true`")
            .part(&part.name),
        );
    }
}
