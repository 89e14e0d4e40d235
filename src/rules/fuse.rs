//! Fuses: one at the head of every battery positive, sized between the load
//! it carries and the wires it protects, rated for the voltage it must break,
//! and slow enough not to blow at every motor start.
//!
//! Placement (`fuse/missing`): the walk from each battery positive may pass
//! only connector contacts (the pack's own plug, part of its lead) before it
//! meets a fuse or a fuse block; a switch or any other part ahead of the fuse,
//! a load, or a branch to anything but fuses is reported.
//!
//! Sizing follows the usual order (NEC 210.20(A), NEC 240.4, 33 CFR 183.455): I_min = 1.25 × the
//! continuous current (NEC 210.20(A)); the smallest standard blade rating at
//! or above it; that rating no higher than the ampacity of any wire it
//! protects (NEC 240.4, ampacity per the format reference §4 — the 33 CFR
//! 183.455(c) 150 % allowance for boats is not applied). Every finding ends
//! with that suggestion. Not for the wires themselves: `wire/ampacity` checks
//! a wire against the current it carries.
//!
//! What a fuse protects: the supply-side nets below it in its electrical node
//! (its load-side net and everything hanging under it through switches and
//! connector contacts), stopping at the next fuse down, which protects what
//! lies beyond it; and the return conductors of the loads fed from those
//! nets — each load's ground net and every ground net above it up to the
//! battery negative — since a fault at a load comes back through them. Nets
//! past a converter (regulator, driver, board output), and the grounds of the
//! loads that converter feeds, are not counted: their current is set by that
//! converter, not by this fuse.

use super::{
    Context, Finding, Margin, RatingKind, Rule, RuleDoc, Severity, Unit, continuous, exceeds,
    mode_label, worst_point,
};
use crate::analysis::{BatteryState, ModeId, OperatingPoint, battery_voltage};
use crate::graph::{MotorFeed, through_pairs};
use crate::model::{Class, Fuse, FuseSpeed, MotorState, NetId, PartId, PinRef, PinRole};
use crate::units::{WireSize, show_current, show_duration, show_share, show_voltage};
use crate::wire::{AmpacityTable, ampacity_at};
use uom::si::electric_current::ampere;
use uom::si::electric_potential::volt;
use uom::si::f64::{ElectricCurrent, ElectricPotential, Ratio, ThermodynamicTemperature, Time};
use uom::si::ratio::ratio;
use uom::si::time::second;

pub const MISSING: Rule = Rule {
    id: "fuse/missing",
    severity: Severity::Error,
    summary: "no fuse between the battery positive and the first load or branch",
    doc: RuleDoc {
        what: "Follows each battery's positive terminal along its wiring: the first element it meets must be a fuse. Only the contacts of a connector (the pack's own plug, part of its lead) may come before it; a fuse block (several fuses side by side on the battery lead, or behind the plug) counts as fused. A switch or any other part in series ahead of the fuse is reported (the wire and the switch ahead of the fuse are unprotected), and so is a load, or a net where the wiring splits to anything but fuses, reached before any fuse.",
        why: "A lithium or lead-acid pack can deliver hundreds of amperes into a short (Ohm's law worked example: 12.6 V through an assumed 10 mΩ pack and 2 m of 14 AWG gives 474 A). Without a fuse at the source, a chafed wire or a slipped probe heats the wiring until its insulation melts or burns.",
        example: "railcheck: 1\nname: greenhouse sprayer lamp\nparts:\n  pack: { use: battery/lead-acid-12v }\n  lamp: { use: load/lamp-12v }\nnets:\n  VBAT: [pack.pos, lamp.vin]   # the lamp hangs straight on the pack\n  GND: [pack.neg, lamp.gnd]",
        fix: "railcheck: 1\nname: greenhouse sprayer lamp\nparts:\n  pack: { use: battery/lead-acid-12v }\n  main_fuse: { use: fuse/blade-1a }   # first on the battery positive; 1.25 x 0.4 A = 0.5 A\n  lamp: { use: load/lamp-12v }\nnets:\n  BATT+: [pack.pos, main_fuse.a]\n  VBAT: [main_fuse.b, lamp.vin]\n  GND: [pack.neg, lamp.gnd]",
        references: "33 CFR 183.455(b): overcurrent protection at the source of power, or within 7 in (175 mm) along the conductor; ABYC E-11 §11.10, 7 in from the battery. Sizing: NEC 210.20(A) (125 % of continuous), NEC 240.4 (not above the wire's ampacity).",
    },
    needs_operating_point: false,
    check: check_missing,
};

pub const UNDERSIZED: Rule = Rule {
    id: "fuse/undersized",
    severity: Severity::Warning,
    summary: "rating below 125 % of the continuous current through it",
    doc: RuleDoc {
        what: "The continuous current through each fuse (the highest over `typical` and the user's modes that are not brief, never `worst`) against its rating: the rating must be at least 125 % of it (continuous load at most 80 % of the rating). Below 125 % it is a warning; below the continuous current itself (the fuse blows in normal work) an error.",
        why: "A fuse carrying close to its rating for hours runs hot and ages; it blows on an ordinary day's work, stopping the robot in the field, and a fuse that blows for no fault tempts its owner to fit a bigger one than the wire allows.",
        example: "railcheck: 1\nname: warehouse cart heater\nparts:\n  pack: { use: battery/lead-acid-12v }\n  main_fuse: { use: fuse/blade-5a }   # 4.5 A continuous needs 1.25 x 4.5 A = 5.625 A\n  heater: { class: load, pins: { vin: { role: supply-in, draw: 4.5 A }, gnd: { role: ground } } }\nnets:\n  BATT+: [pack.pos, main_fuse.a]\n  HEAT: { pins: [main_fuse.b, heater.vin], wire: 18 AWG, length: 1 m }   # 18 AWG carries 16 A\n  GND: { pins: [pack.neg, heater.gnd], wire: 18 AWG, length: 1 m }",
        fix: "railcheck: 1\nname: warehouse cart heater\nparts:\n  pack: { use: battery/lead-acid-12v }\n  main_fuse: { use: fuse/blade-7a5 }   # 5.625 A <= 7.5 A <= the 16 A of 18 AWG\n  heater: { class: load, pins: { vin: { role: supply-in, draw: 4.5 A }, gnd: { role: ground } } }\nnets:\n  BATT+: [pack.pos, main_fuse.a]\n  HEAT: { pins: [main_fuse.b, heater.vin], wire: 18 AWG, length: 1 m }   # 18 AWG carries 16 A\n  GND: { pins: [pack.neg, heater.gnd], wire: 18 AWG, length: 1 m }",
        references: "NEC 210.20(A): overcurrent device rating ≥ 125 % of the continuous load (equivalently, continuous load ≤ 80 % of the rating); continuous current per the format reference §6.",
    },
    needs_operating_point: true,
    check: check_undersized,
};

pub const OVERSIZED: Rule = Rule {
    id: "fuse/oversized",
    severity: Severity::Error,
    summary: "rating above the ampacity of a wire it protects",
    doc: RuleDoc {
        what: "Each fuse's rating against the ampacity of every wire it protects: the supply nets with a `wire:` below it in its electrical node (its load-side net and what hangs under it through switches and connectors, up to the next fuse), and the return conductors of the loads fed from those nets (each load's ground net and the ground nets above it up to the battery negative, where they have a `wire:`). Ampacity per the format reference §4 (Handbook chassis column; 33 CFR 183.425 Table 5 when `insulation:` is given for 8–18 AWG); the 150 % allowance of 33 CFR 183.455(c) is not applied.",
        why: "A fuse protects the wire, not the load. Rated above what its thinnest wire can carry, it lets a fault heat that wire past its insulation rating without ever blowing.",
        example: "railcheck: 1\nname: orchard sprayer work lamp\nparts:\n  pack: { use: battery/lead-acid-12v }\n  main_fuse: { use: fuse/blade-15a }   # 15 A > the 7 A its wire carries\n  lamp: { use: load/lamp-12v }\nnets:\n  BATT+: [pack.pos, main_fuse.a]\n  LAMP: { pins: [main_fuse.b, lamp.vin], wire: 22 AWG, length: 1 m }   # 22 AWG carries 7 A\n  GND: [pack.neg, lamp.gnd]",
        fix: "railcheck: 1\nname: orchard sprayer work lamp\nparts:\n  pack: { use: battery/lead-acid-12v }\n  main_fuse: { use: fuse/blade-5a }   # 5 A <= 7 A (or keep 15 A and run LAMP in 16 AWG, 22 A)\n  lamp: { use: load/lamp-12v }\nnets:\n  BATT+: [pack.pos, main_fuse.a]\n  LAMP: { pins: [main_fuse.b, lamp.vin], wire: 22 AWG, length: 1 m }   # 22 AWG carries 7 A\n  GND: [pack.neg, lamp.gnd]",
        references: "NEC 240.4: conductors protected at their ampacity; ampacity from the Handbook of Electronic Tables and Formulas for American Wire Gauge (chassis wiring column) and 33 CFR 183.425 Table 5; NEC 210.20(A) worked example: a 6 A continuous load takes a 7.5 A blade, too large for 22 AWG (7 A) but not for 20 AWG (11 A).",
    },
    needs_operating_point: false,
    check: check_oversized,
};

pub const VOLTAGE: Rule = Rule {
    id: "fuse/voltage",
    severity: Severity::Error,
    summary: "fuse voltage rating below the battery's full voltage",
    doc: RuleDoc {
        what: "Each fuse's `voltage` rating against the highest voltage it may have to break: the full-charge open-circuit voltage of the battery whose wiring it sits in (cells × the chemistry's full voltage, or the top of an explicit `voltage:` window), or the highest output of the regulator or board that feeds its rail.",
        why: "A fuse rated below the circuit voltage may not quench the arc when it opens: the fault current keeps flowing through the arc, and the holder can melt or burn.",
        example: "railcheck: 1\nname: orchard scout fan\nparts:\n  pack: { use: battery/lipo-3s, with: { cutoff: true } }   # 3 x 4.20 V = 12.6 V full\n  main_fuse: { class: fuse, rating: 10 A, voltage: 12 V, speed: slow }   # 12 V < 12.6 V\n  fan: { use: load/fan-12v }\nnets:\n  BATT+: [pack.pos, main_fuse.a]\n  VBAT: [main_fuse.b, fan.vin]\n  GND: [pack.neg, fan.gnd]",
        fix: "railcheck: 1\nname: orchard scout fan\nparts:\n  pack: { use: battery/lipo-3s, with: { cutoff: true } }   # 3 x 4.20 V = 12.6 V full\n  main_fuse: { class: fuse, rating: 10 A, voltage: 32 V, speed: slow }   # 32 V, as blade fuses are\n  fan: { use: load/fan-12v }\nnets:\n  BATT+: [pack.pos, main_fuse.a]\n  VBAT: [main_fuse.b, fan.vin]\n  GND: [pack.neg, fan.gnd]",
        references: "33 CFR 183.455(d) and NEC 240.60: fuse voltage rating ≥ circuit voltage; take the full-charge pack voltage (a 3S LiPo is 3 × 4.20 V = 12.6 V full, Linden & Reddy, Handbook of Batteries); blade fuses are rated 32 V or 58 V (ISO 8820-3).",
    },
    needs_operating_point: false,
    check: check_voltage,
};

pub const NUISANCE: Rule = Rule {
    id: "fuse/nuisance",
    severity: Severity::Warning,
    summary: "a fuse that a motor start or a brief mode may blow",
    doc: RuleDoc {
        what: "Each fuse against the peaks it carries. In a brief mode (`lasts` 5 s or less): the current as a multiple of the rating against the shortest time the fuse may take to open at that multiple (ISO 8820-3 blade bands for `fast`, the IEC 60127-2 time-lag sheet for `slow`); if the mode lasts that long, the fuse may blow. Over the other modes, `worst` included (every motor stalled, or `limits.stall_at_once` of them): a `fast` fuse rated below the peak, or a `slow` fuse that may open within a 100 ms motor start. A motor start is named only when a motor behind the fuse stalls at that moment.",
        why: "Every motor start is a stall for tens of milliseconds; a fast fuse rated below that current blows at start-up or the first time a wheel jams, though nothing is wrong with the wiring.",
        example: "railcheck: 1\nname: greenhouse vent opener\nparts:\n  pack: { use: battery/lead-acid-12v }   # 13.8 V full\n  vent_fuse: { use: fuse/blade-5a }   # fast; stall: 13.8 V / (2.4 + 0.025) ohm = 5.69 A\n  stop: { use: switch/estop-20a }\n  vent: { use: motor/gearmotor-medium }   # 12 V, 5 A stall: 2.4 ohm\nnets:\n  BATT+: [pack.pos, vent_fuse.a]\n  FUSED: [vent_fuse.b, stop.a]\n  VENT: [stop.b, vent.a]\n  GND: [pack.neg, vent.b]",
        fix: "railcheck: 1\nname: greenhouse vent opener\nparts:\n  pack: { use: battery/lead-acid-12v }   # 13.8 V full\n  vent_fuse: { use: fuse/blade-5a, with: { speed: slow } }   # time-delay: rides through the stall\n  stop: { use: switch/estop-20a }\n  vent: { use: motor/gearmotor-medium }   # 12 V, 5 A stall: 2.4 ohm\nnets:\n  BATT+: [pack.pos, vent_fuse.a]\n  FUSED: [vent_fuse.b, stop.a]\n  VENT: [stop.b, vent.a]\n  GND: [pack.neg, vent.b]",
        references: "Motor circuits take time-delay fuses that ride through the start-up inrush, equal to the stall current for 10–100 ms (IEC 60127 'T' characteristic, NEC Art. 430, common practice); opening-time bands per multiple of rating: ISO 8820-3 (blade fuse-links) and IEC 60127-2 standard sheet 3 (time-lag), both from memory; stall current I = V / R_winding (brushed DC motor equation).",
    },
    needs_operating_point: true,
    check: check_nuisance,
};

/// Standard blade-fuse ratings in amperes (SAE J1284 / ISO 8820-3 series).
pub const BLADE_SERIES: [f64; 13] = [
    1.0, 2.0, 3.0, 4.0, 5.0, 7.5, 10.0, 15.0, 20.0, 25.0, 30.0, 35.0, 40.0,
];

/// NEC 210.20(A): the device carries 125 % of the continuous load.
pub const CONTINUOUS_FACTOR: f64 = 1.25;

/// Blade fuses come rated 32 V or 58 V (ISO 8820-3 scope).
const BLADE_VOLTAGES: [f64; 2] = [32.0, 58.0];

/// The smallest standard blade rating that carries `minimum` and stays
/// within `ceiling` (the protected wire's ampacity), both with the format reference's
/// 0.1 % tolerance. `None` when no blade rating fits.
#[cfg(test)]
pub fn blade_rating_for(
    minimum: ElectricCurrent,
    ceiling: Option<ElectricCurrent>,
) -> Option<ElectricCurrent> {
    let minimum = amps(minimum);
    BLADE_SERIES
        .iter()
        .copied()
        .find(|&r| !exceeds(minimum, r) && ceiling.is_none_or(|c| !exceeds(r, amps(c))))
        .map(ElectricCurrent::new::<ampere>)
}

/// The rating a continuous current needs: I_min = 1.25 × I_continuous.
pub fn minimum_rating(continuous: ElectricCurrent) -> ElectricCurrent {
    continuous * CONTINUOUS_FACTOR
}

fn amps(i: ElectricCurrent) -> f64 {
    i.get::<ampere>()
}

/// Which side of the circuit a protected wire is on.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Conductor {
    /// A supply net below the fuse.
    Supply,
    /// A ground net a load below the fuse returns its current through.
    Return,
}

/// A wire a fuse protects, with its ampacity.
#[derive(Clone, Copy, Debug)]
struct WireLimit {
    net: NetId,
    size: WireSize,
    ampacity: ElectricCurrent,
    table: AmpacityTable,
    insulation: Option<ThermodynamicTemperature>,
    /// The air its ampacity is corrected for (`None`: the table's own).
    ambient: Option<ThermodynamicTemperature>,
    conductor: Conductor,
}

impl WireLimit {
    /// How a finding names the wire: "`VBAT`", or "the return conductor
    /// `GND`" for a ground net.
    fn named(&self, cx: &Context) -> String {
        match self.conductor {
            Conductor::Supply => format!("`{}`", cx.net_name(self.net)),
            Conductor::Return => format!("the return conductor `{}`", cx.net_name(self.net)),
        }
    }
}

/// The wires a fuse whose load side is `start` protects: the supply nets
/// below `start` in its node's tree (itself included), not crossing another
/// fuse, and the return path of every load fed from those nets — its ground
/// net and each net above it up to the battery negative. A fault at a load
/// drives the fuse's current out along the supply and back along that
/// return, so NEC 240.4 asks both to carry the fuse's rating. Only nets with
/// a wire whose ampacity a table gives are kept.
fn protected_wires(cx: &Context, start: NetId) -> Vec<WireLimit> {
    let plan = cx.plan;
    let mut wires = Vec::new();
    let mut seen = vec![false; plan.nets.len()];
    let mut keep = |net: NetId, conductor: Conductor, wires: &mut Vec<WireLimit>| {
        if std::mem::replace(&mut seen[net], true) {
            return false;
        }
        let n = &plan.nets[net];
        let ambient = plan.conductor_ambient(net);
        if let Some(wire) = n.wire
            && let Some((limit, table)) = ampacity_at(wire.value, n.insulation, ambient)
        {
            wires.push(WireLimit {
                net,
                size: wire.value,
                ampacity: limit,
                table,
                insulation: n.insulation,
                ambient,
                conductor,
            });
        }
        true
    };

    let mut supply_nets = Vec::new();
    let mut stack = vec![start];
    while let Some(net) = stack.pop() {
        if !keep(net, Conductor::Supply, &mut wires) {
            continue;
        }
        supply_nets.push(net);
        for &child in &cx.circuit.children[net] {
            let behind_fuse = cx.circuit.parent[child]
                .is_some_and(|p| matches!(plan.parts[p.part].class, Class::Fuse(_)));
            if !behind_fuse {
                stack.push(child);
            }
        }
    }

    for ground in return_starts(cx, &supply_nets) {
        // Up the ground tree: each net's parent is one step nearer the
        // battery negative at the root.
        let mut net = Some(ground);
        while let Some(here) = net {
            if !keep(here, Conductor::Return, &mut wires) {
                break;
            }
            net = cx.circuit.parent[here].map(|p| p.net);
        }
    }
    wires
}

/// Per net, the fuses whose opening protects its conductor (a sized wire
/// below the fuse, or the return of a load it feeds), in part order: what
/// the wire list names beside each run.
pub fn protecting_fuses(cx: &Context) -> Vec<Vec<PartId>> {
    let mut by_net = vec![Vec::new(); cx.plan.nets.len()];
    for fuse in fuses(cx) {
        let Some(start) = fuse.downstream else {
            continue;
        };
        for wire in protected_wires(cx, start) {
            by_net[wire.net].push(fuse.part);
        }
    }
    by_net
}

/// The ground nets where the loads fed from `supply_nets` return their
/// current: each supply-in part's ground net, and the ground side of a motor
/// wired straight across a rail. Grounds that never reach a battery negative
/// carry no return current and are left out (`ground/floating` reports them).
fn return_starts(cx: &Context, supply_nets: &[NetId]) -> Vec<NetId> {
    let plan = cx.plan;
    let reaches_battery = |ground: NetId| {
        let node = cx.circuit.node_of_net[ground];
        cx.circuit.nodes[node]
            .grounds
            .iter()
            .any(|p| matches!(plan.parts[p.part].class, Class::Battery(_)))
    };
    let mut starts = Vec::new();
    for &net in supply_nets {
        for pin in &plan.nets[net].pins {
            let part = pin.part;
            let ground = match plan.parts[part].pins[pin.pin].role {
                PinRole::SupplyIn => cx.circuit.ground_net[part],
                PinRole::Winding => match cx.circuit.motor_feed[part] {
                    Some(MotorFeed::Direct { supply, ground }) if supply == net => Some(ground),
                    _ => None,
                },
                _ => None,
            };
            if let Some(ground) = ground
                && reaches_battery(ground)
                && !starts.contains(&ground)
            {
                starts.push(ground);
            }
        }
    }
    starts
}

fn weakest(wires: &[WireLimit]) -> Option<WireLimit> {
    wires
        .iter()
        .copied()
        .min_by(|a, b| amps(a.ampacity).total_cmp(&amps(b.ampacity)))
}

/// The thinnest even AWG size (the sizes hook-up and automotive wire is sold
/// in, common practice) whose ampacity, with the same insulation rating,
/// reaches `current`.
fn thinnest_wire_for(
    current: ElectricCurrent,
    insulation: Option<ThermodynamicTemperature>,
    ambient: Option<ThermodynamicTemperature>,
) -> Option<(WireSize, ElectricCurrent)> {
    (8..=30)
        .rev()
        .step_by(2)
        .map(WireSize::Awg)
        .filter_map(|size| ampacity_at(size, insulation, ambient).map(|(i, _)| (size, i)))
        .find(|(_, i)| !exceeds(amps(current), amps(*i)))
}

/// A brief peak a fuse must ride through: the highest current through it
/// in one brief mode, and how long that mode lasts.
#[derive(Clone, Copy, Debug)]
struct BriefPeak {
    current: ElectricCurrent,
    lasts: Time,
    mode: ModeId,
}

/// A fuse rating that satisfies every fuse rule at once, and the speed it
/// must have (`None`: either speed fits).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Suggestion {
    pub rating: ElectricCurrent,
    pub speed: Option<FuseSpeed>,
}

impl Suggestion {
    /// "a 7.5 A fuse", or "a 10 A fuse, time-delay (`speed: slow`)".
    fn describe(self) -> String {
        match self.speed {
            None => format!("a {} fuse", show_current(self.rating)),
            Some(FuseSpeed::Slow) => format!(
                "a {} fuse, time-delay (`speed: slow`)",
                show_current(self.rating)
            ),
            Some(FuseSpeed::Fast) => {
                format!("a {} fuse, fast (`speed: fast`)", show_current(self.rating))
            }
        }
    }
}

/// ISO 8820-3 blade fuse-links (types C, E, F), from memory: carrying up to
/// each multiple of its rating, a blade fuse does not open sooner than the
/// time beside it (110 %: at least 100 h; 135 %: 0.75 s; 200 %: 0.15 s;
/// 350 %: 0.08 s; 600 %: 0.02 s). A fuse's opening time falls as its
/// current rises, so below a listed multiple the next listed time is a
/// bound too.
const BLADE_LEAST_OPENING: [(f64, f64); 5] = [
    (1.10, 360_000.0),
    (1.35, 0.75),
    (2.0, 0.15),
    (3.5, 0.08),
    (6.0, 0.02),
];

/// IEC 60127-2 standard sheet 3, time-lag (T) fuse-links, from memory: the
/// least pre-arcing times (150 %: at least 1 h; 275 %: 0.2 s; 400 %: 0.04 s;
/// 1000 %: 0.01 s). Taken for every `speed: slow` fuse; a time-delay fuse's
/// own published curve governs where it is slower.
const TIME_LAG_LEAST_OPENING: [(f64, f64); 4] =
    [(1.5, 3_600.0), (2.75, 0.2), (4.0, 0.04), (10.0, 0.01)];

/// How long the peaks of `worst` last for a time-delay fuse: a motor start,
/// stall current for 10–100 ms (common practice); the longer end is taken.
pub fn motor_start() -> Time {
    Time::new::<second>(0.1)
}

/// Whether a peak outside any brief mode may open the fuse: a fast fuse
/// must be rated at least the peak (it may blow at every motor start); a
/// time-delay fuse must not open within a motor start.
fn peak_may_open(speed: FuseSpeed, rating: ElectricCurrent, peak: ElectricCurrent) -> bool {
    match speed {
        FuseSpeed::Fast => exceeds(amps(peak), amps(rating)),
        FuseSpeed::Slow => may_open(speed, rating, peak, motor_start()),
    }
}

fn least_opening_table(speed: FuseSpeed) -> &'static [(f64, f64)] {
    match speed {
        FuseSpeed::Fast => &BLADE_LEAST_OPENING,
        FuseSpeed::Slow => &TIME_LAG_LEAST_OPENING,
    }
}

/// The shortest time in which a fuse of `speed` may open while carrying
/// `multiple` × its rating; `None` past the table, where it may open at once.
pub fn least_opening_time(speed: FuseSpeed, multiple: f64) -> Option<Time> {
    least_opening_table(speed)
        .iter()
        .find(|(m, _)| !exceeds(multiple, *m))
        .map(|(_, t)| Time::new::<second>(*t))
}

/// Whether a fuse rated `rating` may open while carrying `current` for `lasts`.
pub fn may_open(
    speed: FuseSpeed,
    rating: ElectricCurrent,
    current: ElectricCurrent,
    lasts: Time,
) -> bool {
    let multiple = amps(current) / amps(rating).max(f64::MIN_POSITIVE);
    least_opening_time(speed, multiple).is_none_or(|least| lasts >= least)
}

fn other_speed(speed: FuseSpeed) -> FuseSpeed {
    match speed {
        FuseSpeed::Fast => FuseSpeed::Slow,
        FuseSpeed::Slow => FuseSpeed::Fast,
    }
}

fn speed_words(speed: FuseSpeed) -> &'static str {
    match speed {
        FuseSpeed::Fast => "fast",
        FuseSpeed::Slow => "time-delay (`speed: slow`)",
    }
}

/// What a fuse at one place must satisfy, from the currents it carries
/// (when the operating point is known) and the wires it protects: one
/// window every fuse rule agrees with.
struct Sizing {
    /// Highest current over the continuous points: the rating carries 125 % of it.
    continuous: Option<ElectricCurrent>,
    /// Highest current over the points that are not brief (`worst` among
    /// them): a fast fuse is rated at least this, or a motor start blows it.
    peak: Option<(ElectricCurrent, ModeId)>,
    /// Each brief mode's peak: the fuse must not open within its duration.
    brief: Vec<BriefPeak>,
    wire: Option<WireLimit>,
    /// The speed tried first: the fuse's own.
    preferred: FuseSpeed,
}

impl Sizing {
    fn minimum(&self) -> Option<ElectricCurrent> {
        self.continuous.map(minimum_rating)
    }

    /// Whether a fuse of `rating` and `speed` satisfies the load side of the
    /// window (and the wire, when `within_wire`).
    fn fits(&self, rating: f64, speed: FuseSpeed, within_wire: bool) -> bool {
        let rated = ElectricCurrent::new::<ampere>(rating);
        self.minimum().is_none_or(|m| !exceeds(amps(m), rating))
            && (!within_wire || self.wire.is_none_or(|w| !exceeds(rating, amps(w.ampacity))))
            && self
                .peak
                .is_none_or(|(p, _)| !peak_may_open(speed, rated, p))
            && self
                .brief
                .iter()
                .all(|b| !may_open(speed, rated, b.current, b.lasts))
    }

    fn speeds(&self) -> [FuseSpeed; 2] {
        match self.preferred {
            FuseSpeed::Fast => [FuseSpeed::Fast, FuseSpeed::Slow],
            FuseSpeed::Slow => [FuseSpeed::Slow, FuseSpeed::Fast],
        }
    }

    fn first_fit(&self, within_wire: bool) -> Option<Suggestion> {
        self.speeds().into_iter().find_map(|speed| {
            BLADE_SERIES
                .iter()
                .copied()
                .find(|&r| self.fits(r, speed, within_wire))
                .map(|r| Suggestion {
                    rating: ElectricCurrent::new::<ampere>(r),
                    speed: (!self.fits(r, other_speed(speed), within_wire)).then_some(speed),
                })
        })
    }

    /// When no fuse fits the wire: the smallest rating of either speed that
    /// fits the load, which needs the thinnest heavier wire.
    fn smallest_ignoring_wire(&self) -> Option<Suggestion> {
        let mut best: Option<Suggestion> = None;
        for speed in self.speeds() {
            if let Some(r) = BLADE_SERIES
                .iter()
                .copied()
                .find(|&r| self.fits(r, speed, false))
                && best.is_none_or(|b| r < amps(b.rating))
            {
                best = Some(Suggestion {
                    rating: ElectricCurrent::new::<ampere>(r),
                    speed: (!self.fits(r, other_speed(speed), false)).then_some(speed),
                });
            }
        }
        best
    }

    /// The standard blade fuse that every fuse rule accepts: the smallest
    /// rating of the fuse's own speed that fits the window, else of the
    /// other speed.
    fn suggested(&self) -> Option<Suggestion> {
        if self.continuous.is_none() {
            // Load unknown: the largest rating the wire allows.
            let ceiling = self.wire?.ampacity;
            return BLADE_SERIES
                .iter()
                .rev()
                .copied()
                .find(|&r| !exceeds(r, amps(ceiling)))
                .map(|r| Suggestion {
                    rating: ElectricCurrent::new::<ampere>(r),
                    speed: None,
                });
        }
        self.first_fit(true)
    }

    fn describe_wire(&self, cx: &Context, wire: &WireLimit) -> String {
        format!(
            "the {} ampacity of {} ({}, {})",
            show_current(wire.ampacity),
            wire.named(cx),
            wire.size,
            wire.table.describe()
        )
    }

    /// What the load side asks of the fuse, in words.
    fn load_needs(&self, cx: &Context, speed: Option<FuseSpeed>) -> String {
        let Some(continuous) = self.continuous else {
            return String::new();
        };
        let mut needs = vec![format!(
            "carries 125 % of the {} continuous current ({})",
            show_current(continuous),
            show_current(minimum_rating(continuous))
        )];
        // A brief peak below the rating the continuous current already asks
        // for cannot open the fuse: only the ones above it constrain it.
        for b in self
            .brief
            .iter()
            .filter(|b| exceeds(amps(b.current), amps(minimum_rating(continuous))))
        {
            needs.push(format!(
                "rides through {} for {} in mode `{}`",
                show_current(b.current),
                show_duration(b.lasts),
                b.mode.name(cx.plan)
            ));
        }
        if let Some((peak, mode)) = self.peak
            && exceeds(amps(peak), amps(minimum_rating(continuous)))
        {
            needs.push(match speed {
                Some(FuseSpeed::Fast) => format!(
                    "is not below the {} peak of mode `{}`",
                    show_current(peak),
                    mode.name(cx.plan)
                ),
                _ => format!(
                    "rides through the {} peak of mode `{}` for a motor start ({})",
                    show_current(peak),
                    mode.name(cx.plan),
                    show_duration(motor_start())
                ),
            });
        }
        match needs.len() {
            1 => needs.remove(0),
            _ => {
                let last = needs.pop().unwrap_or_default();
                format!("{}, {last}", needs.join(", "))
            }
        }
    }

    /// The sentence every fuse finding ends with.
    fn advice(&self, cx: &Context) -> String {
        if self.continuous.is_none() {
            return self.advice_without_load(cx);
        }
        if let Some(s) = self.suggested() {
            let needs = self.load_needs(cx, s.speed);
            return match self.wire {
                Some(wire) => format!(
                    "the smallest standard blade fuse that {needs} and stays within {} is {}",
                    self.describe_wire(cx, &wire),
                    s.describe()
                ),
                None => format!(
                    "the smallest standard blade fuse that {needs} is {}",
                    s.describe()
                ),
            };
        }
        match (self.wire, self.smallest_ignoring_wire()) {
            (Some(wire), Some(load_fuse)) => {
                let needs = self.load_needs(cx, load_fuse.speed);
                let heavier = thinnest_wire_for(load_fuse.rating, wire.insulation, wire.ambient)
                    .map_or(String::new(), |(size, i)| {
                        format!(
                            " (run {} in {size}, which carries {})",
                            wire.named(cx),
                            show_current(i)
                        )
                    });
                format!(
                    "no standard blade fuse both {needs} and stays within {}: a heavier wire is needed{heavier}, protected by {}",
                    self.describe_wire(cx, &wire),
                    load_fuse.describe()
                )
            }
            _ => format!(
                "no standard blade fuse {}: the largest is {}; use a higher-current fuse type, and wire that carries its rating",
                self.load_needs(cx, Some(FuseSpeed::Slow)),
                show_current(ElectricCurrent::new::<ampere>(
                    BLADE_SERIES[BLADE_SERIES.len() - 1]
                ))
            ),
        }
    }

    /// Advice when the operating point is not known (shorts or loops kept
    /// it from being solved): the wire sets the ceiling.
    fn advice_without_load(&self, cx: &Context) -> String {
        match (self.wire, self.suggested()) {
            (Some(wire), Some(s)) => format!(
                "rate it no higher than {}: at most a {} blade, and at least 125 % of the continuous current it carries",
                self.describe_wire(cx, &wire),
                show_current(s.rating)
            ),
            (Some(wire), None) => format!(
                "no standard blade rating stays within {}: a heavier wire is needed",
                self.describe_wire(cx, &wire)
            ),
            (None, _) => "rate it at least 125 % of the continuous current it carries, and no higher than the ampacity of the wire it protects".to_string(),
        }
    }

    fn values(&self, mut finding: Finding) -> Finding {
        if let Some(c) = self.continuous {
            finding = finding
                .value("continuous", amps(c))
                .value("minimum_rating", amps(minimum_rating(c)));
        }
        if let Some(w) = self.wire {
            finding = finding.value("ampacity", amps(w.ampacity));
        }
        if let Some(s) = self.suggested() {
            finding = finding.value("suggested_rating", amps(s.rating));
            // Present only when the suggestion holds for one speed alone.
            if let Some(speed) = s.speed {
                finding = finding.value(
                    "suggested_time_delay",
                    if speed == FuseSpeed::Slow { 1.0 } else { 0.0 },
                );
            }
        }
        finding
    }
}

/// A fuse in the plan and where its current comes from.
struct PlacedFuse<'a> {
    part: PartId,
    name: &'a str,
    spec: &'a Fuse,
    /// Its load-side net (`None` when it carries nothing in the tree).
    downstream: Option<NetId>,
}

fn fuses<'a>(cx: &'a Context) -> Vec<PlacedFuse<'a>> {
    let mut found = Vec::new();
    for (part_id, part) in cx.plan.parts.iter().enumerate() {
        let Class::Fuse(spec) = &part.class else {
            continue;
        };
        found.push(PlacedFuse {
            part: part_id,
            name: &part.name,
            spec,
            downstream: cx.load_side(part_id),
        });
    }
    found
}

fn continuous_through<'p>(cx: &'p Context, net: NetId) -> Option<(&'p OperatingPoint, f64)> {
    worst_point(cx.points().filter(continuous), |p| {
        Some(amps(p.net_current[net]).abs())
    })
}

fn sizing_at(cx: &Context, net: NetId, speed: FuseSpeed) -> Sizing {
    let through = |p: &OperatingPoint| Some(amps(p.net_current[net]).abs());
    Sizing {
        continuous: continuous_through(cx, net).map(|(_, i)| ElectricCurrent::new::<ampere>(i)),
        peak: peak_through(cx, through),
        brief: brief_peaks(cx, through),
        wire: weakest(&protected_wires(cx, net)),
        preferred: speed,
    }
}

/// The highest current over the points that are not brief, with its mode.
fn peak_through(
    cx: &Context,
    measure: impl Fn(&OperatingPoint) -> Option<f64>,
) -> Option<(ElectricCurrent, ModeId)> {
    worst_point(cx.points().filter(|p| p.brief.is_none()), measure)
        .map(|(p, i)| (ElectricCurrent::new::<ampere>(i), p.mode))
}

/// Each brief mode's highest current, with how long the mode lasts.
fn brief_peaks(cx: &Context, measure: impl Fn(&OperatingPoint) -> Option<f64>) -> Vec<BriefPeak> {
    let mut peaks: Vec<BriefPeak> = Vec::new();
    for mode in ModeId::all(cx.plan) {
        let found = worst_point(
            cx.points().filter(|p| p.mode == mode && p.brief.is_some()),
            &measure,
        );
        if let Some((point, current)) = found
            && let Some(lasts) = point.brief
            && current > 0.0
        {
            peaks.push(BriefPeak {
                current: ElectricCurrent::new::<ampere>(current),
                lasts,
                mode,
            });
        }
    }
    peaks
}

/// The motors whose current runs through `net`: fed straight from a net
/// below it, or through a driver whose motor supply is below it.
fn motors_below(cx: &Context, by_net: &[Vec<PartId>], net: NetId) -> Vec<PartId> {
    let mut seen = std::collections::HashSet::new();
    let mut found = Vec::new();
    let mut stack = vec![net];
    while let Some(n) = stack.pop() {
        if !seen.insert(n) {
            continue;
        }
        found.extend(by_net[n].iter().copied());
        stack.extend(cx.circuit.children[n].iter().copied());
    }
    found.sort_unstable();
    found.dedup();
    found
}

/// Per net: the motors whose current enters the supply tree there — wired
/// straight across it, or through a driver whose motor supply is on it.
fn motors_by_net(cx: &Context) -> Vec<Vec<PartId>> {
    let plan = cx.plan;
    let mut by_net = vec![Vec::new(); plan.nets.len()];
    for (motor, feed) in cx.circuit.motor_feed.iter().enumerate() {
        let net = match feed {
            Some(MotorFeed::Direct { supply, .. }) => Some(*supply),
            Some(MotorFeed::Driver { driver, .. }) => plan.parts[*driver]
                .pin("vm")
                .and_then(|p| plan.parts[*driver].pins[p].net),
            None => None,
        };
        if let Some(net) = net {
            by_net[net].push(motor);
        }
    }
    by_net
}

// ----- fuse/missing ----------------------------------------------------------

/// What a battery's positive lead meets first, past its connector contacts.
#[derive(Debug, PartialEq)]
enum FirstElement {
    /// A fuse (or a block of fuses side by side), possibly behind connector
    /// contacts.
    Fuse,
    /// Nothing that draws current (an open lead).
    Nothing,
    /// A load on this net, before any fuse.
    Load { net: NetId, pin: PinRef },
    /// The wiring splits on this net, and these branches start without a fuse.
    Branch { net: NetId, pins: Vec<PinRef> },
    /// A part in series that is neither a fuse nor a connector contact (a
    /// switch), entered at `pin` on `net` after the contacts of `connectors`;
    /// the lead then reaches `fuses`.
    AheadOfFuse {
        net: NetId,
        pin: PinRef,
        connectors: Vec<PartId>,
        fuses: Vec<PartId>,
    },
}

/// Follows the positive lead from `start` through single series contacts
/// until a fuse, a load, a branch or an end. A net where the lead meets only
/// fuses (a fuse block at the battery) is fused; a net where it meets a load,
/// or splits to anything but fuses, is not. Connector contacts are part of the
/// pack's lead; the first other series part (a switch) met before the fuse is
/// reported as what stands ahead of it.
fn first_element(cx: &Context, start: PinRef) -> FirstElement {
    let plan = cx.plan;
    let mut from = start;
    let mut seen = Vec::new();
    let mut connectors: Vec<PartId> = Vec::new();
    let mut ahead: Option<(NetId, PinRef, Vec<PartId>)> = None;
    loop {
        let Some(net) = plan.parts[from.part].pins[from.pin].net else {
            return FirstElement::Nothing;
        };
        if seen.contains(&net) {
            return FirstElement::Nothing;
        }
        seen.push(net);
        let others: Vec<PinRef> = plan.nets[net]
            .pins
            .iter()
            .copied()
            .filter(|&p| p != from)
            .collect();
        if others.is_empty() {
            return FirstElement::Nothing;
        }
        let is_fuse = |p: &PinRef| {
            let part = &plan.parts[p.part];
            matches!(part.class, Class::Fuse(_)) && part.pins[p.pin].role == PinRole::Through
        };
        // One fuse, or a fuse block: every wire leaving here starts at a fuse.
        if others.iter().all(is_fuse) {
            return match ahead {
                None => FirstElement::Fuse,
                Some((net, pin, connectors)) => {
                    let mut fuses: Vec<PartId> = Vec::new();
                    for p in &others {
                        if !fuses.contains(&p.part) {
                            fuses.push(p.part);
                        }
                    }
                    FirstElement::AheadOfFuse {
                        net,
                        pin,
                        connectors,
                        fuses,
                    }
                }
            };
        }
        if let Some(&load) = others
            .iter()
            .find(|p| plan.parts[p.part].pins[p.pin].role != PinRole::Through)
        {
            return FirstElement::Load { net, pin: load };
        }
        let only = match others.as_slice() {
            [only] => *only,
            _ => {
                let pins = others.into_iter().filter(|p| !is_fuse(p)).collect();
                return FirstElement::Branch { net, pins };
            }
        };
        let partner = through_pairs(plan, only.part)
            .into_iter()
            .find_map(|(a, b)| match only.pin {
                p if p == a => Some(b),
                p if p == b => Some(a),
                _ => None,
            });
        let Some(partner) = partner else {
            return FirstElement::Nothing;
        };
        if ahead.is_none() {
            if matches!(plan.parts[only.part].class, Class::Connector(_)) {
                if !connectors.contains(&only.part) {
                    connectors.push(only.part);
                }
            } else {
                ahead = Some((net, only, connectors.clone()));
            }
        }
        from = PinRef {
            part: only.part,
            pin: partner,
        };
    }
}

/// `` `a` `` or `` `a`, `b` ``: part names for a message.
fn quoted_parts(cx: &Context, parts: &[PartId]) -> String {
    parts
        .iter()
        .map(|&p| format!("`{}`", cx.part_name(p)))
        .collect::<Vec<_>>()
        .join(", ")
}

fn check_missing(cx: &Context, out: &mut Vec<Finding>) {
    let plan = cx.plan;
    for (part_id, part) in plan.parts.iter().enumerate() {
        if !matches!(part.class, Class::Battery(_)) {
            continue;
        }
        for (pin_id, _) in part.pins_with_role(PinRole::SupplyOut) {
            let terminal = PinRef {
                part: part_id,
                pin: pin_id,
            };
            let first = first_element(cx, terminal);
            // The label goes on the first load's pin, the first pin the lead
            // branches to, or the part that stands ahead of the fuse.
            let (net, marked, label, message) = match &first {
                FirstElement::Fuse | FirstElement::Nothing => continue,
                FirstElement::Load { net, pin } => (
                    *net,
                    cx.pin_span(*pin),
                    "first load or branch, unfused".to_string(),
                    format!(
                        "`{}` reaches `{}` on `{}` with no fuse in between: a short anywhere on that wiring draws the battery's full fault current",
                        cx.pin_name(terminal),
                        cx.pin_name(*pin),
                        cx.net_name(*net)
                    ),
                ),
                FirstElement::Branch { net, pins } => {
                    let names: Vec<String> = pins
                        .iter()
                        .map(|p| format!("`{}`", cx.pin_name(*p)))
                        .collect();
                    let marked = pins
                        .first()
                        .map_or(plan.nets[*net].span, |p| cx.pin_span(*p));
                    (
                        *net,
                        marked,
                        "first load or branch, unfused".to_string(),
                        format!(
                            "`{}` branches on `{}` to {} before any fuse: a short anywhere on that wiring draws the battery's full fault current",
                            cx.pin_name(terminal),
                            cx.net_name(*net),
                            names.join(", ")
                        ),
                    )
                }
                FirstElement::AheadOfFuse {
                    net,
                    pin,
                    connectors,
                    fuses,
                } => {
                    let element = &plan.parts[pin.part];
                    let past = if connectors.is_empty() {
                        String::new()
                    } else {
                        let noun = if connectors.len() == 1 {
                            "connector"
                        } else {
                            "connectors"
                        };
                        format!(
                            ", past the contacts of {noun} {},",
                            quoted_parts(cx, connectors)
                        )
                    };
                    let fuse_word = if fuses.len() == 1 { "fuse" } else { "fuses" };
                    (
                        *net,
                        cx.pin_span(*pin),
                        format!("{} ahead of the fuse, unprotected", element.class.name()),
                        format!(
                            "the first element on `{}`{past} is {} `{}`, not a fuse: the wire and the {} ahead of {fuse_word} {} are unprotected, and a short there draws the battery's full fault current",
                            cx.pin_name(terminal),
                            element.class.name(),
                            element.name,
                            element.class.name(),
                            quoted_parts(cx, fuses)
                        ),
                    )
                }
            };
            let start = part.pins[pin_id].net.unwrap_or(net);
            // The fuse at the terminal would carry the battery's whole
            // output and protect every wire of its node down to the next
            // fuse; one moved up from behind a switch keeps protecting what
            // it protected there as well.
            let mut wires = protected_wires(cx, start);
            let placement = match &first {
                FirstElement::AheadOfFuse { pin, fuses, .. } => {
                    let element = &plan.parts[pin.part];
                    let ahead = format!("{} `{}`", element.class.name(), element.name);
                    match fuses.as_slice() {
                        [fuse] => {
                            if let Some(below) = cx.load_side(*fuse) {
                                wires.extend(protected_wires(cx, below));
                            }
                            format!(
                                "move `{}` ahead of {ahead}, so that only the pack's connector comes before it on the battery positive",
                                cx.part_name(*fuse)
                            )
                        }
                        _ => format!(
                            "put a fuse ahead of {ahead}, so that only the pack's connector comes before it on the battery positive"
                        ),
                    }
                }
                _ => "make a fuse the first element on the battery positive".to_string(),
            };
            let from_battery = |p: &OperatingPoint| p.batteries[part_id].map(|b| amps(b.current));
            let sizing = Sizing {
                continuous: worst_point(cx.points().filter(continuous), from_battery)
                    .map(|(_, i)| ElectricCurrent::new::<ampere>(i)),
                peak: peak_through(cx, from_battery),
                brief: brief_peaks(cx, from_battery),
                wire: weakest(&wires),
                preferred: FuseSpeed::Fast,
            };
            let finding = Finding::new(&MISSING, cx.pin_span(terminal), message)
                .label(marked, label)
                .help(format!(
                    "{placement}, within 7 in (178 mm) of the terminal; {}",
                    sizing.advice(cx)
                ))
                .part(&part.name)
                .net(cx.net_name(net));
            out.push(sizing.values(finding));
        }
    }
}

// ----- fuse/undersized -------------------------------------------------------

fn check_undersized(cx: &Context, out: &mut Vec<Finding>) {
    for fuse in fuses(cx) {
        let (Some(rating), Some(net)) = (fuse.spec.rating, fuse.downstream) else {
            continue;
        };
        let Some((point, current)) = continuous_through(cx, net) else {
            continue;
        };
        let minimum = minimum_rating(ElectricCurrent::new::<ampere>(current));
        cx.margin(
            Margin::below(
                RatingKind::FuseRating,
                UNDERSIZED.id,
                amps(minimum),
                amps(rating.value),
                Unit::Ampere,
            ),
            |m| m.at(fuse.name).at_point(cx.plan, point),
        );
        if !exceeds(amps(minimum), amps(rating.value)) {
            continue;
        }
        let sizing = sizing_at(cx, net, fuse.spec.speed);
        let steady = ElectricCurrent::new::<ampere>(current);
        // Below the steady current itself the fuse blows in normal work:
        // an error, not a thin margin.
        let blows = exceeds(current, amps(rating.value));
        let message = if blows {
            format!(
                "`{}` is rated {} and carries {} continuous {}: above its rating, it blows in normal work; at 125 % it needs a rating of {}",
                fuse.name,
                show_current(rating.value),
                show_current(steady),
                mode_label(cx.plan, point.mode, point.battery),
                show_current(minimum)
            )
        } else {
            format!(
                "`{}` carries {} continuous {}; at 125 % it needs a rating of {}, and it is rated {}",
                fuse.name,
                show_current(steady),
                mode_label(cx.plan, point.mode, point.battery),
                show_current(minimum),
                show_current(rating.value)
            )
        };
        let mut finding = Finding::new(&UNDERSIZED, cx.rated_span(&rating, fuse.part), message);
        if blows {
            finding.severity = Severity::Error;
        }
        let finding = finding
            .at_point(cx.plan, point)
            .help(sizing.advice(cx))
            .part(fuse.name)
            .net(cx.net_name(net))
            .value("rating", amps(rating.value));
        out.push(sizing.values(finding));
    }
}

// ----- fuse/oversized --------------------------------------------------------

fn check_oversized(cx: &Context, out: &mut Vec<Finding>) {
    for fuse in fuses(cx) {
        let (Some(rating), Some(net)) = (fuse.spec.rating, fuse.downstream) else {
            continue;
        };
        let over: Vec<WireLimit> = protected_wires(cx, net)
            .into_iter()
            .filter(|w| exceeds(amps(rating.value), amps(w.ampacity)))
            .collect();
        let Some(thinnest) = weakest(&over) else {
            continue;
        };
        let sizing = sizing_at(cx, net, fuse.spec.speed);
        let mut finding = Finding::new(
            &OVERSIZED,
            cx.rated_span(&rating, fuse.part),
            format!(
                "`{}` is rated {}, above the {} ampacity of {} ({}, {}) that it protects: {}",
                fuse.name,
                show_current(rating.value),
                show_current(thinnest.ampacity),
                thinnest.named(cx),
                thinnest.size,
                thinnest.table.describe(),
                match thinnest.conductor {
                    Conductor::Supply =>
                        "a fault on that wire can overheat it without blowing the fuse",
                    Conductor::Return =>
                        "a fault at a load it feeds returns through that wire, which can overheat without blowing the fuse",
                }
            ),
        )
        .label(
            cx.plan.nets[thinnest.net].span,
            match thinnest.conductor {
                Conductor::Supply => "thinnest protected wire",
                Conductor::Return => "thinnest protected wire: a return conductor",
            },
        )
        .help(sizing.advice(cx))
        .part(fuse.name)
        .value("rating", amps(rating.value));
        for w in &over {
            finding = finding.net(cx.net_name(w.net));
        }
        out.push(sizing.values(finding));
    }
}

// ----- fuse/voltage ----------------------------------------------------------

/// The highest voltage a fuse's circuit can put across it when it opens,
/// and what sets it.
pub(super) fn circuit_voltage(cx: &Context, fuse: PartId) -> Option<(ElectricPotential, String)> {
    let plan = cx.plan;
    let net = plan.parts[fuse].pins.iter().find_map(|p| p.net)?;
    let node = &cx.circuit.nodes[cx.circuit.node_of_net[net]];
    let root = cx.circuit.root[cx.circuit.node_of_net[net]]?;
    let on_root = |p: &&PinRef| plan.parts[p.part].pins[p.pin].net == Some(root);
    // A fuse in a return lead breaks the pack voltage just the same.
    let candidates = node.supply_outs.iter().chain(&node.grounds).filter(on_root);
    let mut highest: Option<(ElectricPotential, String)> = None;
    for pin in candidates {
        let part = &plan.parts[pin.part];
        let found = match &part.class {
            Class::Battery(_) => battery_voltage(plan, pin.part, BatteryState::Full)
                .map(|v| (v, format!("the full-charge voltage of `{}`", part.name))),
            Class::Regulator(r) if part.pins[pin.pin].role == PinRole::SupplyOut => Some((
                r.output.max,
                format!("the highest output of `{}`", part.name),
            )),
            _ => part.pins[pin.pin]
                .voltage()
                .filter(|_| part.pins[pin.pin].role == PinRole::SupplyOut)
                .map(|band| {
                    (
                        band.max,
                        format!("the highest output of `{}`", cx.pin_name(*pin)),
                    )
                }),
        };
        if let Some((v, what)) = found
            && highest.as_ref().is_none_or(|(h, _)| v > *h)
        {
            highest = Some((v, what));
        }
    }
    highest
}

fn check_voltage(cx: &Context, out: &mut Vec<Finding>) {
    for fuse in fuses(cx) {
        let Some(rated) = fuse.spec.voltage else {
            continue;
        };
        let Some((circuit, what)) = circuit_voltage(cx, fuse.part) else {
            continue;
        };
        if !exceeds(circuit.get::<volt>(), rated.value.get::<volt>()) {
            continue;
        }
        let blade = BLADE_VOLTAGES
            .iter()
            .copied()
            .find(|&v| !exceeds(circuit.get::<volt>(), v));
        let voltage_advice = match blade {
            Some(v) => format!(
                "use a fuse rated for at least {}, such as a {} blade fuse",
                show_voltage(circuit),
                show_voltage(ElectricPotential::new::<volt>(v))
            ),
            None => format!(
                "use a fuse rated for at least {}: above the 58 V of blade fuses, a DC-rated cartridge or bolt-down fuse",
                show_voltage(circuit)
            ),
        };
        let sizing = fuse
            .downstream
            .map(|net| sizing_at(cx, net, fuse.spec.speed));
        let advice = sizing
            .as_ref()
            .map_or(String::new(), |s| format!("; {}", s.advice(cx)));
        let mut finding = Finding::new(
            &VOLTAGE,
            cx.rated_span(&rated, fuse.part),
            format!(
                "`{}` is rated {}, below {} ({}) that it must break when it opens",
                fuse.name,
                show_voltage(rated.value),
                what,
                show_voltage(circuit)
            ),
        )
        .help(format!("{voltage_advice}{advice}"))
        .part(fuse.name)
        .value("voltage_rating", rated.value.get::<volt>())
        .value("circuit_voltage", circuit.get::<volt>());
        if let Some(net) = fuse.downstream {
            finding = finding.net(cx.net_name(net));
        }
        if let Some(sizing) = sizing {
            finding = sizing.values(finding);
        }
        out.push(finding);
    }
}

// ----- fuse/nuisance ---------------------------------------------------------

fn check_nuisance(cx: &Context, out: &mut Vec<Finding>) {
    let by_net = motors_by_net(cx);
    for fuse in fuses(cx) {
        let (Some(rating), Some(net)) = (fuse.spec.rating, fuse.downstream) else {
            continue;
        };
        // An undersized fuse is one mistake: `fuse/undersized` reports it, and
        // the rating it suggests is chosen to ride through the brief peaks too.
        if continuous_through(cx, net).is_some_and(|(_, current)| {
            exceeds(
                amps(minimum_rating(ElectricCurrent::new::<ampere>(current))),
                amps(rating.value),
            )
        }) {
            continue;
        }
        let speed = fuse.spec.speed;
        let motors = motors_below(cx, &by_net, net);
        // Name the motors behind this fuse that stall at the point; with
        // none, the peak is a load's, not a motor start.
        let cause = |point: &OperatingPoint| {
            let stalled: Vec<String> = motors
                .iter()
                .filter(|&&m| point.motors[m].is_some_and(|m| m.state == MotorState::Stall))
                .map(|&m| format!("`{}`", cx.part_name(m)))
                .collect();
            (!stalled.is_empty()).then(|| stalled.join(" and "))
        };
        let sizing = sizing_at(cx, net, speed);
        let through = |p: &OperatingPoint| amps(p.net_current[net]).abs();

        // A brief mode: the fuse must not open within the time it lasts.
        let opening = cx
            .points()
            .filter_map(|p| p.brief.map(|lasts| (p, lasts)))
            .filter(|(p, lasts)| {
                may_open(
                    speed,
                    rating.value,
                    ElectricCurrent::new::<ampere>(through(p)),
                    *lasts,
                )
            })
            .max_by(|(a, _), (b, _)| through(a).total_cmp(&through(b)));
        if let Some((point, lasts)) = opening {
            let current = ElectricCurrent::new::<ampere>(through(point));
            let multiple = amps(current) / amps(rating.value);
            let band = match least_opening_time(speed, multiple) {
                Some(least) => format!(
                    "{} lets a {} fuse open from {} at that multiple",
                    match speed {
                        FuseSpeed::Fast => "ISO 8820-3",
                        FuseSpeed::Slow => "IEC 60127-2 (time-lag)",
                    },
                    match speed {
                        FuseSpeed::Fast => "blade",
                        FuseSpeed::Slow => "time-delay",
                    },
                    show_duration(least)
                ),
                None => "past the published bands it may open at once".to_string(),
            };
            let what = match cause(point) {
                Some(stalled) => format!("while {stalled} stall"),
                None => "at that peak".to_string(),
            };
            let finding = Finding::new(
                &NUISANCE,
                cx.rated_span(&rating, fuse.part),
                format!(
                    "`{}` is a {} fuse rated {} and carries {} ({} of its rating) for {} {}: {band}, so it may blow {what}",
                    fuse.name,
                    speed_words(speed),
                    show_current(rating.value),
                    show_current(current),
                    show_share(Ratio::new::<ratio>(multiple)),
                    show_duration(lasts),
                    mode_label(cx.plan, point.mode, point.battery)
                ),
            )
            .at_point(cx.plan, point)
            .help(sizing.advice(cx))
            .part(fuse.name)
            .net(cx.net_name(net))
            .value("rating", amps(rating.value))
            .value("peak", amps(current))
            .value("lasts", lasts.get::<second>());
            out.push(sizing.values(finding));
            continue;
        }

        // Every other peak, `worst` among them: a motor start lasts tens of
        // milliseconds at the stall current.
        let Some((point, peak)) = worst_point(cx.points().filter(|p| p.brief.is_none()), |p| {
            Some(through(p))
        }) else {
            continue;
        };
        let peak_current = ElectricCurrent::new::<ampere>(peak);
        if !peak_may_open(speed, rating.value, peak_current) {
            continue;
        }
        let (cause, risk) = match cause(point) {
            Some(stalled) => (
                format!(" with {stalled} stalled"),
                "it may blow at motor start",
            ),
            None => (String::new(), "it may blow at that peak"),
        };
        let how = match speed {
            FuseSpeed::Fast => String::new(),
            FuseSpeed::Slow => format!(
                " ({} of its rating, where IEC 60127-2 (time-lag) lets it open within a {} motor start)",
                show_share(Ratio::new::<ratio>(peak / amps(rating.value))),
                show_duration(motor_start())
            ),
        };
        let finding = Finding::new(
            &NUISANCE,
            cx.rated_span(&rating, fuse.part),
            format!(
                "`{}` is a {} fuse rated {} and carries {} peak{cause} {}{how}: {risk}",
                fuse.name,
                speed_words(speed),
                show_current(rating.value),
                show_current(peak_current),
                mode_label(cx.plan, point.mode, point.battery)
            ),
        )
        .at_point(cx.plan, point)
        .help(sizing.advice(cx))
        .part(fuse.name)
        .net(cx.net_name(net))
        .value("rating", amps(rating.value))
        .value("peak", peak);
        out.push(sizing.values(finding));
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn a(x: f64) -> ElectricCurrent {
        ElectricCurrent::new::<ampere>(x)
    }

    fn rating(minimum: f64, ceiling: Option<f64>) -> Option<f64> {
        blade_rating_for(a(minimum), ceiling.map(a)).map(amps)
    }

    #[test]
    fn worked_example_w6_sizing() {
        // NEC 210.20(A) fuse-sizing worked example: 6 A continuous → I_min = 1.25 × 6 = 7.5 A → 7.5 A blade;
        // 22 AWG (Handbook chassis 7 A) cannot take it, 20 AWG (11 A) can.
        assert_eq!(amps(minimum_rating(a(6.0))), 7.5);
        assert_eq!(rating(7.5, None), Some(7.5));
        assert_eq!(rating(7.5, Some(7.0)), None);
        assert_eq!(rating(7.5, Some(11.0)), Some(7.5));
        // 12 A continuous → 15 A, which needs a conductor of at least 15 A.
        assert_eq!(rating(15.0, None), Some(15.0));
        assert_eq!(rating(15.0, Some(22.0)), Some(15.0));
    }

    #[test]
    fn above_the_blade_series_there_is_no_rating() {
        // SAE J1284 / ISO 8820-3 blade series tops out at 40 A.
        assert_eq!(rating(40.0, None), Some(40.0));
        assert_eq!(rating(41.0, None), None);
    }

    #[test]
    fn thinnest_even_gauge_for_a_fifteen_amp_fuse() {
        // Handbook chassis column: 20 AWG 11 A is too thin, 18 AWG 16 A carries 15 A.
        let (size, limit) = thinnest_wire_for(a(15.0), None, None).unwrap();
        assert_eq!(size, WireSize::Awg(18));
        assert_eq!(amps(limit), 16.0);
        // 33 CFR Table 5 at 60 °C: 18 AWG 10 A, 16 AWG 15 A.
        let sixty = ThermodynamicTemperature::new::<
            uom::si::thermodynamic_temperature::degree_celsius,
        >(60.0);
        let (size, _) = thinnest_wire_for(a(15.0), Some(sixty), None).unwrap();
        assert_eq!(size, WireSize::Awg(16));
    }
}
