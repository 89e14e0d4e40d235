//! Power scenarios: the robot with a supply from outside connected, its
//! batteries removed or a switch open, and which rails and parts that leaves
//! powered.
//!
//! Normal running (every battery in, every switch closed, nothing from
//! outside connected) is the base every other scenario is compared with.
//! Besides the plan's own `scenarios:`, the obvious ones are derived: each
//! switch open on its own; each supply from outside connected as the robot
//! runs; and each of them connected with every battery removed.
//!
//! A rail is powered when a present source reaches it through closed
//! contacts: a battery, a supply from outside, the output of a part that is
//! itself powered (a regulator, a board's onboard regulator), or the VBUS of
//! a USB cable whose host is powered. Only reachability is decided here, no
//! voltages: the rules read which parts go off and which stay on (a back-fed
//! output, an input driven into a part that is off, a motor the stop leaves
//! running).
//!
//! A switch-open scenario is solved only over what the switch can reach in
//! the power-flow graph; everything else keeps its running state, so the
//! cost of all of them together grows with the plan, not with plan × switches.

use crate::graph::{Circuit, Stage, through_pairs};
use crate::model::{Class, NetId, PartId, PinRole, Plan, SupplyAttach};
use petgraph::unionfind::UnionFind;
use std::collections::{HashMap, HashSet};

/// Where a scenario comes from.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Origin {
    /// The plan's own, by its place in `scenarios:`.
    Declared(usize),
    /// One switch open, everything else as in normal running.
    SwitchOpen(PartId),
    /// A supply from outside connected as the robot runs (batteries it
    /// `replaces` removed).
    Connected(usize),
    /// A supply from outside connected with every battery removed.
    Alone(usize),
}

/// One power scenario: what is connected, removed and open.
#[derive(Clone, Debug)]
pub struct Scenario {
    /// Where it comes from.
    pub origin: Origin,
    /// How messages name it: ``scenario `flashing` `` or ``with `estop` open``.
    pub label: String,
    /// Supplies from outside connected, as indices into `Plan::supplies`.
    pub connected: Vec<usize>,
    /// Batteries removed.
    pub removed: Vec<PartId>,
    /// Switches open.
    pub open: Vec<PartId>,
}

/// Which nets and parts a scenario leaves powered, as a difference from
/// normal running.
#[derive(Clone, Debug, Default)]
struct Difference {
    nets: HashMap<NetId, bool>,
    parts: HashMap<PartId, bool>,
}

impl Difference {
    /// The nets and parts, of those given with their power, whose power
    /// differs from normal running.
    fn from_running(
        running: &Scenarios,
        nets: impl IntoIterator<Item = (NetId, bool)>,
        parts: impl IntoIterator<Item = (PartId, bool)>,
    ) -> Difference {
        Difference {
            nets: nets
                .into_iter()
                .filter(|&(net, on)| on != running.running_nets[net])
                .collect(),
            parts: parts
                .into_iter()
                .filter(|&(part, on)| on != running.running_parts[part])
                .collect(),
        }
    }
}

/// Every scenario of a plan with what it leaves powered.
#[derive(Clone, Debug)]
pub struct Scenarios {
    running_nets: Vec<bool>,
    running_parts: Vec<bool>,
    list: Vec<(Scenario, Difference)>,
}

/// A view of one scenario: which nets and parts are powered in it.
#[derive(Clone, Copy, Debug)]
pub struct Powered<'s> {
    /// The scenario.
    pub scenario: &'s Scenario,
    all: &'s Scenarios,
    difference: &'s Difference,
}

impl Powered<'_> {
    /// Whether a present source reaches the net through closed contacts.
    pub fn net_on(&self, net: NetId) -> bool {
        self.difference
            .nets
            .get(&net)
            .copied()
            .unwrap_or(self.all.running_nets[net])
    }

    /// Whether the part has power: a present battery, or a part with a
    /// powered supply input or a powered USB device port.
    pub fn part_on(&self, part: PartId) -> bool {
        self.difference
            .parts
            .get(&part)
            .copied()
            .unwrap_or(self.all.running_parts[part])
    }

    /// The nets that have power in normal running and none here, in net order.
    pub fn nets_turned_off(&self) -> Vec<NetId> {
        self.nets_now(false)
    }

    /// The nets that have no power in normal running and have it here.
    pub fn nets_turned_on(&self) -> Vec<NetId> {
        self.nets_now(true)
    }

    /// The nets whose power differs from normal running and is `on` here,
    /// in net order (the difference holds only nets that differ).
    fn nets_now(&self, on: bool) -> Vec<NetId> {
        let mut nets: Vec<NetId> = self
            .difference
            .nets
            .iter()
            .filter(|&(_, &now)| now == on)
            .map(|(&n, _)| n)
            .collect();
        nets.sort_unstable();
        nets
    }

    /// The parts whose power differs from normal running, in part order.
    pub fn changed_parts(&self) -> Vec<PartId> {
        let mut parts: Vec<PartId> = self
            .difference
            .parts
            .iter()
            .filter(|&(&p, &on)| self.all.running_parts[p] != on)
            .map(|(&p, _)| p)
            .collect();
        parts.sort_unstable();
        parts
    }
}

impl Scenarios {
    /// Derives the scenarios of a plan and solves which rails each powers.
    pub fn solve(plan: &Plan, circuit: &Circuit) -> Scenarios {
        let solver = Solver::new(plan, circuit);
        let running = solver.solve_full(&[], &[], &[]);
        let mut all = Scenarios {
            running_nets: running.nets,
            running_parts: running.parts,
            list: Vec::new(),
        };
        let batteries = plan.batteries();
        for (i, declared) in plan.scenarios.iter().enumerate() {
            let scenario = Scenario {
                origin: Origin::Declared(i),
                label: format!("in scenario `{}`", declared.name),
                connected: declared.connected.clone(),
                removed: declared.removed.clone(),
                open: declared.open.clone(),
            };
            all.push_full(&solver, scenario);
        }
        for (part_id, part) in plan.parts.iter().enumerate() {
            if matches!(part.class, Class::Switch(_)) {
                let scenario = Scenario {
                    origin: Origin::SwitchOpen(part_id),
                    label: format!("with `{}` open", part.name),
                    connected: Vec::new(),
                    removed: Vec::new(),
                    open: vec![part_id],
                };
                let difference = solver.solve_switch_open(part_id, &all);
                all.list.push((scenario, difference));
            }
        }
        for (i, supply) in plan.supplies.iter().enumerate() {
            let replaced = names(plan, &supply.replaces);
            let scenario = Scenario {
                origin: Origin::Connected(i),
                label: if replaced.is_empty() {
                    format!("with `{}` connected", supply.name)
                } else {
                    format!("with `{}` connected in place of {replaced}", supply.name)
                },
                connected: vec![i],
                removed: supply.replaces.clone(),
                open: Vec::new(),
            };
            all.push_full(&solver, scenario);
            let mut every = batteries.clone();
            every.retain(|b| !supply.replaces.contains(b));
            if !every.is_empty() {
                let scenario = Scenario {
                    origin: Origin::Alone(i),
                    label: format!(
                        "with `{}` connected and {} removed",
                        supply.name,
                        names(plan, &batteries)
                    ),
                    connected: vec![i],
                    removed: batteries.clone(),
                    open: Vec::new(),
                };
                all.push_full(&solver, scenario);
            }
        }
        all
    }

    fn push_full(&mut self, solver: &Solver, scenario: Scenario) {
        let state = solver.solve_full(&scenario.connected, &scenario.removed, &scenario.open);
        let difference = Difference::from_running(
            self,
            state.nets.iter().copied().enumerate(),
            state.parts.iter().copied().enumerate(),
        );
        self.list.push((scenario, difference));
    }

    /// Normal running's view: every battery in, every switch closed.
    pub fn running_part_on(&self, part: PartId) -> bool {
        self.running_parts[part]
    }

    /// Whether the net has power in normal running.
    pub fn running_net_on(&self, net: NetId) -> bool {
        self.running_nets[net]
    }

    /// Every scenario but normal running, declared ones first, then each
    /// switch open, then each supply from outside.
    pub fn iter(&self) -> impl Iterator<Item = Powered<'_>> {
        self.list.iter().map(move |(scenario, difference)| Powered {
            scenario,
            all: self,
            difference,
        })
    }
}

/// `` `pack` `` or `` `pack` and `spare` ``.
fn names(plan: &Plan, parts: &[PartId]) -> String {
    let names: Vec<String> = parts
        .iter()
        .map(|&p| format!("`{}`", plan.parts[p].name))
        .collect();
    match names.as_slice() {
        [] => String::new(),
        [one] => one.clone(),
        [init @ .., last] => format!("{} and {last}", init.join(", ")),
    }
}

/// Nets and parts powered in one scenario, for every net and part.
struct FullState {
    nets: Vec<bool>,
    parts: Vec<bool>,
}

/// What every scenario's solution reads, built once per plan.
struct Solver<'a> {
    plan: &'a Plan,
    circuit: &'a Circuit,
    /// Per net: the parts whose through pins join it to another net.
    through: Vec<Vec<(PartId, NetId)>>,
    /// Per part: the USB links it is the host of.
    hosted: Vec<Vec<usize>>,
    /// Per part: the USB link plugged into each of its device ports.
    plugged: HashMap<(PartId, usize), usize>,
    /// Per part: the USB links it is the device of.
    feeding_links: Vec<Vec<usize>>,
}

impl<'a> Solver<'a> {
    fn new(plan: &'a Plan, circuit: &'a Circuit) -> Solver<'a> {
        let mut through = vec![Vec::new(); plan.nets.len()];
        for (part_id, part) in plan.parts.iter().enumerate() {
            for (a, b) in through_pairs(plan, part_id) {
                if let (Some(na), Some(nb)) = (part.pins[a].net, part.pins[b].net) {
                    through[na].push((part_id, nb));
                    through[nb].push((part_id, na));
                }
            }
        }
        let mut hosted = vec![Vec::new(); plan.parts.len()];
        let mut feeding_links = vec![Vec::new(); plan.parts.len()];
        let mut plugged = HashMap::new();
        for (i, link) in plan.links.iter().enumerate() {
            hosted[link.host.0].push(i);
            feeding_links[link.device.0].push(i);
            plugged.insert(link.device, i);
        }
        Solver {
            plan,
            circuit,
            through,
            hosted,
            plugged,
            feeding_links,
        }
    }

    /// Every net and part, from the scenario's sources alone.
    fn solve_full(&self, connected: &[usize], removed: &[PartId], open: &[PartId]) -> FullState {
        let local = Local::solve(self, &Region::Whole, None, connected, removed, open);
        let mut state = FullState {
            nets: vec![false; self.plan.nets.len()],
            parts: vec![false; self.plan.parts.len()],
        };
        for (net, on) in local.nets {
            state.nets[net] = on;
        }
        for (part, on) in local.parts.iter() {
            state.parts[part] = on;
        }
        state
    }

    /// One switch open: only the rails its node feeds, directly or through
    /// converters and USB cables, can change.
    fn solve_switch_open(&self, switch: PartId, running: &Scenarios) -> Difference {
        let part = &self.plan.parts[switch];
        let Some(start) = part.pins.iter().find_map(|p| p.net) else {
            return Difference::default();
        };
        let node = self.circuit.node_of_net[start];
        let mut region_nodes = vec![node];
        if let Some(stage) = self.circuit.rail_stage[node] {
            // A walk of its own rather than petgraph's `Dfs`, whose visited
            // set is as large as the whole graph: each switch pays only for
            // what it feeds.
            let mut visited = HashSet::from([stage]);
            let mut stack = vec![stage];
            while let Some(here) = stack.pop() {
                for next in self.circuit.flow.neighbors(here) {
                    if visited.insert(next) {
                        if let Stage::Rail(n) = self.circuit.flow[next] {
                            region_nodes.push(n);
                        }
                        stack.push(next);
                    }
                }
            }
        }
        let nets: Vec<NetId> = region_nodes
            .iter()
            .flat_map(|&n| self.circuit.nodes[n].nets.iter().copied())
            .collect();
        let index = nets.iter().enumerate().map(|(i, &n)| (n, i)).collect();
        let region = Region::Some { nets, index };
        let local = Local::solve(self, &region, Some(running), &[], &[], &[switch]);
        Difference::from_running(running, local.nets, local.parts.iter())
    }
}

/// Marks a part decided in this region as having power, once, and queues
/// it for what it powers in turn.
fn switch_on(parts: &mut Decided, queue: &mut Vec<PartId>, part: PartId) {
    if parts.get(part) == Some(false) {
        parts.insert(part, true);
        queue.push(part);
    }
}

/// The nets a scenario is solved over.
enum Region {
    /// Every net of the plan, each at its own number.
    Whole,
    /// Some nets: the region's own numbering of them, and back.
    Some {
        nets: Vec<NetId>,
        index: HashMap<NetId, usize>,
    },
}

impl Region {
    fn len(&self, plan: &Plan) -> usize {
        match self {
            Region::Whole => plan.nets.len(),
            Region::Some { nets, .. } => nets.len(),
        }
    }

    /// The net at a place in the region.
    fn net(&self, i: usize) -> NetId {
        match self {
            Region::Whole => i,
            Region::Some { nets, .. } => nets[i],
        }
    }

    /// The place of a net in the region, if it is in it.
    fn place(&self, net: NetId) -> Option<usize> {
        match self {
            Region::Whole => Some(net),
            Region::Some { index, .. } => index.get(&net).copied(),
        }
    }
}

/// The parts a scenario decides, each with whether it has power: every
/// part for a whole plan (one flag per part), a few for a region.
enum Decided {
    Every(Vec<Option<bool>>),
    Some(HashMap<PartId, bool>),
}

impl Decided {
    fn get(&self, part: PartId) -> Option<bool> {
        match self {
            Decided::Every(parts) => parts[part],
            Decided::Some(parts) => parts.get(&part).copied(),
        }
    }

    fn contains(&self, part: PartId) -> bool {
        self.get(part).is_some()
    }

    fn insert(&mut self, part: PartId, on: bool) {
        match self {
            Decided::Every(parts) => parts[part] = Some(on),
            Decided::Some(parts) => {
                parts.insert(part, on);
            }
        }
    }

    /// Each part decided, with its power, in no particular order.
    fn iter(&self) -> Box<dyn Iterator<Item = (PartId, bool)> + '_> {
        match self {
            Decided::Every(parts) => Box::new(
                parts
                    .iter()
                    .enumerate()
                    .filter_map(|(p, on)| Some((p, (*on)?))),
            ),
            Decided::Some(parts) => Box::new(parts.iter().map(|(&p, &on)| (p, on))),
        }
    }
}

/// One scenario solved over a region of nets; parts and nets outside it
/// keep their running state.
struct Local {
    nets: Vec<(NetId, bool)>,
    parts: Decided,
}

impl Local {
    fn solve(
        solver: &Solver,
        region: &Region,
        running: Option<&Scenarios>,
        connected: &[usize],
        removed: &[PartId],
        open: &[PartId],
    ) -> Local {
        let plan = solver.plan;
        let size = region.len(plan);
        let mut joined = UnionFind::<usize>::new(size);
        for i in 0..size {
            for &(part, other) in &solver.through[region.net(i)] {
                if open.contains(&part) {
                    continue;
                }
                if let Some(j) = region.place(other) {
                    joined.union(i, j);
                }
            }
        }
        let group: Vec<usize> = (0..size).map(|i| joined.find(i)).collect();
        // Per group (numbered by its representative's place): its places.
        let mut group_nets: Vec<Vec<usize>> = vec![Vec::new(); size];
        for (i, &g) in group.iter().enumerate() {
            group_nets[g].push(i);
        }
        // Parts decided here: those with a supply input in the region, and
        // the devices of cables they host; with no running state to keep,
        // every part. Others keep their running state.
        let mut local_parts = match running {
            None => Decided::Every(vec![Some(false); plan.parts.len()]),
            Some(_) => {
                let mut parts = HashMap::new();
                for i in 0..size {
                    for pin in &plan.nets[region.net(i)].pins {
                        if plan.parts[pin.part].pins[pin.pin].role == PinRole::SupplyIn {
                            parts.insert(pin.part, false);
                        }
                    }
                }
                let mut hosts: Vec<PartId> = parts.keys().copied().collect();
                while let Some(host) = hosts.pop() {
                    for &link in &solver.hosted[host] {
                        let device = plan.links[link].device.0;
                        if let std::collections::hash_map::Entry::Vacant(e) = parts.entry(device) {
                            e.insert(false);
                            hosts.push(device);
                        }
                    }
                }
                Decided::Some(parts)
            }
        };
        let outside_on = |part: PartId| running.is_some_and(|r| r.running_parts[part]);
        // Cables unplugged because a supply from outside takes their port.
        let unplugged: Vec<usize> = connected
            .iter()
            .filter_map(|&s| match plan.supplies[s].attach {
                SupplyAttach::Port(part, port) => solver.plugged.get(&(part, port)).copied(),
                SupplyAttach::Net(_) => None,
            })
            .collect();

        let mut group_on: Vec<bool> = vec![false; size];
        let mut groups_to_visit: Vec<usize> = Vec::new();
        let mut parts_to_visit: Vec<PartId> = Vec::new();
        let power_net = |net: NetId, group_on: &mut Vec<bool>, queue: &mut Vec<usize>| {
            if let Some(i) = region.place(net) {
                let g = group[i];
                if !group_on[g] {
                    group_on[g] = true;
                    queue.push(g);
                }
            }
        };
        // Sources: present batteries, supplies from outside, and parts
        // outside the region that keep their power.
        for i in 0..size {
            let net = region.net(i);
            for pin in &plan.nets[net].pins {
                let part = &plan.parts[pin.part];
                if part.pins[pin.pin].role != PinRole::SupplyOut {
                    continue;
                }
                let on = match part.class {
                    Class::Battery(_) => !removed.contains(&pin.part),
                    _ => !local_parts.contains(pin.part) && outside_on(pin.part),
                };
                if on {
                    power_net(net, &mut group_on, &mut groups_to_visit);
                }
            }
            for &link in &solver.circuit.vbus[solver.circuit.node_of_net[net]] {
                let host = plan.links[link].host.0;
                if !local_parts.contains(host) && outside_on(host) && !unplugged.contains(&link) {
                    let (device, port) = plan.links[link].device;
                    if plan.fed_net(device, port) == Some(net) {
                        power_net(net, &mut group_on, &mut groups_to_visit);
                    }
                }
            }
        }
        // A part decided here may also have a supply input outside the
        // region, or a cable from a host outside it: those keep their
        // running power (a driver's logic supply on a rail the switch does
        // not feed).
        if let Some(running) = running {
            let mut already_on: Vec<PartId> = Vec::new();
            for (part_id, _) in local_parts.iter() {
                let part = &plan.parts[part_id];
                let by_pin = part.pins_with_role(PinRole::SupplyIn).any(|(_, pin)| {
                    pin.net
                        .is_some_and(|n| region.place(n).is_none() && running.running_nets[n])
                });
                let by_cable = solver.feeding_links[part_id].iter().any(|&link| {
                    let host = plan.links[link].host.0;
                    !local_parts.contains(host)
                        && running.running_parts[host]
                        && !unplugged.contains(&link)
                });
                if by_pin || by_cable {
                    already_on.push(part_id);
                }
            }
            already_on.sort_unstable();
            for part_id in already_on {
                switch_on(&mut local_parts, &mut parts_to_visit, part_id);
            }
        }
        for &s in connected {
            match plan.supplies[s].attach {
                SupplyAttach::Net(net) => power_net(net, &mut group_on, &mut groups_to_visit),
                SupplyAttach::Port(part, port) => {
                    switch_on(&mut local_parts, &mut parts_to_visit, part);
                    if let Some(net) = plan.fed_net(part, port) {
                        power_net(net, &mut group_on, &mut groups_to_visit);
                    }
                }
            }
        }
        // Power spreads: a powered rail turns on the parts it feeds; a part
        // that is on powers its outputs and the cables it hosts.
        loop {
            if let Some(g) = groups_to_visit.pop() {
                for &i in &group_nets[g] {
                    for pin in &plan.nets[region.net(i)].pins {
                        if plan.parts[pin.part].pins[pin.pin].role == PinRole::SupplyIn {
                            switch_on(&mut local_parts, &mut parts_to_visit, pin.part);
                        }
                    }
                }
            } else if let Some(part_id) = parts_to_visit.pop() {
                let part = &plan.parts[part_id];
                if !matches!(part.class, Class::Battery(_)) {
                    for (_, pin) in part.pins_with_role(PinRole::SupplyOut) {
                        if let Some(net) = pin.net {
                            power_net(net, &mut group_on, &mut groups_to_visit);
                        }
                    }
                }
                for &link in &solver.hosted[part_id] {
                    if unplugged.contains(&link) {
                        continue;
                    }
                    let (device, port) = plan.links[link].device;
                    switch_on(&mut local_parts, &mut parts_to_visit, device);
                    if let Some(net) = plan.fed_net(device, port) {
                        power_net(net, &mut group_on, &mut groups_to_visit);
                    }
                }
            } else {
                break;
            }
        }
        let batteries: Vec<PartId> = local_parts
            .iter()
            .map(|(part, _)| part)
            .filter(|&part| matches!(plan.parts[part].class, Class::Battery(_)))
            .collect();
        for battery in batteries {
            local_parts.insert(battery, !removed.contains(&battery));
        }
        let nets = (0..size)
            .map(|i| (region.net(i), group_on[group[i]]))
            .collect();
        Local {
            nets,
            parts: local_parts,
        }
    }
}
