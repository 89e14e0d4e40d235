//! Logic levels between the outputs and the inputs on each signal: an input's
//! ceiling against the highest level that can reach it, the noise margins
//! NMH and NML of every driver–receiver pair, two push-pull outputs fighting
//! on one net, and inputs that nothing drives.
//!
//! Thresholds come from the format reference's family table (JEDEC JESD8 families),
//! scaled with the actual `ref` rail where the family is ratiometric, and
//! taken at the rail extreme that is worst for each level (format reference §3). A
//! signal is an electrical node that carries no supply or ground, together
//! with the signal nodes it reaches through series resistors; a resistor from
//! a signal to a rail is a pull-up, to a ground a pull-down.
//!
//! Not for ground shifts between the two ends of a link (`ground/offset`), nor
//! for signals between parts with separate grounds (`ground/not-shared`
//! reports those; their levels are not judged here).

mod unpowered;
pub use unpowered::UNPOWERED_INPUT;

use super::{
    Context, Finding, Margin, RatingKind, Rule, RuleDoc, Severity, Unit, exceeds, falls_below,
    mode_label, show_voltages_apart,
};
use crate::analysis::{Corner, OperatingPoint};
use crate::model::{Class, LogicFamily, LogicSpec, NetId, PartId, PinRef, PinRole};
use crate::model::{FamilyLevels, Scale};
use crate::units::show_voltage;
use petgraph::unionfind::UnionFind;
use uom::si::electric_potential::volt;
use uom::si::f64::ElectricPotential;

pub const OVERVOLTAGE: Rule = Rule {
    id: "logic/overvoltage",
    severity: Severity::Error,
    summary: "a driver's high level exceeds a receiver's absolute maximum input",
    doc: RuleDoc {
        what: "For every input on a signal, the highest level anything on that signal can put on it — a push-pull output at its rail's maximum, a pull-up resistor's rail at its maximum, or the rail the input is tied to — against the input's ceiling at its own rail's minimum (when both follow one rail they are compared at each operating point instead, since a rail is never at its top and its bottom at once). The ceiling is the pin's `max` when written; else VDD + 0.3 V; `tolerant: 5 V` raises it to 5.5 V (a V-tolerant pin is taken to withstand V + 10 %). One finding per signal, written from its worst pair and naming every driver and input that fails. A VDD read at a supply pin is taken within that pin's operating `range`: a rail outside it is reported once, by `voltage/under-range` or `voltage/over-range`.",
        why: "An input driven above its supply conducts through its protection diode into its own rail: the part is back-powered through the signal, latches up or is slowly destroyed. A 5 V output straight into a 3.3 V controller pin is the classic case.",
        example: "railcheck: 1\nparts:\n  pack:   { use: battery/nimh-8cell }\n  fuse:   { use: fuse/blade-1a }\n  buck:   { use: regulator/buck-5v-3a }\n  ranger: { use: sensor/rangefinder-5v }   # echo swings to its rail: up to 5 V + 2 % = 5.1 V\n  mcu:    { use: board/mcu-3v3 }           # rx ceiling: 3.3 V × 0.97 + 0.3 V = 3.5 V\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, buck.vin]\n  5V:    [buck.vout, ranger.vcc, mcu.vin]\n  GND:   [pack.neg, buck.gnd, ranger.gnd, mcu.gnd]\n  ECHO:  [ranger.echo, mcu.rx]",
        fix: "railcheck: 1\nparts:\n  pack:    { use: battery/nimh-8cell }\n  fuse:    { use: fuse/blade-1a }\n  buck:    { use: regulator/buck-5v-3a }\n  ranger:  { use: sensor/rangefinder-5v }\n  mcu:     { use: board/mcu-3v3 }\n  shifter: { use: shifter/bidir-4ch }   # 5 V side b1, 3.3 V side a1\nnets:\n  BATT+:    [pack.pos, fuse.a]\n  VBAT:     [fuse.b, buck.vin]\n  5V:       [buck.vout, ranger.vcc, mcu.vin, shifter.hv]\n  3V3:      [mcu.3v3, shifter.lv]\n  GND:      [pack.neg, buck.gnd, ranger.gnd, mcu.gnd, shifter.gnd]\n  ECHO:     [ranger.echo, shifter.b1]\n  ECHO_3V3: [shifter.a1, mcu.rx]",
        references: "Input ceiling VDD + 0.3 V: JEDEC JESD8 recommended input range (taking it as the absolute maximum of a pin that is not 5 V-tolerant is common practice); 5 V-tolerant meaning up to 5.5 V is common practice (worked example: 5.0 V > 3.3 + 0.3 = 3.6 V).",
    },
    needs_operating_point: true,
    check: check_levels,
};

pub const HIGH_MARGIN: Rule = Rule {
    id: "logic/high-margin",
    severity: Severity::Error,
    summary: "driver's minimum high level below receiver's high threshold",
    doc: RuleDoc {
        what: "For every driver–receiver pair on a signal, the driver's lowest high level VOH — its family's VOH at its rail's minimum, or for an open-drain pin (`open-drain`, `open-drain-io`) the lowest rail its pull-ups go to — against the receiver's high threshold VIH at its rail's maximum (point by point when both follow one rail). The finding gives both noise margins, NMH = VOH − VIH and NML = VIL − VOL; one finding per signal, written from its worst pair and naming every pair that fails.",
        why: "Below VIH the receiver is not guaranteed to read a high: the link works on the bench and fails with a warm part, a low battery or a little noise.",
        example: "railcheck: 1\nparts:\n  pack:  { use: battery/nimh-8cell }\n  fuse:  { use: fuse/blade-1a }\n  buck:  { use: regulator/buck-5v-3a }\n  mcu:   { use: board/mcu-3v3 }   # tx VOH = 3.3 V × 0.97 − 0.2 V = 3.0 V at its lowest\n  valve: { class: load, pins: { vcc: { role: supply-in, draw: 10 mA }, gnd: { role: ground }, open: { role: logic-in, ref: vcc, family: cmos5 } } }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, buck.vin]\n  5V:    [buck.vout, mcu.vin, valve.vcc]\n  GND:   [pack.neg, buck.gnd, mcu.gnd, valve.gnd]\n  VALVE: [mcu.tx, valve.open]   # greenhouse valve driver, HC-type input: VIH = 0.7 × 5.1 V = 3.57 V",
        fix: "railcheck: 1\nparts:\n  pack:  { use: battery/nimh-8cell }\n  fuse:  { use: fuse/blade-1a }\n  buck:  { use: regulator/buck-5v-3a }\n  mcu:   { use: board/mcu-3v3 }   # tx VOH = 3.3 V × 0.97 − 0.2 V = 3.0 V at its lowest\n  valve: { class: load, pins: { vcc: { role: supply-in, draw: 10 mA }, gnd: { role: ground }, open: { role: logic-in, ref: vcc, family: ttl5 } } }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, buck.vin]\n  5V:    [buck.vout, mcu.vin, valve.vcc]\n  GND:   [pack.neg, buck.gnd, mcu.gnd, valve.gnd]\n  VALVE: [mcu.tx, valve.open]   # its HCT-type (TTL-level) version: VIH = 2.0 V",
        references: "Family levels: format reference §3 table (JEDEC JESD8C LVCMOS/LVTTL, JESD8-5, JESD8-7, JESD7 HC, 54/74 TTL); NMH = VOH(min) − VIH(min), evaluated at the driver's minimum VDD (JEDEC JESD8C worked example: LVCMOS at 3.0 V into a 5 V HC input, 2.80 V − 3.50 V = −0.70 V).",
    },
    needs_operating_point: true,
    // Decided with the other level rules in `check_levels`.
    check: |_, _| {},
};

pub const LOW_MARGIN: Rule = Rule {
    id: "logic/low-margin",
    severity: Severity::Error,
    summary: "driver's maximum low level above receiver's low threshold",
    doc: RuleDoc {
        what: "For every driver–receiver pair on a signal, the driver's highest low level VOL against the receiver's low threshold VIL, taken at the receiver's rail minimum where the family scales with it. The finding gives both noise margins; one finding per signal, written from its worst pair and naming every pair that fails.",
        why: "Above VIL the receiver is not guaranteed to read a low: an open-collector sensor that only pulls down to 0.4 V cannot be read by an input that needs 0.3 V.",
        example: "railcheck: 1\nparts:\n  pack: { use: battery/nimh-8cell }\n  fuse: { use: fuse/blade-1a }\n  buck: { use: regulator/buck-5v-3a }\n  mcu:  { use: board/mcu-3v3 }   # rx: lvcmos33, VIL = 0.8 V\n  beam: { class: sensor, pins: { vcc: { role: supply-in, draw: 5 mA }, gnd: { role: ground }, out: { role: logic-out, ref: vcc, family: lvcmos33, vol: 1.0 V } } }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, buck.vin]\n  5V:    [buck.vout, mcu.vin]\n  3V3:   [mcu.3v3, beam.vcc]\n  GND:   [pack.neg, buck.gnd, mcu.gnd, beam.gnd]\n  DOOR:  [beam.out, mcu.rx]   # warehouse door beam that pulls down only to 1.0 V",
        fix: "railcheck: 1\nparts:\n  pack: { use: battery/nimh-8cell }\n  fuse: { use: fuse/blade-1a }\n  buck: { use: regulator/buck-5v-3a }\n  mcu:  { use: board/mcu-3v3 }   # rx: lvcmos33, VIL = 0.8 V\n  beam: { class: sensor, pins: { vcc: { role: supply-in, draw: 5 mA }, gnd: { role: ground }, out: { role: logic-out, ref: vcc, family: lvcmos33, vol: 0.4 V } } }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, buck.vin]\n  5V:    [buck.vout, mcu.vin]\n  3V3:   [mcu.3v3, beam.vcc]\n  GND:   [pack.neg, buck.gnd, mcu.gnd, beam.gnd]\n  DOOR:  [beam.out, mcu.rx]   # a beam sensor that pulls down to 0.4 V",
        references: "Family levels: format reference §3 table (JEDEC JESD8C, JESD8-5, JESD8-7, JESD7, 54/74 TTL); NML = VIL(max) − VOL(max), the noise-margin definition.",
    },
    needs_operating_point: true,
    // Decided with the other level rules in `check_levels`.
    check: |_, _| {},
};

pub const CONTENTION: Rule = Rule {
    id: "logic/contention",
    severity: Severity::Error,
    summary: "two push-pull outputs on one net",
    doc: RuleDoc {
        what: "Whether two or more push-pull outputs (`logic-out`) sit on one net (nets joined by connector contacts count as one). Bidirectional `logic-io` pins are not counted: their direction is set by firmware. Open-drain pins (`open-drain`, `open-drain-io`) only pull low and never contend: a shared I2C bus of `open-drain-io` pins is normal.",
        why: "When two push-pull outputs drive opposite levels, each shorts the other's rail to ground through its output transistors: tens of milliamperes that heat and eventually kill both pins. A serial link wired TX to TX is the common way to get there.",
        example: "railcheck: 1\nparts:\n  pack:  { use: battery/nimh-8cell }\n  fuse:  { use: fuse/blade-2a }\n  buck:  { use: regulator/buck-5v-5a }\n  brain: { use: board/sbc-5v }\n  mcu:   { use: board/mcu-3v3 }\nnets:\n  BATT+:  [pack.pos, fuse.a]\n  VBAT:   [fuse.b, buck.vin]\n  5V:     [buck.vout, brain.vin, mcu.vin]\n  GND:    [pack.neg, buck.gnd, brain.gnd, mcu.gnd]\n  UART_A: [brain.tx, mcu.tx]   # transmit wired to transmit\n  UART_B: [brain.rx, mcu.rx]",
        fix: "railcheck: 1\nparts:\n  pack:  { use: battery/nimh-8cell }\n  fuse:  { use: fuse/blade-2a }\n  buck:  { use: regulator/buck-5v-5a }\n  brain: { use: board/sbc-5v }\n  mcu:   { use: board/mcu-3v3 }\nnets:\n  BATT+:  [pack.pos, fuse.a]\n  VBAT:   [fuse.b, buck.vin]\n  5V:     [buck.vout, brain.vin, mcu.vin]\n  GND:    [pack.neg, buck.gnd, brain.gnd, mcu.gnd]\n  UART_A: [brain.tx, mcu.rx]   # each transmit pin to the other's receive pin\n  UART_B: [mcu.tx, brain.rx]",
        references: "Output drive: JEDEC JESD8C specifies VOH/VOL at a stated load current only; two outputs in opposition exceed every such load (Ohm's law through both output stages).",
    },
    needs_operating_point: false,
    check: check_contention,
};

pub const UNDRIVEN: Rule = Rule {
    id: "logic/undriven",
    severity: Severity::Warning,
    summary: "an input on a net with no output and no pull resistor",
    doc: RuleDoc {
        what: "Whether the inputs on a signal have something that sets their level: an output (`logic-out`, `logic-io`, `open-drain`), a pull-up or pull-down resistor, or a rail or ground the net is tied to. Series resistors are followed to the nets on their far side. A signal whose only outputs are open-drain needs a pull-up: without one nothing takes it high. An `open-drain-io` pin is an input too, so a bus of them with no pull-up (I2C data and clock drawn without their resistors) is reported.",
        why: "A CMOS input left floating picks up noise, reads random levels and can sit half-way, drawing current through both input transistors. A serial link wired RX to RX leaves both inputs floating.",
        example: "railcheck: 1\nparts:\n  pack: { use: battery/nimh-8cell }\n  fuse: { use: fuse/blade-1a }\n  cart: { use: board/mcu-8bit-5v }\n  enc:  { use: sensor/encoder-optical-oc }   # warehouse cart wheel: open-collector, only pulls low\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, cart.vin]\n  5V:    [cart.5v, enc.vcc]\n  GND:   [pack.neg, cart.gnd, enc.gnd]\n  ENC_A: [enc.a, cart.enc1a]   # nothing takes it high",
        fix: "railcheck: 1\nparts:\n  pack: { use: battery/nimh-8cell }\n  fuse: { use: fuse/blade-1a }\n  cart: { use: board/mcu-8bit-5v }\n  enc:  { use: sensor/encoder-optical-oc }   # warehouse cart wheel: open-collector, only pulls low\n  pull: { use: resistor/pullup-10k }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, cart.vin]\n  5V:    [cart.5v, enc.vcc, pull.a]\n  GND:   [pack.neg, cart.gnd, enc.gnd]\n  ENC_A: [enc.a, cart.enc1a, pull.b]   # the pull-up takes it high",
        references: "CMOS inputs must not float (input levels between VIL and VIH are undefined: JEDEC JESD8C); an open-drain output only pulls low and needs a pull-up for its high level.",
    },
    needs_operating_point: false,
    check: check_undriven,
};

// ----- levels, worked out without the plan ---------------------------------

fn family_name(family: LogicFamily) -> &'static str {
    LogicFamily::ALL
        .iter()
        .find(|(_, f)| *f == family)
        .map_or("", |(n, _)| n)
}

/// Headroom of an input above its own rail when no `max` is written:
/// JEDEC JESD8's top of the recommended input range, VDD + 0.3 V.
fn ceiling_above_vdd() -> ElectricPotential {
    volts(0.3)
}

/// A pin marked `tolerant: V` withstands V + 10 %: "5 V-tolerant means up to
/// 5.5 V" (JEDEC JESD8 logic levels, common practice).
const TOLERANT_HEADROOM: f64 = 1.1;

/// The verdict on one driver and one receiver: the compatibility check of
/// JEDEC JESD8 logic levels, with the format reference's 0.1 % tolerance on each limit.
#[derive(Clone, Copy, Debug, PartialEq)]
struct Verdict {
    /// NMH = VOH(min, driver) − VIH(min, receiver).
    high_margin: Option<ElectricPotential>,
    /// NML = VIL(max, receiver) − VOL(max, driver).
    low_margin: Option<ElectricPotential>,
    high_fails: bool,
    low_fails: bool,
    over_ceiling: bool,
}

fn judge(
    voh: Option<ElectricPotential>,
    vol: Option<ElectricPotential>,
    highest: Option<ElectricPotential>,
    vih: Option<ElectricPotential>,
    vil: Option<ElectricPotential>,
    ceiling: Option<ElectricPotential>,
) -> Verdict {
    let both = |a: Option<ElectricPotential>, b: Option<ElectricPotential>| a.zip(b);
    Verdict {
        high_margin: both(voh, vih).map(|(oh, ih)| oh - ih),
        low_margin: both(vil, vol).map(|(il, ol)| il - ol),
        high_fails: both(voh, vih).is_some_and(|(oh, ih)| falls_below(v(oh), v(ih))),
        low_fails: both(vol, vil).is_some_and(|(ol, il)| exceeds(v(ol), v(il))),
        over_ceiling: both(highest, ceiling).is_some_and(|(h, c)| exceeds(v(h), v(c))),
    }
}

fn volts(value: f64) -> ElectricPotential {
    ElectricPotential::new::<volt>(value)
}

fn v(value: ElectricPotential) -> f64 {
    value.get::<volt>()
}

// ----- rails over the operating points --------------------------------------

/// A voltage with the operating point it was found at (`None` when it does
/// not depend on one).
#[derive(Clone, Copy)]
struct AtPoint<'p> {
    voltage: ElectricPotential,
    point: Option<&'p OperatingPoint>,
}

/// Which rail a level follows. Levels on one rail rise and fall together,
/// so a pair on one rail is compared point by point; on different rails each
/// side is taken at its own worst extreme (format reference §3).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum RailId {
    Node(usize),
    /// A supply pin in no net (a board's onboard output left unwired).
    Pin(PinRef),
}

/// The rail that sets a pin's levels, at every settled point where it is fed.
#[derive(Clone)]
struct Rail<'p> {
    /// `None` for a family's nominal VDD, which follows nothing.
    id: Option<RailId>,
    samples: Vec<AtPoint<'p>>,
    low: AtPoint<'p>,
    high: AtPoint<'p>,
    /// The supply pin or net it is read at; `None` for a nominal VDD.
    named: Option<RailName>,
    /// It is the same in every mode at each battery state and tolerance
    /// corner (a regulated rail): a finding on it names no mode.
    mode_free: bool,
    /// It is the same at every battery state (a regulated rail out of
    /// dropout): a finding on it names no battery state.
    battery_free: bool,
}

/// Whether samples that share the rest of their operating point agree (to
/// 1 µV) whatever `varies` picks out of it: then that coordinate is no part
/// of a finding.
fn agrees_across<K: PartialEq>(samples: &[AtPoint], rest: impl Fn(&OperatingPoint) -> K) -> bool {
    let mut seen: Vec<(K, f64, f64)> = Vec::new();
    for sample in samples {
        let Some(point) = sample.point else {
            continue;
        };
        let (key, value) = (rest(point), v(sample.voltage));
        match seen.iter_mut().find(|(k, ..)| *k == key) {
            Some((_, low, high)) => {
                *low = low.min(value);
                *high = high.max(value);
            }
            None => seen.push((key, value, value)),
        }
    }
    seen.iter().all(|(_, low, high)| high - low <= 1e-6)
}

/// A rail's lowest and highest voltage in one comparison.
type RailEnds<'p> = (AtPoint<'p>, AtPoint<'p>);

impl<'p> Rail<'p> {
    /// `None` when the rail has no positive voltage anywhere (an unfed
    /// rail). Extremes are first-wins on ties, so the reported point does
    /// not depend on float noise.
    fn from_samples(
        id: Option<RailId>,
        samples: Vec<AtPoint<'p>>,
        named: Option<RailName>,
    ) -> Option<Rail<'p>> {
        let first = *samples.first()?;
        // The same at each battery state and corner whatever the mode; the
        // same in each mode and corner whatever the battery state.
        let mode_free = agrees_across(&samples, |p| (p.battery, p.corner));
        let battery_free = agrees_across(&samples, |p| (p.mode, p.corner));
        let (mut low, mut high) = (first, first);
        for sample in &samples[1..] {
            if v(sample.voltage) < v(low.voltage) - 1e-12 {
                low = *sample;
            }
            if v(sample.voltage) > v(high.voltage) + 1e-12 {
                high = *sample;
            }
        }
        Some(Rail {
            id,
            samples,
            low,
            high,
            named,
            mode_free,
            battery_free,
        })
    }

    fn nominal(vdd: ElectricPotential) -> Rail<'p> {
        let at = AtPoint {
            voltage: vdd,
            point: None,
        };
        Rail {
            id: None,
            samples: vec![at],
            low: at,
            high: at,
            named: None,
            mode_free: true,
            battery_free: true,
        }
    }

    fn ends(&self) -> RailEnds<'p> {
        (self.low, self.high)
    }

    fn at(&self, point: &OperatingPoint) -> Option<AtPoint<'p>> {
        self.samples
            .iter()
            .find(|s| s.point.is_some_and(|p| std::ptr::eq(p, point)))
            .copied()
    }
}

/// Where a rail is read, named in messages only when a finding fires.
#[derive(Clone, Copy, Debug, PartialEq)]
enum RailName {
    /// A supply pin (a `ref`).
    Pin(PinRef),
    /// A net (a pull-up's far end, or a rail an input is tied to).
    Net(NetId),
}

impl RailName {
    fn text(self, cx: &Context) -> String {
        match self {
            RailName::Pin(pin) => format!("`{}`", cx.pin_name(pin)),
            RailName::Net(net) => format!("`{}`", cx.net_name(net)),
        }
    }
}

fn vdd_text(cx: &Context, named: Option<RailName>, vdd: ElectricPotential) -> String {
    match named {
        Some(pin) => format!("VDD = {} at {}", show_voltage(vdd), pin.text(cx)),
        None => format!("VDD = {}, the family's nominal", show_voltage(vdd)),
    }
}

/// How a level was worked out. Kept as data and written out only for a
/// finding, so comparisons that pass cost no text.
#[derive(Clone, Copy, Debug)]
enum Basis {
    /// A level the plan writes (`voh`, `vil`, `max`, ...).
    Written(&'static str),
    /// A family's fixed level.
    Family { name: &'static str, scale: Scale },
    /// A family's level that follows VDD, at `vdd` on the rail `named`.
    FamilyAt {
        name: &'static str,
        scale: Scale,
        vdd: ElectricPotential,
        named: Option<RailName>,
    },
    /// A rail at its highest.
    Highest(Option<RailName>),
    /// An open-drain output pulled up by a resistor to a rail at its lowest.
    OpenDrain {
        resistor: PartId,
        named: Option<RailName>,
    },
    /// The ceiling VDD + 0.3 V at `vdd`.
    AboveRail {
        vdd: ElectricPotential,
        named: Option<RailName>,
    },
    /// A `tolerant:` rating, taken with its headroom.
    Tolerant(ElectricPotential),
}

impl Basis {
    fn text(self, cx: &Context) -> String {
        match self {
            Basis::Written(key) => format!("written `{key}`"),
            Basis::Family { name, scale } => format!("{name}: {}", scale.formula()),
            Basis::FamilyAt {
                name,
                scale,
                vdd,
                named,
            } => format!(
                "{name}: {} with {}",
                scale.formula(),
                vdd_text(cx, named, vdd)
            ),
            Basis::Highest(Some(name)) => format!("{} at its highest", name.text(cx)),
            Basis::Highest(None) => "the family's nominal VDD".to_string(),
            Basis::OpenDrain { resistor, named } => format!(
                "open drain pulled up by `{}` to {} at its lowest",
                cx.part_name(resistor),
                named.map(|n| n.text(cx)).unwrap_or_default()
            ),
            Basis::AboveRail { vdd, named } => {
                format!("VDD + 0.3 V with {}", vdd_text(cx, named, vdd))
            }
            Basis::Tolerant(t) => format!(
                "`tolerant: {}`, taken as up to {}",
                show_voltage(t),
                show_voltage(t * TOLERANT_HEADROOM)
            ),
        }
    }
}

/// A level with how it was worked out, for the message.
#[derive(Clone)]
struct Level<'p> {
    value: ElectricPotential,
    basis: Basis,
    point: Option<&'p OperatingPoint>,
}

impl<'p> Level<'p> {
    fn written(value: ElectricPotential, key: &'static str) -> Level<'p> {
        Level {
            value,
            basis: Basis::Written(key),
            point: None,
        }
    }

    /// A family's level with VDD at `at`, one of the rail's values.
    fn from_family(
        scale: Scale,
        family: LogicFamily,
        rail: &Rail<'p>,
        at: AtPoint<'p>,
    ) -> Level<'p> {
        let name = family_name(family);
        if !scale.follows_vdd() {
            return Level {
                value: scale.at(at.voltage),
                basis: Basis::Family { name, scale },
                point: None,
            };
        }
        Level {
            value: scale.at(at.voltage),
            basis: Basis::FamilyAt {
                name,
                scale,
                vdd: at.voltage,
                named: rail.named,
            },
            point: at.point,
        }
    }
}

fn ground_potential(cx: &Context, point: &OperatingPoint, part: PartId) -> ElectricPotential {
    cx.circuit.ground_net[part]
        .and_then(|n| point.net_potential[n])
        .unwrap_or_else(|| volts(0.0))
}

/// Whether a part has power at a point: a supply input on a fed rail, or a
/// USB cable to a host.
fn powered(cx: &Context, point: &OperatingPoint, part: PartId) -> bool {
    let fed_input = cx.plan.parts[part]
        .pins
        .iter()
        .enumerate()
        .any(|(i, p)| p.role == PinRole::SupplyIn && point.pin_voltage.get(part, i).is_some());
    fed_input
        || cx.circuit.part_links[part]
            .iter()
            .any(|&l| cx.plan.links[l].device.0 == part)
}

/// The voltage a supply pin gives its part's logic, above the part's ground.
/// Read from the pin's own solved voltage, its net's potential, or, for an
/// onboard output left unwired, the output's regulated band while the part
/// is powered.
pub(super) fn supply_voltage(
    cx: &Context,
    point: &OperatingPoint,
    part: PartId,
    pin: usize,
) -> Option<ElectricPotential> {
    if let Some(value) = point.pin_voltage.get(part, pin) {
        return Some(value);
    }
    let spec = &cx.plan.parts[part].pins[pin];
    if let Some(net) = spec.net {
        return point.net_potential[net].map(|p| p - ground_potential(cx, point, part));
    }
    // An onboard output left unwired still powers its own part's pins.
    if spec.role == PinRole::SupplyOut && powered(cx, point, part) {
        return spec.voltage().map(|band| match point.corner {
            Corner::Low => band.min,
            Corner::High => band.max,
        });
    }
    None
}

/// A voltage at every settled point where it is positive.
fn sampled<'p>(
    cx: &'p Context,
    measure: impl Fn(&OperatingPoint) -> Option<ElectricPotential>,
) -> Vec<AtPoint<'p>> {
    cx.points()
        .filter_map(|point| {
            let voltage = measure(point).filter(|x| v(*x) > 0.0)?;
            Some(AtPoint {
                voltage,
                point: Some(point),
            })
        })
        .collect()
}

/// The rail behind a logic pin: its `ref` pin over the operating points, or
/// the family's nominal VDD when it has no `ref`.
enum PinRail<'p> {
    Known(Rail<'p>),
    /// The `ref` rail has no voltage (unfed): the pin is not judged.
    Unfed,
    /// Neither `ref` nor `family`: only written levels are known.
    Unknown,
}

impl<'p> PinRail<'p> {
    /// `Err` for an unfed rail.
    fn known(self) -> Result<Option<Rail<'p>>, ()> {
        match self {
            PinRail::Known(rail) => Ok(Some(rail)),
            PinRail::Unfed => Err(()),
            PinRail::Unknown => Ok(None),
        }
    }
}

fn pin_rail<'p>(cx: &'p Context, pin: PinRef, spec: &LogicSpec) -> PinRail<'p> {
    if let Some(reference) = spec.reference {
        let supply = PinRef {
            part: pin.part,
            pin: reference,
        };
        let id = match cx.plan.parts[pin.part].pins[reference].net {
            Some(net) => RailId::Node(cx.circuit.node_of_net[net]),
            None => RailId::Pin(supply),
        };
        // A supply outside its pin's operating range is reported once, by
        // `voltage/under-range` or `voltage/over-range`; the levels that follow
        // it are judged within that range, so the one fix (bring the rail into
        // range) settles both.
        let range = match cx.plan.parts[pin.part].pins[reference].role {
            PinRole::SupplyIn => cx.plan.parts[pin.part].pins[reference].range(),
            _ => None,
        };
        let samples = sampled(cx, |point| {
            supply_voltage(cx, point, pin.part, reference).map(|vdd| match range {
                Some(range) if v(vdd) > 0.0 => vdd.max(range.min).min(range.max),
                _ => vdd,
            })
        });
        let named = Some(RailName::Pin(supply));
        return match Rail::from_samples(Some(id), samples, named) {
            Some(rail) => PinRail::Known(rail),
            None => PinRail::Unfed,
        };
    }
    match spec.family {
        Some(family) => PinRail::Known(Rail::nominal(family.levels().nominal_vdd)),
        None => PinRail::Unknown,
    }
}

/// A rail reached through a net (a pull-up's far end, or a net an input is
/// tied to), measured from the receiver's ground.
fn net_rail<'p>(cx: &'p Context, net: NetId, receiver: PartId) -> Option<Rail<'p>> {
    let samples = sampled(cx, |point| {
        point.net_potential[net].map(|p| p - ground_potential(cx, point, receiver))
    });
    Rail::from_samples(
        Some(RailId::Node(cx.circuit.node_of_net[net])),
        samples,
        Some(RailName::Net(net)),
    )
}

// ----- signals ---------------------------------------------------------------

/// Something that can set the level on a signal.
#[derive(Clone, Copy, Debug, PartialEq)]
enum Source {
    /// A `logic-out`, `logic-io` or `open-drain` pin.
    Pin(PinRef),
    /// A resistor from the signal to a rail.
    PullUp { resistor: PartId, rail: NetId },
    /// The net the input sits on is itself a rail.
    Tied(NetId),
}

/// Electrical nodes that carry no supply and no ground, joined through
/// series resistors, with what hangs on them.
#[derive(Default)]
pub(super) struct Signal {
    nets: Vec<NetId>,
    /// Logic pins, in net order.
    pins: Vec<PinRef>,
    pull_ups: Vec<(PartId, NetId)>,
    pull_downs: Vec<PartId>,
    /// Bridge outputs and windings: not logic, but they do drive the net.
    other_drivers: usize,
}

fn is_power_node(cx: &Context, node: usize) -> bool {
    let n = &cx.circuit.nodes[node];
    !n.supply_outs.is_empty()
        || !n.supply_ins.is_empty()
        || !n.grounds.is_empty()
        || !cx.circuit.vbus[node].is_empty()
}

/// Both ends of every resistor that is wired at both ends.
fn resistors(cx: &Context) -> Vec<(PartId, NetId, NetId)> {
    cx.plan
        .parts
        .iter()
        .enumerate()
        .filter(|(_, p)| matches!(p.class, Class::Resistor(_)))
        .filter_map(|(id, part)| {
            let a = part.pin("a").and_then(|i| part.pins[i].net)?;
            let b = part.pin("b").and_then(|i| part.pins[i].net)?;
            Some((id, a, b))
        })
        .collect()
}

/// Per net: the rail a pull-up resistor ties its signal to (through series
/// resistors too), if any. `ground/offset` reads open-drain highs from it.
pub(super) fn pull_up_rails(cx: &Context) -> Vec<Option<NetId>> {
    let mut rails = vec![None; cx.plan.nets.len()];
    for signal in signals(cx) {
        if let Some(&(_, rail)) = signal.pull_ups.first() {
            for &net in &signal.nets {
                rails[net] = Some(rail);
            }
        }
    }
    rails
}

/// The plan's signals, worked out once per run.
fn signals<'c>(cx: &'c Context) -> &'c [Signal] {
    cx.worked.signals.get_or_init(|| find_signals(cx))
}

fn find_signals(cx: &Context) -> Vec<Signal> {
    let circuit = cx.circuit;
    let node_count = circuit.nodes.len();
    let mut joined = UnionFind::<usize>::new(node_count);
    let resistors = resistors(cx);
    for &(_, a, b) in &resistors {
        let (na, nb) = (circuit.node_of_net[a], circuit.node_of_net[b]);
        if !is_power_node(cx, na) && !is_power_node(cx, nb) {
            joined.union(na, nb);
        }
    }
    let mut index_of_root = vec![usize::MAX; node_count];
    let mut found: Vec<Signal> = Vec::new();
    for (net_id, net) in cx.plan.nets.iter().enumerate() {
        let node = circuit.node_of_net[net_id];
        if is_power_node(cx, node) {
            continue;
        }
        let root = joined.find(node);
        if index_of_root[root] == usize::MAX {
            index_of_root[root] = found.len();
            found.push(Signal::default());
        }
        let signal = &mut found[index_of_root[root]];
        signal.nets.push(net_id);
        for &pin in &net.pins {
            match cx.plan.parts[pin.part].pins[pin.pin].role {
                role if role.is_logic() => signal.pins.push(pin),
                PinRole::BridgeOut | PinRole::Winding => signal.other_drivers += 1,
                _ => {}
            }
        }
    }
    for &(resistor, a, b) in &resistors {
        for (here, there) in [(a, b), (b, a)] {
            let (nh, nt) = (circuit.node_of_net[here], circuit.node_of_net[there]);
            if is_power_node(cx, nh) || !is_power_node(cx, nt) {
                continue;
            }
            let signal = &mut found[index_of_root[joined.find(nh)]];
            if circuit.nodes[nt].is_ground() {
                signal.pull_downs.push(resistor);
            } else {
                signal.pull_ups.push((resistor, there));
            }
        }
    }
    found
}

fn role_of(cx: &Context, pin: PinRef) -> PinRole {
    cx.plan.parts[pin.part].pins[pin.pin].role
}

fn logic_of(cx: &Context, pin: PinRef) -> LogicSpec {
    cx.plan.parts[pin.part].pins[pin.pin]
        .logic
        .as_deref()
        .cloned()
        .unwrap_or_default()
}

fn net_of(cx: &Context, pin: PinRef) -> Option<NetId> {
    cx.plan.parts[pin.part].pins[pin.pin].net
}

fn quoted(names: &[String]) -> String {
    let quoted: Vec<String> = names.iter().map(|n| format!("`{n}`")).collect();
    match quoted.as_slice() {
        [] => String::new(),
        [one] => one.clone(),
        [init @ .., last] => format!("{} and {last}", init.join(", ")),
    }
}

// ----- driver–receiver pairs -------------------------------------------------

/// A source on a signal, seen from one receiver, with the rail its high
/// level follows.
struct DriverSide<'p> {
    source: Source,
    spec: LogicSpec,
    /// A push-pull pin's `ref` rail; an open-drain pin's pull-up rail (the
    /// lowest, when there are several); the net of a pull-up or a tie.
    rail: Option<Rail<'p>>,
    /// The pull-up an open-drain pin's high level comes from.
    pulled_by: Option<PartId>,
}

fn driver_side<'p>(
    cx: &'p Context,
    source: Source,
    pull_ups: &[(PartId, NetId)],
    receiver: PartId,
) -> Option<DriverSide<'p>> {
    match source {
        Source::Pin(pin) if role_of(cx, pin).is_open_drain() => {
            let lowest = pull_ups
                .iter()
                .filter_map(|&(resistor, net)| Some((resistor, net_rail(cx, net, receiver)?)))
                .min_by(|a, b| v(a.1.low.voltage).total_cmp(&v(b.1.low.voltage)));
            Some(DriverSide {
                source,
                spec: logic_of(cx, pin),
                pulled_by: lowest.as_ref().map(|(r, _)| *r),
                rail: lowest.map(|(_, rail)| rail),
            })
        }
        Source::Pin(pin) => {
            let spec = logic_of(cx, pin);
            let rail = pin_rail(cx, pin, &spec).known().ok()?;
            Some(DriverSide {
                source,
                spec,
                rail,
                pulled_by: None,
            })
        }
        Source::PullUp { rail, .. } | Source::Tied(rail) => Some(DriverSide {
            source,
            spec: LogicSpec::default(),
            rail: Some(net_rail(cx, rail, receiver)?),
            pulled_by: None,
        }),
    }
}

/// What a source can put on the signal, as seen by one receiver.
#[derive(Clone)]
struct Drive<'p> {
    source: Source,
    voh: Option<Level<'p>>,
    vol: Option<Level<'p>>,
    highest: Option<Level<'p>>,
}

/// The driver's levels with its rail at `ends` (lowest, highest): VOH is
/// worst at the lowest, VOL and the highest output at the highest.
fn drive<'p>(cx: &Context, side: &DriverSide<'p>, ends: Option<RailEnds<'p>>) -> Drive<'p> {
    let spec = &side.spec;
    let family = spec.family.map(|f| (f, f.levels()));
    let written_vol = spec.vol.map(|value| Level::written(value, "vol"));
    let Source::Pin(pin) = side.source else {
        // A pull-up or a tie only sets the highest level.
        let highest = side.rail.as_ref().zip(ends).map(|(rail, (_, high))| Level {
            value: high.voltage,
            basis: Basis::Highest(rail.named),
            point: high.point,
        });
        return Drive {
            source: side.source,
            voh: None,
            vol: None,
            highest,
        };
    };
    if role_of(cx, pin).is_open_drain() {
        // Every family's VOL is a fixed voltage (format reference §3), so the
        // nominal VDD serves when the pin's own rail is not at hand.
        let vol = written_vol.or_else(|| {
            let (f, levels) = family?;
            let nominal = Rail::nominal(levels.nominal_vdd);
            Some(Level::from_family(levels.vol, f, &nominal, nominal.high))
        });
        let voh =
            side.rail
                .as_ref()
                .zip(ends)
                .zip(side.pulled_by)
                .map(|((rail, (low, _)), resistor)| Level {
                    value: low.voltage,
                    basis: Basis::OpenDrain {
                        resistor,
                        named: rail.named,
                    },
                    point: low.point,
                });
        return Drive {
            source: side.source,
            voh,
            vol,
            // Its highest level is the pull-up's rail, reported against the pull-up.
            highest: None,
        };
    }
    let from_family = |written: Option<ElectricPotential>,
                       key: &'static str,
                       pick: fn(&FamilyLevels) -> Scale,
                       at: fn(RailEnds<'p>) -> AtPoint<'p>| {
        if let Some(value) = written {
            return Some(Level::written(value, key));
        }
        let (f, levels) = family?;
        let (rail, ends) = side.rail.as_ref().zip(ends)?;
        Some(Level::from_family(pick(&levels), f, rail, at(ends)))
    };
    let voh = from_family(spec.voh, "voh", |l| l.voh, |(low, _)| low);
    let vol = from_family(spec.vol, "vol", |l| l.vol, |(_, high)| high);
    let highest = match side.rail.as_ref().zip(ends) {
        Some((rail, (_, high))) => Some(Level {
            value: high.voltage,
            basis: Basis::Highest(rail.named),
            point: high.point,
        }),
        // With no rail known, the written high level is the least it reaches.
        None => spec.voh.map(|value| Level::written(value, "voh")),
    };
    Drive {
        source: side.source,
        voh,
        vol,
        highest,
    }
}

/// A receiver and the rail its thresholds follow.
struct ReceiverSide<'p> {
    pin: PinRef,
    spec: LogicSpec,
    max: Option<ElectricPotential>,
    rail: Option<Rail<'p>>,
}

fn receiver_side<'p>(cx: &'p Context, pin: PinRef) -> Option<ReceiverSide<'p>> {
    let spec = logic_of(cx, pin);
    let rail = pin_rail(cx, pin, &spec).known().ok()?;
    Some(ReceiverSide {
        pin,
        max: cx.plan.parts[pin.part].pins[pin.pin].max,
        spec,
        rail,
    })
}

/// What a receiver accepts.
#[derive(Clone)]
struct Sense<'p> {
    pin: PinRef,
    vih: Option<Level<'p>>,
    vil: Option<Level<'p>>,
    ceiling: Option<Level<'p>>,
}

/// The receiver's thresholds with its rail at `ends` (lowest, highest): VIH
/// is worst at the highest, VIL and the ceiling at the lowest.
fn sense<'p>(side: &ReceiverSide<'p>, ends: Option<RailEnds<'p>>) -> Sense<'p> {
    let spec = &side.spec;
    let family = spec.family.map(|f| (f, f.levels()));
    let rail = side.rail.as_ref().zip(ends);
    let threshold = |written: Option<ElectricPotential>,
                     key: &'static str,
                     pick: fn(&FamilyLevels) -> Scale,
                     at: fn(RailEnds<'p>) -> AtPoint<'p>| {
        if let Some(value) = written {
            return Some(Level::written(value, key));
        }
        let (f, levels) = family?;
        let (rail, ends) = rail?;
        Some(Level::from_family(pick(&levels), f, rail, at(ends)))
    };
    let vih = threshold(spec.vih, "vih", |l| l.vih, |(_, high)| high);
    let vil = threshold(spec.vil, "vil", |l| l.vil, |(low, _)| low);
    let above_rail = rail.map(|(rail, (low, _))| Level {
        value: low.voltage + ceiling_above_vdd(),
        basis: Basis::AboveRail {
            vdd: low.voltage,
            named: rail.named,
        },
        point: low.point,
    });
    let tolerant = spec.tolerant.map(|t| Level {
        value: t * TOLERANT_HEADROOM,
        basis: Basis::Tolerant(t),
        point: None,
    });
    let ceiling = match (side.max, tolerant, above_rail) {
        (Some(max), _, _) => Some(Level::written(max, "max")),
        (None, Some(t), Some(r)) => Some(if v(t.value) >= v(r.value) { t } else { r }),
        (None, t, r) => t.or(r),
    };
    Sense {
        pin: side.pin,
        vih,
        vil,
        ceiling,
    }
}

/// One comparison of a driver and a receiver, with its verdict.
#[derive(Clone)]
struct Link<'p> {
    drive: Drive<'p>,
    sense: Sense<'p>,
    verdict: Verdict,
    net: NetId,
    /// Both sides' rails are the same in every mode: the finding names no
    /// mode.
    mode_free: bool,
    /// Both sides' rails are the same at every battery state: the finding
    /// names no battery state.
    battery_free: bool,
}

/// Every comparison one driver–receiver pair needs: a single one at each
/// side's worst extreme when their rails differ, one per operating point
/// when both follow one rail (a rail cannot be at its top and its bottom at
/// once).
fn compare<'p>(
    cx: &Context,
    driver: &DriverSide<'p>,
    receiver: &ReceiverSide<'p>,
    net: NetId,
) -> Vec<Link<'p>> {
    let link = |d: Option<RailEnds<'p>>, r: Option<RailEnds<'p>>| {
        let drive = drive(cx, driver, d);
        let sense = sense(receiver, r);
        let value = |l: &Option<Level>| l.as_ref().map(|l| l.value);
        let verdict = judge(
            value(&drive.voh),
            value(&drive.vol),
            value(&drive.highest),
            value(&sense.vih),
            value(&sense.vil),
            value(&sense.ceiling),
        );
        Link {
            drive,
            sense,
            verdict,
            net,
            mode_free: [&driver.rail, &receiver.rail]
                .iter()
                .all(|r| r.as_ref().is_none_or(|r| r.mode_free)),
            battery_free: [&driver.rail, &receiver.rail]
                .iter()
                .all(|r| r.as_ref().is_none_or(|r| r.battery_free)),
        }
    };
    if let (Some(d), Some(r)) = (&driver.rail, &receiver.rail)
        && d.id.is_some()
        && d.id == r.id
    {
        let together: Vec<Link> = d
            .samples
            .iter()
            .filter_map(|&at| {
                let there = r.at(at.point?)?;
                Some(link(Some((at, at)), Some((there, there))))
            })
            .collect();
        if !together.is_empty() {
            return together;
        }
    }
    vec![link(
        driver.rail.as_ref().map(Rail::ends),
        receiver.rail.as_ref().map(Rail::ends),
    )]
}

/// Whether every part with a logic pin on the signal shares one ground
/// (else `ground/not-shared` or `ground/floating` speaks for it).
fn shares_ground(cx: &Context, pins: &[PinRef]) -> bool {
    let mut groups = pins.iter().map(|p| cx.circuit.ground_group[p.part]);
    let Some(Some(first)) = groups.next() else {
        return false;
    };
    cx.circuit.grounded_groups[first] && groups.all(|g| g == Some(first))
}

/// Every driver–receiver pair, each with its comparisons, grouped by signal
/// (and, for inputs wired straight onto a rail, by that rail's net): a rule
/// reports each group once, however many pairs in it fail.
fn pairs<'p>(cx: &'p Context) -> Vec<Vec<PairWorst<'p>>> {
    let mut groups = Vec::new();
    for signal in signals(cx) {
        if !shares_ground(cx, &signal.pins) {
            continue;
        }
        let mut found = Vec::new();
        let receivers = signal.pins.iter().filter(|&&p| role_of(cx, p).is_input());
        for &receiver in receivers {
            let (Some(net), Some(receiving)) = (net_of(cx, receiver), receiver_side(cx, receiver))
            else {
                continue;
            };
            let pins = signal
                .pins
                .iter()
                .copied()
                .filter(|&p| p != receiver && role_of(cx, p).is_output());
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
                if let Some(driving) = driver_side(cx, source, &signal.pull_ups, receiver.part) {
                    let comparisons = compare(cx, &driving, &receiving, net);
                    record_margins(cx, &comparisons);
                    push_pair(&mut found, comparisons);
                }
            }
        }
        groups.push(found);
    }
    // Inputs wired straight onto a rail.
    for (net_id, net) in cx.plan.nets.iter().enumerate() {
        let node = cx.circuit.node_of_net[net_id];
        if !is_power_node(cx, node) || cx.circuit.nodes[node].is_ground() {
            continue;
        }
        let mut found = Vec::new();
        for &receiver in &net.pins {
            if !role_of(cx, receiver).is_input() || !shares_ground(cx, &[receiver]) {
                continue;
            }
            let (Some(driving), Some(receiving)) = (
                driver_side(cx, Source::Tied(net_id), &[], receiver.part),
                receiver_side(cx, receiver),
            ) else {
                continue;
            };
            let comparisons = compare(cx, &driving, &receiving, net_id);
            record_margins(cx, &comparisons);
            push_pair(&mut found, comparisons);
        }
        groups.push(found);
    }
    groups
}

/// Records each comparison's levels against the receiver's thresholds:
/// VOH against VIH, VOL against VIL, the highest level against the ceiling.
fn record_margins(cx: &Context, comparisons: &[Link]) {
    if cx.margins.is_none() {
        return;
    }
    for link in comparisons {
        let record = |kind, rule: &Rule, value: &Level, limit: &Level, upper: bool| {
            let margin = if upper {
                Margin::below(kind, rule.id, v(value.value), v(limit.value), Unit::Volt)
            } else {
                Margin::above(kind, rule.id, v(value.value), v(limit.value), Unit::Volt)
            };
            cx.margin(margin, |m| {
                m.at(&cx.pin_name(link.sense.pin))
                    .at_some_point(cx.plan, value.point.or(limit.point))
            });
        };
        if let (Some(voh), Some(vih)) = (&link.drive.voh, &link.sense.vih) {
            record(RatingKind::LogicHigh, &HIGH_MARGIN, voh, vih, false);
        }
        if let (Some(vol), Some(vil)) = (&link.drive.vol, &link.sense.vil) {
            record(RatingKind::LogicLow, &LOW_MARGIN, vol, vil, true);
        }
        if let (Some(high), Some(ceiling)) = (&link.drive.highest, &link.sense.ceiling) {
            record(RatingKind::LogicCeiling, &OVERVOLTAGE, high, ceiling, true);
        }
    }
}

/// The comparison of a pair where `badness` is greatest, if it is anywhere
/// (first wins on ties).
fn worst<'a, 'p>(
    comparisons: &'a [Link<'p>],
    badness: impl Fn(&Link) -> Option<f64>,
) -> Option<&'a Link<'p>> {
    let mut found: Option<(&Link, f64)> = None;
    for link in comparisons {
        if let Some(b) = badness(link)
            && found.is_none_or(|(_, f)| b > f + 1e-12)
        {
            found = Some((link, b));
        }
    }
    found.map(|(link, _)| link)
}

/// A pair's worst comparison for each level rule (`None` where it passes):
/// all the rules read of a pair, so the other comparisons are not kept.
type PairWorst<'p> = [Option<Link<'p>>; 3];

/// Where each level rule's comparison sits in a [`PairWorst`].
const OVER: usize = 0;
const HIGH: usize = 1;
const LOW: usize = 2;

/// How far a comparison is over the receiver's ceiling, when it is.
fn over_badness(l: &Link) -> Option<f64> {
    let (high, ceiling) = (l.drive.highest.as_ref()?, l.sense.ceiling.as_ref()?);
    l.verdict
        .over_ceiling
        .then(|| v(high.value) - v(ceiling.value))
}

/// How far a failing high level falls short.
fn high_badness(l: &Link) -> Option<f64> {
    l.verdict.high_fails.then_some(-v(l.verdict.high_margin?))
}

/// How far a failing low level falls short.
fn low_badness(l: &Link) -> Option<f64> {
    l.verdict.low_fails.then_some(-v(l.verdict.low_margin?))
}

/// Keeps a pair's worst comparison for each rule, and the pair only when
/// some rule fails it.
fn push_pair<'p>(found: &mut Vec<PairWorst<'p>>, comparisons: Vec<Link<'p>>) {
    let pick = |badness: fn(&Link) -> Option<f64>| worst(&comparisons, badness).cloned();
    let kept = [pick(over_badness), pick(high_badness), pick(low_badness)];
    if kept.iter().any(Option::is_some) {
        found.push(kept);
    }
}

/// The failing pairs of one group: each pair's worst comparison, and the
/// worst of them all, which the finding is written from.
struct Failures<'a, 'p> {
    worst: &'a Link<'p>,
    pairs: Vec<&'a Link<'p>>,
}

fn failures<'a, 'p>(
    group: &'a [PairWorst<'p>],
    rule: usize,
    badness: fn(&Link) -> Option<f64>,
) -> Option<Failures<'a, 'p>> {
    let pairs: Vec<&Link> = group
        .iter()
        .filter_map(|pair| pair[rule].as_ref())
        .collect();
    let mut found: Option<(&Link, f64)> = None;
    for &link in &pairs {
        if let Some(b) = badness(link)
            && found.is_none_or(|(_, f)| b > f + 1e-12)
        {
            found = Some((link, b));
        }
    }
    found.map(|(worst, _)| Failures { worst, pairs })
}

impl<'p> Failures<'_, 'p> {
    /// Every failing driver and receiver, each named once, when more than
    /// the worst pair fails: one finding speaks for the whole signal.
    fn in_all_text(&self, cx: &Context) -> String {
        if self.pairs.len() < 2 {
            return String::new();
        }
        let mut drivers: Vec<String> = Vec::new();
        let mut receivers: Vec<String> = Vec::new();
        for link in &self.pairs {
            let driver = link.driver_name(cx);
            if !drivers.contains(&driver) {
                drivers.push(driver);
            }
            let receiver = format!("`{}`", cx.pin_name(link.sense.pin));
            if !receivers.contains(&receiver) {
                receivers.push(receiver);
            }
        }
        format!(
            "; {} pairs on this signal fail in all, from {} into {}",
            self.pairs.len(),
            joined(&drivers),
            joined(&receivers),
        )
    }

    /// The worst pair's finding, with every other failing pin labelled.
    fn finding(
        &self,
        cx: &Context,
        rule: &Rule,
        message: String,
        point: Option<&OperatingPoint>,
    ) -> Finding {
        let mut finding = self.worst.finding(cx, rule, message, point);
        let mut labelled = vec![self.worst.sense.pin];
        if let Source::Pin(pin) = self.worst.drive.source {
            labelled.push(pin);
        }
        for link in &self.pairs {
            let receiver = link.sense.pin;
            if !labelled.contains(&receiver) {
                labelled.push(receiver);
                finding = finding
                    .label(cx.pin_span(receiver), "also fails")
                    .part(cx.part_name(receiver.part));
            }
            match link.drive.source {
                Source::Pin(pin) if !labelled.contains(&pin) => {
                    labelled.push(pin);
                    finding = finding
                        .label(cx.pin_span(pin), "driver")
                        .part(cx.part_name(pin.part));
                }
                Source::PullUp { resistor, rail } => {
                    finding = finding.part(cx.part_name(resistor)).net(cx.net_name(rail));
                }
                _ => {}
            }
        }
        finding
    }
}

/// Names already quoted, joined as prose: `a`, `b` and `c`.
pub(super) fn joined(names: &[String]) -> String {
    match names {
        [] => String::new(),
        [one] => one.clone(),
        [init @ .., last] => format!("{} and {last}", init.join(", ")),
    }
}

impl Link<'_> {
    fn driver_name(&self, cx: &Context) -> String {
        match self.drive.source {
            Source::Pin(pin) => format!("`{}`", cx.pin_name(pin)),
            Source::PullUp { resistor, .. } => format!("pull-up `{}`", cx.part_name(resistor)),
            Source::Tied(net) => format!("rail `{}`", cx.net_name(net)),
        }
    }

    fn margins_text(&self) -> String {
        let mut parts = Vec::new();
        if let Some(nmh) = self.verdict.high_margin {
            parts.push(format!("NMH = {}", show_voltage(nmh)));
        }
        if let Some(nml) = self.verdict.low_margin {
            parts.push(format!("NML = {}", show_voltage(nml)));
        }
        parts.join(", ")
    }

    /// The finding, with every number the link has.
    fn finding(
        &self,
        cx: &Context,
        rule: &Rule,
        message: String,
        point: Option<&OperatingPoint>,
    ) -> Finding {
        let receiver = self.sense.pin;
        let mut finding = Finding::new(rule, cx.pin_span(receiver), message)
            .part(cx.part_name(receiver.part))
            .net(cx.net_name(self.net));
        match self.drive.source {
            Source::Pin(pin) => {
                finding = finding
                    .label(cx.pin_span(pin), "driver")
                    .part(cx.part_name(pin.part));
                if let Some(net) = net_of(cx, pin) {
                    finding = finding.net(cx.net_name(net));
                }
            }
            Source::PullUp { resistor, rail } => {
                finding = finding.part(cx.part_name(resistor)).net(cx.net_name(rail));
            }
            Source::Tied(_) => {}
        }
        if let Some(point) = point {
            finding = match (self.mode_free, self.battery_free) {
                (true, true) => finding,
                (true, false) => finding.at_battery(point.battery),
                _ => finding.at_point(cx.plan, point),
            };
        }
        let levels = [
            ("voh", &self.drive.voh),
            ("vol", &self.drive.vol),
            ("high_level", &self.drive.highest),
            ("vih", &self.sense.vih),
            ("vil", &self.sense.vil),
            ("ceiling", &self.sense.ceiling),
        ];
        for (key, level) in levels {
            if let Some(level) = level {
                finding = finding.value(key, v(level.value));
            }
        }
        if let Some(nmh) = self.verdict.high_margin {
            finding = finding.value("nmh", v(nmh));
        }
        if let Some(nml) = self.verdict.low_margin {
            finding = finding.value("nml", v(nml));
        }
        finding
    }
}

/// Where a comparison fails: its mode and battery state, or only the parts
/// of them it depends on (a regulated rail fails the same in every mode and
/// at every battery state).
fn at_text(cx: &Context, point: Option<&OperatingPoint>, link: &Link) -> String {
    point.map_or(String::new(), |p| {
        match (link.mode_free, link.battery_free) {
            (true, true) => " in every mode and battery state".to_string(),
            (true, false) => format!(" at {} battery (in every mode)", p.battery.name()),
            _ => format!(" {}", mode_label(cx.plan, p.mode, p.battery)),
        }
    })
}

/// The three level rules (`logic/overvoltage`, `logic/high-margin`,
/// `logic/low-margin`) over one set of driver–receiver pairs, worked out once.
fn check_levels(cx: &Context, out: &mut Vec<Finding>) {
    let groups = pairs(cx);
    check_overvoltage(cx, &groups, out);
    check_high_margin(cx, &groups, out);
    check_low_margin(cx, &groups, out);
}

fn check_overvoltage(cx: &Context, groups: &[Vec<PairWorst>], out: &mut Vec<Finding>) {
    for group in groups {
        let Some(failed) = failures(group, OVER, over_badness) else {
            continue;
        };
        let link = failed.worst;
        let (Some(high), Some(ceiling)) = (&link.drive.highest, &link.sense.ceiling) else {
            continue;
        };
        let point = high.point.or(ceiling.point);
        let (shown, limit) = show_voltages_apart(high.value, ceiling.value);
        let receiver = cx.pin_name(link.sense.pin);
        let mut message = match link.drive.source {
            Source::Tied(net) => format!(
                "`{receiver}` is wired straight to rail `{}`, which reaches {shown}{}, above its {limit} input ceiling ({})",
                cx.net_name(net),
                at_text(cx, point, link),
                ceiling.basis.text(cx),
            ),
            _ => format!(
                "{} takes `{}` up to {shown} ({}){}, above the {limit} input ceiling of `{receiver}` ({})",
                link.driver_name(cx),
                cx.net_name(link.net),
                high.basis.text(cx),
                at_text(cx, point, link),
                ceiling.basis.text(cx),
            ),
        };
        let margins = link.margins_text();
        if !margins.is_empty() {
            message = format!("{message}; {margins}");
        }
        message.push_str(&failed.in_all_text(cx));
        out.push(
            failed.finding(cx, &OVERVOLTAGE, message, point)
                .help("put a level shifter between them, power the driver (or pull-up) from the receiver's rail, or use an input rated for the higher level (`tolerant: 5 V`)"),
        );
    }
}

fn check_high_margin(cx: &Context, groups: &[Vec<PairWorst>], out: &mut Vec<Finding>) {
    for group in groups {
        let Some(failed) = failures(group, HIGH, high_badness) else {
            continue;
        };
        let link = failed.worst;
        let (Some(voh), Some(vih)) = (&link.drive.voh, &link.sense.vih) else {
            continue;
        };
        let point = voh.point.or(vih.point);
        let (shown, limit) = show_voltages_apart(voh.value, vih.value);
        let message = format!(
            "{} drives `{}` high to as little as {shown} ({}){}, below the {limit} `{}` needs to read a high ({}): {}{}",
            link.driver_name(cx),
            cx.net_name(link.net),
            voh.basis.text(cx),
            at_text(cx, point, link),
            cx.pin_name(link.sense.pin),
            vih.basis.text(cx),
            link.margins_text(),
            failed.in_all_text(cx),
        );
        out.push(
            failed.finding(cx, &HIGH_MARGIN, message, point)
                .help("use a level shifter, a receiver with TTL-level inputs (VIH 2.0 V), or a driver on the receiver's rail; for an open-drain output, pull up to the receiver's rail"),
        );
    }
}

fn check_low_margin(cx: &Context, groups: &[Vec<PairWorst>], out: &mut Vec<Finding>) {
    for group in groups {
        let Some(failed) = failures(group, LOW, low_badness) else {
            continue;
        };
        let link = failed.worst;
        let (Some(vol), Some(vil)) = (&link.drive.vol, &link.sense.vil) else {
            continue;
        };
        let point = vil.point.or(vol.point);
        let (shown, limit) = show_voltages_apart(vol.value, vil.value);
        let message = format!(
            "{} drives `{}` low to as much as {shown} ({}), above the {limit} `{}` still reads as a low ({}){}: {}{}",
            link.driver_name(cx),
            cx.net_name(link.net),
            vol.basis.text(cx),
            cx.pin_name(link.sense.pin),
            vil.basis.text(cx),
            at_text(cx, point, link),
            link.margins_text(),
            failed.in_all_text(cx),
        );
        out.push(
            failed.finding(cx, &LOW_MARGIN, message, point)
                .help("use a driver that pulls lower, a receiver with a higher low threshold, or a level shifter"),
        );
    }
}

fn check_contention(cx: &Context, out: &mut Vec<Finding>) {
    let circuit = cx.circuit;
    for node in &circuit.nodes {
        let outputs: Vec<PinRef> = node
            .nets
            .iter()
            .flat_map(|&n| cx.plan.nets[n].pins.iter().copied())
            .filter(|&p| role_of(cx, p) == PinRole::LogicOut)
            .collect();
        let [first, second, ..] = outputs.as_slice() else {
            continue;
        };
        let names: Vec<String> = outputs.iter().map(|&p| cx.pin_name(p)).collect();
        let nets: Vec<String> = node
            .nets
            .iter()
            .map(|&n| cx.net_name(n).to_string())
            .collect();
        let mut finding = Finding::new(
            &CONTENTION,
            cx.pin_span(*second),
            format!(
                "push-pull outputs {} {} drive {}: whenever they disagree, one output shorts the other's rail to ground",
                quoted(&names),
                if outputs.len() == 2 { "both" } else { "all" },
                quoted(&nets)
            ),
        )
        .label(cx.pin_span(*first), "other output")
        .help("wire each output to an input (a serial link crosses TX to RX), or make all but one of them inputs");
        for &p in &outputs {
            finding = finding.part(cx.part_name(p.part));
        }
        for net in &nets {
            finding = finding.net(net);
        }
        out.push(finding);
    }
}

fn check_undriven(cx: &Context, out: &mut Vec<Finding>) {
    for signal in signals(cx) {
        let inputs: Vec<PinRef> = signal
            .pins
            .iter()
            .copied()
            .filter(|&p| matches!(role_of(cx, p), PinRole::LogicIn | PinRole::OpenDrainIo))
            .collect();
        let Some(&first) = inputs.first() else {
            continue;
        };
        let count = |role: PinRole| {
            signal
                .pins
                .iter()
                .filter(|&&p| role_of(cx, p) == role)
                .count()
        };
        let push_pull = count(PinRole::LogicOut) + count(PinRole::LogicIo) + signal.other_drivers;
        let open_drain: Vec<PinRef> = signal
            .pins
            .iter()
            .copied()
            .filter(|&p| role_of(cx, p).is_open_drain())
            .collect();
        let pulled = !signal.pull_ups.is_empty() || !signal.pull_downs.is_empty();
        let names: Vec<String> = inputs.iter().map(|&p| cx.pin_name(p)).collect();
        let nets: Vec<String> = signal
            .nets
            .iter()
            .map(|&n| cx.net_name(n).to_string())
            .collect();
        let message = if push_pull > 0 {
            continue;
        } else if open_drain.is_empty() {
            if pulled {
                continue;
            }
            let (they, read) = if inputs.len() == 1 {
                ("it floats", "reads")
            } else {
                ("they float", "read")
            };
            format!(
                "nothing drives {} on {}: no output and no pull resistor, so {they} and {read} noise",
                quoted(&names),
                quoted(&nets),
            )
        } else if signal.pull_ups.is_empty() {
            let drivers: Vec<String> = open_drain
                .iter()
                .filter(|p| !inputs.contains(p))
                .map(|&p| cx.pin_name(p))
                .collect();
            if drivers.is_empty() {
                format!(
                    "open-drain bus {} ({}) has no pull-up: every pin on it only pulls low, so nothing takes the line high and it floats whenever they let go",
                    quoted(&nets),
                    quoted(&names),
                )
            } else {
                format!(
                    "{} on {} {} driven only by open-drain {} and nothing pulls the line high: {} whenever the output lets go",
                    quoted(&names),
                    quoted(&nets),
                    if inputs.len() == 1 { "is" } else { "are" },
                    quoted(&drivers),
                    if inputs.len() == 1 {
                        "it floats"
                    } else {
                        "they float"
                    },
                )
            }
        } else {
            continue;
        };
        let mut finding = Finding::new(&UNDRIVEN, cx.pin_span(first), message).help(
            if open_drain.is_empty() {
                "wire an output to it (a serial link crosses TX to RX), or add a pull-up or pull-down resistor to fix its idle level"
            } else {
                "add a pull-up resistor from the signal to the receiver's rail"
            },
        );
        for &p in inputs.iter().chain(&open_drain) {
            // `part` skips names already listed.
            finding = finding.part(cx.part_name(p.part));
        }
        for net in &nets {
            finding = finding.net(net);
        }
        out.push(finding);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn at(family: LogicFamily, vdd: f64) -> [f64; 4] {
        let l = family.levels();
        let vdd = volts(vdd);
        [l.vih, l.vil, l.voh, l.vol].map(|s| v(s.at(vdd)))
    }

    fn close(actual: f64, expected: f64) {
        assert!(
            (actual - expected).abs() < 1e-9,
            "{actual} is not {expected}"
        );
    }

    #[test]
    fn family_rows_follow_the_published_levels() {
        // JEDEC logic-level worked example: HC at 5.0 V → VIH 3.50, VIL 1.50, VOH 4.90.
        let [vih, vil, voh, vol] = at(LogicFamily::Cmos5, 5.0);
        for (actual, expected) in [(vih, 3.5), (vil, 1.5), (voh, 4.9), (vol, 0.1)] {
            close(actual, expected);
        }
        // JESD8-7 at 1.8 V (JEDEC logic-level worked example): VIH 1.17, VIL 0.630, VOH 1.35, VOL 0.45.
        let [vih, vil, voh, vol] = at(LogicFamily::Lvcmos18, 1.8);
        for (actual, expected) in [(vih, 1.17), (vil, 0.63), (voh, 1.35), (vol, 0.45)] {
            close(actual, expected);
        }
        // JESD8C LVCMOS at VDD = 3.0 V: VOH = 2.80 V (JEDEC JESD8 logic levels).
        close(at(LogicFamily::Lvcmos33, 3.0)[2], 2.8);
        // TTL levels do not move with VDD (54/74 family).
        assert_eq!(at(LogicFamily::Ttl5, 4.5), at(LogicFamily::Ttl5, 5.5));
    }

    #[test]
    fn margins_fail_only_past_the_tolerance() {
        let some = |x: f64| Some(volts(x));
        // JEDEC logic-level worked example: 2.80 V into VIH 3.50 V → NMH −0.70 V, fails.
        let verdict = judge(
            some(2.8),
            some(0.2),
            some(3.0),
            some(3.5),
            some(1.5),
            some(5.3),
        );
        close(v(verdict.high_margin.expect("nmh")), -0.7);
        close(v(verdict.low_margin.expect("nml")), 1.3);
        assert!(verdict.high_fails && !verdict.low_fails && !verdict.over_ceiling);
        // Equal levels are a zero margin, not a failure (format reference §6, 0.1 %).
        let verdict = judge(
            some(2.0),
            some(0.8),
            some(3.6),
            some(2.0),
            some(0.8),
            some(3.6),
        );
        assert!(!verdict.high_fails && !verdict.low_fails && !verdict.over_ceiling);
        // JEDEC logic-level worked example: 5.0 V into a 3.6 V ceiling.
        assert!(judge(None, None, some(5.0), None, None, some(3.6)).over_ceiling);
    }
}
