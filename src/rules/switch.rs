//! Switches and stop switches against the circuit they break: a contact
//! rated below the voltage it must interrupt can hold an arc when it opens.
//! Their current ratings are checked with the other rated paths in
//! `current`.

use super::fuse::circuit_voltage;
use super::{Context, Finding, Rule, RuleDoc, Severity, exceeds};
use crate::model::Class;
use crate::units::show_voltage;
use uom::si::electric_potential::volt;

pub const VOLTAGE: Rule = Rule {
    id: "switch/voltage",
    severity: Severity::Error,
    summary: "switch or stop rated below the DC voltage it must break",
    doc: RuleDoc {
        what: "Each switch's `voltage` rating (stop switches included) against the highest voltage it may have to break: the full-charge open-circuit voltage of the battery whose wiring it sits in (cells × the chemistry's full voltage, or the top of an explicit `voltage:` window), or the highest output of the regulator or board that feeds its rail — the same voltage a fuse there must break.",
        why: "Opening a DC circuit draws an arc that, unlike on AC, does not go out by itself at a zero crossing; a contact rated for less than the circuit's voltage may keep arcing, weld or burn — and a stop switch that cannot break its circuit does not stop the robot.",
        example: "railcheck: 1\nname: orchard mower, 6S\nparts:\n  pack:  { use: battery/lipo-6s, with: { cutoff: true } }\n  fuse:  { use: fuse/blade-20a }\n  estop: { use: switch/estop-20a }   # rated 24 V DC, the 6S pack is 25.2 V full\n  lamp:  { class: load, pins: { vin: { role: supply-in, range: 18..26 V, draw: 0.5 A }, gnd: { role: ground } } }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, estop.a]\n  LIT:   [estop.b, lamp.vin]\n  GND:   [pack.neg, lamp.gnd]\n",
        fix: "railcheck: 1\nname: orchard mower, 6S\nparts:\n  pack:  { use: battery/lipo-6s, with: { cutoff: true } }\n  fuse:  { use: fuse/blade-20a }\n  estop: { use: switch/estop-20a, with: { voltage: 48 V } }   # a stop rated 48 V DC\n  lamp:  { class: load, pins: { vin: { role: supply-in, range: 18..26 V, draw: 0.5 A }, gnd: { role: ground } } }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, estop.a]\n  LIT:   [estop.b, lamp.vin]\n  GND:   [pack.neg, lamp.gnd]\n",
        references: "A switching device's rated operational voltage must be at least the circuit's: IEC 60947-1 §4.3.1.1 (rated operational voltage) and the DC utilisation categories of IEC 60947-3 (from memory); the battery's full-charge voltage from the per-cell windows of the format reference §3.",
    },
    needs_operating_point: false,
    check: check_voltage,
};

fn check_voltage(cx: &Context, out: &mut Vec<Finding>) {
    for (part_id, part) in cx.plan.parts.iter().enumerate() {
        let Class::Switch(switch) = &part.class else {
            continue;
        };
        let Some(rated) = switch.voltage else {
            continue;
        };
        let Some((circuit, what)) = circuit_voltage(cx, part_id) else {
            continue;
        };
        if !exceeds(circuit.get::<volt>(), rated.value.get::<volt>()) {
            continue;
        }
        let span = cx.rated_span(&rated, part_id);
        let kind = if switch.stop { "stop switch" } else { "switch" };
        let mut finding = Finding::new(
            &VOLTAGE,
            span,
            format!(
                "{kind} `{}` is rated {} DC, below {what} ({}) that it must break when it opens",
                part.name,
                show_voltage(rated.value),
                show_voltage(circuit)
            ),
        )
        .help(format!(
            "use a {kind} rated for at least {} DC (an AC rating says little about breaking a DC arc)",
            show_voltage(circuit)
        ))
        .part(&part.name)
        .value("voltage_rating", rated.value)
        .value("circuit_voltage", circuit);
        if let Some(net) = part.pins.iter().find_map(|p| p.net) {
            finding = finding.net(cx.net_name(net));
        }
        out.push(finding);
    }
}
