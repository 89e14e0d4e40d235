//! Regulator heat: the power each regulator turns into heat at its hottest
//! continuous operating point, and the junction temperature that follows from
//! its `theta_ja`, against its `tj_max`.
//!
//! Not for the current a regulator delivers (`current/*`) nor for its input
//! falling below output plus dropout (`regulator/dropout`). The dissipation
//! follows the textbook formulas (conservation of energy, thermal Ohm's law), not the operating point's energy
//! balance, so the numbers match the published worked examples.

use super::{
    Context, Finding, Rule, RuleDoc, Severity, continuous, exceeds, mode_label, worst_point,
};
use crate::analysis::RegulatorPoint;
use crate::model::{Regulator, Topology};
use crate::units::{
    show_current, show_power, show_temperature, show_thermal_resistance, show_voltage,
};
use uom::si::electric_current::ampere;
use uom::si::electric_potential::volt;
use uom::si::f64::{
    ElectricCurrent, Power, TemperatureInterval, ThermalResistance, ThermodynamicTemperature,
};
use uom::si::power::watt;
use uom::si::ratio::ratio;
use uom::si::temperature_interval::kelvin as kelvin_interval;
use uom::si::thermodynamic_temperature::{degree_celsius, kelvin};

pub const OVERHEAT: Rule = Rule {
    id: "thermal/overheat",
    severity: Severity::Error,
    summary: "regulator junction temperature above tj_max",
    doc: RuleDoc {
        what: "The junction temperature of each regulator that gives `theta_ja`, at its hottest continuous point (the `typical` mode and the user's modes, never `worst`, at every battery state): Tj = ambient + P × θJA, with P = (Vin − Vout) × Iout + Vin × Iq for a linear regulator and P = Pout × (1/η − 1) for a switching one. The finding gives Tj, how far it is over `tj_max`, and the largest load current that would keep Tj at `tj_max`.",
        why: "A linear regulator burns the whole input-to-output difference as heat: 12 V down to 5 V at half an ampere is 3.5 W, far more than a bare package can shed. Past its maximum junction temperature the regulator shuts down on its thermal protection — the electronics reset mid-run — or ages and fails.",
        example: "railcheck: 1\nname: greenhouse lamp driver\nambient: 25 degC\nparts:\n  pack: { class: battery, chemistry: lead-acid, voltage: 12 V }\n  fuse: { use: fuse/blade-1a }\n  reg:  { class: regulator, topology: linear, output: 5 V, quiescent: 5 mA, theta_ja: 50 degC/W }\n  lamp: { class: load, pins: { vin: { role: supply-in, draw: 0.5 A }, gnd: { role: ground } } }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, reg.vin]\n  5V:    [reg.vout, lamp.vin]\n  GND:   [pack.neg, reg.gnd, lamp.gnd]\n# P = 7 V × 0.5 A + 12 V × 5 mA = 3.56 W; Tj = 25 + 3.56 × 50 = 203 °C > 125 °C\n",
        fix: "railcheck: 1\nname: greenhouse lamp driver\nambient: 25 degC\nparts:\n  pack: { class: battery, chemistry: lead-acid, voltage: 12 V }\n  fuse: { use: fuse/blade-1a }\n  reg:  { class: regulator, topology: buck, output: 5 V, efficiency: 90 %, quiescent: 5 mA, theta_ja: 50 degC/W }\n  lamp: { class: load, pins: { vin: { role: supply-in, draw: 0.5 A }, gnd: { role: ground } } }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, reg.vin]\n  5V:    [reg.vout, lamp.vin]\n  GND:   [pack.neg, reg.gnd, lamp.gnd]\n# P = 2.5 W × (1/0.9 − 1) = 0.28 W; Tj = 25 + 0.28 × 50 = 39 °C (or keep the linear one on a heatsink: θJA = θJC + θCS + θSA)\n",
        references: "Linear dissipation P = (Vin − Vout)·Iout + Vin·Iq, switching loss Pout·(1/η − 1) (conservation of energy), Tj = Ta + P·θJA (thermal Ohm's law) and the largest load (Tj_max − Ta)/(θJA·(Vin − Vout)); worked examples: 12 V → 5 V at 0.5 A with θJA 50 °C/W reaches 203 °C, 7.4 V → 5 V at 0.3 A with θJA 60 °C/W at 40 °C reaches 83.2 °C; θJA is measured in the JEDEC JESD51-2 still-air box.",
    },
    needs_operating_point: true,
    check: check_overheat,
};

pub const UNRATED: Rule = Rule {
    id: "thermal/unrated",
    severity: Severity::Note,
    summary: "a regulator dissipates power but has no theta_ja",
    doc: RuleDoc {
        what: "A regulator that turns power into heat in some continuous mode (P > 0 by the same formulas as `thermal/overheat`) but has no `theta_ja`: its junction temperature cannot be checked. The note gives the largest dissipation and where it happens.",
        why: "Without the package's thermal resistance the heat check is silently skipped; a few watts in a small package is enough to trip its thermal shutdown.",
        example: "railcheck: 1\nname: lab sensor hub\nparts:\n  pack: { class: battery, chemistry: lead-acid, voltage: 12 V }\n  fuse: { use: fuse/blade-1a }\n  reg:  { class: regulator, topology: linear, output: 5 V }   # no theta_ja; P = 7 V × 0.2 A = 1.4 W\n  hub:  { class: load, pins: { vin: { role: supply-in, draw: 0.2 A }, gnd: { role: ground } } }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, reg.vin]\n  5V:    [reg.vout, hub.vin]\n  GND:   [pack.neg, reg.gnd, hub.gnd]\n",
        fix: "railcheck: 1\nname: lab sensor hub\nparts:\n  pack: { class: battery, chemistry: lead-acid, voltage: 12 V }\n  fuse: { use: fuse/blade-1a }\n  reg:  { class: regulator, topology: linear, output: 5 V, theta_ja: 50 degC/W, tj_max: 125 degC }   # TO-220, no heatsink: Tj = 25 + 1.4 × 50 = 95 °C\n  hub:  { class: load, pins: { vin: { role: supply-in, draw: 0.2 A }, gnd: { role: ground } } }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, reg.vin]\n  5V:    [reg.vout, hub.vin]\n  GND:   [pack.neg, reg.gnd, hub.gnd]\n",
        references: "Dissipation formulas: conservation of energy, Tj = Ta + P·θJA (thermal Ohm's law). Typical θJA per package (TO-220 50–65, SOT-223 ≈ 60 with 5 cm² of copper, SOT-23 200–400 °C/W) are common practice.",
    },
    needs_operating_point: true,
    check: check_unrated,
};

/// Heat a regulator turns out at one point (energy balance and thermal Ohm's law): linear
/// P = (Vin − Vout)·Iout + Vin·Iq; switching P = Pout·(1/η − 1).
fn dissipation(spec: &Regulator, at: &RegulatorPoint) -> Power {
    let zero = Power::new::<watt>(0.0);
    let heat = match spec.topology {
        Topology::Linear => {
            (at.input_voltage - at.output_voltage) * at.output_current
                + at.input_voltage * spec.quiescent
        }
        Topology::Buck | Topology::Boost | Topology::BuckBoost => {
            let efficiency = spec.efficiency.get::<ratio>();
            if efficiency <= 0.0 {
                return zero;
            }
            let output: Power = at.output_voltage * at.output_current;
            output * (1.0 / efficiency - 1.0)
        }
    };
    heat.max(zero)
}

/// What the heat check concluded at one point.
#[derive(Clone, Copy, Debug, PartialEq)]
struct Heat {
    dissipation: Power,
    junction: ThermodynamicTemperature,
    /// `tj_max` − Tj: negative when over.
    margin: TemperatureInterval,
    /// The largest load current that keeps Tj at `tj_max`; `None` when the
    /// load does not heat the regulator (no drop, or a lossless converter).
    largest_load: Option<ElectricCurrent>,
}

/// Tj = Ta + P·θJA, and the load current that would put Tj at `tj_max`:
/// linear (Tj_max − Ta)/(θJA·(Vin − Vout)) ignoring Iq, switching
/// (Tj_max − Ta)/(θJA·Vout·(1/η − 1)) (energy balance and thermal Ohm's law).
fn heat(
    spec: &Regulator,
    at: &RegulatorPoint,
    theta_ja: ThermalResistance,
    ambient: ThermodynamicTemperature,
) -> Heat {
    let dissipation = dissipation(spec, at);
    let rise: TemperatureInterval = dissipation * theta_ja;
    let junction = ambient + rise;
    let margin = TemperatureInterval::new::<kelvin_interval>(
        spec.tj_max.get::<kelvin>() - junction.get::<kelvin>(),
    );
    let headroom = TemperatureInterval::new::<kelvin_interval>(
        (spec.tj_max.get::<kelvin>() - ambient.get::<kelvin>()).max(0.0),
    );
    let allowed: Power = headroom / theta_ja;
    // Volts of heat per ampere of load.
    let per_ampere = match spec.topology {
        Topology::Linear => (at.input_voltage - at.output_voltage).get::<volt>(),
        Topology::Buck | Topology::Boost | Topology::BuckBoost => {
            let efficiency = spec.efficiency.get::<ratio>();
            if efficiency > 0.0 {
                at.output_voltage.get::<volt>() * (1.0 / efficiency - 1.0)
            } else {
                0.0
            }
        }
    };
    let largest_load = (per_ampere > 0.0)
        .then(|| ElectricCurrent::new::<ampere>(allowed.get::<watt>() / per_ampere));
    Heat {
        dissipation,
        junction,
        margin,
        largest_load,
    }
}

fn celsius(t: ThermodynamicTemperature) -> f64 {
    t.get::<degree_celsius>()
}

fn interval(t: TemperatureInterval) -> String {
    show_temperature(ThermodynamicTemperature::new::<degree_celsius>(
        t.get::<kelvin_interval>(),
    ))
}

fn check_overheat(cx: &Context, out: &mut Vec<Finding>) {
    let plan = cx.plan;
    for (part_id, part) in plan.parts.iter().enumerate() {
        let crate::model::Class::Regulator(spec) = &part.class else {
            continue;
        };
        let Some(theta_ja) = spec.theta_ja else {
            continue;
        };
        let Some((point, _)) = worst_point(cx.points().filter(continuous), |p| {
            p.regulators[part_id].map(|r| dissipation(spec, &r).get::<watt>())
        }) else {
            continue;
        };
        let Some(at) = point.regulators[part_id] else {
            continue;
        };
        let found = heat(spec, &at, theta_ja, plan.ambient);
        if !exceeds(found.junction.get::<kelvin>(), spec.tj_max.get::<kelvin>()) {
            continue;
        }
        let over = -found.margin;
        let largest = match found.largest_load {
            Some(i) => format!(
                "; at most {} of load keeps it at {}",
                show_current(i),
                show_temperature(spec.tj_max)
            ),
            None => String::new(),
        };
        let how = match spec.topology {
            Topology::Linear => format!(
                "{} down to {} at {}",
                show_voltage(at.input_voltage),
                show_voltage(at.output_voltage),
                show_current(at.output_current)
            ),
            _ => format!(
                "{} out at {} efficiency",
                show_power(at.output_voltage * at.output_current),
                crate::units::show_share(spec.efficiency)
            ),
        };
        let mut finding = Finding::new(
            &OVERHEAT,
            part.span,
            format!(
                "`{}` junction reaches {} {}: {} of heat ({how}) through {} adds {} to the {} ambient, {} over its {} maximum{largest}",
                part.name,
                show_temperature(found.junction),
                mode_label(plan, point.mode, point.battery),
                show_power(found.dissipation),
                show_thermal_resistance(theta_ja),
                interval(found.dissipation * theta_ja),
                show_temperature(plan.ambient),
                interval(over),
                show_temperature(spec.tj_max),
            ),
        )
        .at_point(plan, point)
        .help(match spec.topology {
            Topology::Linear => "fit a heatsink (θJA becomes θJC + θCS + θSA), lower the input voltage, move load off this rail, or use a switching regulator",
            _ => "fit a heatsink or more copper (a lower `theta_ja`), move load off this rail, or choose a more efficient converter",
        })
        .part(&part.name)
        .value("junction", celsius(found.junction))
        .value("tj_max", celsius(spec.tj_max))
        .value("margin", found.margin.get::<kelvin_interval>())
        .value("ambient", celsius(plan.ambient))
        .value("power", found.dissipation.get::<watt>())
        .value("input_voltage", at.input_voltage.get::<volt>())
        .value("output_voltage", at.output_voltage.get::<volt>())
        .value("current", at.output_current.get::<ampere>());
        if let Some(i) = found.largest_load {
            finding = finding.value("max_current", i.get::<ampere>());
        }
        if let Some(net) = part.pin("vout").and_then(|p| part.pins[p].net) {
            finding = finding.net(cx.net_name(net));
        }
        out.push(finding);
    }
}

fn check_unrated(cx: &Context, out: &mut Vec<Finding>) {
    let plan = cx.plan;
    for (part_id, part) in plan.parts.iter().enumerate() {
        let crate::model::Class::Regulator(spec) = &part.class else {
            continue;
        };
        if spec.theta_ja.is_some() {
            continue;
        }
        let Some((point, watts)) = worst_point(cx.points().filter(continuous), |p| {
            p.regulators[part_id].map(|r| dissipation(spec, &r).get::<watt>())
        }) else {
            continue;
        };
        if !exceeds(watts, 0.0) {
            continue;
        }
        out.push(
            Finding::new(
                &UNRATED,
                part.span,
                format!(
                    "`{}` turns up to {} into heat {}, but has no `theta_ja`: its junction temperature is not checked",
                    part.name,
                    show_power(Power::new::<watt>(watts)),
                    mode_label(plan, point.mode, point.battery),
                ),
            )
            .at_point(plan, point)
            .help("add `theta_ja` (and `tj_max` if not 125 °C) for the package as mounted: about 50 °C/W for a TO-220 with no heatsink, 60 °C/W for a SOT-223 on 5 cm² of copper")
            .part(&part.name)
            .value("power", watts),
        );
    }
}
