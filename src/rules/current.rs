//! Currents against the ratings of what carries them: regulator and onboard
//! outputs, switches, connector contacts, driver channels, USB host ports.
//! Peak current meets maximum ratings; continuous current meets continuous
//! ratings and the derating limit (format reference §6).

use super::{
    Context, Finding, Margin, RatingKind, Rule, RuleDoc, Severity, Unit, continuous, exceeds,
    mode_label, show_contributors, worst_point,
};
use crate::analysis::OperatingPoint;
use crate::graph::through_pairs;
use crate::model::{Class, MotorState, NetId, PartId, PinRole, PortKind, Rated};
use crate::syntax::Span;
use crate::units::{show_current, show_share};
use uom::si::electric_current::ampere;
use uom::si::f64::ElectricCurrent;
use uom::si::ratio::ratio;

pub const OVER_RATING: Rule = Rule {
    id: "current/over-rating",
    severity: Severity::Error,
    summary: "a current exceeds a rating",
    doc: RuleDoc {
        what: "The highest current over all modes (`worst` included) through each regulator output, onboard supply output and USB host port against its rating; the continuous current (never `worst` nor a brief mode) through each switch and connector contact against its `rating`, and every peak against its `surge` rating when one is given; and the continuous current of each driver channel (motors running) against `channel_current`.",
        why: "A regulator past its rating folds back or overheats, a switch or contact past its rating burns its contacts, a driver past its continuous rating shuts down or fails — and the robot stops or smokes.",
        example: "railcheck: 1\nname: orchard scout, 5 V rail\nparts:\n  pack:  { use: battery/lipo-3s, with: { cutoff: true } }\n  fuse:  { use: fuse/blade-3a }\n  buck:  { use: regulator/buck-5v-3a }   # brain 1.8 A + camera 1.5 A = 3.3 A peak > 3 A\n  brain: { use: board/sbc-5v }\n  cam:   { class: load, pins: { vin: { role: supply-in, range: 4.75 V..5.25 V, draw: { typical: 0.5 A, peak: 1.5 A } }, gnd: { role: ground } } }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, buck.vin]\n  5V:    [buck.vout, brain.vin, cam.vin]\n  GND:   [pack.neg, buck.gnd, brain.gnd, cam.gnd]\n",
        fix: "railcheck: 1\nname: orchard scout, 5 V rail\nparts:\n  pack:  { use: battery/lipo-3s, with: { cutoff: true } }\n  fuse:  { use: fuse/blade-3a }\n  buck:  { use: regulator/buck-5v-5a }   # 3.3 A peak ≤ 5 A\n  brain: { use: board/sbc-5v }\n  cam:   { class: load, pins: { vin: { role: supply-in, range: 4.75 V..5.25 V, draw: { typical: 0.5 A, peak: 1.5 A } }, gnd: { role: ground } } }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, buck.vin]\n  5V:    [buck.vout, brain.vin, cam.vin]\n  GND:   [pack.neg, buck.gnd, brain.gnd, cam.gnd]\n",
        references: "Rating comparison with the 0.1 % tolerance of the format reference §6; a driver's continuous rating against the motor's running current and its peak rating against stall, common practice.",
    },
    needs_operating_point: true,
    check: check_ratings,
};

pub const DERATING: Rule = Rule {
    id: "current/derating",
    severity: Severity::Warning,
    summary: "continuous current above the derating share of a rating",
    doc: RuleDoc {
        what: "The continuous current (over `typical` and the user's modes, never `worst`) through each rated output, switch, contact and driver channel against `limits.derate` (default 80 %) of its rating.",
        why: "Parts run at their full rating run hot and age fast; 80 % continuous is the usual margin for regulators, drivers and switches.",
        example: "railcheck: 1\nname: greenhouse controller, 5 V heater rail\nparts:\n  pack:   { use: battery/lipo-3s, with: { cutoff: true } }\n  fuse:   { use: fuse/blade-3a }\n  buck:   { use: regulator/buck-5v-3a }   # 2.7 A continuous: 90 % of 3 A > 80 %\n  heater: { class: load, pins: { vin: { role: supply-in, range: 4.5 V..5.5 V, draw: { typical: 2.7 A, peak: 2.9 A } }, gnd: { role: ground } } }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, buck.vin]\n  5V:    [buck.vout, heater.vin]\n  GND:   [pack.neg, buck.gnd, heater.gnd]\n",
        fix: "railcheck: 1\nname: greenhouse controller, 5 V heater rail\nparts:\n  pack:   { use: battery/lipo-3s, with: { cutoff: true } }\n  fuse:   { use: fuse/blade-3a }\n  buck:   { use: regulator/buck-5v-5a }   # 2.7 A continuous: 54 % of 5 A\n  heater: { class: load, pins: { vin: { role: supply-in, range: 4.5 V..5.5 V, draw: { typical: 2.7 A, peak: 2.9 A } }, gnd: { role: ground } } }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  VBAT:  [fuse.b, buck.vin]\n  5V:    [buck.vout, heater.vin]\n  GND:   [pack.neg, buck.gnd, heater.gnd]\n",
        references: "Continuous load ≤ 80 % of rating: NEC 210.20(A) for overcurrent devices (the inverse of its 125 % rule); the same margin for regulators and drivers is common practice.",
    },
    needs_operating_point: true,
    // Decided together with over-rating in `check_ratings`.
    check: |_, _| {},
};

/// Reads one current out of an operating point.
type CurrentAt<'a> = Box<dyn Fn(&OperatingPoint) -> Option<ElectricCurrent> + 'a>;

/// Something with a current rating, and how to read its current at a point.
struct RatedPath<'a> {
    subject: String,
    span: Span,
    part: PartId,
    net: Option<String>,
    rating: ElectricCurrent,
    /// Continuous ratings (driver channels, switch and connector contacts)
    /// meet continuous current only.
    continuous_rating: bool,
    /// A surge rating meets brief peaks and is not derated.
    surge: bool,
    current: CurrentAt<'a>,
    /// What the current is made of, for the message.
    carries: Carries,
}

/// Where the loads behind a rated current are found.
enum Carries {
    /// Everything on this net and below it.
    Net(Option<NetId>),
    /// The devices at the ends of these USB cables.
    Links(Vec<usize>),
    /// A driver channel: its motors (named by the channel already).
    Channel,
}

fn rated_paths<'a>(cx: &'a Context) -> Vec<RatedPath<'a>> {
    let plan = cx.plan;
    let mut paths: Vec<RatedPath<'a>> = Vec::new();
    let at = |r: &Rated<ElectricCurrent>, fallback: Span| {
        if r.span.source == fallback.source {
            r.span
        } else {
            fallback
        }
    };
    for (part_id, part) in plan.parts.iter().enumerate() {
        match &part.class {
            Class::Regulator(regulator) => {
                if let Some(rating) = regulator.current {
                    let vout = part.pin("vout");
                    paths.push(RatedPath {
                        subject: format!("`{}` output", part.name),
                        span: at(&rating, part.span),
                        part: part_id,
                        net: vout
                            .and_then(|p| part.pins[p].net)
                            .map(|n| cx.net_name(n).to_string()),
                        rating: rating.value,
                        continuous_rating: false,
                        surge: false,
                        current: Box::new(move |p| p.regulators[part_id].map(|r| r.output_current)),
                        carries: Carries::Net(vout.and_then(|p| part.pins[p].net)),
                    });
                }
            }
            Class::Switch(switch) => {
                for (a, b) in through_pairs(plan, part_id) {
                    let subject = format!("switch `{}`", part.name);
                    contact_paths(cx, part_id, (a, b), switch.rating, switch.surge, subject)
                        .for_each(|p| paths.push(p));
                }
            }
            Class::Connector(connector) => {
                for (a, b) in through_pairs(plan, part_id) {
                    let subject = format!(
                        "contact `{}.{}`/`{}`",
                        part.name, part.pins[a].name, part.pins[b].name
                    );
                    contact_paths(
                        cx,
                        part_id,
                        (a, b),
                        connector.rating,
                        connector.surge,
                        subject,
                    )
                    .for_each(|p| paths.push(p));
                }
            }
            Class::Driver(driver) => {
                if let Some(rating) = driver.channel_current {
                    for channel in &driver.channels {
                        let number = channel.number;
                        let motors = cx
                            .circuit
                            .channel_motors
                            .get(&(part_id, number))
                            .cloned()
                            .unwrap_or_default();
                        paths.push(RatedPath {
                            subject: format!("`{}` channel {number}", part.name),
                            span: channel.span,
                            part: part_id,
                            net: part.pins[channel.outputs[0]]
                                .net
                                .map(|n| cx.net_name(n).to_string()),
                            rating: rating.value,
                            continuous_rating: true,
                            surge: false,
                            // The continuous rating meets the channel with its
                            // motors running (format reference §6); a stall meets the
                            // peak rating, in `driver/stall`.
                            current: Box::new(move |p| {
                                let stalled = motors.iter().any(|&m| {
                                    p.motors[m].is_some_and(|m| m.state == MotorState::Stall)
                                });
                                if stalled {
                                    return None;
                                }
                                p.channels[part_id]
                                    .iter()
                                    .find(|(n, _)| *n == number)
                                    .map(|(_, i)| *i)
                            }),
                            carries: Carries::Channel,
                        });
                    }
                }
            }
            Class::Battery(_) => {}
            _ => {
                for (pin_id, pin) in part.pins_with_role(PinRole::SupplyOut) {
                    if let Some(limit) = pin.current() {
                        paths.push(RatedPath {
                            subject: format!("`{}.{}` output", part.name, pin.name),
                            span: pin.net_span.unwrap_or(pin.span),
                            part: part_id,
                            net: pin.net.map(|n| cx.net_name(n).to_string()),
                            rating: limit,
                            continuous_rating: false,
                            surge: false,
                            current: Box::new(move |p| Some(p.pin_current.get(part_id, pin_id))),
                            carries: Carries::Net(pin.net),
                        });
                    }
                }
            }
        }
        // USB host ports: separate limits, or one limit shared by the ports so marked.
        let mut shared_limit: Option<ElectricCurrent> = None;
        let mut shared_links = Vec::new();
        for (port_id, port) in part.ports.iter().enumerate() {
            let PortKind::UsbHost {
                current: Some(limit),
                shared,
            } = port.kind
            else {
                continue;
            };
            let links: Vec<usize> = cx.circuit.part_links[part_id]
                .iter()
                .copied()
                .filter(|&l| plan.links[l].host == (part_id, port_id))
                .collect();
            if shared {
                shared_limit = Some(shared_limit.map_or(limit, |s: ElectricCurrent| s.min(limit)));
                shared_links.extend(links);
            } else if let Some(&link) = links.first() {
                paths.push(RatedPath {
                    subject: format!("USB port `{}.{}`", part.name, port.name),
                    span: plan.links[link].span,
                    part: part_id,
                    net: None,
                    rating: limit,
                    continuous_rating: false,
                    surge: false,
                    current: Box::new(move |p| Some(p.link_current[link])),
                    carries: Carries::Links(vec![link]),
                });
            }
        }
        if let (Some(limit), Some(&first)) = (shared_limit, shared_links.first()) {
            let carries = Carries::Links(shared_links.clone());
            paths.push(RatedPath {
                subject: format!("the shared supply of `{}`'s USB ports", part.name),
                span: plan.links[first].span,
                part: part_id,
                net: None,
                rating: limit,
                continuous_rating: false,
                surge: false,
                current: Box::new(move |p| {
                    Some(
                        shared_links
                            .iter()
                            .fold(ElectricCurrent::new::<ampere>(0.0), |s, &l| {
                                s + p.link_current[l]
                            }),
                    )
                }),
                carries,
            });
        }
    }
    paths
}

/// A switch's or connector contact's ratings: its `rating` is continuous
/// (contacts heat with time), met by the continuous current; its `surge`,
/// when given, meets every peak, `worst` and brief modes included.
fn contact_paths<'a>(
    cx: &'a Context,
    part: PartId,
    (a, b): (usize, usize),
    rating: Option<Rated<ElectricCurrent>>,
    surge: Option<Rated<ElectricCurrent>>,
    subject: String,
) -> impl Iterator<Item = RatedPath<'a>> {
    let continuous = rating.map(|r| RatedPath {
        continuous_rating: true,
        ..through_path(cx, part, a, b, r, subject.clone())
    });
    let surge = surge.map(|r| RatedPath {
        surge: true,
        ..through_path(cx, part, a, b, r, format!("{subject} (surge rating)"))
    });
    continuous.into_iter().chain(surge)
}

fn through_path<'a>(
    cx: &'a Context,
    part: PartId,
    a: usize,
    b: usize,
    rating: Rated<ElectricCurrent>,
    subject: String,
) -> RatedPath<'a> {
    let plan = cx.plan;
    // The net on the far side of this part, seen from the source.
    let downstream = cx.downstream_net(part, a, b);
    let span = if rating.span.source == plan.parts[part].span.source {
        rating.span
    } else {
        plan.parts[part].span
    };
    RatedPath {
        subject,
        span,
        part,
        net: downstream.map(|n| cx.net_name(n).to_string()),
        rating: rating.value,
        continuous_rating: false,
        surge: false,
        current: Box::new(move |p| downstream.map(|n| p.net_current[n].abs())),
        carries: Carries::Net(downstream),
    }
}

/// The loads that make up a rated current at `point`, and the fix to offer.
fn contributors(
    cx: &Context,
    carries: &Carries,
    point: &OperatingPoint,
) -> (Vec<(String, ElectricCurrent)>, String) {
    const SPLIT: &str = "choose a part with a higher rating, or split the load";
    match carries {
        Carries::Net(Some(net)) => (cx.loads_below(*net, point), SPLIT.into()),
        Carries::Links(links) => {
            let mut loads: Vec<(String, ElectricCurrent)> = links
                .iter()
                .map(|&l| {
                    let device = cx.plan.links[l].device.0;
                    (format!("`{}`", cx.part_name(device)), point.link_current[l])
                })
                .collect();
            loads.sort_by(|a, b| {
                b.1.partial_cmp(&a.1)
                    .unwrap_or(std::cmp::Ordering::Equal)
                    .then(a.0.cmp(&b.0))
            });
            let hub = crate::model::Library::builtin()
                .ids()
                .find(|id| id.starts_with("board/usb-hub"))
                .map(|id| format!(" (the library has `{id}`)"))
                .unwrap_or_default();
            let help = format!(
                "power the heaviest devices from their own supply, or put them behind a powered USB hub{hub}, which feeds its ports from its own input"
            );
            (loads, help)
        }
        _ => (Vec::new(), SPLIT.into()),
    }
}

fn amps(i: ElectricCurrent) -> f64 {
    i.get::<ampere>()
}

fn check_ratings(cx: &Context, out: &mut Vec<Finding>) {
    let derate = cx.plan.limits.derate.get::<ratio>();
    for path in rated_paths(cx) {
        let rating = amps(path.rating);
        let peak = worst_point(cx.points(), |p| (path.current)(p).map(amps));
        let steady = worst_point(cx.points().filter(continuous), |p| {
            (path.current)(p).map(amps)
        });
        let over = if path.continuous_rating { steady } else { peak };
        let base = |rule: &Rule, point: &OperatingPoint, message: String| {
            let mut f = Finding::new(rule, path.span, message)
                .at_point(cx.plan, point)
                .part(cx.part_name(path.part))
                .value("rating", rating);
            if let Some(net) = &path.net {
                f = f.net(net);
            }
            f
        };
        if let Some((point, current)) = over {
            let kind = match (&cx.plan.parts[path.part].class, &path.carries) {
                (_, Carries::Channel) => RatingKind::DriverChannel,
                (Class::Regulator(_), _) => RatingKind::RegulatorCurrent,
                (Class::Switch(_) | Class::Connector(_), _) => RatingKind::ContactCurrent,
                _ => RatingKind::OutputCurrent,
            };
            cx.margin(
                Margin::below(kind, OVER_RATING.id, current, rating, Unit::Ampere),
                |m| m.at(&path.subject).at_point(cx.plan, point),
            );
        }
        if let Some((point, current)) = over
            && exceeds(current, rating)
        {
            let kind = if path.continuous_rating {
                "continuous"
            } else {
                "peak"
            };
            let total = ElectricCurrent::new::<ampere>(current);
            let (loads, help) = contributors(cx, &path.carries, point);
            let made_of = if loads.is_empty() {
                String::new()
            } else {
                format!(": {}", show_contributors(&loads, total))
            };
            let mut finding = base(
                &OVER_RATING,
                point,
                format!(
                    "{} carries {} {kind} {}; its rating is {}{made_of}",
                    path.subject,
                    show_current(total),
                    mode_label(cx.plan, point.mode, point.battery),
                    show_current(path.rating)
                ),
            )
            .help(help)
            .value("current", current);
            // Point at where the load was added too: the net it flows in, or
            // the devices on the cables.
            match &path.carries {
                Carries::Net(Some(net)) => {
                    let net = &cx.plan.nets[*net];
                    finding = finding.label(
                        net.span,
                        format!("`{}` carries {}", net.name, show_current(total)),
                    );
                }
                Carries::Links(links) => {
                    for &link in links {
                        let device = cx.plan.links[link].device.0;
                        finding = finding.part(cx.part_name(device)).label(
                            cx.plan.links[link].span,
                            format!(
                                "`{}` draws {}",
                                cx.part_name(device),
                                show_current(point.link_current[link])
                            ),
                        );
                    }
                }
                _ => {}
            }
            out.push(finding);
            continue;
        }
        if path.surge {
            continue;
        }
        if let Some((point, current)) = steady
            && exceeds(current, rating * derate)
        {
            out.push(
                base(
                    &DERATING,
                    point,
                    format!(
                        "{} carries {} continuous {}: {} of its {} rating, above the {} derating limit",
                        path.subject,
                        show_current(ElectricCurrent::new::<ampere>(current)),
                        mode_label(cx.plan, point.mode, point.battery),
                        show_share(uom::si::f64::Ratio::new::<ratio>(current / rating)),
                        show_current(path.rating),
                        show_share(cx.plan.limits.derate)
                    ),
                )
                .help("leave margin: choose a part rated for the continuous current divided by the derating share")
                .value("current", current)
                .value("limit", rating * derate),
            );
        }
    }
}
