//! The DC operating point of a plan, in every mode and at every battery state.
//!
//! For each mode (`typical`, `worst`, the user's) × battery state (full,
//! nominal, empty) × regulator tolerance corner (outputs at their lowest and at
//! their highest), currents are summed up the power tree and voltages worked
//! down it: battery sag through its internal resistance, wire drops on supply
//! and return nets, linear and switching regulator input currents, regulators
//! falling out of regulation, motor currents through driver bridges. Currents
//! and voltages depend on each other, so the two passes are repeated until
//! nothing moves; a point that does not settle is reported as such, never
//! looped on forever. Nothing here judges the numbers: that is `rules`.

use crate::graph::{Circuit, MotorFeed};
use crate::model::{
    BridgeDrop, Chemistry, Class, LoadState, MotorState, NetId, PartId, PartState, PinRef, PinRole,
    Plan, PortKind, Topology,
};
use crate::units::{WireSize, show_power};
use crate::wire;
use petgraph::unionfind::UnionFind;
use std::sync::Arc;
use uom::si::electric_current::ampere;
use uom::si::electric_potential::volt;
use uom::si::f64::{ElectricCurrent, ElectricPotential, ElectricalResistance, Power, Time};
use uom::si::power::watt;
use uom::si::ratio::ratio;

/// Battery state of charge at which a point is solved.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum BatteryState {
    /// Fully charged: the top of the cell window (4.20 V for a lithium-polymer cell).
    Full,
    /// The rated voltage (3.70 V for a lithium-polymer cell).
    Nominal,
    /// Discharged to its end voltage (3.00 V for a lithium-polymer cell).
    Empty,
}

impl BatteryState {
    /// Every state, full first.
    pub const ALL: [BatteryState; 3] = [
        BatteryState::Full,
        BatteryState::Nominal,
        BatteryState::Empty,
    ];

    /// The state as reports write it (`full`, `nominal`, `empty`).
    pub fn name(self) -> &'static str {
        match self {
            BatteryState::Full => "full",
            BatteryState::Nominal => "nominal",
            BatteryState::Empty => "empty",
        }
    }
}

/// Where regulator outputs sit inside their tolerance.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Corner {
    /// Every regulator output at the bottom of its tolerance.
    Low,
    /// Every regulator output at the top of its tolerance.
    High,
}

/// A mode: 0 is `typical`, 1 is `worst`, 2.. are the user's modes in file order.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct ModeId(pub usize);

impl ModeId {
    /// `typical`: every motor running, every load at its typical draw.
    pub const TYPICAL: ModeId = ModeId(0);
    /// `worst`: every motor stalled and every load at its peak (the stalls bounded
    /// by `limits.stall_at_once`).
    pub const WORST: ModeId = ModeId(1);

    /// The mode's name as the plan and reports write it.
    pub fn name(self, plan: &Plan) -> &str {
        match self.0 {
            0 => "typical",
            1 => "worst",
            n => &plan.modes[n - 2].name,
        }
    }

    /// Continuous modes meet continuous ratings; `worst` only meets maximum
    /// ratings (format reference §6).
    pub fn is_continuous(self) -> bool {
        self != ModeId::WORST
    }

    /// Every mode of the plan: `typical`, `worst`, then the plan's own.
    pub fn all(plan: &Plan) -> impl Iterator<Item = ModeId> {
        (0..plan.modes.len() + 2).map(ModeId)
    }
}

/// Per-cell voltage window (full, nominal, empty) from the handbook values in
/// Linden & Reddy, Handbook of Batteries, as fixed by the format reference §3.
pub fn cell_window(chemistry: Chemistry) -> [ElectricPotential; 3] {
    let (full, nominal, empty) = match chemistry {
        Chemistry::Lipo | Chemistry::LiIon => (4.20, 3.70, 3.00),
        Chemistry::LiFePo4 => (3.65, 3.20, 2.50),
        Chemistry::NiMh => (1.45, 1.20, 1.00),
        Chemistry::LeadAcid => (2.30, 2.00, 1.75),
    };
    [full, nominal, empty].map(ElectricPotential::new::<volt>)
}

/// A battery's open-circuit voltage at a state of charge.
pub fn battery_voltage(
    plan: &Plan,
    part: PartId,
    state: BatteryState,
) -> Option<ElectricPotential> {
    let Class::Battery(battery) = &plan.parts[part].class else {
        return None;
    };
    if let Some(band) = battery.voltage {
        return Some(match state {
            BatteryState::Full => band.max,
            BatteryState::Nominal => band.nominal,
            BatteryState::Empty => band.min,
        });
    }
    let [full, nominal, empty] = cell_window(battery.chemistry);
    let cell = match state {
        BatteryState::Full => full,
        BatteryState::Nominal => nominal,
        BatteryState::Empty => empty,
    };
    Some(cell * battery.cells? as f64)
}

/// Why a point did not settle.
#[derive(Clone, Debug, PartialEq)]
pub struct Unsettled {
    /// The part that kept it from settling, when one did (a source collapsing
    /// under its load).
    pub part: Option<PartId>,
    /// What went wrong, for the report.
    pub reason: String,
    /// How many passes ran before it gave up (0 when it stopped at once).
    pub iterations: usize,
}

/// A regulator at one operating point.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct RegulatorPoint {
    /// Across the regulator: its input pin minus its ground.
    pub input_voltage: ElectricPotential,
    /// The voltage it gives, between its output and its ground.
    pub output_voltage: ElectricPotential,
    /// The current it takes from its input rail.
    pub input_current: ElectricCurrent,
    /// The current it delivers to its output rail.
    pub output_current: ElectricCurrent,
    /// The output could not be held (linear/buck below output + dropout,
    /// boost above its output).
    pub out_of_regulation: bool,
}

/// A motor at one operating point.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct MotorPoint {
    /// The state its mode sets it to.
    pub state: MotorState,
    /// Across the winding.
    pub voltage: ElectricPotential,
    /// The current through the winding.
    pub current: ElectricCurrent,
}

/// A battery at one operating point.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct BatteryPoint {
    /// Its voltage with no load, at the point's battery state.
    pub open_circuit: ElectricPotential,
    /// Its voltage at the terminals: open circuit less current × internal resistance.
    pub terminal: ElectricPotential,
    /// The current it delivers.
    pub current: ElectricCurrent,
}

/// One solved point: a mode, a battery state and a tolerance corner.
#[derive(Clone, Debug)]
pub struct OperatingPoint {
    /// The mode solved.
    pub mode: ModeId,
    /// The battery state solved.
    pub battery: BatteryState,
    /// Where the regulator outputs sit in their tolerance.
    pub corner: Corner,
    /// Why the point did not settle; `None` when it did and its numbers hold.
    pub unsettled: Option<Unsettled>,
    /// Per net: current carried by its conductor.
    pub net_current: Vec<ElectricCurrent>,
    /// Per net: potential above the battery negative at the load end; `None`
    /// for a net with no source.
    pub net_potential: Vec<Option<ElectricPotential>>,
    /// Per supply pin: for supply-in pins, the voltage across the part
    /// (pin minus the part's ground); for supply-out pins, the voltage it
    /// gives. `None` for any other pin.
    pub pin_voltage: PinTable<Option<ElectricPotential>>,
    /// Per supply pin: current into a supply-in pin or out of a supply-out
    /// pin; zero for any other pin.
    pub pin_current: PinTable<ElectricCurrent>,
    /// Per part: the regulator's point, `None` for any other part.
    pub regulators: PartTable<RegulatorPoint>,
    /// Per part: the motor's point, `None` for any other part.
    pub motors: PartTable<MotorPoint>,
    /// Per driver part: (channel number, current); empty for any other part.
    pub channels: ChannelTable,
    /// Per part: the battery's point, `None` for any other part.
    pub batteries: PartTable<BatteryPoint>,
    /// Per USB link: current over its VBUS conductor.
    pub link_current: Vec<ElectricCurrent>,
    /// How long the point lasts when its mode is a brief peak (`lasts:` of
    /// 5 s or less); `None` for `typical`, `worst` and longer modes.
    pub brief: Option<Time>,
}

/// Where each part's numbers sit in a point's tables: only supply pins
/// and the parts of the classes that have a point of their own take room,
/// so a point grows with the plan's power wiring, not with its logic pins.
/// One per plan, shared by all its points.
#[derive(Debug, Default)]
pub struct Layout {
    /// Per part: where its pins start in `pin_slot`.
    pin_start: Vec<usize>,
    /// Per pin of every part, in order: its slot among the supply pins.
    pin_slot: Vec<u32>,
    /// How many supply pins the plan has.
    supply_pins: usize,
    /// Per part, and one past the last: where its supply pins start among
    /// the slots (a part's slots are consecutive, in pin order).
    slot_start: Vec<u32>,
    /// Per slot: the supply pin it holds.
    slot_pin: Vec<SlotPin>,
    /// Per part: its class among those with points, and its slot among the
    /// parts of that class (each class counts from 0).
    class_slot: Vec<(Option<Kind>, u32)>,
    /// Per class with points: its parts in order.
    regulators: Vec<PartId>,
    motors: Vec<PartId>,
    batteries: Vec<PartId>,
    /// Per driver, in part order: where its channels start and end in a
    /// point's channel list.
    channel_ranges: Vec<(usize, usize)>,
    /// Per driver's channel, in order: its number.
    channel_numbers: Vec<u32>,
}

/// No slot: the pin is not a supply pin, or the part has no point.
const NO_SLOT: u32 = u32::MAX;

/// A supply pin, in the compact form the solver walks each pass.
#[derive(Clone, Copy, Debug)]
struct SlotPin {
    part: PartId,
    pin: usize,
    /// A supply-in pin (else supply-out).
    input: bool,
    net: Option<NetId>,
    /// What a supply-in pin draws by itself.
    draw: Option<crate::model::Draw>,
}

/// The classes of part that have a point of their own.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Kind {
    Regulator,
    Motor,
    Battery,
    Driver,
}

impl Layout {
    /// The layout of a plan's points.
    pub fn new(plan: &Plan) -> Layout {
        let mut layout = Layout {
            pin_start: Vec::with_capacity(plan.parts.len()),
            pin_slot: Vec::new(),
            supply_pins: 0,
            slot_start: Vec::with_capacity(plan.parts.len() + 1),
            slot_pin: Vec::new(),
            class_slot: Vec::with_capacity(plan.parts.len()),
            regulators: Vec::new(),
            motors: Vec::new(),
            batteries: Vec::new(),
            channel_ranges: Vec::new(),
            channel_numbers: Vec::new(),
        };
        for (part_id, part) in plan.parts.iter().enumerate() {
            layout.pin_start.push(layout.pin_slot.len());
            layout.slot_start.push(layout.supply_pins as u32);
            for (pin_id, pin) in part.pins.iter().enumerate() {
                if matches!(pin.role, PinRole::SupplyIn | PinRole::SupplyOut) {
                    layout.pin_slot.push(layout.supply_pins as u32);
                    layout.supply_pins += 1;
                    layout.slot_pin.push(SlotPin {
                        part: part_id,
                        pin: pin_id,
                        input: pin.role == PinRole::SupplyIn,
                        net: pin.net,
                        draw: pin.draw(),
                    });
                } else {
                    layout.pin_slot.push(NO_SLOT);
                }
            }
            let slot = match &part.class {
                Class::Regulator(_) => (
                    Some(Kind::Regulator),
                    push_slot(&mut layout.regulators, part_id),
                ),
                Class::Motor(_) => (Some(Kind::Motor), push_slot(&mut layout.motors, part_id)),
                Class::Battery(_) => (
                    Some(Kind::Battery),
                    push_slot(&mut layout.batteries, part_id),
                ),
                Class::Driver(driver) => {
                    let start = layout.channel_numbers.len();
                    layout
                        .channel_numbers
                        .extend(driver.channels.iter().map(|c| c.number));
                    layout
                        .channel_ranges
                        .push((start, layout.channel_numbers.len()));
                    (Some(Kind::Driver), (layout.channel_ranges.len() - 1) as u32)
                }
                _ => (None, NO_SLOT),
            };
            layout.class_slot.push(slot);
        }
        layout.slot_start.push(layout.supply_pins as u32);
        layout
    }

    /// A part's supply pins, in pin order.
    fn supply_pins_of(&self, part: PartId) -> &[SlotPin] {
        match (self.slot_start.get(part), self.slot_start.get(part + 1)) {
            (Some(&start), Some(&end)) => &self.slot_pin[start as usize..end as usize],
            _ => &[],
        }
    }

    fn pin_slot(&self, part: PartId, pin: usize) -> Option<usize> {
        let start = *self.pin_start.get(part)?;
        let end = self
            .pin_start
            .get(part + 1)
            .copied()
            .unwrap_or(self.pin_slot.len());
        if start + pin >= end {
            return None;
        }
        match self.pin_slot[start + pin] {
            NO_SLOT => None,
            slot => Some(slot as usize),
        }
    }

    fn class_slot(&self, part: PartId, kind: Kind) -> Option<usize> {
        match self.class_slot.get(part).copied() {
            Some((Some(k), slot)) if k == kind => Some(slot as usize),
            _ => None,
        }
    }
}

fn push_slot(parts: &mut Vec<PartId>, part: PartId) -> u32 {
    parts.push(part);
    (parts.len() - 1) as u32
}

/// A value per supply pin of a plan, read by part and pin; other pins read
/// as the blank value.
#[derive(Clone, Debug)]
pub struct PinTable<T> {
    layout: Arc<Layout>,
    values: Vec<T>,
    blank: T,
}

impl<T: Copy> PinTable<T> {
    fn new(layout: &Arc<Layout>, blank: T) -> PinTable<T> {
        PinTable {
            layout: Arc::clone(layout),
            values: vec![blank; layout.supply_pins],
            blank,
        }
    }

    /// A table of no pins, holding a place while a pass refills the real one.
    fn empty() -> PinTable<T>
    where
        T: Default,
    {
        PinTable {
            layout: Arc::new(Layout::default()),
            values: Vec::new(),
            blank: T::default(),
        }
    }

    /// The value at a pin of a part (the blank value for a pin that is not
    /// a supply pin).
    pub fn get(&self, part: PartId, pin: usize) -> T {
        self.layout
            .pin_slot(part, pin)
            .map_or(self.blank, |slot| self.values[slot])
    }

    /// Sets the value at a supply pin; other pins hold nothing.
    fn set(&mut self, part: PartId, pin: usize, value: T) {
        if let Some(slot) = self.layout.pin_slot(part, pin) {
            self.values[slot] = value;
        }
    }
}

/// A point per part of one class (regulators, motors or batteries), read by
/// part: `None` for a part of another class or one not solved.
#[derive(Clone, Debug)]
pub struct PartTable<T> {
    layout: Arc<Layout>,
    kind: Kind,
    values: Vec<Option<T>>,
    none: Option<T>,
}

impl<T: Copy> PartTable<T> {
    fn new(layout: &Arc<Layout>, kind: Kind) -> PartTable<T> {
        let mut table = PartTable {
            layout: Arc::clone(layout),
            kind,
            values: Vec::new(),
            none: None,
        };
        table.values = vec![None; table.parts().len()];
        table
    }

    /// Each part of the class with its point, in part order.
    pub fn iter(&self) -> impl Iterator<Item = (PartId, &Option<T>)> {
        self.parts().iter().copied().zip(&self.values)
    }

    fn parts(&self) -> &[PartId] {
        match self.kind {
            Kind::Regulator => &self.layout.regulators,
            Kind::Motor => &self.layout.motors,
            Kind::Battery => &self.layout.batteries,
            Kind::Driver => &[],
        }
    }
}

impl<T> std::ops::Index<PartId> for PartTable<T> {
    type Output = Option<T>;
    fn index(&self, part: PartId) -> &Option<T> {
        match self.layout.class_slot(part, self.kind) {
            Some(slot) => &self.values[slot],
            None => &self.none,
        }
    }
}

impl<T> std::ops::IndexMut<PartId> for PartTable<T> {
    /// A part of the table's class; the solver writes no other.
    fn index_mut(&mut self, part: PartId) -> &mut Option<T> {
        match self.layout.class_slot(part, self.kind) {
            Some(slot) => &mut self.values[slot],
            None => {
                self.none = None;
                &mut self.none
            }
        }
    }
}

/// Per driver part: (channel number, current) for each of its channels;
/// an empty list for any other part.
#[derive(Clone, Debug)]
pub struct ChannelTable {
    layout: Arc<Layout>,
    values: Vec<(u32, ElectricCurrent)>,
}

impl ChannelTable {
    fn new(layout: &Arc<Layout>) -> ChannelTable {
        ChannelTable {
            layout: Arc::clone(layout),
            values: layout
                .channel_numbers
                .iter()
                .map(|&n| (n, zero_current()))
                .collect(),
        }
    }

    /// A table of no channels, holding a place while a pass refills the
    /// real one.
    fn empty() -> ChannelTable {
        ChannelTable {
            layout: Arc::new(Layout::default()),
            values: Vec::new(),
        }
    }

    fn range(&self, part: PartId) -> std::ops::Range<usize> {
        match self.layout.class_slot(part, Kind::Driver) {
            Some(slot) => {
                let (start, end) = self.layout.channel_ranges[slot];
                start..end
            }
            None => 0..0,
        }
    }
}

impl std::ops::Index<PartId> for ChannelTable {
    type Output = [(u32, ElectricCurrent)];
    fn index(&self, part: PartId) -> &[(u32, ElectricCurrent)] {
        let range = self.range(part);
        &self.values[range]
    }
}

impl std::ops::IndexMut<PartId> for ChannelTable {
    fn index_mut(&mut self, part: PartId) -> &mut [(u32, ElectricCurrent)] {
        let range = self.range(part);
        &mut self.values[range]
    }
}

impl OperatingPoint {
    /// Whether the point meets continuous ratings: not `worst`, and not a
    /// brief peak (format reference §6).
    pub fn is_continuous(&self) -> bool {
        self.mode.is_continuous() && self.brief.is_none()
    }
}

/// Every operating point of a plan.
#[derive(Clone, Debug)]
pub struct Analysis {
    /// The points, mode by mode, then battery state, then tolerance corner.
    pub points: Vec<OperatingPoint>,
}

impl Analysis {
    /// Solves every operating point of the plan: each mode (`worst` once per group
    /// of motors that may stall together) at each battery state and tolerance
    /// corner. A point that does not settle is kept, marked
    /// [`unsettled`](OperatingPoint::unsettled).
    pub fn solve(plan: &Plan, circuit: &Circuit) -> Analysis {
        let threads = std::thread::available_parallelism().map_or(1, |n| n.get());
        Analysis::solve_on(plan, circuit, threads)
    }

    /// The points of one mode only (each battery state and tolerance corner,
    /// `worst` once per stall group): for a question about a single mode,
    /// such as the bench point of the bring-up procedure.
    pub fn solve_one_mode(plan: &Plan, circuit: &Circuit, mode: ModeId) -> Analysis {
        let groups = stall_groups(plan, circuit);
        let lookup = Lookup::build(plan, circuit);
        Analysis {
            points: solve_mode(plan, circuit, &lookup, groups.as_deref(), mode),
        }
    }

    /// [`solve`](Analysis::solve) on at most `threads` threads: each mode's
    /// points are solved on one thread, modes side by side. The points do
    /// not depend on each other, so the result is the same on any number of
    /// threads, in the same order.
    pub fn solve_on(plan: &Plan, circuit: &Circuit, threads: usize) -> Analysis {
        let groups = stall_groups(plan, circuit);
        let lookup = Lookup::build(plan, circuit);
        let modes: Vec<ModeId> = ModeId::all(plan).collect();
        let solve_mode = |mode: ModeId| solve_mode(plan, circuit, &lookup, groups.as_deref(), mode);
        let threads = threads.clamp(1, modes.len().max(1));
        if threads == 1 {
            let points = modes.iter().flat_map(|&mode| solve_mode(mode)).collect();
            return Analysis { points };
        }
        // Each thread takes the next mode not yet taken; the modes' points
        // are put back in mode order. The calling thread is one of the
        // workers: its points take memory the plan's reading has freed,
        // where a spawned thread's would take new memory of its own.
        let next = std::sync::atomic::AtomicUsize::new(0);
        let work = || {
            let mut mine = Vec::new();
            loop {
                let i = next.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
                let Some(&mode) = modes.get(i) else {
                    break;
                };
                mine.push((i, solve_mode(mode)));
            }
            mine
        };
        let mut solved: Vec<(usize, Vec<OperatingPoint>)> = std::thread::scope(|scope| {
            let workers: Vec<_> = (1..threads).map(|_| scope.spawn(work)).collect();
            let mut solved = work();
            for worker in workers {
                match worker.join() {
                    Ok(mine) => solved.extend(mine),
                    Err(panic) => std::panic::resume_unwind(panic),
                }
            }
            solved
        });
        solved.sort_by_key(|(i, _)| *i);
        Analysis {
            points: solved.into_iter().flat_map(|(_, points)| points).collect(),
        }
    }

    /// The points that settled, whose numbers the rules judge.
    pub fn settled(&self) -> impl Iterator<Item = &OperatingPoint> {
        self.points.iter().filter(|p| p.unsettled.is_none())
    }
}

/// Every point of one mode: each stall group (in a bounded `worst`), battery
/// state and tolerance corner, in that order.
fn solve_mode(
    plan: &Plan,
    circuit: &Circuit,
    lookup: &Lookup,
    groups: Option<&[Vec<PartId>]>,
    mode: ModeId,
) -> Vec<OperatingPoint> {
    let states = mode_states(plan, mode);
    let stall_sets: Vec<Option<&[PartId]>> = match (mode, groups) {
        (ModeId::WORST, Some(groups)) => groups.iter().map(|g| Some(g.as_slice())).collect(),
        _ => vec![None],
    };
    let mut solvers = Vec::new();
    for stalled in stall_sets {
        for battery in BatteryState::ALL {
            for corner in [Corner::Low, Corner::High] {
                solvers.push(Solver {
                    plan,
                    circuit,
                    mode,
                    battery,
                    corner,
                    stalled,
                    states: &states,
                    lookup,
                });
            }
        }
    }
    let mut points: Vec<OperatingPoint> = solvers.iter().map(Solver::blank).collect();
    let mut scratch = Scratch {
        before_potential: Vec::new(),
        before_current: Vec::new(),
    };
    // Domain by domain, every point of the mode, while the domain's parts
    // and nets are in the cache; the first domain that does not settle
    // leaves its point unsettled, and the point's later domains unsolved.
    for domain in &lookup.domains {
        for (solver, point) in solvers.iter().zip(&mut points) {
            if point.unsettled.is_none()
                && let Err(failure) = solver.settle(point, domain, &mut scratch)
            {
                point.unsettled = Some(failure);
            }
        }
    }
    points
}

/// The most groups of motors `worst` is solved for: past it, every motor
/// stalls at once, as without `stall_at_once` (the answer stays on the safe side).
const MAX_STALL_GROUPS: usize = 64;

/// The groups of motors that may stall together in `worst` when the plan
/// bounds how many stall at once (`limits.stall_at_once`): every choice of
/// that many of its motors, each solved as its own `worst` point, so each
/// rating meets the heaviest group it carries. `None` when every motor
/// stalls at once.
pub fn stall_groups(plan: &Plan, circuit: &Circuit) -> Option<Vec<Vec<PartId>>> {
    let at_once = plan.limits.stall_at_once?.value as usize;
    let motors: Vec<PartId> = (0..plan.parts.len())
        .filter(|&p| {
            matches!(plan.parts[p].class, Class::Motor(_)) && circuit.motor_feed[p].is_some()
        })
        .collect();
    if at_once >= motors.len() {
        return None;
    }
    let mut groups = Vec::new();
    let mut chosen = Vec::with_capacity(at_once);
    fn choose(
        motors: &[PartId],
        from: usize,
        left: usize,
        chosen: &mut Vec<PartId>,
        groups: &mut Vec<Vec<PartId>>,
    ) -> bool {
        if left == 0 {
            groups.push(chosen.clone());
            return groups.len() <= MAX_STALL_GROUPS;
        }
        for i in from..=motors.len() - left {
            chosen.push(motors[i]);
            let more = choose(motors, i + 1, left - 1, chosen, groups);
            chosen.pop();
            if !more {
                return false;
            }
        }
        true
    }
    choose(&motors, 0, at_once, &mut chosen, &mut groups).then_some(groups)
}

/// What state a mode puts a part in.
pub fn part_state(plan: &Plan, mode: ModeId, part: PartId) -> PartState {
    let default = default_state(mode, matches!(plan.parts[part].class, Class::Motor(_)));
    if mode.0 < 2 {
        return default;
    }
    plan.modes[mode.0 - 2]
        .states
        .iter()
        .find(|(p, _)| *p == part)
        .map_or(default, |(_, s)| *s)
}

/// The state a mode puts each part in, indexed by part: the mode's list
/// read once (the first entry for a part wins, as in [`part_state`]).
fn mode_states(plan: &Plan, mode: ModeId) -> Vec<PartState> {
    let mut states: Vec<PartState> = plan
        .parts
        .iter()
        .map(|part| default_state(mode, matches!(part.class, Class::Motor(_))))
        .collect();
    if mode.0 >= 2 {
        let mut set = vec![false; plan.parts.len()];
        for &(part, state) in &plan.modes[mode.0 - 2].states {
            if let Some(seen) = set.get_mut(part)
                && !*seen
            {
                *seen = true;
                states[part] = state;
            }
        }
    }
    states
}

/// What a mode puts a part in when the mode does not name it.
fn default_state(mode: ModeId, is_motor: bool) -> PartState {
    match (mode, is_motor) {
        (ModeId::WORST, true) => PartState::Motor(MotorState::Stall),
        (ModeId::WORST, false) => PartState::Load(LoadState::Peak),
        (_, true) => PartState::Motor(MotorState::Running),
        (_, false) => PartState::Load(LoadState::Typical),
    }
}

/// Lookups the solver needs at every point, built once per plan.
struct Lookup {
    /// Per net: the resistance of its conductor.
    resistance: Vec<Option<ElectricalResistance>>,
    /// Per part: the USB links it is the host of, in file order.
    host_links: Vec<Vec<usize>>,
    /// Per part: whether it is the device end of a USB link.
    is_device: Vec<bool>,
    /// Per link: the roots of the source-less rails it is the first VBUS
    /// feed of (their current flows over the cable).
    vbus_roots: Vec<Vec<NetId>>,
    /// Where each part's numbers sit in a point.
    layout: Arc<Layout>,
    /// Per part: whether it is a battery (its ground is the reference).
    is_battery: Vec<bool>,
    /// Per net, and one past the last: where its supply-in pins start in
    /// `net_inputs` (in the net's pin order).
    net_inputs_start: Vec<usize>,
    net_inputs: Vec<PinRef>,
    /// The plan cut into its power domains, each solved on its own.
    domains: Vec<Domain>,
    /// Per part: its `vin`, `vout` and `vm` pins, where it has them.
    named_pins: Vec<[Option<usize>; 3]>,
    /// Per link: its device port's draw, if it gives one.
    device_draw: Vec<Option<crate::model::Draw>>,
}

impl Lookup {
    fn build(plan: &Plan, circuit: &Circuit) -> Lookup {
        let mut host_links = vec![Vec::new(); plan.parts.len()];
        let mut is_device = vec![false; plan.parts.len()];
        for (link, l) in plan.links.iter().enumerate() {
            host_links[l.host.0].push(link);
            is_device[l.device.0] = true;
        }
        let mut vbus_roots = vec![Vec::new(); plan.links.len()];
        for (node_id, links) in circuit.vbus.iter().enumerate() {
            if let Some(&link) = links.first()
                && circuit.source[node_id].is_none()
                && let Some(root) = circuit.root[node_id]
            {
                vbus_roots[link].push(root);
            }
        }
        let is_battery: Vec<bool> = plan
            .parts
            .iter()
            .map(|p| matches!(p.class, Class::Battery(_)))
            .collect();
        let mut net_inputs_start = Vec::with_capacity(plan.nets.len() + 1);
        let mut net_inputs = Vec::new();
        for net in &plan.nets {
            net_inputs_start.push(net_inputs.len());
            net_inputs.extend(
                net.pins
                    .iter()
                    .copied()
                    .filter(|p| plan.parts[p.part].pins[p.pin].role == PinRole::SupplyIn),
            );
        }
        net_inputs_start.push(net_inputs.len());
        let layout = Arc::new(Layout::new(plan));
        let domains = Domain::split(plan, circuit, &layout, &is_battery, &vbus_roots);
        let named_pins = plan
            .parts
            .iter()
            .map(|p| [p.pin("vin"), p.pin("vout"), p.pin("vm")])
            .collect();
        Lookup {
            is_battery,
            net_inputs_start,
            net_inputs,
            domains,
            named_pins,
            device_draw: plan
                .links
                .iter()
                .map(|l| match &plan.parts[l.device.0].ports[l.device.1].kind {
                    PortKind::UsbDevice { draw, .. } => *draw,
                    _ => None,
                })
                .collect(),
            resistance: (0..plan.nets.len())
                .map(|n| net_resistance(plan, n))
                .collect(),
            host_links,
            is_device,
            vbus_roots,
            layout,
        }
    }
}

/// One power domain: the parts and nets joined by a conductor, a part or a
/// USB cable. Nothing flows between two domains, so each settles on its
/// own, with only its own numbers in the cache; at a hundred thousand parts
/// a pass over the whole plan would not fit there. Every list keeps the
/// plan-wide order it is taken from, so a domain's sums are added in the
/// same order as in a pass over the whole plan.
#[derive(Debug, Default)]
struct Domain {
    /// Its nets, in net order.
    nets: Vec<NetId>,
    /// Its ground nets in the order of the net trees (each after its parent).
    ground_nets: Vec<NetId>,
    /// Its supply nodes in the order power flows.
    rail_order: Vec<usize>,
    /// Its motors, drivers, regulators and batteries, in part order.
    motors: Vec<PartId>,
    drivers: Vec<PartId>,
    regulators: Vec<PartId>,
    batteries: Vec<PartId>,
    /// The slots of its parts' supply pins.
    slots: Vec<usize>,
    /// Its supply-in pins on no supply node (open, or on a ground), in slot
    /// order: they carry nothing, but a regulator there still gets its
    /// point recorded.
    off_rail_inputs: Vec<PinRef>,
    /// Its parts other than batteries with a ground net, in part order:
    /// their return current flows there.
    returns: Vec<(PartId, NetId)>,
    /// Onboard supply outputs left unwired on its parts other than batteries
    /// and regulators, in part and pin order.
    unwired_outputs: Vec<PinRef>,
    /// Its USB links, in file order.
    links: Vec<usize>,
}

impl Domain {
    /// The plan's power domains, in the order of their first part (then of
    /// their first net, for nets no part touches).
    fn split(
        plan: &Plan,
        circuit: &Circuit,
        layout: &Layout,
        is_battery: &[bool],
        vbus_roots: &[Vec<NetId>],
    ) -> Vec<Domain> {
        let parts = plan.parts.len();
        let net = |n: NetId| parts + n;
        let mut joined = UnionFind::<usize>::new(parts + plan.nets.len());
        for (part_id, part) in plan.parts.iter().enumerate() {
            for pin in &part.pins {
                if let Some(n) = pin.net {
                    joined.union(part_id, net(n));
                }
            }
            if let Some(n) = circuit.ground_net[part_id] {
                joined.union(part_id, net(n));
            }
            match circuit.motor_feed[part_id] {
                Some(MotorFeed::Driver { driver, .. }) => {
                    joined.union(part_id, driver);
                }
                Some(MotorFeed::Direct { supply, ground }) => {
                    joined.union(part_id, net(supply));
                    joined.union(part_id, net(ground));
                }
                None => {}
            }
        }
        for (n, parent) in circuit.parent.iter().enumerate() {
            if let Some(parent) = parent {
                joined.union(net(n), net(parent.net));
            }
        }
        for (node_id, nets) in circuit.node_nets.iter().enumerate() {
            for pair in nets.windows(2) {
                joined.union(net(pair[0]), net(pair[1]));
            }
            let first = nets.first().copied();
            if let (Some(source), Some(n)) = (circuit.source[node_id], first) {
                joined.union(source.part, net(n));
            }
            for &link in &circuit.vbus[node_id] {
                if let Some(n) = first {
                    joined.union(plan.links[link].host.0, net(n));
                }
            }
        }
        for (link, l) in plan.links.iter().enumerate() {
            joined.union(l.host.0, l.device.0);
            for &root in &vbus_roots[link] {
                joined.union(l.host.0, net(root));
            }
        }

        // Domains numbered in order of first appearance.
        let mut number = vec![usize::MAX; parts + plan.nets.len()];
        let mut domains: Vec<Domain> = Vec::new();
        let mut domain_of = |element: usize| {
            let root = joined.find(element);
            if number[root] == usize::MAX {
                number[root] = domains.len();
                domains.push(Domain::default());
            }
            number[root]
        };
        let part_domain: Vec<usize> = (0..parts).map(&mut domain_of).collect();
        let net_domain: Vec<usize> = (0..plan.nets.len()).map(|n| domain_of(net(n))).collect();

        for (n, &d) in net_domain.iter().enumerate() {
            domains[d].nets.push(n);
        }
        for &n in &circuit.net_order {
            if circuit.nodes[circuit.node_of_net[n]].is_ground() {
                domains[net_domain[n]].ground_nets.push(n);
            }
        }
        let mut node_domain = vec![usize::MAX; circuit.nodes.len()];
        for (n, &node) in circuit.node_of_net.iter().enumerate() {
            node_domain[node] = net_domain[n];
        }
        let mut on_rail = vec![false; layout.supply_pins];
        for &node_id in &circuit.rail_order {
            if let Some(domain) = domains.get_mut(node_domain[node_id]) {
                domain.rail_order.push(node_id);
            }
            for pin in &circuit.nodes[node_id].supply_ins {
                if let Some(slot) = layout.pin_slot(pin.part, pin.pin) {
                    on_rail[slot] = true;
                }
            }
        }
        for (part_id, part) in plan.parts.iter().enumerate() {
            let domain = &mut domains[part_domain[part_id]];
            match &part.class {
                Class::Motor(_) => domain.motors.push(part_id),
                Class::Driver(_) => domain.drivers.push(part_id),
                Class::Regulator(_) => domain.regulators.push(part_id),
                Class::Battery(_) => domain.batteries.push(part_id),
                _ => {}
            }
            for slot in layout.slot_start[part_id]..layout.slot_start[part_id + 1] {
                let slot = slot as usize;
                let pin = layout.slot_pin[slot];
                domain.slots.push(slot);
                if pin.input && !on_rail[slot] {
                    domain.off_rail_inputs.push(PinRef {
                        part: pin.part,
                        pin: pin.pin,
                    });
                }
            }
            if !is_battery[part_id]
                && let Some(ground) = circuit.ground_net[part_id]
            {
                domain.returns.push((part_id, ground));
            }
            if !matches!(part.class, Class::Battery(_) | Class::Regulator(_)) {
                for (pin_id, pin) in part.pins.iter().enumerate() {
                    if pin.role == PinRole::SupplyOut && pin.net.is_none() {
                        domain.unwired_outputs.push(PinRef {
                            part: part_id,
                            pin: pin_id,
                        });
                    }
                }
            }
        }
        for (link, l) in plan.links.iter().enumerate() {
            domains[part_domain[l.host.0]].links.push(link);
        }
        domains
    }
}

const MAX_ITERATIONS: usize = 500;
/// Settled when no potential moves by more than this between passes.
fn voltage_tolerance() -> ElectricPotential {
    ElectricPotential::new::<volt>(1e-9)
}
fn current_tolerance() -> ElectricCurrent {
    ElectricCurrent::new::<ampere>(1e-9)
}

fn zero_current() -> ElectricCurrent {
    ElectricCurrent::new::<ampere>(0.0)
}

fn zero_voltage() -> ElectricPotential {
    ElectricPotential::new::<volt>(0.0)
}

/// Resistance of a net's conductor, if it has a wire and a length.
/// Its copper at the net's ambient when the plan gives one, else at 20 °C
/// (format reference §4).
pub fn net_resistance(plan: &Plan, net: NetId) -> Option<ElectricalResistance> {
    let n = &plan.nets[net];
    let (wire, length) = (n.wire?, n.length?);
    Some(wire::resistance_at(
        wire.value,
        length.value,
        plan.conductor_ambient(net),
    ))
}

fn link_resistance(
    plan: &Plan,
    wire: Option<WireSize>,
    length: Option<uom::si::f64::Length>,
) -> Option<ElectricalResistance> {
    Some(wire::resistance_at(wire?, length?, plan.cable_ambient()))
}

/// Buffers a point's solution reuses from domain to domain and pass to pass.
struct Scratch {
    /// A domain's potentials and currents at the last pass, in its net order.
    before_potential: Vec<Option<ElectricPotential>>,
    before_current: Vec<ElectricCurrent>,
}

struct Solver<'a> {
    plan: &'a Plan,
    circuit: &'a Circuit,
    mode: ModeId,
    battery: BatteryState,
    corner: Corner,
    /// In a bounded `worst`: the motors that stall at this point (the
    /// others run).
    stalled: Option<&'a [PartId]>,
    /// Per part: the state the mode puts it in.
    states: &'a [PartState],
    lookup: &'a Lookup,
}

impl Solver<'_> {
    /// The load state of a part at this point (a motor's draws are its
    /// typical ones).
    fn load_state(&self, part: PartId) -> LoadState {
        match self.states[part] {
            PartState::Load(s) => s,
            PartState::Motor(_) => LoadState::Typical,
        }
    }

    fn blank(&self) -> OperatingPoint {
        let plan = self.plan;
        OperatingPoint {
            mode: self.mode,
            battery: self.battery,
            corner: self.corner,
            unsettled: None,
            net_current: vec![zero_current(); plan.nets.len()],
            net_potential: vec![None; plan.nets.len()],
            pin_voltage: PinTable::new(&self.lookup.layout, None),
            pin_current: PinTable::new(&self.lookup.layout, zero_current()),
            regulators: PartTable::new(&self.lookup.layout, Kind::Regulator),
            motors: PartTable::new(&self.lookup.layout, Kind::Motor),
            channels: ChannelTable::new(&self.lookup.layout),
            batteries: PartTable::new(&self.lookup.layout, Kind::Battery),
            link_current: vec![zero_current(); plan.links.len()],
            brief: match self.mode.0 {
                0 | 1 => None,
                n => plan.modes[n - 2].brief(),
            },
        }
    }

    /// Repeats the two passes over one domain until none of its numbers
    /// moves.
    fn settle(
        &self,
        point: &mut OperatingPoint,
        domain: &Domain,
        scratch: &mut Scratch,
    ) -> Result<(), Unsettled> {
        for iteration in 1..=MAX_ITERATIONS {
            scratch.before_potential.clear();
            scratch
                .before_potential
                .extend(domain.nets.iter().map(|&n| point.net_potential[n]));
            scratch.before_current.clear();
            scratch
                .before_current
                .extend(domain.nets.iter().map(|&n| point.net_current[n]));
            self.voltages(point, domain);
            if let Some(mut failure) = self.collapsed(point, domain) {
                failure.iterations = iteration;
                return Err(failure);
            }
            self.currents(point, domain);
            if let Some(mut failure) = self.out_of_range(point, domain) {
                failure.iterations = iteration;
                return Err(failure);
            }
            // Settled when no potential and no current moved by the
            // tolerance (every number is finite here: `out_of_range`).
            let still =
                |n: NetId, before_v: &Option<ElectricPotential>, before_i: ElectricCurrent| {
                    let moved_v = match (before_v, point.net_potential[n]) {
                        (Some(a), Some(b)) => (*a - b).abs() >= voltage_tolerance(),
                        (None, None) => false,
                        _ => true,
                    };
                    moved_v || (before_i - point.net_current[n]).abs() >= current_tolerance()
                };
            if iteration > 1
                && !domain
                    .nets
                    .iter()
                    .zip(&scratch.before_potential)
                    .zip(&scratch.before_current)
                    .any(|((&n, before_v), &before_i)| still(n, before_v, before_i))
            {
                self.voltages(point, domain);
                return Ok(());
            }
        }
        Err(Unsettled {
            part: None,
            reason: format!("voltages and currents still moving after {MAX_ITERATIONS} passes"),
            iterations: MAX_ITERATIONS,
        })
    }

    /// A point that has no physical solution: a source pulled to or below zero.
    /// The blame goes to the constant-power converter that pulls hardest, if
    /// any: with constant-current loads alone a collapse is the source's.
    fn collapsed(&self, point: &OperatingPoint, domain: &Domain) -> Option<Unsettled> {
        let hungriest_converter = domain
            .regulators
            .iter()
            .filter_map(|&part| {
                let r = point.regulators[part].as_ref()?;
                let Class::Regulator(spec) = &self.plan.parts[part].class else {
                    return None;
                };
                let loaded = r.output_current.get::<ampere>() > 0.0;
                (spec.topology.is_switching() && loaded)
                    .then(|| (part, (spec.output.nominal * r.output_current).get::<watt>()))
            })
            .max_by(|a, b| a.1.total_cmp(&b.1));
        let collapsed_battery =
            domain.batteries.iter().copied().find(|&part| {
                point.batteries[part].is_some_and(|b| b.terminal.get::<volt>() <= 0.0)
            });
        let collapsed_converter = domain.regulators.iter().copied().find_map(|part| {
            let r = point.regulators[part].as_ref()?;
            let Class::Regulator(spec) = &self.plan.parts[part].class else {
                return None;
            };
            (spec.topology.is_switching()
                && r.output_current.get::<ampere>() > 0.0
                && r.input_voltage.get::<volt>() <= 0.0)
                .then_some(part)
        });
        if collapsed_battery.is_none() && collapsed_converter.is_none() {
            return None;
        }
        let (part, reason) = match hungriest_converter {
            Some((part, watts)) => (
                part,
                format!(
                    "it draws constant power ({}), and as its input sags it draws more current, until the source collapses: the source cannot deliver that power through its resistance",
                    show_power(Power::new::<watt>(watts / self.efficiency(part)))
                ),
            ),
            None => (
                collapsed_battery.or(collapsed_converter).unwrap_or(0),
                "the source's terminal voltage collapses to zero under this load".to_string(),
            ),
        };
        Some(Unsettled {
            part: Some(part),
            reason,
            iterations: 0,
        })
    }

    /// Numbers no plan can mean (a wire of 1e300 m, a dropout of 1e300 V)
    /// overflow to infinity or NaN: stop rather than report them.
    fn out_of_range(&self, point: &OperatingPoint, domain: &Domain) -> Option<Unsettled> {
        let finite_v = domain
            .nets
            .iter()
            .filter_map(|&n| point.net_potential[n])
            .all(|v| v.get::<volt>().is_finite());
        let finite_i = domain
            .nets
            .iter()
            .all(|&n| point.net_current[n].get::<ampere>().is_finite());
        (!finite_v || !finite_i).then(|| Unsettled {
            part: None,
            reason: "the voltages and currents run out of any physical range: check the plan for a value far too large or too small".into(),
            iterations: 0,
        })
    }

    fn efficiency(&self, part: PartId) -> f64 {
        match &self.plan.parts[part].class {
            Class::Regulator(r) => r.efficiency.get::<ratio>(),
            _ => 1.0,
        }
    }

    // ----- voltages, top down ---------------------------------------------

    fn voltages(&self, point: &mut OperatingPoint, domain: &Domain) {
        let plan = self.plan;
        let circuit = self.circuit;
        // Ground nets first, from the last pass's currents: the battery
        // negative's net is 0 V at its root; return current raises the far end.
        for &net in &domain.nets {
            point.net_potential[net] = None;
        }
        for &net in &domain.ground_nets {
            let upstream = match circuit.parent[net] {
                Some(parent) => point.net_potential[parent.net],
                None => Some(zero_voltage()),
            };
            point.net_potential[net] = upstream.map(|u| u + self.drop(net, point.net_current[net]));
        }

        // Then the rails in the order power flows, so a converter's input is
        // known before its output is worked out in the same pass.
        for &node_id in &domain.rail_order {
            let source = match circuit.source[node_id] {
                Some(pin) => {
                    let ground = self.ground_of(point, pin.part);
                    let across = self.source_voltage(point, pin.part, pin.pin);
                    point.pin_voltage.set(pin.part, pin.pin, across);
                    across.map(|v| ground + v)
                }
                None => circuit.vbus[node_id].first().and_then(|&link| {
                    let device = plan.links[link].device.0;
                    let ground = self.ground_of(point, device);
                    self.vbus_voltage(point, link).map(|v| ground + v)
                }),
            };
            for &net in &circuit.node_nets[node_id] {
                let upstream = match circuit.parent[net] {
                    Some(parent) => point.net_potential[parent.net],
                    None => source,
                };
                point.net_potential[net] =
                    upstream.map(|u| u - self.drop(net, point.net_current[net]));
            }
            // The voltage across each part fed from this rail.
            for pin in &circuit.nodes[node_id].supply_ins {
                let ground = self.ground_of(point, pin.part);
                let across = self
                    .net_of(*pin)
                    .and_then(|n| point.net_potential[n])
                    .map(|v| v - ground);
                point.pin_voltage.set(pin.part, pin.pin, across);
            }
        }

        // Onboard outputs left unwired still set the levels of their part's
        // logic pins: give them their voltage whenever the part is powered.
        let mut powered_part: Option<(PartId, bool)> = None;
        for &PinRef { part, pin } in &domain.unwired_outputs {
            let powered = match powered_part {
                Some((p, powered)) if p == part => powered,
                _ => {
                    let powered =
                        self.fed_supply_in(point, part).is_some() || self.lookup.is_device[part];
                    powered_part = Some((part, powered));
                    powered
                }
            };
            let across = if powered {
                self.source_voltage(point, part, pin)
            } else {
                None
            };
            point.pin_voltage.set(part, pin, across);
        }
    }

    /// The net a pin sits on.
    fn net_of(&self, pin: PinRef) -> Option<NetId> {
        match self.lookup.layout.pin_slot(pin.part, pin.pin) {
            Some(slot) => self.lookup.layout.slot_pin[slot].net,
            None => self.plan.parts[pin.part].pins[pin.pin].net,
        }
    }

    /// Where a part's ground sits: a battery's negative terminal is the
    /// reference every potential is measured from; other parts sit at the
    /// load end of their ground net.
    fn ground_of(&self, point: &OperatingPoint, part: PartId) -> ElectricPotential {
        if self.lookup.is_battery[part] {
            return zero_voltage();
        }
        self.circuit.ground_net[part]
            .and_then(|n| point.net_potential[n])
            .unwrap_or_else(zero_voltage)
    }

    /// VBUS at the device end of a cable: the host's own supply less the drop
    /// over the cable's VBUS and ground conductors (format reference §5: the wire
    /// spec applies to both).
    fn vbus_voltage(&self, point: &OperatingPoint, link: usize) -> Option<ElectricPotential> {
        let host = self.plan.links[link].host.0;
        let at_host = self
            .fed_supply_in(point, host)
            .and_then(|pin| point.pin_voltage.get(host, pin))?;
        let drop = usb_link_resistance(self.plan, link)
            .map_or(zero_voltage(), |r| point.link_current[link] * r * 2.0);
        Some(at_host - drop)
    }

    fn drop(&self, net: NetId, current: ElectricCurrent) -> ElectricPotential {
        match self.lookup.resistance[net] {
            Some(r) => current * r,
            None => zero_voltage(),
        }
    }

    /// Voltage a supply-out pin gives above its part's ground.
    fn source_voltage(
        &self,
        point: &mut OperatingPoint,
        part_id: PartId,
        pin: usize,
    ) -> Option<ElectricPotential> {
        let part = &self.plan.parts[part_id];
        match &part.class {
            Class::Battery(battery) => {
                let open_circuit = battery_voltage(self.plan, part_id, self.battery)?;
                let current = point.pin_current.get(part_id, pin);
                let terminal = open_circuit - current * battery.internal_resistance;
                point.batteries[part_id] = Some(BatteryPoint {
                    open_circuit,
                    terminal,
                    current,
                });
                Some(terminal)
            }
            Class::Regulator(regulator) => {
                let vin_pin = self.lookup.named_pins[part_id][0]?;
                let input = point
                    .pin_voltage
                    .get(part_id, vin_pin)
                    .unwrap_or_else(zero_voltage);
                let target = match self.corner {
                    Corner::Low => regulator.output.min,
                    Corner::High => regulator.output.max,
                };
                let (output, out_of_regulation) = match regulator.topology {
                    Topology::Linear | Topology::Buck => {
                        let ceiling = input - regulator.dropout;
                        if ceiling < target {
                            (ceiling.max(zero_voltage()), true)
                        } else {
                            (target, false)
                        }
                    }
                    Topology::Boost if input > target => (input, true),
                    Topology::Boost | Topology::BuckBoost => (target, false),
                };
                let entry = point.regulators[part_id].get_or_insert(RegulatorPoint {
                    input_voltage: input,
                    output_voltage: output,
                    input_current: zero_current(),
                    output_current: zero_current(),
                    out_of_regulation,
                });
                entry.input_voltage = input;
                entry.output_voltage = output;
                entry.out_of_regulation = out_of_regulation;
                Some(output)
            }
            _ => {
                let band = part.pins[pin].voltage()?;
                Some(match self.corner {
                    Corner::Low => band.min,
                    Corner::High => band.max,
                })
            }
        }
    }

    // ----- currents, bottom up --------------------------------------------

    fn currents(&self, point: &mut OperatingPoint, domain: &Domain) {
        let plan = self.plan;
        let circuit = self.circuit;

        // Motors first: drivers add them up.
        for &part_id in &domain.motors {
            let feed = &circuit.motor_feed[part_id];
            let Class::Motor(motor) = &plan.parts[part_id].class else {
                continue;
            };
            let state = match (self.stalled, self.states[part_id]) {
                (Some(group), _) if !group.contains(&part_id) => MotorState::Running,
                (_, PartState::Motor(s)) => s,
                (_, PartState::Load(_)) => MotorState::Running,
            };
            let (supply_voltage, drop) = match feed {
                Some(MotorFeed::Driver { driver, .. }) => {
                    let Class::Driver(spec) = &plan.parts[*driver].class else {
                        continue;
                    };
                    let vm = self.lookup.named_pins[*driver][2];
                    let v = vm.and_then(|p| point.pin_voltage.get(*driver, p));
                    (v, Some(spec.drop))
                }
                Some(MotorFeed::Direct { supply, ground }) => {
                    let v = match (point.net_potential[*supply], point.net_potential[*ground]) {
                        (Some(s), Some(g)) => Some(s - g),
                        (Some(s), None) => Some(s),
                        _ => None,
                    };
                    (v, None)
                }
                None => (None, None),
            };
            let supply_voltage = supply_voltage
                .unwrap_or_else(zero_voltage)
                .max(zero_voltage());
            let winding = motor.rated_voltage / motor.stall_current;
            let (voltage, current) = match (state, drop) {
                (MotorState::Idle, _) => (zero_voltage(), zero_current()),
                (MotorState::Running, Some(BridgeDrop::Fixed(d))) => (
                    (supply_voltage - d).max(zero_voltage()),
                    motor.rated_current,
                ),
                (MotorState::Running, Some(BridgeDrop::PerSwitch(r))) => (
                    supply_voltage - motor.rated_current * r * 2.0,
                    motor.rated_current,
                ),
                (MotorState::Running, None) => (supply_voltage, motor.rated_current),
                // Stall: the winding resistance alone limits the current
                // (I = V / R, brushed DC motor equation).
                (MotorState::Stall, Some(BridgeDrop::Fixed(d))) => {
                    let v = (supply_voltage - d).max(zero_voltage());
                    (v, v / winding)
                }
                (MotorState::Stall, Some(BridgeDrop::PerSwitch(r))) => {
                    let i = supply_voltage / (winding + r * 2.0);
                    (i * winding, i)
                }
                (MotorState::Stall, None) => (supply_voltage, supply_voltage / winding),
            };
            point.motors[part_id] = feed.map(|_| MotorPoint {
                state,
                voltage,
                current,
            });
        }

        // The last pass's tables are refilled rather than allocated anew;
        // nothing below reads their old values.
        let mut channels = std::mem::replace(&mut point.channels, ChannelTable::empty());
        for &driver in &domain.drivers {
            for slot in &mut channels[driver] {
                slot.1 = zero_current();
            }
        }
        for &motor in &domain.motors {
            if let (Some(MotorFeed::Driver { driver, channel }), Some(m)) =
                (&circuit.motor_feed[motor], point.motors[motor])
                && let Some(slot) = channels[*driver].iter_mut().find(|(n, _)| n == channel)
            {
                slot.1 += m.current;
            }
        }

        // Rails downstream first: what a converter draws depends on what its
        // outputs deliver, so those are known before its input is worked out.
        let mut pin_current = std::mem::replace(&mut point.pin_current, PinTable::empty());
        for &slot in &domain.slots {
            pin_current.values[slot] = pin_current.blank;
        }
        let mut net_current = std::mem::take(&mut point.net_current);
        for &net in &domain.nets {
            net_current[net] = zero_current();
        }
        for &node_id in domain.rail_order.iter().rev() {
            let node = &circuit.nodes[node_id];
            for pin in &node.supply_ins {
                let current =
                    self.supply_in_current(point, *pin, &pin_current, &net_current, &channels);
                pin_current.set(pin.part, pin.pin, current);
            }
            // Each net carries what hangs on it and below it.
            for &net in circuit.node_nets[node_id].iter().rev() {
                let inputs =
                    self.lookup.net_inputs_start[net]..self.lookup.net_inputs_start[net + 1];
                for pin in &self.lookup.net_inputs[inputs] {
                    net_current[net] += pin_current.get(pin.part, pin.pin);
                }
                // Motors wired straight across a rail load its supply net.
                net_current[net] += circuit.direct_motors[net]
                    .iter()
                    .filter_map(|&motor| point.motors[motor])
                    .fold(zero_current(), |sum, m| sum + m.current);
                if let Some(parent) = circuit.parent[net] {
                    let below = net_current[net];
                    net_current[parent.net] += below;
                }
            }
            // The node's source (the one its voltage is taken from) carries
            // it. Others (a conflict, or diode-joined spares) are charged
            // nothing rather than twice.
            if let (Some(source), Some(root)) = (circuit.source[node_id], circuit.root[node_id]) {
                pin_current.set(source.part, source.pin, net_current[root]);
            }
        }
        // Inputs on no rail carry nothing, but a regulator there still gets
        // its operating point recorded.
        for &pin in &domain.off_rail_inputs {
            let _ = self.supply_in_current(point, pin, &pin_current, &net_current, &channels);
        }

        // Return current: what a part takes in minus what it gives out, on
        // its ground net, summed toward the battery negative.
        for &(part_id, ground) in &domain.returns {
            let mut returned = zero_current();
            for pin in self.lookup.layout.supply_pins_of(part_id) {
                if pin.input {
                    returned += pin_current.get(part_id, pin.pin);
                } else {
                    returned -= pin_current.get(part_id, pin.pin);
                }
            }
            net_current[ground] += returned;
        }
        for &motor in &domain.motors {
            if let (Some(MotorFeed::Direct { ground, .. }), Some(m)) =
                (&circuit.motor_feed[motor], point.motors[motor])
            {
                net_current[*ground] += m.current;
            }
        }
        for &net in domain.ground_nets.iter().rev() {
            if let Some(parent) = circuit.parent[net] {
                let below = net_current[net];
                net_current[parent.net] += below;
            }
        }

        for &link in &domain.links {
            point.link_current[link] = self.link_current(point, link, &pin_current, &net_current);
        }
        point.pin_current = pin_current;
        point.net_current = net_current;
        point.channels = channels;
    }

    /// What a USB cable carries from its host: the device port's draw, what a
    /// device powered only by the cable passes on from its own outputs, and
    /// a rail the cable's VBUS feeds when nothing else feeds it.
    fn link_current(
        &self,
        point: &OperatingPoint,
        link: usize,
        pin_current: &PinTable<ElectricCurrent>,
        net_current: &[ElectricCurrent],
    ) -> ElectricCurrent {
        let plan = self.plan;
        let device = plan.links[link].device.0;
        let state = self.load_state(device);
        let mut current = match self.lookup.device_draw[link] {
            Some(d) => d.in_state(state),
            None => zero_current(),
        };
        if self.fed_supply_in(point, device).is_none() {
            for pin in self.lookup.layout.supply_pins_of(device) {
                if !pin.input {
                    current += pin_current.get(device, pin.pin);
                }
            }
        }
        for &root in &self.lookup.vbus_roots[link] {
            current += net_current[root];
        }
        current
    }

    /// The current into one supply-in pin: its draw in the mode's state, a
    /// regulator's input by its topology, a driver's motors, and, on the
    /// part's first fed input, what its onboard outputs and USB host ports
    /// deliver.
    fn supply_in_current(
        &self,
        point: &mut OperatingPoint,
        pin_ref: crate::model::PinRef,
        pin_current: &PinTable<ElectricCurrent>,
        net_current: &[ElectricCurrent],
        channels: &ChannelTable,
    ) -> ElectricCurrent {
        let plan = self.plan;
        let layout = &self.lookup.layout;
        let (part_id, pin_id) = (pin_ref.part, pin_ref.pin);
        let (net, draw) = match layout.pin_slot(part_id, pin_id) {
            Some(slot) => (layout.slot_pin[slot].net, layout.slot_pin[slot].draw),
            None => {
                let pin = &plan.parts[part_id].pins[pin_id];
                (pin.net, pin.draw())
            }
        };
        let state = self.load_state(part_id);
        // Only a pin on a fed rail draws: an open or unfed input carries
        // nothing (its part may be powered another way).
        let fed = net.is_some_and(|n| point.net_potential[n].is_some());
        let mut current = match draw {
            Some(d) if fed => d.in_state(state),
            _ => zero_current(),
        };
        let kind = layout.class_slot.get(part_id).and_then(|(kind, _)| *kind);
        let part = match kind {
            // Only these classes take the part's own record.
            Some(Kind::Regulator | Kind::Driver) => Some(&plan.parts[part_id]),
            _ => None,
        };
        match part.map(|p| &p.class) {
            Some(Class::Regulator(regulator))
                if self.lookup.named_pins[part_id][0] == Some(pin_id) =>
            {
                let Some(vout) = self.lookup.named_pins[part_id][1] else {
                    return current;
                };
                let output_current = pin_current.get(part_id, vout);
                let input_voltage = point
                    .pin_voltage
                    .get(part_id, pin_id)
                    .unwrap_or_else(zero_voltage);
                let output_voltage = point.regulators[part_id]
                    .map_or(regulator.output.nominal, |r| r.output_voltage);
                let input_current = if regulator.topology == Topology::Linear {
                    output_current + regulator.quiescent
                } else if input_voltage.get::<volt>() > 0.0 {
                    // Energy balance: Iin = Vout·Iout / (η·Vin) (conservation of energy).
                    let output_power: Power = output_voltage * output_current;
                    output_power / (input_voltage * regulator.efficiency.get::<ratio>())
                        + regulator.quiescent
                } else {
                    regulator.quiescent
                };
                let entry = point.regulators[part_id].get_or_insert(RegulatorPoint {
                    input_voltage,
                    output_voltage,
                    input_current,
                    output_current,
                    out_of_regulation: false,
                });
                entry.input_current = input_current;
                entry.output_current = output_current;
                return input_current;
            }
            Some(Class::Driver(driver)) if self.lookup.named_pins[part_id][2] == Some(pin_id) => {
                let motors = channels[part_id]
                    .iter()
                    .fold(zero_current(), |sum, (_, i)| sum + *i);
                current += motors + driver.quiescent;
            }
            _ => {}
        }
        // Onboard outputs and USB host ports are paid for by the part's own
        // supply, through its first fed input.
        let pays = !matches!(kind, Some(Kind::Battery | Kind::Regulator))
            && self.fed_supply_in(point, part_id) == Some(pin_id);
        if pays {
            for out in layout.supply_pins_of(part_id) {
                if !out.input {
                    current += pin_current.get(part_id, out.pin);
                }
            }
            for &link in &self.lookup.host_links[part_id] {
                current += self.link_current(point, link, pin_current, net_current);
            }
        }
        current
    }

    /// The first supply-in pin of a part that sits on a fed rail.
    fn fed_supply_in(&self, point: &OperatingPoint, part: PartId) -> Option<usize> {
        self.lookup
            .layout
            .supply_pins_of(part)
            .iter()
            .find(|pin| pin.input && pin.net.is_some_and(|n| point.net_potential[n].is_some()))
            .map(|pin| pin.pin)
    }
}

/// Link resistance of a USB cable's VBUS conductor, for the wire rules.
pub fn usb_link_resistance(plan: &Plan, link: usize) -> Option<ElectricalResistance> {
    let l = &plan.links[link];
    link_resistance(plan, l.wire.map(|w| w.value), l.length.map(|l| l.value))
}
