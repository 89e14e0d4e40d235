//! Quantity strings of a wiring plan, turned into typed `uom` values and back.
//!
//! For: parsing every quantity form of the netlist format (§2) — single values such as `12 V`,
//! `2200 mAh` or `10 kΩ`, ranges `4.5..5.5 V`, tolerances `5 V ±2%`, wire sizes `18 AWG` /
//! `0.75 mm²`, shares `80 %` and discharge rates `25C` — and formatting typed values into short,
//! deterministic text for messages (`12.6 V`, `350 mA`, `50 mΩ`). Every parse error carries a byte
//! span inside the scalar it was given, on character boundaries, and a hint that says how to fix it.
//!
//! Not for: finding the scalar in the YAML (the caller shifts spans into the file), judging
//! whether a value is plausible for a part (rules do that), or machine-readable output (JSON
//! carries plain numbers in fixed units).

use std::fmt;
use std::ops::Range;

use uom::si::area::square_millimeter;
use uom::si::electric_charge::{ampere_hour, coulomb};
use uom::si::electric_current::ampere;
use uom::si::electric_potential::volt;
use uom::si::electrical_resistance::ohm;
use uom::si::f64::{
    Area, ElectricCharge, ElectricCurrent, ElectricPotential, ElectricalResistance, Length, Power,
    Ratio, ThermalResistance, ThermodynamicTemperature, Time,
};
use uom::si::length::meter;
use uom::si::power::watt;
use uom::si::ratio::ratio;
use uom::si::thermal_resistance::kelvin_per_watt;
use uom::si::thermodynamic_temperature::{degree_celsius, kelvin};

/// A problem in one scalar. `span` is a byte range inside the scalar text given to the parser
/// (the caller shifts it into the file). `hint` tells how to fix it, e.g. "write `5 Ah`".
#[derive(Debug, Clone, PartialEq)]
pub struct UnitError {
    /// What is wrong with the value (`` `A` is a unit of current, but a charge (capacity) is needed here ``).
    pub message: String,
    /// How to fix it.
    pub hint: String,
    /// The byte range of the offending text inside the scalar.
    pub span: Range<usize>,
}

impl fmt::Display for UnitError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message)
    }
}

impl std::error::Error for UnitError {}

/// Value with bounds: a single value has min = nominal = max; `4.5..5.5 V` has nominal = midpoint;
/// `5 V ±2%` has min 4.9, nominal 5, max 5.1; also accept `5 V ±0.1 V` and `+-` for `±`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Band<Q> {
    /// The lowest value of the band.
    pub min: Q,
    /// The value it is meant to have.
    pub nominal: Q,
    /// The highest value of the band.
    pub max: Q,
}

/// A conductor size: an AWG gauge number or a metric cross-section.
///
/// Gauges thicker than 0 AWG are written `n/0`; they are stored as `1 − n`, so `4/0 AWG` is
/// `Awg(-3)`, which keeps the ASTM B258 diameter formula valid for them.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum WireSize {
    /// An American Wire Gauge number (ASTM B258), `n/0` stored as `1 − n`.
    Awg(i32),
    /// A conductor's cross-section (`0.75 mm²`).
    Metric(Area),
}

/// A battery's maximum discharge: an absolute current, or a C-rate (multiple of the capacity).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum DischargeRate {
    /// An absolute current (`20 A`).
    Current(ElectricCurrent),
    /// A multiple of the capacity per hour (`25C`: 25 × 5 Ah / h = 125 A for a 5 Ah
    /// pack).
    CRate(f64),
}

impl fmt::Display for WireSize {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match *self {
            WireSize::Awg(gauge) if gauge >= 1 => write!(f, "{gauge} AWG"),
            // i64 so that no i32 can overflow the subtraction.
            WireSize::Awg(gauge) => write!(f, "{}/0 AWG", 1 - i64::from(gauge)),
            WireSize::Metric(area) => f.write_str(&show_scaled(
                area.get::<square_millimeter>(),
                SQUARE_MILLIMETERS,
            )),
        }
    }
}

// ---------------------------------------------------------------------------------------------
// Public parsers
// ---------------------------------------------------------------------------------------------

/// A single voltage: `12 V`, `3.3V`, `500 mV`, `1 kV`.
pub fn voltage(text: &str) -> Result<ElectricPotential, UnitError> {
    single_value(text, Kind::Voltage).map(ElectricPotential::new::<volt>)
}

/// A voltage band: a single voltage, a range `4.5..5.5 V`, or a tolerance `5 V ±2%` / `5 V ±0.1 V`.
///
/// ```
/// use railcheck::units;
/// use uom::si::electric_potential::volt;
///
/// // 5 V ±2 %: 2 % of 5 V is 0.1 V, so 4.9 V..5.1 V around 5 V.
/// let output = units::voltage_band("5 V ±2%").unwrap();
/// assert!((output.min.get::<volt>() - 4.9).abs() < 1e-9);
/// assert!((output.nominal.get::<volt>() - 5.0).abs() < 1e-9);
/// assert!((output.max.get::<volt>() - 5.1).abs() < 1e-9);
///
/// // A range's nominal is its midpoint: (4.5 V + 5.5 V) / 2 = 5 V.
/// let range = units::voltage_band("4.5..5.5 V").unwrap();
/// assert!((range.nominal.get::<volt>() - 5.0).abs() < 1e-9);
/// ```
pub fn voltage_band(text: &str) -> Result<Band<ElectricPotential>, UnitError> {
    band(text, Kind::Voltage).map(|b| b.typed(ElectricPotential::new::<volt>))
}

/// A single current: `2 A`, `350 mA`, `50 uA`, `50 µA`.
pub fn current(text: &str) -> Result<ElectricCurrent, UnitError> {
    single_value(text, Kind::Current).map(ElectricCurrent::new::<ampere>)
}

/// A current band: a single current, a range `1..2 A`, or a tolerance `2 A ±10%`.
pub fn current_band(text: &str) -> Result<Band<ElectricCurrent>, UnitError> {
    band(text, Kind::Current).map(|b| b.typed(ElectricCurrent::new::<ampere>))
}

/// A charge (battery capacity): `5 Ah`, `2200 mAh`.
///
/// A current where a charge belongs is refused, with the span of the unit and
/// a hint:
///
/// ```
/// use railcheck::units;
/// use uom::si::electric_charge::{ampere_hour, coulomb};
///
/// // 1 Ah is 3600 C (one ampere for one hour), so 2200 mAh is 7920 C.
/// let capacity = units::charge("2200 mAh").unwrap();
/// assert!((capacity.get::<ampere_hour>() - 2.2).abs() < 1e-9);
/// assert!((capacity.get::<coulomb>() - 7920.0).abs() < 1e-6);
///
/// let error = units::charge("5 A").unwrap_err();
/// assert_eq!(&"5 A"[error.span.clone()], "A");
/// assert!(error.message.contains("unit of current"), "{}", error.message);
/// assert!(error.hint.contains("`5 Ah`"), "{}", error.hint);
/// ```
pub fn charge(text: &str) -> Result<ElectricCharge, UnitError> {
    single_value(text, Kind::Charge).map(ElectricCharge::new::<coulomb>)
}

/// A power: `15 W`, `250 mW`, `1.2 kW`.
pub fn power(text: &str) -> Result<Power, UnitError> {
    single_value(text, Kind::Power).map(Power::new::<watt>)
}

/// A resistance: `0.05 ohm`, `50 mohm`, `10 kohm`, `10 kΩ`, `2 MΩ`, or a bare suffix `10k`, `1M`.
///
/// ```
/// use railcheck::units;
/// use uom::si::electrical_resistance::ohm;
///
/// // The SI prefixes: kilo is 10³, milli 10⁻³.
/// assert_eq!(units::resistance("4.7 kΩ").unwrap().get::<ohm>(), 4700.0);
/// assert!((units::resistance("50 mohm").unwrap().get::<ohm>() - 0.05).abs() < 1e-12);
/// ```
pub fn resistance(text: &str) -> Result<ElectricalResistance, UnitError> {
    single_value(text, Kind::Resistance).map(ElectricalResistance::new::<ohm>)
}

/// A temperature: `35 degC`, `35 °C`, `308 K`. Negative Celsius values are fine; below absolute
/// zero is not.
pub fn temperature(text: &str) -> Result<ThermodynamicTemperature, UnitError> {
    single_value(text, Kind::Temperature).map(ThermodynamicTemperature::new::<kelvin>)
}

/// A thermal resistance: `50 degC/W`, `50 °C/W`, `50 K/W`.
pub fn thermal_resistance(text: &str) -> Result<ThermalResistance, UnitError> {
    single_value(text, Kind::ThermalResistance).map(ThermalResistance::new::<kelvin_per_watt>)
}

/// A length: `0.6 m`, `60 cm`, `600 mm`, `24 in`, `2 ft`.
pub fn length(text: &str) -> Result<Length, UnitError> {
    single_value(text, Kind::Length).map(Length::new::<meter>)
}

/// A duration: `2 s`, `500 ms`, `1.5 min`.
pub fn duration(text: &str) -> Result<Time, UnitError> {
    single_value(text, Kind::Duration).map(Time::new::<uom::si::time::second>)
}

/// A capacitance: `470 uF`, `1000 µF`, `2.2 mF`, `100 nF`.
pub fn capacitance(text: &str) -> Result<uom::si::f64::Capacitance, UnitError> {
    single_value(text, Kind::Capacitance)
        .map(uom::si::f64::Capacitance::new::<uom::si::capacitance::farad>)
}

/// A mass: `250 g`, `1.2 kg`.
pub fn mass(text: &str) -> Result<uom::si::f64::Mass, UnitError> {
    single_value(text, Kind::Mass).map(uom::si::f64::Mass::new::<uom::si::mass::kilogram>)
}

/// A wire size: `18 AWG`, `4/0 AWG` (also `0000 AWG`), `0.75 mm2`, `0.75 mm²`.
///
/// ```
/// use railcheck::units::{self, WireSize};
///
/// assert_eq!(units::wire_size("18 AWG").unwrap(), WireSize::Awg(18));
/// // ASTM B258 numbers the gauges past 0 as 1/0, 2/0, …: n/0 is 1 − n.
/// assert_eq!(units::wire_size("4/0 AWG").unwrap(), WireSize::Awg(-3));
/// assert!(units::wire_size("18 AWGG").is_err());
/// ```
pub fn wire_size(text: &str) -> Result<WireSize, UnitError> {
    let expect = Expect {
        wanted: "a wire size",
        example_unit: "AWG",
        accepted: WIRE_UNITS.to_vec(),
        summary: "`AWG` (gauge) or `mm2` / `mm²` (cross-section)",
        signed: false,
    };
    let span = single_span(text, &expect)?;
    if let Some(size) = thick_gauge(text, span.clone(), &expect)? {
        return Ok(size);
    }
    let term = lex_term(text, span, &expect)?;
    let Some(unit_span) = term.unit.clone() else {
        return Err(problem(
            format!("`{}` has no unit", excerpt(term.number_text)),
            format!(
                "write `{n} AWG` for a gauge or `{n} mm2` for a cross-section",
                n = excerpt(term.number_text)
            ),
            term.number_span,
        ));
    };
    match &text[unit_span.clone()] {
        "AWG" => gauge_from_term(text, &term),
        "mm2" | "mm\u{b2}" => {
            if term.number <= 0.0 {
                return Err(problem(
                    format!("`{}` is not a wire size", excerpt(&text[term.span.clone()])),
                    "a wire's cross-section must be above zero, like `0.75 mm2`",
                    term.number_span,
                ));
            }
            Ok(WireSize::Metric(Area::new::<square_millimeter>(
                term.number,
            )))
        }
        _ => Err(unit_problem(text, &term, unit_span, &expect)),
    }
}

/// A share: `80 %`, `80%`, or a plain fraction `0.8`; between 0 and 100 %.
pub fn share(text: &str) -> Result<Ratio, UnitError> {
    let expect = Expect {
        wanted: "a share",
        example_unit: "%",
        accepted: vec!["%"],
        summary: "`%`, or a plain fraction such as `0.8`",
        signed: false,
    };
    let span = single_span(text, &expect)?;
    let term = lex_term(text, span, &expect)?;
    let as_fraction = match term.unit.clone() {
        None => term.number,
        Some(unit_span) if &text[unit_span.clone()] == "%" => term.number / 100.0,
        Some(unit_span) => return Err(unit_problem(text, &term, unit_span, &expect)),
    };
    let written = excerpt(&text[term.span.clone()]);
    if term.number < 0.0 {
        return Err(problem(
            format!("`{written}` is negative"),
            "a share lies between 0 % and 100 %",
            term.number_span,
        ));
    }
    if as_fraction > 1.0 {
        let as_percent_is_valid = term.unit.is_none() && term.number <= 100.0;
        let hint = if as_percent_is_valid {
            format!(
                "write `{n} %`, or the fraction `{f}`",
                n = excerpt(term.number_text),
                f = term.number / 100.0
            )
        } else {
            "a share lies between 0 % and 100 % (as a fraction, between 0 and 1)".to_string()
        };
        let message = if term.unit.is_none() {
            format!("`{written}` is more than 1 as a fraction")
        } else {
            format!("`{written}` is more than 100 %")
        };
        return Err(problem(message, hint, term.span));
    }
    Ok(Ratio::new::<ratio>(as_fraction + 0.0))
}

/// A maximum discharge: a current `20 A`, or a C-rate `25C` / `25 C` (capital C only).
///
/// ```
/// use railcheck::units::{self, DischargeRate};
///
/// assert_eq!(units::discharge_rate("25C").unwrap(), DischargeRate::CRate(25.0));
/// assert!(matches!(units::discharge_rate("20 A"), Ok(DischargeRate::Current(_))));
/// ```
pub fn discharge_rate(text: &str) -> Result<DischargeRate, UnitError> {
    let mut accepted: Vec<&'static str> = CURRENT_UNITS.iter().map(|u| u.text).collect();
    accepted.push("C");
    let expect = Expect {
        wanted: "a discharge rate",
        example_unit: "A",
        accepted,
        summary: "a current (`A`, `mA`) or a C-rate (`C`)",
        signed: false,
    };
    let span = single_span(text, &expect)?;
    let term = lex_term(text, span, &expect)?;
    let Some(unit_span) = term.unit.clone() else {
        return Err(problem(
            format!("`{}` has no unit", excerpt(term.number_text)),
            format!(
                "write `{n} A` for a current or `{n}C` for a C-rate (times the capacity)",
                n = excerpt(term.number_text)
            ),
            term.number_span,
        ));
    };
    if term.number < 0.0 {
        return Err(negative(text, &term, &expect));
    }
    let unit = &text[unit_span.clone()];
    if unit == "C" {
        return Ok(DischargeRate::CRate(term.number + 0.0));
    }
    match CURRENT_UNITS.iter().find(|u| u.text == unit) {
        Some(spelling) => {
            let amperes = to_base(text, &term, spelling, Kind::Current, &expect)?;
            Ok(DischargeRate::Current(ElectricCurrent::new::<ampere>(
                amperes,
            )))
        }
        None => Err(unit_problem(text, &term, unit_span, &expect)),
    }
}

/// The kinds of quantity a plan's fields take, for the format's declaration
/// (`model::format`) and the JSON Schema generated from it.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Quantity {
    /// A single voltage `12 V`.
    Voltage,
    /// A voltage, a range `4.5..5.5 V` or a tolerance `5 V ±2%`.
    VoltageBand,
    /// A current `2 A`.
    Current,
    /// A charge, a battery's capacity: `5 Ah`.
    Charge,
    /// A power `250 mW`.
    Power,
    /// A resistance `10 kohm`.
    Resistance,
    /// A temperature `35 degC`.
    Temperature,
    /// A thermal resistance `50 degC/W`.
    ThermalResistance,
    /// A length `0.8 m`.
    Length,
    /// A wire size `14 AWG` or `2.5 mm2`.
    WireSize,
    /// `80 %` or a plain fraction `0.8`.
    Share,
    /// A current or a C-rate `25C`.
    DischargeRate,
    /// How long something lasts: `2 s`, `500 ms`, `1 min`.
    Duration,
    /// A capacitance `470 uF`.
    Capacitance,
    /// A mass `250 g`.
    Mass,
}

impl Quantity {
    /// Every kind, in the order the format reference lists them.
    pub const ALL: [Quantity; 15] = [
        Quantity::Voltage,
        Quantity::VoltageBand,
        Quantity::Current,
        Quantity::Charge,
        Quantity::Power,
        Quantity::Resistance,
        Quantity::Temperature,
        Quantity::ThermalResistance,
        Quantity::Length,
        Quantity::WireSize,
        Quantity::Share,
        Quantity::DischargeRate,
        Quantity::Duration,
        Quantity::Capacitance,
        Quantity::Mass,
    ];

    /// What the format reference calls it.
    pub fn name(self) -> &'static str {
        match self {
            Quantity::Voltage => "voltage",
            Quantity::VoltageBand => "voltage range",
            Quantity::Current => "current",
            Quantity::Charge => "charge",
            Quantity::Power => "power",
            Quantity::Resistance => "resistance",
            Quantity::Temperature => "temperature",
            Quantity::ThermalResistance => "thermal resistance",
            Quantity::Length => "length",
            Quantity::WireSize => "wire size",
            Quantity::Share => "share",
            Quantity::DischargeRate => "discharge rate",
            Quantity::Duration => "duration",
            Quantity::Capacitance => "capacitance",
            Quantity::Mass => "mass",
        }
    }

    /// Whether `text` reads as this kind of quantity; the error says why not.
    pub fn parse(self, text: &str) -> Result<(), UnitError> {
        match self {
            Quantity::Voltage => voltage(text).map(drop),
            Quantity::VoltageBand => voltage_band(text).map(drop),
            Quantity::Current => current(text).map(drop),
            Quantity::Charge => charge(text).map(drop),
            Quantity::Power => power(text).map(drop),
            Quantity::Resistance => resistance(text).map(drop),
            Quantity::Temperature => temperature(text).map(drop),
            Quantity::ThermalResistance => thermal_resistance(text).map(drop),
            Quantity::Length => length(text).map(drop),
            Quantity::WireSize => wire_size(text).map(drop),
            Quantity::Share => share(text).map(drop),
            Quantity::DischargeRate => discharge_rate(text).map(drop),
            Quantity::Duration => duration(text).map(drop),
            Quantity::Capacitance => capacitance(text).map(drop),
            Quantity::Mass => mass(text).map(drop),
        }
    }

    /// The unit spellings this kind accepts after its number.
    pub fn units(self) -> Vec<&'static str> {
        let of = |kind: Kind| kind.spellings().iter().map(|s| s.text).collect::<Vec<_>>();
        match self {
            Quantity::Voltage | Quantity::VoltageBand => of(Kind::Voltage),
            Quantity::Current => of(Kind::Current),
            Quantity::Charge => of(Kind::Charge),
            Quantity::Power => of(Kind::Power),
            Quantity::Resistance => of(Kind::Resistance),
            Quantity::Temperature => of(Kind::Temperature),
            Quantity::ThermalResistance => of(Kind::ThermalResistance),
            Quantity::Length => of(Kind::Length),
            Quantity::Duration => of(Kind::Duration),
            Quantity::Capacitance => of(Kind::Capacitance),
            Quantity::Mass => of(Kind::Mass),
            Quantity::WireSize => WIRE_UNITS.to_vec(),
            Quantity::Share => vec!["%"],
            Quantity::DischargeRate => {
                let mut units = of(Kind::Current);
                units.push("C");
                units
            }
        }
    }

    /// Whether a range (`a..b`) or a tolerance (`±x`) is accepted.
    pub fn is_band(self) -> bool {
        self == Quantity::VoltageBand
    }
}

// ---------------------------------------------------------------------------------------------
// Public formatters
// ---------------------------------------------------------------------------------------------

/// `470 µF`, `2200 µF`, `100 nF`, `1 F`: capacitors are named in
/// microfarads up to a farad.
pub fn show_capacitance(c: uom::si::f64::Capacitance) -> String {
    show_scaled(c.get::<uom::si::capacitance::farad>(), FARADS)
}

/// `12.6 V`, `5.25 V`, `212 mV`, `1.2 kV`.
///
/// ```
/// use railcheck::units::show_voltage;
/// use uom::si::electric_potential::volt;
/// use uom::si::f64::ElectricPotential;
///
/// // A full 3S lithium-polymer pack: 3 × 4.20 V = 12.6 V.
/// assert_eq!(show_voltage(ElectricPotential::new::<volt>(3.0 * 4.2)), "12.6 V");
/// assert_eq!(show_voltage(ElectricPotential::new::<volt>(0.212)), "212 mV");
/// ```
pub fn show_voltage(v: ElectricPotential) -> String {
    show_scaled(v.get::<volt>(), VOLTS)
}

/// `2.5 A`, `350 mA`, `50 µA`.
pub fn show_current(i: ElectricCurrent) -> String {
    show_scaled(i.get::<ampere>(), AMPERES)
}

/// `5.9 W`, `250 mW`, `1.2 kW`.
pub fn show_power(p: Power) -> String {
    show_scaled(p.get::<watt>(), WATTS)
}

/// `50 mΩ`, `4.7 Ω`, `10 kΩ`, `2.2 MΩ`.
pub fn show_resistance(r: ElectricalResistance) -> String {
    show_scaled(r.get::<ohm>(), OHMS)
}

/// `203 °C`, `-40 °C`.
pub fn show_temperature(t: ThermodynamicTemperature) -> String {
    // Going through kelvin leaves float noise such as 5.7e-14 °C where the value is 0 °C;
    // hundredths of a degree are far below anything a wiring check can tell apart.
    let celsius = (t.get::<degree_celsius>() * 100.0).round() / 100.0;
    show_scaled(celsius, DEGREES_CELSIUS)
}

/// `50 °C/W`: a kelvin per watt and a degree Celsius per watt are the same size.
pub fn show_thermal_resistance(r: ThermalResistance) -> String {
    show_scaled(r.get::<kelvin_per_watt>(), DEGREES_CELSIUS_PER_WATT)
}

/// `5 Ah`, `2.2 Ah`, `350 mAh`.
pub fn show_charge(q: ElectricCharge) -> String {
    show_scaled(q.get::<ampere_hour>(), AMPERE_HOURS)
}

/// `0.8 m`, `12.5 m`, `5 mm` (millimetres only below a centimetre).
pub fn show_length(l: Length) -> String {
    show_scaled(l.get::<meter>(), METERS)
}

/// `2 s`, `100 ms`.
pub fn show_duration(t: Time) -> String {
    show_scaled(t.get::<uom::si::time::second>(), SECONDS)
}

/// `250 g`, `1.2 kg`: masses in grams up to a kilogram.
pub fn show_mass(m: uom::si::f64::Mass) -> String {
    show_scaled(m.get::<uom::si::mass::kilogram>(), KILOGRAMS)
}

/// `80 %`, `4.24 %`.
pub fn show_share(r: Ratio) -> String {
    show_scaled(r.get::<ratio>() * 100.0, PERCENT)
}

// ---------------------------------------------------------------------------------------------
// Kinds of quantity and their spellings
// ---------------------------------------------------------------------------------------------

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Kind {
    Voltage,
    Current,
    Charge,
    Power,
    Resistance,
    Temperature,
    ThermalResistance,
    Length,
    Duration,
    Capacitance,
    Mass,
}

const ALL_KINDS: [Kind; 11] = [
    Kind::Voltage,
    Kind::Current,
    Kind::Charge,
    Kind::Power,
    Kind::Resistance,
    Kind::Temperature,
    Kind::ThermalResistance,
    Kind::Length,
    Kind::Duration,
    Kind::Capacitance,
    Kind::Mass,
];

/// One accepted spelling of a unit. In the kind's base unit (V, A, C, W, Ω, K, K/W, m) a number
/// written with it is worth `number × numerator / denominator + offset`. A fraction keeps
/// `500 mV` as exact as one division allows.
struct Spelling {
    text: &'static str,
    numerator: f64,
    denominator: f64,
    offset: f64,
}

const fn scaled(text: &'static str, numerator: f64, denominator: f64) -> Spelling {
    Spelling {
        text,
        numerator,
        denominator,
        offset: 0.0,
    }
}

const VOLTAGE_UNITS: &[Spelling] = &[
    scaled("V", 1.0, 1.0),
    scaled("mV", 1.0, 1e3),
    scaled("kV", 1e3, 1.0),
];

const CURRENT_UNITS: &[Spelling] = &[
    scaled("A", 1.0, 1.0),
    scaled("mA", 1.0, 1e3),
    scaled("uA", 1.0, 1e6),
    scaled("\u{b5}A", 1.0, 1e6),
    scaled("\u{3bc}A", 1.0, 1e6),
];

// 1 Ah = 3600 C.
const CHARGE_UNITS: &[Spelling] = &[scaled("Ah", 3600.0, 1.0), scaled("mAh", 3600.0, 1e3)];

const POWER_UNITS: &[Spelling] = &[
    scaled("W", 1.0, 1.0),
    scaled("mW", 1.0, 1e3),
    scaled("kW", 1e3, 1.0),
];

/// Greek capital omega (U+03A9) first, so that suggestions use the common code point; the ohm
/// sign (U+2126) is accepted too. The bare `k` / `M` suffixes come last.
const RESISTANCE_UNITS: &[Spelling] = &[
    scaled("ohm", 1.0, 1.0),
    scaled("mohm", 1.0, 1e3),
    scaled("kohm", 1e3, 1.0),
    scaled("Mohm", 1e6, 1.0),
    scaled("Ohm", 1.0, 1.0),
    scaled("mOhm", 1.0, 1e3),
    scaled("kOhm", 1e3, 1.0),
    scaled("MOhm", 1e6, 1.0),
    scaled("\u{3a9}", 1.0, 1.0),
    scaled("m\u{3a9}", 1.0, 1e3),
    scaled("k\u{3a9}", 1e3, 1.0),
    scaled("M\u{3a9}", 1e6, 1.0),
    scaled("\u{2126}", 1.0, 1.0),
    scaled("m\u{2126}", 1.0, 1e3),
    scaled("k\u{2126}", 1e3, 1.0),
    scaled("M\u{2126}", 1e6, 1.0),
    scaled("k", 1e3, 1.0),
    scaled("M", 1e6, 1.0),
];

/// Resistance suffixes too short to name a kind of quantity in a "wrong kind" message.
const BARE_SUFFIXES: [&str; 2] = ["k", "M"];

/// T/K = t/°C + 273.15.
const CELSIUS_OFFSET: f64 = 273.15;

const TEMPERATURE_UNITS: &[Spelling] = &[
    Spelling {
        text: "degC",
        numerator: 1.0,
        denominator: 1.0,
        offset: CELSIUS_OFFSET,
    },
    Spelling {
        text: "\u{b0}C",
        numerator: 1.0,
        denominator: 1.0,
        offset: CELSIUS_OFFSET,
    },
    Spelling {
        text: "\u{2103}",
        numerator: 1.0,
        denominator: 1.0,
        offset: CELSIUS_OFFSET,
    },
    scaled("K", 1.0, 1.0),
];

/// A temperature difference of 1 °C equals 1 K, so all spellings share one scale.
const THERMAL_RESISTANCE_UNITS: &[Spelling] = &[
    scaled("degC/W", 1.0, 1.0),
    scaled("\u{b0}C/W", 1.0, 1.0),
    scaled("\u{2103}/W", 1.0, 1.0),
    scaled("K/W", 1.0, 1.0),
];

/// The inch is 25.4 mm and the foot 304.8 mm exactly.
const LENGTH_UNITS: &[Spelling] = &[
    scaled("m", 1.0, 1.0),
    scaled("cm", 1.0, 100.0),
    scaled("mm", 1.0, 1e3),
    scaled("in", 254.0, 1e4),
    scaled("ft", 3048.0, 1e4),
];

/// A minute is 60 s exactly.
const DURATION_UNITS: &[Spelling] = &[
    scaled("s", 1.0, 1.0),
    scaled("ms", 1.0, 1e3),
    scaled("min", 60.0, 1.0),
];

const CAPACITANCE_UNITS: &[Spelling] = &[
    scaled("F", 1.0, 1.0),
    scaled("mF", 1.0, 1e3),
    scaled("uF", 1.0, 1e6),
    scaled("\u{b5}F", 1.0, 1e6),
    scaled("\u{3bc}F", 1.0, 1e6),
    scaled("nF", 1.0, 1e9),
];

/// A gram is a thousandth of the kilogram, the base unit.
const MASS_UNITS: &[Spelling] = &[scaled("kg", 1.0, 1.0), scaled("g", 1.0, 1e3)];

const WIRE_UNITS: [&str; 3] = ["AWG", "mm2", "mm\u{b2}"];

/// The thickest gauge: ASTM B258 runs from No. 0000 (4/0).
const THICKEST_ZEROS: u32 = 4;

/// Not a standard's limit: a bound that turns typos such as `180 AWG` into errors while leaving
/// every hookup and magnet wire size far inside.
const FINEST_GAUGE: f64 = 50.0;

impl Kind {
    fn spellings(self) -> &'static [Spelling] {
        match self {
            Kind::Voltage => VOLTAGE_UNITS,
            Kind::Current => CURRENT_UNITS,
            Kind::Charge => CHARGE_UNITS,
            Kind::Power => POWER_UNITS,
            Kind::Resistance => RESISTANCE_UNITS,
            Kind::Temperature => TEMPERATURE_UNITS,
            Kind::ThermalResistance => THERMAL_RESISTANCE_UNITS,
            Kind::Length => LENGTH_UNITS,
            Kind::Duration => DURATION_UNITS,
            Kind::Capacitance => CAPACITANCE_UNITS,
            Kind::Mass => MASS_UNITS,
        }
    }

    fn noun(self) -> &'static str {
        match self {
            Kind::Voltage => "voltage",
            Kind::Current => "current",
            Kind::Charge => "charge",
            Kind::Power => "power",
            Kind::Resistance => "resistance",
            Kind::Temperature => "temperature",
            Kind::ThermalResistance => "thermal resistance",
            Kind::Length => "length",
            Kind::Duration => "duration",
            Kind::Capacitance => "capacitance",
            Kind::Mass => "mass",
        }
    }

    fn wanted(self) -> &'static str {
        match self {
            Kind::Voltage => "a voltage",
            Kind::Current => "a current",
            Kind::Charge => "a charge (capacity)",
            Kind::Power => "a power",
            Kind::Resistance => "a resistance",
            Kind::Temperature => "a temperature",
            Kind::ThermalResistance => "a thermal resistance",
            Kind::Length => "a length",
            Kind::Duration => "a duration",
            Kind::Capacitance => "a capacitance",
            Kind::Mass => "a mass",
        }
    }

    /// The plain-ASCII unit a hint proposes, easy to type on any keyboard.
    fn example_unit(self) -> &'static str {
        match self {
            Kind::Voltage => "V",
            Kind::Current => "A",
            Kind::Charge => "Ah",
            Kind::Power => "W",
            Kind::Resistance => "ohm",
            Kind::Temperature => "degC",
            Kind::ThermalResistance => "degC/W",
            Kind::Length => "m",
            Kind::Duration => "s",
            Kind::Capacitance => "uF",
            Kind::Mass => "g",
        }
    }

    fn summary(self) -> &'static str {
        match self {
            Kind::Voltage => "`V`, `mV` or `kV`",
            Kind::Current => "`A`, `mA`, `uA` or `\u{b5}A`",
            Kind::Charge => "`Ah` or `mAh`",
            Kind::Power => "`W`, `mW` or `kW`",
            Kind::Resistance => {
                "`ohm`, `mohm`, `kohm`, `Mohm`, `\u{3a9}`, `m\u{3a9}`, `k\u{3a9}`, `M\u{3a9}`, \
                 or a bare `k` / `M`"
            }
            Kind::Temperature => "`degC`, `\u{b0}C` or `K`",
            Kind::ThermalResistance => "`degC/W`, `\u{b0}C/W` or `K/W`",
            Kind::Length => "`m`, `cm`, `mm`, `in` or `ft`",
            Kind::Duration => "`s`, `ms` or `min`",
            Kind::Capacitance => "`F`, `mF`, `uF`, `\u{b5}F` or `nF`",
            Kind::Mass => "`g` or `kg`",
        }
    }

    /// Only temperatures have a meaningful sign in a plan (`-20 degC`); a negative rating,
    /// capacity or length is a typo.
    fn allows_negative(self) -> bool {
        self == Kind::Temperature
    }

    fn expect(self) -> Expect {
        Expect {
            wanted: self.wanted(),
            example_unit: self.example_unit(),
            accepted: self.spellings().iter().map(|s| s.text).collect(),
            summary: self.summary(),
            signed: self.allows_negative(),
        }
    }
}

/// What a parser is asking for; feeds messages and hints.
struct Expect {
    /// With its article: "a voltage".
    wanted: &'static str,
    example_unit: &'static str,
    accepted: Vec<&'static str>,
    summary: &'static str,
    /// Whether a negative number can be meant; if not, suggestions drop the sign.
    signed: bool,
}

impl Expect {
    fn accepts(&self, unit: &str) -> bool {
        self.accepted.contains(&unit)
    }

    fn example(&self) -> String {
        format!("5 {}", self.example_unit)
    }
}

/// What a unit that is not accepted here would mean elsewhere, for "wrong kind" messages.
fn meaning_elsewhere(unit: &str) -> Option<String> {
    for kind in ALL_KINDS {
        let known = kind.spellings().iter().any(|s| s.text == unit);
        if known && !BARE_SUFFIXES.contains(&unit) {
            return Some(format!("a unit of {}", kind.noun()));
        }
    }
    let other = match unit {
        "%" => "a share",
        "AWG" => "a wire gauge",
        "mm2" | "mm\u{b2}" => "a wire cross-section",
        _ => return None,
    };
    Some(other.to_string())
}

// ---------------------------------------------------------------------------------------------
// Shape of a scalar: single value, range or tolerance
// ---------------------------------------------------------------------------------------------

enum Shape {
    Single(Range<usize>),
    Between {
        low: Range<usize>,
        dots: Range<usize>,
        high: Range<usize>,
    },
    Tolerance {
        nominal: Range<usize>,
        marker: Range<usize>,
        tolerance: Range<usize>,
    },
}

const TOLERANCE_MARKERS: [&str; 3] = ["\u{b1}", "+/-", "+-"];

fn shape(text: &str, expect: &Expect) -> Result<Shape, UnitError> {
    let whole = trim_span(text, 0..text.len());
    if whole.is_empty() {
        return Err(problem(
            format!("empty value: {} is needed", expect.wanted),
            format!("write {}, like `{}`", expect.wanted, expect.example()),
            0..text.len(),
        ));
    }
    let dots = find_in(text, whole.clone(), "..");
    let marker = tolerance_marker(text, whole.clone());
    let unit = expect.example_unit;
    match (dots, marker) {
        (Some(_), Some(_)) => Err(problem(
            "a value cannot be both a range and a tolerance",
            format!(
                "write either a range like `4.5..5.5 {unit}` or a tolerance like `5 {unit} ±2%`"
            ),
            whole,
        )),
        (Some(dots), None) => {
            let low = trim_span(text, whole.start..dots.start);
            let high = trim_span(text, dots.end..whole.end);
            if let Some(second) = find_in(text, high.clone(), "..") {
                return Err(problem(
                    "a range has exactly two ends",
                    format!("write a range like `4.5..5.5 {unit}`"),
                    second,
                ));
            }
            Ok(Shape::Between { low, dots, high })
        }
        (None, Some(marker)) => {
            let nominal = trim_span(text, whole.start..marker.start);
            let tolerance = trim_span(text, marker.end..whole.end);
            if let Some(second) = tolerance_marker(text, tolerance.clone()) {
                return Err(problem(
                    "a value has at most one tolerance",
                    format!("write one tolerance, like `5 {unit} ±2%`"),
                    second,
                ));
            }
            Ok(Shape::Tolerance {
                nominal,
                marker,
                tolerance,
            })
        }
        (None, None) => Ok(Shape::Single(whole)),
    }
}

/// The span of the one value in `text`, or an error if it is a range or carries a tolerance.
fn single_span(text: &str, expect: &Expect) -> Result<Range<usize>, UnitError> {
    match shape(text, expect)? {
        Shape::Single(span) => Ok(span),
        Shape::Between { low, high, .. } => {
            let whole = low.start..high.end;
            let example = if high.is_empty() {
                expect.example()
            } else {
                excerpt(&text[high]).to_string()
            };
            Err(problem(
                format!(
                    "expected a single value, found the range `{}`",
                    excerpt(&text[whole.clone()])
                ),
                format!("write one value, like `{example}`"),
                whole,
            ))
        }
        Shape::Tolerance {
            nominal,
            marker,
            tolerance,
        } => {
            let example = if nominal.is_empty() {
                expect.example()
            } else {
                excerpt(&text[nominal]).to_string()
            };
            let span = marker.start..tolerance.end.max(marker.end);
            Err(problem(
                format!(
                    "expected a single value, found the tolerance `{}`",
                    excerpt(&text[span.clone()])
                ),
                format!("write `{example}` without the tolerance"),
                span,
            ))
        }
    }
}

fn tolerance_marker(text: &str, within: Range<usize>) -> Option<Range<usize>> {
    TOLERANCE_MARKERS
        .iter()
        .filter_map(|marker| find_in(text, within.clone(), marker))
        .min_by_key(|span| span.start)
}

fn find_in(text: &str, within: Range<usize>, needle: &str) -> Option<Range<usize>> {
    text[within.clone()]
        .find(needle)
        .map(|at| within.start + at..within.start + at + needle.len())
}

/// `span` without leading and trailing whitespace (an empty span stays where it was).
fn trim_span(text: &str, span: Range<usize>) -> Range<usize> {
    let inner = &text[span.clone()];
    let start = span.start + (inner.len() - inner.trim_start().len());
    let end = span.end - (inner.len() - inner.trim_end().len());
    if start > end {
        start..start
    } else {
        start..end
    }
}

// ---------------------------------------------------------------------------------------------
// Terms: a number with an optional unit
// ---------------------------------------------------------------------------------------------

/// One number with an optional unit, as written: `4.5`, `12V`, `350 mA`.
struct Term<'t> {
    span: Range<usize>,
    number: f64,
    number_text: &'t str,
    number_span: Range<usize>,
    unit: Option<Range<usize>>,
}

fn lex_term<'t>(text: &'t str, span: Range<usize>, expect: &Expect) -> Result<Term<'t>, UnitError> {
    let number_end = lex_number(text, span.clone(), expect)?;
    let number_span = span.start..number_end;
    let number_text = &text[number_span.clone()];
    let number = match number_text.parse::<f64>() {
        Ok(number) => number,
        Err(_) => return Err(not_a_number(text, span, expect)),
    };
    if number == 0.0 && mantissa_is_nonzero(number_text) {
        return Err(underflow(number_text, number_span, expect));
    }
    if !number.is_finite() {
        return Err(problem(
            format!("`{}` is too large to be a number", excerpt(number_text)),
            format!("write a finite number, like `{}`", expect.example()),
            number_span,
        ));
    }
    let unit = lex_unit(text, number_span.clone(), span.end, expect)?;
    Ok(Term {
        span,
        number,
        number_text,
        number_span,
        unit,
    })
}

/// The end of the number that starts `span`: `[+-] digits [. digits] [e [+-] digits]`, where a
/// `.` directly followed by another `.` belongs to a range, not to the number.
fn lex_number(text: &str, span: Range<usize>, expect: &Expect) -> Result<usize, UnitError> {
    let bytes = text.as_bytes();
    let end = span.end;
    let is_digit = |at: usize| at < end && bytes[at].is_ascii_digit();
    let mut at = span.start;
    if at < end && matches!(bytes[at], b'+' | b'-') {
        at += 1;
    }
    let integer_start = at;
    while is_digit(at) {
        at += 1;
    }
    let mut digits = at - integer_start;
    if at < end && bytes[at] == b'.' && !(at + 1 < end && bytes[at + 1] == b'.') {
        at += 1;
        let fraction_start = at;
        while is_digit(at) {
            at += 1;
        }
        digits += at - fraction_start;
    }
    if digits == 0 {
        return Err(not_a_number(text, span, expect));
    }
    if at < end && matches!(bytes[at], b'e' | b'E') {
        let mut exponent_at = at + 1;
        if exponent_at < end && matches!(bytes[exponent_at], b'+' | b'-') {
            exponent_at += 1;
        }
        let exponent_digits_start = exponent_at;
        while is_digit(exponent_at) {
            exponent_at += 1;
        }
        if exponent_at > exponent_digits_start {
            at = exponent_at;
        }
    }
    if at + 1 < end && bytes[at] == b',' && bytes[at + 1].is_ascii_digit() {
        let mut after = at + 1;
        while is_digit(after) {
            after += 1;
        }
        let written = &text[span.start..after];
        return Err(problem(
            format!("`{}` uses a comma in a number", excerpt(written)),
            format!(
                "write `{}` with a decimal point, or leave out a thousands separator",
                excerpt(&written.replacen(',', ".", 1))
            ),
            span.start..after,
        ));
    }
    Ok(at)
}

fn not_a_number(text: &str, span: Range<usize>, expect: &Expect) -> UnitError {
    let inner = &text[span.clone()];
    let sign = usize::from(inner.starts_with(['+', '-']));
    let word_len = inner[sign..]
        .find(|c: char| !c.is_alphabetic())
        .unwrap_or(inner.len() - sign);
    let word = &inner[sign..sign + word_len];
    if ["nan", "inf", "infinity"].contains(&word.to_ascii_lowercase().as_str()) {
        return problem(
            format!("`{}` is not a finite number", &inner[..sign + word_len]),
            format!("write a finite number, like `{}`", expect.example()),
            span.start..span.start + sign + word_len,
        );
    }
    let token_len = inner.find(char::is_whitespace).unwrap_or(inner.len());
    problem(
        format!(
            "expected a number, found `{}`",
            excerpt(&inner[..token_len])
        ),
        format!(
            "write the number before the unit, like `{}`",
            expect.example()
        ),
        span.start..span.start + token_len,
    )
}

/// The unit after a number, up to the end of the term: one run of non-space characters.
fn lex_unit(
    text: &str,
    number_span: Range<usize>,
    end: usize,
    expect: &Expect,
) -> Result<Option<Range<usize>>, UnitError> {
    let unit_start = skip_space(text, number_span.end, end);
    if unit_start == end {
        return Ok(None);
    }
    let unit_end = text[unit_start..end]
        .find(char::is_whitespace)
        .map_or(end, |at| unit_start + at);
    let rest_start = skip_space(text, unit_end, end);
    if rest_start < end {
        let joined: String = text[unit_start..end]
            .chars()
            .filter(|c| !c.is_whitespace())
            .collect();
        let number_text = excerpt(&text[number_span.clone()]);
        if expect.accepts(&joined) {
            return Err(problem(
                format!(
                    "the unit `{}` has a space inside",
                    excerpt(&text[unit_start..end])
                ),
                format!("write `{number_text} {joined}`"),
                unit_start..end,
            ));
        }
        let rest = excerpt(&text[rest_start..end]);
        return Err(problem(
            format!(
                "unexpected `{rest}` after `{}`",
                excerpt(&text[number_span.start..unit_end])
            ),
            format!("remove `{rest}`"),
            rest_start..end,
        ));
    }
    Ok(Some(unit_start..unit_end))
}

fn skip_space(text: &str, from: usize, end: usize) -> usize {
    let inner = &text[from..end];
    from + (inner.len() - inner.trim_start().len())
}

// ---------------------------------------------------------------------------------------------
// From terms to values
// ---------------------------------------------------------------------------------------------

fn single_value(text: &str, kind: Kind) -> Result<f64, UnitError> {
    let expect = kind.expect();
    let span = single_span(text, &expect)?;
    let term = lex_term(text, span, &expect)?;
    let spelling = spelling_of(text, &term, kind, &expect, None)?;
    to_base(text, &term, spelling, kind, &expect)
}

/// The unit of `term`; a term without one takes `fallback` (the upper end's unit in a range).
fn spelling_of(
    text: &str,
    term: &Term,
    kind: Kind,
    expect: &Expect,
    fallback: Option<&'static Spelling>,
) -> Result<&'static Spelling, UnitError> {
    let Some(unit_span) = term.unit.clone() else {
        return fallback.ok_or_else(|| {
            problem(
                format!("`{}` has no unit", excerpt(term.number_text)),
                plausible_unit_hint(&excerpt(term.number_text), term.number, kind),
                term.number_span.clone(),
            )
        });
    };
    let unit = &text[unit_span.clone()];
    kind.spellings()
        .iter()
        .find(|s| s.text == unit)
        .ok_or_else(|| unit_problem(text, term, unit_span, expect))
}

/// The values a robot's plan usually holds for a kind, in its base unit:
/// rails of a fraction of a volt to a hundred, currents of a milliampere to
/// tens of amperes, packs of a tenth to a hundred ampere-hours, wire runs of
/// a few centimetres to a few metres (common practice for small robots, not
/// a standard's limit: it only picks the unit a hint suggests).
fn usual_range(kind: Kind) -> Option<(f64, f64, &'static [&'static str], &'static str)> {
    match kind {
        Kind::Voltage => Some((0.5, 100.0, &["V", "mV"], "a robot's rails and ratings")),
        Kind::Current => Some((0.001, 50.0, &["A", "mA"], "a robot's currents")),
        // In coulombs: 0.1 Ah to 100 Ah (1 Ah = 3600 C).
        Kind::Charge => Some((360.0, 360_000.0, &["Ah", "mAh"], "a robot's battery packs")),
        Kind::Length => Some((0.05, 5.0, &["m", "cm", "mm"], "a robot's wire runs")),
        _ => None,
    }
}

/// "write `30 cm`" for a bare `30` given as a length: the unit that puts the
/// number where such values usually lie, saying so when it is not the kind's
/// plain unit.
fn plausible_unit_hint(written: &str, number: f64, kind: Kind) -> String {
    let plain = kind.example_unit();
    let Some((low, high, units, what)) = usual_range(kind) else {
        return format!("write `{written} {plain}`");
    };
    let chosen = units.iter().copied().find(|unit| {
        kind.spellings()
            .iter()
            .find(|s| s.text == *unit)
            .is_some_and(|s| {
                let base = number.abs() * s.numerator / s.denominator;
                (low..=high).contains(&base)
            })
    });
    match chosen {
        Some(unit) if unit != plain => format!(
            "write `{written} {unit}`: {what} are rarely {written} {plain} (write `{written} {plain}` if that is meant)"
        ),
        _ => format!("write `{written} {plain}`"),
    }
}

/// Whether a written number has a nonzero digit before its exponent.
fn mantissa_is_nonzero(number_text: &str) -> bool {
    number_text
        .split(['e', 'E'])
        .next()
        .is_some_and(|m| m.bytes().any(|b| (b'1'..=b'9').contains(&b)))
}

/// A nonzero number too small for a float: it would silently become 0.
fn underflow(written: &str, span: Range<usize>, expect: &Expect) -> UnitError {
    problem(
        format!("`{}` is too small to tell from zero", excerpt(written)),
        format!("write {}, like `{}`", expect.wanted, expect.example()),
        span,
    )
}

/// The value of `term` in the kind's base unit, after the sign and range checks.
fn to_base(
    text: &str,
    term: &Term,
    spelling: &Spelling,
    kind: Kind,
    expect: &Expect,
) -> Result<f64, UnitError> {
    if term.number < 0.0 && !kind.allows_negative() {
        return Err(negative(text, term, expect));
    }
    // `+ 0.0` turns `-0` into 0 so that it never shows as "-0".
    let value = term.number * spelling.numerator / spelling.denominator + spelling.offset + 0.0;
    let written = excerpt(&text[term.span.clone()]);
    if !value.is_finite() {
        return Err(problem(
            format!("`{written}` is too large"),
            format!("write {}, like `{}`", expect.wanted, expect.example()),
            term.span.clone(),
        ));
    }
    if value == spelling.offset && term.number != 0.0 {
        return Err(underflow(
            &text[term.span.clone()],
            term.span.clone(),
            expect,
        ));
    }
    if kind == Kind::Temperature && value < 0.0 {
        return Err(problem(
            format!("`{written}` is below absolute zero"),
            "a temperature cannot be below -273.15 \u{b0}C (0 K)",
            term.span.clone(),
        ));
    }
    Ok(value)
}

fn negative(text: &str, term: &Term, expect: &Expect) -> UnitError {
    let written = &text[term.span.clone()];
    let positive = written.trim_start_matches('-');
    problem(
        format!(
            "`{}` is negative: {} here must be zero or more",
            excerpt(written),
            expect.wanted
        ),
        format!("write `{}`", excerpt(positive)),
        term.number_span.clone(),
    )
}

/// A unit that is not accepted here: either one of another kind, or an unknown spelling.
fn unit_problem(text: &str, term: &Term, unit_span: Range<usize>, expect: &Expect) -> UnitError {
    let unit = &text[unit_span.clone()];
    let accepted = || expect.accepted.iter().copied();
    // A unit written short (`°C` where `°C/W` is wanted) is not a typo of
    // the whole, but its intended spelling all the same.
    let closest = crate::spelling::closest(unit, accepted())
        .or_else(|| accepted().find(|spelling| !unit.is_empty() && spelling.starts_with(unit)));
    let number = if expect.signed {
        term.number_text
    } else {
        term.number_text.trim_start_matches('-')
    };
    let suggestion = |unit: &str| format!("{} {unit}", excerpt(number));
    match (meaning_elsewhere(unit), closest) {
        (Some(meaning), _) => problem(
            format!(
                "`{unit}` is {meaning}, but {} is needed here",
                expect.wanted
            ),
            format!(
                "write {}, like `{}`; accepted units: {}",
                expect.wanted,
                suggestion(closest.unwrap_or(expect.example_unit)),
                expect.summary
            ),
            unit_span,
        ),
        (None, Some(closest)) => problem(
            format!("unknown unit `{}` for {}", excerpt(unit), expect.wanted),
            format!(
                "did you mean `{}`? accepted units: {}",
                suggestion(closest),
                expect.summary
            ),
            unit_span,
        ),
        // Nothing accepted here is a slip away from what was written.
        (None, None) => problem(
            format!("unknown unit `{}` for {}", excerpt(unit), expect.wanted),
            format!(
                "write {}, like `{}`; accepted units: {}",
                expect.wanted,
                suggestion(expect.example_unit),
                expect.summary
            ),
            unit_span,
        ),
    }
}

// ---------------------------------------------------------------------------------------------
// Bands
// ---------------------------------------------------------------------------------------------

struct RawBand {
    min: f64,
    nominal: f64,
    max: f64,
}

impl RawBand {
    fn typed<Q>(&self, make: impl Fn(f64) -> Q) -> Band<Q> {
        Band {
            min: make(self.min),
            nominal: make(self.nominal),
            max: make(self.max),
        }
    }
}

fn band(text: &str, kind: Kind) -> Result<RawBand, UnitError> {
    let expect = kind.expect();
    match shape(text, &expect)? {
        Shape::Single(span) => {
            let term = lex_term(text, span, &expect)?;
            let spelling = spelling_of(text, &term, kind, &expect, None)?;
            let value = to_base(text, &term, spelling, kind, &expect)?;
            Ok(RawBand {
                min: value,
                nominal: value,
                max: value,
            })
        }
        Shape::Between { low, dots, high } => range_band(text, kind, &expect, low, dots, high),
        Shape::Tolerance {
            nominal,
            marker,
            tolerance,
        } => tolerance_band(text, kind, &expect, nominal, marker, tolerance),
    }
}

fn range_band(
    text: &str,
    kind: Kind,
    expect: &Expect,
    low: Range<usize>,
    dots: Range<usize>,
    high: Range<usize>,
) -> Result<RawBand, UnitError> {
    let unit = kind.example_unit();
    if low.is_empty() || high.is_empty() {
        let missing = if low.is_empty() { "lower" } else { "upper" };
        return Err(problem(
            format!("the range has no {missing} end"),
            format!("write both ends, like `4.5..5.5 {unit}`"),
            dots,
        ));
    }
    let low_term = lex_term(text, low.clone(), expect)?;
    let high_term = lex_term(text, high.clone(), expect)?;
    if high_term.unit.is_none() {
        return Err(problem(
            format!(
                "the range `{}` has no unit",
                excerpt(&text[low.start..high.end])
            ),
            format!(
                "write `{}..{} {unit}`; the unit after the upper end applies to both",
                excerpt(&text[low.clone()]),
                excerpt(high_term.number_text)
            ),
            high_term.number_span.clone(),
        ));
    }
    let high_spelling = spelling_of(text, &high_term, kind, expect, None)?;
    let low_spelling = spelling_of(text, &low_term, kind, expect, Some(high_spelling))?;
    let min = to_base(text, &low_term, low_spelling, kind, expect)?;
    let max = to_base(text, &high_term, high_spelling, kind, expect)?;
    if min > max {
        let swapped = if low_term.unit.is_some() {
            format!("{}..{}", &text[high.clone()], &text[low.clone()])
        } else {
            format!(
                "{}..{} {}",
                high_term.number_text, low_term.number_text, high_spelling.text
            )
        };
        return Err(problem(
            format!(
                "the range `{}` runs downward",
                excerpt(&text[low.start..high.end])
            ),
            format!("write the lower end first: `{}`", excerpt(&swapped)),
            low.start..high.end,
        ));
    }
    Ok(RawBand {
        min,
        // Halving each end first cannot overflow.
        nominal: min / 2.0 + max / 2.0,
        max,
    })
}

fn tolerance_band(
    text: &str,
    kind: Kind,
    expect: &Expect,
    nominal: Range<usize>,
    marker: Range<usize>,
    tolerance: Range<usize>,
) -> Result<RawBand, UnitError> {
    let unit = kind.example_unit();
    let marker_text = &text[marker.clone()];
    if nominal.is_empty() {
        return Err(problem(
            format!("no value before `{marker_text}`"),
            format!("write the nominal value first, like `5 {unit} ±2%`"),
            marker,
        ));
    }
    let nominal_term = lex_term(text, nominal.clone(), expect)?;
    let nominal_spelling = spelling_of(text, &nominal_term, kind, expect, None)?;
    let centre = to_base(text, &nominal_term, nominal_spelling, kind, expect)?;
    let nominal_text = excerpt(&text[nominal.clone()]);
    if tolerance.is_empty() {
        return Err(problem(
            format!("no tolerance after `{marker_text}`"),
            format!("write a tolerance, like `{nominal_text} ±2%`"),
            marker,
        ));
    }
    let mut tolerance_expect = kind.expect();
    tolerance_expect.accepted.push("%");
    tolerance_expect.wanted = "a tolerance";
    tolerance_expect.summary = "`%`, or a unit of the value itself";
    let tolerance_term =
        lex_term(text, tolerance.clone(), &tolerance_expect).map_err(|mut error| {
            error.hint = format!("write a tolerance, like `{nominal_text} ±2%`");
            error
        })?;
    let Some(unit_span) = tolerance_term.unit.clone() else {
        let n = excerpt(tolerance_term.number_text);
        return Err(problem(
            format!("the tolerance `{n}` has no unit"),
            format!("write `{nominal_text} ±{n} {unit}`, or a share like `{nominal_text} ±{n}%`"),
            tolerance_term.number_span,
        ));
    };
    if tolerance_term.number < 0.0 {
        let written = &text[tolerance.clone()];
        return Err(problem(
            format!("the tolerance `{}` is negative", excerpt(written)),
            format!(
                "write `{nominal_text} ±{}`",
                excerpt(written.trim_start_matches('-'))
            ),
            tolerance_term.number_span,
        ));
    }
    let half_width = if &text[unit_span.clone()] == "%" {
        if tolerance_term.number > 100.0 {
            return Err(problem(
                format!(
                    "a tolerance of `{}` reaches below zero",
                    excerpt(&text[tolerance.clone()])
                ),
                "a tolerance in percent is at most 100 %",
                tolerance_term.span,
            ));
        }
        centre * tolerance_term.number / 100.0
    } else {
        let spelling = spelling_of(text, &tolerance_term, kind, &tolerance_expect, None)?;
        // A tolerance is a difference, so a unit's offset (°C against K) does not apply.
        tolerance_term.number * spelling.numerator / spelling.denominator
    };
    let min = centre - half_width;
    let max = centre + half_width;
    if min < 0.0 && !kind.allows_negative() {
        return Err(problem(
            format!(
                "`{}` reaches below zero",
                excerpt(&text[nominal.start..tolerance.end])
            ),
            format!("a tolerance must not exceed the nominal value `{nominal_text}`"),
            tolerance_term.span,
        ));
    }
    if !max.is_finite() {
        return Err(problem(
            format!(
                "`{}` is too large",
                excerpt(&text[nominal.start..tolerance.end])
            ),
            format!("write a smaller tolerance, like `{nominal_text} ±2%`"),
            tolerance_term.span,
        ));
    }
    Ok(RawBand {
        min: min + 0.0,
        nominal: centre,
        max,
    })
}

// ---------------------------------------------------------------------------------------------
// Wire gauges
// ---------------------------------------------------------------------------------------------

/// The `n/0` gauges (`4/0 AWG`), or `None` when the term does not start with `digits/`.
fn thick_gauge(
    text: &str,
    span: Range<usize>,
    expect: &Expect,
) -> Result<Option<WireSize>, UnitError> {
    let inner = &text[span.clone()];
    let digit_count = inner.bytes().take_while(u8::is_ascii_digit).count();
    if digit_count == 0 || inner.as_bytes().get(digit_count) != Some(&b'/') {
        return Ok(None);
    }
    let after_slash = span.start + digit_count + 1;
    let denominator_len = text[after_slash..span.end]
        .bytes()
        .take_while(u8::is_ascii_digit)
        .count();
    let gauge_span = span.start..after_slash + denominator_len;
    let written = excerpt(&text[gauge_span.clone()]);
    let zeros: Option<u32> = inner[..digit_count].parse().ok();
    let Some(zeros) = zeros.filter(|_| &text[after_slash..gauge_span.end] == "0") else {
        return Err(problem(
            format!("`{written}` is not a wire gauge"),
            "write gauges thicker than 0 AWG as `1/0 AWG`, `2/0 AWG`, `3/0 AWG` or `4/0 AWG`",
            gauge_span,
        ));
    };
    if zeros == 0 || zeros > THICKEST_ZEROS {
        return Err(problem(
            format!("`{written}` is not a wire gauge"),
            "the thickest gauge is `4/0 AWG`; for thicker wire give the cross-section in `mm2`",
            gauge_span,
        ));
    }
    let unit = lex_unit(text, gauge_span.clone(), span.end, expect)?;
    let Some(unit_span) = unit else {
        return Err(problem(
            format!("`{written}` has no unit"),
            format!("write `{written} AWG`"),
            gauge_span,
        ));
    };
    match &text[unit_span.clone()] {
        // ASTM B258: an n/0 gauge takes the gauge number 1 − n.
        "AWG" => return Ok(Some(WireSize::Awg(1 - zeros as i32))),
        "mm2" | "mm\u{b2}" => {
            return Err(problem(
                format!("`{written}` is an AWG gauge, not a cross-section"),
                format!("write `{written} AWG`"),
                unit_span,
            ));
        }
        _ => {}
    }
    let term = Term {
        span: span.clone(),
        number: f64::from(zeros),
        number_text: &text[gauge_span.clone()],
        number_span: gauge_span,
        unit: Some(unit_span.clone()),
    };
    Err(unit_problem(text, &term, unit_span, expect))
}

fn gauge_from_term(text: &str, term: &Term) -> Result<WireSize, UnitError> {
    let written = excerpt(&text[term.span.clone()]);
    if term.number < 0.0 {
        return Err(problem(
            format!("`{written}` is negative"),
            "write gauges thicker than 0 AWG as `1/0 AWG`, `2/0 AWG`, `3/0 AWG` or `4/0 AWG`",
            term.number_span.clone(),
        ));
    }
    let digits = term.number_text;
    let all_zeros = digits.len() >= 2 && digits.bytes().all(|b| b == b'0');
    if all_zeros {
        // `00 AWG` is the older spelling of `2/0 AWG`.
        let zeros = digits.len();
        if zeros > THICKEST_ZEROS as usize {
            return Err(problem(
                format!("`{written}` is not a wire gauge"),
                "the thickest gauge is `0000 AWG` (`4/0 AWG`)",
                term.number_span.clone(),
            ));
        }
        return Ok(WireSize::Awg(1 - zeros as i32));
    }
    if term.number.fract() != 0.0 {
        return Err(problem(
            format!("`{written}` is not a whole gauge number"),
            format!(
                "AWG sizes are whole numbers: write `{} AWG` or `{} AWG`",
                term.number.floor(),
                term.number.ceil()
            ),
            term.number_span.clone(),
        ));
    }
    if term.number > FINEST_GAUGE {
        return Err(problem(
            format!("`{written}` is finer than any wire gauge"),
            format!("AWG numbers go up to {FINEST_GAUGE}; check for a typo"),
            term.number_span.clone(),
        ));
    }
    // Whole and within 0..=50, so the conversion is exact.
    Ok(WireSize::Awg(term.number as i32))
}

// ---------------------------------------------------------------------------------------------
// Formatting
// ---------------------------------------------------------------------------------------------

/// One unit a formatter may print: used for values whose decimal exponent is at least
/// `from_exponent`; the printed number is the value divided by 10^`scale_exponent`.
struct Prefix {
    from_exponent: i32,
    scale_exponent: i32,
    symbol: &'static str,
}

const fn prefix(from_exponent: i32, scale_exponent: i32, symbol: &'static str) -> Prefix {
    Prefix {
        from_exponent,
        scale_exponent,
        symbol,
    }
}

// Largest first; the last entry also takes everything smaller.
const VOLTS: &[Prefix] = &[prefix(3, 3, "kV"), prefix(0, 0, "V"), prefix(-3, -3, "mV")];
const AMPERES: &[Prefix] = &[
    prefix(0, 0, "A"),
    prefix(-3, -3, "mA"),
    prefix(-6, -6, "\u{b5}A"),
];
const WATTS: &[Prefix] = &[prefix(3, 3, "kW"), prefix(0, 0, "W"), prefix(-3, -3, "mW")];
const OHMS: &[Prefix] = &[
    prefix(6, 6, "M\u{3a9}"),
    prefix(3, 3, "k\u{3a9}"),
    prefix(0, 0, "\u{3a9}"),
    prefix(-3, -3, "m\u{3a9}"),
];
const DEGREES_CELSIUS: &[Prefix] = &[prefix(i32::MIN, 0, "\u{b0}C")];
const DEGREES_CELSIUS_PER_WATT: &[Prefix] = &[prefix(i32::MIN, 0, "\u{b0}C/W")];
const AMPERE_HOURS: &[Prefix] = &[prefix(0, 0, "Ah"), prefix(-3, -3, "mAh")];
// Lengths in a plan read best in metres (`0.8 m`); millimetres only below a centimetre.
const METERS: &[Prefix] = &[prefix(-2, 0, "m"), prefix(-3, -3, "mm")];
const FARADS: &[Prefix] = &[
    prefix(0, 0, "F"),
    prefix(-6, -6, "\u{b5}F"),
    prefix(-9, -9, "nF"),
];
const KILOGRAMS: &[Prefix] = &[prefix(0, 0, "kg"), prefix(-3, -3, "g")];
const SECONDS: &[Prefix] = &[prefix(0, 0, "s"), prefix(-3, -3, "ms")];
const PERCENT: &[Prefix] = &[prefix(i32::MIN, 0, "%")];
const SQUARE_MILLIMETERS: &[Prefix] = &[prefix(i32::MIN, 0, "mm\u{b2}")];

/// `value` (in the unit with scale exponent 0) rounded to three significant figures, trailing
/// zeros trimmed, in the first unit of `prefixes` whose `from_exponent` it reaches.
fn show_scaled(value: f64, prefixes: &[Prefix]) -> String {
    let base_symbol = prefixes
        .iter()
        .find(|p| p.scale_exponent == 0)
        .map_or("", |p| p.symbol);
    if !value.is_finite() {
        return format!("{value} {base_symbol}");
    }
    let Some((digits, exponent)) = three_figures(value.abs()) else {
        return format!("0 {base_symbol}");
    };
    let Some(chosen) = prefixes
        .iter()
        .find(|p| exponent >= p.from_exponent)
        .or(prefixes.last())
    else {
        return format!("{value}");
    };
    let sign = if value < 0.0 { "-" } else { "" };
    let shift = exponent - 2 - chosen.scale_exponent;
    // Past a million million of the largest unit (or below a millionth of
    // the smallest) a written-out number would run to dozens of digits: use
    // powers of ten instead.
    if !(-8..=12).contains(&shift) {
        let mantissa = decimal(digits, -2);
        return format!(
            "{sign}{mantissa}e{} {}",
            exponent - chosen.scale_exponent,
            chosen.symbol
        );
    }
    let number = decimal(digits, shift);
    format!("{sign}{number} {}", chosen.symbol)
}

/// `magnitude` as `digits × 10^(exponent − 2)` with `digits` in 100..=999, or `None` for zero.
/// Rust's `{:.2e}` rounds the exact binary value correctly, so the result is deterministic.
fn three_figures(magnitude: f64) -> Option<(u32, i32)> {
    let scientific = format!("{magnitude:.2e}");
    let (mantissa, exponent) = scientific.split_once('e')?;
    let digits: u32 = mantissa.replace('.', "").parse().ok()?;
    let exponent: i32 = exponent.parse().ok()?;
    (digits != 0).then_some((digits, exponent))
}

/// The decimal text of `digits × 10^shift`, without trailing zeros after the point.
fn decimal(digits: u32, shift: i32) -> String {
    let digits = digits.to_string();
    if shift >= 0 {
        return format!("{digits}{}", "0".repeat(shift.unsigned_abs() as usize));
    }
    let decimals = shift.unsigned_abs() as usize;
    let text = if decimals >= digits.len() {
        format!("0.{}{digits}", "0".repeat(decimals - digits.len()))
    } else {
        let (whole, fraction) = digits.split_at(digits.len() - decimals);
        format!("{whole}.{fraction}")
    };
    text.trim_end_matches('0').trim_end_matches('.').to_string()
}

// ---------------------------------------------------------------------------------------------
// Small helpers
// ---------------------------------------------------------------------------------------------

fn problem(message: impl Into<String>, hint: impl Into<String>, span: Range<usize>) -> UnitError {
    UnitError {
        message: message.into(),
        hint: hint.into(),
        span,
    }
}

/// User text quoted in a message, cut short so a pasted paragraph cannot flood the report.
fn excerpt(text: &str) -> std::borrow::Cow<'_, str> {
    const LIMIT: usize = 24;
    match text.char_indices().nth(LIMIT) {
        Some((cut, _)) => format!("{}…", &text[..cut]).into(),
        None => text.into(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;
    use uom::si::area::square_meter;
    use uom::si::electric_current::milliampere;
    use uom::si::electric_potential::millivolt;
    use uom::si::length::millimeter;

    /// Equal within float rounding of a few operations.
    fn assert_close(actual: f64, expected: f64) {
        let tolerance = 1e-12 * expected.abs().max(1.0);
        assert!(
            (actual - expected).abs() <= tolerance,
            "{actual} is not {expected}"
        );
    }

    fn volts(text: &str) -> f64 {
        voltage(text).expect(text).get::<volt>()
    }

    fn amperes(text: &str) -> f64 {
        current(text).expect(text).get::<ampere>()
    }

    fn ohms(text: &str) -> f64 {
        resistance(text).expect(text).get::<ohm>()
    }

    #[test]
    fn durations_in_seconds_milliseconds_and_minutes() {
        // SI second; a minute is 60 s.
        let seconds = |text: &str| duration(text).expect(text).get::<uom::si::time::second>();
        assert_close(seconds("2 s"), 2.0);
        assert_close(seconds("500 ms"), 0.5);
        assert_close(seconds("1.5 min"), 90.0);
        let wrong = duration("2 A").unwrap_err();
        assert!(wrong.message.contains("duration"), "{}", wrong.message);
        assert_eq!(
            show_duration(Time::new::<uom::si::time::second>(0.1)),
            "100 ms"
        );
        assert_eq!(
            show_duration(Time::new::<uom::si::time::second>(2.0)),
            "2 s"
        );
    }

    fn meters(text: &str) -> f64 {
        length(text).expect(text).get::<meter>()
    }

    fn volt_band(text: &str) -> [f64; 3] {
        let band = voltage_band(text).expect(text);
        [band.min, band.nominal, band.max].map(|v| v.get::<volt>())
    }

    fn assert_band(actual: [f64; 3], expected: [f64; 3]) {
        for (a, e) in actual.into_iter().zip(expected) {
            assert_close(a, e);
        }
    }

    /// The error for `text`, with its span, and the text the span covers.
    fn error<T: fmt::Debug>(text: &str, result: Result<T, UnitError>) -> (UnitError, &str) {
        let error = result.expect_err(text);
        let covered = &text[error.span.clone()];
        (error, covered)
    }

    // ----- voltage -----------------------------------------------------------------------

    #[test]
    fn voltage_accepts_every_spacing_and_number_form() {
        // Format reference §2 examples, and number forms a person writes by hand.
        assert_close(volts("12 V"), 12.0);
        assert_close(volts("12V"), 12.0);
        assert_close(volts("  3.3V \t"), 3.3);
        assert_close(volts("5. V"), 5.0);
        assert_close(volts(".5 V"), 0.5);
        assert_close(volts("+5 V"), 5.0);
        assert_close(volts("0 V"), 0.0);
        // No-break space, as typeset documents put between a number and its unit.
        assert_close(volts("5\u{a0}V"), 5.0);
    }

    #[test]
    fn voltage_applies_si_prefixes() {
        // SI brochure prefixes: milli = 10^-3, kilo = 10^3.
        assert_close(volts("500 mV"), 0.5);
        assert_close(volts("1e-3 V"), 0.001);
        assert_close(volts("2.5E2 mV"), 0.25);
        assert_close(volts("1.5 kV"), 1500.0);
        assert_close(voltage("500 mV").expect("500 mV").get::<millivolt>(), 500.0);
    }

    #[test]
    fn bare_number_where_a_voltage_is_needed() {
        let (e, covered) = error("5", voltage("5"));
        assert_eq!(e.message, "`5` has no unit");
        assert_eq!(e.hint, "write `5 V`");
        assert_eq!(e.span, 0..1);
        assert_eq!(covered, "5");
    }

    #[test]
    fn current_unit_where_a_voltage_is_needed() {
        let (e, covered) = error("5 A", voltage("5 A"));
        assert_eq!(e.span, 2..3);
        assert_eq!(covered, "A");
        assert!(e.message.contains("a voltage is needed"), "{}", e.message);
        assert!(e.message.contains("unit of current"), "{}", e.message);
        assert!(e.hint.contains("`5 V`"), "{}", e.hint);
        // A voltage here cannot be negative, so the suggestion drops the sign.
        let (e, covered) = error("-1 A", voltage("-1 A"));
        assert_eq!(covered, "A");
        assert!(e.hint.contains("`1 V`"), "{}", e.hint);
    }

    #[test]
    fn unknown_unit_suggests_the_closest_spelling() {
        let (e, covered) = error("5 Vx", voltage("5 Vx"));
        assert_eq!(covered, "Vx");
        assert_eq!(e.span, 2..4);
        assert_eq!(e.message, "unknown unit `Vx` for a voltage");
        assert!(e.hint.starts_with("did you mean `5 V`?"), "{}", e.hint);
        // A slip of letter case is nearer than any other edit.
        let (e, _) = error("3.3 mv", voltage("3.3 mv"));
        assert!(e.hint.starts_with("did you mean `3.3 mV`?"), "{}", e.hint);
        let (e, _) = error("12v", voltage("12v"));
        assert!(e.hint.starts_with("did you mean `12 V`?"), "{}", e.hint);
    }

    #[test]
    fn non_finite_numbers_are_rejected() {
        let (e, covered) = error("NaN V", voltage("NaN V"));
        assert_eq!(covered, "NaN");
        assert_eq!(e.span, 0..3);
        assert_eq!(e.message, "`NaN` is not a finite number");
        assert!(e.hint.contains("finite"), "{}", e.hint);
        let (_, covered) = error("inf V", voltage("inf V"));
        assert_eq!(covered, "inf");
        let (_, covered) = error("-infinity V", voltage("-infinity V"));
        assert_eq!(covered, "-infinity");
        // Beyond the largest f64 (about 1.8e308).
        let (e, covered) = error("1e999 V", voltage("1e999 V"));
        assert_eq!(covered, "1e999");
        assert!(e.message.contains("too large"), "{}", e.message);
        // Finite number, but the prefix pushes it past the largest f64.
        let (_, covered) = error("1e308 kV", voltage("1e308 kV"));
        assert_eq!(covered, "1e308 kV");
    }

    #[test]
    fn empty_and_blank_text() {
        let (e, _) = error("", voltage(""));
        assert_eq!(e.span, 0..0);
        assert!(e.message.starts_with("empty value"), "{}", e.message);
        assert_eq!(e.hint, "write a voltage, like `5 V`");
        let (e, _) = error("   ", voltage("   "));
        assert_eq!(e.span, 0..3);
    }

    #[test]
    fn trailing_text_is_rejected() {
        let (e, covered) = error("5 V x", voltage("5 V x"));
        assert_eq!(covered, "x");
        assert_eq!(e.message, "unexpected `x` after `5 V`");
        assert_eq!(e.hint, "remove `x`");
        let (_, covered) = error("5 V 3", voltage("5 V 3"));
        assert_eq!(covered, "3");
    }

    #[test]
    fn a_space_inside_a_unit_is_pointed_out() {
        let (e, covered) = error("35 deg C", temperature("35 deg C"));
        assert_eq!(covered, "deg C");
        assert_eq!(e.hint, "write `35 degC`");
        let (e, _) = error("10 k ohm", resistance("10 k ohm"));
        assert_eq!(e.hint, "write `10 kohm`");
    }

    #[test]
    fn text_that_is_not_a_number() {
        let (e, covered) = error("V", voltage("V"));
        assert_eq!(covered, "V");
        assert_eq!(e.message, "expected a number, found `V`");
        let (_, covered) = error("abc V", voltage("abc V"));
        assert_eq!(covered, "abc");
        let (_, covered) = error("- 5 V", voltage("- 5 V"));
        assert_eq!(covered, "-");
    }

    #[test]
    fn decimal_comma_is_pointed_out() {
        let (e, covered) = error("5,5 V", voltage("5,5 V"));
        assert_eq!(covered, "5,5");
        assert!(e.hint.contains("`5.5`"), "{}", e.hint);
    }

    #[test]
    fn single_value_functions_take_no_range_or_tolerance() {
        let (e, covered) = error("4.5..5.5 V", voltage("4.5..5.5 V"));
        assert_eq!(covered, "4.5..5.5 V");
        assert!(e.message.contains("range"), "{}", e.message);
        assert_eq!(e.hint, "write one value, like `5.5 V`");
        let (e, covered) = error("5 V ±2%", voltage("5 V ±2%"));
        assert_eq!(covered, "±2%");
        assert!(e.message.contains("tolerance"), "{}", e.message);
        assert_eq!(e.hint, "write `5 V` without the tolerance");
        let (_, covered) = error("5 V +-2%", current("5 A +-2%"));
        assert_eq!(covered, "+-2%");
    }

    // ----- voltage bands -----------------------------------------------------------------

    #[test]
    fn band_of_a_single_value_is_a_point() {
        assert_band(volt_band("3.3 V"), [3.3, 3.3, 3.3]);
    }

    #[test]
    fn band_from_a_range() {
        // Nominal of a range is its midpoint: (4.5 + 5.5) / 2 = 5.
        assert_band(volt_band("4.5..5.5 V"), [4.5, 5.0, 5.5]);
        assert_band(volt_band("4.5 V..5.5 V"), [4.5, 5.0, 5.5]);
        assert_band(volt_band(" 4.5V .. 5.5V "), [4.5, 5.0, 5.5]);
        // Ends in different units: 500 mV = 0.5 V; midpoint (0.5 + 1) / 2 = 0.75.
        assert_band(volt_band("500 mV..1 V"), [0.5, 0.75, 1.0]);
        // The upper end's unit applies to a bare lower end: 300..500 mV.
        assert_band(volt_band("300..500 mV"), [0.3, 0.4, 0.5]);
        assert_band(volt_band("5..5 V"), [5.0, 5.0, 5.0]);
    }

    #[test]
    fn band_from_a_tolerance() {
        // 2 % of 5 V is 0.1 V: 4.9 / 5 / 5.1.
        assert_band(volt_band("5 V ±2%"), [4.9, 5.0, 5.1]);
        assert_band(volt_band("5 V +-2%"), [4.9, 5.0, 5.1]);
        assert_band(volt_band("5V±2 %"), [4.9, 5.0, 5.1]);
        assert_band(volt_band("5 V +/-2%"), [4.9, 5.0, 5.1]);
        assert_band(volt_band("5 V ±0.1 V"), [4.9, 5.0, 5.1]);
        assert_band(volt_band("5 V ±100 mV"), [4.9, 5.0, 5.1]);
        // 3 % of 3.3 V is 0.099 V.
        assert_band(volt_band("3.3 V ±3%"), [3.201, 3.3, 3.399]);
    }

    #[test]
    fn downward_range_is_an_error_at_the_range() {
        let (e, covered) = error("5..4 V", voltage_band("5..4 V"));
        assert_eq!(e.span, 0..6);
        assert_eq!(covered, "5..4 V");
        assert_eq!(e.message, "the range `5..4 V` runs downward");
        assert_eq!(e.hint, "write the lower end first: `4..5 V`");
        let (e, _) = error("5 V..4 V", voltage_band("5 V..4 V"));
        assert_eq!(e.hint, "write the lower end first: `4 V..5 V`");
        // 900 mV is below 1 V even though 900 > 1.
        assert!(voltage_band("1 V..900 mV").is_err());
        assert!(voltage_band("900 mV..1 V").is_ok());
    }

    #[test]
    fn malformed_ranges() {
        let (e, covered) = error("..5 V", voltage_band("..5 V"));
        assert_eq!(covered, "..");
        assert_eq!(e.message, "the range has no lower end");
        let (e, covered) = error("4.5 V..", voltage_band("4.5 V.."));
        assert_eq!(covered, "..");
        assert_eq!(e.message, "the range has no upper end");
        let (e, covered) = error("4.5..5.5", voltage_band("4.5..5.5"));
        assert_eq!(covered, "5.5");
        assert!(e.hint.contains("`4.5..5.5 V`"), "{}", e.hint);
        let (_, covered) = error("1..2..3 V", voltage_band("1..2..3 V"));
        assert_eq!(covered, "..");
        let (e, covered) = error("4.5 A..5.5 V", voltage_band("4.5 A..5.5 V"));
        assert_eq!(covered, "A");
        assert!(e.message.contains("a voltage is needed"), "{}", e.message);
        let (_, covered) = error("4.5..5.5 V ±2%", voltage_band("4.5..5.5 V ±2%"));
        assert_eq!(covered, "4.5..5.5 V ±2%");
        let (_, covered) = error("-1..5 V", voltage_band("-1..5 V"));
        assert_eq!(covered, "-1");
    }

    #[test]
    fn malformed_tolerances() {
        let (e, covered) = error("5 V ±", voltage_band("5 V ±"));
        assert_eq!(covered, "±");
        assert_eq!(e.hint, "write a tolerance, like `5 V ±2%`");
        let (_, covered) = error("±2%", voltage_band("±2%"));
        assert_eq!(covered, "±");
        let (e, covered) = error("5 V ±0.1", voltage_band("5 V ±0.1"));
        assert_eq!(covered, "0.1");
        assert!(e.hint.contains("`5 V ±0.1 V`"), "{}", e.hint);
        let (_, covered) = error("5 ±2%", voltage_band("5 ±2%"));
        assert_eq!(covered, "5");
        let (_, covered) = error("5 V ±-2%", voltage_band("5 V ±-2%"));
        assert_eq!(covered, "-2");
        // 150 % of 5 V would put the lower bound at -2.5 V.
        let (_, covered) = error("5 V ±150%", voltage_band("5 V ±150%"));
        assert_eq!(covered, "150%");
        // 6 V around 5 V reaches -1 V.
        let (e, covered) = error("5 V ±6 V", voltage_band("5 V ±6 V"));
        assert_eq!(covered, "6 V");
        assert!(e.message.contains("below zero"), "{}", e.message);
        let (_, covered) = error("5 V ±2 A", voltage_band("5 V ±2 A"));
        assert_eq!(covered, "A");
        let (_, covered) = error("5 V ±2% ±1%", voltage_band("5 V ±2% ±1%"));
        assert_eq!(covered, "±");
    }

    // ----- current -----------------------------------------------------------------------

    #[test]
    fn current_units_and_both_micro_signs() {
        // SI brochure prefixes: milli = 10^-3, micro = 10^-6.
        assert_close(amperes("2 A"), 2.0);
        assert_close(amperes("350 mA"), 0.35);
        assert_close(amperes("50 uA"), 50e-6);
        assert_close(amperes("50 \u{b5}A"), 50e-6); // MICRO SIGN
        assert_close(amperes("50 \u{3bc}A"), 50e-6); // GREEK SMALL LETTER MU
        assert_close(amperes("50\u{3bc}A"), 50e-6);
        assert_close(current("350mA").expect("350mA").get::<milliampere>(), 350.0);
    }

    #[test]
    fn current_errors() {
        let (e, covered) = error("-1 A", current("-1 A"));
        assert_eq!(e.span, 0..2);
        assert_eq!(covered, "-1");
        assert!(e.message.contains("negative"), "{}", e.message);
        assert_eq!(e.hint, "write `1 A`");
        // Any bare number, zero included, lacks its unit.
        let (e, _) = error("0", current("0"));
        assert_eq!(e.hint, "write `0 A`");
        let (e, covered) = error("5 V", current("5 V"));
        assert_eq!(covered, "V");
        assert!(e.message.contains("a current is needed"), "{}", e.message);
    }

    #[test]
    fn current_band_forms() {
        let band = current_band("1..2 A").expect("range");
        assert_close(band.nominal.get::<ampere>(), 1.5);
        // 10 % of 2 A is 0.2 A.
        let band = current_band("2 A ±10%").expect("tolerance");
        assert_close(band.min.get::<ampere>(), 1.8);
        assert_close(band.max.get::<ampere>(), 2.2);
        let band = current_band("350 mA").expect("single");
        assert_close(band.min.get::<ampere>(), 0.35);
        assert_eq!(band.min, band.max);
        let (e, _) = error("2", current_band("2"));
        assert_eq!(e.hint, "write `2 A`");
    }

    // ----- charge, power, resistance ---------------------------------------------------------

    #[test]
    fn charge_in_ampere_hours() {
        // 1 Ah = 3600 C (SI brochure, non-SI units accepted for use with the SI):
        // 2200 mAh = 2.2 Ah = 2.2 × 3600 C = 7920 C.
        let q = charge("2200 mAh").expect("mAh");
        assert_close(q.get::<coulomb>(), 7920.0);
        assert_close(q.get::<ampere_hour>(), 2.2);
        assert_close(charge("5 Ah").expect("Ah").get::<coulomb>(), 18_000.0);
        assert_close(charge("5Ah").expect("Ah").get::<coulomb>(), 18_000.0);
    }

    #[test]
    fn charge_errors_hint_ampere_hours() {
        let (e, _) = error("5", charge("5"));
        assert_eq!(e.hint, "write `5 Ah`");
        let (e, covered) = error("5 A", charge("5 A"));
        assert_eq!(covered, "A");
        assert!(e.hint.contains("`5 Ah`"), "{}", e.hint);
        let (e, _) = error("2200 mah", charge("2200 mah"));
        assert!(e.hint.starts_with("did you mean `2200 mAh`?"), "{}", e.hint);
    }

    #[test]
    fn power_units() {
        // milli = 10^-3, kilo = 10^3.
        assert_close(power("15 W").expect("W").get::<watt>(), 15.0);
        assert_close(power("250 mW").expect("mW").get::<watt>(), 0.25);
        assert_close(power("1.2kW").expect("kW").get::<watt>(), 1200.0);
        let (e, _) = error("15", power("15"));
        assert_eq!(e.hint, "write `15 W`");
    }

    #[test]
    fn resistance_spellings() {
        // kilo = 10^3, mega = 10^6, milli = 10^-3.
        assert_close(ohms("0.05 ohm"), 0.05);
        assert_close(ohms("50 mohm"), 0.05);
        assert_close(ohms("10 kohm"), 10_000.0);
        assert_close(ohms("2 Mohm"), 2e6);
        assert_close(ohms("10 k\u{3a9}"), 10_000.0); // GREEK CAPITAL LETTER OMEGA
        assert_close(ohms("10 k\u{2126}"), 10_000.0); // OHM SIGN
        assert_close(ohms("4.7\u{3a9}"), 4.7);
        assert_close(ohms("50 m\u{2126}"), 0.05);
        assert_close(ohms("1 M\u{3a9}"), 1e6);
        assert_close(ohms("10k"), 10_000.0);
        assert_close(ohms("1M"), 1e6);
        assert_close(ohms("10 kOhm"), 10_000.0);
    }

    #[test]
    fn resistance_errors() {
        let (e, _) = error("10", resistance("10"));
        assert_eq!(e.hint, "write `10 ohm`");
        // `K` is kelvin; the nearest resistance spelling is the bare `k`.
        let (e, covered) = error("10K", resistance("10K"));
        assert_eq!(covered, "K");
        assert!(e.message.contains("temperature"), "{}", e.message);
        assert!(e.hint.contains("`10 k`"), "{}", e.hint);
        let (_, covered) = error("-5 ohm", resistance("-5 ohm"));
        assert_eq!(covered, "-5");
    }

    // ----- temperature and thermal resistance ------------------------------------------------

    #[test]
    fn celsius_is_kelvin_minus_273_15() {
        // SI brochure: T/K = t/°C + 273.15, so 35 °C = 308.15 K and -40 °C = 233.15 K.
        let t = temperature("35 \u{b0}C").expect("°C");
        assert_close(t.get::<kelvin>(), 308.15);
        assert_close(
            temperature("35 degC").expect("degC").get::<kelvin>(),
            308.15,
        );
        assert_close(
            temperature("35\u{2103}").expect("℃").get::<kelvin>(),
            308.15,
        );
        assert_close(
            temperature("-40 degC").expect("neg").get::<kelvin>(),
            233.15,
        );
        assert_close(temperature("300 K").expect("K").get::<kelvin>(), 300.0);
    }

    #[test]
    fn temperature_below_absolute_zero_is_rejected() {
        // SI brochure: 0 K = -273.15 °C.
        let (e, covered) = error("-300 degC", temperature("-300 degC"));
        assert_eq!(covered, "-300 degC");
        assert!(e.message.contains("absolute zero"), "{}", e.message);
        assert!(temperature("-273.15 degC").is_ok());
        assert!(temperature("-1 K").is_err());
        let (e, _) = error("35", temperature("35"));
        assert_eq!(e.hint, "write `35 degC`");
        let (e, covered) = error("35 C", temperature("35 C"));
        assert_eq!(covered, "C");
        assert_eq!(e.message, "unknown unit `C` for a temperature");
        assert!(e.hint.contains("`35 \u{b0}C`"), "{}", e.hint);
    }

    #[test]
    fn thermal_resistance_spellings_agree() {
        // A temperature difference of 1 °C is 1 K (SI brochure), so 50 °C/W = 50 K/W.
        for text in ["50 degC/W", "50 \u{b0}C/W", "50 K/W", "50K/W"] {
            let r = thermal_resistance(text).expect(text);
            assert_close(r.get::<kelvin_per_watt>(), 50.0);
        }
        let (e, _) = error("50", thermal_resistance("50"));
        assert_eq!(e.hint, "write `50 degC/W`");
        let (e, covered) = error("50 \u{b0}C", thermal_resistance("50 \u{b0}C"));
        assert_eq!(covered, "\u{b0}C");
        assert!(e.hint.contains("`50 \u{b0}C/W`"), "{}", e.hint);
        assert!(thermal_resistance("-5 K/W").is_err());
    }

    // ----- length -----------------------------------------------------------------------------

    #[test]
    fn length_units() {
        // centi = 10^-2, milli = 10^-3; the international inch is 25.4 mm exactly and the foot
        // 12 in = 0.3048 m.
        assert_close(meters("0.6 m"), 0.6);
        assert_close(meters("60 cm"), 0.6);
        assert_close(meters("600 mm"), 0.6);
        assert_close(meters("12 in"), 0.3048);
        assert_close(meters("1 ft"), 0.3048);
        assert_close(length("600mm").expect("mm").get::<millimeter>(), 600.0);
        let (e, _) = error("0.6", length("0.6"));
        assert_eq!(e.hint, "write `0.6 m`");
        assert!(length("-1 m").is_err());
    }

    // ----- wire size --------------------------------------------------------------------------

    #[test]
    fn gauge_numbers() {
        assert_eq!(wire_size("18 AWG"), Ok(WireSize::Awg(18)));
        assert_eq!(wire_size("18AWG"), Ok(WireSize::Awg(18)));
        assert_eq!(wire_size("0 AWG"), Ok(WireSize::Awg(0)));
        // ASTM B258: an n/0 size takes gauge number 1 − n, so 4/0 → −3 and 1/0 → 0 (= 0 AWG).
        assert_eq!(wire_size("4/0 AWG"), Ok(WireSize::Awg(-3)));
        assert_eq!(wire_size("1/0 AWG"), Ok(WireSize::Awg(0)));
        assert_eq!(wire_size("2/0AWG"), Ok(WireSize::Awg(-1)));
        // ASTM B258 also writes 4/0 as No. 0000.
        assert_eq!(wire_size("0000 AWG"), Ok(WireSize::Awg(-3)));
        assert_eq!(wire_size("00 AWG"), Ok(WireSize::Awg(-1)));
    }

    #[test]
    fn metric_cross_sections() {
        // 1 mm² = 10^-6 m².
        let expected = WireSize::Metric(Area::new::<square_millimeter>(0.75));
        assert_eq!(wire_size("0.75 mm2"), Ok(expected));
        assert_eq!(wire_size("0.75 mm\u{b2}"), Ok(expected));
        let Ok(WireSize::Metric(area)) = wire_size("0.75mm2") else {
            panic!("0.75mm2 is a metric size");
        };
        assert_close(area.get::<square_meter>(), 0.75e-6);
    }

    #[test]
    fn wire_size_errors() {
        let (e, covered) = error("18", wire_size("18"));
        assert_eq!(covered, "18");
        assert!(e.hint.contains("`18 AWG`"), "{}", e.hint);
        let (e, covered) = error("18.5 AWG", wire_size("18.5 AWG"));
        assert_eq!(covered, "18.5");
        assert!(e.hint.contains("`18 AWG` or `19 AWG`"), "{}", e.hint);
        let (_, covered) = error("5/0 AWG", wire_size("5/0 AWG"));
        assert_eq!(covered, "5/0");
        let (_, covered) = error("4/1 AWG", wire_size("4/1 AWG"));
        assert_eq!(covered, "4/1");
        let (e, covered) = error("4/0 mm2", wire_size("4/0 mm2"));
        assert_eq!(covered, "mm2");
        assert_eq!(e.hint, "write `4/0 AWG`");
        let (e, covered) = error("4/0", wire_size("4/0"));
        assert_eq!(covered, "4/0");
        assert_eq!(e.hint, "write `4/0 AWG`");
        let (e, covered) = error("18 awg", wire_size("18 awg"));
        assert_eq!(covered, "awg");
        assert!(e.hint.starts_with("did you mean `18 AWG`?"), "{}", e.hint);
        let (e, covered) = error("0.75 mm", wire_size("0.75 mm"));
        assert_eq!(covered, "mm");
        assert!(e.message.contains("unit of length"), "{}", e.message);
        assert!(e.hint.contains("`0.75 mm2`"), "{}", e.hint);
        let (_, covered) = error("0 mm2", wire_size("0 mm2"));
        assert_eq!(covered, "0");
        let (_, covered) = error("-2 AWG", wire_size("-2 AWG"));
        assert_eq!(covered, "-2");
        let (_, covered) = error("180 AWG", wire_size("180 AWG"));
        assert_eq!(covered, "180");
        let (_, covered) = error("00000 AWG", wire_size("00000 AWG"));
        assert_eq!(covered, "00000");
        assert!(wire_size("16..18 AWG").is_err());
    }

    #[test]
    fn wire_size_display() {
        assert_eq!(WireSize::Awg(18).to_string(), "18 AWG");
        assert_eq!(WireSize::Awg(-3).to_string(), "4/0 AWG");
        assert_eq!(WireSize::Awg(0).to_string(), "1/0 AWG");
        let metric = WireSize::Metric(Area::new::<square_millimeter>(0.75));
        assert_eq!(metric.to_string(), "0.75 mm\u{b2}");
        // What is displayed parses back to the same size.
        for size in [WireSize::Awg(18), WireSize::Awg(-3), metric] {
            assert_eq!(wire_size(&size.to_string()), Ok(size));
        }
    }

    // ----- share and discharge rate -----------------------------------------------------------

    #[test]
    fn shares() {
        // 80 % = 80/100 = 0.8.
        for text in ["80 %", "80%", "0.8", " 80 % "] {
            assert_close(share(text).expect(text).get::<ratio>(), 0.8);
        }
        assert_close(share("0 %").expect("0").get::<ratio>(), 0.0);
        assert_close(share("100 %").expect("100").get::<ratio>(), 1.0);
        assert_close(share("1").expect("1").get::<ratio>(), 1.0);
    }

    #[test]
    fn share_errors() {
        let (e, covered) = error("120 %", share("120 %"));
        assert_eq!(covered, "120 %");
        assert!(e.message.contains("more than 100 %"), "{}", e.message);
        let (e, covered) = error("80", share("80"));
        assert_eq!(covered, "80");
        assert_eq!(e.hint, "write `80 %`, or the fraction `0.8`");
        let (_, covered) = error("-5 %", share("-5 %"));
        assert_eq!(covered, "-5");
        let (e, covered) = error("80 pct", share("80 pct"));
        assert_eq!(covered, "pct");
        assert!(e.hint.contains("`80 %`"), "{}", e.hint);
        assert!(share("70..80 %").is_err());
    }

    #[test]
    fn discharge_rates() {
        assert_eq!(discharge_rate("25C"), Ok(DischargeRate::CRate(25.0)));
        assert_eq!(discharge_rate("25 C"), Ok(DischargeRate::CRate(25.0)));
        assert_eq!(discharge_rate("0.5C"), Ok(DischargeRate::CRate(0.5)));
        assert_eq!(
            discharge_rate("20 A"),
            Ok(DischargeRate::Current(ElectricCurrent::new::<ampere>(20.0)))
        );
        let Ok(DischargeRate::Current(i)) = discharge_rate("1500 mA") else {
            panic!("1500 mA is a current");
        };
        assert_close(i.get::<ampere>(), 1.5);
    }

    #[test]
    fn discharge_rate_errors() {
        let (e, covered) = error("25 c", discharge_rate("25 c"));
        assert_eq!(covered, "c");
        assert!(e.hint.starts_with("did you mean `25 C`?"), "{}", e.hint);
        let (e, covered) = error("25", discharge_rate("25"));
        assert_eq!(covered, "25");
        assert!(
            e.hint.contains("`25 A`") && e.hint.contains("`25C`"),
            "{}",
            e.hint
        );
        let (_, covered) = error("-2C", discharge_rate("-2C"));
        assert_eq!(covered, "-2");
        let (e, covered) = error("5 Ah", discharge_rate("5 Ah"));
        assert_eq!(covered, "Ah");
        assert!(e.message.contains("unit of charge"), "{}", e.message);
    }

    // ----- multibyte text -----------------------------------------------------------------

    #[test]
    fn spans_stay_on_character_boundaries() {
        // Ω is 2 bytes, ° is 2 bytes, µ is 2 bytes, ± is 2 bytes.
        let (e, covered) = error("5 \u{3a9}", voltage("5 \u{3a9}"));
        assert_eq!(e.span, 2..4);
        assert_eq!(covered, "\u{3a9}");
        let (_, covered) = error("µ5 V", voltage("µ5 V"));
        assert_eq!(covered, "µ5");
        let (_, covered) = error("5 V ±±", voltage_band("5 V ±±"));
        assert_eq!(covered, "±");
        let (_, covered) = error("5 °C ±2%", temperature("5 °C ±2%"));
        assert_eq!(covered, "±2%");
    }

    // ----- formatting -----------------------------------------------------------------------

    #[test]
    fn show_voltage_three_figures_with_prefix() {
        // Three significant figures; milli = 10^-3: 0.212 V = 212 mV.
        let v = ElectricPotential::new::<volt>;
        assert_eq!(show_voltage(v(12.6)), "12.6 V");
        assert_eq!(show_voltage(v(5.25)), "5.25 V");
        assert_eq!(show_voltage(v(0.212)), "212 mV");
        assert_eq!(show_voltage(v(12.649)), "12.6 V");
        assert_eq!(show_voltage(v(5.0)), "5 V");
        assert_eq!(show_voltage(v(0.0)), "0 V");
        assert_eq!(show_voltage(v(-0.0)), "0 V");
        // 999.6 mV rounds to 1000 mV, which reads as 1 V.
        assert_eq!(show_voltage(v(0.9996)), "1 V");
        assert_eq!(show_voltage(v(1234.0)), "1.23 kV");
        assert_eq!(show_voltage(v(-3.3)), "-3.3 V");
        // Below the smallest prefix the number shrinks instead: 5 µV = 0.005 mV.
        assert_eq!(show_voltage(v(5e-6)), "0.005 mV");
        assert_eq!(show_voltage(v(f64::NAN)), "NaN V");
    }

    #[test]
    fn show_current_power_resistance() {
        let i = ElectricCurrent::new::<ampere>;
        assert_eq!(show_current(i(0.35)), "350 mA");
        assert_eq!(show_current(i(2.5)), "2.5 A");
        assert_eq!(show_current(i(50e-6)), "50 \u{b5}A");
        assert_eq!(show_current(i(12.0)), "12 A");
        let p = Power::new::<watt>;
        assert_eq!(show_power(p(5.9)), "5.9 W");
        assert_eq!(show_power(p(0.25)), "250 mW");
        assert_eq!(show_power(p(1500.0)), "1.5 kW");
        // Absurd magnitudes switch to powers of ten instead of 140 digits.
        assert_eq!(show_power(p(8.72e141)), "8.72e138 kW");
        let r = ElectricalResistance::new::<ohm>;
        assert_eq!(show_resistance(r(0.05)), "50 m\u{3a9}");
        assert_eq!(show_resistance(r(10_000.0)), "10 k\u{3a9}");
        assert_eq!(show_resistance(r(4.7)), "4.7 \u{3a9}");
        assert_eq!(show_resistance(r(2.2e6)), "2.2 M\u{3a9}");
        // 0.0166 Ω (16.6 mΩ).
        assert_eq!(show_resistance(r(0.016_6)), "16.6 m\u{3a9}");
    }

    #[test]
    fn show_temperature_thermal_charge_length_share() {
        // 476.15 K - 273.15 = 203 °C; 233.15 K = -40 °C; 273.15 K = 0 °C.
        let t = ThermodynamicTemperature::new::<kelvin>;
        assert_eq!(show_temperature(t(476.15)), "203 \u{b0}C");
        assert_eq!(show_temperature(t(233.15)), "-40 \u{b0}C");
        assert_eq!(show_temperature(t(273.15)), "0 \u{b0}C");
        assert_eq!(show_temperature(t(308.15)), "35 \u{b0}C");
        let theta = ThermalResistance::new::<kelvin_per_watt>;
        assert_eq!(show_thermal_resistance(theta(50.0)), "50 \u{b0}C/W");
        // 1 Ah = 3600 C: 18000 C = 5 Ah, 7920 C = 2.2 Ah, 1260 C = 0.35 Ah = 350 mAh.
        let q = ElectricCharge::new::<coulomb>;
        assert_eq!(show_charge(q(18_000.0)), "5 Ah");
        assert_eq!(show_charge(q(7920.0)), "2.2 Ah");
        assert_eq!(show_charge(q(1260.0)), "350 mAh");
        let l = Length::new::<meter>;
        assert_eq!(show_length(l(0.8)), "0.8 m");
        assert_eq!(show_length(l(12.5)), "12.5 m");
        assert_eq!(show_length(l(0.005)), "5 mm");
        let s = Ratio::new::<ratio>;
        assert_eq!(show_share(s(0.8)), "80 %");
        assert_eq!(show_share(s(0.0424)), "4.24 %");
        assert_eq!(show_share(s(1.0)), "100 %");
    }

    // ----- properties -------------------------------------------------------------------------

    type Parser = fn(&str) -> Option<UnitError>;

    const PARSERS: [Parser; 13] = [
        |t| voltage(t).err(),
        |t| voltage_band(t).err(),
        |t| current(t).err(),
        |t| current_band(t).err(),
        |t| charge(t).err(),
        |t| power(t).err(),
        |t| resistance(t).err(),
        |t| temperature(t).err(),
        |t| thermal_resistance(t).err(),
        |t| length(t).err(),
        |t| wire_size(t).err(),
        |t| share(t).err(),
        |t| discharge_rate(t).err(),
    ];

    fn check_every_parser(text: &str) -> Result<(), TestCaseError> {
        for parse in PARSERS {
            if let Some(e) = parse(text) {
                prop_assert!(e.span.start <= e.span.end, "{e:?} for {text:?}");
                prop_assert!(e.span.end <= text.len(), "{e:?} for {text:?}");
                prop_assert!(text.is_char_boundary(e.span.start), "{e:?} for {text:?}");
                prop_assert!(text.is_char_boundary(e.span.end), "{e:?} for {text:?}");
                prop_assert!(!e.message.is_empty() && !e.hint.is_empty(), "{e:?}");
            }
        }
        Ok(())
    }

    /// Text close to real quantities, so that deep paths (ranges, tolerances, units) are hit.
    fn near_quantity() -> impl Strategy<Value = String> {
        let number = "[-+]?[0-9]{0,3}(\\.[0-9]{0,2})?([eE][-+]?[0-9]{0,3})?";
        let unit = "(V|mV|A|mA|\u{b5}A|Ah|mAh|W|ohm|k\u{3a9}|k|\u{b0}C|degC/W|K/W|mm|mm\u{b2}|AWG|/0|%|C|x|\u{3a9}\u{2126})?";
        let joint = "( ?(\\.\\.|\u{b1}|\\+-|\\+/-|,) ?)?";
        (number, " ?", unit, joint, number, " ?", unit)
            .prop_map(|(a, b, c, d, e, f, g)| format!("{a}{b}{c}{d}{e}{f}{g}"))
    }

    proptest! {
        #[test]
        fn arbitrary_text_never_panics_and_spans_are_sound(text in any::<String>()) {
            check_every_parser(&text)?;
        }

        #[test]
        fn unit_like_text_never_panics_and_spans_are_sound(
            text in "[-+0-9.eE ,/±µμΩΩ°℃%²a-zA-Z\u{a0}]{0,16}"
        ) {
            check_every_parser(&text)?;
        }

        #[test]
        fn near_quantities_never_panic_and_spans_are_sound(text in near_quantity()) {
            check_every_parser(&text)?;
        }

        #[test]
        fn voltage_round_trips_through_text(
            x in prop::num::f64::POSITIVE
                | prop::num::f64::NORMAL
                | prop::num::f64::SUBNORMAL
                | prop::num::f64::ZERO
        ) {
            prop_assume!(x.is_finite() && x >= 0.0);
            // Rust prints the shortest decimal that reads back as the same f64.
            let parsed = voltage(&format!("{x} V")).map(|v| v.get::<volt>());
            prop_assert_eq!(parsed, Ok(x));
        }

        #[test]
        fn shown_values_read_back_within_three_figures(x in 1e-6f64..1e9) {
            // Rounding to three significant figures moves a value by at most half a unit in
            // the third figure: a relative 0.5 %.
            let within = |back: f64| (back - x).abs() <= 0.005 * x;
            let v = voltage(&show_voltage(ElectricPotential::new::<volt>(x)));
            prop_assert!(v.is_ok_and(|v| within(v.get::<volt>())));
            let i = current(&show_current(ElectricCurrent::new::<ampere>(x)));
            prop_assert!(i.is_ok_and(|i| within(i.get::<ampere>())));
            let p = power(&show_power(Power::new::<watt>(x)));
            prop_assert!(p.is_ok_and(|p| within(p.get::<watt>())));
            let r = resistance(&show_resistance(ElectricalResistance::new::<ohm>(x)));
            prop_assert!(r.is_ok_and(|r| within(r.get::<ohm>())));
            let q = charge(&show_charge(ElectricCharge::new::<coulomb>(x)));
            prop_assert!(q.is_ok_and(|q| within(q.get::<coulomb>())));
            let l = length(&show_length(Length::new::<meter>(x)));
            prop_assert!(l.is_ok_and(|l| within(l.get::<meter>())));
        }
    }
}
