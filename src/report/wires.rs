//! The wire list as a terminal table, CSV (one row per run, for a
//! spreadsheet or a label printer) or a JSON document (the shared envelope
//! of `json`, `kind: "wires"`).

use super::budget::table;
use super::json::{Envelope, Kind, Rounded};
use crate::units::{show_current, show_length, show_voltage};
use crate::wirelist::{Pinout, Run, SizeTotal, WireList};
use serde::Serialize;
use std::collections::BTreeMap;
use uom::si::electric_current::ampere;
use uom::si::electric_potential::volt;
use uom::si::length::meter;

fn or_dash(text: Option<String>) -> String {
    text.unwrap_or_else(|| "—".to_string())
}

fn ends(run: &Run) -> String {
    format!("{} → {}", run.from, run.to.join(", "))
}

pub(super) fn run_row(number: usize, run: &Run) -> Vec<String> {
    vec![
        number.to_string(),
        run.net.clone(),
        ends(run),
        run.role.name().to_string(),
        or_dash(run.wire.map(|w| w.to_string())),
        or_dash(run.length.map(show_length)),
        or_dash(run.colour.clone()),
        or_dash(run.continuous.map(show_current)),
        or_dash(run.peak.map(show_current)),
        if run.fuses.is_empty() {
            "—".to_string()
        } else {
            run.fuses.join(", ")
        },
        or_dash(run.drop_at_peak.map(show_voltage)),
    ]
}

pub(super) fn total_row(total: &SizeTotal) -> Vec<String> {
    vec![
        if total.cable {
            format!("{} USB cable", total.wire)
        } else {
            total.wire.to_string()
        },
        show_length(total.length),
        total.runs.to_string(),
    ]
}

pub(super) fn pinout_rows(pinout: &Pinout) -> Vec<Vec<String>> {
    pinout
        .contacts
        .iter()
        .map(|c| {
            vec![
                format!("{}/{}", c.a, c.b),
                or_dash(c.net_a.clone()),
                or_dash(c.net_b.clone()),
                or_dash(c.continuous.map(show_current)),
                or_dash(c.peak.map(show_current)),
            ]
        })
        .collect()
}

/// Columns of the wire list (also the build notes').
pub(super) const RUN_HEADER: &[&str] = &[
    "#",
    "net",
    "from → to",
    "role",
    "wire",
    "length",
    "colour",
    "continuous",
    "peak",
    "fuse",
    "drop",
];
/// Columns of the wire list (also the build notes').
pub(super) const TOTAL_HEADER: &[&str] = &["size", "length", "runs"];
/// Columns of the wire list (also the build notes').
pub(super) const PINOUT_HEADER: &[&str] =
    &["contact", "plug side", "socket side", "continuous", "peak"];

/// The wire list as terminal text for the plan `file`: the runs in cutting
/// order, the length of each size to buy, and each connector's pinout.
pub fn wires_table(file: &str, list: &WireList) -> String {
    let mut out = format!("Wire list for {file}\n\n");
    if !list.solved {
        out.push_str(
            "No operating point: the plan has a short circuit or a power loop (`railcheck check` shows where), so the runs carry no currents.\n\n",
        );
    }
    out.push_str(
        "Runs, in cutting order: thickest wire first, along the power path from the battery;\n\
         lengths one way; currents the highest continuous and the highest at any moment\n\
         (`worst` and brief modes included); drop along the run at its peak:\n",
    );
    let rows: Vec<Vec<String>> = list
        .runs
        .iter()
        .enumerate()
        .map(|(i, run)| run_row(i + 1, run))
        .collect();
    out.push_str(&table(RUN_HEADER, &rows, 3));
    out.push_str(
        "\nTo buy (one-way lengths added up; allow extra for routing and strip length):\n",
    );
    let totals: Vec<Vec<String>> = list.totals.iter().map(total_row).collect();
    if totals.is_empty() {
        out.push_str("  no run gives both a wire size and a length\n");
    } else {
        out.push_str(&table(TOTAL_HEADER, &totals, 1));
    }
    for pinout in &list.pinouts {
        out.push_str(&format!(
            "\nConnector {}{}:\n",
            pinout.connector,
            pinout
                .library_id
                .as_ref()
                .map_or(String::new(), |id| format!(" ({id})"))
        ));
        out.push_str(&table(PINOUT_HEADER, &pinout_rows(pinout), 3));
    }
    out
}

/// The runs as CSV with a header row, one row per run in cutting order;
/// numbers in plain SI units (A, V, m) so a spreadsheet can add them up.
pub fn wires_csv(list: &WireList) -> String {
    let mut writer = csv::Writer::from_writer(Vec::new());
    let number = |value: Option<f64>| {
        value
            .and_then(|v| Rounded(v).finite())
            .map_or(String::new(), |v| v.to_string())
    };
    // Writing into a Vec cannot fail.
    let _ = writer.write_record([
        "number",
        "net",
        "role",
        "from",
        "to",
        "wire",
        "length_m",
        "colour",
        "continuous_a",
        "peak_a",
        "peak_at",
        "fuses",
        "drop_at_peak_v",
    ]);
    for (i, run) in list.runs.iter().enumerate() {
        let _ = writer.write_record([
            (i + 1).to_string(),
            run.net.clone(),
            run.role.name().to_string(),
            run.from.clone(),
            run.to.join(" "),
            run.wire.map_or(String::new(), |w| w.to_string()),
            number(run.length.map(|l| l.get::<meter>())),
            run.colour.clone().unwrap_or_default(),
            number(run.continuous.map(|i| i.get::<ampere>())),
            number(run.peak.map(|i| i.get::<ampere>())),
            run.peak_at.clone().unwrap_or_default(),
            run.fuses.join(" "),
            number(run.drop_at_peak.map(|v| v.get::<volt>())),
        ]);
    }
    let bytes = writer.into_inner().unwrap_or_default();
    String::from_utf8(bytes).unwrap_or_default()
}

#[derive(Serialize)]
struct WiresBody<'a> {
    solved: bool,
    runs: Vec<RunItem<'a>>,
    totals: Vec<TotalItem>,
    pinouts: Vec<PinoutItem<'a>>,
    units: BTreeMap<&'static str, &'static str>,
}

#[derive(Serialize)]
struct RunItem<'a> {
    net: &'a str,
    role: &'static str,
    from: &'a str,
    to: &'a [String],
    wire: Option<String>,
    length: Option<Rounded>,
    colour: Option<&'a str>,
    continuous_current: Option<Rounded>,
    peak_current: Option<Rounded>,
    peak_at: Option<&'a str>,
    fuses: &'a [String],
    drop_at_peak: Option<Rounded>,
}

#[derive(Serialize)]
struct TotalItem {
    wire: String,
    cable: bool,
    length: Rounded,
    runs: usize,
}

#[derive(Serialize)]
struct ContactItem<'a> {
    a: &'a str,
    b: &'a str,
    net_a: Option<&'a str>,
    net_b: Option<&'a str>,
    continuous_current: Option<Rounded>,
    peak_current: Option<Rounded>,
}

#[derive(Serialize)]
struct PinoutItem<'a> {
    connector: &'a str,
    library_id: Option<&'a str>,
    contacts: Vec<ContactItem<'a>>,
}

/// The wire list as one JSON document for the plan `file`.
pub fn wires_json(file: &str, list: &WireList) -> String {
    let amps = |i: Option<uom::si::f64::ElectricCurrent>| i.map(|i| Rounded(i.get::<ampere>()));
    let body = WiresBody {
        solved: list.solved,
        runs: list
            .runs
            .iter()
            .map(|run| RunItem {
                net: &run.net,
                role: run.role.name(),
                from: &run.from,
                to: &run.to,
                wire: run.wire.map(|w| w.to_string()),
                length: run.length.map(|l| Rounded(l.get::<meter>())),
                colour: run.colour.as_deref(),
                continuous_current: amps(run.continuous),
                peak_current: amps(run.peak),
                peak_at: run.peak_at.as_deref(),
                fuses: &run.fuses,
                drop_at_peak: run.drop_at_peak.map(|v| Rounded(v.get::<volt>())),
            })
            .collect(),
        totals: list
            .totals
            .iter()
            .map(|t| TotalItem {
                wire: t.wire.to_string(),
                cable: t.cable,
                length: Rounded(t.length.get::<meter>()),
                runs: t.runs,
            })
            .collect(),
        pinouts: list
            .pinouts
            .iter()
            .map(|p| PinoutItem {
                connector: &p.connector,
                library_id: p.library_id.as_deref(),
                contacts: p
                    .contacts
                    .iter()
                    .map(|c| ContactItem {
                        a: &c.a,
                        b: &c.b,
                        net_a: c.net_a.as_deref(),
                        net_b: c.net_b.as_deref(),
                        continuous_current: amps(c.continuous),
                        peak_current: amps(c.peak),
                    })
                    .collect(),
            })
            .collect(),
        units: BTreeMap::from([
            ("length", "m"),
            ("continuous_current", "A"),
            ("peak_current", "A"),
            ("drop_at_peak", "V"),
        ]),
    };
    Envelope::new(Kind::Wires, file, body).to_text()
}
