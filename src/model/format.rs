//! The plan format, declared once: every key a plan may hold, what kind of
//! value it takes, its default and what it means.
//!
//! The reader takes its allowed keys, fixed pins and mode states from here;
//! the JSON Schema of the plan (`report::plan_schema`), the tables of the
//! format reference (`docs/format.md`) and `railcheck parts` are generated
//! from the same tables, so none of them can drift from what is read. How a
//! value is parsed stays in `read` and `units`; a test reads every declared
//! field with its example to keep the two in step.
//!
//! Not for: parsing or validating a plan (that is `read`).

use super::PinRole;
use crate::units::Quantity;

/// The kind of value a key takes.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Value {
    /// A physical quantity written with its unit (`12 V`, `4.5..5.5 V`).
    Quantity(Quantity),
    /// One of a fixed set of words.
    Choice(&'static [&'static str]),
    /// `true` or `false`.
    Flag,
    /// A whole number of cells in series, 1 to 1000.
    Cells,
    /// A whole number of things, 0 to 1000.
    Count,
    /// The format version: `1`.
    Version,
    /// A plain number, 0 or more, with no unit (a cost).
    Amount,
    /// Free text.
    Text,
    /// The name of another pin of the same part.
    PinOfPart,
    /// A pin's or port's draw: one current, or `{ idle, typical, peak }`.
    Draw,
    /// A driver's channels: `{ 1: [out1a, out1b], … }`.
    Channels,
    /// A mapping of a part's pins (name → pin).
    Pins,
    /// A mapping of a part's cable ports (name → port).
    Ports,
    /// A list of pins `part.pin`.
    PinList,
    /// Two ports `part.port`.
    PortPair,
    /// One port `part.port`.
    Port,
    /// A net's name, as written under `nets:`.
    NetName,
    /// A list of names (parts, supplies), as written elsewhere in the plan.
    NameList,
    /// A library part id (`battery/lipo-3s`).
    PartId,
    /// Field values laid over a library part.
    Overrides,
    /// A nested section described by its own table (`limits`, `parts`, …).
    Section(Section),
}

/// The nested sections of a plan.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Section {
    /// `limits:`: the project-wide limits ([`LIMITS`]).
    Limits,
    /// `parts:`: the parts by name, each a class's fields ([`CLASSES`]).
    Parts,
    /// `nets:`: the nets by name ([`NET`]).
    Nets,
    /// `links:`: the cables between ports ([`LINK`]).
    Links,
    /// `modes:`: operating modes, a state per part ([`MODE`]).
    Modes,
    /// `profile:`: the share of time spent in each mode.
    Profile,
    /// `sweep:`: design choices for `railcheck sweep`, each key with its values.
    Sweep,
    /// `supplies:`: supplies from outside the robot that may be connected ([`SUPPLY`]).
    Supplies,
    /// `scenarios:`: named power scenarios ([`SCENARIO`]).
    Scenarios,
}

/// One key of the format.
#[derive(Clone, Copy, Debug)]
pub struct Field {
    /// The key as a plan writes it (`wire_drop`).
    pub key: &'static str,
    /// The kind of value it takes.
    pub value: Value,
    /// Whether a plan must give it (`Required::Unless` names a key that can
    /// stand in for it).
    pub required: Required,
    /// What the reader assumes when the key is left out, as a plan would
    /// write it.
    pub default: Option<&'static str>,
    /// A value as a plan would write it, read by a test.
    pub example: &'static str,
    /// What it means, for a robot builder.
    pub meaning: &'static str,
}

/// Whether a key must be given.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Required {
    /// The key must be written.
    Yes,
    /// The key may be left out: it has a default or is optional.
    No,
    /// Required unless the named key is given.
    Unless(&'static str),
}

const fn field(
    key: &'static str,
    value: Value,
    example: &'static str,
    meaning: &'static str,
) -> Field {
    Field {
        key,
        value,
        required: Required::No,
        default: None,
        example,
        meaning,
    }
}

impl Field {
    const fn required(mut self) -> Field {
        self.required = Required::Yes;
        self
    }

    const fn unless(mut self, other: &'static str) -> Field {
        self.required = Required::Unless(other);
        self
    }

    const fn or_else(mut self, default: &'static str) -> Field {
        self.default = Some(default);
        self
    }
}

use Quantity as Q;
use Value::Quantity as Qty;

/// The top level of a plan.
pub const TOP_LEVEL: &[Field] = &[
    field(
        "railcheck",
        Value::Version,
        "1",
        "the format version; this railcheck reads `1`",
    )
    .required(),
    field(
        "name",
        Value::Text,
        "Orchard scout rover",
        "the plan's title, shown on reports and the diagram",
    ),
    field(
        "revision",
        Value::Text,
        "B",
        "the plan's revision, shown in the diagram's title block and the build notes",
    ),
    field(
        "date",
        Value::Text,
        "2026-03-14",
        "the date of this revision, as a calendar date YYYY-MM-DD (ISO 8601); taken from the plan, never from the clock, so the same plan always gives the same output",
    ),
    field(
        "author",
        Value::Text,
        "Greenhouse robotics club",
        "who drew the plan, shown in the title block",
    ),
    field(
        "ambient",
        Qty(Q::Temperature),
        "35 degC",
        "the air temperature around the electronics, for the heat checks",
    )
    .or_else("25 degC"),
    field(
        "limits",
        Value::Section(Section::Limits),
        "{ wire_drop: 5 % }",
        "project-wide limits (§1)",
    ),
    field(
        "parts",
        Value::Section(Section::Parts),
        "{ pack: { use: battery/lipo-3s } }",
        "the parts, by name (§3)",
    )
    .required(),
    field(
        "nets",
        Value::Section(Section::Nets),
        "{ BATT+: [pack.pos, fuse.a] }",
        "the nets joining pins, by name (§4)",
    )
    .required(),
    field(
        "links",
        Value::Section(Section::Links),
        "[ { usb: [sbc.usb1, mcu.usb] } ]",
        "cables between ports (§5)",
    ),
    field(
        "modes",
        Value::Section(Section::Modes),
        "{ climb: { left: stall } }",
        "operating modes: a state per part (§6)",
    ),
    field(
        "profile",
        Value::Section(Section::Profile),
        "{ typical: 70 %, climb: 30 % }",
        "the share of time spent in each mode, for the runtime (§6)",
    ),
    field(
        "sweep",
        Value::Section(Section::Sweep),
        "{ pack: [battery/lipo-3s, battery/lipo-4s], VMOT.wire: [16 AWG, 14 AWG] }",
        "design choices that `railcheck sweep` tries in every combination (§11); `check` ignores it",
    ),
    field(
        "supplies",
        Value::Section(Section::Supplies),
        "{ laptop: { kind: usb-host, port: mcu.usb } }",
        "supplies from outside the robot that may be connected: a laptop's USB port, a bench supply, a charger (§12)",
    ),
    field(
        "scenarios",
        Value::Section(Section::Scenarios),
        "{ flashing: { connected: [laptop], removed: [pack] } }",
        "named power scenarios: which supplies are connected, which batteries removed, which switches open (§12)",
    ),
];

/// `limits:`.
pub const LIMITS: &[Field] = &[
    field(
        "wire_drop",
        Qty(Q::Share),
        "3 %",
        "the largest supply-plus-return wire drop allowed, as a share of the source's voltage",
    )
    .or_else("5 %"),
    field(
        "derate",
        Qty(Q::Share),
        "70 %",
        "the share of a continuous rating that a continuous load may use",
    )
    .or_else("80 %"),
    field(
        "stall_at_once",
        Value::Count,
        "1",
        "how many motors may stall at the same moment in `worst`; `worst` then stalls each such group in turn, the rest running",
    )
    .or_else("every motor"),
];

/// A net written as a mapping (the short form is a list of pins).
pub const NET: &[Field] = &[
    field(
        "pins",
        Value::PinList,
        "[pack.pos, fuse.a]",
        "the pins it joins, as `part.pin`",
    )
    .required(),
    field(
        "wire",
        Qty(Q::WireSize),
        "14 AWG",
        "the conductor's size; with `length`, its resistance enters the operating point",
    ),
    field(
        "length",
        Qty(Q::Length),
        "0.8 m",
        "the conductor's length, one way; with `wire`, its resistance enters the operating point",
    ),
    field(
        "insulation",
        Qty(Q::Temperature),
        "105 degC",
        "the insulation's temperature rating; selects the 33 CFR 183.425 ampacity table (8–18 AWG)",
    ),
    field(
        "ambient",
        Qty(Q::Temperature),
        "60 degC",
        "the air around this run (a hot enclosure), instead of the plan's `ambient`: sets the copper's resistance and the ampacity correction",
    ),
    field(
        "sheathed",
        Value::Flag,
        "true",
        "the run is in a sheath or enclosure all the way, which lets the first fuse sit farther from the battery",
    )
    .or_else("false"),
    field(
        "colour",
        Value::Text,
        "red",
        "the insulation colour you chose for this run, listed by `railcheck wires`; railcheck never picks one",
    ),
];

/// Reserved keys inside a mode (every other key names a part).
pub const MODE: &[Field] = &[field(
    "lasts",
    Qty(Q::Duration),
    "2 s",
    "how long the mode lasts at a time; a mode of 5 s or less is a brief peak, checked against peak and short-time ratings instead of continuous ones",
)];

/// An entry of `links:`.
pub const LINK: &[Field] = &[
    field(
        "usb",
        Value::PortPair,
        "[sbc.usb1, mcu.usb]",
        "a `usb-host` port and a `usb-device` port joined by the cable",
    )
    .required(),
    field(
        "wire",
        Qty(Q::WireSize),
        "28 AWG",
        "the size of the cable's VBUS and ground conductors",
    ),
    field("length", Qty(Q::Length), "1 m", "the cable's length"),
];

/// The kinds of supply from outside the robot.
pub const SUPPLY_KINDS: &[&str] = &["usb-host", "bench", "charger"];

/// An entry of `supplies:`.
pub const SUPPLY: &[Field] = &[
    field(
        "kind",
        Value::Choice(SUPPLY_KINDS),
        "bench",
        "`usb-host`: a computer's USB port plugged into a device port of the robot; `bench`: a laboratory supply clipped onto a net; `charger`: a charger on a charge connector",
    )
    .required(),
    field(
        "port",
        Value::Port,
        "mcu.usb",
        "for `usb-host`: the `usb-device` port it plugs into; a cable linked there in `links:` is unplugged while it is connected",
    )
    .unless("net"),
    field(
        "net",
        Value::NetName,
        "VBAT",
        "for `bench` and `charger`: the net its positive lead joins (its negative goes to the battery negative)",
    )
    .unless("port"),
    field(
        "voltage",
        Qty(Q::VoltageBand),
        "12 V",
        "the voltage it is set to; required for `bench` and `charger`; a `usb-host` gives 4.75 V..5.25 V (USB 2.0 §7.2.1)",
    ),
    field(
        "current",
        Qty(Q::Current),
        "3 A",
        "its current limit; a `usb-host` left without one is a USB 2.0 high-power port, 500 mA (USB 2.0 §7.2.1)",
    ),
    field(
        "or",
        Value::Choice(&["diode"]),
        "diode",
        "`diode`: it joins the robot through a diode and cannot be back-fed",
    ),
    field(
        "replaces",
        Value::NameList,
        "[pack]",
        "batteries that are always removed while it is connected (a bench supply on the battery plug)",
    ),
];

/// An entry of `scenarios:`.
pub const SCENARIO: &[Field] = &[
    field(
        "connected",
        Value::NameList,
        "[laptop]",
        "supplies from `supplies:` connected in this scenario",
    ),
    field(
        "removed",
        Value::NameList,
        "[pack]",
        "batteries taken out or unplugged in this scenario",
    ),
    field(
        "open",
        Value::NameList,
        "[estop]",
        "switches open in this scenario (every other switch is closed)",
    ),
];

/// The kinds of cable port.
pub const PORT_KINDS: &[&str] = &["usb-host", "usb-device"];

/// A `kind: usb-host` port.
pub const USB_HOST: &[Field] = &[
    field(
        "kind",
        Value::Choice(PORT_KINDS),
        "usb-host",
        "the port's kind",
    )
    .required(),
    field(
        "current",
        Qty(Q::Current),
        "1.2 A",
        "the most current its VBUS may deliver",
    ),
    field(
        "shared",
        Value::Flag,
        "true",
        "host ports marked `shared` share one limit, the smallest declared",
    )
    .or_else("false"),
];

/// A `kind: usb-device` port.
pub const USB_DEVICE: &[Field] = &[
    field(
        "kind",
        Value::Choice(PORT_KINDS),
        "usb-device",
        "the port's kind",
    )
    .required(),
    field(
        "draw",
        Value::Draw,
        "{ typical: 100 mA, peak: 500 mA }",
        "what the part draws from VBUS through this cable",
    ),
    field(
        "feeds",
        Value::PinOfPart,
        "vin",
        "a supply pin of the same part whose rail the cable's VBUS joins",
    ),
    field(
        "or",
        Value::Choice(&["diode"]),
        "diode",
        "`diode`: VBUS joins that rail through a diode and cannot back-feed it",
    ),
];

/// A `draw:` mapping.
pub const DRAW: &[Field] = &[
    field(
        "idle",
        Qty(Q::Current),
        "5 mA",
        "the current drawn in the `idle` state",
    )
    .or_else("typical"),
    field(
        "typical",
        Qty(Q::Current),
        "120 mA",
        "the current drawn in normal running",
    )
    .or_else("peak"),
    field(
        "peak",
        Qty(Q::Current),
        "300 mA",
        "the highest current drawn (start-up, transmitting, full load)",
    )
    .or_else("typical"),
];

/// The fields of a pin (which ones a pin may give depends on its role).
pub const PIN_FIELDS: &[Field] = &[
    field(
        "role",
        Value::Choice(&ROLE_NAMES),
        "supply-in",
        "what the pin does (below)",
    ),
    field(
        "range",
        Qty(Q::VoltageBand),
        "4.5..5.5 V",
        "the supply voltage the part works within (operating range)",
    ),
    field(
        "max",
        Qty(Q::Voltage),
        "6 V",
        "the absolute maximum voltage on the pin: above it the part may be damaged",
    ),
    field(
        "draw",
        Value::Draw,
        "{ idle: 20 mA, typical: 120 mA, peak: 300 mA }",
        "the current it takes from its rail, per state",
    ),
    field(
        "voltage",
        Qty(Q::VoltageBand),
        "3.3 V ±3%",
        "the voltage it provides (a board's onboard regulator output)",
    ),
    field(
        "current",
        Qty(Q::Current),
        "500 mA",
        "the most current it may deliver",
    ),
    field(
        "or",
        Value::Choice(&["diode"]),
        "diode",
        "`diode`: the output is diode-OR'ed and cannot back-feed (an ideal diode, no drop)",
    ),
    field(
        "ref",
        Value::PinOfPart,
        "vcc",
        "the supply pin of the same part whose rail sets the logic levels (VDD)",
    ),
    field(
        "family",
        Value::Choice(&FAMILY_NAMES),
        "lvcmos33",
        "the logic family that sets the thresholds from VDD (§3)",
    ),
    field(
        "voh",
        Qty(Q::Voltage),
        "2.4 V",
        "lowest output high level (overrides the family)",
    ),
    field(
        "vol",
        Qty(Q::Voltage),
        "0.4 V",
        "highest output low level (overrides the family)",
    ),
    field(
        "vih",
        Qty(Q::Voltage),
        "2.0 V",
        "lowest input voltage read as high (overrides the family)",
    ),
    field(
        "vil",
        Qty(Q::Voltage),
        "0.8 V",
        "highest input voltage read as low (overrides the family)",
    ),
    field(
        "tolerant",
        Qty(Q::Voltage),
        "5 V",
        "the input withstands this voltage whatever its own supply (a 5 V-tolerant input)",
    ),
];

/// The written pin roles, with the keys each takes besides `role`.
pub struct RoleSpec {
    /// The role this entry describes.
    pub role: PinRole,
    /// The role as a plan writes it (`supply-in`).
    pub name: &'static str,
    /// The pin fields ([`PIN_FIELDS`]) a pin of this role may give.
    pub keys: &'static [&'static str],
    /// What the role does, for a robot builder.
    pub meaning: &'static str,
}

const ROLE_NAMES: [&str; 11] = [
    "supply-out",
    "supply-in",
    "ground",
    "through",
    "bridge-out",
    "winding",
    "logic-out",
    "open-drain",
    "logic-in",
    "logic-io",
    "open-drain-io",
];

const FAMILY_NAMES: [&str; 6] = [
    "ttl5", "cmos5", "lvttl33", "lvcmos33", "lvcmos25", "lvcmos18",
];

/// Every written pin role, in the order the format reference lists them.
pub const ROLES: &[RoleSpec] = &[
    RoleSpec {
        role: PinRole::SupplyOut,
        name: "supply-out",
        keys: &["voltage", "current", "or"],
        meaning: "provides a rail: a battery's positive, a regulator's output, a board's onboard regulator",
    },
    RoleSpec {
        role: PinRole::SupplyIn,
        name: "supply-in",
        keys: &["range", "max", "draw"],
        meaning: "takes power from a rail",
    },
    RoleSpec {
        role: PinRole::Ground,
        name: "ground",
        keys: &[],
        meaning: "the part's 0 V reference and return",
    },
    RoleSpec {
        role: PinRole::Through,
        name: "through",
        keys: &[],
        meaning: "conducts to its partner pin in the same part (fuse, switch, connector contact)",
    },
    RoleSpec {
        role: PinRole::BridgeOut,
        name: "bridge-out",
        keys: &[],
        meaning: "a motor driver's output terminal; the driver's `channels` pair them",
    },
    RoleSpec {
        role: PinRole::Winding,
        name: "winding",
        keys: &[],
        meaning: "a motor terminal",
    },
    RoleSpec {
        role: PinRole::LogicOut,
        name: "logic-out",
        keys: &["ref", "family", "voh", "vol"],
        meaning: "a push-pull logic output",
    },
    RoleSpec {
        role: PinRole::OpenDrain,
        name: "open-drain",
        keys: &["ref", "family", "vol"],
        meaning: "an output that only pulls low; a pull-up resistor sets its high level",
    },
    RoleSpec {
        role: PinRole::LogicIn,
        name: "logic-in",
        keys: &["ref", "family", "vih", "vil", "max", "tolerant"],
        meaning: "a logic input",
    },
    RoleSpec {
        role: PinRole::LogicIo,
        name: "logic-io",
        keys: &[
            "ref", "family", "voh", "vol", "vih", "vil", "max", "tolerant",
        ],
        meaning: "a bidirectional logic pin: an output and an input",
    },
    RoleSpec {
        role: PinRole::OpenDrainIo,
        name: "open-drain-io",
        keys: &["ref", "family", "vol", "vih", "vil", "max", "tolerant"],
        meaning: "a pin of an open-drain bus (I2C data and clock): an input that only ever pulls the line low; the pull-up resistor's rail sets the high level",
    },
];

/// A mode state of a part.
pub struct State {
    /// The state as a mode writes it (`stall`).
    pub name: &'static str,
    /// What the part does in it, for a robot builder.
    pub meaning: &'static str,
}

/// The states a motor takes in a mode.
pub const MOTOR_STATES: &[State] = &[
    State {
        name: "idle",
        meaning: "stopped: draws nothing",
    },
    State {
        name: "running",
        meaning: "draws `rated_current` (the default in every mode but `worst`)",
    },
    State {
        name: "stall",
        meaning: "shaft held still: draws `stall_current` × V applied / `rated_voltage` (the state in `worst`)",
    },
];

/// The states every other part takes in a mode.
pub const LOAD_STATES: &[State] = &[
    State {
        name: "idle",
        meaning: "draws its `idle` current",
    },
    State {
        name: "typical",
        meaning: "draws its `typical` current (the default in every mode but `worst`)",
    },
    State {
        name: "peak",
        meaning: "draws its `peak` current (the state in `worst`)",
    },
];

/// A part class: its fields, the pins it has without writing them, and what
/// it stands for.
pub struct ClassSpec {
    /// The class as a plan writes it after `class:` (`regulator`).
    pub name: &'static str,
    /// What it stands for, for a robot builder.
    pub meaning: &'static str,
    /// The fields it takes besides `class`, `pins` and `ports`.
    pub fields: &'static [Field],
    /// Pins the class always has; a `pins:` entry may override their fields.
    pub fixed_pins: &'static [(&'static str, PinRole)],
}

impl ClassSpec {
    /// The states this class takes in a mode.
    pub fn states(&self) -> &'static [State] {
        if self.name == "motor" {
            MOTOR_STATES
        } else {
            LOAD_STATES
        }
    }
}

/// The chemistries a battery may have.
pub const CHEMISTRIES: &[&str] = &["lipo", "li-ion", "lifepo4", "nimh", "lead-acid"];
/// The regulator topologies (`switching` is another name for `buck`).
pub const TOPOLOGIES: &[&str] = &["linear", "buck", "switching", "boost", "buck-boost"];
/// Fuse speeds.
pub const FUSE_SPEEDS: &[&str] = &["fast", "slow"];

const RATING_VOLTAGE: Field = field(
    "voltage",
    Qty(Q::Voltage),
    "32 V",
    "its DC voltage rating: the highest voltage it may interrupt",
);

const INPUT_CAPACITANCE: Field = field(
    "capacitance",
    Qty(Q::Capacitance),
    "470 uF",
    "the capacitance across its supply input (its bulk capacitors), which a closing switch charges",
);

const SURGE: Field = field(
    "surge",
    Qty(Q::Current),
    "60 A",
    "the current its contacts may carry for a moment (motor start, a brief mode, `worst`); without it brief peaks are not checked against the contacts",
);

const CONTACT_RESISTANCE: Field = field(
    "contact_resistance",
    Qty(Q::Resistance),
    "2 mohm",
    "the resistance of one closed contact, from its data sheet: added to the battery's loop for the short-circuit and inrush currents",
);

/// Every part class a plan may write, in the order the format reference lists
/// them.
///
/// ```
/// use railcheck::model::format::{self, Required};
///
/// // One declaration per class of `model::Class`.
/// assert_eq!(format::CLASSES.len(), railcheck::model::Class::NAMES.len());
///
/// // A regulator has its three pins without writing them.
/// let regulator = format::class("regulator").expect("regulator is a class");
/// let pins: Vec<&str> = regulator.fixed_pins.iter().map(|(name, _)| *name).collect();
/// assert_eq!(pins, ["vin", "vout", "gnd"]);
///
/// // `output` must be written; `tj_max` falls back to 125 °C, the usual
/// // silicon junction limit (common practice).
/// let field = |key| regulator.fields.iter().find(|f| f.key == key).unwrap();
/// assert_eq!(field("output").required, Required::Yes);
/// assert_eq!(field("tj_max").default, Some("125 degC"));
/// ```
pub const CLASSES: &[ClassSpec] = &[
    ClassSpec {
        name: "battery",
        meaning: "a battery pack: the source every rail starts from",
        fixed_pins: &[("pos", PinRole::SupplyOut), ("neg", PinRole::Ground)],
        fields: &[
            field("chemistry", Value::Choice(CHEMISTRIES), "lipo", "the cell chemistry; sets the per-cell voltage window (§3)").required(),
            field("cells", Value::Cells, "3", "the number of cells in series").unless("voltage"),
            field("capacity", Qty(Q::Charge), "5 Ah", "the rated capacity, for the runtime"),
            field("max_discharge", Qty(Q::DischargeRate), "25C", "the largest continuous discharge: a current, or a C-rate (times the capacity)"),
            field("internal_resistance", Qty(Q::Resistance), "20 mohm", "the pack's internal resistance: the terminal voltage sags by current × this").or_else("0 ohm"),
            field("cutoff", Value::Flag, "true", "a low-voltage cutoff or protection board is fitted").or_else("false"),
            field("voltage", Qty(Q::VoltageBand), "10.5..14.4 V", "the terminal voltage window (empty..full), instead of cells × the chemistry's window"),
            field("usable", Qty(Q::Share), "80 %", "the share of the capacity the runtime may use").or_else("100 %"),
            field("short_circuit", Qty(Q::Current), "400 A", "the most current the pack (or its protection board) is rated to deliver into a short until a fuse opens"),
        ],
    },
    ClassSpec {
        name: "fuse",
        meaning: "a fuse: opens when too much current flows for too long",
        fixed_pins: &[("a", PinRole::Through), ("b", PinRole::Through)],
        fields: &[
            field("rating", Qty(Q::Current), "15 A", "its rated current"),
            RATING_VOLTAGE,
            field("speed", Value::Choice(FUSE_SPEEDS), "slow", "`fast` or `slow` (time-delay) blow").or_else("fast"),
            field("breaking", Qty(Q::Current), "1000 A", "its breaking capacity: the largest fault current it can interrupt"),
            CONTACT_RESISTANCE,
        ],
    },
    ClassSpec {
        name: "switch",
        meaning: "a switch, or an emergency stop",
        fixed_pins: &[("a", PinRole::Through), ("b", PinRole::Through)],
        fields: &[
            field("rating", Qty(Q::Current), "20 A", "its contacts' continuous current rating"),
            SURGE,
            RATING_VOLTAGE,
            field("stop", Value::Flag, "true", "an emergency stop or kill switch").or_else("false"),
            CONTACT_RESISTANCE,
        ],
    },
    ClassSpec {
        name: "connector",
        meaning: "a connector: pins in pairs `a1`/`b1`, `a2`/`b2`, … (declare them with `role: through`)",
        fixed_pins: &[],
        fields: &[
            field("rating", Qty(Q::Current), "3 A", "the continuous current rating of each contact"),
            SURGE,
            CONTACT_RESISTANCE,
        ],
    },
    ClassSpec {
        name: "regulator",
        meaning: "a voltage regulator or DC-DC converter",
        fixed_pins: &[("vin", PinRole::SupplyIn), ("vout", PinRole::SupplyOut), ("gnd", PinRole::Ground)],
        fields: &[
            field("topology", Value::Choice(TOPOLOGIES), "buck", "how it converts: `linear` burns the difference as heat; `buck` steps down, `boost` up, `buck-boost` either way").required(),
            field("output", Qty(Q::VoltageBand), "5 V ±2%", "its output voltage and tolerance").required(),
            field("input", Qty(Q::VoltageBand), "6.5..28 V", "its input operating range; the upper end is its absolute maximum unless `pins.vin.max` says otherwise"),
            field("current", Qty(Q::Current), "3 A", "its largest output current"),
            field("dropout", Qty(Q::Voltage), "1.1 V", "the least input-to-output difference it needs (`linear`, `buck`): below output + dropout the output follows Vin − dropout").or_else("0 V"),
            field("efficiency", Qty(Q::Share), "90 %", "a switching converter's efficiency: input power = output power / efficiency").or_else("85 % (switching)"),
            field("quiescent", Qty(Q::Current), "5 mA", "its own current draw from the input (ground current)").or_else("0 A"),
            field("theta_ja", Qty(Q::ThermalResistance), "50 degC/W", "junction-to-ambient thermal resistance, for the heat check"),
            field("tj_max", Qty(Q::Temperature), "150 degC", "the highest junction temperature allowed").or_else("125 degC"),
            INPUT_CAPACITANCE,
        ],
    },
    ClassSpec {
        name: "driver",
        meaning: "a motor driver (H-bridges): declare `vm` (supply-in), `gnd`, its `bridge-out` pins and logic inputs",
        fixed_pins: &[],
        fields: &[
            field("supply", Qty(Q::VoltageBand), "6..30 V", "the motor supply range on `vm` (`pins.vm.range` wins if both are given)"),
            field("channel_current", Qty(Q::Current), "2 A", "each channel's continuous current rating"),
            field("channel_peak", Qty(Q::Current), "3 A", "each channel's peak current rating"),
            field("drop", Qty(Q::Voltage), "2 V", "the total voltage lost across a bipolar bridge (both switches)"),
            field("rds_on", Qty(Q::Resistance), "25 mohm", "each MOSFET switch's on-resistance: a channel loses current × 2 × rds_on"),
            field("quiescent", Qty(Q::Current), "10 mA", "its own current from `vm`").or_else("0 A"),
            field("channels", Value::Channels, "{ 1: [out1a, out1b] }", "each channel's two `bridge-out` pins, numbered from 1"),
            INPUT_CAPACITANCE,
            field("clamp", Value::Flag, "true", "its motor supply has a clamp that takes the current a coasting motor sends back (a braking resistor, a TVS, a shunt regulator)").or_else("false"),
        ],
    },
    ClassSpec {
        name: "motor",
        meaning: "a brushed DC motor",
        fixed_pins: &[("a", PinRole::Winding), ("b", PinRole::Winding)],
        fields: &[
            field("rated_voltage", Qty(Q::Voltage), "12 V", "the voltage its ratings are given at").required(),
            field("rated_current", Qty(Q::Current), "0.8 A", "the current it draws running at rated load").required(),
            field("no_load_current", Qty(Q::Current), "0.2 A", "the current it draws running free"),
            field("stall_current", Qty(Q::Current), "5 A", "the current it draws with its shaft held still, at `rated_voltage`").required(),
        ],
    },
    ClassSpec {
        name: "resistor",
        meaning: "a resistor (pull-up, current limiting)",
        fixed_pins: &[("a", PinRole::Passive), ("b", PinRole::Passive)],
        fields: &[
            field("value", Qty(Q::Resistance), "10 kohm", "its resistance").required(),
            field("power", Qty(Q::Power), "250 mW", "its power rating"),
        ],
    },
    ClassSpec {
        name: "board",
        meaning: "a controller board or computer: declare all its pins",
        fixed_pins: &[],
        fields: &[],
    },
    ClassSpec {
        name: "sensor",
        meaning: "a sensor or encoder: declare all its pins",
        fixed_pins: &[],
        fields: &[],
    },
    ClassSpec {
        name: "load",
        meaning: "any other load (lamp, fan, heater, pump): declare all its pins",
        fixed_pins: &[],
        fields: &[field(
            "moves",
            Value::Flag,
            "true",
            "it moves something (a pump, a linear actuator, a gripper): the stop switch must cut its power",
        )
        .or_else("false")],
    },
    ClassSpec {
        name: "shifter",
        meaning: "a level translator: each logic pin names its own `ref` side",
        fixed_pins: &[],
        fields: &[],
    },
    ClassSpec {
        name: "servo",
        meaning: "a hobby servo: a geared motor with its own driver, commanded by pulses on a logic input; it moves, so the stop switch must cut its power. Give `vin` its `draw` (peak = stalled) and declare the signal pin",
        fixed_pins: &[("vin", PinRole::SupplyIn), ("gnd", PinRole::Ground)],
        fields: &[],
    },
];

/// Fields every part takes, whatever its class: for an inline part in its
/// own mapping, for a library part under `with:` (or in its part file).
pub const PART_FIELDS: &[Field] = &[
    field(
        "mass",
        Qty(Q::Mass),
        "180 g",
        "what the part weighs; `railcheck sweep` adds up the parts that give one",
    ),
    field(
        "cost",
        Value::Amount,
        "24.50",
        "what the part costs, a plain number in whatever currency the plan keeps to (none is assumed); `railcheck sweep` adds up the parts that give one",
    ),
];

/// The keys of a part that names a library part.
pub const LIBRARY_PART_KEYS: &[&str] = &["use", "with", "pins", "ports"];
/// The keys every inline part takes besides its class's fields.
pub const INLINE_PART_KEYS: &[&str] = &["class", "pins", "ports"];

/// The class of this name.
pub fn class(name: &str) -> Option<&'static ClassSpec> {
    CLASSES.iter().find(|c| c.name == name)
}

/// The role of this name.
pub fn role(role: PinRole) -> Option<&'static RoleSpec> {
    ROLES.iter().find(|r| r.role == role)
}

/// The pin field of this key.
pub fn pin_field(key: &str) -> Option<&'static Field> {
    PIN_FIELDS.iter().find(|f| f.key == key)
}

/// The keys of a table.
pub fn keys(fields: &[Field]) -> Vec<&'static str> {
    fields.iter().map(|f| f.key).collect()
}

/// Every key a pin of this role takes, `role` included.
pub fn role_keys(role: PinRole) -> Vec<&'static str> {
    let mut keys = vec!["role"];
    if let Some(spec) = self::role(role) {
        keys.extend(spec.keys);
    }
    keys
}

/// Names of parts, nets, pins, ports and modes: letters and digits of any
/// script, `_`, `-` and `+`, but none of the characters Unicode marks
/// Default_Ignorable_Code_Point (DerivedCoreProperties.txt): those display
/// as nothing, so two names that look alike could differ.
pub fn is_name(text: &str) -> bool {
    !text.is_empty()
        && text.chars().all(|c| {
            (c.is_alphanumeric() && !is_default_ignorable(c)) || matches!(c, '_' | '-' | '+')
        })
}

/// Unicode's Default_Ignorable_Code_Point ranges (Unicode 15, from memory of
/// DerivedCoreProperties.txt): the Hangul fillers are letters that show as
/// blank, the rest format and variation characters.
pub fn is_default_ignorable(c: char) -> bool {
    matches!(
        c,
        '\u{00AD}'
            | '\u{034F}'
            | '\u{061C}'
            | '\u{115F}'..='\u{1160}'
            | '\u{17B4}'..='\u{17B5}'
            | '\u{180B}'..='\u{180F}'
            | '\u{200B}'..='\u{200F}'
            | '\u{202A}'..='\u{202E}'
            | '\u{2060}'..='\u{206F}'
            | '\u{3164}'
            | '\u{FE00}'..='\u{FE0F}'
            | '\u{FEFF}'
            | '\u{FFA0}'
            | '\u{FFF0}'..='\u{FFF8}'
            | '\u{1BCA0}'..='\u{1BCA3}'
            | '\u{1D173}'..='\u{1D17A}'
            | '\u{E0000}'..='\u{E0FFF}'
    )
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::LogicFamily;

    #[test]
    fn names_that_display_as_blank_are_not_names() {
        // U+3164 HANGUL FILLER and U+FFA0 HALFWIDTH HANGUL FILLER are
        // letters (Lo) that Unicode marks Default_Ignorable_Code_Point.
        for blank in [
            "\u{3164}",
            "a\u{3164}",
            "\u{ffa0}",
            "x\u{115f}y",
            "m\u{200b}",
        ] {
            assert!(!is_name(blank), "{blank:?}");
        }
        for name in ["BATT+", "left_enc", "3v3", "ø-motor", "電源", "Ωsense"] {
            assert!(is_name(name), "{name}");
        }
    }

    #[test]
    fn written_roles_match_the_model() {
        let written: Vec<&str> = PinRole::WRITTEN.iter().map(|(n, _)| *n).collect();
        assert_eq!(written, ROLE_NAMES);
        for (name, role) in PinRole::WRITTEN {
            assert_eq!(super::role(role).map(|r| r.name), Some(name));
        }
    }

    #[test]
    fn classes_and_families_match_the_model() {
        let names: Vec<&str> = CLASSES.iter().map(|c| c.name).collect();
        assert_eq!(names, super::super::Class::NAMES);
        let families: Vec<&str> = LogicFamily::ALL.iter().map(|(n, _)| *n).collect();
        assert_eq!(families, FAMILY_NAMES);
    }

    #[test]
    fn every_role_key_is_a_declared_pin_field() {
        for role in ROLES {
            for key in role.keys {
                assert!(
                    pin_field(key).is_some(),
                    "{} takes undeclared `{key}`",
                    role.name
                );
            }
        }
    }
}
