//! What the diagram shows, worked out from a checked plan: the part boxes and
//! their text, the nets and cables to draw and what kind each is, the rail
//! tags with the operating point's numbers, the numbered findings, the title
//! and the cautions. Which way power flows is decided here too, as edges
//! between layout nodes. No geometry: `layout` places all this and `render`
//! writes it.

use super::style::Stage;
use super::text::{clean, truncate};
use crate::Checked;
use crate::analysis::{Analysis, BatteryState, ModeId, OperatingPoint};
use crate::graph::Circuit;
use crate::model::{Class, NetId, PartId, PinRole, Plan, PortKind};
use crate::report::Summary;
use crate::rules::Severity;
use crate::units::{show_current, show_length, show_resistance, show_voltage};
use std::collections::BTreeMap;
use uom::si::f64::{ElectricCurrent, ElectricPotential};

/// Longest part, net or tag name shown in full, in character cells.
const NAME_CELLS: usize = 32;
const PIN_CELLS: usize = 16;
const LINE_CELLS: usize = 40;

pub(crate) struct Content {
    pub parts: Vec<PartBox>,
    pub tags: Vec<Tag>,
    pub wires: Vec<Wire>,
    /// Power flow between layout nodes (parts first, then tags): the columns
    /// follow these edges.
    pub edges: Vec<(usize, usize)>,
    /// Nodes where the power flow starts (batteries), in plan order.
    pub sources: Vec<usize>,
    pub findings: Vec<Listed>,
    pub heading: Heading,
    pub cautions: Vec<String>,
}

pub(crate) struct Heading {
    pub name: String,
    pub file: String,
    /// Revision, date and author, as the plan gives them.
    pub revision: Option<String>,
    pub date: Option<String>,
    pub author: Option<String>,
    pub summary: String,
    /// False when shorts or power loops kept the operating point from being solved.
    pub solved: bool,
}

pub(crate) struct PartBox {
    /// The part's name in full, for the file's data attributes.
    pub id: String,
    /// The name as shown (long names are cut).
    pub name: String,
    pub class: String,
    /// The library part it was made from (its `use:`).
    pub library: Option<String>,
    pub rating: Option<String>,
    pub stage: Stage,
    pub pins: Vec<ShownPin>,
    pub markers: Vec<Marker>,
    /// The part needs a ground and its ground does not reach a battery negative.
    pub floating: bool,
}

pub(crate) struct ShownPin {
    /// The pin's name, and for a logic signal the net's after it, as shown.
    pub name: String,
    pub at: PinAt,
    /// For a ground pin when the plan has more than one ground: the name of
    /// its net, written under its symbol so separate grounds show.
    pub ground: Option<String>,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum PinAt {
    /// On a drawn net or cable.
    Wire,
    /// On a ground net: drawn with a ground symbol, not a line.
    Ground { reaches_battery: bool },
}

/// A label block for a net: rails and motor leads always have one, other
/// nets when a finding names them.
pub(crate) struct Tag {
    /// The net's name in full, for the file's data attributes.
    pub net: String,
    /// The name as shown (long names are cut).
    pub name: String,
    pub lines: Vec<String>,
    pub markers: Vec<Marker>,
    /// A ground net's tag: not on a line, drawn with a ground symbol.
    pub ground: bool,
    /// A bundle's tag: placed between the two parts it joins when a column
    /// lies between them, not after both.
    pub between: bool,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord)]
pub(crate) enum WireKind {
    /// Logic signals that all run between the same two parts, drawn as one
    /// line and listed on its tag.
    Bundle,
    Rail,
    /// A ground net drawn as a line: one with a wire given, or one a battery
    /// negative is on.
    Ground,
    MotorLead,
    Signal,
    Cable,
}

pub(crate) struct Wire {
    pub kind: WireKind,
    pub name: String,
    pub ends: Vec<End>,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) struct End {
    /// Layout node: a part id, or `parts.len() + tag`.
    pub node: usize,
    /// The part's shown pin; `None` for a tag.
    pub pin: Option<usize>,
    /// Power (or the signal) leaves the node here.
    pub source: bool,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) struct Marker {
    pub number: usize,
    pub severity: Severity,
}

/// A finding as the panel lists it.
pub(crate) struct Listed {
    pub marker: Marker,
    pub text: String,
    /// How to fix it, when the rule suggests a fix.
    pub fix: Option<String>,
}

pub(crate) fn gather(checked: &Checked) -> Content {
    let plan = &checked.plan;
    let circuit = &checked.circuit;
    let part_count = plan.parts.len();

    let (findings, part_markers, mut net_markers) = number_findings(checked);
    let net_kind: Vec<Option<WireKind>> = (0..plan.nets.len())
        .map(|net| net_kind(plan, circuit, net))
        .collect();
    let node_grounded = grounded_nodes(plan, circuit);
    let name_grounds = several_grounds(circuit, &net_kind);

    // Shown pins: pins on a net (ground nets get a symbol), linked ports, and
    // the unconnected ground pins of a part that is left floating.
    let mut parts = Vec::with_capacity(part_count);
    let mut pin_slot: Vec<BTreeMap<usize, usize>> = vec![BTreeMap::new(); part_count];
    let mut port_slot: Vec<BTreeMap<usize, usize>> = vec![BTreeMap::new(); part_count];
    for (part_id, part) in plan.parts.iter().enumerate() {
        let floating = needs_ground(plan, part_id) && !circuit.is_grounded(part_id);
        let mut pins = Vec::new();
        for (pin_index, pin) in part.pins.iter().enumerate() {
            let at = match pin.net {
                Some(net) if net_kind[net].is_none() => PinAt::Ground {
                    reaches_battery: node_grounded[circuit.node_of_net[net]],
                },
                Some(_) => PinAt::Wire,
                None if floating && pin.role == PinRole::Ground => PinAt::Ground {
                    reaches_battery: false,
                },
                None => continue,
            };
            pin_slot[part_id].insert(pin_index, pins.len());
            let ground = match (at, pin.net) {
                (PinAt::Ground { .. }, Some(net)) if name_grounds => {
                    Some(truncate(&clean(&plan.nets[net].name), PIN_CELLS))
                }
                _ => None,
            };
            // A logic signal is named where it leaves and enters each box.
            let name = match pin.net {
                Some(net) if net_kind[net] == Some(WireKind::Signal) => format!(
                    "{}: {}",
                    truncate(&clean(&pin.name), PIN_CELLS),
                    truncate(&clean(&plan.nets[net].name), PIN_CELLS)
                ),
                _ => truncate(&clean(&pin.name), PIN_CELLS),
            };
            pins.push(ShownPin { name, at, ground });
        }
        for (port_index, port) in part.ports.iter().enumerate() {
            let linked = circuit.part_links[part_id].iter().any(|&l| {
                let l = &plan.links[l];
                l.host == (part_id, port_index) || l.device == (part_id, port_index)
            });
            if linked {
                port_slot[part_id].insert(port_index, pins.len());
                pins.push(ShownPin {
                    name: truncate(&clean(&port.name), PIN_CELLS),
                    at: PinAt::Wire,
                    ground: None,
                });
            }
        }
        parts.push(PartBox {
            id: clean(&part.name),
            name: truncate(&clean(&part.name), NAME_CELLS),
            class: part.kind_name().to_string(),
            library: part
                .library_id
                .as_deref()
                .map(|id| truncate(&clean(id), NAME_CELLS)),
            rating: rating(plan, part_id).map(|r| truncate(&r, LINE_CELLS)),
            stage: stage(&part.class),
            pins,
            markers: part_markers[part_id].clone(),
            floating,
        });
    }

    let mut tags = Vec::new();
    let mut wires = Vec::new();
    let mut edges = Vec::new();
    let bundles = bundles(plan, &net_kind, &net_markers, &pin_slot);
    let mut bundled = vec![false; plan.nets.len()];
    for members in &bundles {
        for &net in members {
            bundled[net] = true;
        }
        let mut ends: Vec<End> = members
            .iter()
            .flat_map(|&net| &plan.nets[net].pins)
            .filter_map(|p| {
                Some(End {
                    node: p.part,
                    pin: Some(*pin_slot[p.part].get(&p.pin)?),
                    source: false,
                })
            })
            .collect();
        let mut pair: Vec<PartId> = plan.nets[members[0]].pins.iter().map(|p| p.part).collect();
        pair.sort_unstable();
        pair.dedup();
        let (a, b) = (pair[0], pair[pair.len() - 1]);
        let names: Vec<String> = members
            .iter()
            .map(|&net| truncate(&clean(&plan.nets[net].name), PIN_CELLS))
            .collect();
        let title = format!(
            "{} to {}",
            truncate(&clean(&plan.parts[a].name), PIN_CELLS),
            truncate(&clean(&plan.parts[b].name), PIN_CELLS)
        );
        let tag_node = part_count + tags.len();
        let mut lines = vec![format!("bundle of {} signals:", members.len())];
        lines.extend(super::text::wrap(&names.join(", "), LINE_CELLS));
        tags.push(Tag {
            net: clean(&format!("{title}: {}", names.join(", "))),
            name: truncate(&title, NAME_CELLS),
            lines,
            markers: Vec::new(),
            ground: false,
            between: true,
        });
        ends.push(End {
            node: tag_node,
            pin: None,
            source: false,
        });
        flow_edges(&ends, WireKind::Signal, &mut edges);
        wires.push(Wire {
            kind: WireKind::Bundle,
            name: format!("{title}: {}", names.join(", ")),
            ends,
        });
    }
    for (net_id, net) in plan.nets.iter().enumerate() {
        if bundled[net_id] {
            continue;
        }
        let Some(kind) = net_kind[net_id] else {
            if let Some(markers) = net_markers.remove(&net_id) {
                // A ground net a finding names: a tag beside the part that
                // returns to the battery (or the net's first part).
                let anchor = net
                    .pins
                    .iter()
                    .find(|p| matches!(plan.parts[p.part].class, Class::Battery(_)))
                    .or(net.pins.first());
                let tag_node = part_count + tags.len();
                tags.push(Tag {
                    net: clean(&net.name),
                    name: truncate(&clean(&net.name), NAME_CELLS),
                    lines: ground_lines(plan, net_id),
                    markers,
                    ground: true,
                    between: false,
                });
                if let Some(pin) = anchor {
                    edges.push((pin.part, tag_node));
                }
            }
            continue;
        };
        let sources = net_sources(plan, circuit, net_id, kind);
        let mut ends: Vec<End> = net
            .pins
            .iter()
            .filter_map(|p| {
                let slot = *pin_slot[p.part].get(&p.pin)?;
                Some(End {
                    node: p.part,
                    pin: Some(slot),
                    source: sources.contains(&(p.part, p.pin)),
                })
            })
            .collect();
        let markers = net_markers.remove(&net_id).unwrap_or_default();
        let tagged = kind != WireKind::Signal || !markers.is_empty();
        if tagged {
            let tag_node = part_count + tags.len();
            let has_source = ends.iter().any(|e| e.source);
            // A rail nobody feeds: its tag stands for the missing source.
            let tag_is_source = !has_source && matches!(kind, WireKind::Rail | WireKind::MotorLead);
            tags.push(Tag {
                net: clean(&net.name),
                name: truncate(&clean(&net.name), NAME_CELLS),
                lines: net_lines(plan, checked.analysis.as_ref(), net_id, kind, has_source),
                markers,
                ground: false,
                between: false,
            });
            ends.push(End {
                node: tag_node,
                pin: None,
                source: tag_is_source,
            });
        }
        if ends.len() < 2 {
            continue;
        }
        flow_edges(&ends, kind, &mut edges);
        wires.push(Wire {
            kind,
            name: net.name.clone(),
            ends,
        });
    }
    for link in &plan.links {
        let host = port_slot[link.host.0].get(&link.host.1);
        let device = port_slot[link.device.0].get(&link.device.1);
        let (Some(&host), Some(&device)) = (host, device) else {
            continue;
        };
        let ends = vec![
            End {
                node: link.host.0,
                pin: Some(host),
                source: true,
            },
            End {
                node: link.device.0,
                pin: Some(device),
                source: false,
            },
        ];
        flow_edges(&ends, WireKind::Cable, &mut edges);
        let host_part = &plan.parts[link.host.0];
        let device_part = &plan.parts[link.device.0];
        wires.push(Wire {
            kind: WireKind::Cable,
            name: format!(
                "{}.{} to {}.{}",
                host_part.name,
                host_part.ports[link.host.1].name,
                device_part.name,
                device_part.ports[link.device.1].name
            ),
            ends,
        });
    }
    edges.sort_unstable();
    edges.dedup();

    let sources = plan.batteries();
    let file = clean(checked.sources.name(checked.plan_source));
    let name = plan
        .name
        .as_deref()
        .map(clean)
        .filter(|n| !n.is_empty())
        .unwrap_or_else(|| file.clone());
    Content {
        parts,
        tags,
        wires,
        edges,
        sources,
        findings,
        heading: Heading {
            name,
            file,
            revision: plan.revision.as_deref().map(clean),
            date: plan.date.as_deref().map(clean),
            author: plan.author.as_deref().map(clean),
            summary: Summary::of(&checked.findings).line(),
            solved: checked.analysis.is_some(),
        },
        cautions: crate::safety::cautions(plan)
            .iter()
            .map(|c| clean(c))
            .collect(),
    }
}

type Markers = Vec<Vec<Marker>>;

/// Numbers the findings in report order and hangs a marker on every part and
/// net each one names.
fn number_findings(checked: &Checked) -> (Vec<Listed>, Markers, BTreeMap<NetId, Vec<Marker>>) {
    let plan = &checked.plan;
    let part_by_name: BTreeMap<&str, PartId> = plan
        .parts
        .iter()
        .enumerate()
        .map(|(i, p)| (p.name.as_str(), i))
        .collect();
    let net_by_name: BTreeMap<&str, NetId> = plan
        .nets
        .iter()
        .enumerate()
        .map(|(i, n)| (n.name.as_str(), i))
        .collect();
    let mut listed = Vec::new();
    let mut part_markers = vec![Vec::new(); plan.parts.len()];
    let mut net_markers: BTreeMap<NetId, Vec<Marker>> = BTreeMap::new();
    for (i, finding) in checked.findings.iter().enumerate() {
        let marker = Marker {
            number: i + 1,
            severity: finding.severity,
        };
        for name in &finding.parts {
            if let Some(&part) = part_by_name.get(name.as_str()) {
                part_markers[part].push(marker);
            }
        }
        for name in &finding.nets {
            if let Some(&net) = net_by_name.get(name.as_str()) {
                net_markers.entry(net).or_default().push(marker);
            }
        }
        listed.push(Listed {
            marker,
            text: clean(&plain_words(&format!(
                "{}: {}",
                finding.rule, finding.message
            ))),
            fix: finding.help.as_deref().map(|h| clean(&plain_words(h))),
        });
    }
    (listed, part_markers, net_markers)
}

/// Groups of two or more logic signals that each run between the same two
/// parts and nowhere else, and that no finding names: each group is drawn as
/// one bundle. In net order, so the same plan gives the same bundles.
fn bundles(
    plan: &Plan,
    net_kind: &[Option<WireKind>],
    net_markers: &BTreeMap<NetId, Vec<Marker>>,
    pin_slot: &[BTreeMap<usize, usize>],
) -> Vec<Vec<NetId>> {
    let mut by_pair: BTreeMap<(PartId, PartId), Vec<NetId>> = BTreeMap::new();
    for (net_id, net) in plan.nets.iter().enumerate() {
        if net_kind[net_id] != Some(WireKind::Signal) || net_markers.contains_key(&net_id) {
            continue;
        }
        if net.pins.len() < 2
            || net
                .pins
                .iter()
                .any(|p| !pin_slot[p.part].contains_key(&p.pin))
        {
            continue;
        }
        let mut parts: Vec<PartId> = net.pins.iter().map(|p| p.part).collect();
        parts.sort_unstable();
        parts.dedup();
        if let [a, b] = parts[..] {
            by_pair.entry((a, b)).or_default().push(net_id);
        }
    }
    let mut groups: Vec<Vec<NetId>> = by_pair
        .into_values()
        .filter(|members| members.len() >= 2)
        .collect();
    groups.sort_unstable();
    groups
}

/// Message text as the drawing prints it: the backticks that mark names in
/// the terminal report are dropped (the names stay).
fn plain_words(text: &str) -> String {
    text.replace('`', "")
}

/// How a net is drawn; `None` for a ground net (symbols, no line). A node
/// with a source and a ground is a short: it stays a drawn rail so the short
/// shows.
fn net_kind(plan: &Plan, circuit: &Circuit, net: NetId) -> Option<WireKind> {
    let node = &circuit.nodes[circuit.node_of_net[net]];
    if node.is_ground() && node.supply_outs.is_empty() {
        // A ground lead with a wire size, and the lead off a battery
        // negative, are drawn like rails; other grounds are symbols.
        let on_battery = plan.nets[net].pins.iter().any(|p| {
            matches!(plan.parts[p.part].class, Class::Battery(_))
                && plan.parts[p.part].pins[p.pin].role == PinRole::Ground
        });
        return (plan.nets[net].wire.is_some() || on_battery).then_some(WireKind::Ground);
    }
    let roles = || {
        plan.nets[net]
            .pins
            .iter()
            .map(|p| plan.parts[p.part].pins[p.pin].role)
    };
    if roles().any(|r| matches!(r, PinRole::BridgeOut | PinRole::Winding)) {
        return Some(WireKind::MotorLead);
    }
    if !node.supply_outs.is_empty() || !node.supply_ins.is_empty() {
        return Some(WireKind::Rail);
    }
    Some(WireKind::Signal)
}

/// The pins through which power (or a signal) enters a net.
fn net_sources(plan: &Plan, circuit: &Circuit, net: NetId, kind: WireKind) -> Vec<(PartId, usize)> {
    let pins = &plan.nets[net].pins;
    let with_role = |roles: &[PinRole]| -> Vec<(PartId, usize)> {
        pins.iter()
            .filter(|p| roles.contains(&plan.parts[p.part].pins[p.pin].role))
            .map(|p| (p.part, p.pin))
            .collect()
    };
    let from_parent = || {
        circuit.parent[net]
            .map(|p| vec![(p.part, p.downstream_pin)])
            .unwrap_or_default()
    };
    match kind {
        WireKind::Rail => {
            // Power enters through the part that joins this net to its
            // source's net, and from any source on the net itself.
            let mut sources = with_role(&[PinRole::SupplyOut]);
            let node = &circuit.nodes[circuit.node_of_net[net]];
            if !node.supply_outs.is_empty() {
                sources.extend(from_parent());
            }
            sources
        }
        WireKind::MotorLead => {
            let bridges = with_role(&[PinRole::BridgeOut]);
            if bridges.is_empty() {
                from_parent()
            } else {
                bridges
            }
        }
        WireKind::Ground => {
            // The return flows back to the battery negative: the end towards
            // it (the battery's own pin, or the part joining this net to the
            // net nearer the battery) is where the lead starts.
            let mut sources: Vec<(PartId, usize)> = pins
                .iter()
                .filter(|p| {
                    matches!(plan.parts[p.part].class, Class::Battery(_))
                        && plan.parts[p.part].pins[p.pin].role == PinRole::Ground
                })
                .map(|p| (p.part, p.pin))
                .collect();
            sources.extend(from_parent());
            sources
        }
        WireKind::Signal => with_role(&[PinRole::LogicOut, PinRole::OpenDrain]),
        WireKind::Bundle | WireKind::Cable => Vec::new(),
    }
}

/// Power-flow edges of a drawn connection: from each source end to every
/// other end. A signal flows no power; only its tag is placed after its parts.
fn flow_edges(ends: &[End], kind: WireKind, edges: &mut Vec<(usize, usize)>) {
    if kind == WireKind::Ground {
        // The return follows the power's columns; only its tag is placed by it.
        for from in ends.iter().filter(|e| e.source) {
            for tag in ends.iter().filter(|e| e.pin.is_none()) {
                edges.push((from.node, tag.node));
            }
        }
        return;
    }
    if kind == WireKind::Signal {
        let Some(tag) = ends.iter().find(|e| e.pin.is_none()) else {
            return;
        };
        for end in ends.iter().filter(|e| e.pin.is_some()) {
            edges.push((end.node, tag.node));
        }
        return;
    }
    for from in ends.iter().filter(|e| e.source) {
        for to in ends.iter().filter(|e| !e.source) {
            if from.node != to.node {
                edges.push((from.node, to.node));
            }
        }
    }
}

/// Per electrical node: whether it is a ground that reaches a battery negative
/// (directly or through a USB cable's ground).
fn grounded_nodes(plan: &Plan, circuit: &Circuit) -> Vec<bool> {
    circuit
        .nodes
        .iter()
        .enumerate()
        .map(|(node_id, node)| {
            node.grounds.iter().any(|p| {
                matches!(plan.parts[p.part].class, Class::Battery(_))
                    || (circuit.is_grounded(p.part)
                        && circuit.ground_net[p.part]
                            .is_some_and(|n| circuit.node_of_net[n] == node_id))
            })
        })
        .collect()
}

/// Whether ground symbols carry their net's name: only when the plan has
/// more than one ground node, so separate grounds can be told apart.
fn several_grounds(circuit: &Circuit, net_kind: &[Option<WireKind>]) -> bool {
    let ground_nodes = circuit
        .nodes
        .iter()
        .filter(|node| {
            node.nets
                .iter()
                .any(|&net| matches!(net_kind[net], None | Some(WireKind::Ground)))
        })
        .count();
    ground_nodes >= 2
}

/// Whether a part needs a return to a battery negative: it has a ground pin,
/// takes or gives power, or hangs on a cable (as `ground/floating` decides).
fn needs_ground(plan: &Plan, part_id: PartId) -> bool {
    let part = &plan.parts[part_id];
    if matches!(part.class, Class::Battery(_)) {
        return false;
    }
    part.pins.iter().any(|p| {
        matches!(
            p.role,
            PinRole::Ground | PinRole::SupplyIn | PinRole::SupplyOut
        )
    }) || !part.ports.is_empty()
}

fn stage(class: &Class) -> Stage {
    match class {
        Class::Battery(_) => Stage::Source,
        Class::Fuse(_) | Class::Switch(_) | Class::Connector(_) => Stage::Protection,
        Class::Regulator(_) | Class::Driver(_) | Class::Shifter => Stage::Conversion,
        Class::Motor(_)
        | Class::Resistor(_)
        | Class::Board
        | Class::Sensor
        | Class::Load
        | Class::Servo => Stage::Load,
    }
}

/// The one line that says what a part can take or give, e.g. `buck 5 V 3 A`.
fn rating(plan: &Plan, part_id: PartId) -> Option<String> {
    let part = &plan.parts[part_id];
    let text = match &part.class {
        Class::Battery(b) => {
            let nominal = crate::analysis::battery_voltage(plan, part_id, BatteryState::Nominal)?;
            let mut s = format!("{} {}", b.pack_name(), show_voltage(nominal));
            if let Some(capacity) = b.capacity {
                s.push(' ');
                s.push_str(&crate::units::show_charge(capacity.value));
            }
            s
        }
        Class::Fuse(f) => {
            let speed = match f.speed {
                crate::model::FuseSpeed::Fast => "fast",
                crate::model::FuseSpeed::Slow => "slow",
            };
            match f.rating {
                Some(r) => format!("{} {speed}", show_current(r.value)),
                None => format!("unrated, {speed}"),
            }
        }
        Class::Switch(s) => {
            let rating = s.rating.map(|r| show_current(r.value));
            match (rating, s.stop) {
                (Some(r), true) => format!("{r}, emergency stop"),
                (Some(r), false) => r,
                (None, true) => "emergency stop".to_string(),
                (None, false) => return None,
            }
        }
        Class::Connector(c) => format!("{} per contact", show_current(c.rating?.value)),
        Class::Regulator(r) => {
            let mut s = format!("{} {}", r.topology.name(), show_voltage(r.output.nominal));
            if let Some(current) = r.current {
                s.push(' ');
                s.push_str(&show_current(current.value));
            }
            s
        }
        Class::Driver(d) => {
            let channels = d.channels.len();
            let mut s = format!("{channels} channel{}", if channels == 1 { "" } else { "s" });
            if let Some(current) = d.channel_current {
                s.push(' ');
                s.push_str(&show_current(current.value));
            }
            if let Some(peak) = d.channel_peak {
                s.push_str(&format!(", {} peak", show_current(peak.value)));
            }
            s
        }
        Class::Motor(m) => format!(
            "{} {}, stall {}",
            show_voltage(m.rated_voltage),
            show_current(m.rated_current),
            show_current(m.stall_current)
        ),
        Class::Resistor(r) => {
            let mut s = show_resistance(r.value);
            if let Some(power) = r.power {
                s.push(' ');
                s.push_str(&crate::units::show_power(power));
            }
            s
        }
        Class::Board | Class::Sensor | Class::Load | Class::Servo => {
            let pin_draw = part
                .pins
                .iter()
                .filter(|p| p.role == PinRole::SupplyIn)
                .find_map(|p| p.draw());
            let port_draw = part.ports.iter().find_map(|p| match p.kind {
                PortKind::UsbDevice { draw, .. } => draw,
                PortKind::UsbHost { .. } => None,
            });
            let draw = pin_draw.or(port_draw)?;
            format!(
                "draws {} typical, {} peak",
                show_current(draw.typical),
                show_current(draw.peak)
            )
        }
        Class::Shifter => return None,
    };
    Some(clean(&text))
}

/// A drawn net's tag lines: voltage window, currents, wire.
fn net_lines(
    plan: &Plan,
    analysis: Option<&Analysis>,
    net: NetId,
    kind: WireKind,
    has_source: bool,
) -> Vec<String> {
    let mut lines = Vec::new();
    match kind {
        WireKind::Rail if !has_source => lines.push("nothing feeds this rail".to_string()),
        WireKind::Signal => lines.push("signal".to_string()),
        WireKind::Ground => lines.push("ground return".to_string()),
        _ => {}
    }
    if let Some(analysis) = analysis {
        if kind == WireKind::Rail
            && let Some((empty, full)) = voltage_window(analysis, net)
        {
            let (low, high) = (show_voltage(empty), show_voltage(full));
            lines.push(if low == high {
                low
            } else {
                format!("{low}–{high}")
            });
        }
        if kind != WireKind::Signal
            && let Some((typical, peak)) = currents(plan, analysis, net)
        {
            lines.push(format!(
                "{} typical / {} peak",
                show_current(typical),
                show_current(peak)
            ));
        }
    }
    if let Some(wire) = wire_line(plan, net) {
        lines.push(wire);
    }
    lines
        .into_iter()
        .map(|l| truncate(&clean(&l), LINE_CELLS))
        .collect()
}

fn ground_lines(plan: &Plan, net: NetId) -> Vec<String> {
    let mut lines = vec!["ground".to_string()];
    lines.extend(wire_line(plan, net));
    lines
        .into_iter()
        .map(|l| truncate(&clean(&l), LINE_CELLS))
        .collect()
}

fn wire_line(plan: &Plan, net: NetId) -> Option<String> {
    let n = &plan.nets[net];
    match (n.wire, n.length) {
        (Some(w), Some(l)) => Some(format!("{} · {}", w.value, show_length(l.value))),
        (Some(w), None) => Some(w.value.to_string()),
        (None, _) => None,
    }
}

/// The net's voltage in the typical mode: lowest with the battery empty,
/// highest with it full.
fn voltage_window(
    analysis: &Analysis,
    net: NetId,
) -> Option<(ElectricPotential, ElectricPotential)> {
    let at = |battery: BatteryState| {
        analysis
            .settled()
            .filter(move |p| p.mode == ModeId::TYPICAL && p.battery == battery)
            .filter_map(move |p| p.net_potential[net])
    };
    let empty = at(BatteryState::Empty).reduce(|a, b| if b < a { b } else { a })?;
    let full = at(BatteryState::Full).reduce(|a, b| if b > a { b } else { a })?;
    Some((empty, full))
}

/// The net's current in the typical mode at a nominal battery, and the
/// highest over every mode (`worst` included) and battery state. A motor
/// lead carries its motor's current.
fn currents(
    plan: &Plan,
    analysis: &Analysis,
    net: NetId,
) -> Option<(ElectricCurrent, ElectricCurrent)> {
    let motors: Vec<PartId> = plan.nets[net]
        .pins
        .iter()
        .filter(|p| plan.parts[p.part].pins[p.pin].role == PinRole::Winding)
        .map(|p| p.part)
        .collect();
    let carried = |point: &OperatingPoint| {
        let mut current = point.net_current[net].abs();
        for &motor in &motors {
            if let Some(m) = point.motors[motor] {
                current = largest(current, m.current.abs());
            }
        }
        current
    };
    let typical = analysis
        .settled()
        .filter(|p| p.mode == ModeId::TYPICAL && p.battery == BatteryState::Nominal)
        .map(carried)
        .reduce(largest)?;
    let peak = analysis.settled().map(carried).reduce(largest)?;
    Some((typical, peak))
}

fn largest(a: ElectricCurrent, b: ElectricCurrent) -> ElectricCurrent {
    if b > a { b } else { a }
}
