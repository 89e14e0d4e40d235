//! One-line summaries for `--quiet`: what a script or a shell prompt needs to
//! know about a plan without the full report.
//!
//! Not a format of its own: the lines repeat the full report's summary words,
//! and the safety cautions are never dropped silently (the line says how many
//! apply and how to see them).

use super::Summary;
use crate::budget::Budget;
use crate::rules::Finding;
use crate::units::show_current;
use uom::si::time::hour;

/// `plan.yaml: 2 errors, 1 warning, 0 notes (5 cautions: run without --quiet)`.
pub fn quiet_findings(plan_name: &str, findings: &[Finding], cautions: &[&str]) -> String {
    let summary = Summary::of(findings).line();
    match cautions.len() {
        0 => format!("{plan_name}: {summary}\n"),
        n => format!(
            "{plan_name}: {summary} ({n} safety caution{} before power-on: run without --quiet)\n",
            if n == 1 { "" } else { "s" }
        ),
    }
}

/// One line per battery: its peak current against its rating and the
/// runtime; or why there is no budget.
pub fn quiet_budget(plan_name: &str, budget: &Budget) -> String {
    if !budget.solved {
        return format!("{plan_name}: no budget (the operating point could not be solved)\n");
    }
    if budget.batteries.is_empty() {
        return format!("{plan_name}: no battery\n");
    }
    let mut out = String::new();
    for battery in &budget.batteries {
        let rating = battery
            .max_discharge
            .map_or(String::new(), |max| format!(" of {}", show_current(max)));
        let runtime = battery.runtime.as_ref().map_or(String::new(), |r| {
            format!(", runtime {:.2} h", r.time.get::<hour>())
        });
        out.push_str(&format!(
            "{plan_name}: {} ({}) typical {}, peak {}{rating}{runtime}\n",
            battery.name,
            battery.pack,
            show_current(battery.typical_current),
            show_current(battery.peak_current),
        ));
    }
    out
}
