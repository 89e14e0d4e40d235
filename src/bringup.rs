//! The first power-on of a plan, step by step: what to measure before
//! power, what to set on a bench supply, which reading to expect on each
//! rail in the order power flows, then motors, the stop and the battery.
//!
//! Every expected number comes from the operating point. The bench steps
//! use an extra point solved for the purpose — the plan with every load
//! idle and every motor stopped (motors disconnected) at nominal battery —
//! and the motor steps use the plan's own modes. The margins are named
//! where they are used: [`CURRENT_LIMIT_SHARE`] for the bench supply's
//! limit, the loads' own full-draw resistance for a short.

use crate::Checked;
use crate::analysis::{Analysis, BatteryState, ModeId, OperatingPoint, battery_voltage};
use crate::model::{Class, LoadState, Mode, MotorState, PartId, PartState, PinRef, PinRole, Plan};
use crate::units::{show_current, show_resistance, show_voltage};
use uom::si::electric_current::ampere;
use uom::si::electric_potential::volt;
use uom::si::electrical_resistance::ohm;
use uom::si::f64::{ElectricCurrent, ElectricPotential, ElectricalResistance};

/// The bench supply's current limit as a share of the expected idle draw:
/// 150 % (common practice: headroom for the draw figures' spread and for
/// capacitors charging at turn-on, tight enough that a short folds the
/// supply back before anything heats). Never above the main fuse.
pub const CURRENT_LIMIT_SHARE: f64 = 1.5;

/// A number the procedure quotes, with what it is, for tests and JSON.
#[derive(Clone, Debug, PartialEq)]
pub enum Figure {
    /// A voltage.
    Voltage(ElectricPotential),
    /// A current.
    Current(ElectricCurrent),
    /// A resistance.
    Resistance(ElectricalResistance),
}

/// One step: what to do, and the numbers it names.
#[derive(Clone, Debug)]
pub struct Step {
    /// The instruction, for a person with a meter.
    pub text: String,
    /// The numbers in it, by name (`expected_low`, `current_limit`, …).
    pub figures: Vec<(&'static str, Figure)>,
}

/// A stage of the procedure.
#[derive(Clone, Debug)]
pub struct Stage {
    /// Its heading.
    pub title: &'static str,
    /// Its steps, in order.
    pub steps: Vec<Step>,
}

/// The whole procedure.
#[derive(Clone, Debug)]
pub struct Procedure {
    /// The stages, in order.
    pub stages: Vec<Stage>,
    /// False when shorts or power loops kept the operating point from being
    /// solved: then only the checks before power are given.
    pub solved: bool,
}

fn step(text: String, figures: Vec<(&'static str, Figure)>) -> Step {
    Step { text, figures }
}

/// The plan with one more mode, last: every load idle and every motor
/// stopped, as on the bench with the motors disconnected.
fn bench_plan(plan: &Plan) -> Plan {
    let mut bench = plan.clone();
    let states = plan
        .parts
        .iter()
        .enumerate()
        .filter_map(|(id, part)| match part.class {
            Class::Motor(_) => Some((id, PartState::Motor(MotorState::Idle))),
            Class::Battery(_)
            | Class::Fuse(_)
            | Class::Switch(_)
            | Class::Connector(_)
            | Class::Resistor(_) => None,
            _ => Some((id, PartState::Load(LoadState::Idle))),
        })
        .collect();
    bench.modes.push(Mode {
        name: "bench".to_string(),
        span: plan.span,
        states,
        lasts: None,
    });
    bench
}

/// The first fuse on a battery's positive lead, with its rating.
fn main_fuse(checked: &Checked, battery: PartId) -> Option<(PartId, ElectricCurrent)> {
    let plan = &checked.plan;
    let circuit = &checked.circuit;
    let pos = plan.parts[battery].pin("pos")?;
    let net = plan.parts[battery].pins[pos].net?;
    let mut stack = vec![net];
    let mut seen = vec![false; plan.nets.len()];
    while let Some(here) = stack.pop() {
        if std::mem::replace(&mut seen[here], true) {
            continue;
        }
        for &child in &circuit.children[here] {
            let parent = circuit.parent[child]?;
            if let Class::Fuse(fuse) = &plan.parts[parent.part].class {
                if let Some(rating) = fuse.rating {
                    return Some((parent.part, rating.value));
                }
            } else {
                stack.push(child);
            }
        }
    }
    None
}

fn at_nominal<'p>(points: &[&'p OperatingPoint], mode: ModeId) -> Vec<&'p OperatingPoint> {
    points
        .iter()
        .copied()
        .filter(|p| p.mode == mode && p.battery == BatteryState::Nominal)
        .collect()
}

/// The lowest and highest of a measure over points.
fn window(
    points: &[&OperatingPoint],
    measure: impl Fn(&OperatingPoint) -> Option<f64>,
) -> Option<(f64, f64)> {
    points
        .iter()
        .filter_map(|p| measure(p))
        .fold(None, |acc, v| {
            Some(match acc {
                None => (v, v),
                Some((lo, hi)) => (lo.min(v), hi.max(v)),
            })
        })
}

fn pin_name(plan: &Plan, pin: PinRef) -> String {
    format!(
        "{}.{}",
        plan.parts[pin.part].name, plan.parts[pin.part].pins[pin.pin].name
    )
}

fn net_resistance(plan: &Plan, net: usize) -> ElectricalResistance {
    let spec = &plan.nets[net];
    match (spec.wire, spec.length) {
        (Some(wire), Some(length)) => {
            crate::wire::resistance_at(wire.value, length.value, plan.conductor_ambient(net))
        }
        _ => ElectricalResistance::new::<ohm>(0.0),
    }
}

fn before_power(checked: &Checked) -> Stage {
    let plan = &checked.plan;
    let circuit = &checked.circuit;
    let budget = crate::budget::budget(checked);
    let mut steps = vec![step(
        "Disconnect the battery and every motor; set the meter to resistance.".to_string(),
        Vec::new(),
    )];
    // Polarity at each connector on a battery's leads.
    for (part_id, part) in plan.parts.iter().enumerate() {
        if !matches!(part.class, Class::Connector(_)) {
            continue;
        }
        for (a, b) in crate::graph::through_pairs(plan, part_id) {
            let Some(net) = part.pins[a].net.or(part.pins[b].net) else {
                continue;
            };
            let node = circuit.node_of_net[net];
            let battery_source = circuit.source[node]
                .filter(|s| matches!(plan.parts[s.part].class, Class::Battery(_)));
            let sign = if circuit.nodes[node].is_ground() {
                "negative (−)"
            } else if battery_source.is_some() {
                "positive (+)"
            } else {
                continue;
            };
            steps.push(step(
                format!(
                    "Polarity: contact {}/{} of `{}` carries the battery {sign}; check the wire colours and the housing's marking against it before the first mating.",
                    part.pins[a].name, part.pins[b].name, part.name
                ),
                Vec::new(),
            ));
        }
    }
    // No rail shorted to ground.
    for rail in &budget.rails {
        let peak = rail.peak_current.get::<ampere>();
        if peak <= 0.0 {
            continue;
        }
        let lowest = ElectricalResistance::new::<ohm>(rail.voltage_nominal.get::<volt>() / peak);
        steps.push(step(
            format!(
                "Rail `{}`: measure from `{}` to ground. Its loads at full draw present {} ({} / {}); a reading below that, or near 0 Ω, is a short: find it before going on.",
                rail.nets[0],
                rail.source,
                show_resistance(lowest),
                show_voltage(rail.voltage_nominal),
                show_current(rail.peak_current)
            ),
            vec![("short_below", Figure::Resistance(lowest))],
        ));
    }
    // Each ground net's path to the battery negative.
    for (net, spec) in plan.nets.iter().enumerate() {
        if !circuit.nodes[circuit.node_of_net[net]].is_ground()
            || circuit.parent[net].is_none()
                && spec
                    .pins
                    .iter()
                    .any(|p| matches!(plan.parts[p.part].class, Class::Battery(_)))
        {
            continue;
        }
        let mut resistance = ElectricalResistance::new::<ohm>(0.0);
        let mut here = Some(net);
        let mut guard = 0;
        while let Some(n) = here {
            resistance += net_resistance(plan, n);
            here = circuit.parent[n].map(|p| p.net);
            guard += 1;
            if guard > plan.nets.len() {
                break;
            }
        }
        let parts: Vec<String> = spec
            .pins
            .iter()
            .filter(|p| plan.parts[p.part].pins[p.pin].role == PinRole::Ground)
            .map(|p| format!("`{}`", plan.parts[p.part].name))
            .collect();
        if parts.is_empty() {
            continue;
        }
        steps.push(step(
            format!(
                "Ground `{}` ({}): from each of these grounds to the battery's negative terminal expect {} of wire, which a meter shows as its leads' own reading (common practice: 0.1–0.3 Ω); an open or a few ohms is a ground not made.",
                spec.name,
                parts.join(", "),
                show_resistance(resistance)
            ),
            vec![("ground_path", Figure::Resistance(resistance))],
        ));
    }
    Stage {
        title: "Before power",
        steps,
    }
}

/// Builds the procedure for a checked plan.
pub fn procedure(checked: &Checked) -> Procedure {
    let mut stages = vec![before_power(checked)];
    if checked.analysis.is_none() {
        return Procedure {
            stages,
            solved: false,
        };
    }
    let plan = &checked.plan;
    let bench_plan = bench_plan(plan);
    let bench_mode = ModeId(bench_plan.modes.len() + 1);
    let bench = Analysis::solve_one_mode(&bench_plan, &checked.circuit, bench_mode);
    let bench_points: Vec<&OperatingPoint> = bench.settled().collect();
    let bench_nominal = at_nominal(&bench_points, bench_mode);

    // First power from a bench supply, per battery.
    let mut bench_steps = Vec::new();
    for battery in plan.batteries() {
        let Some(voltage) = battery_voltage(plan, battery, BatteryState::Nominal) else {
            continue;
        };
        let Some((_, idle)) = window(&bench_nominal, |p| {
            p.batteries[battery].map(|b| b.current.get::<ampere>())
        }) else {
            continue;
        };
        let idle = ElectricCurrent::new::<ampere>(idle);
        let fuse = main_fuse(checked, battery);
        let wanted = idle * CURRENT_LIMIT_SHARE;
        let limit = match fuse {
            Some((_, rating)) if rating < wanted => rating,
            _ => wanted,
        };
        let name = &plan.parts[battery].name;
        bench_steps.push(step(
            format!(
                "In place of `{name}`, connect a bench supply set to {} (the pack's nominal voltage) with its current limit at {}{}; motors stay disconnected. Switch on: it should draw about {}; a supply that sits at its limit means a short or a part powered the wrong way round: switch off and find it.",
                show_voltage(voltage),
                show_current(limit),
                match fuse {
                    Some((part, rating)) if rating < wanted => format!(
                        " (the {} rating of `{}`, below {} of the idle draw)",
                        show_current(rating),
                        plan.parts[part].name,
                        share_text()
                    ),
                    _ => format!(" ({} of the expected idle draw)", share_text()),
                },
                show_current(idle)
            ),
            vec![
                ("bench_voltage", Figure::Voltage(voltage)),
                ("current_limit", Figure::Current(limit)),
                ("idle_current", Figure::Current(idle)),
            ],
        ));
    }
    stages.push(Stage {
        title: "First power from a bench supply, motors disconnected",
        steps: bench_steps,
    });

    // Rail by rail in power-flow order.
    let mut rail_steps = Vec::new();
    for &node in &checked.circuit.rail_order {
        let Some(source) = checked.circuit.source[node] else {
            continue;
        };
        if matches!(plan.parts[source.part].class, Class::Battery(_)) {
            continue;
        }
        let Some((low, high)) = window(&bench_nominal, |p| {
            p.pin_voltage
                .get(source.part, source.pin)
                .map(|v| v.get::<volt>())
        }) else {
            continue;
        };
        let net = checked.circuit.root[node].unwrap_or(0);
        let (low, high) = (
            ElectricPotential::new::<volt>(low),
            ElectricPotential::new::<volt>(high),
        );
        let cause = match &plan.parts[source.part].class {
            Class::Regulator(_) => {
                "0 V: its input is not reaching it (check the rail feeding it and any fuse) or its output is shorted; low: overloaded or in dropout (measure its input); high: the wrong part or a damaged regulator — switch off before anything else gets it"
            }
            _ => {
                "0 V: its source is not powered or the rail is shorted; low: overloaded; high: the wrong source"
            }
        };
        rail_steps.push(step(
            format!(
                "Rail `{}`: meter from `{}` to its ground; expect {}–{}. Out of that — {cause}.",
                plan.nets[net].name,
                pin_name(plan, source),
                show_voltage(low),
                show_voltage(high)
            ),
            vec![
                ("expected_low", Figure::Voltage(low)),
                ("expected_high", Figure::Voltage(high)),
            ],
        ));
    }
    stages.push(Stage {
        title: "Rails, in the order power flows",
        steps: rail_steps,
    });

    // Motors, the stop, then the battery.
    let analysis_points: Vec<&OperatingPoint> =
        checked.analysis.iter().flat_map(|a| a.settled()).collect();
    let mut motor_steps = Vec::new();
    let stops: Vec<&str> = plan
        .parts
        .iter()
        .filter(|p| matches!(&p.class, Class::Switch(s) if s.stop))
        .map(|p| p.name.as_str())
        .collect();
    let moving = plan
        .parts
        .iter()
        .any(|p| matches!(p.class, Class::Motor(_) | Class::Servo) || p.actuator);
    if moving {
        motor_steps.push(step(
            "Switch off, connect the motors and actuators, and lift the wheels clear or block what moves.".to_string(),
            Vec::new(),
        ));
    }
    for battery in plan.batteries() {
        let name = &plan.parts[battery].name;
        motor_steps.push(step(
            format!(
                "Swap the bench supply for `{name}` itself, charged, through its fuse, and repeat the rail readings once."
            ),
            Vec::new(),
        ));
    }
    if moving {
        for stop in &stops {
            motor_steps.push(step(
                format!(
                    "Test the stop before the first drive: strike `{stop}` and check with the meter that the rail below it reads 0 V; reset it."
                ),
                Vec::new(),
            ));
        }
    }
    for battery in plan.batteries() {
        let name = &plan.parts[battery].name;
        for mode in ModeId::all(plan) {
            // `worst` and modes that hold a motor stalled are not bench tests.
            let stalls = plan.parts.iter().enumerate().any(|(id, p)| {
                matches!(p.class, Class::Motor(_))
                    && crate::analysis::part_state(plan, mode, id)
                        == PartState::Motor(MotorState::Stall)
            });
            if mode == ModeId::WORST || stalls {
                continue;
            }
            let points = at_nominal(&analysis_points, mode);
            let Some((low, high)) = window(&points, |p| {
                p.batteries[battery].map(|b| b.current.get::<ampere>())
            }) else {
                continue;
            };
            let (low, high) = (
                ElectricCurrent::new::<ampere>(low),
                ElectricCurrent::new::<ampere>(high),
            );
            motor_steps.push(step(
                format!(
                    "In mode `{}`, with a clamp meter on the lead of `{name}`: expect {}–{} at nominal charge; much more means a stalled or miswired motor, much less one not connected.",
                    mode.name(plan),
                    show_current(low),
                    show_current(high)
                ),
                vec![
                    ("current_low", Figure::Current(low)),
                    ("current_high", Figure::Current(high)),
                ],
            ));
        }
    }
    stages.push(Stage {
        title: "Motors, the stop, then the battery",
        steps: motor_steps,
    });

    let mut cautions: Vec<Step> = crate::safety::cautions(plan)
        .into_iter()
        .map(|c| step(c.to_string(), Vec::new()))
        .collect();
    if cautions.is_empty() {
        cautions.push(step(
            "railcheck checks a plan, not a build: local electrical codes and qualified practice take precedence.".to_string(),
            Vec::new(),
        ));
    }
    stages.push(Stage {
        title: "Safety",
        steps: cautions,
    });
    Procedure {
        stages,
        solved: true,
    }
}

fn share_text() -> String {
    format!("{:.0} %", CURRENT_LIMIT_SHARE * 100.0)
}
