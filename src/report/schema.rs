//! The JSON Schema (draft 2020-12) of the plan format, generated from the
//! format's declaration (`model::format`), so editors can complete keys and
//! flag mistakes as the plan is typed.
//!
//! The schema checks the shape a plan must have: known keys, value kinds,
//! quantities written with a unit of the right kind, pin roles, mode states.
//! It cannot check what needs the whole plan (a pin named in a net exists, a
//! net's wire has its length); the reader does that with positions and hints.

use crate::model::PinRole;
use crate::model::format::{
    self, CLASSES, ClassSpec, Field, LIBRARY_PART_KEYS, ROLES, Required, Section, Value as Kind,
};
use crate::units::Quantity;
use serde_json::{Map, Value, json};

/// Letters (any script), digits, `_`, `-` and `+`, as the reader takes them
/// (format reference §1). Written without `\p{…}` classes so that every
/// regular-expression dialect an editor may use reads it.
const NAME: &str = r"[0-9A-Za-z_+\-\u00AA-\uFFFF]+";

/// A number as the quantity parser takes it: sign, digits, fraction,
/// exponent.
const NUMBER: &str = r"[+-]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]+)?";

/// The schema of a whole plan.
pub fn plan_schema() -> Value {
    let mut defs = Map::new();
    defs.insert(
        "name".into(),
        json!({ "type": "string", "pattern": format!("^{NAME}$") }),
    );
    defs.insert("draw".into(), draw());
    defs.insert("ports".into(), ports());
    defs.insert("pin".into(), pin());
    for spec in ROLES {
        defs.insert(format!("role-{}", spec.name), role_fields(spec.role));
        defs.insert(format!("fixed-pin-{}", spec.name), fixed_pin(spec.name));
    }
    defs.insert(
        format!("role-{}", PinRole::Passive.name()),
        role_fields(PinRole::Passive),
    );
    defs.insert(
        format!("fixed-pin-{}", PinRole::Passive.name()),
        fixed_pin(PinRole::Passive.name()),
    );
    defs.insert("pin-override".into(), pin_override());
    for class in CLASSES {
        defs.insert(format!("class-{}", class.name), class_schema(class));
    }
    defs.insert("inline-part".into(), inline_part());
    defs.insert("library-part".into(), library_part());
    defs.insert(
        "part".into(),
        json!({
            "type": "object",
            "if": { "required": ["use"] },
            "then": { "$ref": "#/$defs/library-part" },
            "else": { "$ref": "#/$defs/inline-part" },
        }),
    );

    let mut top = closed_object(format::TOP_LEVEL);
    top.insert(
        "$schema".into(),
        json!("https://json-schema.org/draft/2020-12/schema"),
    );
    top.insert("title".into(), json!("railcheck plan, format 1"));
    top.insert(
        "description".into(),
        json!("A robot's wiring plan for railcheck: parts, the nets joining their pins, cables, operating modes. The format reference is docs/format.md."),
    );
    top.insert("$defs".into(), Value::Object(defs));
    Value::Object(top)
}

/// The schema text as committed in `docs/plan.schema.json`.
pub fn plan_schema_text() -> String {
    let mut text = serde_json::to_string_pretty(&plan_schema()).unwrap_or_default();
    text.push('\n');
    text
}

/// An object that takes exactly these fields (and `notes:`).
fn closed_object(fields: &[Field]) -> Map<String, Value> {
    let mut properties = Map::new();
    for field in fields {
        properties.insert(field.key.into(), property(field));
    }
    properties.insert("notes".into(), notes());
    let mut object = Map::new();
    object.insert("type".into(), json!("object"));
    object.insert("properties".into(), Value::Object(properties));
    object.insert("additionalProperties".into(), json!(false));
    let required: Vec<&str> = fields
        .iter()
        .filter(|f| f.required == Required::Yes)
        .map(|f| f.key)
        .collect();
    if !required.is_empty() {
        object.insert("required".into(), json!(required));
    }
    let alternatives: Vec<Value> = fields
        .iter()
        .filter_map(|f| match f.required {
            Required::Unless(other) => {
                Some(json!({ "anyOf": [{ "required": [f.key] }, { "required": [other] }] }))
            }
            _ => None,
        })
        .collect();
    if !alternatives.is_empty() {
        object.insert("allOf".into(), Value::Array(alternatives));
    }
    object
}

fn notes() -> Value {
    json!({ "description": "free text for people; railcheck ignores it" })
}

/// One field: its value's schema with the declaration's words for editors.
fn property(field: &Field) -> Value {
    let mut schema = match value(field.value) {
        Value::Object(map) => map,
        other => {
            let mut map = Map::new();
            map.insert("allOf".into(), json!([other]));
            map
        }
    };
    let mut description = field.meaning.to_string();
    if let Some(default) = field.default {
        description.push_str(&format!(" (default: {default})"));
    }
    schema.insert("description".into(), json!(description));
    schema.insert("examples".into(), json!([example(field)]));
    Value::Object(schema)
}

/// The example as the YAML reader would hand it to an editor: numbers and
/// flags as JSON numbers and booleans, everything else as text.
fn example(field: &Field) -> Value {
    match field.value {
        Kind::Amount => field
            .example
            .parse::<f64>()
            .map_or_else(|_| json!(field.example), |n| json!(n)),
        Kind::Version | Kind::Cells | Kind::Count => field
            .example
            .parse::<u64>()
            .map_or_else(|_| json!(field.example), |n| json!(n)),
        Kind::Flag => json!(field.example == "true"),
        _ => json!(field.example),
    }
}

fn value(kind: Kind) -> Value {
    match kind {
        Kind::Quantity(q) => quantity(q),
        Kind::Choice(words) => json!({ "enum": words }),
        Kind::Flag => json!({ "type": "boolean" }),
        Kind::Cells => json!({ "type": "integer", "minimum": 1, "maximum": 1000 }),
        Kind::Count => json!({ "type": "integer", "minimum": 0, "maximum": 1000 }),
        Kind::Amount => json!({ "type": "number", "minimum": 0 }),
        Kind::Version => json!({ "const": 1 }),
        Kind::Text => json!({ "type": ["string", "number", "boolean"] }),
        Kind::PinOfPart => json!({ "$ref": "#/$defs/name" }),
        Kind::Draw => json!({ "$ref": "#/$defs/draw" }),
        Kind::Channels => json!({
            "type": "object",
            "propertyNames": { "pattern": "^[1-9][0-9]*$" },
            "additionalProperties": {
                "type": "array",
                "items": { "$ref": "#/$defs/name" },
                "minItems": 2,
                "maxItems": 2,
            },
        }),
        Kind::Pins => json!({
            "type": "object",
            "propertyNames": { "$ref": "#/$defs/name" },
            "additionalProperties": { "$ref": "#/$defs/pin" },
        }),
        Kind::Ports => json!({ "$ref": "#/$defs/ports" }),
        Kind::PinList => json!({
            "type": "array",
            "items": { "type": "string", "pattern": format!("^{NAME}\\.{NAME}$") },
        }),
        Kind::PortPair => json!({
            "type": "array",
            "items": { "type": "string", "pattern": format!("^{NAME}\\.{NAME}$") },
            "minItems": 2,
            "maxItems": 2,
        }),
        Kind::Port => json!({ "type": "string", "pattern": format!("^{NAME}\\.{NAME}$") }),
        Kind::NetName => json!({ "$ref": "#/$defs/name" }),
        Kind::NameList => json!({ "type": "array", "items": { "$ref": "#/$defs/name" } }),
        Kind::PartId => json!({ "type": "string", "pattern": "^[^/\\s]+(/[^/\\s]+)*$" }),
        Kind::Overrides => {
            // A key means one thing in every class that has it, but its
            // value's kind may differ (`voltage` is a band on a battery, a
            // rating on a fuse): any of them is taken.
            let mut properties = Map::new();
            for field in CLASSES
                .iter()
                .flat_map(|c| c.fields)
                .chain(format::PART_FIELDS)
            {
                let schema = value(field.value);
                match properties.get_mut(field.key) {
                    None => {
                        properties.insert(field.key.into(), json!({ "anyOf": [schema] }));
                    }
                    Some(existing) => {
                        if let Some(Value::Array(kinds)) = existing.get_mut("anyOf")
                            && !kinds.contains(&schema)
                        {
                            kinds.push(schema);
                        }
                    }
                }
            }
            properties.insert("notes".into(), notes());
            json!({ "type": "object", "properties": properties, "additionalProperties": false })
        }
        Kind::Section(section) => self::section(section),
    }
}

fn section(section: Section) -> Value {
    match section {
        Section::Limits => Value::Object(closed_object(format::LIMITS)),
        Section::Parts => json!({
            "type": ["object", "null"],
            "propertyNames": { "$ref": "#/$defs/name" },
            "additionalProperties": { "$ref": "#/$defs/part" },
        }),
        Section::Nets => json!({
            "type": ["object", "null"],
            "propertyNames": { "$ref": "#/$defs/name" },
            "additionalProperties": {
                "oneOf": [
                    value(Kind::PinList),
                    Value::Object(closed_object(format::NET)),
                ],
            },
        }),
        Section::Links => json!({
            "type": "array",
            "items": Value::Object(closed_object(format::LINK)),
        }),
        Section::Modes => {
            let mut states: Vec<&str> = format::LOAD_STATES
                .iter()
                .chain(format::MOTOR_STATES)
                .map(|s| s.name)
                .collect();
            states.dedup();
            json!({
                "type": ["object", "null"],
                "propertyNames": {
                    "$ref": "#/$defs/name",
                    "not": { "enum": ["typical", "worst"] },
                },
                "additionalProperties": {
                    "type": ["object", "null"],
                    "propertyNames": { "$ref": "#/$defs/name" },
                    "properties": format::MODE
                        .iter()
                        .map(|f| (f.key.to_string(), property(f)))
                        .collect::<Map<String, Value>>(),
                    "additionalProperties": { "enum": states },
                },
            })
        }
        Section::Sweep => json!({
            "type": ["object", "null"],
            "propertyNames": { "type": "string", "pattern": r"^[^.\s]+(\.[^.\s]+){0,2}$" },
            "additionalProperties": {
                "oneOf": [
                    { "type": ["string", "number"] },
                    {
                        "type": "array",
                        "minItems": 1,
                        "items": { "type": ["string", "number"] },
                    },
                ],
            },
        }),
        Section::Supplies => json!({
            "type": ["object", "null"],
            "propertyNames": { "$ref": "#/$defs/name" },
            "additionalProperties": Value::Object(closed_object(format::SUPPLY)),
        }),
        Section::Scenarios => json!({
            "type": ["object", "null"],
            "propertyNames": { "$ref": "#/$defs/name" },
            "additionalProperties": Value::Object(closed_object(format::SCENARIO)),
        }),
        Section::Profile => json!({
            "type": ["object", "null"],
            "propertyNames": { "$ref": "#/$defs/name" },
            "additionalProperties": quantity(Quantity::Share),
        }),
    }
}

/// A quantity: text whose number is followed by a unit of its kind.
fn quantity(kind: Quantity) -> Value {
    let units: Vec<String> = kind.units().iter().map(|u| escape(u)).collect();
    let unit = format!("(?:{})", units.join("|"));
    let single = format!(r"^\s*{NUMBER}\s*{unit}\s*$");
    let description = format!(
        "a {} with its unit: {}",
        kind.name(),
        kind.units().join(", ")
    );
    match kind {
        Quantity::Share => json!({
            "description": "a share: `80 %` or a fraction `0.8`",
            "oneOf": [
                { "type": "number", "minimum": 0, "maximum": 1 },
                { "type": "string", "pattern": format!(r"^\s*{NUMBER}\s*%?\s*$") },
            ],
        }),
        Quantity::WireSize => json!({
            "description": description,
            "type": "string",
            "anyOf": [
                { "pattern": single },
                { "pattern": r"^\s*[1-4]/0\s*AWG\s*$" },
            ],
        }),
        _ if kind.is_band() => {
            let range = format!(r"^\s*{NUMBER}\s*(?:{unit})?\s*\.\.\s*{NUMBER}\s*{unit}\s*$");
            let tolerance =
                format!(r"^\s*{NUMBER}\s*{unit}\s*(?:±|\+-)\s*{NUMBER}\s*(?:%|{unit})\s*$");
            json!({
                "description": format!("{description}; a range `4.5..5.5 V` or a tolerance `5 V ±2%`"),
                "type": "string",
                "anyOf": [{ "pattern": single }, { "pattern": range }, { "pattern": tolerance }],
            })
        }
        _ => json!({ "description": description, "type": "string", "pattern": single }),
    }
}

/// A unit spelling as a literal inside a regular expression.
fn escape(unit: &str) -> String {
    unit.chars()
        .map(|c| {
            if "\\^$.|?*+()[]{}/".contains(c) {
                format!("\\{c}")
            } else {
                c.to_string()
            }
        })
        .collect()
}

fn draw() -> Value {
    let mut object = closed_object(format::DRAW);
    object.insert(
        "anyOf".into(),
        json!([{ "required": ["typical"] }, { "required": ["peak"] }]),
    );
    json!({ "oneOf": [quantity(Quantity::Current), Value::Object(object)] })
}

fn ports() -> Value {
    let kind_is =
        |kind: &str| json!({ "properties": { "kind": { "const": kind } }, "required": ["kind"] });
    json!({
        "type": "object",
        "propertyNames": { "$ref": "#/$defs/name" },
        "additionalProperties": {
            "type": "object",
            "required": ["kind"],
            "properties": { "kind": { "enum": format::PORT_KINDS } },
            "allOf": [
                { "if": kind_is("usb-host"), "then": Value::Object(closed_object(format::USB_HOST)) },
                { "if": kind_is("usb-device"), "then": Value::Object(closed_object(format::USB_DEVICE)) },
            ],
        },
    })
}

/// A port entry laid over a library part's port without restating its kind:
/// any field of either kind.
fn port_override() -> Value {
    let fields: Vec<Field> = format::USB_HOST
        .iter()
        .chain(format::USB_DEVICE)
        .filter(|f| f.key != "kind")
        .copied()
        .collect();
    Value::Object(closed_object(&fields))
}

/// A pin's fields for one role; `role` itself may be left out (a fixed pin
/// keeps its class's role).
fn role_fields(role: PinRole) -> Value {
    let fields: Vec<Field> = format::role_keys(role)
        .iter()
        .filter_map(|k| format::pin_field(k).copied())
        .collect();
    Value::Object(closed_object(&fields))
}

/// A pin written in full: a role, and the fields that role takes.
fn pin() -> Value {
    let names: Vec<&str> = ROLES.iter().map(|r| r.name).collect();
    let cases: Vec<Value> = ROLES
        .iter()
        .map(|r| {
            json!({
                "if": { "properties": { "role": { "const": r.name } }, "required": ["role"] },
                "then": { "$ref": format!("#/$defs/role-{}", r.name) },
            })
        })
        .collect();
    json!({
        "type": "object",
        "required": ["role"],
        "properties": { "role": { "enum": names } },
        "allOf": cases,
    })
}

/// A pin a class always has: without `role` it takes its own role's fields;
/// with one, it is read as that role.
fn fixed_pin(role: &str) -> Value {
    json!({
        "if": { "required": ["role"] },
        "then": { "$ref": "#/$defs/pin" },
        "else": { "$ref": format!("#/$defs/role-{role}") },
    })
}

/// A pin entry laid over a library part's pin: any pin field; with `role`,
/// read as that role.
fn pin_override() -> Value {
    let mut object = closed_object(format::PIN_FIELDS);
    object.insert("if".into(), json!({ "required": ["role"] }));
    object.insert("then".into(), json!({ "$ref": "#/$defs/pin" }));
    Value::Object(object)
}

fn class_schema(class: &ClassSpec) -> Value {
    let mut fixed = Map::new();
    for (name, role) in class.fixed_pins {
        fixed.insert(
            (*name).into(),
            json!({ "$ref": format!("#/$defs/fixed-pin-{}", role.name()) }),
        );
    }
    let pins = json!({
        "type": "object",
        "description": "the part's pins, by name",
        "propertyNames": { "$ref": "#/$defs/name" },
        "properties": fixed,
        "additionalProperties": { "$ref": "#/$defs/pin" },
    });
    let mut object = closed_object(class.fields);
    if let Some(Value::Object(properties)) = object.get_mut("properties") {
        for field in format::PART_FIELDS {
            properties.insert(field.key.into(), property(field));
        }
    }
    if let Some(Value::Object(properties)) = object.get_mut("properties") {
        properties.insert(
            "class".into(),
            json!({ "const": class.name, "description": class.meaning }),
        );
        properties.insert("pins".into(), pins);
        properties.insert("ports".into(), json!({ "$ref": "#/$defs/ports" }));
    }
    Value::Object(object)
}

fn inline_part() -> Value {
    let names: Vec<&str> = CLASSES.iter().map(|c| c.name).collect();
    let cases: Vec<Value> = CLASSES
        .iter()
        .map(|c| {
            json!({
                "if": { "properties": { "class": { "const": c.name } }, "required": ["class"] },
                "then": { "$ref": format!("#/$defs/class-{}", c.name) },
            })
        })
        .collect();
    json!({
        "type": "object",
        "required": ["class"],
        "properties": { "class": { "enum": names, "description": "what kind of part it is" } },
        "allOf": cases,
    })
}

fn library_part() -> Value {
    let mut properties = Map::new();
    for key in LIBRARY_PART_KEYS {
        let schema = match *key {
            "use" => json!({
                "description": "a library part id: `railcheck parts` lists them",
                "allOf": [value(Kind::PartId)],
            }),
            "with" => json!({
                "description": "field values laid over the library part's own",
                "allOf": [value(Kind::Overrides)],
            }),
            "pins" => json!({
                "description": "pin fields laid over the library part's pins, or new pins",
                "type": "object",
                "propertyNames": { "$ref": "#/$defs/name" },
                "additionalProperties": { "$ref": "#/$defs/pin-override" },
            }),
            _ => json!({
                "description": "port fields laid over the library part's ports, or new ports",
                "type": "object",
                "propertyNames": { "$ref": "#/$defs/name" },
                "additionalProperties": {
                    "if": { "required": ["kind"] },
                    "then": ports()["additionalProperties"].clone(),
                    "else": port_override(),
                },
            }),
        };
        properties.insert((*key).into(), schema);
    }
    properties.insert("notes".into(), notes());
    json!({
        "type": "object",
        "required": ["use"],
        "properties": properties,
        "additionalProperties": false,
    })
}
