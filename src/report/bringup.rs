//! The bring-up procedure as terminal text, Markdown (a checklist to print
//! or keep with the build notes) or a JSON document (`kind: "bringup"`).

use super::json::{Envelope, Kind, Rounded};
use super::notes::markdown_escaped;
use crate::bringup::{Figure, Procedure};
use serde::Serialize;
use std::collections::BTreeMap;
use uom::si::electric_current::ampere;
use uom::si::electric_potential::volt;
use uom::si::electrical_resistance::ohm;

/// The procedure as numbered terminal text.
pub fn bringup_text(file: &str, procedure: &Procedure) -> String {
    let mut out = format!("First power-on of {file}\n");
    if !procedure.solved {
        out.push_str(
            "\nNo operating point: the plan has a short circuit or a power loop (`railcheck check` shows where); fix it first. Only the checks before power follow.\n",
        );
    }
    for (number, stage) in procedure.stages.iter().enumerate() {
        out.push_str(&format!("\n{}. {}\n", number + 1, stage.title));
        for (i, step) in stage.steps.iter().enumerate() {
            let lines = textwrap::wrap(&step.text, 88);
            for (j, line) in lines.iter().enumerate() {
                if j == 0 {
                    out.push_str(&format!("  {}.{} {line}\n", number + 1, i + 1));
                } else {
                    out.push_str(&format!("       {line}\n"));
                }
            }
        }
    }
    out
}

/// The procedure as a Markdown checklist.
pub fn bringup_markdown(file: &str, procedure: &Procedure) -> String {
    let mut out = format!("# First power-on of {}\n", markdown_escaped(file));
    if !procedure.solved {
        out.push_str("\nNo operating point: the plan has a short circuit or a power loop; fix it first. Only the checks before power follow.\n");
    }
    for (number, stage) in procedure.stages.iter().enumerate() {
        out.push_str(&format!("\n## {}. {}\n\n", number + 1, stage.title));
        for step in &stage.steps {
            out.push_str(&format!("- [ ] {}\n", markdown_escaped(&step.text)));
        }
    }
    out
}

#[derive(Serialize)]
struct StepItem<'a> {
    text: &'a str,
    values: BTreeMap<&'static str, Rounded>,
    units: BTreeMap<&'static str, &'static str>,
}

#[derive(Serialize)]
struct StageItem<'a> {
    title: &'static str,
    steps: Vec<StepItem<'a>>,
}

#[derive(Serialize)]
struct BringupBody<'a> {
    solved: bool,
    stages: Vec<StageItem<'a>>,
}

/// The procedure as one JSON document.
pub fn bringup_json(file: &str, procedure: &Procedure) -> String {
    let body = BringupBody {
        solved: procedure.solved,
        stages: procedure
            .stages
            .iter()
            .map(|stage| StageItem {
                title: stage.title,
                steps: stage
                    .steps
                    .iter()
                    .map(|step| {
                        let mut values = BTreeMap::new();
                        let mut units = BTreeMap::new();
                        for (name, figure) in &step.figures {
                            let (value, unit) = match figure {
                                Figure::Voltage(v) => (v.get::<volt>(), "V"),
                                Figure::Current(i) => (i.get::<ampere>(), "A"),
                                Figure::Resistance(r) => (r.get::<ohm>(), "ohm"),
                            };
                            values.insert(*name, Rounded(value));
                            units.insert(*name, unit);
                        }
                        StepItem {
                            text: &step.text,
                            values,
                            units,
                        }
                    })
                    .collect(),
            })
            .collect(),
    };
    Envelope::new(Kind::Bringup, file, body).to_text()
}
