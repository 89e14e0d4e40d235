//! Reads the YAML tree into the typed plan, collecting every input problem.
//!
//! serde stops at its first error, so the tree is read loosely first (`syntax`)
//! and validated here in one pass: unknown keys, unknown parts and pins, values
//! without units, bad ranges. Every error carries the span of the offending
//! text and, where there is an obvious fix, a hint.

use super::format;
use super::*;
use crate::syntax::{Node, NodeKind, SourceId, Sources, Span};
use crate::units::{self, UnitError};
use std::collections::{BTreeMap, HashMap, HashSet};
use std::rc::Rc;
use uom::si::electric_current::ampere;
use uom::si::electric_potential::volt;
use uom::si::electrical_resistance::ohm;
use uom::si::ratio::ratio;
use uom::si::thermodynamic_temperature::degree_celsius;

fn is_battery(class: &Class) -> bool {
    matches!(class, Class::Battery(_))
}

fn is_switch(class: &Class) -> bool {
    matches!(class, Class::Switch(_))
}

/// A temperature a plan can mean: above absolute zero and below 1000 °C.
fn plausible_temperature(text: &str) -> Result<ThermodynamicTemperature, UnitError> {
    let t = units::temperature(text)?;
    let celsius = t.get::<degree_celsius>();
    if celsius > -273.15 && celsius < 1000.0 {
        Ok(t)
    } else {
        Err(UnitError {
            message: format!("`{}` is outside any temperature a robot meets", text.trim()),
            hint: "write a temperature in °C, e.g. `35 degC`".into(),
            span: 0..text.len(),
        })
    }
}

/// The assumed converter efficiency when a switching regulator gives none
/// ("use 0.85 when none is given", common practice).
const DEFAULT_EFFICIENCY: f64 = 0.85;
/// Many linear regulators and LDOs (common practice).
fn default_tj_max() -> ThermodynamicTemperature {
    ThermodynamicTemperature::new::<degree_celsius>(125.0)
}

/// Format reference §1: `ambient` defaults to 25 °C.
fn default_ambient() -> ThermodynamicTemperature {
    ThermodynamicTemperature::new::<degree_celsius>(25.0)
}
const DEFAULT_WIRE_DROP: f64 = 0.05;
const DEFAULT_DERATE: f64 = 0.80;
const MAX_CELLS: u32 = 1000;
/// Not a standard's limit: more motors than any robot has, so a typo is caught.
const MAX_STALL_AT_ONCE: u32 = 1000;

/// Reads a whole plan. `root` is the parsed plan; library parts it uses are
/// parsed into `sources` as they are met. The tree is taken, not borrowed:
/// each part's subtree is dropped once the part is read, so the tree and the
/// typed plan are not both held whole.
pub fn read_plan(
    root: Node,
    library: &Library,
    sources: &mut Sources,
) -> Result<Plan, Vec<InputError>> {
    let mut reader = Reader {
        errors: Vec::new(),
        library,
        sources,
        plan_source: root.span.source,
        refused_parts: HashSet::new(),
        refused_pins: HashSet::new(),
        pin_names: HashMap::new(),
        loaded: HashMap::new(),
        speller: Speller::new(),
    };
    let span = root.span;
    let plan = reader.plan(root);
    if reader.errors.is_empty() {
        plan.ok_or_default_error(span)
    } else {
        let mut errors = reader.errors;
        errors.sort_by_key(|e| (e.span.source != span.source, e.span.source, e.span.start));
        errors.dedup();
        Err(errors)
    }
}

trait OkOrDefault {
    fn ok_or_default_error(self, span: Span) -> Result<Plan, Vec<InputError>>;
}

impl OkOrDefault for Option<Plan> {
    fn ok_or_default_error(self, span: Span) -> Result<Plan, Vec<InputError>> {
        self.ok_or_else(|| {
            vec![InputError {
                message: "the plan could not be read".into(),
                span,
                hint: None,
            }]
        })
    }
}

struct Reader<'a> {
    errors: Vec<InputError>,
    library: &'a Library,
    sources: &'a mut Sources,
    plan_source: SourceId,
    /// Parts declared but refused for an error already reported: later uses
    /// of their names are not reported again.
    refused_parts: HashSet<String>,
    /// Pins refused the same way, as (part, pin).
    refused_pins: HashSet<(String, String)>,
    /// Each part's pins by name, built when a net first names one of them:
    /// a net of many pins of one large part is read in linear time.
    pin_names: HashMap<PartId, HashMap<String, PinIndex>>,
    /// Library parts parsed so far, by id: each file is parsed (and added
    /// to the sources) once however many parts use it.
    /// Shared, not copied, by the parts that use them unchanged.
    loaded: HashMap<String, Option<Result<Rc<Node>, LibraryError>>>,
    /// "Did you mean" for names the plan declares, within one budget of work
    /// for the whole plan.
    speller: Speller,
}

/// A logic pin's `ref`, resolved once all pins of the part are known.
struct PendingRef {
    pin: PinIndex,
    name: String,
    span: Span,
}

impl Reader<'_> {
    fn error(&mut self, span: Span, message: impl Into<String>, hint: Option<String>) {
        self.errors.push(InputError {
            message: message.into(),
            span,
            hint,
        });
    }

    /// The span a finding about this value should point at: the value itself
    /// when it is written in the plan, else the part that brought it in.
    fn in_plan(&self, span: Span, fallback: Span) -> Span {
        if span.source == self.plan_source {
            span
        } else {
            fallback
        }
    }

    fn plan(&mut self, mut root: Node) -> Option<Plan> {
        let root = &mut root;
        if root.as_map().is_none() {
            self.error(
                root.span,
                format!("a plan is a mapping, found {}", root.describe()),
                Some("start with `railcheck: 1`, then `parts:` and `nets:`".into()),
            );
            return None;
        }
        self.check_keys(root, &format::keys(format::TOP_LEVEL), "the plan");
        match root.get("railcheck") {
            None => self.error(
                first_key_span(root),
                "the format version `railcheck:` is missing",
                Some("add `railcheck: 1` as the first line".into()),
            ),
            Some(v) if v.as_scalar() == Some("1") => {}
            Some(v) => self.error(
                v.span,
                match v.as_scalar() {
                    Some(version) => format!("unsupported format version `{version}`"),
                    None => format!(
                        "the format version `railcheck:` must be a number, found {}",
                        v.describe()
                    ),
                },
                Some("write `railcheck: 1`, the format version this railcheck reads".into()),
            ),
        }
        let name = root
            .get("name")
            .and_then(|n| self.text(n, "the plan's name"));
        let revision = root
            .get("revision")
            .and_then(|n| self.text(n, "the plan's revision"));
        let author = root
            .get("author")
            .and_then(|n| self.text(n, "the plan's author"));
        let date = root.get("date").and_then(|n| {
            let text = self.text(n, "the plan's date")?;
            if is_calendar_date(&text) {
                Some(text)
            } else {
                self.error(
                    n.span,
                    format!("`{text}` is not a calendar date"),
                    Some("write the date as YYYY-MM-DD (ISO 8601), e.g. `2026-03-14`".to_string()),
                );
                None
            }
        });
        let ambient = match root.get("ambient") {
            Some(n) => self
                .scalar_quantity(n, plausible_temperature)
                .unwrap_or(default_ambient()),
            None => default_ambient(),
        };
        let limits = self.limits(root.get("limits"));

        let mut parts = Vec::new();
        let mut part_index: HashMap<String, PartId> = HashMap::new();
        match root.get("parts") {
            None => self.error(
                first_key_span(root),
                "the plan has no `parts:`",
                Some("list the parts: `parts: { pack: { use: battery/lipo-3s } }`".into()),
            ),
            Some(node) => {
                if self.mapping(node, "`parts:`").is_some() {
                    // Each part's subtree is freed once the part is read.
                    for (key, body) in take_entries(root, "parts") {
                        let Some(name) = self.name(&key, "part") else {
                            continue;
                        };
                        match self.part(name.clone(), key.span, &body) {
                            Some(part) => {
                                part_index.insert(name, parts.len());
                                parts.push(part);
                            }
                            None => {
                                self.refused_parts.insert(name);
                            }
                        }
                    }
                }
            }
        }

        let nets = match root.get("nets") {
            None => {
                self.error(
                    first_key_span(root),
                    "the plan has no `nets:`",
                    Some("join pins into nets: `nets: { BATT+: [pack.pos, fuse.a] }`".into()),
                );
                Vec::new()
            }
            Some(node) => self.nets(node, &mut parts, &part_index),
        };
        let mut nets = nets;
        parts.shrink_to_fit();
        nets.shrink_to_fit();
        let links = root
            .get("links")
            .map(|n| self.links(n, &parts, &part_index))
            .unwrap_or_default();
        cable_fed_nets(&links, &mut parts, &mut nets);
        let modes = root
            .get("modes")
            .map(|n| self.modes(n, &parts, &part_index))
            .unwrap_or_default();
        let profile = root
            .get("profile")
            .map(|n| self.profile(n, &modes))
            .unwrap_or_default();
        if let Some(section) = root.get("sweep") {
            self.sweep_shape(section);
        }
        let supplies = root
            .get("supplies")
            .map(|n| self.supplies(n, &parts, &part_index, &nets))
            .unwrap_or_default();
        let scenarios = root
            .get("scenarios")
            .map(|n| self.scenarios(n, &parts, &part_index, &supplies))
            .unwrap_or_default();

        Some(Plan {
            name,
            revision,
            date,
            author,
            ambient,
            ambient_given: root.get("ambient").is_some(),
            limits,
            parts,
            nets,
            links,
            modes,
            profile,
            supplies,
            scenarios,
            span: root.span,
        })
    }

    // ----- generic readers -------------------------------------------------

    fn check_keys(&mut self, node: &Node, allowed: &[&str], context: &str) {
        let Some(entries) = node.as_map() else {
            return;
        };
        for (key, value) in entries {
            let Some(k) = key.as_scalar() else {
                self.error(
                    key.span,
                    format!("a key in {context} must be a name"),
                    Some("write keys as plain names, e.g. `parts:`".into()),
                );
                continue;
            };
            if k == "notes" {
                // Free text, shown nowhere the checks read: a list or a
                // mapping there is a misplaced block of the plan.
                if value.as_scalar().is_none() && !matches!(value.kind, NodeKind::Null) {
                    self.error(
                        value.span,
                        format!("`notes` in {context} must be text, found {}", value.describe()),
                        Some("write the notes as one text, e.g. `notes: >-` followed by indented lines".into()),
                    );
                }
                continue;
            }
            if allowed.contains(&k) {
                continue;
            }
            let hint = match closest(k, allowed.iter().copied()) {
                Some(s) => format!("did you mean `{s}`?"),
                None => format!("{context} takes: {}", list(allowed)),
            };
            self.error(
                key.span,
                format!("unknown key `{k}` in {context}"),
                Some(hint),
            );
        }
    }

    fn mapping<'n>(&mut self, node: &'n Node, what: &str) -> Option<&'n [(Node, Node)]> {
        match &node.kind {
            NodeKind::Map(entries) => Some(entries),
            NodeKind::Null => Some(&[]),
            _ => {
                self.error(
                    node.span,
                    format!("{what} must be a mapping, found {}", node.describe()),
                    Some("write `key: value` entries, one per line or inside `{ }`".into()),
                );
                None
            }
        }
    }

    fn text(&mut self, node: &Node, what: &str) -> Option<String> {
        match node.as_scalar() {
            Some(s) => Some(s.to_string()),
            None => {
                self.error(
                    node.span,
                    format!("{what} must be text, found {}", node.describe()),
                    None,
                );
                None
            }
        }
    }

    fn name(&mut self, node: &Node, what: &str) -> Option<String> {
        let text = self.text(node, &format!("a {what} name"))?;
        if format::is_name(&text) {
            Some(text)
        } else {
            let rule = "names use letters and digits (any script), `_`, `-` and `+`";
            let hint = match text.chars().find(|&c| !format::is_name(&c.to_string())) {
                Some(c) if format::is_default_ignorable(c) || c.is_control() => format!(
                    "it holds U+{:04X}, a character that shows as nothing or moves the text; {rule}",
                    c as u32
                ),
                Some(c) => format!("`{c}` (U+{:04X}) is not allowed; {rule}", c as u32),
                None => rule.to_string(),
            };
            self.error(
                node.span,
                format!("`{text}` is not a valid {what} name"),
                Some(hint),
            );
            None
        }
    }

    fn boolean(&mut self, node: &Node) -> Option<bool> {
        match node.as_scalar() {
            Some("true") => Some(true),
            Some("false") => Some(false),
            _ => {
                self.error(
                    node.span,
                    "expected `true` or `false`",
                    Some("write `true` or `false`".into()),
                );
                None
            }
        }
    }

    fn choice<T: Copy>(&mut self, node: &Node, choices: &[(&str, T)], what: &str) -> Option<T> {
        let text = node.as_scalar().unwrap_or("");
        if let Some((_, value)) = choices.iter().find(|(n, _)| *n == text) {
            return Some(*value);
        }
        let names: Vec<&str> = choices.iter().map(|(n, _)| *n).collect();
        let hint = match closest(text, names.iter().copied()) {
            Some(s) => format!("did you mean `{s}`?"),
            None => format!("write one of {}", list(&names)),
        };
        self.error(node.span, format!("unknown {what} `{text}`"), Some(hint));
        None
    }

    /// Byte offset of a scalar's text inside its span (1 for quoted scalars).
    fn scalar_offset(&self, node: &Node) -> usize {
        let text = self.sources.text(node.span.source);
        match text.get(node.span.start..) {
            Some(rest) if rest.starts_with(['\'', '"']) => 1,
            _ => 0,
        }
    }

    fn scalar_quantity<T>(
        &mut self,
        node: &Node,
        parse: fn(&str) -> Result<T, UnitError>,
    ) -> Option<T> {
        let Some(text) = node.as_scalar() else {
            self.error(
                node.span,
                format!("expected a value with a unit, found {}", node.describe()),
                Some("write it as text such as `5 V` or `2 A`".into()),
            );
            return None;
        };
        match parse(text) {
            Ok(v) => Some(v),
            Err(e) => {
                let offset = self.scalar_offset(node);
                let span = if e.span.is_empty() {
                    node.span
                } else {
                    node.span.within(e.span.start + offset..e.span.end + offset)
                };
                self.error(span, e.message, Some(e.hint).filter(|h| !h.is_empty()));
                None
            }
        }
    }

    fn rated<T>(
        &mut self,
        body: &Node,
        key: &str,
        parse: fn(&str) -> Result<T, UnitError>,
        fallback: Span,
    ) -> Option<Rated<T>> {
        let node = body.get(key)?;
        let value = self.scalar_quantity(node, parse)?;
        // Every rated value (capacity, current and voltage ratings, limits,
        // wire sizes and lengths) is a physical size: zero is impossible and
        // would pass every check it takes part in.
        if let Some(written) = node.as_scalar()
            && is_written_zero(written)
        {
            self.error(
                node.span,
                format!("`{key}: {}` must be above zero", written.trim()),
                Some(format!(
                    "give the {} the part is made for (its data sheet's value)",
                    key.replace('_', " ")
                )),
            );
            return None;
        }
        Some(Rated {
            value,
            span: self.in_plan(node.span, fallback),
        })
    }

    fn quantity<T>(
        &mut self,
        body: &Node,
        key: &str,
        parse: fn(&str) -> Result<T, UnitError>,
    ) -> Option<T> {
        let node = body.get(key)?;
        self.scalar_quantity(node, parse)
    }

    fn required<T>(
        &mut self,
        body: &Node,
        key: &str,
        parse: fn(&str) -> Result<T, UnitError>,
        what: &str,
        example: &str,
        at: Span,
    ) -> Option<T> {
        if body.get(key).is_none() {
            self.error(
                at,
                format!("{what} needs `{key}`"),
                Some(format!("add `{key}: {example}`")),
            );
            return None;
        }
        self.quantity(body, key, parse)
    }

    fn limits(&mut self, node: Option<&Node>) -> Limits {
        let mut limits = Limits {
            wire_drop: Ratio::new::<ratio>(DEFAULT_WIRE_DROP),
            derate: Ratio::new::<ratio>(DEFAULT_DERATE),
            stall_at_once: None,
        };
        let Some(node) = node else {
            return limits;
        };
        if self.mapping(node, "`limits:`").is_none() {
            return limits;
        }
        self.check_keys(node, &format::keys(format::LIMITS), "`limits:`");
        if let Some(v) = self.quantity(node, "wire_drop", units::share) {
            if v.get::<ratio>() > 0.0 {
                limits.wire_drop = v;
            } else if let Some(at) = node.get("wire_drop") {
                // Every wire drops some voltage: a limit of nothing would
                // report every wire in the plan.
                self.error(
                    at.span,
                    "`wire_drop` must be above 0 %: every wire drops some voltage",
                    Some(format!(
                        "write the largest drop you accept, e.g. `wire_drop: {} %` (the default)",
                        DEFAULT_WIRE_DROP * 100.0
                    )),
                );
            }
        }
        if let Some(v) = self.quantity(node, "derate", units::share) {
            limits.derate = v;
        }
        if let Some(n) = node.get("stall_at_once") {
            match n.as_scalar().and_then(|s| s.trim().parse::<u32>().ok()) {
                Some(count) if count <= MAX_STALL_AT_ONCE => {
                    limits.stall_at_once = Some(Rated {
                        value: count,
                        span: n.span,
                    });
                }
                _ => self.error(
                    n.span,
                    format!(
                        "`stall_at_once` takes a whole number of motors, from 0 to {MAX_STALL_AT_ONCE}"
                    ),
                    Some("write `stall_at_once: 1` when no two motors stall at the same moment".into()),
                ),
            }
        }
        limits
    }

    // ----- parts -----------------------------------------------------------

    fn part(&mut self, name: String, name_span: Span, body: &Node) -> Option<Part> {
        self.mapping(body, &format!("part `{name}`"))?;
        if let Some(use_node) = body.get("use") {
            self.check_keys(
                body,
                format::LIBRARY_PART_KEYS,
                &format!("part `{name}` (a library part)"),
            );
            let id = self.text(use_node, "a library part id")?;
            let loaded = match self.loaded.get(&id) {
                Some(loaded) => loaded.clone(),
                None => {
                    let loaded = self
                        .library
                        .load(&id, self.sources)
                        .map(|read| read.map(Rc::new));
                    self.loaded.insert(id.clone(), loaded.clone());
                    loaded
                }
            };
            let Some(loaded) = loaded else {
                let hint = match self.speller.closest(&id, self.library.ids()) {
                    Some(s) => format!("did you mean `{s}`?"),
                    None => "write the part inline with `class:` and `pins:`, or add it with `--parts DIR`".into(),
                };
                self.error(
                    use_node.span,
                    format!("unknown library part `{id}`"),
                    Some(hint),
                );
                return None;
            };
            let library_root = match loaded {
                Ok(root) => root,
                Err(e) if e.unreadable => {
                    self.error(
                        use_node.span,
                        e.message,
                        Some("fix or remove the part file, or use another part".into()),
                    );
                    return None;
                }
                Err(e) => {
                    self.error(e.span, e.message, None);
                    return None;
                }
            };
            if library_root.as_map().is_none() {
                self.error(
                    library_root.span,
                    format!("library part `{id}` must be a mapping"),
                    None,
                );
                return None;
            }
            let overridden = ["with", "pins", "ports"]
                .iter()
                .any(|key| body.get(key).is_some());
            if !overridden {
                return self.inline_part(name, name_span, &library_root, Some(id));
            }
            let mut merged = Node::clone(&library_root);
            if let Some(with) = body.get("with")
                && let Some(entries) = self.mapping(with, "`with:`")
            {
                let (class_keys, fields): (Vec<_>, Vec<_>) = entries
                    .iter()
                    .cloned()
                    .partition(|(k, _)| k.as_scalar() == Some("class"));
                for (key, _) in &class_keys {
                    self.error(
                        key.span,
                        format!("`with:` cannot change the class of library part `{id}`"),
                        Some(
                            "write the part inline with `class:` and `pins:` instead of `use:`"
                                .into(),
                        ),
                    );
                }
                merge_part(
                    &mut merged,
                    &Node {
                        kind: NodeKind::Map(fields),
                        span: with.span,
                    },
                );
            }
            let mut overrides = Vec::new();
            for key in ["pins", "ports"] {
                if let Some(v) = body.get(key) {
                    overrides.push((key_node(key, v.span), v.clone()));
                }
            }
            if !overrides.is_empty() {
                merge_part(
                    &mut merged,
                    &Node {
                        kind: NodeKind::Map(overrides),
                        span: body.span,
                    },
                );
            }
            self.inline_part(name, name_span, &merged, Some(id))
        } else {
            self.inline_part(name, name_span, body, None)
        }
    }

    fn inline_part(
        &mut self,
        name: String,
        name_span: Span,
        body: &Node,
        library_id: Option<String>,
    ) -> Option<Part> {
        let context = format!("part `{name}`");
        let Some(class_node) = body.get("class") else {
            self.error(
                name_span,
                format!("{context} has neither `use:` nor `class:`"),
                Some("name a library part (`use: regulator/buck-5v-3a`) or give `class:` and `pins:`".into()),
            );
            return None;
        };
        let class_name = self.text(class_node, "a class")?;
        if !Class::NAMES.contains(&class_name.as_str()) {
            let hint = match closest(&class_name, Class::NAMES.iter().copied()) {
                Some(s) => format!("did you mean `{s}`?"),
                None => format!("classes: {}", list(&Class::NAMES)),
            };
            self.error(
                class_node.span,
                format!("unknown class `{class_name}`"),
                Some(hint),
            );
            return None;
        }
        let spec = format::class(&class_name);
        let mut allowed: Vec<&str> = format::INLINE_PART_KEYS.to_vec();
        allowed.extend(spec.iter().flat_map(|c| c.fields.iter().map(|f| f.key)));
        allowed.extend(format::keys(format::PART_FIELDS));
        self.check_keys(body, &allowed, &context);

        let fixed = spec.map_or(&[][..], |c| c.fixed_pins);
        let mut pins: Vec<Pin> = fixed
            .iter()
            .map(|(pin_name, role)| blank_pin(pin_name, *role, name_span))
            .collect();
        // Pins by name: a part of thousands of pins is read in linear time.
        let mut by_name: HashMap<String, PinIndex> = HashMap::new();
        for (i, pin) in pins.iter().enumerate() {
            by_name.entry(pin.name.clone()).or_insert(i);
        }
        let mut pending = Vec::new();
        if let Some(pins_node) = body.get("pins")
            && let Some(entries) = self.mapping(pins_node, &format!("the pins of `{name}`"))
        {
            for (key, pin_body) in entries {
                let Some(pin_name) = self.name(key, "pin") else {
                    continue;
                };
                let existing = by_name.get(&pin_name).copied();
                let default_role = existing.map(|i| pins[i].role);
                let span = self.in_plan(key.span, name_span);
                let index = existing.unwrap_or(pins.len());
                match self.pin(
                    &name,
                    pin_name.clone(),
                    span,
                    pin_body,
                    default_role,
                    index,
                    &mut pending,
                ) {
                    Some(pin) => match existing {
                        Some(i) => pins[i] = pin,
                        None => {
                            by_name.insert(pin.name.clone(), pins.len());
                            pins.push(pin);
                        }
                    },
                    None => {
                        self.refused_pins.insert((name.clone(), pin_name));
                    }
                }
            }
        }
        for r in pending {
            match by_name.get(&r.name).copied() {
                Some(i) if matches!(pins[i].role, PinRole::SupplyIn | PinRole::SupplyOut) => {
                    if let Some(logic) = pins[r.pin].logic.as_mut() {
                        logic.reference = Some(i);
                    }
                }
                Some(_) => self.error(
                    r.span,
                    format!("`ref: {}` must name a supply pin of `{name}`", r.name),
                    Some(
                        "point `ref` at the supply-in or supply-out pin that sets the logic levels"
                            .into(),
                    ),
                ),
                None => self.error(
                    r.span,
                    format!("`{name}` has no pin `{}`", r.name),
                    Some(format!("pins of `{name}`: {}", pin_names(&pins))),
                ),
            }
        }
        let ports = body
            .get("ports")
            .map(|n| self.ports(&name, n, &pins, name_span))
            .unwrap_or_default();
        let class = self.class(&class_name, &name, name_span, body, &mut pins)?;
        let moves = body
            .get("moves")
            .and_then(|n| self.boolean(n))
            .unwrap_or(false);
        let actuator = moves || matches!(class, Class::Motor(_) | Class::Servo);
        let mass = self.quantity(body, "mass", units::mass);
        let cost = body.get("cost").and_then(|n| self.amount(n, "cost"));
        // A plan keeps every pin for the whole run: no room left over from
        // growing the list as pins were read.
        pins.shrink_to_fit();
        Some(Part {
            name,
            span: name_span,
            library_id,
            class,
            pins,
            ports,
            actuator,
            mass,
            cost,
        })
    }

    /// A plain number, 0 or more (a cost: no unit, no currency sign).
    fn amount(&mut self, node: &Node, key: &str) -> Option<f64> {
        let text = node.as_scalar().unwrap_or_default();
        match text.trim().parse::<f64>() {
            Ok(n) if n.is_finite() && n >= 0.0 => Some(n),
            _ => {
                self.error(
                    node.span,
                    match node.as_scalar() {
                        Some(text) => format!(
                            "`{key}` takes a plain number, 0 or more, found `{}`",
                            crate::syntax::visible(text)
                        ),
                        None => format!(
                            "`{key}` takes a plain number, 0 or more, found {}",
                            node.describe()
                        ),
                    },
                    Some(format!(
                        "write the number alone, in the plan's own currency: `{key}: 24.50`"
                    )),
                );
                None
            }
        }
    }

    #[allow(clippy::too_many_arguments)]
    fn pin(
        &mut self,
        part: &str,
        name: String,
        span: Span,
        body: &Node,
        default_role: Option<PinRole>,
        index: PinIndex,
        pending: &mut Vec<PendingRef>,
    ) -> Option<Pin> {
        let context = format!("pin `{part}.{name}`");
        self.mapping(body, &context)?;
        let role = match body.get("role") {
            Some(n) => {
                let roles: Vec<(&str, PinRole)> = PinRole::WRITTEN.to_vec();
                match self.choice(n, &roles, "pin role") {
                    Some(role) => role,
                    None => {
                        // Still read the values, so their own mistakes show.
                        self.pin_values(body);
                        return None;
                    }
                }
            }
            None => match default_role {
                Some(r) => r,
                None => {
                    self.error(
                        span,
                        format!("{context} has no `role`"),
                        Some(format!(
                            "add `role:` with one of {}",
                            list(&PinRole::WRITTEN.map(|(n, _)| n))
                        )),
                    );
                    return None;
                }
            },
        };
        self.check_keys(
            body,
            &format::role_keys(role),
            &format!("{context} ({})", role.name()),
        );
        let mut pin = blank_pin(&name, role, span);
        pin.supply_mut().range = self.quantity(body, "range", units::voltage_band);
        pin.max = self.quantity(body, "max", units::voltage);
        pin.supply_mut().voltage = self.quantity(body, "voltage", units::voltage_band);
        pin.supply_mut().current = self.quantity(body, "current", units::current);
        if let Some(d) = body.get("draw") {
            pin.supply_mut().draw = self.draw(d);
        }
        if let Some(or) = body.get("or") {
            pin.diode_or = self
                .choice(or, &[("diode", true)], "`or:` value")
                .unwrap_or(false);
        }
        if role.is_logic() {
            let mut logic = LogicSpec {
                voh: self.quantity(body, "voh", units::voltage),
                vol: self.quantity(body, "vol", units::voltage),
                vih: self.quantity(body, "vih", units::voltage),
                vil: self.quantity(body, "vil", units::voltage),
                tolerant: self.quantity(body, "tolerant", units::voltage),
                ..LogicSpec::default()
            };
            if let Some(f) = body.get("family") {
                logic.family = self.choice(f, &LogicFamily::ALL, "logic family");
            }
            // A low level at or above the high one describes no logic pin.
            for (low, high, low_key) in
                [(logic.vol, logic.voh, "vol"), (logic.vil, logic.vih, "vil")]
            {
                if let (Some(low), Some(high)) = (low, high)
                    && low >= high
                    && let Some(n) = body.get(low_key)
                {
                    self.error(
                        n.span,
                        format!("`{low_key}` of {context} is not below its high level"),
                        Some("the low level must be below the high level (e.g. `vol: 0.4 V`, `voh: 2.4 V`)".into()),
                    );
                }
            }
            if let (Some(t), Some(n)) = (logic.tolerant, body.get("tolerant"))
                && t.get::<volt>() <= 0.0
            {
                self.error(
                    n.span,
                    "`tolerant:` names the voltage the input withstands, above zero",
                    Some("write e.g. `tolerant: 5 V`".into()),
                );
            }
            if let Some(r) = body.get("ref")
                && let Some(ref_name) = self.text(r, "`ref`")
            {
                pending.push(PendingRef {
                    pin: index,
                    name: ref_name,
                    span: r.span,
                });
            }
            pin.logic = Some(Box::new(logic));
        }
        pin.settle();
        Some(pin)
    }

    /// Reads whatever values a pin gives, for their own errors only.
    fn pin_values(&mut self, body: &Node) {
        for key in ["range", "voltage"] {
            let _ = self.quantity(body, key, units::voltage_band);
        }
        for key in ["max", "voh", "vol", "vih", "vil", "tolerant"] {
            let _ = self.quantity(body, key, units::voltage);
        }
        let _ = self.quantity(body, "current", units::current);
        if let Some(d) = body.get("draw") {
            let _ = self.draw(d);
        }
    }

    fn draw(&mut self, node: &Node) -> Option<Draw> {
        if node.as_scalar().is_some() {
            let i = self.scalar_quantity(node, units::current)?;
            return Some(Draw {
                idle: i,
                typical: i,
                peak: i,
            });
        }
        self.mapping(node, "`draw:`")?;
        self.check_keys(node, &format::keys(format::DRAW), "`draw:`");
        let idle = self.quantity(node, "idle", units::current);
        let typical = self.quantity(node, "typical", units::current);
        let peak = self.quantity(node, "peak", units::current);
        // States left out take the next one given (format reference §3).
        let typical = typical.or(peak);
        let Some(typical) = typical else {
            if node.get("typical").is_some() || node.get("peak").is_some() {
                // Already reported as a bad value.
                return None;
            }
            self.error(
                node.span,
                "`draw:` needs at least `typical` or `peak`",
                Some("write `draw: { typical: 120 mA, peak: 300 mA }`".into()),
            );
            return None;
        };
        Some(Draw {
            idle: idle.unwrap_or(typical),
            typical,
            peak: peak.unwrap_or(typical),
        })
    }

    fn ports(&mut self, part: &str, node: &Node, pins: &[Pin], fallback: Span) -> Vec<Port> {
        let mut ports = Vec::new();
        let Some(entries) = self.mapping(node, &format!("the ports of `{part}`")) else {
            return ports;
        };
        for (key, body) in entries {
            let Some(name) = self.name(key, "port") else {
                continue;
            };
            let context = format!("port `{part}.{name}`");
            if self.mapping(body, &context).is_none() {
                continue;
            }
            let Some(kind_node) = body.get("kind") else {
                self.error(
                    key.span,
                    format!("{context} has no `kind`"),
                    Some("add `kind: usb-host` or `kind: usb-device`".into()),
                );
                continue;
            };
            let Some(is_host) = self.choice(
                kind_node,
                &[("usb-host", true), ("usb-device", false)],
                "port kind",
            ) else {
                continue;
            };
            let kind = if is_host {
                self.check_keys(body, &format::keys(format::USB_HOST), &context);
                PortKind::UsbHost {
                    current: self.quantity(body, "current", units::current),
                    shared: body
                        .get("shared")
                        .and_then(|n| self.boolean(n))
                        .unwrap_or(false),
                }
            } else {
                self.check_keys(body, &format::keys(format::USB_DEVICE), &context);
                let draw = body.get("draw").and_then(|d| self.draw(d));
                let feeds = body.get("feeds").and_then(|f| {
                    let pin_name = self.text(f, "`feeds`")?;
                    let found = pins.iter().position(|p| p.name == pin_name);
                    if let Some(i) = found
                        && !matches!(pins[i].role, PinRole::SupplyIn | PinRole::SupplyOut)
                    {
                        self.error(
                            f.span,
                            format!("`feeds: {pin_name}` must name a supply pin of `{part}`"),
                            Some(
                                "name the supply-in or supply-out pin that the cable's VBUS joins"
                                    .into(),
                            ),
                        );
                        return None;
                    }
                    if found.is_none() {
                        self.error(
                            f.span,
                            format!("`{part}` has no pin `{pin_name}`"),
                            Some(format!("pins of `{part}`: {}", pin_names(pins))),
                        );
                    }
                    found
                });
                let diode_or = match body.get("or") {
                    Some(or) => self
                        .choice(or, &[("diode", true)], "`or:` value")
                        .unwrap_or(false),
                    None => false,
                };
                PortKind::UsbDevice {
                    draw,
                    feeds,
                    diode_or,
                }
            };
            ports.push(Port {
                name,
                span: self.in_plan(key.span, fallback),
                kind,
            });
        }
        ports
    }

    fn class(
        &mut self,
        class: &str,
        part: &str,
        at: Span,
        body: &Node,
        pins: &mut [Pin],
    ) -> Option<Class> {
        let what = format!("{class} `{part}`");
        Some(match class {
            "battery" => {
                // Every field is read before giving up, so one mistake does
                // not hide the next.
                let chemistry = match body.get("chemistry") {
                    Some(n) => self.choice(n, &Chemistry::ALL, "chemistry"),
                    None => {
                        self.error(
                            at,
                            format!("{what} needs `chemistry`"),
                            Some(
                                "add `chemistry: lipo` (or li-ion, lifepo4, nimh, lead-acid)"
                                    .into(),
                            ),
                        );
                        None
                    }
                };
                let cells = match body.get("cells") {
                    Some(n) => self.count(n).map(Some),
                    None if body.get("voltage").is_some() => Some(None),
                    None => {
                        self.error(
                            at,
                            format!("{what} needs `cells`"),
                            Some("add `cells: 3` (the number of cells in series)".into()),
                        );
                        None
                    }
                };
                let capacity = self.rated(body, "capacity", units::charge, at);
                let max_discharge = self.rated(body, "max_discharge", units::discharge_rate, at);
                let internal_resistance = self
                    .quantity(body, "internal_resistance", units::resistance)
                    .unwrap_or(ElectricalResistance::new::<ohm>(0.0));
                let cutoff = body
                    .get("cutoff")
                    .and_then(|n| self.boolean(n))
                    .unwrap_or(false);
                let voltage = self.quantity(body, "voltage", units::voltage_band);
                let usable = self
                    .quantity(body, "usable", units::share)
                    .unwrap_or(Ratio::new::<ratio>(1.0));
                Class::Battery(Battery {
                    chemistry: chemistry?,
                    cells: cells?,
                    capacity,
                    max_discharge,
                    internal_resistance,
                    cutoff,
                    voltage,
                    usable,
                    short_circuit: self.rated(body, "short_circuit", units::current, at),
                })
            }
            "fuse" => Class::Fuse(Fuse {
                rating: self.rated(body, "rating", units::current, at),
                voltage: self.rated(body, "voltage", units::voltage, at),
                speed: match body.get("speed") {
                    Some(n) => self.choice(
                        n,
                        &[("fast", FuseSpeed::Fast), ("slow", FuseSpeed::Slow)],
                        "fuse speed",
                    )?,
                    None => FuseSpeed::Fast,
                },
                breaking: self.rated(body, "breaking", units::current, at),
                contact_resistance: self.rated(body, "contact_resistance", units::resistance, at),
            }),
            "switch" => Class::Switch(Switch {
                rating: self.rated(body, "rating", units::current, at),
                surge: self.rated(body, "surge", units::current, at),
                voltage: self.rated(body, "voltage", units::voltage, at),
                stop: body
                    .get("stop")
                    .and_then(|n| self.boolean(n))
                    .unwrap_or(false),
                contact_resistance: self.rated(body, "contact_resistance", units::resistance, at),
            }),
            "connector" => {
                for pin in pins.iter() {
                    if pin.role == PinRole::Through && connector_partner(&pin.name).is_none() {
                        self.error(
                            pin.span,
                            format!(
                                "connector contact `{part}.{}` is not named in pairs",
                                pin.name
                            ),
                            Some("name contacts `a1`/`b1`, `a2`/`b2`, …".into()),
                        );
                    }
                }
                Class::Connector(Connector {
                    rating: self.rated(body, "rating", units::current, at),
                    surge: self.rated(body, "surge", units::current, at),
                    contact_resistance: self.rated(
                        body,
                        "contact_resistance",
                        units::resistance,
                        at,
                    ),
                })
            }
            "regulator" => self.regulator(&what, at, body, pins)?,
            "driver" => self.driver(&what, part, at, body, pins)?,
            "motor" => {
                let rated_voltage =
                    self.required(body, "rated_voltage", units::voltage, &what, "12 V", at);
                let rated_current =
                    self.required(body, "rated_current", units::current, &what, "0.5 A", at);
                let stall_current =
                    self.required(body, "stall_current", units::current, &what, "5 A", at);
                let no_load_current = self.quantity(body, "no_load_current", units::current);
                let (rated_voltage, rated_current, stall_current) =
                    (rated_voltage?, rated_current?, stall_current?);
                // The winding resistance is rated_voltage / stall_current: both
                // must be above zero, and a motor stalls at more than it runs.
                let mut sound = true;
                for (key, positive) in [
                    ("rated_voltage", rated_voltage.get::<volt>() > 0.0),
                    ("stall_current", stall_current.get::<ampere>() > 0.0),
                ] {
                    if !positive && let Some(n) = body.get(key) {
                        sound = false;
                        self.error(
                            n.span,
                            format!("`{key}` of {what} must be above zero"),
                            Some("give the motor's rated voltage and its stall current at that voltage".into()),
                        );
                    }
                }
                if sound
                    && stall_current < rated_current
                    && let Some(n) = body.get("stall_current")
                {
                    sound = false;
                    self.error(
                        n.span,
                        format!("{what} stalls at less than its rated current"),
                        Some("the stall current (shaft held still) is the largest a motor draws: check the two values".into()),
                    );
                }
                if !sound {
                    return None;
                }
                Class::Motor(Motor {
                    rated_voltage,
                    rated_current,
                    no_load_current,
                    stall_current,
                })
            }
            "resistor" => Class::Resistor(Resistor {
                value: {
                    let value =
                        self.required(body, "value", units::resistance, &what, "10 kohm", at)?;
                    if value.get::<ohm>() <= 0.0
                        && let Some(n) = body.get("value")
                    {
                        self.error(
                            n.span,
                            format!("the `value` of {what} must be above zero"),
                            Some(
                                "a pull resistor of zero ohms is a wire: give its resistance"
                                    .into(),
                            ),
                        );
                        return None;
                    }
                    value
                },
                power: self.quantity(body, "power", units::power),
            }),
            "board" => Class::Board,
            "sensor" => Class::Sensor,
            "load" => Class::Load,
            "servo" => Class::Servo,
            _ => Class::Shifter,
        })
    }

    fn count(&mut self, node: &Node) -> Option<u32> {
        // A robot's pack has a handful of cells in series; more than a
        // thousand is a typing slip, not a battery.
        match node.as_scalar().and_then(|s| s.parse::<u32>().ok()) {
            Some(n) if (1..=MAX_CELLS).contains(&n) => Some(n),
            _ => {
                self.error(
                    node.span,
                    format!("expected a whole number of cells in series, from 1 to {MAX_CELLS}"),
                    Some("write `cells: 3`".into()),
                );
                None
            }
        }
    }

    fn regulator(&mut self, what: &str, at: Span, body: &Node, pins: &mut [Pin]) -> Option<Class> {
        // Every field is read before giving up, so one mistake does not hide
        // the next.
        let topology = match body.get("topology") {
            Some(n) => self.choice(
                n,
                &[
                    ("linear", Topology::Linear),
                    ("buck", Topology::Buck),
                    ("switching", Topology::Buck),
                    ("boost", Topology::Boost),
                    ("buck-boost", Topology::BuckBoost),
                ],
                "regulator topology",
            ),
            None => {
                self.error(
                    at,
                    format!("{what} needs `topology`"),
                    Some("add `topology: buck` (or linear, boost, buck-boost)".into()),
                );
                None
            }
        };
        let output = self.required(body, "output", units::voltage_band, what, "5 V ±2%", at);
        let input = self.quantity(body, "input", units::voltage_band);
        let current = self.rated(body, "current", units::current, at);
        let efficiency_written = self.quantity(body, "efficiency", units::share);
        if let Some(e) = efficiency_written
            && e.get::<ratio>() <= 0.0
            && let Some(n) = body.get("efficiency")
        {
            self.error(
                n.span,
                "efficiency must be above 0 %",
                Some("write e.g. `efficiency: 90 %`".into()),
            );
        }
        let dropout = self
            .quantity(body, "dropout", units::voltage)
            .unwrap_or(ElectricPotential::new::<volt>(0.0));
        let quiescent = self
            .quantity(body, "quiescent", units::current)
            .unwrap_or(ElectricCurrent::new::<ampere>(0.0));
        let theta_ja = self.quantity(body, "theta_ja", units::thermal_resistance);
        let tj_max = self
            .quantity(body, "tj_max", plausible_temperature)
            .unwrap_or(default_tj_max());
        let (topology, output) = (topology?, output?);
        let efficiency = match (topology, efficiency_written) {
            (_, Some(e)) if e.get::<ratio>() > 0.0 => e,
            (Topology::Linear, _) => Ratio::new::<ratio>(1.0),
            _ => Ratio::new::<ratio>(DEFAULT_EFFICIENCY),
        };
        let regulator = Regulator {
            topology,
            output,
            current,
            dropout,
            efficiency,
            efficiency_assumed: topology.is_switching() && efficiency_written.is_none(),
            quiescent,
            theta_ja,
            tj_max,
            capacitance: self.rated(body, "capacitance", units::capacitance, at),
        };
        for pin in pins.iter_mut() {
            match pin.name.as_str() {
                "vin" => {
                    if pin.range().is_none() {
                        pin.supply_mut().range = input;
                    }
                    if pin.max.is_none() {
                        pin.max = input.map(|b| b.max);
                    }
                }
                "vout" => {
                    pin.supply_mut().voltage = Some(output);
                    pin.supply_mut().current = current.map(|c| c.value);
                }
                _ => {}
            }
        }
        Some(Class::Regulator(regulator))
    }

    fn driver(
        &mut self,
        what: &str,
        part: &str,
        at: Span,
        body: &Node,
        pins: &mut [Pin],
    ) -> Option<Class> {
        let supply = self.quantity(body, "supply", units::voltage_band);
        match pins.iter_mut().find(|p| p.name == "vm") {
            Some(vm) if vm.role == PinRole::SupplyIn => {
                if vm.range().is_none() {
                    vm.supply_mut().range = supply;
                }
                if vm.max.is_none() {
                    vm.max = supply.map(|b| b.max);
                }
            }
            _ => self.error(
                at,
                format!("{what} needs a `vm` supply-in pin for the motor supply"),
                Some("add `vm: { role: supply-in, range: 6 V..30 V }` under `pins:`".into()),
            ),
        }
        let drop = match (
            self.quantity(body, "drop", units::voltage),
            self.quantity(body, "rds_on", units::resistance),
        ) {
            (Some(v), None) => BridgeDrop::Fixed(v),
            (None, Some(r)) => BridgeDrop::PerSwitch(r),
            (Some(v), Some(_)) => {
                if let Some(n) = body.get("rds_on") {
                    self.error(
                        n.span,
                        format!("{what} gives both `drop` and `rds_on`"),
                        Some(
                            "keep one: `drop` for a bipolar bridge, `rds_on` for a MOSFET bridge"
                                .into(),
                        ),
                    );
                }
                BridgeDrop::Fixed(v)
            }
            (None, None) => BridgeDrop::Fixed(ElectricPotential::new::<volt>(0.0)),
        };
        let mut channels = Vec::new();
        if let Some(node) = body.get("channels")
            && let Some(entries) = self.mapping(node, "`channels:`")
        {
            for (key, value) in entries {
                let number = match key.as_scalar().and_then(|s| s.parse::<u32>().ok()) {
                    Some(n) if n >= 1 => n,
                    _ => {
                        self.error(
                            key.span,
                            "a channel is numbered 1, 2, …",
                            Some("write `channels: { 1: [out1, out2] }`".into()),
                        );
                        continue;
                    }
                };
                let names: Vec<&Node> = value
                    .as_seq()
                    .map(|s| s.iter().collect())
                    .unwrap_or_default();
                if names.len() != 2 {
                    self.error(
                        value.span,
                        format!("channel {number} must name two bridge outputs"),
                        Some("write `[out1a, out1b]`".into()),
                    );
                    continue;
                }
                let mut outputs = [0; 2];
                let mut ok = true;
                for (slot, n) in names.iter().enumerate() {
                    let name = n.as_scalar().unwrap_or("");
                    match pins.iter().position(|p| p.name == name) {
                        Some(i) if pins[i].role == PinRole::BridgeOut => outputs[slot] = i,
                        Some(_) => {
                            ok = false;
                            self.error(
                                n.span,
                                format!("`{part}.{name}` is not a `bridge-out` pin"),
                                Some("give the pin `role: bridge-out`".into()),
                            );
                        }
                        None => {
                            ok = false;
                            self.error(
                                n.span,
                                format!("`{part}` has no pin `{name}`"),
                                Some(format!("pins of `{part}`: {}", pin_names(pins))),
                            );
                        }
                    }
                }
                if ok && outputs[0] == outputs[1] {
                    ok = false;
                    self.error(
                        value.span,
                        format!("channel {number} names the same output twice"),
                        Some(
                            "a motor sits across two different bridge outputs: `[out1a, out1b]`"
                                .into(),
                        ),
                    );
                }
                if ok && channels.iter().any(|c: &Channel| c.number == number) {
                    ok = false;
                    self.error(
                        key.span,
                        format!("channel {number} is given twice"),
                        Some("number each channel once".into()),
                    );
                }
                if ok {
                    channels.push(Channel {
                        number,
                        outputs,
                        span: self.in_plan(key.span, at),
                    });
                }
            }
        }
        Some(Class::Driver(Driver {
            channel_current: self.rated(body, "channel_current", units::current, at),
            channel_peak: self.rated(body, "channel_peak", units::current, at),
            drop,
            quiescent: self
                .quantity(body, "quiescent", units::current)
                .unwrap_or(ElectricCurrent::new::<ampere>(0.0)),
            channels,
            capacitance: self.rated(body, "capacitance", units::capacitance, at),
            clamp: body
                .get("clamp")
                .and_then(|n| self.boolean(n))
                .unwrap_or(false),
        }))
    }

    // ----- nets, links, modes ----------------------------------------------

    fn pin_ref(
        &mut self,
        node: &Node,
        parts: &[Part],
        index: &HashMap<String, PartId>,
    ) -> Option<PinRef> {
        let text = self.text(node, "a pin")?;
        let Some((part_name, pin_name)) = text.split_once('.') else {
            self.error(
                node.span,
                format!("`{text}` is not a pin"),
                Some("write pins as `part.pin`, e.g. `pack.pos`".into()),
            );
            return None;
        };
        let offset = self.scalar_offset(node);
        if self.refused_parts.contains(part_name)
            || self
                .refused_pins
                .contains(&(part_name.to_string(), pin_name.to_string()))
        {
            // Its own error is already reported.
            return None;
        }
        let part = self.part_named(
            part_name,
            node.span.within(offset..offset + part_name.len()),
            parts,
            index,
            "declare it under `parts:`",
        )?;
        let found = self
            .pin_names
            .entry(part)
            .or_insert_with(|| {
                let mut names = HashMap::new();
                for (i, pin) in parts[part].pins.iter().enumerate() {
                    // The first of two pins of one name is the one `Part::pin` finds.
                    names.entry(pin.name.clone()).or_insert(i);
                }
                names
            })
            .get(pin_name)
            .copied();
        let Some(pin) = found else {
            let names: Vec<&str> = parts[part].pins.iter().map(|p| p.name.as_str()).collect();
            let hint = match self.speller.closest(pin_name, names.iter().copied()) {
                Some(s) => format!("did you mean `{part_name}.{s}`?"),
                None => format!("pins of `{part_name}`: {}", list(&names)),
            };
            self.error(
                node.span
                    .within(offset + part_name.len() + 1..offset + text.len()),
                format!("part `{part_name}` has no pin `{pin_name}`"),
                Some(hint),
            );
            return None;
        };
        Some(PinRef { part, pin })
    }

    fn nets(
        &mut self,
        node: &Node,
        parts: &mut [Part],
        index: &HashMap<String, PartId>,
    ) -> Vec<Net> {
        let mut nets = Vec::new();
        let Some(entries) = self.mapping(node, "`nets:`") else {
            return nets;
        };
        for (key, body) in entries {
            let Some(name) = self.name(key, "net") else {
                continue;
            };
            let net_id = nets.len();
            let (pin_nodes, wire, length, insulation, ambient, colour, sheathed) = match &body.kind
            {
                NodeKind::Seq(items) => (items.as_slice(), None, None, None, None, None, false),
                NodeKind::Map(_) => {
                    let context = format!("net `{name}`");
                    self.check_keys(body, &format::keys(format::NET), &context);
                    let items = match body.get("pins") {
                        Some(p) => match p.as_seq() {
                            Some(items) => items,
                            None => {
                                self.error(
                                    p.span,
                                    format!("the pins of {context} must be a list"),
                                    Some("write `pins: [pack.pos, fuse.a]`".into()),
                                );
                                &[]
                            }
                        },
                        None => {
                            self.error(
                                key.span,
                                format!("{context} has no `pins`"),
                                Some("add `pins: [part.pin, …]`".into()),
                            );
                            &[]
                        }
                    };
                    (
                        items,
                        self.rated(body, "wire", units::wire_size, key.span),
                        self.rated(body, "length", units::length, key.span),
                        self.quantity(body, "insulation", plausible_temperature),
                        self.quantity(body, "ambient", plausible_temperature),
                        body.get("colour")
                            .and_then(|c| self.text(c, &format!("the colour of {context}"))),
                        body.get("sheathed")
                            .and_then(|n| self.boolean(n))
                            .unwrap_or(false),
                    )
                }
                _ => {
                    self.error(
                        body.span,
                        format!("net `{name}` must be a list of pins"),
                        Some("write `[pack.pos, fuse.a]` or `{ pins: [...], wire: 18 AWG, length: 0.5 m }`".into()),
                    );
                    continue;
                }
            };
            // Judged on what is written, not on what read: a value refused for
            // its own mistake is not also missing.
            let written = |key: &str| body.as_map().is_some() && body.get(key).is_some();
            if written("wire") != written("length") {
                let missing = if written("wire") { "length" } else { "wire" };
                self.error(
                    key.span,
                    format!("net `{name}` gives a wire size or a length but not both"),
                    Some(format!(
                        "add `{missing}:` so its resistance can be computed"
                    )),
                );
            }
            let mut pins = Vec::new();
            for pin_node in pin_nodes {
                let Some(pin_ref) = self.pin_ref(pin_node, parts, index) else {
                    continue;
                };
                let pin = &parts[pin_ref.part].pins[pin_ref.pin];
                if let Some(other) = pin.net {
                    let other_name = nets
                        .get(other)
                        .map_or(name.as_str(), |n: &Net| n.name.as_str());
                    let message = if other == net_id {
                        format!(
                            "pin `{}` is listed twice in net `{name}`",
                            pin_node.as_scalar().unwrap_or("")
                        )
                    } else {
                        format!(
                            "pin `{}` is already in net `{other_name}`",
                            pin_node.as_scalar().unwrap_or("")
                        )
                    };
                    self.error(
                        pin_node.span,
                        message,
                        Some(
                            "a pin belongs to one net: merge the two nets or use another pin"
                                .into(),
                        ),
                    );
                    continue;
                }
                let pin = &mut parts[pin_ref.part].pins[pin_ref.pin];
                pin.net = Some(net_id);
                pin.net_span = Some(pin_node.span);
                pins.push(pin_ref);
            }
            nets.push(Net {
                name,
                span: key.span,
                pins,
                wire,
                length,
                insulation,
                ambient,
                colour,
                sheathed,
            });
        }
        nets
    }

    fn links(&mut self, node: &Node, parts: &[Part], index: &HashMap<String, PartId>) -> Vec<Link> {
        let mut links = Vec::new();
        let Some(items) = node.as_seq() else {
            self.error(
                node.span,
                format!("`links:` must be a list, found {}", node.describe()),
                Some("write `links: [ { usb: [sbc.usb1, mcu.usb] } ]`".into()),
            );
            return links;
        };
        let mut used: BTreeMap<(PartId, usize), Span> = BTreeMap::new();
        for item in items {
            if self.mapping(item, "a link").is_none() {
                continue;
            }
            self.check_keys(item, &format::keys(format::LINK), "a link");
            let Some(ends) = item.get("usb") else {
                self.error(
                    item.span,
                    "a link needs `usb: [host.port, device.port]`",
                    Some("write `{ usb: [sbc.usb1, mcu.usb] }`".into()),
                );
                continue;
            };
            let ends: Vec<&Node> = ends
                .as_seq()
                .map(|s| s.iter().collect())
                .unwrap_or_default();
            if ends.len() != 2 {
                self.error(
                    item.span,
                    "a USB link joins exactly two ports",
                    Some("write `usb: [sbc.usb1, mcu.usb]`".into()),
                );
                continue;
            }
            let mut resolved = Vec::new();
            for end in &ends {
                let text = end.as_scalar().unwrap_or("");
                let Some((part, part_name, port_name)) =
                    self.port_of_part(end, parts, index, "write `part.port`")
                else {
                    continue;
                };
                let Some(port) = parts[part].ports.iter().position(|p| p.name == port_name) else {
                    let names: Vec<&str> =
                        parts[part].ports.iter().map(|p| p.name.as_str()).collect();
                    self.error(
                        end.span,
                        format!("part `{part_name}` has no port `{port_name}`"),
                        Some(if names.is_empty() {
                            format!("declare it under `ports:` of `{part_name}`")
                        } else {
                            format!("ports of `{part_name}`: {}", list(&names))
                        }),
                    );
                    continue;
                };
                if let Some(previous) = used.insert((part, port), end.span) {
                    let (line, _) = self.sources.line_column(previous);
                    self.error(
                        end.span,
                        format!("port `{text}` is already linked (line {line})"),
                        Some("a port takes one cable".into()),
                    );
                    continue;
                }
                let is_host = matches!(parts[part].ports[port].kind, PortKind::UsbHost { .. });
                resolved.push(((part, port), is_host, end.span));
            }
            if resolved.len() != 2 {
                continue;
            }
            let host = resolved.iter().find(|r| r.1);
            let device = resolved.iter().find(|r| !r.1);
            match (host, device) {
                (Some(h), Some(d)) => links.push(Link {
                    span: item.span,
                    host: h.0,
                    device: d.0,
                    wire: self.rated(item, "wire", units::wire_size, item.span),
                    length: self.rated(item, "length", units::length, item.span),
                }),
                _ => self.error(
                    item.span,
                    "a USB link joins a `usb-host` port to a `usb-device` port",
                    Some(
                        "link a host port (`kind: usb-host`) to a device port (`kind: usb-device`), e.g. `usb: [sbc.usb1, mcu.usb]`"
                            .into(),
                    ),
                ),
            }
        }
        links
    }

    fn modes(&mut self, node: &Node, parts: &[Part], index: &HashMap<String, PartId>) -> Vec<Mode> {
        let mut modes = Vec::new();
        let Some(entries) = self.mapping(node, "`modes:`") else {
            return modes;
        };
        for (key, body) in entries {
            let Some(name) = self.name(key, "mode") else {
                continue;
            };
            if name == "typical" || name == "worst" {
                self.error(
                    key.span,
                    format!("`{name}` is a built-in mode"),
                    Some("choose another name; `typical` and `worst` always exist".into()),
                );
                continue;
            }
            let Some(states) = self.mapping(body, &format!("mode `{name}`")) else {
                continue;
            };
            let mut mode = Mode {
                name,
                span: key.span,
                states: Vec::new(),
                lasts: None,
            };
            for (part_node, state_node) in states {
                let part_name = part_node.as_scalar().unwrap_or("");
                // `lasts` is the mode's own key, never a part (format reference §6).
                if part_name == "lasts" {
                    if let Some(t) = self.scalar_quantity(state_node, units::duration) {
                        if t.get::<uom::si::time::second>() > 0.0 {
                            mode.lasts = Some(Rated {
                                value: t,
                                span: state_node.span,
                            });
                        } else {
                            self.error(
                                state_node.span,
                                format!("mode `{}` must last longer than zero", mode.name),
                                Some(
                                    "write how long the mode lasts at a time, e.g. `lasts: 2 s`"
                                        .into(),
                                ),
                            );
                        }
                    }
                    continue;
                }
                let Some(part) = self.part_named(
                    part_name,
                    part_node.span,
                    parts,
                    index,
                    "name a part declared under `parts:`",
                ) else {
                    continue;
                };
                let state = if matches!(parts[part].class, Class::Motor(_)) {
                    self.choice(
                        state_node,
                        &[
                            ("idle", PartState::Motor(MotorState::Idle)),
                            ("running", PartState::Motor(MotorState::Running)),
                            ("stall", PartState::Motor(MotorState::Stall)),
                        ],
                        "motor state",
                    )
                } else {
                    self.choice(
                        state_node,
                        &[
                            ("idle", PartState::Load(LoadState::Idle)),
                            ("typical", PartState::Load(LoadState::Typical)),
                            ("peak", PartState::Load(LoadState::Peak)),
                        ],
                        "load state",
                    )
                };
                if let Some(state) = state {
                    mode.states.push((part, state));
                }
            }
            modes.push(mode);
        }
        modes
    }

    /// The part of this name, or `None` after saying it is unknown (with a
    /// "did you mean", else `otherwise`) at `at`; a part refused for an
    /// error already reported is `None` with nothing more said.
    fn part_named(
        &mut self,
        name: &str,
        at: Span,
        parts: &[Part],
        index: &HashMap<String, PartId>,
        otherwise: &str,
    ) -> Option<PartId> {
        if self.refused_parts.contains(name) {
            return None;
        }
        let Some(&part) = index.get(name) else {
            let hint = match self
                .speller
                .closest(name, parts.iter().map(|p| p.name.as_str()))
            {
                Some(s) => format!("did you mean `{s}`?"),
                None => otherwise.to_string(),
            };
            self.error(at, format!("unknown part `{name}`"), Some(hint));
            return None;
        };
        Some(part)
    }

    /// A `part.port` written at `node`: the part, and the two names as
    /// written. Text with no dot is refused with `hint`.
    fn port_of_part<'n>(
        &mut self,
        node: &'n Node,
        parts: &[Part],
        index: &HashMap<String, PartId>,
        hint: &str,
    ) -> Option<(PartId, &'n str, &'n str)> {
        let text = node.as_scalar().unwrap_or("");
        let Some((part_name, port_name)) = text.split_once('.') else {
            self.error(
                node.span,
                format!("`{text}` is not a port"),
                Some(hint.to_string()),
            );
            return None;
        };
        let part = self.part_named(
            part_name,
            node.span,
            parts,
            index,
            "declare it under `parts:`",
        )?;
        Some((part, part_name, port_name))
    }

    /// A part named in a list of `supplies:` or `scenarios:`, which must be of
    /// the class `want` accepts.
    fn named_part(
        &mut self,
        node: &Node,
        parts: &[Part],
        index: &HashMap<String, PartId>,
        want: fn(&Class) -> bool,
        what: &str,
    ) -> Option<PartId> {
        let name = node.as_scalar().unwrap_or("");
        if self.refused_parts.contains(name) {
            return None;
        }
        let candidates = || {
            parts
                .iter()
                .filter(|p| want(&p.class))
                .map(|p| p.name.as_str())
        };
        let Some(&part) = index.get(name) else {
            let hint = match self.speller.closest(name, candidates()) {
                Some(s) => format!("did you mean `{s}`?"),
                None => format!("name {what} declared under `parts:`"),
            };
            self.error(node.span, format!("unknown part `{name}`"), Some(hint));
            return None;
        };
        if !want(&parts[part].class) {
            let names: Vec<&str> = candidates().collect();
            self.error(
                node.span,
                format!("`{name}` is a {}, not {what}", parts[part].class.name()),
                Some(if names.is_empty() {
                    format!("the plan has no {what}")
                } else {
                    format!("name {what}: {}", list(&names))
                }),
            );
            return None;
        }
        Some(part)
    }

    /// A list of names (`[pack, spare]`); a single name is taken as a list
    /// of one.
    fn name_list<'n>(&mut self, node: &'n Node, key: &str) -> Vec<&'n Node> {
        match &node.kind {
            NodeKind::Seq(items) => items.iter().collect(),
            NodeKind::Scalar(_) => vec![node],
            NodeKind::Null => Vec::new(),
            _ => {
                self.error(
                    node.span,
                    format!("`{key}` takes a list of names, found {}", node.describe()),
                    Some(format!("write `{key}: [name, other]`")),
                );
                Vec::new()
            }
        }
    }

    fn supplies(
        &mut self,
        node: &Node,
        parts: &[Part],
        index: &HashMap<String, PartId>,
        nets: &[Net],
    ) -> Vec<ExternalSupply> {
        let mut supplies = Vec::new();
        let Some(entries) = self.mapping(node, "`supplies:`") else {
            return supplies;
        };
        let net_index: HashMap<&str, NetId> = nets
            .iter()
            .enumerate()
            .map(|(i, n)| (n.name.as_str(), i))
            .collect();
        let mut ports_taken: HashMap<(PartId, usize), Span> = HashMap::new();
        for (key, body) in entries {
            let Some(name) = self.name(key, "supply") else {
                continue;
            };
            let what = format!("supply `{name}`");
            if self.mapping(body, &what).is_none() {
                continue;
            }
            self.check_keys(body, &format::keys(format::SUPPLY), &what);
            let kind = match body.get("kind") {
                None => {
                    self.error(
                        key.span,
                        format!("{what} needs `kind`"),
                        Some("add `kind: usb-host`, `kind: bench` or `kind: charger`".into()),
                    );
                    continue;
                }
                Some(k) => self.choice(
                    k,
                    &[
                        ("usb-host", SupplyKind::UsbHost),
                        ("bench", SupplyKind::Bench),
                        ("charger", SupplyKind::Charger),
                    ],
                    "supply kind",
                ),
            };
            let Some(kind) = kind else { continue };
            let attach = match kind {
                SupplyKind::UsbHost => {
                    if let Some(net) = body.get("net") {
                        self.error(
                            net.span,
                            "a `usb-host` supply plugs into a port, not a net",
                            Some("write `port: part.port`, naming a `usb-device` port".into()),
                        );
                    }
                    let Some(port_node) = body.get("port") else {
                        self.error(
                            key.span,
                            format!("{what} needs `port`"),
                            Some(
                                "add `port: part.port`, the `usb-device` port it plugs into".into(),
                            ),
                        );
                        continue;
                    };
                    let Some((part, port)) = self.device_port(port_node, parts, index) else {
                        continue;
                    };
                    if let Some(previous) = ports_taken.insert((part, port), port_node.span) {
                        let (line, _) = self.sources.line_column(previous);
                        self.error(
                            port_node.span,
                            format!("another supply plugs into this port already (line {line})"),
                            Some("a port takes one cable at a time: declare each host as its own scenario".into()),
                        );
                        continue;
                    }
                    SupplyAttach::Port(part, port)
                }
                SupplyKind::Bench | SupplyKind::Charger => {
                    if let Some(port) = body.get("port") {
                        self.error(
                            port.span,
                            format!("a `{}` supply clips onto a net, not a port", kind.name()),
                            Some("write `net: NAME`, the net its positive lead joins".into()),
                        );
                    }
                    let Some(net_node) = body.get("net") else {
                        self.error(
                            key.span,
                            format!("{what} needs `net`"),
                            Some("add `net: NAME`, the net its positive lead joins".into()),
                        );
                        continue;
                    };
                    let net_name = net_node.as_scalar().unwrap_or("");
                    let Some(&net) = net_index.get(net_name) else {
                        let hint = match self
                            .speller
                            .closest(net_name, nets.iter().map(|n| n.name.as_str()))
                        {
                            Some(s) => format!("did you mean `{s}`?"),
                            None => "name a net declared under `nets:`".into(),
                        };
                        self.error(
                            net_node.span,
                            format!("unknown net `{net_name}`"),
                            Some(hint),
                        );
                        continue;
                    };
                    SupplyAttach::Net(net)
                }
            };
            let voltage = match (kind, body.get("voltage")) {
                (_, Some(v)) => match self.scalar_quantity(v, units::voltage_band) {
                    Some(band) if band.min.get::<volt>() > 0.0 => band,
                    Some(_) => {
                        self.error(
                            v.span,
                            format!("{what} must give a voltage above zero"),
                            Some("write the voltage it is set to, e.g. `12 V`".into()),
                        );
                        continue;
                    }
                    None => continue,
                },
                // USB 2.0 §7.2.1: a host port gives 4.75 V to 5.25 V.
                (SupplyKind::UsbHost, None) => Band {
                    min: ElectricPotential::new::<volt>(4.75),
                    nominal: ElectricPotential::new::<volt>(5.0),
                    max: ElectricPotential::new::<volt>(5.25),
                },
                (_, None) => {
                    self.error(
                        key.span,
                        format!("{what} needs `voltage`"),
                        Some("add the voltage it is set to, e.g. `voltage: 12 V`".into()),
                    );
                    continue;
                }
            };
            let current = self.rated(body, "current", units::current, key.span);
            let diode_or = match body.get("or") {
                Some(n) => self
                    .choice(n, &[("diode", true)], "`or` value")
                    .unwrap_or(false),
                None => false,
            };
            let replaces = match body.get("replaces") {
                Some(n) => self
                    .name_list(n, "replaces")
                    .into_iter()
                    .filter_map(|item| self.named_part(item, parts, index, is_battery, "a battery"))
                    .collect(),
                None => Vec::new(),
            };
            supplies.push(ExternalSupply {
                name,
                span: key.span,
                kind,
                attach,
                voltage,
                current,
                diode_or,
                replaces,
            });
        }
        supplies
    }

    /// A `usb-device` port named `part.port`.
    fn device_port(
        &mut self,
        node: &Node,
        parts: &[Part],
        index: &HashMap<String, PartId>,
    ) -> Option<(PartId, usize)> {
        let text = node.as_scalar().unwrap_or("");
        let (part, part_name, port_name) = self.port_of_part(
            node,
            parts,
            index,
            "write `part.port`, naming a `usb-device` port",
        )?;
        let devices: Vec<&str> = parts[part]
            .ports
            .iter()
            .filter(|p| matches!(p.kind, PortKind::UsbDevice { .. }))
            .map(|p| p.name.as_str())
            .collect();
        match parts[part].ports.iter().position(|p| p.name == port_name) {
            Some(port) if matches!(parts[part].ports[port].kind, PortKind::UsbDevice { .. }) => {
                Some((part, port))
            }
            found => {
                self.error(
                    node.span,
                    if found.is_some() {
                        format!("port `{text}` is a host port: a USB host plugs into a `usb-device` port")
                    } else {
                        format!("part `{part_name}` has no port `{port_name}`")
                    },
                    Some(if devices.is_empty() {
                        format!("`{part_name}` has no `usb-device` port: declare one under its `ports:`")
                    } else {
                        format!("device ports of `{part_name}`: {}", list(&devices))
                    }),
                );
                None
            }
        }
    }

    fn scenarios(
        &mut self,
        node: &Node,
        parts: &[Part],
        index: &HashMap<String, PartId>,
        supplies: &[ExternalSupply],
    ) -> Vec<DeclaredScenario> {
        let mut scenarios = Vec::new();
        let Some(entries) = self.mapping(node, "`scenarios:`") else {
            return scenarios;
        };
        for (key, body) in entries {
            let Some(name) = self.name(key, "scenario") else {
                continue;
            };
            let what = format!("scenario `{name}`");
            if self.mapping(body, &what).is_none() {
                continue;
            }
            self.check_keys(body, &format::keys(format::SCENARIO), &what);
            let mut scenario = DeclaredScenario {
                name,
                span: key.span,
                connected: Vec::new(),
                removed: Vec::new(),
                open: Vec::new(),
            };
            if let Some(n) = body.get("connected") {
                for item in self.name_list(n, "connected") {
                    let name = item.as_scalar().unwrap_or("");
                    match supplies.iter().position(|s| s.name == name) {
                        Some(i) => {
                            if !scenario.connected.contains(&i) {
                                scenario.connected.push(i);
                            }
                        }
                        None => {
                            let hint = match self
                                .speller
                                .closest(name, supplies.iter().map(|s| s.name.as_str()))
                            {
                                Some(s) => format!("did you mean `{s}`?"),
                                None => "declare it under `supplies:`".into(),
                            };
                            self.error(item.span, format!("unknown supply `{name}`"), Some(hint));
                        }
                    }
                }
            }
            if let Some(n) = body.get("removed") {
                for item in self.name_list(n, "removed") {
                    if let Some(p) = self.named_part(item, parts, index, is_battery, "a battery")
                        && !scenario.removed.contains(&p)
                    {
                        scenario.removed.push(p);
                    }
                }
            }
            if let Some(n) = body.get("open") {
                for item in self.name_list(n, "open") {
                    if let Some(p) = self.named_part(item, parts, index, is_switch, "a switch")
                        && !scenario.open.contains(&p)
                    {
                        scenario.open.push(p);
                    }
                }
            }
            scenarios.push(scenario);
        }
        scenarios
    }

    /// `sweep:` is `railcheck sweep`'s: here only its shape is checked, a
    /// mapping of keys to values or lists of values (`sweep` reads the keys
    /// and values themselves).
    fn sweep_shape(&mut self, node: &Node) {
        let Some(entries) = self.mapping(node, "`sweep:`") else {
            return;
        };
        for (key, value) in entries {
            let items: Vec<&Node> = match &value.kind {
                NodeKind::Seq(items) if !items.is_empty() => items.iter().collect(),
                NodeKind::Scalar(_) => vec![value],
                _ => {
                    self.error(
                        if matches!(value.kind, NodeKind::Null) {
                            key.span
                        } else {
                            value.span
                        },
                        format!(
                            "a `sweep:` entry takes a list of values, found {}",
                            value.describe()
                        ),
                        Some("write the values to try: `VMOT.wire: [16 AWG, 14 AWG]`".into()),
                    );
                    continue;
                }
            };
            for item in items {
                if item.as_scalar().is_none() {
                    self.error(
                        item.span,
                        format!(
                            "a value to try must be a single value, found {}",
                            item.describe()
                        ),
                        Some("write each value as the plan would: `3 A`, `battery/lipo-4s`".into()),
                    );
                }
            }
        }
    }

    fn profile(&mut self, node: &Node, modes: &[Mode]) -> Vec<ProfileShare> {
        let mut shares = Vec::new();
        let Some(entries) = self.mapping(node, "`profile:`") else {
            return shares;
        };
        let mut complete = true;
        for (key, value) in entries {
            let name = key.as_scalar().unwrap_or("").to_string();
            if name != "typical" && name != "worst" && !modes.iter().any(|m| m.name == name) {
                let mut names: Vec<&str> = vec!["typical", "worst"];
                names.extend(modes.iter().map(|m| m.name.as_str()));
                let hint = self
                    .speller
                    .closest(&name, names.iter().copied())
                    .map(|s| format!("did you mean `{s}`?"))
                    .unwrap_or_else(|| format!("modes: {}", list(&names)));
                self.error(key.span, format!("unknown mode `{name}`"), Some(hint));
                complete = false;
                continue;
            }
            match self.scalar_quantity(value, units::share) {
                Some(share) => shares.push(ProfileShare {
                    mode: name,
                    share,
                    span: key.span,
                }),
                None => complete = false,
            }
        }
        // A share already refused would make the sum look wrong: check the
        // sum only when every share was read.
        let total: f64 = shares.iter().map(|s| s.share.get::<ratio>()).sum();
        if complete && !shares.is_empty() && (total - 1.0).abs() > 0.001 {
            self.error(
                node.span,
                format!("the profile adds up to {:.1} %, not 100 %", total * 100.0),
                Some("make the shares of time add up to 100 %".into()),
            );
        }
        shares
    }
}

// ----- helpers -------------------------------------------------------------

/// Whether `text` is an ISO 8601 calendar date `YYYY-MM-DD` that exists
/// (Gregorian leap years: divisible by 4, except centuries not divisible
/// by 400).
fn is_calendar_date(text: &str) -> bool {
    let bytes = text.as_bytes();
    let digits = |range: std::ops::Range<usize>| {
        bytes[range.clone()]
            .iter()
            .all(u8::is_ascii_digit)
            .then(|| {
                bytes[range]
                    .iter()
                    .fold(0u32, |n, d| n * 10 + u32::from(d - b'0'))
            })
    };
    if bytes.len() != 10 || bytes[4] != b'-' || bytes[7] != b'-' {
        return false;
    }
    let (Some(year), Some(month), Some(day)) = (digits(0..4), digits(5..7), digits(8..10)) else {
        return false;
    };
    let leap = year % 4 == 0 && (year % 100 != 0 || year % 400 == 0);
    let days = match month {
        1 | 3 | 5 | 7 | 8 | 10 | 12 => 31,
        4 | 6 | 9 | 11 => 30,
        2 if leap => 29,
        2 => 28,
        _ => return false,
    };
    (1..=days).contains(&day)
}

/// A cable's VBUS powers the pin its device port `feeds` even where the plan
/// wires that pin to nothing else (format reference §3, ports): such a pin
/// gets a net of its own, named after the pin (`brain.vin`; a dot cannot
/// appear in a net the plan names), so its draw is paid by the cable and its
/// voltage is the cable's.
fn cable_fed_nets(links: &[Link], parts: &mut [Part], nets: &mut Vec<Net>) {
    for link in links {
        let (device, port) = link.device;
        let part = &mut parts[device];
        let PortKind::UsbDevice {
            feeds: Some(pin), ..
        } = part.ports[port].kind
        else {
            continue;
        };
        if part.pins[pin].net.is_some() {
            continue;
        }
        let span = part.ports[port].span;
        part.pins[pin].net = Some(nets.len());
        part.pins[pin].net_span = Some(span);
        nets.push(Net {
            name: format!("{}.{}", part.name, part.pins[pin].name),
            span,
            pins: vec![PinRef { part: device, pin }],
            wire: None,
            length: None,
            insulation: None,
            colour: None,
            sheathed: false,
            ambient: None,
        });
    }
}

fn first_key_span(root: &Node) -> Span {
    root.as_map()
        .and_then(|e| e.first())
        .map_or(root.span, |(k, _)| k.span)
}

fn key_node(key: &str, span: Span) -> Node {
    Node {
        kind: NodeKind::Scalar(key.to_string()),
        span,
    }
}

/// Overlays `overrides` on a library part: fields are replaced, and `pins` and
/// `ports` are merged entry by entry, field by field.
/// Takes the entries of the mapping under `key` out of `root`, leaving an
/// empty mapping in their place; none when there is no such mapping.
fn take_entries(root: &mut Node, key: &str) -> Vec<(Node, Node)> {
    let NodeKind::Map(entries) = &mut root.kind else {
        return Vec::new();
    };
    match entries.iter_mut().find(|(k, _)| k.as_scalar() == Some(key)) {
        Some((
            _,
            Node {
                kind: NodeKind::Map(inner),
                ..
            },
        )) => std::mem::take(inner),
        _ => Vec::new(),
    }
}

fn merge_part(base: &mut Node, overrides: &Node) {
    let (NodeKind::Map(base_entries), Some(over_entries)) = (&mut base.kind, overrides.as_map())
    else {
        return;
    };
    for (key, value) in over_entries {
        let name = key.as_scalar();
        let existing = base_entries
            .iter_mut()
            .find(|(k, _)| k.as_scalar().is_some() && k.as_scalar() == name);
        match existing {
            Some((_, base_value)) if matches!(name, Some("pins" | "ports")) => {
                merge_entries(base_value, value, 1);
            }
            Some(slot) => *slot = (key.clone(), value.clone()),
            None => base_entries.push((key.clone(), value.clone())),
        }
    }
}

/// Merges mappings `depth` levels deep, replacing values below that.
fn merge_entries(base: &mut Node, overrides: &Node, depth: usize) {
    let (NodeKind::Map(base_entries), Some(over_entries)) = (&mut base.kind, overrides.as_map())
    else {
        *base = overrides.clone();
        return;
    };
    for (key, value) in over_entries {
        let existing = base_entries
            .iter_mut()
            .find(|(k, _)| k.as_scalar().is_some() && k.as_scalar() == key.as_scalar());
        match existing {
            Some((_, base_value)) if depth > 0 => merge_entries(base_value, value, depth - 1),
            Some(slot) => *slot = (key.clone(), value.clone()),
            None => base_entries.push((key.clone(), value.clone())),
        }
    }
}

fn blank_pin(name: &str, role: PinRole, span: Span) -> Pin {
    Pin::new(name, role, span)
}

/// `a3` ↔ `b3`: a connector's contact pairs.
pub(crate) fn connector_partner(name: &str) -> Option<String> {
    let (side, number) = name.split_at_checked(1)?;
    if number.is_empty() || !number.chars().all(|c| c.is_ascii_digit()) {
        return None;
    }
    match side {
        "a" => Some(format!("b{number}")),
        "b" => Some(format!("a{number}")),
        _ => None,
    }
}

fn pin_names(pins: &[Pin]) -> String {
    let names: Vec<&str> = pins.iter().map(|p| p.name.as_str()).collect();
    list(&names)
}

/// Whether a quantity as written is zero: its number is `0`, `-0`, `0.0`,
/// `0e5`… An AWG gauge is a size number, not an amount (`0 AWG` is a thick
/// wire), so it never counts as zero.
fn is_written_zero(written: &str) -> bool {
    let written = written.trim();
    if written.to_ascii_uppercase().contains("AWG") {
        return false;
    }
    let number: String = written
        .chars()
        .take_while(|c| c.is_ascii_digit() || matches!(c, '.' | '+' | '-' | 'e' | 'E'))
        .collect();
    let number = number.trim_end_matches(['e', 'E']);
    number.parse::<f64>().is_ok_and(|n| n == 0.0) && !written.contains("..")
}

/// Names in backticks, or what to do when there are none.
fn list(names: &[&str]) -> String {
    if names.is_empty() {
        return "none: the part declares no pins; give it its pins under `pins:`".into();
    }
    names
        .iter()
        .map(|n| format!("`{n}`"))
        .collect::<Vec<_>>()
        .join(", ")
}

// The "did you mean" search is shared with the quantity parser.
use crate::spelling::{Speller, closest};

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn connector_contacts_pair_by_number() {
        assert_eq!(connector_partner("a12").as_deref(), Some("b12"));
        assert_eq!(connector_partner("b1").as_deref(), Some("a1"));
        assert_eq!(connector_partner("c1"), None);
        assert_eq!(connector_partner("a"), None);
    }
}
