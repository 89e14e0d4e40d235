//! Copper conductor resistance for the wire sizes a plan may name.
//!
//! AWG sizes follow the ASTM B258 diameter formula with annealed-copper
//! resistivity (IACS, IEC 60028); metric sizes take the IEC 60228 class 5
//! (flexible) maximum resistance. All at 20 °C, as the format reference fixes.
//! Ampacity follows the tables the format reference names (§4). The wire rules live
//! in `rules`, not here.

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

pub fn awg_area(gauge: i32) -> Area {
    let d = awg_diameter(gauge).get::<millimeter>();
    Area::new::<square_millimeter>(std::f64::consts::PI * d * d / 4.0)
}

/// Resistance of one conductor per metre.
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

/// Resistance of one conductor of the given length.
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
    CfrTable5 { column: f64 },
}

impl AmpacityTable {
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
