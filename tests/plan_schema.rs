//! The plan's JSON Schema (`railcheck schema`, committed as
//! `docs/plan.schema.json`) checked with a general-purpose JSON Schema
//! implementation (draft 2020-12): every shipped plan and part file
//! validates, and typical mistakes are rejected, as a YAML editor using the
//! schema would show them.

use serde_json::{Value, json};
use std::path::{Path, PathBuf};

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// YAML read as an editor's language server hands it to the schema.
fn yaml_to_json(text: &str) -> Value {
    serde_saphyr::from_str(text).expect("YAML")
}

fn validator(schema: &Value) -> jsonschema::Validator {
    jsonschema::draft202012::new(schema).expect("a valid draft 2020-12 schema")
}

fn errors(validator: &jsonschema::Validator, instance: &Value) -> Vec<String> {
    validator
        .iter_errors(instance)
        .map(|e| format!("{} at {}", e, e.instance_path()))
        .collect()
}

fn yaml_files(dir: &Path, found: &mut Vec<PathBuf>) {
    for entry in std::fs::read_dir(dir).expect("folder") {
        let path = entry.expect("entry").path();
        if path.is_dir() {
            yaml_files(&path, found);
        } else if path.extension().is_some_and(|e| e == "yaml") {
            found.push(path);
        }
    }
    found.sort();
}

#[test]
fn committed_schema_is_fresh() {
    let path = root().join("docs/plan.schema.json");
    let fresh = railcheck::report::plan_schema_text();
    if std::env::var_os("RAILCHECK_UPDATE_DOCS").is_some() {
        std::fs::write(&path, &fresh).expect("write the schema");
    }
    let committed = std::fs::read_to_string(&path).unwrap_or_default();
    assert!(
        committed == fresh,
        "docs/plan.schema.json is stale: run `RAILCHECK_UPDATE_DOCS=1 cargo test --test plan_schema`"
    );
}

#[test]
fn schema_is_a_valid_draft_2020_12_schema() {
    let schema = railcheck::report::plan_schema();
    // The meta-schema check of the validator itself.
    assert!(jsonschema::meta::is_valid(&schema));
    assert_eq!(
        schema["$schema"],
        json!("https://json-schema.org/draft/2020-12/schema")
    );
}

#[test]
fn every_shipped_plan_validates() {
    let validator = validator(&railcheck::report::plan_schema());
    let mut plans = Vec::new();
    yaml_files(&root().join("examples"), &mut plans);
    yaml_files(&root().join("tests/fixtures"), &mut plans);
    yaml_files(&root().join("tests/diagram"), &mut plans);
    assert!(plans.len() > 150, "found {} plans", plans.len());
    for path in plans {
        let text = std::fs::read_to_string(&path).expect("read");
        let found = errors(&validator, &yaml_to_json(&text));
        assert!(found.is_empty(), "{}: {found:#?}", path.display());
    }
}

#[test]
fn every_library_part_validates_as_an_inline_part() {
    let mut schema = railcheck::report::plan_schema();
    schema["$ref"] = json!("#/$defs/inline-part");
    if let Some(top) = schema.as_object_mut() {
        for key in ["properties", "required", "additionalProperties"] {
            top.remove(key);
        }
    }
    let validator = validator(&schema);
    let mut parts = Vec::new();
    yaml_files(&root().join("parts"), &mut parts);
    assert!(parts.len() >= 40);
    for path in parts {
        let text = std::fs::read_to_string(&path).expect("read");
        let found = errors(&validator, &yaml_to_json(&text));
        assert!(found.is_empty(), "{}: {found:#?}", path.display());
    }
}

/// A sound small plan, then one mistake at a time: each must be rejected by
/// the schema, as the reader rejects it.
#[test]
fn typical_mistakes_are_rejected() {
    let sound = "railcheck: 1
name: Greenhouse cart
ambient: 30 degC
limits: { wire_drop: 4 %, derate: 0.8 }
parts:
  pack: { use: battery/lipo-3s, with: { cutoff: true } }
  fuse: { use: fuse/blade-5a }
  ldo:
    class: regulator
    topology: linear
    output: 3.3 V ±2%
    input: 4.5..15 V
    current: 800 mA
    pins: { vin: { max: 16 V } }
  mcu:
    class: board
    pins:
      vin: { role: supply-in, range: 3..3.6 V, draw: { typical: 40 mA, peak: 80 mA } }
      gnd: { role: ground }
      tx: { role: logic-out, ref: vin, family: lvcmos33 }
    ports:
      usb: { kind: usb-device, draw: 100 mA, feeds: vin, or: diode }
nets:
  BATT+: [pack.pos, fuse.a]
  VIN: { pins: [fuse.b, ldo.vin], wire: 20 AWG, length: 30 cm }
  3V3: [ldo.vout, mcu.vin]
  GND: { pins: [pack.neg, ldo.gnd, mcu.gnd], wire: 0.5 mm2, length: 300 mm }
modes:
  sleep: { mcu: idle }
profile: { typical: 60 %, sleep: 40 % }
";
    let validator = validator(&railcheck::report::plan_schema());
    let plan = yaml_to_json(sound);
    assert_eq!(errors(&validator, &plan), Vec::<String>::new());
    // The reader agrees that the sound plan is sound.
    assert!(railcheck::read("plan.yaml", sound, &railcheck::model::Library::builtin()).is_ok());

    let mistakes = [
        (
            "unknown top-level key",
            "name: Greenhouse cart",
            "nmae: Greenhouse cart",
        ),
        ("wrong version", "railcheck: 1", "railcheck: 2"),
        ("value without unit", "current: 800 mA", "current: 800"),
        (
            "unit of the wrong kind",
            "output: 3.3 V ±2%",
            "output: 3.3 A ±2%",
        ),
        (
            "unknown class field",
            "topology: linear",
            "topology: linear\n    colour: red",
        ),
        ("unknown class", "class: board", "class: computer"),
        ("unknown role", "role: logic-out", "role: push-pull"),
        (
            "key of another role",
            "tx: { role: logic-out, ref: vin",
            "tx: { role: logic-out, vih: 2 V, ref: vin",
        ),
        ("wrong type for a flag", "cutoff: true", "cutoff: sometimes"),
        (
            "unknown topology",
            "topology: linear",
            "topology: charge-pump",
        ),
        ("unknown port kind", "kind: usb-device", "kind: usb-c"),
        (
            "pin without its part",
            "[pack.pos, fuse.a]",
            "[pos, fuse.a]",
        ),
        (
            "unknown mode state",
            "sleep: { mcu: idle }",
            "sleep: { mcu: asleep }",
        ),
        (
            "built-in mode redefined",
            "sleep: { mcu: idle }\nprofile: { typical: 60 %, sleep: 40 % }",
            "worst: { mcu: idle }",
        ),
        ("share above one", "derate: 0.8", "derate: 1.8"),
        ("wire size without unit", "wire: 20 AWG", "wire: 20"),
        (
            "unknown net key",
            "wire: 20 AWG, length: 30 cm",
            "wire: 20 AWG, lenght: 30 cm",
        ),
        (
            "library part with a class",
            "use: battery/lipo-3s,",
            "use: battery/lipo-3s, class: battery,",
        ),
        (
            "a draw with neither typical nor peak",
            "draw: { typical: 40 mA, peak: 80 mA }",
            "draw: { idle: 40 mA }",
        ),
    ];
    for (what, from, to) in mistakes {
        assert!(
            sound.contains(from),
            "{what}: the sound plan holds `{from}`"
        );
        let broken = sound.replacen(from, to, 1);
        assert!(
            !errors(&validator, &yaml_to_json(&broken)).is_empty(),
            "the schema accepts: {what}"
        );
        // The reader refuses the same mistake (so the schema is not stricter
        // than the format; `ports` and `or` aside, each is an input error).
        assert!(
            railcheck::read("plan.yaml", &broken, &railcheck::model::Library::builtin()).is_err(),
            "the reader accepts: {what}"
        );
    }
}
