//! The rule catalogue as text: a list, and one rule explained, both written
//! from the rule's own documentation.

use crate::rules::Rule;

/// The catalogue, one rule a line: id, severity and summary (`railcheck rules`).
pub fn rule_list(rules: &[Rule]) -> String {
    let width = rules.iter().map(|r| r.id.len()).max().unwrap_or(0);
    let mut out = String::new();
    for rule in rules {
        out.push_str(&format!(
            "{:width$}  {:7}  {}\n",
            rule.id,
            rule.severity.name(),
            rule.summary
        ));
    }
    out.push_str("\n`railcheck rules <id>` explains one.\n");
    out
}

fn indent(text: &str) -> String {
    text.lines().map(|l| format!("    {l}\n")).collect()
}

/// One rule explained in full from its documentation: what it checks, why it
/// matters, an example, the fix and its references (`railcheck rules <id>`).
pub fn rule_explanation(rule: &Rule) -> String {
    let doc = &rule.doc;
    format!(
        "{} ({})\n{}\n\nWhat it checks\n{}\nWhy it matters\n{}\nExample\n{}\nFix\n{}\nReferences\n{}",
        rule.id,
        rule.severity.name(),
        rule.summary,
        indent(doc.what),
        indent(doc.why),
        indent(doc.example),
        indent(doc.fix),
        indent(doc.references)
    )
}
