//! The power budget as a terminal table or JSON.

use crate::budget::{BatteryBudget, Budget, RailBudget};
use crate::units::{show_charge, show_current, show_power, show_share, show_voltage};
use serde_json::{Value, json};
use uom::si::electric_charge::ampere_hour;
use uom::si::electric_current::ampere;
use uom::si::electric_potential::volt;
use uom::si::energy::watt_hour;
use uom::si::f64::{Energy, Ratio};
use uom::si::power::watt;
use uom::si::ratio::ratio;
use uom::si::time::hour;

fn table(header: &[&str], rows: &[Vec<String>]) -> String {
    let mut widths: Vec<usize> = header.iter().map(|h| h.chars().count()).collect();
    for row in rows {
        for (i, cell) in row.iter().enumerate() {
            widths[i] = widths[i].max(cell.chars().count());
        }
    }
    let line = |cells: Vec<String>| {
        let mut out = String::from("  ");
        for (i, cell) in cells.iter().enumerate() {
            out.push_str(cell);
            if i + 1 < cells.len() {
                out.push_str(&" ".repeat(widths[i] - cell.chars().count() + 2));
            }
        }
        out.push('\n');
        out
    };
    let mut out = line(header.iter().map(|s| s.to_string()).collect());
    for row in rows {
        out.push_str(&line(row.clone()));
    }
    out
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

fn rail_row(r: &RailBudget) -> Vec<String> {
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

fn battery_row(b: &BatteryBudget) -> Vec<String> {
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
    out.push_str("Rails (voltage at the source, typical mode):\n");
    let rails: Vec<Vec<String>> = budget.rails.iter().map(rail_row).collect();
    out.push_str(&table(
        &[
            "rail",
            "source",
            "empty–full",
            "nominal",
            "typical",
            "peak (mode)",
            "rating",
            "headroom",
            "power",
            "loss",
        ],
        &rails,
    ));
    out.push_str("\nBatteries:\n");
    let batteries: Vec<Vec<String>> = budget.batteries.iter().map(battery_row).collect();
    out.push_str(&table(
        &[
            "battery",
            "pack",
            "capacity",
            "full / nominal / empty",
            "energy",
            "typical",
            "peak of max",
            "mean",
            "runtime",
        ],
        &batteries,
    ));
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

fn num(v: f64) -> Value {
    let r = (v * 1e6).round() / 1e6;
    serde_json::Number::from_f64(r).map_or(Value::Null, Value::Number)
}

pub fn budget_json(file: &str, budget: &Budget) -> String {
    let rails: Vec<Value> = budget
        .rails
        .iter()
        .map(|r| {
            json!({
                "nets": r.nets,
                "source": r.source,
                "voltage": {
                    "empty": num(r.voltage_empty.get::<volt>()),
                    "nominal": num(r.voltage_nominal.get::<volt>()),
                    "full": num(r.voltage_full.get::<volt>()),
                },
                "typical_current": num(r.typical_current.get::<ampere>()),
                "peak_current": num(r.peak_current.get::<ampere>()),
                "peak_mode": r.peak_mode,
                "rating": r.rating.map(|i| num(i.get::<ampere>())),
                "power": num(r.power.get::<watt>()),
                "conversion_loss": r.conversion_loss.map(|p| num(p.get::<watt>())),
            })
        })
        .collect();
    let batteries: Vec<Value> = budget
        .batteries
        .iter()
        .map(|b| {
            json!({
                "name": b.name,
                "chemistry": b.chemistry.name(),
                "pack": b.pack,
                "capacity": b.capacity.map(|c| num(c.get::<ampere_hour>())),
                "voltage": {
                    "full": num(b.voltage_full.get::<volt>()),
                    "nominal": num(b.voltage_nominal.get::<volt>()),
                    "empty": num(b.voltage_empty.get::<volt>()),
                },
                "energy_wh": b.energy.map(|e| num(e.get::<watt_hour>())),
                "typical_current": num(b.typical_current.get::<ampere>()),
                "peak_current": num(b.peak_current.get::<ampere>()),
                "max_discharge": b.max_discharge.map(|i| num(i.get::<ampere>())),
                "average_current": num(b.average_current.get::<ampere>()),
                "usable": num(b.usable.get::<ratio>()),
                "runtime_h": b.runtime.as_ref().map(|r| num(r.time.get::<hour>())),
                "runtime_method": b.runtime.as_ref().map(|r| r.method.clone()),
            })
        })
        .collect();
    let mut text = serde_json::to_string_pretty(&json!({
        "file": file,
        "solved": budget.solved,
        "unsolved": budget.unsolved,
        "rails": if budget.solved { rails } else { Vec::new() },
        "batteries": if budget.solved { batteries } else { Vec::new() },
    }))
    .unwrap_or_default();
    text.push('\n');
    text
}
