//! A structured mutation fuzzer for the whole pipeline, on the stable
//! toolchain. Seeds are the shipped plans, the rule fixtures and the hostile
//! corpus; each run mutates one seed (bytes, lines, numbers, names, YAML
//! structure) with a deterministic generator, then drives it through what the
//! command does: decode, read and check, the terminal, JSON and SARIF reports,
//! the budget, the SVG diagram and (every `png_every` runs) the PNG, inside
//! `catch_unwind`. A panic, a run slower than `slow`, or a JSON or SARIF
//! document that does not parse is a finding.

use railcheck::model::Library;
use railcheck::report::{self, HumanStyle};
use std::panic::{AssertUnwindSafe, catch_unwind};
use std::path::{Path, PathBuf};
use std::time::{Duration, Instant};

/// xorshift64*: small, fast and the same on every machine.
pub struct Rng(u64);

impl Rng {
    pub fn new(seed: u64) -> Rng {
        Rng(seed.max(1))
    }
    pub fn next(&mut self) -> u64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        self.0.wrapping_mul(0x2545_F491_4F6C_DD1D)
    }
    pub fn below(&mut self, n: usize) -> usize {
        (self.next() % n.max(1) as u64) as usize
    }
    fn pick<'a, T>(&mut self, items: &'a [T]) -> &'a T {
        &items[self.below(items.len())]
    }
}

/// Values that have broken number readers before: NaN, infinities, signed
/// zeros, overflow and underflow, huge and tiny magnitudes, bad units.
const HOSTILE_VALUES: &[&str] = &[
    "NaN V",
    ".nan",
    "inf A",
    "-inf",
    ".inf",
    "-0 V",
    "0",
    "0 A",
    "-1 Ah",
    "1e400 V",
    "5e-400 V",
    "1e-300 A",
    "1e308 W",
    "-5 ohm",
    "0 AWG",
    "1000 AWG",
    "99999999999999999999 mA",
    "0x10 V",
    "1_000 V",
    "5 V ±200%",
    "5..4 V",
    "4.5..NaN V",
    "12",
    "",
    "~",
    "[]",
    "{}",
    "\"\"",
    "\u{3164}",
    "a\u{202e}b",
    "\u{1b}[2J",
    "é",
    "5 µA",
    "5 uA",
    "C",
    "25C",
    "-25C",
    "100 %",
    "-5 %",
    "1e3 %",
    "4294967296",
    "-9223372036854775809",
];

/// Names a plan may try: blanks, controls, markup, very long.
const HOSTILE_NAMES: &[&str] = &[
    "\u{3164}",
    "\u{200b}",
    "a\u{0}b",
    "<script>",
    "&amp;",
    "\"q\"",
    "x y",
    "-",
    "+",
    "_",
    "名前",
    "\u{1b}]0;t\u{7}",
    "a.b.c",
    "..",
    "*x",
    "&y",
];

pub fn mutate(rng: &mut Rng, seed: &str) -> String {
    let mut text = seed.to_string();
    for _ in 0..1 + rng.below(4) {
        text = mutate_once(rng, &text);
    }
    text
}

fn char_floor(text: &str, mut i: usize) -> usize {
    i = i.min(text.len());
    while !text.is_char_boundary(i) {
        i -= 1;
    }
    i
}

fn mutate_once(rng: &mut Rng, text: &str) -> String {
    let lines: Vec<&str> = text.split_inclusive('\n').collect();
    let at = char_floor(text, rng.below(text.len() + 1));
    match rng.below(14) {
        // A value after a colon becomes a hostile value.
        0 | 1 => {
            let colons: Vec<usize> = text.match_indices(": ").map(|(i, _)| i + 2).collect();
            if colons.is_empty() {
                return text.to_string();
            }
            let start = *rng.pick(&colons);
            let end = text[start..]
                .find([',', '}', '\n', ']'])
                .map_or(text.len(), |e| start + e);
            format!(
                "{}{}{}",
                &text[..start],
                rng.pick(HOSTILE_VALUES),
                &text[end..]
            )
        }
        // A number anywhere is replaced.
        2 => {
            let digits: Vec<usize> = text
                .char_indices()
                .filter(|(_, c)| c.is_ascii_digit())
                .map(|(i, _)| i)
                .collect();
            if digits.is_empty() {
                return text.to_string();
            }
            let start = *rng.pick(&digits);
            let end = text[start..]
                .find(|c: char| !c.is_ascii_digit() && c != '.')
                .map_or(text.len(), |e| start + e);
            let with = ["0", "-0", "1e400", "1e-400", "NaN", "99999999999", "-3"];
            format!("{}{}{}", &text[..start], rng.pick(&with), &text[end..])
        }
        // A name (a word before a colon) is replaced.
        3 => {
            let keys: Vec<usize> = text.match_indices(":").map(|(i, _)| i).collect();
            if keys.is_empty() {
                return text.to_string();
            }
            let end = *rng.pick(&keys);
            let start = text[..end]
                .rfind([' ', '\n', '{', ','])
                .map_or(0, |s| s + 1);
            let name = if rng.below(4) == 0 {
                "n".repeat(1 + rng.below(5_000))
            } else {
                rng.pick(HOSTILE_NAMES).to_string()
            };
            format!("{}{}{}", &text[..start], name, &text[end..])
        }
        // Whole lines deleted, duplicated, swapped.
        4 if !lines.is_empty() => {
            let i = rng.below(lines.len());
            let mut out = lines.clone();
            out.remove(i);
            out.concat()
        }
        5 if !lines.is_empty() => {
            let i = rng.below(lines.len());
            let mut out = lines.clone();
            for _ in 0..1 + rng.below(3) {
                out.insert(i, lines[i]);
            }
            out.concat()
        }
        6 if lines.len() > 1 => {
            let (i, j) = (rng.below(lines.len()), rng.below(lines.len()));
            let mut out = lines.clone();
            out.swap(i, j);
            out.concat()
        }
        // YAML structure: anchors, aliases, tags, flow, documents, depth.
        7 => {
            let bits = [
                "&a ",
                "*a",
                "!!str ",
                "!!binary ",
                "<<: *a\n",
                "{",
                "}",
                "[",
                "]",
                "---\n",
                "...\n",
                "? ",
                "|\n",
                ">-\n",
                "\t",
                "'",
                "\"",
                "#",
                "%YAML 1.1\n",
            ];
            format!("{}{}{}", &text[..at], rng.pick(&bits), &text[at..])
        }
        8 => {
            let depth = 1 + rng.below(64);
            format!("{}{}{}", &text[..at], "[".repeat(depth), &text[at..])
        }
        // Line endings and encodings.
        9 => match rng.below(4) {
            0 => text.replace('\n', "\r"),
            1 => text.replace('\n', "\r\n"),
            2 => format!("\u{feff}{text}"),
            _ => text.replace(' ', "\u{a0}"),
        },
        // Raw characters: controls, invisibles, bidi.
        10 => {
            let chars = [
                '\u{0}', '\u{1b}', '\u{7f}', '\u{85}', '\u{2028}', '\u{202e}', '\u{fffd}',
                '\u{3164}',
            ];
            format!("{}{}{}", &text[..at], rng.pick(&chars), &text[at..])
        }
        // Truncation and splicing.
        11 => text[..at].to_string(),
        12 => {
            let from = char_floor(text, rng.below(text.len() + 1));
            let to = char_floor(text, from + rng.below(200));
            format!("{}{}{}", &text[..at], &text[from..to], &text[at..])
        }
        // All on one line: flow style made wide.
        _ => text.replace("\n  ", " "),
    }
}

/// What one run found wrong, if anything.
#[derive(Debug)]
pub struct Finding {
    pub what: String,
    pub input: String,
}

/// One plan through everything the command does; a description of what went
/// wrong, if anything did.
pub fn exercise(text: &str, library: &Library, png: bool) -> Result<(), String> {
    let started = Instant::now();
    let outcome = catch_unwind(AssertUnwindSafe(|| -> Result<(), String> {
        let style = HumanStyle::default();
        let text = match railcheck::decode("fuzz.yaml", text.as_bytes().to_vec()) {
            Ok(text) => text,
            Err(failure) => {
                report::render_input_errors(&failure.sources, &failure.errors, style);
                return Ok(());
            }
        };
        match railcheck::check("fuzz.yaml", &text, library) {
            Err(failure) => {
                report::render_input_errors(&failure.sources, &failure.errors, style);
                let json = report::input_errors_json(
                    &failure.sources,
                    failure.plan_source,
                    &failure.errors,
                );
                parses(&json, "input-error JSON")?;
                let sarif = report::input_errors_sarif(
                    &failure.sources,
                    railcheck::rules::RULES,
                    &failure.errors,
                );
                parses(&sarif, "input-error SARIF")?;
            }
            Ok(checked) => {
                let cautions = railcheck::safety::cautions(&checked.plan);
                report::render_findings(
                    &checked.sources,
                    checked.plan_source,
                    &checked.findings,
                    &cautions,
                    style,
                );
                let json = report::findings_json(
                    &checked.sources,
                    checked.plan_source,
                    &checked.findings,
                    &cautions,
                );
                parses(&json, "findings JSON")?;
                let sarif = report::findings_sarif(
                    &checked.sources,
                    railcheck::rules::RULES,
                    &checked.findings,
                    &cautions,
                );
                parses(&sarif, "findings SARIF")?;
                let budget = railcheck::budget::budget(&checked);
                report::budget_table("fuzz.yaml", &budget);
                parses(&report::budget_json("fuzz.yaml", &budget), "budget JSON")?;
                let svg = railcheck::diagram::draw(&checked);
                if png {
                    let options = resvg::usvg::Options::default();
                    let _ = railcheck::diagram::png(&svg, &options);
                }
            }
        }
        Ok(())
    }));
    match outcome {
        Ok(result) => result?,
        Err(panic) => {
            let message = panic
                .downcast_ref::<String>()
                .cloned()
                .or_else(|| panic.downcast_ref::<&str>().map(|s| s.to_string()))
                .unwrap_or_default();
            return Err(format!("panic: {message}"));
        }
    }
    Ok(()).and_then(|()| {
        let took = started.elapsed();
        if took > Duration::from_secs(5) {
            Err(format!("slow: {took:?}"))
        } else {
            Ok(())
        }
    })
}

fn parses(text: &str, what: &str) -> Result<(), String> {
    serde_json::from_str::<serde_json::Value>(text)
        .map(drop)
        .map_err(|e| format!("{what} does not parse: {e}"))
}

/// Every seed plan below the repository: examples, docs, fixtures, corpus.
pub fn seeds(root: &Path) -> Vec<String> {
    let mut files: Vec<PathBuf> = Vec::new();
    let mut stack: Vec<PathBuf> = ["examples", "docs", "tests/fixtures", "tests/hostile"]
        .iter()
        .map(|d| root.join(d))
        .collect();
    while let Some(dir) = stack.pop() {
        let Ok(entries) = std::fs::read_dir(&dir) else {
            continue;
        };
        for entry in entries.flatten() {
            let path = entry.path();
            let Ok(kind) = entry.file_type() else {
                continue;
            };
            if kind.is_dir() {
                stack.push(path);
            } else if kind.is_file() && path.extension().is_some_and(|e| e == "yaml") {
                files.push(path);
            }
        }
    }
    files.sort();
    files
        .iter()
        .filter_map(|p| std::fs::read(p).ok())
        .map(|b| String::from_utf8_lossy(&b).into_owned())
        .filter(|t| t.len() < 200_000)
        .collect()
}

/// Runs until `deadline` or `max_runs`; returns the runs made and findings.
pub fn run(
    seed: u64,
    seeds: &[String],
    deadline: Instant,
    max_runs: u64,
    png_every: u64,
) -> (u64, Vec<Finding>) {
    let library = Library::builtin();
    let mut rng = Rng::new(seed);
    let mut findings = Vec::new();
    let mut runs = 0;
    while runs < max_runs && Instant::now() < deadline {
        let base = &seeds[rng.below(seeds.len())];
        let input = mutate(&mut rng, base);
        runs += 1;
        let png = png_every > 0 && runs % png_every == 0;
        if let Err(what) = exercise(&input, &library, png) {
            findings.push(Finding { what, input });
        }
    }
    (runs, findings)
}
