//! Wires: current against ampacity, supply-plus-return voltage drop.
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

pub const AMPACITY: Rule = Rule {
    id: "wire/ampacity",
    severity: Severity::Error,
    summary: "a net's current exceeds its wire's ampacity",
    doc: TODO_DOC,
    needs_operating_point: true,
    check: not_yet,
};

pub const DROP: Rule = Rule {
    id: "wire/drop",
    severity: Severity::Warning,
    summary: "supply-plus-return drop above limits.wire_drop",
    doc: TODO_DOC,
    needs_operating_point: true,
    check: not_yet,
};
