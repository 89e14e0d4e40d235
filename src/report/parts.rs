//! The parts library as text for `railcheck parts`: a list with each part's
//! key ratings, and one part shown whole.
//!
//! Every value shown is read through the model (`Library::read_part`), the
//! same reading a plan's `use:` gets, so what the list says is what the
//! checker works with. Not for editing or validating part files: the model's
//! reader does that and its errors are shown as they are.

use crate::analysis::{BatteryState, battery_voltage};
use crate::model::{
    BridgeDrop, Class, Draw, Library, LogicSpec, Part, Pin, PinRole, PortKind, Rated,
};
use crate::units::{
    Band, DischargeRate, show_charge, show_current, show_power, show_resistance, show_share,
    show_temperature, show_thermal_resistance, show_voltage,
};
use uom::si::electric_current::ampere;
use uom::si::f64::{ElectricCurrent, ElectricPotential};

/// Width the notes are wrapped to.
const NOTES_WIDTH: usize = 96;

/// An id the library does not hold, with the closest one if it looks like a
/// typo.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct UnknownPart {
    /// The message the user is shown, with a "did you mean" when an id is close.
    pub message: String,
}

/// Every part: id, class and key ratings on one line, then where its
/// numbers come from (the first sentence of its notes).
pub fn parts_list(library: &Library) -> String {
    let rows: Vec<(String, String, String, String)> = library
        .ids()
        .map(|id| match library.read_part(id) {
            Some(Ok(part)) => (
                id.to_string(),
                part.class.name().to_string(),
                key_ratings(&part),
                library
                    .notes(id)
                    .map_or(String::new(), |n| first_sentence(&n)),
            ),
            Some(Err(problem)) => (
                id.to_string(),
                "?".to_string(),
                format!("does not read: {problem}"),
                String::new(),
            ),
            None => (id.to_string(), "?".into(), String::new(), String::new()),
        })
        .collect();
    let id_width = rows.iter().map(|r| r.0.chars().count()).max().unwrap_or(0);
    let class_width = rows.iter().map(|r| r.1.chars().count()).max().unwrap_or(0);
    let mut out = String::new();
    for (id, class, ratings, source) in &rows {
        out.push_str(format!("{id:id_width$}  {class:class_width$}  {ratings}").trim_end());
        out.push('\n');
        if !source.is_empty() {
            let indent = " ".repeat(id_width + 2);
            let options = wrapping()
                .initial_indent(&indent)
                .subsequent_indent(&indent);
            for line in textwrap::wrap(source, options) {
                out.push_str(&line);
                out.push('\n');
            }
        }
    }
    out.push_str(&format!(
        "\n{} parts. `railcheck parts ID` shows one in full; `use: ID` puts it in a plan.\n",
        rows.len()
    ));
    out
}

/// One part: its class, every field, its pins and ports with their values,
/// and its notes in full.
pub fn part_sheet(library: &Library, id: &str) -> Result<String, UnknownPart> {
    let unknown = || {
        let hint = library
            .closest_id(id)
            .map_or(String::new(), |s| format!("; did you mean `{s}`?"));
        UnknownPart {
            message: format!("no part `{id}` in the library{hint} (`railcheck parts` lists them)"),
        }
    };
    let plan = match library.part_plan(id) {
        None => return Err(unknown()),
        Some(Err(problem)) => {
            return Ok(format!("{id}\n  does not read: {problem}\n"));
        }
        Some(Ok(plan)) => plan,
    };
    let Some(part) = plan.parts.first() else {
        return Err(unknown());
    };
    let mut out = format!("{id} ({})\n", part.class.name());
    if let Some(file) = library.file_name(id) {
        out.push_str(&format!("  file: {file}\n"));
    }
    let mut fields = class_fields(&part.class);
    if let Class::Battery(_) = part.class
        && let (Some(full), Some(nominal), Some(empty)) = (
            battery_voltage(&plan, 0, BatteryState::Full),
            battery_voltage(&plan, 0, BatteryState::Nominal),
            battery_voltage(&plan, 0, BatteryState::Empty),
        )
    {
        fields.push((
            "full / nominal / empty",
            format!(
                "{} / {} / {}",
                show_voltage(full),
                show_voltage(nominal),
                show_voltage(empty)
            ),
        ));
    }
    let width = fields.iter().map(|(k, _)| k.len()).max().unwrap_or(0);
    for (key, value) in &fields {
        out.push_str(&format!("  {key:width$}  {value}\n"));
    }
    out.push_str("\npins:\n");
    let pin_width = part.pins.iter().map(|p| p.name.len()).max().unwrap_or(0);
    for pin in &part.pins {
        let values = pin_values(part, pin);
        out.push_str(
            format!(
                "  {:pin_width$}  {:11} {}",
                pin.name,
                pin.role.name(),
                values.join(", ")
            )
            .trim_end(),
        );
        out.push('\n');
    }
    if !part.ports.is_empty() {
        out.push_str("\nports:\n");
        for port in &part.ports {
            out.push_str(&format!(
                "  {}  {}\n",
                port.name,
                port_values(part, &port.kind)
            ));
        }
    }
    if let Some(notes) = library.notes(id) {
        out.push_str("\nnotes:\n");
        let options = wrapping().initial_indent("  ").subsequent_indent("  ");
        for line in textwrap::wrap(&notes, options) {
            out.push_str(&line);
            out.push('\n');
        }
    }
    Ok(out)
}

/// Lines break at spaces only, so a word such as `lithium-ion` stays whole
/// and can be searched for.
fn wrapping() -> textwrap::Options<'static> {
    textwrap::Options::new(NOTES_WIDTH)
        .word_splitter(textwrap::WordSplitter::NoHyphenation)
        .break_words(false)
}

/// The ratings that tell parts of a class apart, in one line.
fn key_ratings(part: &Part) -> String {
    match &part.class {
        Class::Battery(b) => {
            let mut out = vec![b.pack_name()];
            out.extend(b.capacity.map(|c| show_charge(c.value)));
            out.extend(discharge(b).map(|d| format!("max {d}")));
            out.join(", ")
        }
        Class::Regulator(r) => {
            let mut out = vec![format!("{} {}", r.topology.name(), band(&r.output))];
            out.extend(rated(r.current, show_current));
            out.extend(supply_ranges(part).map(|range| format!("in {range}")));
            out.join(", ")
        }
        Class::Fuse(f) => {
            let mut out: Vec<String> = rated(f.rating, show_current).into_iter().collect();
            out.extend(rated(f.voltage, show_voltage));
            out.push(speed(f.speed).to_string());
            out.join(", ")
        }
        Class::Switch(s) => {
            let mut out: Vec<String> = rated(s.rating, show_current).into_iter().collect();
            out.extend(rated(s.voltage, show_voltage));
            if s.stop {
                out.push("stop".into());
            }
            out.join(", ")
        }
        Class::Connector(c) => rated(c.rating, show_current)
            .map(|r| format!("{r} per contact, {} contacts", part.pins.len()))
            .unwrap_or_default(),
        Class::Driver(d) => {
            let mut out = vec![format!("{} channels", d.channels.len())];
            if let Some(current) = rated(d.channel_current, show_current) {
                let peak = rated(d.channel_peak, show_current)
                    .map_or(String::new(), |p| format!(" ({p} peak)"));
                out.push(format!("{current} per channel{peak}"));
            }
            out.extend(
                supply_ranges(part)
                    .next()
                    .map(|r| format!("motor supply {r}")),
            );
            out.join(", ")
        }
        Class::Motor(m) => format!(
            "{} rated {}, stall {}",
            show_voltage(m.rated_voltage),
            show_current(m.rated_current),
            show_current(m.stall_current)
        ),
        Class::Resistor(r) => {
            let mut out = vec![show_resistance(r.value)];
            out.extend(r.power.map(show_power));
            out.join(", ")
        }
        Class::Board | Class::Sensor | Class::Load | Class::Shifter | Class::Servo => {
            let mut out = Vec::new();
            for pin in part.pins.iter() {
                match pin.role {
                    PinRole::SupplyIn => {
                        let mut text = format!(
                            "{} {}",
                            pin.name,
                            pin.range().map_or("in".into(), |r| band(&r))
                        );
                        if let Some(draw) = pin.draw() {
                            text.push_str(&format!(" {}", draw_summary(&draw)));
                        }
                        out.push(text);
                    }
                    PinRole::SupplyOut => {
                        let mut text = format!("{} out", pin.name);
                        if let Some(v) = pin.voltage() {
                            text.push_str(&format!(" {}", band(&v)));
                        }
                        if let Some(i) = pin.current() {
                            text.push_str(&format!(" {}", show_current(i)));
                        }
                        out.push(text);
                    }
                    _ => {}
                }
            }
            out.join(", ")
        }
    }
}

/// Every field of a class, in the order the format lists them.
fn class_fields(class: &Class) -> Vec<(&'static str, String)> {
    let mut out: Vec<(&'static str, String)> = Vec::new();
    let mut put = |key: &'static str, value: Option<String>| {
        if let Some(v) = value {
            out.push((key, v));
        }
    };
    match class {
        Class::Battery(b) => {
            put("chemistry", Some(b.chemistry.name().to_string()));
            put("cells", b.cells.map(|n| n.to_string()));
            put("voltage", b.voltage.map(|v| band(&v)));
            put("capacity", b.capacity.map(|c| show_charge(c.value)));
            put("max_discharge", discharge(b));
            put(
                "internal_resistance",
                Some(show_resistance(b.internal_resistance)),
            );
            put("cutoff", Some(b.cutoff.to_string()));
            put("usable", Some(show_share(b.usable)));
        }
        Class::Fuse(f) => {
            put("rating", rated(f.rating, show_current));
            put("voltage", rated(f.voltage, show_voltage));
            put("speed", Some(speed(f.speed).to_string()));
        }
        Class::Switch(s) => {
            put("rating", rated(s.rating, show_current));
            put("voltage", rated(s.voltage, show_voltage));
            put("stop", Some(s.stop.to_string()));
        }
        Class::Connector(c) => put("rating", rated(c.rating, show_current)),
        Class::Regulator(r) => {
            put("topology", Some(r.topology.name().to_string()));
            put("output", Some(band(&r.output)));
            put("current", rated(r.current, show_current));
            put("dropout", Some(show_voltage(r.dropout)));
            put(
                "efficiency",
                Some(if r.efficiency_assumed {
                    format!("{} (assumed)", show_share(r.efficiency))
                } else {
                    show_share(r.efficiency)
                }),
            );
            put("quiescent", Some(show_current(r.quiescent)));
            put("theta_ja", r.theta_ja.map(show_thermal_resistance));
            put("tj_max", Some(show_temperature(r.tj_max)));
        }
        Class::Driver(d) => {
            put("channel_current", rated(d.channel_current, show_current));
            put("channel_peak", rated(d.channel_peak, show_current));
            match d.drop {
                BridgeDrop::Fixed(v) => put("drop", Some(show_voltage(v))),
                BridgeDrop::PerSwitch(r) => put("rds_on", Some(show_resistance(r))),
            }
            put("quiescent", Some(show_current(d.quiescent)));
            put("channels", Some(d.channels.len().to_string()));
        }
        Class::Motor(m) => {
            put("rated_voltage", Some(show_voltage(m.rated_voltage)));
            put("rated_current", Some(show_current(m.rated_current)));
            put("no_load_current", m.no_load_current.map(show_current));
            put("stall_current", Some(show_current(m.stall_current)));
        }
        Class::Resistor(r) => {
            put("value", Some(show_resistance(r.value)));
            put("power", r.power.map(show_power));
        }
        Class::Board | Class::Sensor | Class::Load | Class::Shifter | Class::Servo => {}
    }
    out
}

fn pin_values(part: &Part, pin: &Pin) -> Vec<String> {
    let mut out = Vec::new();
    if let Some(range) = pin.range() {
        out.push(format!("range {}", band(&range)));
    }
    if let Some(max) = pin.max {
        out.push(format!("max {}", show_voltage(max)));
    }
    if let Some(draw) = pin.draw() {
        out.push(format!("draw {}", draw_full(&draw)));
    }
    if let Some(voltage) = pin.voltage() {
        out.push(format!("voltage {}", band(&voltage)));
    }
    if let Some(current) = pin.current() {
        out.push(format!("current {}", show_current(current)));
    }
    if pin.diode_or {
        out.push("or: diode".into());
    }
    if let Some(logic) = &pin.logic {
        out.extend(logic_values(part, logic));
    }
    if let Class::Driver(d) = &part.class
        && let Some(channel) = d
            .channels
            .iter()
            .find(|c| c.outputs.iter().any(|&o| part.pins[o].name == pin.name))
    {
        out.push(format!("channel {}", channel.number));
    }
    out
}

fn logic_values(part: &Part, logic: &LogicSpec) -> Vec<String> {
    let mut out = Vec::new();
    if let Some(family) = logic.family {
        let name = crate::model::LogicFamily::ALL
            .iter()
            .find(|(_, f)| *f == family)
            .map_or("?", |(n, _)| n);
        out.push(format!("family {name}"));
    }
    if let Some(reference) = logic.reference {
        out.push(format!("ref {}", part.pins[reference].name));
    }
    for (key, value) in [
        ("voh", logic.voh),
        ("vol", logic.vol),
        ("vih", logic.vih),
        ("vil", logic.vil),
        ("tolerant", logic.tolerant),
    ] {
        if let Some(v) = value {
            out.push(format!("{key} {}", show_voltage(v)));
        }
    }
    out
}

fn port_values(part: &Part, kind: &PortKind) -> String {
    match kind {
        PortKind::UsbHost { current, shared } => {
            let mut out = vec!["usb-host".to_string()];
            out.extend(current.map(|i| format!("current {}", show_current(i))));
            if *shared {
                out.push("shared".into());
            }
            out.join(", ")
        }
        PortKind::UsbDevice {
            draw,
            feeds,
            diode_or,
        } => {
            let mut out = vec!["usb-device".to_string()];
            out.extend(draw.map(|d| format!("draw {}", draw_full(&d))));
            out.extend(feeds.map(|p| format!("feeds {}", part.pins[p].name)));
            if *diode_or {
                out.push("or: diode".into());
            }
            out.join(", ")
        }
    }
}

fn rated<Q: Copy>(value: Option<Rated<Q>>, show: fn(Q) -> String) -> Option<String> {
    value.map(|v| show(v.value))
}

fn band(b: &Band<ElectricPotential>) -> String {
    if b.min == b.max {
        show_voltage(b.nominal)
    } else {
        format!("{}–{}", show_voltage(b.min), show_voltage(b.max))
    }
}

/// Inline supply-in ranges of a part, as `4.5 V–5.5 V`.
fn supply_ranges(part: &Part) -> impl Iterator<Item = String> + '_ {
    part.pins_with_role(PinRole::SupplyIn)
        .filter_map(|(_, pin)| pin.range().map(|r| band(&r)))
}

fn discharge(b: &crate::model::Battery) -> Option<String> {
    let rate = b.max_discharge?;
    Some(match rate.value {
        DischargeRate::Current(i) => show_current(i),
        DischargeRate::CRate(c) => match b.max_discharge_current() {
            Some(i) => format!("{c}C ({})", show_current(i)),
            None => format!("{c}C"),
        },
    })
}

fn speed(speed: crate::model::FuseSpeed) -> &'static str {
    match speed {
        crate::model::FuseSpeed::Fast => "fast",
        crate::model::FuseSpeed::Slow => "slow",
    }
}

/// `30 mA (peak 60 mA)`.
fn draw_summary(draw: &Draw) -> String {
    if same(draw.typical, draw.peak) {
        show_current(draw.typical)
    } else {
        format!(
            "{} (peak {})",
            show_current(draw.typical),
            show_current(draw.peak)
        )
    }
}

/// `idle 15 mA, typical 30 mA, peak 60 mA`.
fn draw_full(draw: &Draw) -> String {
    format!(
        "idle {} / typical {} / peak {}",
        show_current(draw.idle),
        show_current(draw.typical),
        show_current(draw.peak)
    )
}

fn same(a: ElectricCurrent, b: ElectricCurrent) -> bool {
    a.get::<ampere>() == b.get::<ampere>()
}

/// The text up to the first full stop followed by a space (or the end).
fn first_sentence(text: &str) -> String {
    match text.find(". ") {
        Some(end) => text[..=end].to_string(),
        None => text.to_string(),
    }
}
