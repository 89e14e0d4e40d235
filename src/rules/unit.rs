//! The unit of each number a finding carries in `values`, so machine-readable
//! reports state it as data instead of leaving it to the reader's guess.
//!
//! A rule that hands `Finding::value` a typed `uom` quantity gets the unit
//! from the type. A rule that hands a bare number (in the contract's fixed
//! units: V, A, W, ohm, Ah, m, degC) gets it from `DECLARED`, the one table
//! of which key means which unit; a key missing there is a defect the
//! catalogue's output tests catch.
//!
//! Not for: formatting numbers for people (that is `crate::units`).

use uom::si::electric_charge::ampere_hour;
use uom::si::electric_current::ampere;
use uom::si::electric_potential::volt;
use uom::si::electrical_resistance::ohm;
use uom::si::f64::{
    ElectricCharge, ElectricCurrent, ElectricPotential, ElectricalResistance, Length, Power,
    TemperatureInterval, ThermodynamicTemperature,
};
use uom::si::length::meter;
use uom::si::power::watt;
use uom::si::temperature_interval::kelvin;
use uom::si::thermodynamic_temperature::degree_celsius;

/// The units numbers in reports come in (format contract §8), plus a kelvin
/// for temperature differences and a plain count.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Unit {
    /// Volts (`V`).
    Volt,
    /// Amperes (`A`).
    Ampere,
    /// Watts (`W`).
    Watt,
    /// Ohms (`ohm`).
    Ohm,
    /// Ampere-hours (`Ah`), for charge.
    AmpereHour,
    /// Metres (`m`).
    Metre,
    /// Degrees Celsius (`degC`), for a temperature.
    DegreeCelsius,
    /// A temperature difference (a margin or a rise), not a temperature.
    Kelvin,
    /// A duration, such as how long a brief mode lasts.
    Second,
    /// A dimensionless count, such as solver iterations.
    Count,
}

impl Unit {
    /// The symbol reports write, in the spelling of the format contract.
    pub fn symbol(self) -> &'static str {
        match self {
            Unit::Volt => "V",
            Unit::Ampere => "A",
            Unit::Watt => "W",
            Unit::Ohm => "ohm",
            Unit::AmpereHour => "Ah",
            Unit::Metre => "m",
            Unit::DegreeCelsius => "degC",
            Unit::Kelvin => "K",
            Unit::Second => "s",
            Unit::Count => "1",
        }
    }

    /// Every unit, for documentation and schema checks.
    pub const ALL: [Unit; 10] = [
        Unit::Volt,
        Unit::Ampere,
        Unit::Watt,
        Unit::Ohm,
        Unit::AmpereHour,
        Unit::Metre,
        Unit::DegreeCelsius,
        Unit::Kelvin,
        Unit::Second,
        Unit::Count,
    ];
}

/// A number for `Finding::value`: either typed (its unit follows from the
/// type) or bare, in the contract's fixed unit for its key.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Reading {
    /// A bare number, in the unit declared for its key.
    Bare(f64),
    /// A number in this unit.
    In(f64, Unit),
}

impl From<f64> for Reading {
    fn from(value: f64) -> Reading {
        Reading::Bare(value)
    }
}

macro_rules! typed_reading {
    ($quantity:ty, $unit:ty, $tag:expr) => {
        impl From<$quantity> for Reading {
            fn from(value: $quantity) -> Reading {
                Reading::In(value.get::<$unit>(), $tag)
            }
        }
    };
}

typed_reading!(ElectricPotential, volt, Unit::Volt);
typed_reading!(ElectricCurrent, ampere, Unit::Ampere);
typed_reading!(Power, watt, Unit::Watt);
typed_reading!(ElectricalResistance, ohm, Unit::Ohm);
typed_reading!(ElectricCharge, ampere_hour, Unit::AmpereHour);
typed_reading!(Length, meter, Unit::Metre);
typed_reading!(
    ThermodynamicTemperature,
    degree_celsius,
    Unit::DegreeCelsius
);
typed_reading!(TemperatureInterval, kelvin, Unit::Kelvin);

/// Which unit a bare number under a key is in. A rule id narrows keys that
/// mean different things in different rules (a thermal `margin` is a
/// temperature difference, a ground `margin` a voltage).
const DECLARED: &[(Option<&str>, &str, Unit)] = &[
    (Some("thermal/overheat"), "margin", Unit::Kelvin),
    (Some("current/derating"), "limit", Unit::Ampere),
    (None, "ambient", Unit::DegreeCelsius),
    (None, "ampacity", Unit::Ampere),
    (None, "capacity", Unit::AmpereHour),
    (None, "ceiling", Unit::Volt),
    (None, "channel_peak", Unit::Ampere),
    (None, "circuit_voltage", Unit::Volt),
    (None, "continuous", Unit::Ampere),
    (None, "current", Unit::Ampere),
    (None, "drop", Unit::Volt),
    (None, "dropout", Unit::Volt),
    (None, "high_level", Unit::Volt),
    (None, "input_voltage", Unit::Volt),
    (None, "iterations", Unit::Count),
    (None, "junction", Unit::DegreeCelsius),
    (None, "lasts", Unit::Second),
    (None, "limit", Unit::Volt),
    (None, "margin", Unit::Volt),
    (None, "max", Unit::Volt),
    (None, "max_current", Unit::Ampere),
    (None, "max_discharge", Unit::Ampere),
    (None, "minimum_rating", Unit::Ampere),
    (None, "nmh", Unit::Volt),
    (None, "nml", Unit::Volt),
    (None, "offset", Unit::Volt),
    (None, "output_voltage", Unit::Volt),
    (None, "peak", Unit::Ampere),
    (None, "power", Unit::Watt),
    (None, "range_max", Unit::Volt),
    (None, "range_min", Unit::Volt),
    (None, "rating", Unit::Ampere),
    (None, "return_drop", Unit::Volt),
    (None, "short_time_limit", Unit::Ampere),
    (None, "source_voltage", Unit::Volt),
    (None, "stall_current", Unit::Ampere),
    (None, "suggested_rating", Unit::Ampere),
    (None, "suggested_time_delay", Unit::Count),
    (None, "supply_drop", Unit::Volt),
    (None, "tj_max", Unit::DegreeCelsius),
    (None, "vih", Unit::Volt),
    (None, "vil", Unit::Volt),
    (None, "voh", Unit::Volt),
    (None, "vol", Unit::Volt),
    (None, "voltage", Unit::Volt),
    (None, "voltage_rating", Unit::Volt),
];

/// The unit of a bare number `key` from `rule`; `None` when the table does
/// not know the key.
pub fn declared_unit(rule: &str, key: &str) -> Option<Unit> {
    DECLARED
        .iter()
        .find(|(r, k, _)| *k == key && r.is_none_or(|r| r == rule))
        .map(|&(_, _, unit)| unit)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rule_specific_entries_win_over_general_ones() {
        assert_eq!(
            declared_unit("thermal/overheat", "margin"),
            Some(Unit::Kelvin)
        );
        assert_eq!(declared_unit("ground/offset", "margin"), Some(Unit::Volt));
        assert_eq!(
            declared_unit("current/derating", "limit"),
            Some(Unit::Ampere)
        );
        assert_eq!(declared_unit("wire/drop", "limit"), Some(Unit::Volt));
        assert_eq!(declared_unit("wire/drop", "no-such-key"), None);
    }

    #[test]
    fn typed_quantities_carry_their_unit() {
        use uom::si::electric_current::milliampere;
        use uom::si::thermodynamic_temperature::kelvin as absolute_kelvin;
        // 250 mA is 0.25 A (SI prefix milli = 10^-3).
        assert_eq!(
            Reading::from(ElectricCurrent::new::<milliampere>(250.0)),
            Reading::In(0.25, Unit::Ampere)
        );
        // 0 °C is 273.15 K (ITS-90 / SI definition of the Celsius scale).
        let Reading::In(celsius, Unit::DegreeCelsius) =
            Reading::from(ThermodynamicTemperature::new::<absolute_kelvin>(273.15))
        else {
            panic!("a temperature is read in degC");
        };
        assert!(celsius.abs() < 1e-9, "{celsius}");
    }
}
