//! The logic families of the format reference §3: how each sets its input
//! thresholds and output levels from its supply voltage. Shared by the logic
//! rules and the ground-offset rule, so the table exists once.

use super::LogicFamily;
use uom::si::electric_potential::volt;
use uom::si::f64::ElectricPotential;

fn volts(value: f64) -> ElectricPotential {
    ElectricPotential::new::<volt>(value)
}

/// How a family sets one level: a fixed voltage, a share of VDD (a plain
/// ratio), or VDD less an offset.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Scale {
    /// A fixed voltage whatever the supply (TTL's 2.0 V).
    Fixed(ElectricPotential),
    /// A share of VDD (CMOS's 0.7 × VDD).
    Share(f64),
    /// VDD less this offset (LVCMOS's VDD − 0.2 V).
    BelowVdd(ElectricPotential),
}

impl Scale {
    /// The level at this supply voltage.
    pub fn at(self, vdd: ElectricPotential) -> ElectricPotential {
        match self {
            Scale::Fixed(level) => level,
            Scale::Share(k) => vdd * k,
            Scale::BelowVdd(offset) => vdd - offset,
        }
    }

    /// Whether the level moves with the supply (a share of VDD or VDD less an offset).
    pub fn follows_vdd(self) -> bool {
        !matches!(self, Scale::Fixed(_))
    }

    /// As the family table writes it (`0.7 × VDD`, `VDD − 0.2 V`, `0.8 V`).
    pub fn formula(self) -> String {
        match self {
            Scale::Fixed(level) => format!("{} V", level.get::<volt>()),
            Scale::Share(k) => format!("{k} × VDD"),
            Scale::BelowVdd(offset) => format!("VDD − {} V", offset.get::<volt>()),
        }
    }
}

/// One family's row of the format reference §3 table.
#[derive(Clone, Copy, Debug)]
pub struct FamilyLevels {
    /// The supply voltage the family is named for (3.3 V for LVCMOS 3.3 V).
    pub nominal_vdd: ElectricPotential,
    /// Lowest input voltage read as high.
    pub vih: Scale,
    /// Highest input voltage read as low.
    pub vil: Scale,
    /// Lowest output high level.
    pub voh: Scale,
    /// Highest output low level.
    pub vol: Scale,
}

/// Format reference §3: 54/74 TTL; JEDEC JESD7 (HC, from memory); JESD8C (LVTTL,
/// LVCMOS 3.3 V); JESD8-5 (2.5 V); JESD8-7 (1.8 V).
impl LogicFamily {
    /// This family's row of the table.
    pub fn levels(self) -> FamilyLevels {
        // The table is written in volts.
        let fixed = |level| Scale::Fixed(volts(level));
        let share = Scale::Share;
        let below_vdd = |offset| Scale::BelowVdd(volts(offset));
        let (nominal_vdd, vih, vil, voh, vol) = match self {
            LogicFamily::Ttl5 => (5.0, fixed(2.0), fixed(0.8), fixed(2.4), fixed(0.4)),
            LogicFamily::Cmos5 => (5.0, share(0.7), share(0.3), below_vdd(0.1), fixed(0.1)),
            LogicFamily::Lvttl33 => (3.3, fixed(2.0), fixed(0.8), fixed(2.4), fixed(0.4)),
            LogicFamily::Lvcmos33 => (3.3, fixed(2.0), fixed(0.8), below_vdd(0.2), fixed(0.2)),
            LogicFamily::Lvcmos25 => (2.5, fixed(1.7), fixed(0.7), fixed(2.0), fixed(0.4)),
            LogicFamily::Lvcmos18 => (1.8, share(0.65), share(0.35), below_vdd(0.45), fixed(0.45)),
        };
        FamilyLevels {
            nominal_vdd: volts(nominal_vdd),
            vih,
            vil,
            voh,
            vol,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn formulas_read_as_the_family_table_writes_them() {
        // Format reference §3 table: LVCMOS 3.3 V VOH = VDD − 0.2 V, VIL = 0.8 V;
        // HC (JESD7) VIH = 0.7 × VDD.
        let lvcmos33 = LogicFamily::Lvcmos33.levels();
        assert_eq!(lvcmos33.voh.formula(), "VDD − 0.2 V");
        assert_eq!(lvcmos33.vil.formula(), "0.8 V");
        assert_eq!(LogicFamily::Cmos5.levels().vih.formula(), "0.7 × VDD");
        assert_eq!(LogicFamily::Lvcmos18.levels().voh.formula(), "VDD − 0.45 V");
    }
}
