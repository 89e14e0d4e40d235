//! The tables of the format reference (`docs/format.md`), written from the
//! format's declaration and the rule catalogue, so the reference cannot
//! drift from what the reader takes and the rules check. A test fills each
//! `<!-- generated: NAME -->` block of the reference with the table of that
//! name and fails when the committed text is stale.

use crate::model::format::{self, CLASSES, ClassSpec, Field, ROLES, Required, Section, Value};
use crate::rules::Rule;

/// Every generated table, by the name its block carries in the reference.
pub fn format_tables(rules: &[Rule]) -> Vec<(String, String)> {
    let mut tables = vec![
        ("top-level".to_string(), fields_table(format::TOP_LEVEL)),
        ("limits".to_string(), fields_table(format::LIMITS)),
        ("net".to_string(), fields_table(format::NET)),
        ("part-fields".to_string(), fields_table(format::PART_FIELDS)),
        ("link".to_string(), fields_table(format::LINK)),
        ("supply".to_string(), fields_table(format::SUPPLY)),
        ("scenario".to_string(), fields_table(format::SCENARIO)),
        ("port usb-host".to_string(), fields_table(format::USB_HOST)),
        (
            "port usb-device".to_string(),
            fields_table(format::USB_DEVICE),
        ),
        ("draw".to_string(), fields_table(format::DRAW)),
        ("pin-roles".to_string(), roles_table()),
        ("pin-fields".to_string(), pin_fields_table()),
        ("mode-states".to_string(), states_table()),
        ("mode".to_string(), fields_table(format::MODE)),
        ("rules".to_string(), rules_table(rules)),
    ];
    for class in CLASSES {
        tables.push((format!("class {}", class.name), class_table(class)));
    }
    tables
}

/// What a key takes, in a few words.
pub fn describe(value: Value) -> String {
    match value {
        Value::Quantity(q) => q.name().to_string(),
        Value::Choice(words) => format!("one of {}", code_list(words)),
        Value::Flag => "`true` or `false`".into(),
        Value::Cells => "whole number, 1 to 1000".into(),
        Value::Count => "whole number, 0 to 1000".into(),
        Value::Version => "`1`".into(),
        Value::Amount => "plain number, 0 or more".into(),
        Value::Text => "text".into(),
        Value::PinOfPart => "a pin of the same part".into(),
        Value::Draw => "current, or `{ idle, typical, peak }`".into(),
        Value::Channels => "`{ number: [pin, pin] }`".into(),
        Value::Pins => "pins by name".into(),
        Value::Ports => "ports by name".into(),
        Value::PinList => "list of `part.pin`".into(),
        Value::PortPair => "two ports `part.port`".into(),
        Value::Port => "a port `part.port`".into(),
        Value::NetName => "a net's name".into(),
        Value::NameList => "list of names".into(),
        Value::PartId => "library part id".into(),
        Value::Overrides => "field values".into(),
        Value::Section(Section::Links) => "list".into(),
        Value::Section(_) => "mapping".into(),
    }
}

fn code_list(words: &[&str]) -> String {
    words
        .iter()
        .map(|w| format!("`{w}`"))
        .collect::<Vec<_>>()
        .join(", ")
}

/// A table cell: pipes would end the cell early.
fn cell(text: &str) -> String {
    text.replace('|', "\\|")
}

fn default_cell(field: &Field) -> String {
    match (field.required, field.default) {
        (Required::Yes, _) => "**required**".into(),
        (Required::Unless(other), _) => format!("**required** unless `{other}` is given"),
        (Required::No, Some(default)) => format!("`{default}`"),
        (Required::No, None) => "—".into(),
    }
}

fn fields_table(fields: &[Field]) -> String {
    let mut table =
        String::from("| key | takes | default | example | meaning |\n|---|---|---|---|---|\n");
    for field in fields {
        table.push_str(&format!(
            "| `{}` | {} | {} | `{}` | {} |\n",
            field.key,
            cell(&describe(field.value)),
            cell(&default_cell(field)),
            cell(field.example),
            cell(field.meaning),
        ));
    }
    table
}

fn roles_table() -> String {
    let mut table = String::from("| role | keys besides `role` | meaning |\n|---|---|---|\n");
    for role in ROLES {
        let keys = if role.keys.is_empty() {
            "—".to_string()
        } else {
            code_list(role.keys)
        };
        table.push_str(&format!(
            "| `{}` | {} | {} |\n",
            role.name,
            keys,
            cell(role.meaning)
        ));
    }
    table
}

fn pin_fields_table() -> String {
    let mut table =
        String::from("| key | takes | on roles | example | meaning |\n|---|---|---|---|---|\n");
    for field in format::PIN_FIELDS {
        let roles: Vec<&str> = if field.key == "role" {
            vec!["every pin"]
        } else {
            ROLES
                .iter()
                .filter(|r| r.keys.contains(&field.key))
                .map(|r| r.name)
                .collect()
        };
        let roles = if field.key == "role" {
            roles.join(", ")
        } else {
            code_list(&roles)
        };
        table.push_str(&format!(
            "| `{}` | {} | {} | `{}` | {} |\n",
            field.key,
            cell(&describe(field.value)),
            roles,
            cell(field.example),
            cell(field.meaning),
        ));
    }
    table
}

fn states_table() -> String {
    let mut table = String::from("| class | state | meaning |\n|---|---|---|\n");
    for state in format::MOTOR_STATES {
        table.push_str(&format!(
            "| `motor` | `{}` | {} |\n",
            state.name,
            cell(state.meaning)
        ));
    }
    for state in format::LOAD_STATES {
        table.push_str(&format!(
            "| every other class | `{}` | {} |\n",
            state.name,
            cell(state.meaning)
        ));
    }
    table
}

fn class_table(class: &ClassSpec) -> String {
    let mut text = format!("`{}`: {}.\n\n", class.name, class.meaning);
    if class.fixed_pins.is_empty() {
        text.push_str("Pins: none fixed; declare every pin under `pins:`.\n");
    } else {
        let pins: Vec<String> = class
            .fixed_pins
            .iter()
            .map(|(name, role)| format!("`{name}` ({})", role.name()))
            .collect();
        text.push_str(&format!(
            "Pins it always has: {}; a `pins:` entry may override their fields.\n",
            pins.join(", ")
        ));
    }
    if class.fields.is_empty() {
        text.push_str("\nFields: none besides `pins` (and `ports`).\n");
    } else {
        text.push('\n');
        text.push_str(&fields_table(class.fields));
    }
    text
}

fn rules_table(rules: &[Rule]) -> String {
    let mut table = String::from("| id | severity | fires when |\n|---|---|---|\n");
    for rule in rules {
        table.push_str(&format!(
            "| `{}` | {} | {} |\n",
            rule.id,
            rule.severity.name(),
            cell(rule.summary)
        ));
    }
    table
}

/// The reference text with every generated block filled with its table.
/// Names a block that has no table, or a table that has no block, as an
/// error.
pub fn fill_generated_blocks(text: &str, tables: &[(String, String)]) -> Result<String, String> {
    const OPEN: &str = "<!-- generated: ";
    const CLOSE: &str = "<!-- /generated -->";
    let mut out = String::with_capacity(text.len());
    let mut rest = text;
    let mut used = Vec::new();
    while let Some(start) = rest.find(OPEN) {
        let header_end = rest[start..]
            .find("-->")
            .map(|i| start + i + 3)
            .ok_or("an unterminated generated marker")?;
        let name = rest[start + OPEN.len()..header_end - 3].trim();
        let close = rest[header_end..]
            .find(CLOSE)
            .map(|i| header_end + i)
            .ok_or_else(|| format!("block `{name}` has no `{CLOSE}`"))?;
        let table = tables
            .iter()
            .find(|(n, _)| n == name)
            .map(|(_, t)| t)
            .ok_or_else(|| format!("no generated table is named `{name}`"))?;
        used.push(name.to_string());
        out.push_str(&rest[..header_end]);
        out.push('\n');
        out.push_str(table);
        out.push_str(CLOSE);
        rest = &rest[close + CLOSE.len()..];
    }
    out.push_str(rest);
    if let Some((missing, _)) = tables.iter().find(|(n, _)| !used.contains(n)) {
        return Err(format!("the table `{missing}` has no generated block"));
    }
    Ok(out)
}
