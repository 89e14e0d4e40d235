//! The power budget: per rail and per battery, what the operating points
//! add up to — voltage windows, typical and peak currents against ratings,
//! power, conversion losses, energy and the runtime estimate.
//!
//! It reads a checked plan and computes numbers; `report` lays them out.

use crate::Checked;
use crate::analysis::{BatteryState, ModeId, OperatingPoint, battery_voltage};
use crate::model::{Chemistry, Class, PinRef};
use uom::si::electric_charge::ampere_hour;
use uom::si::electric_current::ampere;
use uom::si::electric_potential::volt;
use uom::si::f64::{
    ElectricCharge, ElectricCurrent, ElectricPotential, Energy, Power, Ratio, Time,
};
use uom::si::ratio::ratio;
use uom::si::time::hour;

/// Peukert's exponent for lead-acid batteries (Linden & Reddy, Handbook of Batteries: flooded
/// 1.2–1.3, AGM 1.05–1.15; 1.2 as in Peukert's law worked example).
pub const PEUKERT_LEAD_ACID: f64 = 1.2;
/// The rate at which lead-acid capacity is rated: the 20 h rate.
pub fn lead_acid_rated_time() -> Time {
    Time::new::<hour>(20.0)
}

/// The power budget of a checked plan: one entry per rail and per battery.
#[derive(Clone, Debug)]
pub struct Budget {
    /// Every rail fed by a source, in the order of the plan's graph.
    pub rails: Vec<RailBudget>,
    /// Every battery, in file order.
    pub batteries: Vec<BatteryBudget>,
    /// False when shorts or power loops kept the operating point from being
    /// solved: then no current or voltage figure means anything.
    pub solved: bool,
    /// Modes and battery states whose operating point did not settle
    /// (`analysis/no-convergence`); the figures leave them out.
    pub unsolved: Vec<String>,
}

/// What one rail carries: its voltage window, currents against its source's
/// rating, power and the loss in the converter feeding it.
#[derive(Clone, Debug)]
pub struct RailBudget {
    /// The rail's net names, source side first.
    pub nets: Vec<String>,
    /// The pin that feeds it (`buck.vout`).
    pub source: String,
    /// At the source, typical mode: lowest at empty battery, nominal, highest at full.
    pub voltage_empty: ElectricPotential,
    /// At the source, typical mode, nominal battery (the mean over the
    /// regulators' tolerance corners).
    pub voltage_nominal: ElectricPotential,
    /// At the source, typical mode: the highest, at full battery.
    pub voltage_full: ElectricPotential,
    /// Typical mode at nominal battery.
    pub typical_current: ElectricCurrent,
    /// The highest over every mode and battery state, `worst` included.
    pub peak_current: ElectricCurrent,
    /// The mode the peak current is drawn in.
    pub peak_mode: String,
    /// The source's current rating, if it has one.
    pub rating: Option<ElectricCurrent>,
    /// Typical mode at nominal battery.
    pub power: Power,
    /// Heat in the converter feeding the rail (typical, nominal battery).
    pub conversion_loss: Option<Power>,
}

/// What one battery delivers: its voltage window, energy, currents against
/// its discharge rating, and how long it lasts.
#[derive(Clone, Debug)]
pub struct BatteryBudget {
    /// The battery part's name (`pack`).
    pub name: String,
    /// Its cell chemistry.
    pub chemistry: Chemistry,
    /// `3S lipo`, or the chemistry alone for a pack given by its window.
    pub pack: String,
    /// Its rated capacity, when written.
    pub capacity: Option<ElectricCharge>,
    /// Open-circuit voltage when full.
    pub voltage_full: ElectricPotential,
    /// Open-circuit voltage at its nominal state.
    pub voltage_nominal: ElectricPotential,
    /// Open-circuit voltage when empty.
    pub voltage_empty: ElectricPotential,
    /// The energy it stores: nominal voltage × capacity.
    pub energy: Option<Energy>,
    /// The current it delivers in typical mode at nominal battery.
    pub typical_current: ElectricCurrent,
    /// The highest current it delivers over every mode and battery state,
    /// `worst` included.
    pub peak_current: ElectricCurrent,
    /// Its continuous discharge rating, a C-rate worked out to amperes.
    pub max_discharge: Option<ElectricCurrent>,
    /// Profile-weighted mean current at nominal battery.
    pub average_current: ElectricCurrent,
    /// The share of its capacity the runtime uses.
    pub usable: Ratio,
    /// How long it lasts at the average current; `None` without a capacity or
    /// with no current drawn.
    pub runtime: Option<Runtime>,
}

/// A battery's estimated runtime.
#[derive(Clone, Debug)]
pub struct Runtime {
    /// How long the battery lasts.
    pub time: Time,
    /// How it was estimated, for the reader (e.g. Peukert's law and its exponent).
    pub method: String,
}

fn amps(i: ElectricCurrent) -> f64 {
    i.get::<ampere>()
}

fn points(checked: &Checked) -> Vec<&OperatingPoint> {
    checked.analysis.iter().flat_map(|a| a.settled()).collect()
}

/// The largest value over the points that match.
fn highest<T: Copy + PartialOrd>(
    points: &[&OperatingPoint],
    keep: impl Fn(&OperatingPoint) -> bool,
    measure: impl Fn(&OperatingPoint) -> Option<T>,
) -> Option<(T, ModeId)> {
    let mut best: Option<(T, ModeId)> = None;
    for p in points.iter().filter(|p| keep(p)) {
        if let Some(v) = measure(p)
            && best.is_none_or(|(b, _)| v > b)
        {
            best = Some((v, p.mode));
        }
    }
    best
}

fn lowest<T: Copy + PartialOrd>(
    points: &[&OperatingPoint],
    keep: impl Fn(&OperatingPoint) -> bool,
    measure: impl Fn(&OperatingPoint) -> Option<T>,
) -> Option<T> {
    points
        .iter()
        .filter(|p| keep(p))
        .filter_map(|p| measure(p))
        .fold(None, |acc: Option<T>, v| {
            Some(acc.map_or(v, |a| if v < a { v } else { a }))
        })
}

/// The mean of a measure over the points where it is defined.
fn mean<T>(points: &[&OperatingPoint], measure: impl Fn(&OperatingPoint) -> Option<T>) -> Option<T>
where
    T: Copy + std::ops::Add<Output = T> + std::ops::Div<f64, Output = T>,
{
    let values: Vec<T> = points.iter().filter_map(|p| measure(p)).collect();
    let first = *values.first()?;
    let sum = values[1..].iter().fold(first, |acc, &v| acc + v);
    Some(sum / values.len() as f64)
}

/// Adds up a checked plan's operating points into its power budget.
///
/// When the operating point could not be solved ([`Budget::solved`] is
/// false), the currents, powers and rail voltages are zero and mean nothing.
///
/// ```
/// use railcheck::model::Library;
/// use uom::si::electric_current::ampere;
/// use uom::si::electric_potential::volt;
/// use uom::si::energy::watt_hour;
/// use uom::si::time::hour;
///
/// // A lab lamp on a 3S lithium-polymer pack (5 Ah, 15 mohm internal).
/// let plan = "\
/// railcheck: 1
/// parts:
///   pack: { use: battery/lipo-3s }
///   lamp:
///     class: load
///     pins:
///       vin: { role: supply-in, range: 9 V..13 V, max: 14 V, draw: 0.5 A }
///       gnd: { role: ground }
/// nets:
///   BATT+: [pack.pos, lamp.vin]
///   GND: [pack.neg, lamp.gnd]
/// ";
/// let checked = railcheck::check("lamp.yaml", plan, &Library::builtin()).expect("the plan reads");
/// let budget = railcheck::budget::budget(&checked);
/// assert!(budget.solved);
///
/// let pack = &budget.batteries[0];
/// assert_eq!(pack.pack, "3S lipo");
/// assert!((pack.typical_current.get::<ampere>() - 0.5).abs() < 1e-9);
/// // Energy: 3 × 3.70 V nominal × 5 Ah = 55.5 Wh (Linden & Reddy, Handbook of
/// // Batteries, lithium-polymer cell window).
/// assert!((pack.energy.unwrap().get::<watt_hour>() - 55.5).abs() < 1e-6);
/// // Runtime: usable capacity over mean current, 5 Ah / 0.5 A = 10 h.
/// let runtime = pack.runtime.as_ref().expect("a capacity and a current");
/// assert!((runtime.time.get::<hour>() - 10.0).abs() < 1e-6);
///
/// // The rail at full battery: 3 × 4.20 V less the sag, 0.5 A × 0.015 ohm
/// // (Ohm's law), = 12.6 V − 7.5 mV = 12.5925 V.
/// let rail = &budget.rails[0];
/// assert_eq!(rail.source, "pack.pos");
/// assert!((rail.voltage_full.get::<volt>() - 12.5925).abs() < 1e-6);
/// ```
pub fn budget(checked: &Checked) -> Budget {
    let plan = &checked.plan;
    let circuit = &checked.circuit;
    let points = points(checked);
    let zero_i = ElectricCurrent::new::<ampere>(0.0);
    let zero_v = ElectricPotential::new::<volt>(0.0);

    let mut rails = Vec::new();
    for (node_id, node) in circuit.nodes.iter().enumerate() {
        if node.is_ground() {
            continue;
        }
        let (Some(root), Some(source)) = (circuit.root[node_id], circuit.source[node_id]) else {
            continue;
        };
        let PinRef { part, pin } = source;
        let typical =
            |s: BatteryState| move |p: &OperatingPoint| p.mode == ModeId::TYPICAL && p.battery == s;
        let at_source = |p: &OperatingPoint| p.pin_voltage.get(part, pin);
        let current = |p: &OperatingPoint| Some(p.net_current[root]);
        let (peak_current, peak_mode) =
            highest(&points, |_| true, current).unwrap_or((zero_i, ModeId::TYPICAL));
        // The typical figures are means over the regulators' tolerance
        // corners at nominal battery, all taken over the same points, so
        // power in equals power out plus loss.
        let nominal_points: Vec<&OperatingPoint> = points
            .iter()
            .copied()
            .filter(|p| typical(BatteryState::Nominal)(p))
            .collect();
        let typical_current = mean(&nominal_points, |p| current(p)).unwrap_or(zero_i);
        let voltage_nominal = mean(&nominal_points, at_source).unwrap_or(zero_v);
        let power = mean(&nominal_points, |p| {
            Some(at_source(p)? * p.net_current[root])
        })
        .unwrap_or(zero_v * zero_i);
        let rating = match &plan.parts[part].class {
            Class::Regulator(r) => r.current.map(|c| c.value),
            Class::Battery(b) => b.max_discharge_current(),
            _ => plan.parts[part].pins[pin].current(),
        };
        let conversion_loss = mean(&nominal_points, |p| {
            let r = p.regulators[part]?;
            Some(r.input_voltage * r.input_current - r.output_voltage * r.output_current)
        });
        let mut nets = vec![plan.nets[root].name.clone()];
        nets.extend(
            node.nets
                .iter()
                .filter(|&&n| n != root)
                .map(|&n| plan.nets[n].name.clone()),
        );
        rails.push(RailBudget {
            nets,
            source: format!(
                "{}.{}",
                plan.parts[part].name, plan.parts[part].pins[pin].name
            ),
            voltage_empty: lowest(&points, typical(BatteryState::Empty), at_source)
                .unwrap_or(zero_v),
            voltage_nominal,
            voltage_full: highest(&points, typical(BatteryState::Full), at_source)
                .map_or(zero_v, |v| v.0),
            typical_current,
            peak_current,
            peak_mode: peak_mode.name(plan).to_string(),
            rating,
            power,
            conversion_loss,
        });
    }

    let mut batteries = Vec::new();
    for (part_id, part) in plan.parts.iter().enumerate() {
        let Class::Battery(battery) = &part.class else {
            continue;
        };
        let window = BatteryState::ALL.map(|s| battery_voltage(plan, part_id, s).unwrap_or(zero_v));
        let battery_current = |p: &OperatingPoint| p.batteries[part_id].map(|b| b.current);
        // A mode's current: the mean over tolerance corners at nominal battery,
        // as for the rails.
        let in_mode = |mode: ModeId| {
            let at: Vec<&OperatingPoint> = points
                .iter()
                .copied()
                .filter(|p| p.mode == mode && p.battery == BatteryState::Nominal)
                .collect();
            mean(&at, battery_current).unwrap_or(zero_i)
        };
        let typical_current = in_mode(ModeId::TYPICAL);
        let peak_current = highest(&points, |_| true, battery_current).map_or(zero_i, |v| v.0);
        // The profile weights each mode's current by its share of the time
        // (default: all of it in `typical`, format reference §6).
        let average_current = if plan.profile.is_empty() {
            typical_current
        } else {
            plan.profile.iter().fold(zero_i, |sum, share| {
                let mode = ModeId::all(plan)
                    .find(|m| m.name(plan) == share.mode)
                    .unwrap_or(ModeId::TYPICAL);
                sum + in_mode(mode) * share.share.get::<ratio>()
            })
        };
        let capacity = battery.capacity.map(|c| c.value);
        let runtime =
            capacity.and_then(|c| runtime(battery.chemistry, c, battery.usable, average_current));
        batteries.push(BatteryBudget {
            name: part.name.clone(),
            chemistry: battery.chemistry,
            pack: battery.pack_name(),
            capacity,
            voltage_full: window[0],
            voltage_nominal: window[1],
            voltage_empty: window[2],
            // Wh = V_nominal × Ah (Linden & Reddy, Handbook of Batteries).
            energy: capacity.map(|c| window[1] * c),
            typical_current,
            peak_current,
            max_discharge: battery.max_discharge_current(),
            average_current,
            usable: battery.usable,
            runtime,
        });
    }
    let mut unsolved: Vec<String> = Vec::new();
    for point in checked.analysis.iter().flat_map(|a| &a.points) {
        if point.unsettled.is_some() {
            let label = format!(
                "mode `{}` at {} battery",
                point.mode.name(plan),
                point.battery.name()
            );
            if !unsolved.contains(&label) {
                unsolved.push(label);
            }
        }
    }
    Budget {
        rails,
        batteries,
        solved: checked.analysis.is_some(),
        unsolved,
    }
}

/// Runtime at a mean current: the usable share of the time the rated
/// capacity lasts. Lead-acid follows Peukert's law t = H·(C / (I·H))^k with
/// C the rated capacity (Linden & Reddy, Handbook of Batteries, Peukert's law worked example); the other chemistries
/// deliver close to their rated capacity, t = C / I.
pub fn runtime(
    chemistry: Chemistry,
    rated: ElectricCharge,
    usable: Ratio,
    current: ElectricCurrent,
) -> Option<Runtime> {
    let amps = amps(current);
    if amps <= 0.0 {
        return None;
    }
    let ah = rated.get::<ampere_hour>();
    let share = usable.get::<ratio>();
    Some(if chemistry == Chemistry::LeadAcid {
        let h = lead_acid_rated_time().get::<hour>();
        Runtime {
            time: Time::new::<hour>(share * h * (ah / (amps * h)).powf(PEUKERT_LEAD_ACID)),
            method: format!(
                "Peukert's law, k = {PEUKERT_LEAD_ACID} (lead-acid), capacity rated at the {h} h rate"
            ),
        }
    } else {
        Runtime {
            time: Time::new::<hour>(share * ah / amps),
            method: "usable capacity ÷ mean current".to_string(),
        }
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn all() -> Ratio {
        Ratio::new::<ratio>(1.0)
    }

    #[test]
    fn peukert_matches_worked_example_w12() {
        // Peukert's law worked example: SLA 7 Ah at 20 h, k = 1.2, 2.0 A:
        // t = 20 × (7 / (2 × 20))^1.2 = 2.47 h (against a naive 3.50 h).
        let t = runtime(
            Chemistry::LeadAcid,
            ElectricCharge::new::<ampere_hour>(7.0),
            all(),
            ElectricCurrent::new::<ampere>(2.0),
        )
        .unwrap();
        assert!((t.time.get::<hour>() - 2.47).abs() / 2.47 < 0.01);
        assert!(t.method.contains("1.2"));
    }

    #[test]
    fn peukert_applies_to_the_rated_capacity_then_the_usable_share() {
        // Peukert's C is the rated capacity at the 20 h rate (Peukert's law worked example); using
        // 80 % of it leaves 0.8 × 2.47 h = 1.98 h, not Peukert on 5.6 Ah (1.89 h).
        let t = runtime(
            Chemistry::LeadAcid,
            ElectricCharge::new::<ampere_hour>(7.0),
            Ratio::new::<ratio>(0.8),
            ElectricCurrent::new::<ampere>(2.0),
        )
        .unwrap();
        assert!((t.time.get::<hour>() - 1.98).abs() < 0.01, "{:?}", t.time);
    }

    #[test]
    fn lithium_runtime_is_usable_capacity_over_current_w13() {
        // Handbook of Batteries pack-window worked example: 5.0 Ah at 1.5 A average, 80 % usable: 2.67 h.
        let t = runtime(
            Chemistry::Lipo,
            ElectricCharge::new::<ampere_hour>(5.0),
            Ratio::new::<ratio>(0.8),
            ElectricCurrent::new::<ampere>(1.5),
        )
        .unwrap();
        assert!((t.time.get::<hour>() - 2.6667).abs() < 0.001);
    }

    #[test]
    fn no_runtime_without_current() {
        let none = runtime(
            Chemistry::Lipo,
            ElectricCharge::new::<ampere_hour>(5.0),
            all(),
            ElectricCurrent::new::<ampere>(0.0),
        );
        assert!(none.is_none());
    }
}
