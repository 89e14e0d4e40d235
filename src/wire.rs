//! Copper conductor resistance for the wire sizes a plan may name.
//!
//! AWG sizes follow the ASTM B258 diameter formula with annealed-copper
//! resistivity (IACS, IEC 60028); metric sizes take the IEC 60228 class 5
//! (flexible) maximum resistance. All at 20 °C, as the format contract fixes.
//! Ampacity and the wire rules live in `rules`, not here.

use crate::units::WireSize;
use uom::si::area::square_millimeter;
use uom::si::electrical_resistance::ohm;
use uom::si::f64::{Area, ElectricalResistance, Length};
use uom::si::length::{meter, millimeter};

/// Annealed copper at 20 °C: 1/58 Ω·mm²/m (IACS 100 %).
const COPPER_OHM_MM2_PER_M: f64 = 1.0 / 58.0;

/// IEC 60228 class 5 plain copper, maximum resistance at 20 °C (mΩ/m) per
/// nominal area (mm²), reference sheet §1.3.
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

#[cfg(test)]
mod tests {
    use super::*;

    fn milliohm_per_meter(size: WireSize) -> f64 {
        resistance_per_meter(size).get::<ohm>() * 1000.0
    }

    #[test]
    fn awg_18_matches_worked_example_w1() {
        // Reference sheet W1 (ASTM B258 diameter formula, IACS resistivity):
        // d = 1.02 mm, A = 0.823 mm², R = 20.9 mΩ/m.
        assert!((awg_diameter(18).get::<millimeter>() - 1.02).abs() < 0.005);
        assert!((awg_area(18).get::<square_millimeter>() - 0.823).abs() < 0.001);
        assert!((milliohm_per_meter(WireSize::Awg(18)) - 20.9).abs() / 20.9 < 0.005);
    }

    #[test]
    fn awg_table_agrees_with_handbook_ohms_per_km() {
        // Handbook of Electronic Tables and Formulas AWG table, Ω/km
        // (reference sheet §1.2 cross-check): 22 AWG 52.94, 30 AWG 338.5.
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

    #[test]
    fn metric_sizes_use_iec_60228_class_5_maximum() {
        // IEC 60228 class 5 plain copper: 0.5 mm² 39.0 mΩ/m; W4: 2 m of it = 0.078 Ω.
        let half = WireSize::Metric(Area::new::<square_millimeter>(0.5));
        assert!((milliohm_per_meter(half) - 39.0).abs() < 1e-9);
        let two_meters = resistance(half, Length::new::<meter>(2.0)).get::<ohm>();
        assert!((two_meters - 0.078).abs() < 1e-9);
    }
}
