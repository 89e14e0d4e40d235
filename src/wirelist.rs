//! The wire list a builder cuts and crimps from: one row per conductor run
//! with its ends, size, length, currents, protecting fuse and drop; the
//! metres of each size to buy; and each connector's pinout with the current
//! through every contact.
//!
//! It reads a checked plan and computes numbers; `report::wires` lays them
//! out as a table, CSV or JSON.

use crate::Checked;
use crate::analysis::OperatingPoint;
use crate::graph::{MotorFeed, through_pairs};
use crate::model::{Class, NetId, PartId, PinRef, PinRole, Plan};
use crate::rules::Context;
use crate::units::WireSize;
use uom::si::electric_current::ampere;
use uom::si::f64::{ElectricCurrent, ElectricPotential, Length};

/// What a run carries, which sets where it sits in the list.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum RunRole {
    /// From a battery, fuse, switch or converter to the loads it feeds.
    Supply,
    /// A ground conductor back toward the battery negative.
    Return,
    /// Between a driver's bridge output (or a rail) and a motor.
    Motor,
    /// A logic signal.
    Signal,
    /// A USB cable: VBUS, ground and data in one sheath.
    Usb,
}

impl RunRole {
    /// The word the list uses (`supply`, `return`, `motor`, `signal`, `USB`).
    pub fn name(self) -> &'static str {
        match self {
            RunRole::Supply => "supply",
            RunRole::Return => "return",
            RunRole::Motor => "motor",
            RunRole::Signal => "signal",
            RunRole::Usb => "USB",
        }
    }
}

/// One conductor run: a net (or a USB cable) from its source end to the
/// pins it reaches.
#[derive(Clone, Debug)]
pub struct Run {
    /// The net's name, or `host.port → device.port` for a USB cable.
    pub net: String,
    /// What it carries.
    pub role: RunRole,
    /// The end toward the source (`main_fuse.b`, `buck.vout`, `pack.neg`).
    pub from: String,
    /// The other ends, in the plan's order; more than one is a splice or a
    /// bus the builder joins.
    pub to: Vec<String>,
    /// The conductor's size, when the plan gives it.
    pub wire: Option<WireSize>,
    /// The conductor's length, one way, when the plan gives it.
    pub length: Option<Length>,
    /// The insulation colour the plan chose; never invented.
    pub colour: Option<String>,
    /// The highest current over the continuous operating points (never
    /// `worst`, never a brief mode); `None` when unsolved.
    pub continuous: Option<ElectricCurrent>,
    /// The highest current over every operating point, `worst` included.
    pub peak: Option<ElectricCurrent>,
    /// Where the peak is drawn: ``mode `climb` at empty battery``.
    pub peak_at: Option<String>,
    /// The fuses whose opening protects this conductor.
    pub fuses: Vec<String>,
    /// The drop along this conductor at its peak current (both conductors
    /// of a USB cable); `None` without size and length.
    pub drop_at_peak: Option<ElectricPotential>,
}

/// How much of one size the list uses.
#[derive(Clone, Debug)]
pub struct SizeTotal {
    /// The size.
    pub wire: WireSize,
    /// Whether it is USB cable (bought as cable, not as single wire).
    pub cable: bool,
    /// The total one-way length of its runs.
    pub length: Length,
    /// How many runs use it.
    pub runs: usize,
}

/// One contact of a connector: its two pins, the nets on either side and
/// the current through it.
#[derive(Clone, Debug)]
pub struct Contact {
    /// The plug-side pin (`a1`).
    pub a: String,
    /// The socket-side pin (`b1`).
    pub b: String,
    /// The net on the plug side.
    pub net_a: Option<String>,
    /// The net on the socket side.
    pub net_b: Option<String>,
    /// The highest continuous current through the contact.
    pub continuous: Option<ElectricCurrent>,
    /// The highest current through the contact at any point.
    pub peak: Option<ElectricCurrent>,
}

/// A connector's pinout.
#[derive(Clone, Debug)]
pub struct Pinout {
    /// The connector part's name.
    pub connector: String,
    /// Its library id, when it came from the library (`connector/power-2pin-30a`).
    pub library_id: Option<String>,
    /// Its contacts in pin order.
    pub contacts: Vec<Contact>,
}

/// The whole wire list of a plan.
#[derive(Clone, Debug)]
pub struct WireList {
    /// The runs, in the order a builder cuts them: thickest wire first (one
    /// reel at a time), along the power path from the battery within a size;
    /// runs with no size given next; USB cables last.
    pub runs: Vec<Run>,
    /// Metres of each size, thickest first, then USB cable.
    pub totals: Vec<SizeTotal>,
    /// Every connector, in file order.
    pub pinouts: Vec<Pinout>,
    /// False when shorts or power loops kept the operating point from being
    /// solved: then the runs carry no currents.
    pub solved: bool,
}

/// The area a size is ordered by (thickest first).
fn area_of(size: WireSize) -> f64 {
    match size {
        WireSize::Awg(gauge) => crate::wire::awg_area(gauge).value,
        WireSize::Metric(area) => area.value,
    }
}

fn pin_name(plan: &Plan, pin: PinRef) -> String {
    format!(
        "{}.{}",
        plan.parts[pin.part].name, plan.parts[pin.part].pins[pin.pin].name
    )
}

/// The highest current over the points `keep` accepts, with where it is
/// drawn.
fn highest<'p>(
    points: impl Iterator<Item = &'p OperatingPoint>,
    current: impl Fn(&OperatingPoint) -> ElectricCurrent,
) -> Option<(ElectricCurrent, &'p OperatingPoint)> {
    let mut best: Option<(ElectricCurrent, &OperatingPoint)> = None;
    for point in points {
        let here = current(point).abs();
        if best.is_none_or(|(b, _)| here.get::<ampere>() > b.get::<ampere>() + 1e-12) {
            best = Some((here, point));
        }
    }
    best
}

fn role_of(cx: &Context, net: NetId) -> RunRole {
    let plan = cx.plan;
    let node = &cx.circuit.nodes[cx.circuit.node_of_net[net]];
    let on_net = || plan.nets[net].pins.iter();
    if on_net().any(|p| {
        plan.parts[p.part].pins[p.pin].role == PinRole::BridgeOut
            || matches!(plan.parts[p.part].class, Class::Motor(_))
                && !node.is_ground()
                && node.supply_outs.is_empty()
    }) {
        return RunRole::Motor;
    }
    if node.is_ground() {
        return RunRole::Return;
    }
    let powered = !node.supply_outs.is_empty()
        || !node.supply_ins.is_empty()
        || on_net().any(|p| matches!(plan.parts[p.part].class, Class::Battery(_)));
    if powered {
        RunRole::Supply
    } else {
        RunRole::Signal
    }
}

/// The end of a net toward its source: the pin of the part it hangs below,
/// the node's source pin, a battery terminal, a driving output, or its
/// first pin.
fn from_end(cx: &Context, net: NetId, role: RunRole) -> Option<PinRef> {
    let plan = cx.plan;
    let pins = &plan.nets[net].pins;
    if let Some(parent) = cx.circuit.parent[net] {
        return Some(PinRef {
            part: parent.part,
            pin: parent.downstream_pin,
        });
    }
    let node = cx.circuit.node_of_net[net];
    let preferred = match role {
        RunRole::Supply => cx.circuit.source[node]
            .filter(|p| pins.contains(p))
            .or_else(|| {
                pins.iter()
                    .copied()
                    .find(|p| matches!(plan.parts[p.part].class, Class::Battery(_)))
            }),
        RunRole::Return => pins
            .iter()
            .copied()
            .find(|p| matches!(plan.parts[p.part].class, Class::Battery(_))),
        RunRole::Motor => pins
            .iter()
            .copied()
            .find(|p| plan.parts[p.part].pins[p.pin].role == PinRole::BridgeOut),
        RunRole::Signal => pins
            .iter()
            .copied()
            .find(|p| plan.parts[p.part].pins[p.pin].role.is_output()),
        RunRole::Usb => None,
    };
    preferred.or_else(|| pins.first().copied())
}

/// The fuse nearest above a net in its node's tree (for supply nets with no
/// sized wire, which the fuse rules do not list).
fn fuse_above(cx: &Context, net: NetId) -> Option<PartId> {
    let mut here = net;
    while let Some(parent) = cx.circuit.parent[here] {
        if matches!(cx.plan.parts[parent.part].class, Class::Fuse(_)) {
            return Some(parent.part);
        }
        here = parent.net;
    }
    None
}

/// Builds the wire list of a checked plan.
pub fn wire_list(checked: &Checked) -> WireList {
    let plan = &checked.plan;
    let cx = Context {
        plan,
        circuit: &checked.circuit,
        analysis: checked.analysis.as_ref(),
        scenarios: Some(&checked.scenarios),
        margins: None,
        worked: Default::default(),
    };
    let protecting = crate::rules::fuse::protecting_fuses(&cx);
    let settled = || checked.analysis.iter().flat_map(|a| a.settled());
    let solved = checked.analysis.is_some();

    // Where the fuse rules find none (a run with no size), a motor lead is
    // protected by its driver's supply fuse and a supply net by the fuse
    // above it.
    let driver_of_motor_net = |net: NetId| {
        plan.nets[net]
            .pins
            .iter()
            .find_map(|p| match cx.circuit.motor_feed[p.part] {
                Some(MotorFeed::Driver { driver, .. }) => Some(driver),
                _ => None,
            })
    };
    let fuses_of = |net: NetId, role: RunRole| -> Vec<String> {
        let mut found: Vec<PartId> = protecting[net].clone();
        if found.is_empty() {
            let above = match role {
                RunRole::Supply => fuse_above(&cx, net),
                RunRole::Motor => driver_of_motor_net(net).and_then(|driver| {
                    let part = &plan.parts[driver];
                    let vm = part.pin("vm").or_else(|| {
                        part.pins_with_role(PinRole::SupplyIn)
                            .map(|(i, _)| i)
                            .next()
                    })?;
                    let net = part.pins[vm].net?;
                    protecting[net]
                        .first()
                        .copied()
                        .or_else(|| fuse_above(&cx, net))
                }),
                _ => None,
            };
            found.extend(above);
        }
        found.iter().map(|&f| plan.parts[f].name.clone()).collect()
    };

    let mut runs: Vec<(Option<f64>, usize, Run)> = Vec::new();
    // Power path order: each supply node's nets from its source outward,
    // nodes in the order power flows; every other net (grounds, motor
    // leads, signals) after them in file order.
    let mut position_of = vec![usize::MAX; plan.nets.len()];
    let mut next = 0;
    for &node in &checked.circuit.rail_order {
        for &net in &checked.circuit.node_nets[node] {
            if position_of[net] == usize::MAX {
                position_of[net] = next;
                next += 1;
            }
        }
    }

    for (net, spec) in plan.nets.iter().enumerate() {
        if spec.pins.len() < 2 && spec.wire.is_none() {
            continue;
        }
        let role = role_of(&cx, net);
        let position = if role == RunRole::Supply {
            position_of[net]
        } else {
            next + net
        };
        let from = from_end(&cx, net, role);
        let to: Vec<String> = spec
            .pins
            .iter()
            .filter(|&&p| Some(p) != from)
            .map(|&p| pin_name(plan, p))
            .collect();
        // A motor lead carries its motor's current, which the solver keeps
        // with the motor rather than on the net.
        let motors: Vec<PartId> = spec
            .pins
            .iter()
            .map(|p| p.part)
            .filter(|&part| matches!(plan.parts[part].class, Class::Motor(_)))
            .collect();
        let current = |p: &OperatingPoint| {
            if role == RunRole::Motor && !motors.is_empty() {
                motors
                    .iter()
                    .filter_map(|&m| p.motors[m].map(|m| m.current.abs()))
                    .fold(ElectricCurrent::new::<ampere>(0.0), |a, b| a + b)
            } else {
                p.net_current[net]
            }
        };
        let peak = highest(settled(), current);
        let continuous = highest(settled().filter(|p| p.is_continuous()), current);
        let wire = spec.wire.map(|w| w.value);
        let length = spec.length.map(|l| l.value);
        let drop_at_peak = match (wire, length, peak) {
            (Some(size), Some(length), Some((current, _))) => Some(
                crate::wire::resistance_at(size, length, plan.conductor_ambient(net)) * current,
            ),
            _ => None,
        };
        let carries_current = role != RunRole::Signal;
        runs.push((
            wire.map(area_of),
            position,
            Run {
                net: spec.name.clone(),
                role,
                from: from.map_or_else(String::new, |p| pin_name(plan, p)),
                to,
                wire,
                length,
                colour: spec.colour.clone(),
                continuous: continuous.filter(|_| carries_current).map(|(i, _)| i),
                peak: peak.filter(|_| carries_current).map(|(i, _)| i),
                peak_at: peak
                    .filter(|_| carries_current)
                    .map(|(_, p)| crate::rules::mode_label(plan, p.mode, p.battery)),
                fuses: if carries_current {
                    fuses_of(net, role)
                } else {
                    Vec::new()
                },
                drop_at_peak: drop_at_peak.filter(|_| carries_current),
            },
        ));
    }
    // Thickest first; runs with no size after every sized one; within a
    // size (or among the unsized), supply, return, motor, signal, each
    // along the power path.
    runs.sort_by(|(area_a, pos_a, run_a), (area_b, pos_b, run_b)| {
        let size_key = |area: &Option<f64>| area.map_or(f64::INFINITY, |a| -a);
        size_key(area_a)
            .total_cmp(&size_key(area_b))
            .then(run_a.role.cmp(&run_b.role))
            .then(pos_a.cmp(pos_b))
    });
    let mut runs: Vec<Run> = runs.into_iter().map(|(_, _, run)| run).collect();

    for (index, link) in plan.links.iter().enumerate() {
        let port = |(part, port): (PartId, usize)| {
            format!(
                "{}.{}",
                plan.parts[part].name, plan.parts[part].ports[port].name
            )
        };
        let current = |p: &OperatingPoint| p.link_current[index];
        let peak = highest(settled(), current);
        let continuous = highest(settled().filter(|p| p.is_continuous()), current);
        let wire = link.wire.map(|w| w.value);
        let length = link.length.map(|l| l.value);
        let drop_at_peak = match (wire, length, peak) {
            // VBUS out and ground back: two conductors.
            (Some(size), Some(length), Some((current, _))) => {
                Some(crate::wire::resistance_at(size, length, plan.cable_ambient()) * current * 2.0)
            }
            _ => None,
        };
        runs.push(Run {
            net: "USB cable".to_string(),
            role: RunRole::Usb,
            from: port(link.host),
            to: vec![port(link.device)],
            wire,
            length,
            colour: None,
            continuous: continuous.map(|(i, _)| i),
            peak: peak.map(|(i, _)| i),
            peak_at: peak.map(|(_, p)| crate::rules::mode_label(plan, p.mode, p.battery)),
            fuses: Vec::new(),
            drop_at_peak,
        });
    }

    let mut totals: Vec<SizeTotal> = Vec::new();
    for run in &runs {
        let (Some(wire), Some(length)) = (run.wire, run.length) else {
            continue;
        };
        let cable = run.role == RunRole::Usb;
        match totals
            .iter_mut()
            .find(|t| t.wire == wire && t.cable == cable)
        {
            Some(total) => {
                total.length += length;
                total.runs += 1;
            }
            None => totals.push(SizeTotal {
                wire,
                cable,
                length,
                runs: 1,
            }),
        }
    }
    totals.sort_by(|a, b| {
        a.cable
            .cmp(&b.cable)
            .then(area_of(b.wire).total_cmp(&area_of(a.wire)))
    });

    let mut pinouts = Vec::new();
    for (part_id, part) in plan.parts.iter().enumerate() {
        if !matches!(part.class, Class::Connector(_)) {
            continue;
        }
        let contacts = through_pairs(plan, part_id)
            .into_iter()
            .map(|(a, b)| {
                let downstream = cx.downstream_net(part_id, a, b);
                let current = |p: &OperatingPoint| {
                    downstream.map_or(ElectricCurrent::new::<ampere>(0.0), |n| p.net_current[n])
                };
                let through = |keep: fn(&&OperatingPoint) -> bool| {
                    downstream
                        .and(highest(settled().filter(keep), current))
                        .map(|(i, _)| i)
                };
                Contact {
                    a: part.pins[a].name.clone(),
                    b: part.pins[b].name.clone(),
                    net_a: part.pins[a].net.map(|n| plan.nets[n].name.clone()),
                    net_b: part.pins[b].net.map(|n| plan.nets[n].name.clone()),
                    continuous: through(|p| p.is_continuous()),
                    peak: through(|_| true),
                }
            })
            .collect();
        pinouts.push(Pinout {
            connector: part.name.clone(),
            library_id: part.library_id.clone(),
            contacts,
        });
    }

    WireList {
        runs,
        totals,
        pinouts,
        solved,
    }
}
