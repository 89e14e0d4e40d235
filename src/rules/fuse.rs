//! Fuses: presence at the battery, size against load and wire, voltage rating, nuisance blowing.
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

pub const MISSING: Rule = Rule {
    id: "fuse/missing",
    severity: Severity::Error,
    summary: "no fuse between the battery positive and the first load or branch",
    doc: TODO_DOC,
    needs_operating_point: true,
    check: not_yet,
};

pub const UNDERSIZED: Rule = Rule {
    id: "fuse/undersized",
    severity: Severity::Warning,
    summary: "rating below 125 % of the continuous current through it",
    doc: TODO_DOC,
    needs_operating_point: true,
    check: not_yet,
};

pub const OVERSIZED: Rule = Rule {
    id: "fuse/oversized",
    severity: Severity::Error,
    summary: "rating above the ampacity of a wire it protects",
    doc: TODO_DOC,
    needs_operating_point: true,
    check: not_yet,
};

pub const VOLTAGE: Rule = Rule {
    id: "fuse/voltage",
    severity: Severity::Error,
    summary: "fuse voltage rating below the battery's full voltage",
    doc: TODO_DOC,
    needs_operating_point: true,
    check: not_yet,
};

pub const NUISANCE: Rule = Rule {
    id: "fuse/nuisance",
    severity: Severity::Warning,
    summary: "a fast fuse rated below the peak (stall) current it carries",
    doc: TODO_DOC,
    needs_operating_point: true,
    check: not_yet,
};
