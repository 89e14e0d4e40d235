//! Logic levels between drivers and receivers (JEDEC JESD8 families).
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

pub const OVERVOLTAGE: Rule = Rule {
    id: "logic/overvoltage",
    severity: Severity::Error,
    summary: "a driver's high level exceeds a receiver's absolute maximum input",
    doc: TODO_DOC,
    needs_operating_point: true,
    check: not_yet,
};

pub const HIGH_MARGIN: Rule = Rule {
    id: "logic/high-margin",
    severity: Severity::Error,
    summary: "driver's minimum high level below receiver's high threshold",
    doc: TODO_DOC,
    needs_operating_point: true,
    check: not_yet,
};

pub const LOW_MARGIN: Rule = Rule {
    id: "logic/low-margin",
    severity: Severity::Error,
    summary: "driver's maximum low level above receiver's low threshold",
    doc: TODO_DOC,
    needs_operating_point: true,
    check: not_yet,
};

pub const CONTENTION: Rule = Rule {
    id: "logic/contention",
    severity: Severity::Error,
    summary: "two push-pull outputs on one net",
    doc: TODO_DOC,
    needs_operating_point: true,
    check: not_yet,
};

pub const UNDRIVEN: Rule = Rule {
    id: "logic/undriven",
    severity: Severity::Warning,
    summary: "an input on a net with no output and no pull resistor",
    doc: TODO_DOC,
    needs_operating_point: true,
    check: not_yet,
};
