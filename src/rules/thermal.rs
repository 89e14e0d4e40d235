//! Regulator heat: junction temperature against its maximum.
//!
//! STUB: rules registered, checks and documentation to be written.

use super::{Context, Finding, Rule, RuleDoc, Severity};

const TODO_DOC: RuleDoc = RuleDoc {
    what: "",
    why: "",
    example: "",
    fix: "",
    references: "",
};

fn not_yet(_: &Context, _: &mut Vec<Finding>) {}

pub const OVERHEAT: Rule = Rule {
    id: "thermal/overheat",
    severity: Severity::Error,
    summary: "regulator junction temperature above tj_max",
    doc: TODO_DOC,
    needs_operating_point: true,
    check: not_yet,
};

pub const UNRATED: Rule = Rule {
    id: "thermal/unrated",
    severity: Severity::Note,
    summary: "a regulator dissipates power but has no theta_ja",
    doc: TODO_DOC,
    needs_operating_point: true,
    check: not_yet,
};
