//! The power budget as a terminal table or a JSON document (the shared
//! envelope of `json`, `kind: "budget"`).

use super::HumanStyle;
use super::json::{Envelope, Kind, Rounded};
use crate::budget::{BatteryBudget, Budget, RailBudget};
use crate::units::{show_charge, show_current, show_power, show_share, show_voltage};
use comfy_table::{ColumnConstraint, ContentArrangement, Table, Width, presets};
use serde::Serialize;
use std::collections::BTreeMap;
use uom::si::electric_charge::ampere_hour;
use uom::si::electric_current::ampere;
use uom::si::electric_potential::volt;
use uom::si::energy::watt_hour;
use uom::si::f64::{ElectricCurrent, ElectricPotential, Energy, Power, Ratio};
use uom::si::power::watt;
use uom::si::ratio::ratio;
use uom::si::time::hour;

/// Rows under a header as plain aligned columns, no borders and no colour,
/// so the text reads the same in a file or a pipe. The first `name_columns`
/// hold names the user chose: where the table is wider than the terminal
/// report, they wrap inside their cells (keeping at least `NAME_CELLS`).
/// Figures never wrap: a value torn from its unit misleads.
pub(super) fn table(header: &[&str], rows: &[Vec<String>], name_columns: usize) -> String {
    const NAME_CELLS: u16 = 16;
    let width = HumanStyle::default().width;
    let mut table = Table::new();
    table
        .load_style(presets::NOTHING)
        .set_content_arrangement(ContentArrangement::Dynamic)
        .set_width(u16::try_from(width).unwrap_or(u16::MAX))
        .set_header(header.to_vec())
        .add_rows(
            rows.iter()
                .map(|row| row.iter().map(|cell| shortened(cell))),
        );
    let content_widths = table.column_max_content_widths();
    let last = header.len().saturating_sub(1);
    for (i, column) in table.column_iter_mut().enumerate() {
        // Two spaces before the table and between columns.
        let left = if i == 0 { 2 } else { 0 };
        let right = if i == last { 0 } else { 2 };
        column.set_padding((left, right));
        column.set_constraint(if i < name_columns {
            let narrowest = content_widths
                .get(i)
                .map_or(NAME_CELLS, |&w| w.min(NAME_CELLS));
            ColumnConstraint::LowerBoundary(Width::Fixed(narrowest + left + right))
        } else {
            ColumnConstraint::ContentWidth
        });
    }
    let mut out = table.trim_fmt();
    out.push('\n');
    out
}

/// A cell cut to `LONGEST_CELL` characters, ending in `…` when cut. Names
/// and mode names come from the plan and can be any length; the table
/// crate counts widths in 16 bits, and a name of many lines helps no one
/// (the JSON budget carries it whole).
fn shortened(cell: &str) -> String {
    const LONGEST_CELL: usize = 64;
    match cell.char_indices().nth(LONGEST_CELL) {
        Some((cut, _)) => format!("{}…", &cell[..cut]),
        None => cell.to_string(),
    }
}

fn headroom(rail_peak: f64, rating: f64) -> String {
    if rating <= 0.0 {
        return "—".into();
    }
    show_share(Ratio::new::<ratio>((rating - rail_peak) / rating))
}

fn show_energy(e: Energy) -> String {
    let wh = e.get::<watt_hour>();
    format!("{} Wh", trim(wh))
}

/// Three significant figures, as the `show_*` formatters print.
fn trim(v: f64) -> String {
    if v == 0.0 {
        return "0".into();
    }
    let decimals = (2 - v.abs().log10().floor() as i32).max(0) as usize;
    let text = format!("{v:.decimals$}");
    if text.contains('.') {
        text.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        text
    }
}

pub(super) fn rail_row(r: &RailBudget) -> Vec<String> {
    vec![
        r.nets[0].clone(),
        r.source.clone(),
        format!(
            "{}–{}",
            show_voltage(r.voltage_empty),
            show_voltage(r.voltage_full)
        ),
        show_voltage(r.voltage_nominal),
        show_current(r.typical_current),
        format!("{} ({})", show_current(r.peak_current), r.peak_mode),
        r.rating.map_or("—".into(), show_current),
        r.rating.map_or("—".into(), |rating| {
            headroom(r.peak_current.get::<ampere>(), rating.get::<ampere>())
        }),
        show_power(r.power),
        r.conversion_loss.map_or("—".into(), show_power),
    ]
}

pub(super) fn battery_row(b: &BatteryBudget) -> Vec<String> {
    vec![
        b.name.clone(),
        b.pack.clone(),
        b.capacity.map_or("—".into(), show_charge),
        format!(
            "{} / {} / {}",
            show_voltage(b.voltage_full),
            show_voltage(b.voltage_nominal),
            show_voltage(b.voltage_empty)
        ),
        b.energy.map_or("—".into(), show_energy),
        show_current(b.typical_current),
        format!(
            "{} of {}",
            show_current(b.peak_current),
            b.max_discharge.map_or("—".into(), show_current)
        ),
        show_current(b.average_current),
        b.runtime.as_ref().map_or("—".into(), |r| {
            format!("{} h", trim(r.time.get::<hour>()))
        }),
    ]
}

/// The rail table's columns (also the build notes').
pub(super) const RAIL_HEADER: &[&str] = &[
    "rail",
    "source",
    "window",
    "nominal",
    "typical",
    "peak (mode)",
    "rating",
    "headroom",
    "power",
    "loss",
];

/// The battery table's columns (also the build notes').
pub(super) const BATTERY_HEADER: &[&str] = &[
    "battery",
    "pack",
    "capacity",
    "full / nominal / empty",
    "energy",
    "typical",
    "peak of max",
    "mean",
    "runtime",
];

/// The budget as terminal text for the plan `file`: a table of rails and one of
/// batteries, or why there are no figures.
pub fn budget_table(file: &str, budget: &Budget) -> String {
    let mut out = format!("Power budget for {file}\n\n");
    if !budget.solved {
        out.push_str(
            "No operating point: the plan has a short circuit or a power loop (`railcheck check` shows where), so there are no voltages or currents to add up.\n",
        );
        return out;
    }
    if !budget.unsolved.is_empty() {
        out.push_str(&format!(
            "Not solved (`analysis/no-convergence`): {}. The figures below leave these out.\n\n",
            budget.unsolved.join("; ")
        ));
    }
    out.push_str(
        "Rails (voltage at the source, typical mode; the window runs from an empty battery with\n\
         regulators at the low end of their tolerance to a full battery at the high end):\n",
    );
    let rails: Vec<Vec<String>> = budget.rails.iter().map(rail_row).collect();
    out.push_str(&table(RAIL_HEADER, &rails, 2));
    out.push_str("\nBatteries:\n");
    let batteries: Vec<Vec<String>> = budget.batteries.iter().map(battery_row).collect();
    out.push_str(&table(BATTERY_HEADER, &batteries, 2));
    for b in &budget.batteries {
        if let Some(r) = &b.runtime {
            out.push_str(&format!(
                "  {}: runtime from {} of capacity at the profile's mean current; {}\n",
                b.name,
                show_share(b.usable),
                r.method
            ));
        }
    }
    out
}

/// The unit of every number in the budget document, by key: rails and
/// batteries use the same keys in the same units (`voltage` holds `empty`,
/// `nominal` and `full`, all in volts; `usable` is a fraction of 1).
const BUDGET_UNITS: [(&str, &str); 12] = [
    ("voltage", "V"),
    ("typical_current", "A"),
    ("peak_current", "A"),
    ("rating", "A"),
    ("power", "W"),
    ("conversion_loss", "W"),
    ("capacity", "Ah"),
    ("energy_wh", "Wh"),
    ("max_discharge", "A"),
    ("average_current", "A"),
    ("usable", "1"),
    ("runtime_h", "h"),
];

#[derive(Serialize)]
struct BudgetBody<'a> {
    solved: bool,
    unsolved: &'a [String],
    rails: Vec<RailItem<'a>>,
    batteries: Vec<BatteryItem<'a>>,
    units: BTreeMap<&'static str, &'static str>,
}

#[derive(Serialize)]
struct RailVoltage {
    empty: Rounded,
    nominal: Rounded,
    full: Rounded,
}

#[derive(Serialize)]
struct RailItem<'a> {
    nets: &'a [String],
    source: &'a str,
    voltage: RailVoltage,
    typical_current: Rounded,
    peak_current: Rounded,
    peak_mode: &'a str,
    rating: Option<Rounded>,
    power: Rounded,
    conversion_loss: Option<Rounded>,
}

#[derive(Serialize)]
struct BatteryVoltage {
    full: Rounded,
    nominal: Rounded,
    empty: Rounded,
}

#[derive(Serialize)]
struct BatteryItem<'a> {
    name: &'a str,
    chemistry: &'static str,
    pack: &'a str,
    capacity: Option<Rounded>,
    voltage: BatteryVoltage,
    energy_wh: Option<Rounded>,
    typical_current: Rounded,
    peak_current: Rounded,
    max_discharge: Option<Rounded>,
    average_current: Rounded,
    usable: Rounded,
    runtime_h: Option<Rounded>,
    runtime_method: Option<&'a str>,
}

fn volts(v: ElectricPotential) -> Rounded {
    Rounded(v.get::<volt>())
}

fn amps(i: ElectricCurrent) -> Rounded {
    Rounded(i.get::<ampere>())
}

fn watts(p: Power) -> Rounded {
    Rounded(p.get::<watt>())
}

fn rail_item(r: &RailBudget) -> RailItem<'_> {
    RailItem {
        nets: &r.nets,
        source: &r.source,
        voltage: RailVoltage {
            empty: volts(r.voltage_empty),
            nominal: volts(r.voltage_nominal),
            full: volts(r.voltage_full),
        },
        typical_current: amps(r.typical_current),
        peak_current: amps(r.peak_current),
        peak_mode: &r.peak_mode,
        rating: r.rating.map(amps),
        power: watts(r.power),
        conversion_loss: r.conversion_loss.map(watts),
    }
}

fn battery_item(b: &BatteryBudget) -> BatteryItem<'_> {
    BatteryItem {
        name: &b.name,
        chemistry: b.chemistry.name(),
        pack: &b.pack,
        capacity: b.capacity.map(|c| Rounded(c.get::<ampere_hour>())),
        voltage: BatteryVoltage {
            full: volts(b.voltage_full),
            nominal: volts(b.voltage_nominal),
            empty: volts(b.voltage_empty),
        },
        energy_wh: b.energy.map(|e| Rounded(e.get::<watt_hour>())),
        typical_current: amps(b.typical_current),
        peak_current: amps(b.peak_current),
        max_discharge: b.max_discharge.map(amps),
        average_current: amps(b.average_current),
        usable: Rounded(b.usable.get::<ratio>()),
        runtime_h: b.runtime.as_ref().map(|r| Rounded(r.time.get::<hour>())),
        runtime_method: b.runtime.as_ref().map(|r| r.method.as_str()),
    }
}

/// The budget document: the shared envelope, then the rails and batteries
/// (empty when the operating point could not be solved) and the `units` of
/// their numbers.
pub fn budget_json(file: &str, budget: &Budget) -> String {
    let (rails, batteries) = if budget.solved {
        (
            budget.rails.iter().map(rail_item).collect(),
            budget.batteries.iter().map(battery_item).collect(),
        )
    } else {
        (Vec::new(), Vec::new())
    };
    let body = BudgetBody {
        solved: budget.solved,
        unsolved: &budget.unsolved,
        rails,
        batteries,
        units: BUDGET_UNITS.into_iter().collect(),
    };
    Envelope::new(Kind::Budget, file, body).to_text()
}
