//! The starter plan `railcheck init` writes: a battery, the main fuse at its
//! positive terminal, a stop switch, a 5 V buck converter and a controller
//! board, with wire sizes and lengths, every line commented for a newcomer.
//!
//! The parts are chosen from the library by their ratings as the checker
//! reads them, not from a table per battery: the buck converter whose input
//! window covers the pack from empty to full; the fuse rated for 125 % of
//! what that converter draws at its full rated output from an empty pack and
//! for at least the pack's full voltage; the thinnest wire whose ampacity
//! covers the fuse. The result passes `railcheck check` with no finding for
//! every battery in the library (tested). Not a design tool: the plan is a
//! place to start, and its comments say what to revisit as the robot grows.

use crate::analysis::{BatteryState, battery_voltage};
use crate::model::{Class, Library, Part, PinRole, Topology};
use crate::rules::{exceeds, falls_below, minimum_rating};
use crate::units::{WireSize, show_current, show_voltage};
use crate::wire;
use uom::si::electric_current::ampere;
use uom::si::electric_potential::volt;
use uom::si::f64::{ElectricCurrent, ElectricPotential};
use uom::si::ratio::ratio;

/// The battery a starter plan uses unless told otherwise.
pub const DEFAULT_BATTERY: &str = "battery/lipo-3s";

/// The controller board of the starter: a 3.3 V microcontroller board with a
/// 5 V input, the most common kind on a first robot.
const BOARD: &str = "board/mcu-3v3";

/// The electronics rail the starter's converter makes.
const RAIL_VOLTS: f64 = 5.0;

/// Wire gauges tried for power nets, thinnest first. Thinner than 22 AWG is
/// fragile for power wiring on a moving robot (common practice).
const POWER_GAUGES: [i32; 7] = [22, 20, 18, 16, 14, 12, 10];

/// Why no starter plan could be written.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct StarterError {
    /// What kept the plan from being written, for the user.
    pub message: String,
}

impl std::fmt::Display for StarterError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.message)
    }
}

impl std::error::Error for StarterError {}

fn error(message: String) -> StarterError {
    StarterError { message }
}

/// The ids of the library's batteries, in id order.
pub fn battery_ids(library: &Library) -> Vec<String> {
    parts_of(library, |part| matches!(part.class, Class::Battery(_)))
        .into_iter()
        .map(|(id, _)| id)
        .collect()
}

/// Every part of the library that reads and passes `keep`, with its id.
fn parts_of(library: &Library, keep: impl Fn(&Part) -> bool) -> Vec<(String, Part)> {
    library
        .ids()
        .filter_map(|id| Some((id.to_string(), library.read_part(id)?.ok()?)))
        .filter(|(_, part)| keep(part))
        .collect()
}

/// The parts chosen for one battery, and the numbers that chose them.
struct Choice {
    battery: String,
    pack_name: String,
    lithium_without_cutoff: bool,
    full: ElectricPotential,
    empty: ElectricPotential,
    regulator: String,
    regulator_current: ElectricCurrent,
    regulator_input: (ElectricPotential, ElectricPotential),
    /// What the converter draws from an empty pack at its full rated output.
    full_load_input: ElectricCurrent,
    fuse: String,
    fuse_rating: ElectricCurrent,
    fuse_voltage: ElectricPotential,
    stop: StopSwitch,
    supply_wire: i32,
    rail_wire: i32,
}

enum StopSwitch {
    Library(String),
    /// No library stop switch suits: the least ratings one must have.
    Required {
        rating: ElectricCurrent,
        voltage: ElectricPotential,
    },
}

/// The commented starter plan for a battery of the library.
pub fn starter(library: &Library, battery_id: &str) -> Result<String, StarterError> {
    let choice = choose(library, battery_id)?;
    Ok(render(&choice))
}

fn choose(library: &Library, battery_id: &str) -> Result<Choice, StarterError> {
    let not_a_battery = |what: &str| {
        let batteries = battery_ids(library);
        let hint = library
            .closest_id(battery_id)
            .filter(|id| batteries.iter().any(|b| b == id))
            .map_or(String::new(), |id| format!("did you mean `{id}`? "));
        error(format!(
            "`{battery_id}` {what}; {hint}batteries: {}",
            batteries.join(", ")
        ))
    };
    let plan = match library.part_plan(battery_id) {
        None => return Err(not_a_battery("is not a part of the library")),
        Some(Err(message)) => return Err(error(message)),
        Some(Ok(plan)) => plan,
    };
    let Some(Class::Battery(battery)) = plan.parts.first().map(|p| &p.class) else {
        return Err(not_a_battery("is not a battery"));
    };
    let (Some(full), Some(empty)) = (
        battery_voltage(&plan, 0, BatteryState::Full),
        battery_voltage(&plan, 0, BatteryState::Empty),
    ) else {
        return Err(error(format!(
            "`{battery_id}` gives neither cells nor a voltage window"
        )));
    };

    let (regulator, converter) = choose_regulator(library, full, empty)?;
    let Class::Regulator(spec) = &converter.class else {
        unreachable!("choose_regulator keeps regulators only");
    };
    let Some(regulator_current) = spec.current.map(|c| c.value) else {
        unreachable!("choose_regulator keeps rated regulators only");
    };
    let vin = converter
        .pins_with_role(PinRole::SupplyIn)
        .find_map(|(_, pin)| pin.range())
        .map_or((empty, full), |band| (band.min, band.max));
    // Switching converter: P_in = P_out / η, so I_in = V_out · I_out / (η · V_in),
    // worst at the highest output and the lowest input.
    let full_load_input: ElectricCurrent =
        spec.output.max * regulator_current / (spec.efficiency.get::<ratio>() * empty);
    let needed = minimum_rating(full_load_input);

    let (fuse, fuse_rating, fuse_voltage) =
        parts_of(library, |p| matches!(p.class, Class::Fuse(_)))
            .into_iter()
            .filter_map(|(id, part)| match part.class {
                Class::Fuse(f) => Some((id, f.rating?.value, f.voltage?.value)),
                _ => None,
            })
            .filter(|(_, rating, voltage)| {
                !exceeds(amps(needed), amps(*rating)) && !exceeds(volts(full), volts(*voltage))
            })
            .min_by(|a, b| amps(a.1).total_cmp(&amps(b.1)).then(a.0.cmp(&b.0)))
            .ok_or_else(|| {
                error(format!(
                    "no fuse in the library is rated {} or more at {} or more",
                    show_current(needed),
                    show_voltage(full)
                ))
            })?;

    let supply_wire = thinnest_wire(fuse_rating)?;
    let rail_wire = thinnest_wire(regulator_current)?;

    let stop = parts_of(library, |p| matches!(&p.class, Class::Switch(s) if s.stop))
        .into_iter()
        .filter_map(|(id, part)| match part.class {
            Class::Switch(s) => Some((id, s.rating?.value, s.voltage?.value)),
            _ => None,
        })
        .filter(|(_, rating, voltage)| {
            !exceeds(amps(fuse_rating), amps(*rating)) && !exceeds(volts(full), volts(*voltage))
        })
        .min_by(|a, b| amps(a.1).total_cmp(&amps(b.1)).then(a.0.cmp(&b.0)))
        .map_or_else(
            || StopSwitch::Required {
                rating: fuse_rating,
                voltage: ElectricPotential::new::<volt>(volts(full).ceil()),
            },
            |(id, _, _)| StopSwitch::Library(id),
        );

    Ok(Choice {
        battery: battery_id.to_string(),
        pack_name: battery.pack_name(),
        lithium_without_cutoff: battery.chemistry.is_lithium() && !battery.cutoff,
        full,
        empty,
        regulator,
        regulator_current,
        regulator_input: vin,
        full_load_input,
        fuse,
        fuse_rating,
        fuse_voltage,
        stop,
        supply_wire,
        rail_wire,
    })
}

/// The 5 V buck converter whose input window covers the pack from empty to
/// full; of several, the one with the smallest rated current (the least
/// fuse it needs), then by id.
fn choose_regulator(
    library: &Library,
    full: ElectricPotential,
    empty: ElectricPotential,
) -> Result<(String, Part), StarterError> {
    let rail = ElectricPotential::new::<volt>(RAIL_VOLTS);
    let mut candidates: Vec<(String, Part, ElectricCurrent)> = parts_of(library, |part| {
        let Class::Regulator(r) = &part.class else {
            return false;
        };
        let covers = part
            .pins_with_role(PinRole::SupplyIn)
            .find_map(|(_, pin)| pin.range())
            .is_some_and(|band| {
                !falls_below(volts(empty), volts(band.min))
                    && !exceeds(volts(full), volts(band.max))
            });
        r.topology == Topology::Buck
            && !exceeds(volts(r.output.nominal), RAIL_VOLTS)
            && !falls_below(volts(r.output.nominal), volts(rail))
            && covers
    })
    .into_iter()
    .filter_map(|(id, part)| match &part.class {
        Class::Regulator(r) => {
            let current = r.current?.value;
            Some((id, part, current))
        }
        _ => None,
    })
    .collect();
    candidates.sort_by(|a, b| amps(a.2).total_cmp(&amps(b.2)).then(a.0.cmp(&b.0)));
    candidates
        .into_iter()
        .next()
        .map(|(id, part, _)| (id, part))
        .ok_or_else(|| {
            error(format!(
                "no 5 V buck converter in the library takes {}–{}",
                show_voltage(empty),
                show_voltage(full)
            ))
        })
}

/// The thinnest power gauge whose ampacity (Handbook chassis column, no
/// insulation rating given) carries `current`.
fn thinnest_wire(current: ElectricCurrent) -> Result<i32, StarterError> {
    POWER_GAUGES
        .iter()
        .copied()
        .find(|&gauge| {
            wire::ampacity(WireSize::Awg(gauge), None)
                .is_some_and(|(ampacity, _)| !exceeds(amps(current), amps(ampacity)))
        })
        .ok_or_else(|| {
            error(format!(
                "no wire up to 10 AWG carries {}",
                show_current(current)
            ))
        })
}

fn amps(i: ElectricCurrent) -> f64 {
    i.get::<ampere>()
}

fn volts(v: ElectricPotential) -> f64 {
    v.get::<volt>()
}

fn render(c: &Choice) -> String {
    let supply = format!("{} AWG", c.supply_wire);
    let rail = format!("{} AWG", c.rail_wire);
    let battery_line = if c.lithium_without_cutoff {
        format!(
            "  # `cutoff: true` says a low-voltage cut-off or protection board is fitted.\n\
             \x20 # Fit one before you trust this line: a lithium pack drained below its\n\
             \x20 # floor is ruined and unsafe to charge (delete the line and railcheck warns).\n\
             \x20 pack: {{ use: {}, with: {{ cutoff: true }} }}\n",
            c.battery
        )
    } else {
        format!("  pack: {{ use: {} }}\n", c.battery)
    };
    let stop_line = match &c.stop {
        StopSwitch::Library(id) => format!(
            "  # The stop switch: a latching emergency stop that cuts everything after it.\n\
             \x20 # Put motor drivers after it too, so one press stops the motors.\n\
             \x20 stop: {{ use: {id} }}\n"
        ),
        StopSwitch::Required { rating, voltage } => format!(
            "  # The stop switch: a latching emergency stop that cuts everything after it.\n\
             \x20 # No built-in stop switch is rated for this pack: these are the least\n\
             \x20 # ratings yours needs (DC). Write the marking of the switch you fit.\n\
             \x20 stop: {{ class: switch, rating: {}, voltage: {}, stop: true }}\n",
            show_current(*rating),
            show_voltage(*voltage)
        ),
    };
    format!(
        "# A starter wiring plan for railcheck, written by `railcheck init`.\n\
         # Check it with `railcheck check FILE`; `railcheck draw FILE -o plan.svg`\n\
         # draws it. The format is explained in docs/format.md; `railcheck parts`\n\
         # lists the library parts and `railcheck parts ID` shows one.\n\
         # Values are written with their unit (`12 V`, `3 A`, `30 cm`).\n\
         # Disconnect the battery before changing any wiring.\n\
         \n\
         railcheck: 1          # the format version\n\
         name: My first robot  # shown at the top of reports and diagrams\n\
         \n\
         # Each part has a name of your choosing; `use:` takes a library part by id.\n\
         parts:\n\
         \x20 # The battery: a {pack} pack, {full} full and {empty} empty.\n\
         {battery_line}\
         \x20 # The main fuse, right at the battery positive. Rated {fuse_rating}: at least\n\
         \x20 # 125 % of the {full_load} the converter draws at its full {reg_current} output\n\
         \x20 # from an empty pack; and {fuse_voltage}, above the pack's {full}.\n\
         \x20 main_fuse: {{ use: {fuse} }}\n\
         {stop_line}\
         \x20 # One regulator: a buck converter from the pack down to 5 V for the\n\
         \x20 # electronics. Its input takes {vin_min}–{vin_max}, the pack's whole range.\n\
         \x20 buck: {{ use: {regulator} }}\n\
         \x20 # The controller board, fed 5 V on its `vin` pin.\n\
         \x20 mcu: {{ use: {board} }}\n\
         \n\
         # A net joins pins that are wired together (`part.pin`). `wire:` and\n\
         # `length:` let railcheck check the voltage drop and the wire's current\n\
         # rating; a wire must carry what its fuse lets through ({supply} carries\n\
         # {fuse_rating}). When you add motors, size the fuse and wires again:\n\
         # `railcheck check` tells you what is too small.\n\
         nets:\n\
         \x20 # Keep the lead from the pack to the fuse as short as you can.\n\
         \x20 BATT+:    {{ pins: [pack.pos, main_fuse.a], wire: {supply}, length: 5 cm }}\n\
         \x20 FUSED:    {{ pins: [main_fuse.b, stop.a], wire: {supply}, length: 30 cm }}\n\
         \x20 SWITCHED: {{ pins: [stop.b, buck.vin], wire: {supply}, length: 30 cm }}\n\
         \x20 5V:       {{ pins: [buck.vout, mcu.vin], wire: {rail}, length: 20 cm }}\n\
         \x20 # The ground net: every part's ground back to the pack's negative terminal.\n\
         \x20 GND:      {{ pins: [pack.neg, buck.gnd, mcu.gnd], wire: {supply}, length: 60 cm }}\n",
        pack = c.pack_name,
        full = show_voltage(c.full),
        empty = show_voltage(c.empty),
        fuse = c.fuse,
        fuse_rating = show_current(c.fuse_rating),
        fuse_voltage = show_voltage(c.fuse_voltage),
        full_load = show_current(c.full_load_input),
        reg_current = show_current(c.regulator_current),
        vin_min = show_voltage(c.regulator_input.0),
        vin_max = show_voltage(c.regulator_input.1),
        regulator = c.regulator,
        board = BOARD,
    )
}
