//! Copper conductor resistance for the wire sizes a plan may name.
//!
//! AWG sizes follow the ASTM B258 diameter formula with annealed-copper
//! resistivity (IACS, IEC 60028); metric sizes take the IEC 60228 class 5
//! (flexible) maximum resistance, all at 20 °C; a conductor in warmer air
//! takes copper's temperature coefficient (IEC 60028, 0.00393 /K at 20 °C).
//! Ampacity follows the tables the format reference names (§4), corrected for
//! a hot ambient where the table states the ambient it holds at; and the
//! adiabatic short-time limit I²t ≤ k²S² (IEC 60364-4-43) for brief peaks.
//! The wire rules live in `rules`, not here.

use crate::units::WireSize;
use uom::si::area::square_millimeter;
use uom::si::electric_current::ampere;
use uom::si::electrical_resistance::ohm;
use uom::si::f64::{Area, ElectricCurrent, ElectricalResistance, Length, ThermodynamicTemperature};
use uom::si::length::{meter, millimeter};
use uom::si::thermodynamic_temperature::degree_celsius;

/// Annealed copper at 20 °C: 1/58 Ω·mm²/m (IACS 100 %).
const COPPER_OHM_MM2_PER_M: f64 = 1.0 / 58.0;

/// IEC 60228 class 5 plain copper, maximum resistance at 20 °C (mΩ/m) per
/// nominal area (mm²), IEC 60228 class 5 table.
const IEC_60228_CLASS_5: [(f64, f64); 6] = [
    (0.5, 39.0),
    (0.75, 26.0),
    (1.0, 19.5),
    (1.5, 13.3),
    (2.5, 7.98),
    (4.0, 4.95),
];

/// For metric sizes outside that table: the largest ratio of the class 5
/// maximum to ρ/A seen inside it (13.3 / 11.5 at 1.5 mm², derived).
const CLASS_5_OVER_SOLID: f64 = 1.157;

/// Diameter of an AWG size (ASTM B258: d = 0.127 mm × 92^((36 − n)/39),
/// n/0 sizes as 1 − zeros).
pub fn awg_diameter(gauge: i32) -> Length {
    Length::new::<millimeter>(0.127 * 92f64.powf((36.0 - gauge as f64) / 39.0))
}

/// Cross-section of an AWG size: π d² / 4 with the ASTM B258 diameter.
///
/// ```
/// use railcheck::wire::awg_area;
/// use uom::si::area::square_millimeter;
///
/// // ASTM B258: 18 AWG is 1.024 mm across, π × 1.024² / 4 = 0.823 mm².
/// let area = awg_area(18).get::<square_millimeter>();
/// assert!((area - 0.823).abs() < 0.001, "{area}");
/// ```
pub fn awg_area(gauge: i32) -> Area {
    let d = awg_diameter(gauge).get::<millimeter>();
    Area::new::<square_millimeter>(std::f64::consts::PI * d * d / 4.0)
}

/// Temperature coefficient of annealed copper's resistance at 20 °C, per
/// kelvin (IEC 60028; IACS): R(T) = R20 × (1 + α20 × (T − 20 °C)).
pub const COPPER_ALPHA_20: f64 = 0.00393;

/// The temperature the resistance tables hold at.
fn reference_temperature() -> ThermodynamicTemperature {
    ThermodynamicTemperature::new::<degree_celsius>(20.0)
}

/// Resistance of one conductor per metre with its copper at `temperature`
/// (`None`: the 20 °C of the tables).
pub fn resistance_per_meter_at(
    size: WireSize,
    temperature: Option<ThermodynamicTemperature>,
) -> ElectricalResistance {
    let rise = temperature.map_or(0.0, |t| {
        t.get::<degree_celsius>() - reference_temperature().get::<degree_celsius>()
    });
    resistance_per_meter(size) * (1.0 + COPPER_ALPHA_20 * rise)
}

/// Resistance of one conductor of the given length with its copper at
/// `temperature` (`None`: 20 °C).
pub fn resistance_at(
    size: WireSize,
    length: Length,
    temperature: Option<ThermodynamicTemperature>,
) -> ElectricalResistance {
    resistance_per_meter_at(size, temperature) * length.get::<meter>()
}

/// Resistance of one conductor per metre at 20 °C.
pub fn resistance_per_meter(size: WireSize) -> ElectricalResistance {
    match size {
        WireSize::Awg(gauge) => ElectricalResistance::new::<ohm>(
            COPPER_OHM_MM2_PER_M / awg_area(gauge).get::<square_millimeter>(),
        ),
        WireSize::Metric(area) => {
            let mm2 = area.get::<square_millimeter>();
            let tabled = IEC_60228_CLASS_5
                .iter()
                .find(|(a, _)| (a - mm2).abs() < 1e-9)
                .map(|(_, milliohm)| milliohm / 1000.0);
            ElectricalResistance::new::<ohm>(
                tabled.unwrap_or(COPPER_OHM_MM2_PER_M / mm2 * CLASS_5_OVER_SOLID),
            )
        }
    }
}

/// Resistance of one conductor of the given length at 20 °C.
pub fn resistance(size: WireSize, length: Length) -> ElectricalResistance {
    resistance_per_meter(size) * length.get::<meter>()
}

/// Handbook of Electronic Tables and Formulas, "chassis wiring" column
/// (single wire in free air), 10–30 AWG, amperes (Handbook of Electronic Tables and Formulas, chassis column).
const HANDBOOK_CHASSIS: [(i32, f64); 21] = [
    (10, 55.0),
    (11, 47.0),
    (12, 41.0),
    (13, 35.0),
    (14, 32.0),
    (15, 28.0),
    (16, 22.0),
    (17, 19.0),
    (18, 16.0),
    (19, 14.0),
    (20, 11.0),
    (21, 9.0),
    (22, 7.0),
    (23, 4.7),
    (24, 3.5),
    (25, 2.7),
    (26, 2.2),
    (27, 1.7),
    (28, 1.4),
    (29, 1.2),
    (30, 0.86),
];

/// 33 CFR 183.425 Table 5, allowable amperage by insulation temperature
/// rating (columns 60, 75, 80, 90, 105, 125, 200 °C), 8–18 AWG.
const CFR_TABLE_5_COLUMNS: [f64; 7] = [60.0, 75.0, 80.0, 90.0, 105.0, 125.0, 200.0];
const CFR_TABLE_5: [(i32, [f64; 7]); 6] = [
    (18, [10.0, 10.0, 15.0, 20.0, 20.0, 25.0, 25.0]),
    (16, [15.0, 15.0, 20.0, 25.0, 25.0, 30.0, 35.0]),
    (14, [20.0, 20.0, 25.0, 30.0, 35.0, 40.0, 45.0]),
    (12, [25.0, 25.0, 35.0, 40.0, 45.0, 50.0, 55.0]),
    (10, [40.0, 40.0, 50.0, 55.0, 60.0, 70.0, 70.0]),
    (8, [55.0, 65.0, 70.0, 70.0, 80.0, 90.0, 100.0]),
];

/// Which published table an ampacity came from, for the finding's text.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum AmpacityTable {
    /// Handbook "chassis wiring" column, single wire in free air.
    HandbookChassis,
    /// 33 CFR 183.425 Table 5 at this insulation rating (°C column used).
    CfrTable5 {
        /// The insulation's temperature rating, in °C: the table's column.
        column: f64,
    },
}

impl AmpacityTable {
    /// The table's published name, for a finding's text.
    pub fn describe(self) -> String {
        match self {
            AmpacityTable::HandbookChassis => {
                "Handbook of Electronic Tables and Formulas, chassis wiring (single wire in free air)"
                    .to_string()
            }
            AmpacityTable::CfrTable5 { column } => {
                format!("33 CFR 183.425 Table 5, {column} °C insulation")
            }
        }
    }
}

/// The AWG a size is rated as: itself, or for a metric size the next
/// smaller AWG by area (format reference §4), so the rating never flatters it.
pub fn rated_gauge(size: WireSize) -> i32 {
    match size {
        WireSize::Awg(gauge) => gauge,
        WireSize::Metric(area) => {
            let mm2 = area.get::<square_millimeter>();
            // The thickest gauge whose area does not exceed the metric area.
            (-3..=50)
                .find(|&g| awg_area(g).get::<square_millimeter>() <= mm2 * (1.0 + 1e-9))
                .unwrap_or(50)
        }
    }
}

/// The ambient 33 CFR 183.425 Table 5 holds at: 30 °C outside engine spaces.
const CFR_TABLE_5_AMBIENT_C: f64 = 30.0;

/// The factor an ampacity from `table` takes in air at `ambient`. Table 5
/// holds at 30 °C: above it, the NEC 310.15(B) ambient correction
/// √((Tc − Ta′)/(Tc − Ta)) with Tc the insulation's rating (it reproduces the
/// 0.85 ABYC E-11 gives 105 °C wire at 50 °C); never above 1, so a cool day
/// does not raise a table value. The Handbook chassis column states no
/// ambient, so no correction is published for it and none is applied.
pub fn ambient_factor(table: AmpacityTable, ambient: Option<ThermodynamicTemperature>) -> f64 {
    match (table, ambient) {
        (AmpacityTable::CfrTable5 { column }, Some(ambient)) => {
            let air = ambient.get::<degree_celsius>();
            if air <= CFR_TABLE_5_AMBIENT_C {
                1.0
            } else if air >= column {
                0.0
            } else {
                ((column - air) / (column - CFR_TABLE_5_AMBIENT_C)).sqrt()
            }
        }
        _ => 1.0,
    }
}

/// Continuous current a wire may carry in air at `ambient` (`None`: the
/// table's own conditions), and the table it came from.
pub fn ampacity_at(
    size: WireSize,
    insulation: Option<ThermodynamicTemperature>,
    ambient: Option<ThermodynamicTemperature>,
) -> Option<(ElectricCurrent, AmpacityTable)> {
    ampacity(size, insulation).map(|(i, table)| (i * ambient_factor(table, ambient), table))
}

/// IEC 60364-4-43 Table 43A: k for PVC-insulated copper (≤ 300 mm²), in
/// A·√s/mm². Used for every wire: the smallest of the common insulations
/// (XLPE/EPR 143), so the limit never flatters an unknown insulation.
pub const ADIABATIC_K_PVC_COPPER: f64 = 115.0;

/// The largest current a conductor may carry for `duration` without its
/// insulation being damaged, heating adiabatically (IEC 60364-4-43
/// §434.5.2: t = (k·S / I)², so I = k·S / √t). Meant for t ≤ 5 s.
pub fn adiabatic_limit(size: WireSize, duration: uom::si::f64::Time) -> ElectricCurrent {
    let area = match size {
        WireSize::Awg(gauge) => awg_area(gauge),
        WireSize::Metric(area) => area,
    };
    let seconds = duration.get::<uom::si::time::second>().max(1e-6);
    ElectricCurrent::new::<ampere>(
        ADIABATIC_K_PVC_COPPER * area.get::<square_millimeter>() / seconds.sqrt(),
    )
}

/// Continuous current a wire may carry, and the table it came from: 33 CFR
/// Table 5 when the insulation rating is given and the size is 8–18 AWG,
/// else the Handbook chassis column for 10–30 AWG (format reference §4). `None` when
/// neither table covers the size.
pub fn ampacity(
    size: WireSize,
    insulation: Option<ThermodynamicTemperature>,
) -> Option<(ElectricCurrent, AmpacityTable)> {
    let gauge = rated_gauge(size);
    if let Some(rating) = insulation {
        let rating = rating.get::<degree_celsius>();
        let row = CFR_TABLE_5.iter().find(|(g, _)| *g == gauge);
        // The highest column not above the wire's own rating.
        let column = CFR_TABLE_5_COLUMNS
            .iter()
            .rposition(|&c| c <= rating + 1e-9);
        if let (Some((_, amps)), Some(column)) = (row, column) {
            return Some((
                ElectricCurrent::new::<ampere>(amps[column]),
                AmpacityTable::CfrTable5 {
                    column: CFR_TABLE_5_COLUMNS[column],
                },
            ));
        }
    }
    HANDBOOK_CHASSIS
        .iter()
        .find(|(g, _)| *g == gauge)
        .map(|(_, amps)| {
            (
                ElectricCurrent::new::<ampere>(*amps),
                AmpacityTable::HandbookChassis,
            )
        })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn milliohm_per_meter(size: WireSize) -> f64 {
        resistance_per_meter(size).get::<ohm>() * 1000.0
    }

    #[test]
    fn awg_18_matches_worked_example_w1() {
        // ASTM B258 worked example (ASTM B258 diameter formula, IACS resistivity):
        // d = 1.02 mm, A = 0.823 mm², R = 20.9 mΩ/m.
        assert!((awg_diameter(18).get::<millimeter>() - 1.02).abs() < 0.005);
        assert!((awg_area(18).get::<square_millimeter>() - 0.823).abs() < 0.001);
        assert!((milliohm_per_meter(WireSize::Awg(18)) - 20.9).abs() / 20.9 < 0.005);
    }

    #[test]
    fn awg_18_at_60_and_90_degrees_worked_example_w3() {
        // IEC 60028 α20 = 0.00393 /K: 18 AWG at 60 °C is 20.95 × 1.157 =
        // 24.2 mΩ/m, at 90 °C 26.7 mΩ/m (worked example, within 1 %).
        let at = |c: f64| {
            resistance_per_meter_at(
                WireSize::Awg(18),
                Some(ThermodynamicTemperature::new::<degree_celsius>(c)),
            )
            .get::<ohm>()
                * 1000.0
        };
        assert!((at(60.0) - 24.2).abs() / 24.2 < 0.01, "{}", at(60.0));
        assert!((at(90.0) - 26.7).abs() / 26.7 < 0.01, "{}", at(90.0));
        // At 20 °C, and with no temperature given, the tables' own value.
        assert_eq!(at(20.0), milliohm_per_meter(WireSize::Awg(18)));
        assert_eq!(
            resistance_per_meter_at(WireSize::Awg(18), None),
            resistance_per_meter(WireSize::Awg(18))
        );
    }

    #[test]
    fn table_5_ambient_correction_reproduces_the_engine_space_factor() {
        // ABYC E-11: 105 °C wire in a 50 °C engine space takes 0.85 of its
        // Table 5 value; NEC 310.15(B): √((105 − 50)/(105 − 30)) = 0.856.
        let fifty = Some(ThermodynamicTemperature::new::<degree_celsius>(50.0));
        let factor = ambient_factor(AmpacityTable::CfrTable5 { column: 105.0 }, fifty);
        assert!((factor - 0.85).abs() / 0.85 < 0.01, "{factor}");
        // 90 °C wire at 50 °C: √(40/60) = 0.816 (NEC table 0.82).
        let factor = ambient_factor(AmpacityTable::CfrTable5 { column: 90.0 }, fifty);
        assert!((factor - 0.82).abs() / 0.82 < 0.01, "{factor}");
        // No correction is published for the Handbook chassis column.
        assert_eq!(ambient_factor(AmpacityTable::HandbookChassis, fifty), 1.0);
        // At or below the table's 30 °C, the table value.
        let cool = Some(ThermodynamicTemperature::new::<degree_celsius>(25.0));
        assert_eq!(
            ambient_factor(AmpacityTable::CfrTable5 { column: 105.0 }, cool),
            1.0
        );
    }

    #[test]
    fn adiabatic_limit_of_18_awg() {
        // IEC 60364-4-43 §434.5.2, k = 115 (PVC copper): 0.823 mm² for 2 s
        // carries 115 × 0.823 / √2 = 66.9 A.
        let i = adiabatic_limit(
            WireSize::Awg(18),
            uom::si::f64::Time::new::<uom::si::time::second>(2.0),
        );
        assert!((i.get::<ampere>() - 66.9).abs() / 66.9 < 0.005, "{i:?}");
    }

    #[test]
    fn awg_table_agrees_with_handbook_ohms_per_km() {
        // Handbook of Electronic Tables and Formulas AWG table, Ω/km
        // (ASTM B258 gauge table cross-check): 22 AWG 52.94, 30 AWG 338.5.
        for (gauge, handbook) in [(22, 52.94), (30, 338.5), (10, 3.28)] {
            let computed = milliohm_per_meter(WireSize::Awg(gauge));
            assert!(
                (computed - handbook).abs() / handbook < 0.005,
                "{gauge} AWG: {computed}"
            );
        }
    }

    #[test]
    fn doubling_area_every_three_gauges() {
        // ASTM B258 geometry: −3 gauge doubles the area (ratio 92^(3/39) ≈ 1.416 in d).
        let ratio =
            awg_area(15).get::<square_millimeter>() / awg_area(18).get::<square_millimeter>();
        assert!((ratio - 2.0).abs() < 0.01, "{ratio}");
    }

    #[test]
    fn four_aught_is_0_46_inch() {
        // ASTM B258: No. 0000 = 0.4600 in = 11.684 mm.
        assert!((awg_diameter(-3).get::<millimeter>() - 11.684).abs() < 0.01);
    }

    fn amps(size: WireSize, insulation: Option<f64>) -> Option<f64> {
        ampacity(
            size,
            insulation.map(ThermodynamicTemperature::new::<degree_celsius>),
        )
        .map(|(i, _)| i.get::<ampere>())
    }

    #[test]
    fn handbook_chassis_column_without_insulation() {
        // Handbook of Electronic Tables and Formulas, chassis wiring column: 22 AWG 7 A,
        // 20 AWG 11 A, 30 AWG 0.86 A; as used in NEC 210.20(A) fuse-sizing worked example.
        assert_eq!(amps(WireSize::Awg(22), None), Some(7.0));
        assert_eq!(amps(WireSize::Awg(20), None), Some(11.0));
        assert_eq!(amps(WireSize::Awg(30), None), Some(0.86));
        assert_eq!(amps(WireSize::Awg(8), None), None);
    }

    #[test]
    fn cfr_table_5_with_insulation_rating() {
        // 33 CFR 183.425 Table 5 (worked example): 16 AWG at 105 °C
        // 25 A; 18 AWG at 60 °C 10 A; a 100 °C wire takes the 90 °C column.
        assert_eq!(amps(WireSize::Awg(16), Some(105.0)), Some(25.0));
        assert_eq!(amps(WireSize::Awg(18), Some(60.0)), Some(10.0));
        assert_eq!(amps(WireSize::Awg(14), Some(100.0)), Some(30.0));
        // Outside 8–18 AWG the Handbook column still applies.
        assert_eq!(amps(WireSize::Awg(22), Some(105.0)), Some(7.0));
    }

    #[test]
    fn metric_sizes_rate_as_the_next_smaller_awg() {
        // 0.75 mm² lies between 19 AWG (0.653 mm²) and 18 AWG (0.823 mm²),
        // so it rates as 19 AWG: 14 A (format reference §4, Handbook column).
        let size = WireSize::Metric(Area::new::<square_millimeter>(0.75));
        assert_eq!(rated_gauge(size), 19);
        assert_eq!(amps(size, None), Some(14.0));
    }

    #[test]
    fn metric_sizes_use_iec_60228_class_5_maximum() {
        // IEC 60228 class 5 plain copper: 0.5 mm² 39.0 mΩ/m; IEC 60228 class 5 worked example: 2 m of it = 0.078 Ω.
        let half = WireSize::Metric(Area::new::<square_millimeter>(0.5));
        assert!((milliohm_per_meter(half) - 39.0).abs() < 1e-9);
        let two_meters = resistance(half, Length::new::<meter>(2.0)).get::<ohm>();
        assert!((two_meters - 0.078).abs() < 1e-9);
    }
}
