//! The typed wiring plan: parts, pins, nets, links, modes, with `uom` quantities
//! and a source span on everything a finding may point at.
//!
//! `read` turns the YAML tree into this model, collecting every input problem;
//! `library` supplies the generic parts that plans `use`. Nothing here computes
//! currents or voltages: that is `analysis`.

/// The plan format's declaration: every key, class, pin role and mode state,
/// with its kind of value, default and meaning.
pub mod format;
mod levels;
mod library;
mod read;

pub use levels::{FamilyLevels, Scale};
pub use library::{Library, LibraryError};
pub use read::read_plan;

use crate::syntax::Span;
use crate::units::{Band, DischargeRate, WireSize};
use uom::si::f64::{
    Capacitance, ElectricCharge, ElectricCurrent, ElectricPotential, ElectricalResistance, Length,
    Power, Ratio, ThermalResistance, ThermodynamicTemperature, Time,
};

/// An input problem: the plan cannot be read as written.
#[derive(Clone, Debug, PartialEq)]
pub struct InputError {
    /// What is wrong, lowercase, identifiers in backticks (`unknown part \`pack\``).
    pub message: String,
    /// Where in the source it is: the report shows this line and column.
    pub span: Span,
    /// How to fix it, e.g. "write `5 Ah`".
    pub hint: Option<String>,
}

/// A part's place in [`Plan::parts`].
pub type PartId = usize;
/// A net's place in [`Plan::nets`].
pub type NetId = usize;
/// A pin's place in its part's [`Part::pins`].
pub type PinIndex = usize;

/// A pin of a part, by index.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct PinRef {
    /// The part the pin belongs to.
    pub part: PartId,
    /// The pin within that part.
    pub pin: PinIndex,
}

/// A wiring plan as read: its parts, the nets and cables joining them, its
/// modes, with every value in its unit and every entry's place in the file.
#[derive(Clone, Debug)]
pub struct Plan {
    /// The plan's title (`name:`), shown on reports and the diagram.
    pub name: Option<String>,
    /// The plan's revision (`revision:`), for the title block.
    pub revision: Option<String>,
    /// The date of this revision (`date:`, YYYY-MM-DD), for the title block;
    /// never the clock's, so output is the same on every run.
    pub date: Option<String>,
    /// Who drew the plan (`author:`), for the title block.
    pub author: Option<String>,
    /// The air temperature around the electronics (`ambient:`, 25 °C when left
    /// out), for the heat checks.
    pub ambient: ThermodynamicTemperature,
    /// Whether the plan writes `ambient`: only then do wires take its
    /// temperature (format reference §4); else copper is taken at 20 °C.
    pub ambient_given: bool,
    /// The project-wide limits (`limits:`), defaults filled in.
    pub limits: Limits,
    /// The parts, in file order; a [`PartId`] indexes this list.
    pub parts: Vec<Part>,
    /// The nets, in file order; a [`NetId`] indexes this list.
    pub nets: Vec<Net>,
    /// The cables between ports (`links:`), in file order.
    pub links: Vec<Link>,
    /// User modes, in file order (`typical` and `worst` are built in, not listed).
    pub modes: Vec<Mode>,
    /// The share of time spent in each mode (`profile:`), for the runtime; empty
    /// when the plan gives none.
    pub profile: Vec<ProfileShare>,
    /// Supplies from outside the robot that may be connected (`supplies:`),
    /// in file order; none of them is connected in normal running.
    pub supplies: Vec<ExternalSupply>,
    /// Named power scenarios (`scenarios:`), in file order.
    pub scenarios: Vec<DeclaredScenario>,
    /// The whole document, for findings about the plan as a whole.
    pub span: Span,
}

/// The project-wide limits a plan sets under `limits:` (format reference §1).
#[derive(Clone, Copy, Debug)]
pub struct Limits {
    /// The largest supply-plus-return wire drop allowed, as a share of the
    /// source's voltage (5 % when left out).
    pub wire_drop: Ratio,
    /// The share of a continuous rating a continuous load may use (80 % when
    /// left out).
    pub derate: Ratio,
    /// How many motors may stall at the same moment in `worst`; `None`
    /// stalls them all (format reference §6).
    pub stall_at_once: Option<Rated<u32>>,
}

/// A part of the plan, with its class's fields and every pin it has.
#[derive(Clone, Debug)]
pub struct Part {
    /// Its name in `parts:` (`pack`, `left_motor`).
    pub name: String,
    /// The part's name in `parts:`.
    pub span: Span,
    /// The library id it was made from (`battery/lipo-3s`), if any.
    pub library_id: Option<String>,
    /// What it is, with the ratings its class takes.
    pub class: Class,
    /// Its pins: the class's fixed pins, the library part's and those the plan
    /// writes; a [`PinIndex`] indexes this list.
    pub pins: Vec<Pin>,
    /// Its cable ports (`ports:`), in file order.
    pub ports: Vec<Port>,
    /// It moves something (a motor, a servo, a `load` with `moves: true`):
    /// a stop switch must be able to cut its power.
    pub actuator: bool,
    /// What it weighs, when the plan or its library part says.
    pub mass: Option<uom::si::f64::Mass>,
    /// What it costs, a plain number in the plan's own currency (none is
    /// assumed), when the plan or its library part says.
    pub cost: Option<f64>,
}

impl Part {
    /// The index of the pin of this name, or `None` when the part has no such pin.
    pub fn pin(&self, name: &str) -> Option<PinIndex> {
        self.pins.iter().position(|p| p.name == name)
    }

    /// Its pins of one role, with their indices, in pin order.
    pub fn pins_with_role(&self, role: PinRole) -> impl Iterator<Item = (PinIndex, &Pin)> {
        self.pins
            .iter()
            .enumerate()
            .filter(move |(_, p)| p.role == role)
    }

    /// Its class as a plan writes it (`battery`, `regulator`).
    pub fn kind_name(&self) -> &'static str {
        self.class.name()
    }
}

/// What a pin does in the circuit (`role:`, format reference §3).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum PinRole {
    /// Provides a rail: a battery's positive, a regulator's output, a board's
    /// onboard regulator (`supply-out`).
    SupplyOut,
    /// Takes power from a rail (`supply-in`).
    SupplyIn,
    /// The part's 0 V reference and return (`ground`).
    Ground,
    /// Conducts to its partner pin of the same part: a fuse, a switch, a
    /// connector contact (`through`).
    Through,
    /// A motor driver's output terminal, paired by the driver's channels
    /// (`bridge-out`).
    BridgeOut,
    /// A motor terminal (`winding`).
    Winding,
    /// A push-pull logic output (`logic-out`).
    LogicOut,
    /// An output that only pulls low; a pull-up resistor sets its high level
    /// (`open-drain`).
    OpenDrain,
    /// A logic input (`logic-in`).
    LogicIn,
    /// A bidirectional logic pin: an output and an input (`logic-io`).
    LogicIo,
    /// A bidirectional pin of an open-drain bus (I2C data and clock): it
    /// reads the line and only ever pulls it low.
    OpenDrainIo,
    /// A resistor terminal: conducts through the resistance, never a rail.
    Passive,
}

impl PinRole {
    /// The roles a plan may write, by the name it writes them with (`passive` is
    /// only the resistor's own).
    pub const WRITTEN: [(&'static str, PinRole); 11] = [
        ("supply-out", PinRole::SupplyOut),
        ("supply-in", PinRole::SupplyIn),
        ("ground", PinRole::Ground),
        ("through", PinRole::Through),
        ("bridge-out", PinRole::BridgeOut),
        ("winding", PinRole::Winding),
        ("logic-out", PinRole::LogicOut),
        ("open-drain", PinRole::OpenDrain),
        ("logic-in", PinRole::LogicIn),
        ("logic-io", PinRole::LogicIo),
        ("open-drain-io", PinRole::OpenDrainIo),
    ];

    /// The role as a plan writes it (`supply-in`).
    pub fn name(self) -> &'static str {
        match self {
            PinRole::Passive => "passive",
            other => PinRole::WRITTEN
                .iter()
                .find(|(_, r)| *r == other)
                .map_or("passive", |(n, _)| n),
        }
    }

    /// Reads a logic level: an input or a bidirectional pin.
    pub fn is_input(self) -> bool {
        matches!(
            self,
            PinRole::LogicIn | PinRole::LogicIo | PinRole::OpenDrainIo
        )
    }

    /// Sets a signal's level: a push-pull or an open-drain output.
    pub fn is_output(self) -> bool {
        self.drives_high() || self.is_open_drain()
    }

    /// Only pulls the signal low; a pull-up resistor's rail sets its high.
    pub fn is_open_drain(self) -> bool {
        matches!(self, PinRole::OpenDrain | PinRole::OpenDrainIo)
    }

    /// Can take a signal high by itself (a push-pull output); an open-drain
    /// pin only pulls low and leaves the high level to its pull-up.
    pub fn drives_high(self) -> bool {
        matches!(self, PinRole::LogicOut | PinRole::LogicIo)
    }

    /// Carries a logic signal: any output, input or bidirectional logic pin.
    pub fn is_logic(self) -> bool {
        matches!(
            self,
            PinRole::LogicOut
                | PinRole::OpenDrain
                | PinRole::LogicIn
                | PinRole::LogicIo
                | PinRole::OpenDrainIo
        )
    }
}

/// A pin of a part, with the ratings its role takes.
#[derive(Clone, Debug)]
pub struct Pin {
    /// Its name within the part (`vin`, `pos`, `sda`).
    pub name: String,
    /// What it does in the circuit.
    pub role: PinRole,
    /// Where the pin is written in the plan, or the part's span when it comes
    /// from the library or the class.
    pub span: Span,
    /// Absolute maximum of a supply-in or logic input pin.
    pub max: Option<ElectricPotential>,
    /// A supply pin's ratings (boxed: most pins are logic or contacts and
    /// have none, and a plan holds every pin for the whole run).
    supply: Option<Box<SupplyRatings>>,
    /// `or: diode`: the source cannot be back-fed.
    pub diode_or: bool,
    /// The logic levels of a logic pin, as written (boxed: most pins have none).
    pub logic: Option<Box<LogicSpec>>,
    /// Its net, once nets are read.
    pub net: Option<NetId>,
    /// Where it is named in `nets:`.
    pub net_span: Option<Span>,
}

/// The ratings only a supply pin takes.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct SupplyRatings {
    /// Operating range of a supply-in pin.
    pub range: Option<Band<ElectricPotential>>,
    /// Current a supply-in pin takes from its rail, per load state.
    pub draw: Option<Draw>,
    /// Voltage of a board's supply-out pin.
    pub voltage: Option<Band<ElectricPotential>>,
    /// Current limit of a supply-out pin.
    pub current: Option<ElectricCurrent>,
}

impl Pin {
    /// A pin of this name and role with nothing else known yet.
    pub fn new(name: &str, role: PinRole, span: Span) -> Pin {
        Pin {
            name: name.to_string(),
            role,
            span,
            max: None,
            supply: None,
            diode_or: false,
            logic: None,
            net: None,
            net_span: None,
        }
    }

    /// Operating range of a supply-in pin.
    pub fn range(&self) -> Option<Band<ElectricPotential>> {
        self.supply.as_ref().and_then(|s| s.range)
    }

    /// Current a supply-in pin takes from its rail, per load state.
    pub fn draw(&self) -> Option<Draw> {
        self.supply.as_ref().and_then(|s| s.draw)
    }

    /// Voltage of a board's supply-out pin.
    pub fn voltage(&self) -> Option<Band<ElectricPotential>> {
        self.supply.as_ref().and_then(|s| s.voltage)
    }

    /// Current limit of a supply-out pin.
    pub fn current(&self) -> Option<ElectricCurrent> {
        self.supply.as_ref().and_then(|s| s.current)
    }

    /// The supply ratings, to be written (made on first use).
    pub fn supply_mut(&mut self) -> &mut SupplyRatings {
        self.supply.get_or_insert_with(Box::default)
    }

    /// Drops an empty set of supply ratings, so a pin without any holds
    /// no allocation.
    pub fn settle(&mut self) {
        if self.supply.as_deref() == Some(&SupplyRatings::default()) {
            self.supply = None;
        }
    }
}

/// Current drawn by a supply-in pin in each load state.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Draw {
    /// In the `idle` state (as `typical` when not written).
    pub idle: ElectricCurrent,
    /// In normal running (as `peak` when not written).
    pub typical: ElectricCurrent,
    /// The highest: start-up, transmitting, full load (as `typical` when not
    /// written).
    pub peak: ElectricCurrent,
}

impl Draw {
    /// The current drawn in this load state.
    pub fn in_state(&self, state: LoadState) -> ElectricCurrent {
        match state {
            LoadState::Idle => self.idle,
            LoadState::Typical => self.typical,
            LoadState::Peak => self.peak,
        }
    }
}

/// Logic levels as written; the thresholds are worked out by the logic rules.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct LogicSpec {
    /// The supply pin of the same part whose rail sets the levels (`ref:`, the VDD).
    pub reference: Option<PinIndex>,
    /// The logic family that sets the thresholds from VDD.
    pub family: Option<LogicFamily>,
    /// Lowest output high level, over the family's.
    pub voh: Option<ElectricPotential>,
    /// Highest output low level, over the family's.
    pub vol: Option<ElectricPotential>,
    /// Lowest input voltage read as high, over the family's.
    pub vih: Option<ElectricPotential>,
    /// Highest input voltage read as low, over the family's.
    pub vil: Option<ElectricPotential>,
    /// The voltage the input withstands whatever its own supply (a 5 V-tolerant
    /// input).
    pub tolerant: Option<ElectricPotential>,
}

/// A logic family: sets a pin's thresholds from its supply (format reference §3).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum LogicFamily {
    /// 5 V TTL (`ttl5`).
    Ttl5,
    /// 5 V CMOS (`cmos5`).
    Cmos5,
    /// 3.3 V low-voltage TTL (`lvttl33`).
    Lvttl33,
    /// 3.3 V low-voltage CMOS (`lvcmos33`).
    Lvcmos33,
    /// 2.5 V low-voltage CMOS (`lvcmos25`).
    Lvcmos25,
    /// 1.8 V low-voltage CMOS (`lvcmos18`).
    Lvcmos18,
}

impl LogicFamily {
    /// Every family, by the name a plan writes.
    pub const ALL: [(&'static str, LogicFamily); 6] = [
        ("ttl5", LogicFamily::Ttl5),
        ("cmos5", LogicFamily::Cmos5),
        ("lvttl33", LogicFamily::Lvttl33),
        ("lvcmos33", LogicFamily::Lvcmos33),
        ("lvcmos25", LogicFamily::Lvcmos25),
        ("lvcmos18", LogicFamily::Lvcmos18),
    ];
}

/// A cable port of a part (`ports:`): one end of a [`Link`].
#[derive(Clone, Debug)]
pub struct Port {
    /// Its name within the part (`usb1`).
    pub name: String,
    /// Where it is written in the plan.
    pub span: Span,
    /// Which end of a cable it is, with its ratings.
    pub kind: PortKind,
}

/// Which end of a USB cable a port is.
#[derive(Clone, Debug)]
pub enum PortKind {
    /// A host port that provides VBUS (`usb-host`).
    UsbHost {
        /// The most current its VBUS may deliver.
        current: Option<ElectricCurrent>,
        /// Host ports marked `shared` share one limit, the smallest declared.
        shared: bool,
    },
    /// A device port that takes power from VBUS (`usb-device`).
    UsbDevice {
        /// What the part draws from VBUS through this cable.
        draw: Option<Draw>,
        /// A pin of the same part that VBUS joins.
        feeds: Option<PinIndex>,
        /// `or: diode`: VBUS joins that rail through a diode and cannot
        /// back-feed the other source.
        diode_or: bool,
    },
}

/// A part's class, with the fields that class takes (format reference §3).
#[derive(Clone, Debug)]
pub enum Class {
    /// A battery pack: the source every rail starts from.
    Battery(Battery),
    /// A fuse.
    Fuse(Fuse),
    /// A switch or an emergency stop.
    Switch(Switch),
    /// A connector whose contacts pair `a1`/`b1`, `a2`/`b2`, ….
    Connector(Connector),
    /// A voltage regulator or DC-DC converter.
    Regulator(Regulator),
    /// A motor driver of one or more H-bridges.
    Driver(Driver),
    /// A brushed DC motor.
    Motor(Motor),
    /// A resistor (pull-up, current limiting).
    Resistor(Resistor),
    /// A controller board or computer; all its pins are declared.
    Board,
    /// A sensor or encoder; all its pins are declared.
    Sensor,
    /// Any other load (lamp, fan, heater); all its pins are declared.
    Load,
    /// A level translator: each logic pin names its own `ref` side.
    Shifter,
    /// A hobby servo: a geared motor with its own driver, commanded by pulses.
    Servo,
}

impl Class {
    /// Every class, by the name a plan writes after `class:`.
    pub const NAMES: [&'static str; 13] = [
        "battery",
        "fuse",
        "switch",
        "connector",
        "regulator",
        "driver",
        "motor",
        "resistor",
        "board",
        "sensor",
        "load",
        "shifter",
        "servo",
    ];

    /// The class as a plan writes it (`battery`).
    pub fn name(&self) -> &'static str {
        match self {
            Class::Battery(_) => "battery",
            Class::Fuse(_) => "fuse",
            Class::Switch(_) => "switch",
            Class::Connector(_) => "connector",
            Class::Regulator(_) => "regulator",
            Class::Driver(_) => "driver",
            Class::Motor(_) => "motor",
            Class::Resistor(_) => "resistor",
            Class::Board => "board",
            Class::Sensor => "sensor",
            Class::Load => "load",
            Class::Servo => "servo",
            Class::Shifter => "shifter",
        }
    }
}

/// A value read from the plan with the span a finding about it points at.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Rated<Q> {
    /// The value, in its unit.
    pub value: Q,
    /// Where it is written in the plan.
    pub span: Span,
}

/// A battery's cell chemistry: sets the per-cell voltage window.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Chemistry {
    /// Lithium polymer (`lipo`).
    Lipo,
    /// Lithium-ion (`li-ion`).
    LiIon,
    /// Lithium iron phosphate (`lifepo4`).
    LiFePo4,
    /// Nickel-metal hydride (`nimh`).
    NiMh,
    /// Lead-acid (`lead-acid`).
    LeadAcid,
}

impl Chemistry {
    /// Every chemistry, by the name a plan writes.
    pub const ALL: [(&'static str, Chemistry); 5] = [
        ("lipo", Chemistry::Lipo),
        ("li-ion", Chemistry::LiIon),
        ("lifepo4", Chemistry::LiFePo4),
        ("nimh", Chemistry::NiMh),
        ("lead-acid", Chemistry::LeadAcid),
    ];

    /// The chemistry as a plan writes it (`lipo`).
    pub fn name(self) -> &'static str {
        Chemistry::ALL
            .iter()
            .find(|(_, c)| *c == self)
            .map_or("", |(n, _)| n)
    }

    /// A lithium chemistry, which takes the lithium safety cautions.
    pub fn is_lithium(self) -> bool {
        matches!(
            self,
            Chemistry::Lipo | Chemistry::LiIon | Chemistry::LiFePo4
        )
    }
}

/// A battery pack's fields (`class: battery`).
#[derive(Clone, Debug)]
pub struct Battery {
    /// The cell chemistry.
    pub chemistry: Chemistry,
    /// Cells in series; `None` when the pack is given by its `voltage:`
    /// window instead.
    pub cells: Option<u32>,
    /// The rated capacity, for the runtime.
    pub capacity: Option<Rated<ElectricCharge>>,
    /// The largest continuous discharge, as written: a current or a C-rate.
    pub max_discharge: Option<Rated<DischargeRate>>,
    /// The pack's internal resistance: the terminal voltage sags by current × this
    /// (0 Ω when left out).
    pub internal_resistance: ElectricalResistance,
    /// A low-voltage cutoff or protection board is fitted.
    pub cutoff: bool,
    /// Explicit terminal window (`voltage: 10 V..12.6 V`) instead of cells × chemistry.
    pub voltage: Option<Band<ElectricPotential>>,
    /// Share of the rated capacity the runtime estimate may use (default 100 %:
    /// capacity is rated down to the cut-off voltage).
    pub usable: Ratio,
    /// The most current the pack (or its protection board) is rated to deliver
    /// into a short until a fuse opens.
    pub short_circuit: Option<Rated<ElectricCurrent>>,
}

impl Battery {
    /// `3S lipo`, or just the chemistry for a pack given by its window.
    pub fn pack_name(&self) -> String {
        match self.cells {
            Some(n) => format!("{n}S {}", self.chemistry.name()),
            None => self.chemistry.name().to_string(),
        }
    }

    /// `max_discharge` in amperes: as written, or C-rate × capacity per hour
    /// (the IEC "It" reference current, Linden & Reddy, Handbook of Batteries).
    pub fn max_discharge_current(&self) -> Option<ElectricCurrent> {
        match self.max_discharge?.value {
            DischargeRate::Current(i) => Some(i),
            DischargeRate::CRate(c) => self.capacity.map(|cap| {
                ElectricCurrent::new::<uom::si::electric_current::ampere>(
                    c * cap.value.get::<uom::si::electric_charge::ampere_hour>(),
                )
            }),
        }
    }
}

/// How quickly a fuse blows.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum FuseSpeed {
    /// A fast-acting fuse (`fast`, the default).
    Fast,
    /// A time-delay fuse (`slow`): rides through a motor's start.
    Slow,
}

/// A fuse's fields (`class: fuse`).
#[derive(Clone, Debug)]
pub struct Fuse {
    /// Its rated current.
    pub rating: Option<Rated<ElectricCurrent>>,
    /// Its DC voltage rating: the highest voltage it may interrupt.
    pub voltage: Option<Rated<ElectricPotential>>,
    /// How quickly it blows.
    pub speed: FuseSpeed,
    /// Its breaking capacity: the largest fault current it can interrupt.
    pub breaking: Option<Rated<ElectricCurrent>>,
    /// The resistance of its closed contact, where the plan gives it.
    pub contact_resistance: Option<Rated<ElectricalResistance>>,
}

/// A switch's fields (`class: switch`).
#[derive(Clone, Debug)]
pub struct Switch {
    /// Its contacts' continuous rating.
    pub rating: Option<Rated<ElectricCurrent>>,
    /// The current its contacts may carry for a moment (motor start, stall).
    pub surge: Option<Rated<ElectricCurrent>>,
    /// Its DC voltage rating: the highest voltage it may interrupt.
    pub voltage: Option<Rated<ElectricPotential>>,
    /// An emergency stop or kill switch.
    pub stop: bool,
    /// The resistance of its closed contact, where the plan gives it.
    pub contact_resistance: Option<Rated<ElectricalResistance>>,
}

/// A connector's fields (`class: connector`).
#[derive(Clone, Debug)]
pub struct Connector {
    /// Per contact, continuous.
    pub rating: Option<Rated<ElectricCurrent>>,
    /// Per contact, for a moment (motor start, stall).
    pub surge: Option<Rated<ElectricCurrent>>,
    /// The resistance of one closed contact, where the plan gives it.
    pub contact_resistance: Option<Rated<ElectricalResistance>>,
}

/// How a regulator converts (`topology:`).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Topology {
    /// Burns the difference between input and output as heat (`linear`).
    Linear,
    /// A switching step-down converter (`buck`, also written `switching`).
    Buck,
    /// A switching step-up converter (`boost`).
    Boost,
    /// A switching converter that steps up or down (`buck-boost`).
    BuckBoost,
}

impl Topology {
    /// The topology as a plan writes it (`buck-boost`).
    pub fn name(self) -> &'static str {
        match self {
            Topology::Linear => "linear",
            Topology::Buck => "buck",
            Topology::Boost => "boost",
            Topology::BuckBoost => "buck-boost",
        }
    }

    /// A switching converter: its input power is its output power over its
    /// efficiency, rather than its input current being its output current.
    pub fn is_switching(self) -> bool {
        self != Topology::Linear
    }
}

/// A regulator's fields (`class: regulator`); its input range is on its `vin` pin.
#[derive(Clone, Debug)]
pub struct Regulator {
    /// How it converts.
    pub topology: Topology,
    /// Its output voltage and tolerance.
    pub output: Band<ElectricPotential>,
    /// Its largest output current.
    pub current: Option<Rated<ElectricCurrent>>,
    /// The least input-to-output difference it needs (0 V when left out): below
    /// output + dropout the output follows the input less the dropout.
    pub dropout: ElectricPotential,
    /// A switching converter's efficiency: input power = output power / efficiency
    /// (85 % when a switching converter leaves it out).
    pub efficiency: Ratio,
    /// True when the efficiency is the assumed default, not written.
    pub efficiency_assumed: bool,
    /// Its own current from its input (ground current).
    pub quiescent: ElectricCurrent,
    /// Junction-to-ambient thermal resistance, for the heat check.
    pub theta_ja: Option<ThermalResistance>,
    /// The highest junction temperature allowed (125 °C when left out).
    pub tj_max: ThermodynamicTemperature,
    /// The capacitance across its input, which a closing switch charges.
    pub capacitance: Option<Rated<Capacitance>>,
}

/// The voltage an H-bridge loses while it conducts.
#[derive(Clone, Copy, Debug)]
pub enum BridgeDrop {
    /// Total drop across the bridge (two switches in series).
    Fixed(ElectricPotential),
    /// Resistance of each switch; two conduct at a time.
    PerSwitch(ElectricalResistance),
}

/// One H-bridge of a driver: a numbered pair of `bridge-out` pins.
#[derive(Clone, Debug)]
pub struct Channel {
    /// Its number in `channels:`, from 1.
    pub number: u32,
    /// Its two `bridge-out` pins.
    pub outputs: [PinIndex; 2],
    /// Where it is written in the plan.
    pub span: Span,
}

/// A motor driver's fields (`class: driver`); its supply range is on its `vm` pin.
#[derive(Clone, Debug)]
pub struct Driver {
    /// Each channel's continuous current rating.
    pub channel_current: Option<Rated<ElectricCurrent>>,
    /// Each channel's peak current rating.
    pub channel_peak: Option<Rated<ElectricCurrent>>,
    /// What a conducting channel loses (0 V when neither `drop` nor `rds_on` is
    /// written).
    pub drop: BridgeDrop,
    /// Its own current from `vm`.
    pub quiescent: ElectricCurrent,
    /// Its H-bridges, in file order.
    pub channels: Vec<Channel>,
    /// The capacitance across its motor supply, which a closing switch charges.
    pub capacitance: Option<Rated<Capacitance>>,
    /// Its motor supply has a clamp (braking resistor, TVS, shunt regulator)
    /// for the current a coasting motor sends back.
    pub clamp: bool,
}

/// A brushed DC motor's fields (`class: motor`).
#[derive(Clone, Debug)]
pub struct Motor {
    /// The voltage its ratings are given at.
    pub rated_voltage: ElectricPotential,
    /// The current it draws running at rated load.
    pub rated_current: ElectricCurrent,
    /// The current it draws running free.
    pub no_load_current: Option<ElectricCurrent>,
    /// The current it draws with its shaft held still, at `rated_voltage`.
    pub stall_current: ElectricCurrent,
}

/// A resistor's fields (`class: resistor`).
#[derive(Clone, Debug)]
pub struct Resistor {
    /// Its resistance.
    pub value: ElectricalResistance,
    /// Its power rating.
    pub power: Option<Power>,
}

/// A net: pins joined by one conductor, with the wire it is run in.
#[derive(Clone, Debug)]
pub struct Net {
    /// Its name in `nets:` (`BATT+`, `GND`).
    pub name: String,
    /// Where it is named in the plan.
    pub span: Span,
    /// The pins it joins, in file order.
    pub pins: Vec<PinRef>,
    /// The conductor's size; with `length`, its resistance enters the operating point.
    pub wire: Option<Rated<WireSize>>,
    /// The conductor's length, one way.
    pub length: Option<Rated<Length>>,
    /// The insulation's temperature rating: selects the ampacity table.
    pub insulation: Option<ThermodynamicTemperature>,
    /// The air around this run (a hot enclosure), over the plan's `ambient`.
    pub ambient: Option<ThermodynamicTemperature>,
    /// The insulation colour the builder chose (`colour:`), for the wire
    /// list; railcheck never picks one.
    pub colour: Option<String>,
    /// The run is in a sheath or enclosure all the way (`sheathed: true`).
    pub sheathed: bool,
}

impl Class {
    /// The resistance of one closed contact of a fuse, switch or connector,
    /// where the plan gives it.
    pub fn contact_resistance(&self) -> Option<ElectricalResistance> {
        match self {
            Class::Fuse(f) => f.contact_resistance,
            Class::Switch(s) => s.contact_resistance,
            Class::Connector(c) => c.contact_resistance,
            _ => None,
        }
        .map(|r| r.value)
    }
}

impl Plan {
    /// The batteries, in file order.
    pub fn batteries(&self) -> Vec<PartId> {
        self.parts
            .iter()
            .enumerate()
            .filter(|(_, p)| matches!(p.class, Class::Battery(_)))
            .map(|(i, _)| i)
            .collect()
    }

    /// The net a device port's VBUS joins: the net of the pin the port
    /// `feeds`, if it names one and that pin is wired.
    pub fn fed_net(&self, part: PartId, port: usize) -> Option<NetId> {
        match self.parts[part].ports[port].kind {
            PortKind::UsbDevice {
                feeds: Some(pin), ..
            } => self.parts[part].pins[pin].net,
            _ => None,
        }
    }

    /// The temperature a net's copper is taken at: its own `ambient`, else
    /// the plan's when written; `None` means the 20 °C reference of the
    /// resistance and ampacity tables (format reference §4).
    pub fn conductor_ambient(&self, net: NetId) -> Option<ThermodynamicTemperature> {
        self.nets[net]
            .ambient
            .or(self.ambient_given.then_some(self.ambient))
    }

    /// The temperature a USB cable's copper is taken at (no per-cable ambient).
    pub fn cable_ambient(&self) -> Option<ThermodynamicTemperature> {
        self.ambient_given.then_some(self.ambient)
    }
}

/// A cable between a host port and a device port (`links:`).
#[derive(Clone, Debug)]
pub struct Link {
    /// Where it is written in the plan.
    pub span: Span,
    /// Host port end, then device port end: (part, port index).
    pub host: (PartId, usize),
    /// The device port end: (part, port index).
    pub device: (PartId, usize),
    /// The cable's conductor size.
    pub wire: Option<Rated<WireSize>>,
    /// The cable's length, one way.
    pub length: Option<Rated<Length>>,
}

/// The state a mode sets a load to.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum LoadState {
    /// Draws its `idle` current.
    Idle,
    /// Draws its `typical` current (the default in every mode but `worst`).
    Typical,
    /// Draws its `peak` current.
    Peak,
}

/// The state a mode sets a motor to.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum MotorState {
    /// Stopped: draws nothing.
    Idle,
    /// Draws `rated_current` (the default in every mode but `worst`).
    Running,
    /// Shaft held still: draws `stall_current`.
    Stall,
}

/// A part's state in a mode.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum PartState {
    /// The state of any part but a motor.
    Load(LoadState),
    /// The state of a motor.
    Motor(MotorState),
}

/// An operating mode a plan declares under `modes:`.
#[derive(Clone, Debug)]
pub struct Mode {
    /// Its name (`climb`).
    pub name: String,
    /// Where it is named in the plan.
    pub span: Span,
    /// The parts it sets, with their state; the others keep their default.
    pub states: Vec<(PartId, PartState)>,
    /// How long the mode lasts at a time (`lasts:`); `None` is as long as
    /// the robot runs.
    pub lasts: Option<Rated<Time>>,
}

/// A mode that lasts no longer than this is a brief peak: it meets peak
/// ratings and short-time checks, not continuous ratings (format reference
/// §6). 5 s is the longest duration for which IEC 60364-4-43 §434.5.2 lets a
/// conductor's heating be taken as adiabatic (I²t ≤ k²S²); beyond it the wire
/// sheds heat while it warms and its continuous ampacity governs.
pub fn brief_limit() -> Time {
    Time::new::<uom::si::time::second>(5.0)
}

impl Mode {
    /// How long it lasts when that is brief enough for short-time checks.
    pub fn brief(&self) -> Option<Time> {
        self.lasts.map(|l| l.value).filter(|&t| t <= brief_limit())
    }
}

/// One mode's share of the time (`profile:`), for the runtime.
#[derive(Clone, Debug)]
pub struct ProfileShare {
    /// The mode's name.
    pub mode: String,
    /// The share of the robot's running time spent in it.
    pub share: Ratio,
    /// Where it is written in the plan.
    pub span: Span,
}

/// What kind of supply from outside the robot a `supplies:` entry is.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum SupplyKind {
    /// A computer's USB host port, plugged into a device port of the robot.
    UsbHost,
    /// A laboratory bench supply clipped onto a net.
    Bench,
    /// A battery charger on a charge connector: meant to push current into
    /// the battery.
    Charger,
}

impl SupplyKind {
    /// The kind as a plan writes it (`usb-host`).
    pub fn name(self) -> &'static str {
        match self {
            SupplyKind::UsbHost => "usb-host",
            SupplyKind::Bench => "bench",
            SupplyKind::Charger => "charger",
        }
    }
}

/// Where a supply from outside the robot joins it.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum SupplyAttach {
    /// A `usb-device` port: (part, port index).
    Port(PartId, usize),
    /// A net its positive lead joins.
    Net(NetId),
}

/// A supply from outside the robot (`supplies:`): a laptop's USB port, a
/// bench supply, a charger.
#[derive(Clone, Debug)]
pub struct ExternalSupply {
    /// Its name under `supplies:`.
    pub name: String,
    /// Where it is named in the plan.
    pub span: Span,
    /// What it is.
    pub kind: SupplyKind,
    /// Where it joins the robot.
    pub attach: SupplyAttach,
    /// The voltage it gives.
    pub voltage: Band<ElectricPotential>,
    /// Its current limit, when known.
    pub current: Option<Rated<ElectricCurrent>>,
    /// `or: diode`: it cannot be back-fed.
    pub diode_or: bool,
    /// Batteries always removed while it is connected.
    pub replaces: Vec<PartId>,
}

/// A named power scenario (`scenarios:`).
#[derive(Clone, Debug)]
pub struct DeclaredScenario {
    /// Its name under `scenarios:`.
    pub name: String,
    /// Where it is named in the plan.
    pub span: Span,
    /// The supplies connected, as indices into [`Plan::supplies`].
    pub connected: Vec<usize>,
    /// The batteries removed.
    pub removed: Vec<PartId>,
    /// The switches open.
    pub open: Vec<PartId>,
}
