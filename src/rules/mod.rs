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
mod fault;
pub(crate) mod fuse;
mod ground;
mod logic;
mod margin;
pub(crate) mod power;
mod regulator;
mod safety;
mod scenario;
mod switch;
mod thermal;
mod unit;
mod voltage;
mod wire;

pub use fuse::minimum_rating;
pub use margin::{Margin, Margins, RatingKind};
pub use unit::{Reading, Unit, declared_unit};

use crate::analysis::{Analysis, BatteryState, ModeId, OperatingPoint};
use crate::graph::Circuit;
use crate::model::{NetId, PartId, PinRef, PinRole, Plan};
use crate::scenario::Scenarios;
use crate::syntax::Span;
use std::collections::BTreeMap;
use uom::si::electric_current::ampere;
use uom::si::f64::ElectricCurrent;

/// How much a finding matters. Ordered most serious first, so sorting puts
/// errors before warnings before notes.
///
/// ```
/// use railcheck::rules::Severity;
///
/// assert!(Severity::Error < Severity::Warning && Severity::Warning < Severity::Note);
/// assert_eq!(Severity::Warning.name(), "warning");
/// ```
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Severity {
    /// The plan would damage a part or fail as wired; `railcheck check` exits 1.
    Error,
    /// A risk rather than a certain fault: too little margin, a protection
    /// missing, a part outside its operating range; fails the check only under
    /// `--strict`.
    Warning,
    /// Worth knowing; never fails the check.
    Note,
}

impl Severity {
    /// The severity as reports write it (`error`, `warning`, `note`).
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
    /// What it checks.
    pub what: &'static str,
    /// Why it matters to the robot.
    pub why: &'static str,
    /// A plan fragment on which the rule fires.
    pub example: &'static str,
    /// The same fragment, corrected.
    pub fix: &'static str,
    /// The published sources its numbers come from.
    pub references: &'static str,
}

/// A check of the catalogue: its id, default severity, documentation and the
/// code that runs it.
#[derive(Clone, Copy)]
pub struct Rule {
    /// Its stable id (`fuse/undersized`, format reference §7).
    pub id: &'static str,
    /// The severity of its findings.
    pub severity: Severity,
    /// One line saying what it finds, for the catalogue.
    pub summary: &'static str,
    /// Its documentation, shown by `railcheck rules`.
    pub doc: RuleDoc,
    /// Whether the rule needs the operating point (skipped when shorts or
    /// loops prevent solving it).
    pub needs_operating_point: bool,
    /// Runs the rule, appending its findings.
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
    logic::UNPOWERED_INPUT,
    fuse::MISSING,
    fuse::UNDERSIZED,
    fuse::OVERSIZED,
    fuse::VOLTAGE,
    fuse::NUISANCE,
    switch::VOLTAGE,
    fault::SHORT_CIRCUIT,
    fault::FUSE_DISTANCE,
    fault::INRUSH,
    fault::REGENERATION,
    wire::AMPACITY,
    wire::DROP,
    safety::NO_STOP,
    scenario::BACK_FEED,
    scenario::PHANTOM_POWER,
    ground::OFFSET,
    analysis::NO_CONVERGENCE,
];

/// The rule of this id, or `None` when there is none.
pub fn rule(id: &str) -> Option<&'static Rule> {
    RULES.iter().find(|r| r.id == id)
}

/// What every rule reads.
pub struct Context<'a> {
    /// The plan as read.
    pub plan: &'a Plan,
    /// The plan's graph: which net feeds which, grounds, motor feeds.
    pub circuit: &'a Circuit,
    /// `None` when shorts or loops keep the operating point from being solved.
    pub analysis: Option<&'a Analysis>,
    /// The power scenarios (switches open, batteries removed, supplies from
    /// outside connected) and what each leaves powered.
    pub scenarios: Option<&'a Scenarios>,
    /// Where the rules record the comparisons they make against ratings
    /// and limits; `None` skips recording.
    pub margins: Option<&'a Margins>,
    /// What several rules work out from the plan alike, worked out once,
    /// on first use (start with `Default::default()`).
    pub worked: Worked,
}

/// What several rules work out from the plan alike, kept for the run.
#[derive(Default)]
pub struct Worked {
    signals: std::sync::OnceLock<Vec<logic::Signal>>,
}

impl Context<'_> {
    /// Records a comparison against a rating or limit; `place` names where
    /// and when, and runs only when the margin is the tightest of its kind
    /// so far (and a recorder is present).
    pub fn margin(&self, margin: Margin, place: impl FnOnce(Margin) -> Margin) {
        if let Some(margins) = self.margins {
            margins.offer(margin, place);
        }
    }

    /// Settled operating points (none when the analysis was skipped).
    pub fn points(&self) -> impl Iterator<Item = &OperatingPoint> {
        self.analysis.into_iter().flat_map(|a| a.settled())
    }

    /// The pin as a plan writes it in `nets:` (`buck.vin`).
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

    /// The net's name (`BATT+`).
    pub fn net_name(&self, net: NetId) -> &str {
        &self.plan.nets[net].name
    }

    /// The part's name (`pack`).
    pub fn part_name(&self, part: PartId) -> &str {
        &self.plan.parts[part].name
    }

    /// What draws the current that flows down `net` at `point`: every
    /// supply input and directly wired motor on `net` and on the nets that
    /// hang below it, largest first. A converter counts as one load (its
    /// input current), so a finding names the branch the fix belongs to.
    pub fn loads_below(
        &self,
        net: NetId,
        point: &OperatingPoint,
    ) -> Vec<(String, ElectricCurrent)> {
        let plan = self.plan;
        let mut loads: Vec<(String, ElectricCurrent)> = Vec::new();
        let mut stack = vec![net];
        while let Some(n) = stack.pop() {
            for &pin_ref in &plan.nets[n].pins {
                let pin = &plan.parts[pin_ref.part].pins[pin_ref.pin];
                let current = point.pin_current.get(pin_ref.part, pin_ref.pin);
                if pin.role == PinRole::SupplyIn && current.get::<ampere>() > 0.0 {
                    loads.push((format!("`{}`", self.pin_name(pin_ref)), current));
                }
            }
            for &motor in &self.circuit.direct_motors[n] {
                if let Some(m) = point.motors[motor] {
                    loads.push((format!("`{}`", plan.parts[motor].name), m.current));
                }
            }
            stack.extend(self.circuit.children[n].iter().copied());
        }
        loads.sort_by(|a, b| {
            b.1.partial_cmp(&a.1)
                .unwrap_or(std::cmp::Ordering::Equal)
                .then(a.0.cmp(&b.0))
        });
        loads
    }

    /// Where a finding about a part's value points: where the plan writes
    /// it, else the part's name (a value that came from the library).
    pub fn rated_span<Q>(&self, rated: &crate::model::Rated<Q>, part: PartId) -> Span {
        let part_span = self.plan.parts[part].span;
        if rated.span.source == part_span.source {
            rated.span
        } else {
            part_span
        }
    }

    /// The load-side net of a fuse or switch (its first contact pair), if
    /// that contact carries anything in the tree.
    pub fn load_side(&self, part: PartId) -> Option<NetId> {
        crate::graph::through_pairs(self.plan, part)
            .first()
            .and_then(|&(a, b)| self.downstream_net(part, a, b))
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
///
/// Each finding names its rule and severity, says what is wrong in a
/// lowercase message, points at the plan line it concerns and carries the
/// numbers it was computed from, each with its unit.
///
/// ```
/// use railcheck::model::Library;
/// use railcheck::rules::{Severity, Unit};
///
/// // A 3S lithium-polymer pack straight on a lamp rated 12 V at most.
/// let plan = "\
/// railcheck: 1
/// parts:
///   pack: { use: battery/lipo-3s }
///   lamp:
///     class: load
///     pins:
///       vin: { role: supply-in, range: 10 V..12 V, max: 12 V, draw: { idle: 0 A, typical: 0.5 A } }
///       gnd: { role: ground }
/// nets:
///   BATT+: [pack.pos, lamp.vin]
///   GND: [pack.neg, lamp.gnd]
/// modes:
///   parked: { lamp: idle }
/// ";
/// let checked = railcheck::check("lamp.yaml", plan, &Library::builtin()).expect("the plan reads");
/// let over = checked
///     .findings
///     .iter()
///     .find(|f| f.rule == "voltage/over-max")
///     .expect("12.6 V is over the lamp's 12 V");
/// assert_eq!(over.severity, Severity::Error);
/// assert_eq!(over.nets, ["BATT+"]);
/// // A full lithium-polymer cell is at 4.20 V (Linden & Reddy, Handbook of
/// // Batteries): 3 × 4.20 V = 12.6 V, with no sag while the lamp is idle.
/// assert!((over.values["voltage"] - 12.6).abs() < 1e-9);
/// assert_eq!(over.units["voltage"], Unit::Volt);
/// // The finding points at the `BATT+` net, on line 10.
/// assert_eq!(checked.sources.line_column(over.span).0, 10);
/// ```
#[derive(Clone, Debug, PartialEq)]
pub struct Finding {
    /// The id of the rule that found it (`voltage/over-max`).
    pub rule: &'static str,
    /// How much it matters.
    pub severity: Severity,
    /// What is wrong, lowercase, identifiers in backticks, numbers with units.
    pub message: String,
    /// Where in the plan it points.
    pub span: Span,
    /// Further places worth showing, with a short label each.
    pub labels: Vec<(Span, String)>,
    /// How to fix it, when there is a fix to suggest.
    pub help: Option<String>,
    /// The names of the parts it concerns.
    pub parts: Vec<String>,
    /// The names of the nets it concerns.
    pub nets: Vec<String>,
    /// The mode it happens in, when it depends on one.
    pub mode: Option<String>,
    /// The battery state it happens at, when it depends on one.
    pub battery: Option<BatteryState>,
    /// Computed numbers, in V, A, W, ohm, Ah, m and degC.
    pub values: BTreeMap<String, f64>,
    /// The unit of each number in `values`, under the same key.
    pub units: BTreeMap<String, Unit>,
}

impl Finding {
    /// A finding of this rule at `span`, with the rule's severity and nothing
    /// else yet.
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
            units: BTreeMap::new(),
        }
    }

    /// Records the mode and battery state it happens at.
    pub fn at_point(mut self, plan: &Plan, point: &OperatingPoint) -> Finding {
        self.mode = Some(point.mode.name(plan).to_string());
        self.battery = Some(point.battery);
        self
    }

    /// For a finding that depends on the battery state but not on the mode.
    pub fn at_battery(mut self, battery: BatteryState) -> Finding {
        self.mode = None;
        self.battery = Some(battery);
        self
    }

    /// Adds how to fix it.
    pub fn help(mut self, help: impl Into<String>) -> Finding {
        self.help = Some(help.into());
        self
    }

    /// Adds a part it concerns (once).
    pub fn part(mut self, name: &str) -> Finding {
        if !self.parts.iter().any(|p| p == name) {
            self.parts.push(name.to_string());
        }
        self
    }

    /// Adds a net it concerns (once).
    pub fn net(mut self, name: &str) -> Finding {
        if !self.nets.iter().any(|n| n == name) {
            self.nets.push(name.to_string());
        }
        self
    }

    /// Records a computed number: a typed quantity brings its unit, a bare
    /// number takes the unit declared for its key.
    pub fn value(mut self, key: &str, value: impl Into<Reading>) -> Finding {
        let (number, unit) = match value.into() {
            Reading::In(number, unit) => (number, Some(unit)),
            Reading::Bare(number) => (number, declared_unit(self.rule, key)),
        };
        self.values.insert(key.to_string(), number);
        match unit {
            Some(unit) => self.units.insert(key.to_string(), unit),
            None => self.units.remove(key),
        };
        self
    }

    /// Adds a further place to show, labelled with what is wrong there
    /// (`rated 10 A`).
    pub fn label(mut self, span: Span, text: impl Into<String>) -> Finding {
        self.labels.push((span, text.into()));
        self
    }
}

/// How many contributors a message names before "and N more".
const CONTRIBUTORS_SHOWN: usize = 6;

/// `` `brain.vin` 1.8 A (55 %), `cam.vin` 1.5 A (45 %) ``: what makes up a
/// total, largest first, each with its share of `total`.
pub fn show_contributors(loads: &[(String, ElectricCurrent)], total: ElectricCurrent) -> String {
    let mut parts: Vec<String> = loads
        .iter()
        .take(CONTRIBUTORS_SHOWN)
        .map(|(name, current)| {
            let percent = if total.get::<ampere>() > 0.0 {
                100.0 * (*current / total).get::<uom::si::ratio::ratio>()
            } else {
                f64::NAN
            };
            let share = match percent {
                p if p.is_nan() => String::new(),
                p if p < 0.5 => " (<1 %)".to_string(),
                p => format!(" ({p:.0} %)"),
            };
            format!("{name} {}{share}", crate::units::show_current(*current))
        })
        .collect();
    if loads.len() > CONTRIBUTORS_SHOWN {
        parts.push(format!("and {} more", loads.len() - CONTRIBUTORS_SHOWN));
    }
    parts.join(", ")
}

/// A limit is broken only when exceeded by more than 0.1 % (format reference §6).
/// The margin is 0.1 % of the limit's size, so it loosens the comparison
/// for negative limits too. Temperatures are compared in kelvin.
pub const LIMIT_TOLERANCE: f64 = 0.001;

/// Whether `value` is over `limit` by more than [`LIMIT_TOLERANCE`].
pub fn exceeds(value: f64, limit: f64) -> bool {
    value - limit > limit.abs() * LIMIT_TOLERANCE
}

/// Whether `value` is under `limit` by more than [`LIMIT_TOLERANCE`].
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

/// Where a finding happens, for its message: ``in mode `climb` at empty battery``.
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
