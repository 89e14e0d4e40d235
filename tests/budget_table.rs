//! The terminal budget table's layout: columns aligned by display width
//! (Unicode East Asian Width: an ideograph takes two terminal columns), user
//! names wrapped in their cells when the table is too wide, and names of any
//! length shown without panic, hang or a line the size of the plan.
//!
//! Not for: the budget's figures (the worked budget tests check those).

use railcheck::model::Library;
use unicode_width::UnicodeWidthStr;

/// The budget table of a pack whose rail (the net at its positive pole) is
/// named `rail`, feeding one load through a fuse.
fn table_with_rail(rail: &str) -> String {
    // An explicit key (`? `): YAML caps implicit keys at 1024 characters.
    let plan = format!(
        "railcheck: 1\nparts:\n  pack: {{ use: battery/lipo-3s }}\n  main_fuse: {{ use: fuse/blade-20a }}\n  load: {{ class: load, pins: {{ vin: {{ role: supply-in, draw: 2 A }}, gnd: {{ role: ground }} }} }}\nnets:\n  ? {rail}\n  : [pack.pos, main_fuse.a]\n  FUSED: [main_fuse.b, load.vin]\n  GND: [pack.neg, load.gnd]\n"
    );
    let checked = railcheck::check("plan.yaml", &plan, &Library::builtin())
        .unwrap_or_else(|f| panic!("{:?}", f.errors));
    let budget = railcheck::budget::budget(&checked);
    railcheck::report::budget_table("plan.yaml", &budget)
}

/// Display column (0-based) where `needle` starts on the first line holding it.
fn column_of(table: &str, line_start: &str, needle: &str) -> usize {
    let line = table
        .lines()
        .find(|l| l.trim_start().starts_with(line_start))
        .unwrap_or_else(|| panic!("no line starts with {line_start}:\n{table}"));
    let at = line
        .find(needle)
        .unwrap_or_else(|| panic!("{needle} not in {line}"));
    line[..at].width()
}

#[test]
fn wide_characters_keep_the_columns_aligned() {
    // Four ideographs: four characters, eight terminal columns.
    let table = table_with_rail("主电源线");
    assert_eq!(
        column_of(&table, "主电源线", "pack.pos"),
        column_of(&table, "rail", "source"),
        "{table}"
    );
}

#[test]
fn a_long_rail_name_wraps_inside_its_cell() {
    let name = "FUSED_BATTERY_POSITIVE_FROM_THE_MAIN_PACK_TO_THE_DRIVE_LOAD";
    let table = table_with_rail(name);
    // The name is cut into lines of 16 columns under one another; the
    // figures stay on the name's first line.
    let name_lines: Vec<&str> = table
        .lines()
        .map(str::trim)
        .filter(|l| !l.is_empty() && name.contains(l.split("  ").next().unwrap_or("-")))
        .collect();
    assert_eq!(name_lines.len(), name.len().div_ceil(16), "{table}");
    assert!(name_lines[0].contains("pack.pos"), "{table}");
    // Without the long name, the widest line is no wider.
    let widest = |t: &str| t.lines().map(UnicodeWidthStr::width).max().unwrap_or(0);
    assert!(
        widest(&table) <= widest(&table_with_rail("BATT")) + 16 - 4,
        "{table}"
    );
}

#[test]
fn a_rail_name_of_a_million_letters_is_cut() {
    let name = "R".repeat(1 << 20);
    let table = table_with_rail(&name);
    let letters: usize = table
        .lines()
        .filter(|l| l.trim_start().starts_with("RR"))
        .map(|l| l.matches('R').count())
        .sum();
    // 64 characters of the name, then `…`.
    assert_eq!(letters, 64, "{}", &table[..table.len().min(2000)]);
    assert!(table.contains('…'));
    assert!(table.lines().all(|l| l.width() < 200));
}
