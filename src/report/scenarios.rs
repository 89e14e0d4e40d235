//! The power scenarios of a plan (`railcheck scenarios`): for each, what is
//! connected, removed and open, which rails lose power and which parts go
//! off, as a terminal listing or a JSON document (`kind: "scenarios"`).

use super::json::{Envelope, Kind};
use crate::Checked;
use crate::scenario::{Origin, Powered};
use serde::Serialize;

/// One scenario, by name, as the listing and the JSON show it.
struct Summary {
    label: String,
    origin: &'static str,
    connected: Vec<String>,
    removed: Vec<String>,
    open: Vec<String>,
    rails_off: Vec<String>,
    rails_on: Vec<String>,
    parts_off: Vec<String>,
    parts_on: Vec<String>,
}

fn summaries(checked: &Checked) -> Vec<Summary> {
    let plan = &checked.plan;
    let part = |p: &usize| plan.parts[*p].name.clone();
    let net = |n: &usize| plan.nets[*n].name.clone();
    checked
        .scenarios
        .iter()
        .map(|powered: Powered| {
            let scenario = powered.scenario;
            let changed = powered.changed_parts();
            Summary {
                label: scenario.label.clone(),
                origin: match scenario.origin {
                    Origin::Declared(_) => "declared",
                    Origin::SwitchOpen(_) => "switch-open",
                    Origin::Connected(_) => "connected",
                    Origin::Alone(_) => "connected-alone",
                },
                connected: scenario
                    .connected
                    .iter()
                    .map(|&s| plan.supplies[s].name.clone())
                    .collect(),
                removed: scenario.removed.iter().map(part).collect(),
                open: scenario.open.iter().map(part).collect(),
                rails_off: powered.nets_turned_off().iter().map(net).collect(),
                rails_on: powered.nets_turned_on().iter().map(net).collect(),
                parts_off: changed
                    .iter()
                    .filter(|&&p| !powered.part_on(p))
                    .map(part)
                    .collect(),
                parts_on: changed
                    .iter()
                    .filter(|&&p| powered.part_on(p))
                    .map(part)
                    .collect(),
            }
        })
        .collect()
}

fn listed(names: &[String]) -> String {
    if names.is_empty() {
        "none".to_string()
    } else {
        names.join(", ")
    }
}

/// The scenarios as text for a terminal: one block per scenario.
pub fn scenarios_table(file: &str, checked: &Checked) -> String {
    let title = checked.plan.name.as_deref().unwrap_or(file);
    let mut text = format!(
        "Power scenarios of {title}\n\nNormal running: every battery in, every switch closed, no supply from outside\nconnected. Each scenario below is compared with it.\n"
    );
    let all = summaries(checked);
    if all.is_empty() {
        text.push_str("\nThe plan has no switch and no supply from outside: normal running is its only scenario.\n");
    }
    for s in &all {
        text.push_str(&format!("\n{}\n", s.label));
        let mut setting = Vec::new();
        if !s.connected.is_empty() {
            setting.push(format!("connected: {}", s.connected.join(", ")));
        }
        if !s.removed.is_empty() {
            setting.push(format!("removed: {}", s.removed.join(", ")));
        }
        if !s.open.is_empty() {
            setting.push(format!("open: {}", s.open.join(", ")));
        }
        text.push_str(&format!("  {}\n", setting.join("; ")));
        text.push_str(&format!("  nets without power: {}\n", listed(&s.rails_off)));
        if !s.rails_on.is_empty() {
            text.push_str(&format!(
                "  nets with power only here: {}\n",
                s.rails_on.join(", ")
            ));
        }
        text.push_str(&format!("  parts off: {}\n", listed(&s.parts_off)));
        if !s.parts_on.is_empty() {
            text.push_str(&format!(
                "  parts on only here: {}\n",
                s.parts_on.join(", ")
            ));
        }
    }
    text
}

#[derive(Serialize)]
struct ScenariosBody<'a> {
    scenarios: Vec<ScenarioItem<'a>>,
}

#[derive(Serialize)]
struct ScenarioItem<'a> {
    label: &'a str,
    origin: &'a str,
    connected: &'a [String],
    removed: &'a [String],
    open: &'a [String],
    nets_without_power: &'a [String],
    nets_with_power_only_here: &'a [String],
    parts_off: &'a [String],
    parts_on_only_here: &'a [String],
}

/// The scenarios as a JSON document (`"kind": "scenarios"`).
pub fn scenarios_json(file: &str, checked: &Checked) -> String {
    let all = summaries(checked);
    let body = ScenariosBody {
        scenarios: all
            .iter()
            .map(|s| ScenarioItem {
                label: &s.label,
                origin: s.origin,
                connected: &s.connected,
                removed: &s.removed,
                open: &s.open,
                nets_without_power: &s.rails_off,
                nets_with_power_only_here: &s.rails_on,
                parts_off: &s.parts_off,
                parts_on_only_here: &s.parts_on,
            })
            .collect(),
    };
    Envelope::new(Kind::Scenarios, file, body).to_text()
}
