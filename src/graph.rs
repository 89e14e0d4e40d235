//! The plan as a graph: which nets conduct into one electrical node, which way
//! power flows from batteries through converters to loads, and where grounds go.
//!
//! Built once from the model with `petgraph`; the topology rules (`power/short`,
//! `power/loop`, `ground/floating`, …) and the operating-point solver both read
//! it. It computes no voltages or currents.

use crate::model::{Class, NetId, PartId, PinIndex, PinRef, PinRole, Plan, PortKind};
use petgraph::stable_graph::{NodeIndex, StableDiGraph};
use petgraph::unionfind::UnionFind;
use std::collections::{HashMap, VecDeque};

/// Nets joined by `through` pins (fuses, switches, connector contacts).
#[derive(Clone, Debug, Default)]
pub struct ElectricalNode {
    /// Its nets, in file order.
    pub nets: Vec<NetId>,
    /// The supply-out pins on it: what may feed it.
    pub supply_outs: Vec<PinRef>,
    /// The supply-in pins on it: what it feeds.
    pub supply_ins: Vec<PinRef>,
    /// The ground pins on it.
    pub grounds: Vec<PinRef>,
}

impl ElectricalNode {
    /// A ground node: any ground pin is on it.
    pub fn is_ground(&self) -> bool {
        !self.grounds.is_empty()
    }
}

/// How a net hangs below the source-side net of its electrical node.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Parent {
    /// The net above it, toward the source.
    pub net: NetId,
    /// The conducting part and its two pins (source side, load side).
    pub part: PartId,
    /// The part's pin on the source side.
    pub upstream_pin: PinIndex,
    /// The part's pin on the load side.
    pub downstream_pin: PinIndex,
}

/// How a motor is powered.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum MotorFeed {
    /// Across two bridge outputs of a driver channel.
    Driver {
        /// The driver part.
        driver: PartId,
        /// The channel's number in the driver's `channels:`.
        channel: u32,
    },
    /// Straight across a rail and a ground.
    Direct {
        /// The rail's net.
        supply: NetId,
        /// The ground's net.
        ground: NetId,
    },
}

/// A stage of power conversion in the flow graph.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Stage {
    /// An electrical node that carries supply (no ground pins).
    Rail(usize),
    /// A part that takes power from rails and may give power to others.
    Converter(PartId),
}

/// The plan's graph: electrical nodes, how each net hangs below its source,
/// which way power flows, where each part's ground goes. Indices are
/// [`NetId`]s, [`PartId`]s and positions in [`Circuit::nodes`].
#[derive(Clone, Debug)]
pub struct Circuit {
    /// The electrical nodes: nets joined by `through` pins.
    pub nodes: Vec<ElectricalNode>,
    /// Per net: the electrical node it belongs to.
    pub node_of_net: Vec<usize>,
    /// Per net: where it hangs in its node's tree, `None` for the root.
    pub parent: Vec<Option<Parent>>,
    /// Per net: the nets directly below it.
    pub children: Vec<Vec<NetId>>,
    /// Per electrical node: the net holding its source (or battery negative).
    pub root: Vec<Option<NetId>>,
    /// Per electrical node: the supply-out pin its voltage is taken from (the
    /// first one on its root net), if a pin feeds it.
    pub source: Vec<Option<PinRef>>,
    /// Per electrical node: the USB links whose device port `feeds` a pin on it
    /// (VBUS joins that rail).
    pub vbus: Vec<Vec<usize>>,
    /// Nets in an order where each net's parent comes before it.
    pub net_order: Vec<NetId>,
    /// Per electrical node: its nets in that order.
    pub node_nets: Vec<Vec<NetId>>,
    /// Supply nodes in the order power flows through them (upstream first),
    /// so one pass down and one pass up settle a chain of converters.
    pub rail_order: Vec<usize>,
    /// Per part: the net of its first connected ground pin.
    pub ground_net: Vec<Option<NetId>>,
    /// Per part: the ground group it belongs to (electrical nodes joined by
    /// USB cables); `None` when it has no ground at all.
    pub ground_group: Vec<Option<usize>>,
    /// Ground groups that contain a battery negative.
    pub grounded_groups: Vec<bool>,
    /// Per part: how the motor is powered; `None` for a motor wired to neither
    /// a driver channel nor a rail and ground, and for any other part.
    pub motor_feed: Vec<Option<MotorFeed>>,
    /// Rails and converters, with edges the way power flows: rail → converter
    /// input, converter → the rail its output feeds, USB host → device.
    pub flow: StableDiGraph<Stage, ()>,
    /// Per electrical node: its stage in [`flow`](Circuit::flow); `None` for a
    /// ground node.
    pub rail_stage: Vec<Option<NodeIndex>>,
    /// Per part: its stage in [`flow`](Circuit::flow); `None` for a part that
    /// gives no power on (a load, a battery).
    pub converter_stage: Vec<Option<NodeIndex>>,
    /// Per part: the USB links it is an end of (host or device), in file
    /// order, each once.
    pub part_links: Vec<Vec<usize>>,
    /// Per net: the motors wired straight across it as their supply
    /// ([`MotorFeed::Direct`]), in part order.
    pub direct_motors: Vec<Vec<PartId>>,
    /// Per driver channel (driver part, channel number): the motors on it,
    /// in part order.
    pub channel_motors: HashMap<(PartId, u32), Vec<PartId>>,
}

impl Circuit {
    /// Builds the graph of a plan. It never fails: shorts, loops and floating
    /// grounds are left in the graph for the rules to find.
    pub fn build(plan: &Plan) -> Circuit {
        let net_count = plan.nets.len();
        let mut joined = UnionFind::<usize>::new(net_count);
        let mut through_edges = Vec::new();
        for (part_id, part) in plan.parts.iter().enumerate() {
            for (a, b) in through_pairs(plan, part_id) {
                if let (Some(na), Some(nb)) = (part.pins[a].net, part.pins[b].net) {
                    joined.union(na, nb);
                    through_edges.push((part_id, a, na, b, nb));
                }
            }
        }
        let labels = joined.into_labeling();
        let mut node_ids = vec![usize::MAX; net_count];
        let mut nodes: Vec<ElectricalNode> = Vec::new();
        let mut node_of_net = vec![0; net_count];
        for net in 0..net_count {
            let label = labels[net];
            if node_ids[label] == usize::MAX {
                node_ids[label] = nodes.len();
                nodes.push(ElectricalNode::default());
            }
            node_of_net[net] = node_ids[label];
            nodes[node_ids[label]].nets.push(net);
        }
        for (net_id, net) in plan.nets.iter().enumerate() {
            let node = &mut nodes[node_of_net[net_id]];
            for &pin_ref in &net.pins {
                match plan.parts[pin_ref.part].pins[pin_ref.pin].role {
                    PinRole::SupplyOut => node.supply_outs.push(pin_ref),
                    PinRole::SupplyIn => node.supply_ins.push(pin_ref),
                    PinRole::Ground => node.grounds.push(pin_ref),
                    _ => {}
                }
            }
        }

        let mut vbus: Vec<Vec<usize>> = vec![Vec::new(); nodes.len()];
        let mut vbus_net: Vec<Option<NetId>> = vec![None; nodes.len()];
        for (link_id, link) in plan.links.iter().enumerate() {
            let (device, port) = link.device;
            if let Some(net) = plan.fed_net(device, port) {
                let node = node_of_net[net];
                vbus[node].push(link_id);
                vbus_net[node].get_or_insert(net);
            }
        }
        // A rail fed only through a USB cable is measured from the pin the
        // cable feeds.
        let root: Vec<Option<NetId>> = nodes
            .iter()
            .enumerate()
            .map(|(i, node)| root_net(plan, node).or(vbus_net[i]))
            .collect();
        let (parent, children, net_order) = trees(net_count, &nodes, &root, &through_edges);
        let source: Vec<Option<PinRef>> = nodes
            .iter()
            .zip(&root)
            .map(|(node, root)| {
                let root = (*root)?;
                node.supply_outs
                    .iter()
                    .copied()
                    .find(|p| plan.parts[p.part].pins[p.pin].net == Some(root))
            })
            .collect();

        let ground_net: Vec<Option<NetId>> = plan
            .parts
            .iter()
            .map(|part| {
                part.pins_with_role(PinRole::Ground)
                    .find_map(|(_, pin)| pin.net)
            })
            .collect();
        let (ground_group, grounded_groups) =
            ground_groups(plan, &nodes, &node_of_net, &ground_net);
        let motor_feed = motor_feeds(plan, &nodes, &node_of_net);
        let (flow, rail_stage, converter_stage) = flow_graph(plan, &nodes, &node_of_net);
        let mut node_nets = vec![Vec::new(); nodes.len()];
        for &net in &net_order {
            node_nets[node_of_net[net]].push(net);
        }
        let rail_order = rail_order(&flow, &nodes);
        let part_links = part_links(plan);
        let mut direct_motors = vec![Vec::new(); net_count];
        let mut channel_motors: HashMap<(PartId, u32), Vec<PartId>> = HashMap::new();
        for (motor, feed) in motor_feed.iter().enumerate() {
            match *feed {
                Some(MotorFeed::Direct { supply, .. }) => direct_motors[supply].push(motor),
                Some(MotorFeed::Driver { driver, channel }) => {
                    channel_motors
                        .entry((driver, channel))
                        .or_default()
                        .push(motor);
                }
                None => {}
            }
        }

        Circuit {
            nodes,
            node_of_net,
            parent,
            children,
            source,
            root,
            vbus,
            net_order,
            node_nets,
            rail_order,
            ground_net,
            ground_group,
            grounded_groups,
            motor_feed,
            flow,
            rail_stage,
            converter_stage,
            part_links,
            direct_motors,
            channel_motors,
        }
    }

    /// The electrical node a pin sits on, if it is in a net.
    pub fn node_of_pin(&self, plan: &Plan, pin: PinRef) -> Option<usize> {
        plan.parts[pin.part].pins[pin.pin]
            .net
            .map(|n| self.node_of_net[n])
    }

    /// Whether a part's ground reaches a battery negative.
    pub fn is_grounded(&self, part: PartId) -> bool {
        self.ground_group[part].is_some_and(|g| self.grounded_groups[g])
    }
}

/// The conducting pin pairs of a part: fuse and switch `a`/`b`, connector
/// `aN`/`bN`.
pub fn through_pairs(plan: &Plan, part_id: PartId) -> Vec<(PinIndex, PinIndex)> {
    let part = &plan.parts[part_id];
    let mut pairs = Vec::new();
    match part.class {
        Class::Fuse(_) | Class::Switch(_) => {
            if let (Some(a), Some(b)) = (part.pin("a"), part.pin("b")) {
                pairs.push((a, b));
            }
        }
        Class::Connector(_) => {
            for (a, pin) in part.pins.iter().enumerate() {
                if pin.role != PinRole::Through || !pin.name.starts_with('a') {
                    continue;
                }
                let partner = format!("b{}", &pin.name[1..]);
                if let Some(b) = part.pin(&partner) {
                    pairs.push((a, b));
                }
            }
        }
        _ => {}
    }
    pairs
}

/// The net a node's current is measured from: the net holding its first
/// source for a supply node, or a battery negative for a ground node.
fn root_net(plan: &Plan, node: &ElectricalNode) -> Option<NetId> {
    let pin_net = |p: &PinRef| plan.parts[p.part].pins[p.pin].net;
    if node.is_ground() {
        let battery_neg = node
            .grounds
            .iter()
            .find(|p| matches!(plan.parts[p.part].class, Class::Battery(_)));
        return battery_neg.or(node.grounds.first()).and_then(pin_net);
    }
    node.supply_outs.first().and_then(pin_net)
}

type Trees = (Vec<Option<Parent>>, Vec<Vec<NetId>>, Vec<NetId>);

fn trees(
    net_count: usize,
    nodes: &[ElectricalNode],
    root: &[Option<NetId>],
    through_edges: &[(PartId, PinIndex, NetId, PinIndex, NetId)],
) -> Trees {
    let mut adjacency: Vec<Vec<(NetId, PartId, PinIndex, PinIndex)>> = vec![Vec::new(); net_count];
    for &(part, a, na, b, nb) in through_edges {
        if na != nb {
            adjacency[na].push((nb, part, a, b));
            adjacency[nb].push((na, part, b, a));
        }
    }
    let mut parent = vec![None; net_count];
    let mut children = vec![Vec::new(); net_count];
    let mut seen = vec![false; net_count];
    let mut order = Vec::with_capacity(net_count);
    for (node_id, node) in nodes.iter().enumerate() {
        let start = root[node_id].or(node.nets.first().copied());
        let Some(start) = start else { continue };
        let mut queue = VecDeque::from([start]);
        seen[start] = true;
        while let Some(net) = queue.pop_front() {
            order.push(net);
            for &(next, part, up, down) in &adjacency[net] {
                if seen[next] {
                    continue;
                }
                seen[next] = true;
                parent[next] = Some(Parent {
                    net,
                    part,
                    upstream_pin: up,
                    downstream_pin: down,
                });
                children[net].push(next);
                queue.push_back(next);
            }
        }
    }
    // Nets a through loop left unvisited still need a place in the order.
    order.extend((0..net_count).filter(|&n| !seen[n]));
    (parent, children, order)
}

fn ground_groups(
    plan: &Plan,
    nodes: &[ElectricalNode],
    node_of_net: &[usize],
    ground_net: &[Option<NetId>],
) -> (Vec<Option<usize>>, Vec<bool>) {
    // Electrical nodes are groups 0..n; a part with no ground pin of its own
    // gets a group of its own so a USB cable can ground it.
    let part_base = nodes.len();
    let mut groups = UnionFind::<usize>::new(part_base + plan.parts.len());
    let own = |part: PartId| match ground_net[part] {
        Some(net) => node_of_net[net],
        None => part_base + part,
    };
    for link in &plan.links {
        groups.union(own(link.host.0), own(link.device.0));
    }
    let mut linked = vec![false; plan.parts.len()];
    for link in &plan.links {
        linked[link.host.0] = true;
        linked[link.device.0] = true;
    }
    let labels = groups.into_labeling();
    let mut grounded = vec![false; labels.len()];
    for (node_id, node) in nodes.iter().enumerate() {
        if node
            .grounds
            .iter()
            .any(|p| matches!(plan.parts[p.part].class, Class::Battery(_)))
        {
            grounded[labels[node_id]] = true;
        }
    }
    let group = (0..plan.parts.len())
        .map(|part| {
            let has_ground = ground_net[part].is_some() || linked[part];
            has_ground.then(|| labels[own(part)])
        })
        .collect();
    (group, grounded)
}

/// Per part: the links it is an end of, in file order, each once.
fn part_links(plan: &Plan) -> Vec<Vec<usize>> {
    let mut links = vec![Vec::new(); plan.parts.len()];
    for (link_id, link) in plan.links.iter().enumerate() {
        links[link.host.0].push(link_id);
        if link.device.0 != link.host.0 {
            links[link.device.0].push(link_id);
        }
    }
    links
}

fn motor_feeds(
    plan: &Plan,
    nodes: &[ElectricalNode],
    node_of_net: &[usize],
) -> Vec<Option<MotorFeed>> {
    // Each driver channel by the pair of nets its outputs sit on; the first
    // driver (in file order) and its first channel win, as a search would.
    let mut channel_at: HashMap<(NetId, NetId), MotorFeed> = HashMap::new();
    for (driver_id, driver_part) in plan.parts.iter().enumerate() {
        let Class::Driver(driver) = &driver_part.class else {
            continue;
        };
        for channel in &driver.channels {
            let [Some(x), Some(y)] = channel.outputs.map(|p| driver_part.pins[p].net) else {
                continue;
            };
            channel_at
                .entry((x.min(y), x.max(y)))
                .or_insert(MotorFeed::Driver {
                    driver: driver_id,
                    channel: channel.number,
                });
        }
    }
    plan.parts
        .iter()
        .map(|part| {
            if !matches!(part.class, Class::Motor(_)) {
                return None;
            }
            let (a, b) = (part.pin("a")?, part.pin("b")?);
            let (na, nb) = (part.pins[a].net?, part.pins[b].net?);
            if let Some(&feed) = channel_at.get(&(na.min(nb), na.max(nb))) {
                return Some(feed);
            }
            let (node_a, node_b) = (&nodes[node_of_net[na]], &nodes[node_of_net[nb]]);
            match (node_a.is_ground(), node_b.is_ground()) {
                (false, true) => Some(MotorFeed::Direct {
                    supply: na,
                    ground: nb,
                }),
                (true, false) => Some(MotorFeed::Direct {
                    supply: nb,
                    ground: na,
                }),
                _ => None,
            }
        })
        .collect()
}

/// Supply nodes upstream first, by the flow graph's topological order; a
/// graph with a power loop (never solved) or a node outside the graph falls
/// back to index order.
fn rail_order(flow: &StableDiGraph<Stage, ()>, nodes: &[ElectricalNode]) -> Vec<usize> {
    let mut order: Vec<usize> = petgraph::algo::toposort(flow, None)
        .map(|stages| {
            stages
                .into_iter()
                .filter_map(|s| match flow[s] {
                    Stage::Rail(node) => Some(node),
                    Stage::Converter(_) => None,
                })
                .collect()
        })
        .unwrap_or_default();
    let mut placed = vec![false; nodes.len()];
    for &n in &order {
        placed[n] = true;
    }
    order.extend((0..nodes.len()).filter(|&n| !placed[n] && !nodes[n].is_ground()));
    order
}

type Flow = (
    StableDiGraph<Stage, ()>,
    Vec<Option<NodeIndex>>,
    Vec<Option<NodeIndex>>,
);

/// Rails and converters, with edges in the direction power flows: rail →
/// converter input, converter → the rail its output feeds. A USB cable is an
/// edge from the host part to the device part.
fn flow_graph(plan: &Plan, nodes: &[ElectricalNode], node_of_net: &[usize]) -> Flow {
    let mut flow = StableDiGraph::new();
    let rail_stage: Vec<Option<NodeIndex>> = nodes
        .iter()
        .enumerate()
        .map(|(i, node)| (!node.is_ground()).then(|| flow.add_node(Stage::Rail(i))))
        .collect();
    let mut converter_stage = vec![None; plan.parts.len()];
    for (part_id, part) in plan.parts.iter().enumerate() {
        let is_converter = matches!(part.class, Class::Regulator(_) | Class::Driver(_))
            || part.pins.iter().any(|p| p.role == PinRole::SupplyOut)
                && !matches!(part.class, Class::Battery(_))
            || part
                .ports
                .iter()
                .any(|p| matches!(p.kind, PortKind::UsbHost { .. }));
        if !is_converter {
            continue;
        }
        let stage = flow.add_node(Stage::Converter(part_id));
        converter_stage[part_id] = Some(stage);
        for pin in &part.pins {
            let Some(net) = pin.net else { continue };
            let Some(rail) = rail_stage[node_of_net[net]] else {
                continue;
            };
            match pin.role {
                PinRole::SupplyIn => {
                    flow.add_edge(rail, stage, ());
                }
                PinRole::SupplyOut => {
                    flow.add_edge(stage, rail, ());
                }
                _ => {}
            }
        }
    }
    for link in &plan.links {
        let Some(host) = converter_stage[link.host.0] else {
            continue;
        };
        if let Some(device) = converter_stage[link.device.0] {
            flow.add_edge(host, device, ());
        }
        // VBUS fed into a rail: the host powers that rail.
        let (device, port) = link.device;
        if let Some(net) = plan.fed_net(device, port)
            && let Some(rail) = rail_stage[node_of_net[net]]
        {
            flow.add_edge(host, rail, ());
        }
    }
    (flow, rail_stage, converter_stage)
}
