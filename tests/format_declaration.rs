//! The format's one declaration (`railcheck::model::format`) against the
//! reader: every declared field, written with its declared example, reads
//! without an input error, and a quantity written without its unit is
//! refused. So the schema, the reference tables and `railcheck parts`, all
//! generated from the declaration, describe what the reader really takes.

use railcheck::model::Library;
use railcheck::model::format::{self, Value};
use railcheck::units::Quantity;

/// Fields a class needs before any other can be read.
fn base_of(class: &str) -> &'static [(&'static str, &'static str)] {
    match class {
        "battery" => &[("chemistry", "lipo"), ("cells", "3")],
        "regulator" => &[("topology", "buck"), ("output", "5 V ±2%")],
        "motor" => &[
            ("rated_voltage", "12 V"),
            ("rated_current", "0.8 A"),
            ("stall_current", "5 A"),
        ],
        "resistor" => &[("value", "10 kohm")],
        "driver" => &[(
            "pins",
            "{ vm: { role: supply-in, range: 6..30 V }, gnd: { role: ground }, \
             out1a: { role: bridge-out }, out1b: { role: bridge-out } }",
        )],
        _ => &[],
    }
}

/// A plan of one part of `class` with its base fields, `key: value` laid over them.
fn plan_with_part(class: &str, key: &str, value: &str) -> String {
    let mut fields: Vec<String> = base_of(class)
        .iter()
        .filter(|(k, _)| *k != key)
        .map(|(k, v)| format!("{k}: {v}"))
        .collect();
    if !key.is_empty() {
        fields.push(format!("{key}: {value}"));
    }
    format!(
        "railcheck: 1\nparts:\n  it: {{ class: {class}, {} }}\nnets: {{}}\n",
        fields.join(", ")
    )
}

fn input_errors(text: &str) -> Vec<String> {
    match railcheck::read("plan.yaml", text, &Library::builtin()) {
        Ok(_) => Vec::new(),
        Err(failure) => failure.errors.into_iter().map(|e| e.message).collect(),
    }
}

/// The number a plan would write before the unit (`12` of `12 V`).
fn bare_number(example: &str) -> &str {
    let end = example
        .find(|c: char| !(c.is_ascii_digit() || c == '.'))
        .unwrap_or(example.len());
    &example[..end]
}

#[test]
fn every_class_field_reads_with_its_example() {
    for class in format::CLASSES {
        assert!(
            input_errors(&plan_with_part(class.name, "", "")).is_empty(),
            "the base {} reads",
            class.name
        );
        for field in class.fields {
            let plan = plan_with_part(class.name, field.key, field.example);
            let errors = input_errors(&plan);
            assert!(
                errors.is_empty(),
                "{}.{}: {errors:?}\n{plan}",
                class.name,
                field.key
            );
        }
    }
}

#[test]
fn a_class_quantity_without_its_unit_is_refused() {
    for class in format::CLASSES {
        for field in class.fields {
            let Value::Quantity(kind) = field.value else {
                continue;
            };
            // A share may be a plain fraction: `0.8` is a share.
            if kind == Quantity::Share {
                continue;
            }
            let number = bare_number(field.example);
            let plan = plan_with_part(class.name, field.key, number);
            let errors = input_errors(&plan);
            assert!(
                errors.iter().any(|e| e.contains("unit")),
                "{}.{} = {number}: {errors:?}",
                class.name,
                field.key
            );
        }
    }
}

#[test]
fn an_undeclared_class_field_is_refused() {
    for class in format::CLASSES {
        let errors = input_errors(&plan_with_part(class.name, "colour", "red"));
        assert!(
            errors.iter().any(|e| e.contains("unknown key `colour`")),
            "{}: {errors:?}",
            class.name
        );
    }
}

#[test]
fn every_pin_field_reads_on_a_role_that_takes_it() {
    for role in format::ROLES {
        for key in role.keys {
            let field = format::pin_field(key).expect("declared");
            // A logic pin's `ref` names a supply pin of the same part.
            let example = if *key == "ref" { "vcc" } else { field.example };
            let plan = format!(
                "railcheck: 1\nparts:\n  it:\n    class: board\n    pins:\n      \
                 vcc: {{ role: supply-in, range: 3..3.6 V, draw: 10 mA }}\n      \
                 p: {{ role: {}, {key}: {example} }}\nnets: {{}}\n",
                role.name
            );
            let errors = input_errors(&plan);
            assert!(errors.is_empty(), "{} {key}: {errors:?}", role.name);
        }
        // A key of another role is refused on this one.
        for field in format::PIN_FIELDS {
            if field.key == "role" || role.keys.contains(&field.key) {
                continue;
            }
            let plan = format!(
                "railcheck: 1\nparts:\n  it:\n    class: board\n    pins:\n      \
                 p: {{ role: {}, {}: {} }}\nnets: {{}}\n",
                role.name, field.key, field.example
            );
            let errors = input_errors(&plan);
            assert!(
                errors.iter().any(|e| e.contains("unknown key")),
                "{} must refuse {}: {errors:?}",
                role.name,
                field.key
            );
        }
    }
}

#[test]
fn plan_level_fields_read_with_their_examples() {
    let battery = "pack: { use: battery/lipo-3s }";
    for field in format::TOP_LEVEL {
        if matches!(field.value, Value::Section(_)) || field.key == "railcheck" {
            continue;
        }
        let plan = format!(
            "railcheck: 1\n{}: {}\nparts: {{ {battery} }}\nnets: {{}}\n",
            field.key, field.example
        );
        assert!(input_errors(&plan).is_empty(), "{}", field.key);
    }
    for field in format::LIMITS {
        let plan = format!(
            "railcheck: 1\nlimits: {{ {}: {} }}\nparts: {{ {battery} }}\nnets: {{}}\n",
            field.key, field.example
        );
        assert!(input_errors(&plan).is_empty(), "limits.{}", field.key);
    }
    for field in format::NET {
        let others: String = format::NET
            .iter()
            .filter(|f| f.key != field.key && f.key != "insulation")
            .map(|f| format!(", {}: {}", f.key, f.example))
            .collect();
        let plan = format!(
            "railcheck: 1\nparts: {{ pack: {{ use: battery/lipo-3s }}, fuse: {{ use: fuse/blade-15a }} }}\n\
             nets: {{ N: {{ {}: {}{others} }} }}\n",
            field.key, field.example
        );
        assert!(input_errors(&plan).is_empty(), "net {}", field.key);
    }
}
