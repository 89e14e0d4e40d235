//! The logic families of the format contract §3: how each sets its input
//! thresholds and output levels from its supply voltage. Shared by the logic
//! rules and the ground-offset rule, so the table exists once.

use super::LogicFamily;
use uom::si::electric_potential::volt;
use uom::si::f64::ElectricPotential;

fn volts(value: f64) -> ElectricPotential {
    ElectricPotential::new::<volt>(value)
}

/// How a family sets one level: fixed, a share of VDD, or VDD less an offset.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Scale {
    Fixed(f64),
    Share(f64),
    BelowVdd(f64),
}

impl Scale {
    pub fn at(self, vdd: ElectricPotential) -> ElectricPotential {
        match self {
            Scale::Fixed(v) => volts(v),
            Scale::Share(k) => vdd * k,
            Scale::BelowVdd(d) => vdd - volts(d),
        }
    }

    pub fn follows_vdd(self) -> bool {
        !matches!(self, Scale::Fixed(_))
    }

    /// As the family table writes it (`0.7 × VDD`, `VDD − 0.2 V`, `0.8 V`).
    pub fn formula(self) -> String {
        match self {
            Scale::Fixed(v) => format!("{v} V"),
            Scale::Share(k) => format!("{k} × VDD"),
            Scale::BelowVdd(d) => format!("VDD − {d} V"),
        }
    }
}

/// One family's row of the contract §3 table.
#[derive(Clone, Copy, Debug)]
pub struct FamilyLevels {
    pub nominal_vdd: f64,
    pub vih: Scale,
    pub vil: Scale,
    pub voh: Scale,
    pub vol: Scale,
}

/// Contract §3: 54/74 TTL; JEDEC JESD7 (HC, from memory); JESD8C (LVTTL,
/// LVCMOS 3.3 V); JESD8-5 (2.5 V); JESD8-7 (1.8 V).
impl LogicFamily {
    /// This family's row of the table.
    pub fn levels(self) -> FamilyLevels {
        let family = self;
        use Scale::{BelowVdd, Fixed, Share};
        let (nominal_vdd, vih, vil, voh, vol) = match family {
            LogicFamily::Ttl5 => (5.0, Fixed(2.0), Fixed(0.8), Fixed(2.4), Fixed(0.4)),
            LogicFamily::Cmos5 => (5.0, Share(0.7), Share(0.3), BelowVdd(0.1), Fixed(0.1)),
            LogicFamily::Lvttl33 => (3.3, Fixed(2.0), Fixed(0.8), Fixed(2.4), Fixed(0.4)),
            LogicFamily::Lvcmos33 => (3.3, Fixed(2.0), Fixed(0.8), BelowVdd(0.2), Fixed(0.2)),
            LogicFamily::Lvcmos25 => (2.5, Fixed(1.7), Fixed(0.7), Fixed(2.0), Fixed(0.4)),
            LogicFamily::Lvcmos18 => (1.8, Share(0.65), Share(0.35), BelowVdd(0.45), Fixed(0.45)),
        };
        FamilyLevels {
            nominal_vdd,
            vih,
            vil,
            voh,
            vol,
        }
    }
}
