//! railcheck: checks a robot's wiring plan before first power-on.
//!
//! The data flows through the modules in order: `syntax` (YAML with spans) →
//! `units` (quantities) → `model` (typed plan, parts library) → `graph`
//! (nodes, power flow, grounds) → `analysis` (operating point per mode and
//! battery state) → `rules` (findings) → `report` (terminal, JSON). The
//! library does no I/O and never prints: the binary reads files and writes
//! output.

pub mod analysis;
pub mod budget;
pub mod diagram;
pub mod graph;
pub mod model;
pub mod report;
pub mod rules;
pub mod safety;
mod spelling;
pub mod starter;
pub mod syntax;
pub mod units;
pub mod wire;

use analysis::Analysis;
use graph::Circuit;
use model::{InputError, Library, Plan};
use rules::{Context, Finding};
use syntax::{SourceId, Sources};

/// The largest plan (and part file) railcheck reads, in bytes: 64 MiB. A
/// generated plan of thousands of parts is a few megabytes; anything larger
/// is refused before it is read into memory.
pub const MAX_PLAN_BYTES: u64 = 64 * 1024 * 1024;

/// A plan that was read and checked.
#[derive(Debug)]
pub struct Checked {
    pub sources: Sources,
    pub plan_source: SourceId,
    pub plan: Plan,
    pub circuit: Circuit,
    /// `None` when shorts or power loops made the operating point meaningless.
    pub analysis: Option<Analysis>,
    pub findings: Vec<Finding>,
}

/// A plan that could not be read: every input problem found.
#[derive(Debug)]
pub struct InputFailure {
    pub sources: Sources,
    pub plan_source: SourceId,
    pub errors: Vec<InputError>,
}

/// Turns a file's bytes into text; a file that is not UTF-8 is an input
/// problem at the first bad byte.
pub fn decode(file_name: &str, bytes: Vec<u8>) -> Result<String, InputFailure> {
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

/// Reads a plan from text, without checking it.
pub fn read(
    file_name: &str,
    text: &str,
    library: &Library,
) -> Result<(Sources, SourceId, Plan), InputFailure> {
    let mut sources = Sources::default();
    let plan_source = sources.add(file_name, text);
    let root = match syntax::parse(plan_source, text) {
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
    match model::read_plan(&root, library, &mut sources) {
        Ok(plan) => Ok((sources, plan_source, plan)),
        Err(errors) => Err(InputFailure {
            sources,
            plan_source,
            errors,
        }),
    }
}

/// Reads and checks a plan: the main job.
pub fn check(file_name: &str, text: &str, library: &Library) -> Result<Checked, InputFailure> {
    let (sources, plan_source, plan) = read(file_name, text, library)?;
    let circuit = Circuit::build(&plan);
    // Shorts and loops are decided on the graph first; with either, there is
    // no meaningful operating point to solve.
    let topology = Context {
        plan: &plan,
        circuit: &circuit,
        analysis: None,
    };
    let blocking = rules::run(&topology)
        .iter()
        .any(|f| f.rule == "power/short" || f.rule == "power/loop");
    let analysis = (!blocking).then(|| Analysis::solve(&plan, &circuit));
    let findings = rules::run(&Context {
        plan: &plan,
        circuit: &circuit,
        analysis: analysis.as_ref(),
    });
    Ok(Checked {
        sources,
        plan_source,
        plan,
        circuit,
        analysis,
        findings,
    })
}
