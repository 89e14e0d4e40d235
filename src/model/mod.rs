//! The typed wiring plan: parts, pins, nets, links, modes, with `uom` quantities
//! and a source span on everything a finding may point at.
//!
//! `read` turns the YAML tree into this model, collecting every input problem;
//! `library` supplies the generic parts that plans `use`. Nothing here computes
//! currents or voltages: that is `analysis`.

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
    ElectricCharge, ElectricCurrent, ElectricPotential, ElectricalResistance, Length, Power, Ratio,
    ThermalResistance, ThermodynamicTemperature, Time,
};

/// An input problem: the plan cannot be read as written.
#[derive(Clone, Debug, PartialEq)]
pub struct InputError {
    pub message: String,
    pub span: Span,
    /// How to fix it, e.g. "write `5 Ah`".
    pub hint: Option<String>,
}

pub type PartId = usize;
pub type NetId = usize;
pub type PinIndex = usize;

/// A pin of a part, by index.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct PinRef {
    pub part: PartId,
    pub pin: PinIndex,
}

#[derive(Clone, Debug)]
pub struct Plan {
    pub name: Option<String>,
    pub ambient: ThermodynamicTemperature,
    /// Whether the plan writes `ambient`: only then do wires take its
    /// temperature (format reference §4); else copper is taken at 20 °C.
    pub ambient_given: bool,
    pub limits: Limits,
    pub parts: Vec<Part>,
    pub nets: Vec<Net>,
    pub links: Vec<Link>,
    /// User modes, in file order (`typical` and `worst` are built in, not listed).
    pub modes: Vec<Mode>,
    pub profile: Vec<ProfileShare>,
    /// The whole document, for findings about the plan as a whole.
    pub span: Span,
}

#[derive(Clone, Copy, Debug)]
pub struct Limits {
    pub wire_drop: Ratio,
    pub derate: Ratio,
    /// How many motors may stall at the same moment in `worst`; `None`
    /// stalls them all (format reference §6).
    pub stall_at_once: Option<Rated<u32>>,
}

#[derive(Clone, Debug)]
pub struct Part {
    pub name: String,
    /// The part's name in `parts:`.
    pub span: Span,
    /// The library id it was made from (`battery/lipo-3s`), if any.
    pub library_id: Option<String>,
    pub class: Class,
    pub pins: Vec<Pin>,
    pub ports: Vec<Port>,
    /// It moves something (a motor, a servo, a `load` with `moves: true`):
    /// a stop switch must be able to cut its power.
    pub actuator: bool,
}

impl Part {
    pub fn pin(&self, name: &str) -> Option<PinIndex> {
        self.pins.iter().position(|p| p.name == name)
    }

    pub fn pins_with_role(&self, role: PinRole) -> impl Iterator<Item = (PinIndex, &Pin)> {
        self.pins
            .iter()
            .enumerate()
            .filter(move |(_, p)| p.role == role)
    }

    pub fn kind_name(&self) -> &'static str {
        self.class.name()
    }
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum PinRole {
    SupplyOut,
    SupplyIn,
    Ground,
    Through,
    BridgeOut,
    Winding,
    LogicOut,
    OpenDrain,
    LogicIn,
    LogicIo,
    /// A bidirectional pin of an open-drain bus (I2C data and clock): it
    /// reads the line and only ever pulls it low.
    OpenDrainIo,
    /// A resistor terminal: conducts through the resistance, never a rail.
    Passive,
}

impl PinRole {
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

#[derive(Clone, Debug)]
pub struct Pin {
    pub name: String,
    pub role: PinRole,
    /// Where the pin is written in the plan, or the part's span when it comes
    /// from the library or the class.
    pub span: Span,
    /// Operating range of a supply-in pin.
    pub range: Option<Band<ElectricPotential>>,
    /// Absolute maximum of a supply-in or logic input pin.
    pub max: Option<ElectricPotential>,
    pub draw: Option<Draw>,
    /// Voltage of a board's supply-out pin.
    pub voltage: Option<Band<ElectricPotential>>,
    /// Current limit of a supply-out pin.
    pub current: Option<ElectricCurrent>,
    /// `or: diode`: the source cannot be back-fed.
    pub diode_or: bool,
    pub logic: Option<LogicSpec>,
    /// Its net, once nets are read.
    pub net: Option<NetId>,
    /// Where it is named in `nets:`.
    pub net_span: Option<Span>,
}

/// Current drawn by a supply-in pin in each load state.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Draw {
    pub idle: ElectricCurrent,
    pub typical: ElectricCurrent,
    pub peak: ElectricCurrent,
}

impl Draw {
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
    pub reference: Option<PinIndex>,
    pub family: Option<LogicFamily>,
    pub voh: Option<ElectricPotential>,
    pub vol: Option<ElectricPotential>,
    pub vih: Option<ElectricPotential>,
    pub vil: Option<ElectricPotential>,
    pub tolerant: Option<ElectricPotential>,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum LogicFamily {
    Ttl5,
    Cmos5,
    Lvttl33,
    Lvcmos33,
    Lvcmos25,
    Lvcmos18,
}

impl LogicFamily {
    pub const ALL: [(&'static str, LogicFamily); 6] = [
        ("ttl5", LogicFamily::Ttl5),
        ("cmos5", LogicFamily::Cmos5),
        ("lvttl33", LogicFamily::Lvttl33),
        ("lvcmos33", LogicFamily::Lvcmos33),
        ("lvcmos25", LogicFamily::Lvcmos25),
        ("lvcmos18", LogicFamily::Lvcmos18),
    ];
}

#[derive(Clone, Debug)]
pub struct Port {
    pub name: String,
    pub span: Span,
    pub kind: PortKind,
}

#[derive(Clone, Debug)]
pub enum PortKind {
    UsbHost {
        current: Option<ElectricCurrent>,
        shared: bool,
    },
    UsbDevice {
        draw: Option<Draw>,
        /// A pin of the same part that VBUS joins.
        feeds: Option<PinIndex>,
        /// `or: diode`: VBUS joins that rail through a diode and cannot
        /// back-feed the other source.
        diode_or: bool,
    },
}

#[derive(Clone, Debug)]
pub enum Class {
    Battery(Battery),
    Fuse(Fuse),
    Switch(Switch),
    Connector(Connector),
    Regulator(Regulator),
    Driver(Driver),
    Motor(Motor),
    Resistor(Resistor),
    Board,
    Sensor,
    Load,
    Shifter,
    /// A hobby servo: a geared motor with its own driver, commanded by pulses.
    Servo,
}

impl Class {
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
    pub value: Q,
    pub span: Span,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Chemistry {
    Lipo,
    LiIon,
    LiFePo4,
    NiMh,
    LeadAcid,
}

impl Chemistry {
    pub const ALL: [(&'static str, Chemistry); 5] = [
        ("lipo", Chemistry::Lipo),
        ("li-ion", Chemistry::LiIon),
        ("lifepo4", Chemistry::LiFePo4),
        ("nimh", Chemistry::NiMh),
        ("lead-acid", Chemistry::LeadAcid),
    ];

    pub fn name(self) -> &'static str {
        Chemistry::ALL
            .iter()
            .find(|(_, c)| *c == self)
            .map_or("", |(n, _)| n)
    }

    pub fn is_lithium(self) -> bool {
        matches!(
            self,
            Chemistry::Lipo | Chemistry::LiIon | Chemistry::LiFePo4
        )
    }
}

#[derive(Clone, Debug)]
pub struct Battery {
    pub chemistry: Chemistry,
    /// Cells in series; `None` when the pack is given by its `voltage:`
    /// window instead.
    pub cells: Option<u32>,
    pub capacity: Option<Rated<ElectricCharge>>,
    pub max_discharge: Option<Rated<DischargeRate>>,
    pub internal_resistance: ElectricalResistance,
    pub cutoff: bool,
    /// Explicit terminal window (`voltage: 10 V..12.6 V`) instead of cells × chemistry.
    pub voltage: Option<Band<ElectricPotential>>,
    /// Share of the rated capacity the runtime estimate may use (default 100 %:
    /// capacity is rated down to the cut-off voltage).
    pub usable: Ratio,
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

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum FuseSpeed {
    Fast,
    Slow,
}

#[derive(Clone, Debug)]
pub struct Fuse {
    pub rating: Option<Rated<ElectricCurrent>>,
    pub voltage: Option<Rated<ElectricPotential>>,
    pub speed: FuseSpeed,
}

#[derive(Clone, Debug)]
pub struct Switch {
    /// Its contacts' continuous rating.
    pub rating: Option<Rated<ElectricCurrent>>,
    /// The current its contacts may carry for a moment (motor start, stall).
    pub surge: Option<Rated<ElectricCurrent>>,
    pub voltage: Option<Rated<ElectricPotential>>,
    pub stop: bool,
}

#[derive(Clone, Debug)]
pub struct Connector {
    /// Per contact, continuous.
    pub rating: Option<Rated<ElectricCurrent>>,
    /// Per contact, for a moment (motor start, stall).
    pub surge: Option<Rated<ElectricCurrent>>,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Topology {
    Linear,
    Buck,
    Boost,
    BuckBoost,
}

impl Topology {
    pub fn name(self) -> &'static str {
        match self {
            Topology::Linear => "linear",
            Topology::Buck => "buck",
            Topology::Boost => "boost",
            Topology::BuckBoost => "buck-boost",
        }
    }

    pub fn is_switching(self) -> bool {
        self != Topology::Linear
    }
}

#[derive(Clone, Debug)]
pub struct Regulator {
    pub topology: Topology,
    pub output: Band<ElectricPotential>,
    pub current: Option<Rated<ElectricCurrent>>,
    pub dropout: ElectricPotential,
    pub efficiency: Ratio,
    /// True when the efficiency is the assumed default, not written.
    pub efficiency_assumed: bool,
    pub quiescent: ElectricCurrent,
    pub theta_ja: Option<ThermalResistance>,
    pub tj_max: ThermodynamicTemperature,
}

#[derive(Clone, Copy, Debug)]
pub enum BridgeDrop {
    /// Total drop across the bridge (two switches in series).
    Fixed(ElectricPotential),
    /// Resistance of each switch; two conduct at a time.
    PerSwitch(ElectricalResistance),
}

#[derive(Clone, Debug)]
pub struct Channel {
    pub number: u32,
    pub outputs: [PinIndex; 2],
    pub span: Span,
}

#[derive(Clone, Debug)]
pub struct Driver {
    pub channel_current: Option<Rated<ElectricCurrent>>,
    pub channel_peak: Option<Rated<ElectricCurrent>>,
    pub drop: BridgeDrop,
    pub quiescent: ElectricCurrent,
    pub channels: Vec<Channel>,
}

#[derive(Clone, Debug)]
pub struct Motor {
    pub rated_voltage: ElectricPotential,
    pub rated_current: ElectricCurrent,
    pub no_load_current: Option<ElectricCurrent>,
    pub stall_current: ElectricCurrent,
}

#[derive(Clone, Debug)]
pub struct Resistor {
    pub value: ElectricalResistance,
    pub power: Option<Power>,
}

#[derive(Clone, Debug)]
pub struct Net {
    pub name: String,
    pub span: Span,
    pub pins: Vec<PinRef>,
    pub wire: Option<Rated<WireSize>>,
    pub length: Option<Rated<Length>>,
    pub insulation: Option<ThermodynamicTemperature>,
    /// The air around this run (a hot enclosure), over the plan's `ambient`.
    pub ambient: Option<ThermodynamicTemperature>,
}

impl Plan {
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

#[derive(Clone, Debug)]
pub struct Link {
    pub span: Span,
    /// Host port end, then device port end: (part, port index).
    pub host: (PartId, usize),
    pub device: (PartId, usize),
    pub wire: Option<Rated<WireSize>>,
    pub length: Option<Rated<Length>>,
}

/// The state a mode sets a load to.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum LoadState {
    Idle,
    Typical,
    Peak,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum MotorState {
    Idle,
    Running,
    Stall,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum PartState {
    Load(LoadState),
    Motor(MotorState),
}

#[derive(Clone, Debug)]
pub struct Mode {
    pub name: String,
    pub span: Span,
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

#[derive(Clone, Debug)]
pub struct ProfileShare {
    pub mode: String,
    pub share: Ratio,
    pub span: Span,
}
