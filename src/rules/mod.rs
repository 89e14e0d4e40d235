//! The rule catalogue: each rule reads the model, the graph and the operating
//! points, and returns findings. Rules never change what they read.
//!
//! One file per rule family. Every rule has its stable id (format reference §7), a default
//! severity and documentation in a fixed shape (what it checks, why it
//! matters, example, fix, references); `RULES` lists them all, and the
//! catalogue test walks it.

mod analysis;
mod battery;
mod current;
mod driver;
mod fuse;
mod ground;
mod logic;
mod power;
mod regulator;
mod safety;
mod thermal;
mod voltage;
mod wire;

use crate::analysis::{Analysis, BatteryState, ModeId, OperatingPoint};
use crate::graph::Circuit;
use crate::model::{NetId, PartId, PinRef, Plan};
use crate::syntax::Span;
use std::collections::BTreeMap;

#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Severity {
    Error,
    Warning,
    Note,
}

impl Severity {
    pub fn name(self) -> &'static str {
        match self {
            Severity::Error => "error",
            Severity::Warning => "warning",
            Severity::Note => "note",
        }
    }
}

/// A rule's documentation, in the shape every rule follows.
#[derive(Clone, Copy, Debug)]
pub struct RuleDoc {
    pub what: &'static str,
    pub why: &'static str,
    /// A plan fragment on which the rule fires.
    pub example: &'static str,
    /// The same fragment, corrected.
    pub fix: &'static str,
    pub references: &'static str,
}

#[derive(Clone, Copy)]
pub struct Rule {
    pub id: &'static str,
    pub severity: Severity,
    pub summary: &'static str,
    pub doc: RuleDoc,
    /// Whether the rule needs the operating point (skipped when shorts or
    /// loops prevent solving it).
    pub needs_operating_point: bool,
    pub check: fn(&Context, &mut Vec<Finding>),
}

impl std::fmt::Debug for Rule {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Rule").field("id", &self.id).finish()
    }
}

/// Every rule, in catalogue order.
pub static RULES: &[Rule] = &[
    power::SHORT,
    power::CONFLICT,
    power::UNFED,
    power::LOOP,
    voltage::OVER_MAX,
    voltage::OVER_RANGE,
    voltage::UNDER_RANGE,
    regulator::DROPOUT,
    current::OVER_RATING,
    current::DERATING,
    driver::STALL,
    thermal::OVERHEAT,
    thermal::UNRATED,
    battery::DISCHARGE,
    battery::NO_CUTOFF,
    ground::FLOATING,
    ground::NOT_SHARED,
    logic::OVERVOLTAGE,
    logic::HIGH_MARGIN,
    logic::LOW_MARGIN,
    logic::CONTENTION,
    logic::UNDRIVEN,
    fuse::MISSING,
    fuse::UNDERSIZED,
    fuse::OVERSIZED,
    fuse::VOLTAGE,
    fuse::NUISANCE,
    wire::AMPACITY,
    wire::DROP,
    safety::NO_STOP,
    ground::OFFSET,
    analysis::NO_CONVERGENCE,
];

pub fn rule(id: &str) -> Option<&'static Rule> {
    RULES.iter().find(|r| r.id == id)
}

/// What every rule reads.
pub struct Context<'a> {
    pub plan: &'a Plan,
    pub circuit: &'a Circuit,
    /// `None` when shorts or loops keep the operating point from being solved.
    pub analysis: Option<&'a Analysis>,
}

impl Context<'_> {
    /// Settled operating points (none when the analysis was skipped).
    pub fn points(&self) -> impl Iterator<Item = &OperatingPoint> {
        self.analysis.into_iter().flat_map(|a| a.settled())
    }

    pub fn pin_name(&self, pin: PinRef) -> String {
        let part = &self.plan.parts[pin.part];
        format!("{}.{}", part.name, part.pins[pin.pin].name)
    }

    /// Where a finding about a pin points: its mention in `nets:`, else the pin
    /// or its part.
    pub fn pin_span(&self, pin: PinRef) -> Span {
        let p = &self.plan.parts[pin.part].pins[pin.pin];
        p.net_span.unwrap_or(p.span)
    }

    pub fn net_name(&self, net: NetId) -> &str {
        &self.plan.nets[net].name
    }

    pub fn part_name(&self, part: PartId) -> &str {
        &self.plan.parts[part].name
    }

    /// The net on the far side (seen from the source) of a conducting pin
    /// pair `a`/`b` of a fuse, switch or connector: its current is the
    /// current through that pair. `None` when the pair carries no current
    /// in the tree (an open end, or a parallel path).
    pub fn downstream_net(&self, part: PartId, a: usize, b: usize) -> Option<NetId> {
        let pins = &self.plan.parts[part].pins;
        [pins[a].net, pins[b].net].into_iter().flatten().find(|&n| {
            self.circuit.parent[n]
                .is_some_and(|p| p.part == part && (p.downstream_pin == a || p.downstream_pin == b))
        })
    }
}

/// A problem found in the plan.
#[derive(Clone, Debug, PartialEq)]
pub struct Finding {
    pub rule: &'static str,
    pub severity: Severity,
    pub message: String,
    /// Where in the plan it points.
    pub span: Span,
    /// Further places worth showing, with a short label each.
    pub labels: Vec<(Span, String)>,
    pub help: Option<String>,
    pub parts: Vec<String>,
    pub nets: Vec<String>,
    pub mode: Option<String>,
    pub battery: Option<BatteryState>,
    /// Computed numbers, in V, A, W, ohm, Ah, m and degC.
    pub values: BTreeMap<String, f64>,
}

impl Finding {
    pub fn new(rule: &Rule, span: Span, message: String) -> Finding {
        Finding {
            rule: rule.id,
            severity: rule.severity,
            message,
            span,
            labels: Vec::new(),
            help: None,
            parts: Vec::new(),
            nets: Vec::new(),
            mode: None,
            battery: None,
            values: BTreeMap::new(),
        }
    }

    pub fn at_point(mut self, plan: &Plan, point: &OperatingPoint) -> Finding {
        self.mode = Some(point.mode.name(plan).to_string());
        self.battery = Some(point.battery);
        self
    }

    pub fn help(mut self, help: impl Into<String>) -> Finding {
        self.help = Some(help.into());
        self
    }

    pub fn part(mut self, name: &str) -> Finding {
        if !self.parts.iter().any(|p| p == name) {
            self.parts.push(name.to_string());
        }
        self
    }

    pub fn net(mut self, name: &str) -> Finding {
        if !self.nets.iter().any(|n| n == name) {
            self.nets.push(name.to_string());
        }
        self
    }

    pub fn value(mut self, key: &str, value: f64) -> Finding {
        self.values.insert(key.to_string(), value);
        self
    }

    pub fn label(mut self, span: Span, text: impl Into<String>) -> Finding {
        self.labels.push((span, text.into()));
        self
    }
}

/// A limit is broken only when exceeded by more than 0.1 % (format reference §6).
/// The margin is 0.1 % of the limit's size, so it loosens the comparison
/// for negative limits too. Temperatures are compared in kelvin.
pub const LIMIT_TOLERANCE: f64 = 0.001;

pub fn exceeds(value: f64, limit: f64) -> bool {
    value - limit > limit.abs() * LIMIT_TOLERANCE
}

pub fn falls_below(value: f64, limit: f64) -> bool {
    limit - value > limit.abs() * LIMIT_TOLERANCE
}

/// Runs every rule and returns the findings in a stable order.
pub fn run(context: &Context) -> Vec<Finding> {
    let mut findings = Vec::new();
    for rule in RULES {
        if rule.needs_operating_point && context.analysis.is_none() {
            continue;
        }
        (rule.check)(context, &mut findings);
    }
    findings.sort_by(|a, b| {
        (a.span.start, a.severity, a.rule, &a.message).cmp(&(
            b.span.start,
            b.severity,
            b.rule,
            &b.message,
        ))
    });
    findings.dedup();
    findings
}

/// The operating point where `measure` is largest (first one on ties, so
/// results do not depend on float noise between equal points).
pub fn worst_point<'p>(
    points: impl Iterator<Item = &'p OperatingPoint>,
    measure: impl Fn(&OperatingPoint) -> Option<f64>,
) -> Option<(&'p OperatingPoint, f64)> {
    let mut best: Option<(&OperatingPoint, f64)> = None;
    for point in points {
        if let Some(value) = measure(point)
            && best.is_none_or(|(_, b)| value > b + 1e-12)
        {
            best = Some((point, value));
        }
    }
    best
}

/// Filter for continuous ratings (format reference §6: never `worst`, never
/// a brief mode).
pub fn continuous(point: &&OperatingPoint) -> bool {
    point.is_continuous()
}

pub fn mode_label(plan: &Plan, mode: ModeId, battery: BatteryState) -> String {
    format!(
        "in mode `{}` at {} battery",
        mode.name(plan),
        battery.name()
    )
}

/// Two voltages for one message, with enough digits that a value just past
/// its limit never reads as equal to it.
pub fn show_voltages_apart(
    value: uom::si::f64::ElectricPotential,
    limit: uom::si::f64::ElectricPotential,
) -> (String, String) {
    use crate::units::show_voltage;
    use uom::si::electric_potential::volt;
    let (a, b) = (show_voltage(value), show_voltage(limit));
    if a != b {
        return (a, b);
    }
    let (va, vb) = (value.get::<volt>(), limit.get::<volt>());
    for decimals in 2..=6 {
        let (a, b) = (format!("{va:.decimals$} V"), format!("{vb:.decimals$} V"));
        if a != b {
            return (a, b);
        }
    }
    (a, b)
}
