//! railcheck: checks a robot's wiring plan before first power-on.
//!
//! The data flows through the modules in order: `syntax` (YAML with spans) →
//! `units` (quantities) → `model` (typed plan, parts library) → `graph`
//! (nodes, power flow, grounds) → `analysis` (operating point per mode and
//! battery state) → `rules` (findings) → `report` (terminal, JSON). The
//! library does no I/O and never prints: the binary reads files and writes
//! output.

#![warn(missing_docs)]

pub mod analysis;
pub mod bringup;
pub mod budget;
pub mod diagram;
pub mod graph;
pub mod model;
pub mod report;
pub mod rules;
pub mod safety;
pub mod scenario;
mod spelling;
pub mod starter;
pub mod sweep;
pub mod syntax;
pub mod units;
pub mod wire;
pub mod wirelist;

use analysis::Analysis;
use graph::Circuit;
use model::{InputError, Library, Plan};
use rules::{Context, Finding};
use std::sync::Arc;
use syntax::{SourceId, Sources};

/// The largest plan (and part file) railcheck reads, in bytes: 64 MiB. A
/// generated plan of thousands of parts is a few megabytes; anything larger
/// is refused before it is read into memory.
pub const MAX_PLAN_BYTES: u64 = 64 * 1024 * 1024;

/// The largest part file railcheck reads from a `--parts` folder, in bytes:
/// 1 MiB. A part file is a few hundred bytes; a larger one is reported (only
/// if a plan uses it) without being read.
pub const MAX_PART_BYTES: u64 = 1024 * 1024;

/// The most files and folders railcheck looks at in a `--parts` folder, and
/// how deep it goes: a folder beyond either is refused with a message.
pub const MAX_PARTS_ENTRIES: usize = 10_000;
/// How many folders deep railcheck walks a `--parts` folder.
pub const MAX_PARTS_DEPTH: usize = 16;

/// A plan that was read and checked.
#[derive(Debug)]
pub struct Checked {
    /// Every text read: the plan and the library part files it uses, for
    /// turning spans into lines and snippets.
    pub sources: Sources,
    /// The plan's own text among [`Checked::sources`].
    pub plan_source: SourceId,
    /// The plan as read.
    pub plan: Plan,
    /// The plan's graph: nodes, power flow, grounds.
    pub circuit: Circuit,
    /// `None` when shorts or power loops made the operating point meaningless.
    pub analysis: Option<Analysis>,
    /// Normal running and every other power scenario, with what each powers.
    pub scenarios: scenario::Scenarios,
    /// Every problem found, sorted by place in the plan, then severity and rule.
    pub findings: Vec<Finding>,
    /// The tightest comparison the rules made against each kind of rating
    /// or limit, tightest first (empty without an operating point).
    pub margins: Vec<rules::Margin>,
}

/// A plan that could not be read: every input problem found.
///
/// Each error points at the exact place of the mistake; [`Sources::line_column`]
/// turns it into the line and column the user is shown.
///
/// ```
/// use railcheck::model::Library;
///
/// // A greenhouse fan whose pin gives a current where a voltage range belongs.
/// let plan = "\
/// railcheck: 1
/// parts:
///   pack: { use: battery/lipo-3s }
///   fan:
///     class: load
///     pins:
///       vin: { role: supply-in, range: 2 A, draw: 0.3 A }
///       gnd: { role: ground }
/// nets:
///   BATT+: [pack.pos, fan.vin]
///   GND: [pack.neg, fan.gnd]
/// ";
/// let failure = railcheck::check("fan.yaml", plan, &Library::builtin()).unwrap_err();
/// assert_eq!(failure.errors.len(), 1);
/// let error = &failure.errors[0];
/// // Line 7, the `A` of `2 A`: column 40.
/// assert_eq!(failure.sources.line_column(error.span), (7, 40));
/// assert_eq!(&plan[error.span.start..error.span.end], "A");
/// assert!(error.hint.is_some());
/// ```
#[derive(Debug)]
pub struct InputFailure {
    /// The texts read before the failure, for turning spans into lines.
    pub sources: Sources,
    /// The plan's own text among [`InputFailure::sources`].
    pub plan_source: SourceId,
    /// Every input problem, in the order found; never empty.
    pub errors: Vec<InputError>,
}

/// Turns a file's bytes into text; a file that is not UTF-8 is an input
/// problem at the first bad byte. UTF-16 and UTF-32 (by their byte-order
/// mark, or UTF-16 without one by its NUL bytes between ASCII letters) are
/// named as such at line 1; a UTF-8 byte-order mark is dropped.
pub fn decode(file_name: &str, mut bytes: Vec<u8>) -> Result<String, InputFailure> {
    if let Some(encoding) = wide_encoding(&bytes) {
        let mut sources = Sources::default();
        let plan_source = sources.add(file_name, "");
        return Err(InputFailure {
            sources,
            plan_source,
            errors: vec![InputError {
                message: format!("the file is {encoding} text, not UTF-8"),
                span: syntax::Span::new(plan_source, 0, 0),
                hint: Some(
                    "save the plan as UTF-8 (most editors offer it under \"encoding\")".into(),
                ),
            }],
        });
    }
    if bytes.starts_with(&[0xEF, 0xBB, 0xBF]) {
        bytes.drain(..3);
    }
    String::from_utf8(bytes).map_err(|e| {
        let at = e.utf8_error().valid_up_to();
        let mut sources = Sources::default();
        let text = String::from_utf8_lossy(e.as_bytes()).into_owned();
        let plan_source = sources.add(file_name, text);
        InputFailure {
            sources,
            plan_source,
            errors: vec![InputError {
                message: "the file is not UTF-8 text".into(),
                span: syntax::Span::new(plan_source, at, at + '\u{FFFD}'.len_utf8()),
                hint: Some(
                    "save the plan as UTF-8 (most editors offer it under \"encoding\")".into(),
                ),
            }],
        }
    })
}

/// The name of a wide Unicode encoding the bytes are in, if they are: by
/// the byte-order mark (Unicode §23.8), or for UTF-16 without one by NUL
/// bytes in every other position of the first characters (ASCII text in
/// UTF-16 has a zero high byte).
fn wide_encoding(bytes: &[u8]) -> Option<&'static str> {
    match bytes {
        [0x00, 0x00, 0xFE, 0xFF, ..] => return Some("UTF-32 (big-endian)"),
        [0xFF, 0xFE, 0x00, 0x00, ..] => return Some("UTF-32 (little-endian)"),
        [0xFE, 0xFF, ..] => return Some("UTF-16 (big-endian)"),
        [0xFF, 0xFE, ..] => return Some("UTF-16 (little-endian)"),
        _ => {}
    }
    let head = &bytes[..bytes.len().min(64) & !1];
    if head.len() < 4 {
        return None;
    }
    let zero_at = |parity: usize| {
        head.iter()
            .enumerate()
            .filter(|(i, b)| i % 2 == parity && **b == 0)
            .count()
    };
    let (even, odd, half) = (zero_at(0), zero_at(1), head.len() / 2);
    if odd * 4 >= half * 3 && even == 0 {
        Some("UTF-16 (little-endian)")
    } else if even * 4 >= half * 3 && odd == 0 {
        Some("UTF-16 (big-endian)")
    } else {
        None
    }
}

/// Reads a plan from text, without checking it.
///
/// `file_name` is the name reports show for the text. Parts named with `use:`
/// come from `library`. Returns the texts read, the plan's id among them and
/// the plan; fails with every input problem found (bad YAML stops at the first).
///
/// ```
/// use railcheck::model::{Class, Library};
/// use uom::si::electric_charge::ampere_hour;
///
/// let plan = "\
/// railcheck: 1
/// parts:
///   pack: { use: battery/lipo-3s, with: { capacity: 2200 mAh } }
///   lamp:
///     class: load
///     pins:
///       vin: { role: supply-in, range: 10 V..13 V, draw: 0.4 A }
///       gnd: { role: ground }
/// nets:
///   BATT+: [pack.pos, lamp.vin]
///   GND: [pack.neg, lamp.gnd]
/// ";
/// let (_sources, _id, plan) = railcheck::read("lamp.yaml", plan, &Library::builtin()).unwrap();
/// assert_eq!(plan.parts.len(), 2);
/// let Class::Battery(pack) = &plan.parts[0].class else { panic!("pack is a battery") };
/// assert_eq!(pack.cells, Some(3));
/// // `with:` lays 2200 mAh over the library's capacity: 2.2 Ah.
/// assert!((pack.capacity.unwrap().value.get::<ampere_hour>() - 2.2).abs() < 1e-9);
/// assert_eq!(plan.nets[0].name, "BATT+");
/// ```
pub fn read(
    file_name: &str,
    text: &str,
    library: &Library,
) -> Result<(Sources, SourceId, Plan), InputFailure> {
    read_tree(file_name, Arc::from(text), None, library)
}

/// [`read`] a text the caller hands over: the sources keep it as it is,
/// without a copy of their own.
pub fn read_shared(
    file_name: &str,
    text: Arc<str>,
    library: &Library,
) -> Result<(Sources, SourceId, Plan), InputFailure> {
    read_tree(file_name, text, None, library)
}

/// [`read`] with the plan's tree already parsed (its spans in the first
/// source, the plan's); `None` parses `text`.
fn read_tree(
    file_name: &str,
    text: Arc<str>,
    tree: Option<syntax::Node>,
    library: &Library,
) -> Result<(Sources, SourceId, Plan), InputFailure> {
    let mut sources = Sources::default();
    let plan_source = sources.add(file_name, Arc::clone(&text));
    let parsed = match tree {
        Some(tree) => Ok(tree),
        None => syntax::parse(plan_source, &text),
    };
    let root = match parsed {
        Ok(root) => root,
        Err(e) => {
            let too_large = e.is_size_limit();
            return Err(InputFailure {
                sources,
                plan_source,
                errors: vec![InputError {
                    message: e.message,
                    span: e.span,
                    hint: Some(if too_large {
                        "split the machine into plans of its separate power domains, or write \
                         out in full the parts that aliases (`*name`) repeat"
                            .into()
                    } else {
                        "fix the YAML syntax here; nothing after it was read".into()
                    }),
                }],
            });
        }
    };
    match model::read_plan(root, library, &mut sources) {
        Ok(plan) => Ok((sources, plan_source, plan)),
        Err(errors) => Err(InputFailure {
            sources,
            plan_source,
            errors,
        }),
    }
}

/// Reads and checks a plan: the main job.
///
/// Builds the plan's graph, solves its operating points (unless shorts or
/// power loops make them meaningless) and runs every rule. Fails only when the
/// plan cannot be read ([`InputFailure`]); problems in a plan that reads are
/// [`Finding`]s.
///
/// ```
/// use railcheck::model::Library;
///
/// // A lab bench logger: an IMU rated 4 V at most put on the 5 V rail.
/// let plan = "\
/// railcheck: 1
/// name: Bench logger
/// parts:
///   pack: { use: battery/lipo-3s }
///   buck: { use: regulator/buck-5v-3a }
///   imu: { use: sensor/imu-3v3 }
/// nets:
///   BATT+: [pack.pos, buck.vin]
///   5V: [buck.vout, imu.vcc]
///   GND: [pack.neg, buck.gnd, imu.gnd]
/// ";
/// let checked = railcheck::check("logger.yaml", plan, &Library::builtin()).unwrap();
/// assert!(checked.analysis.is_some());
/// let over = checked
///     .findings
///     .iter()
///     .find(|f| f.rule == "voltage/over-max")
///     .expect("the 5 V rail is over the IMU's 4 V");
/// assert_eq!(over.parts, ["imu"]);
/// // The buck is `5 V ±2%`: at the top of its tolerance 5 V + 2 % = 5.1 V.
/// assert!((over.values["voltage"] - 5.1).abs() < 1e-9);
/// assert!((over.values["max"] - 4.0).abs() < 1e-9);
/// // No fuse between the pack and the buck is an error of its own.
/// assert!(checked.findings.iter().any(|f| f.rule == "fuse/missing"));
/// ```
pub fn check(file_name: &str, text: &str, library: &Library) -> Result<Checked, InputFailure> {
    check_shared(file_name, Arc::from(text), library)
}

/// [`check`] a text the caller hands over: it is kept once, among the
/// [`Checked::sources`], rather than copied while the caller holds its own.
pub fn check_shared(
    file_name: &str,
    text: Arc<str>,
    library: &Library,
) -> Result<Checked, InputFailure> {
    check_tree(file_name, text, None, library)
}

/// [`check`] of a plan whose tree is already parsed: `tree` must be what
/// `syntax::parse(SourceId(0), text)` gives (a sweep builds it from the
/// base plan's tree and the few entries a variant changes).
pub(crate) fn check_tree(
    file_name: &str,
    text: Arc<str>,
    tree: Option<syntax::Node>,
    library: &Library,
) -> Result<Checked, InputFailure> {
    let (sources, plan_source, plan) = read_tree(file_name, text, tree, library)?;
    let circuit = Circuit::build(&plan);
    // Shorts and loops are decided on the graph first; with either, there is
    // no meaningful operating point to solve.
    let scenarios = scenario::Scenarios::solve(&plan, &circuit);
    let topology = Context {
        plan: &plan,
        circuit: &circuit,
        analysis: None,
        scenarios: Some(&scenarios),
        margins: None,
        worked: Default::default(),
    };
    // Only the two rules that decide it run here; every rule runs below.
    let mut topology_findings = Vec::new();
    for id in ["power/short", "power/loop"] {
        if let Some(rule) = rules::rule(id) {
            (rule.check)(&topology, &mut topology_findings);
        }
    }
    let blocking = topology_findings
        .iter()
        .any(|f| f.rule == "power/short" || f.rule == "power/loop");
    let analysis = (!blocking).then(|| Analysis::solve(&plan, &circuit));
    let margins = rules::Margins::default();
    let findings = rules::run(&Context {
        plan: &plan,
        circuit: &circuit,
        analysis: analysis.as_ref(),
        scenarios: Some(&scenarios),
        margins: Some(&margins),
        worked: Default::default(),
    });
    Ok(Checked {
        sources,
        plan_source,
        plan,
        circuit,
        analysis,
        scenarios,
        findings,
        margins: margins.into_sorted(),
    })
}
