//! Where everything goes: a layered drawing that follows the power.
//!
//! 1. **Columns.** Parts and tags are nodes; power-flow edges come from
//!    `content`. Cycles (a converter feeding back) are broken by a depth-first
//!    search that starts at the batteries and drops the edges that close a
//!    cycle; each node's column is then its longest path from a source.
//! 2. **Passes.** A connection that spans several columns gets a pass slot in
//!    each column it crosses (a rail's own tag serves as its slot where it
//!    stands), so no line ever has to cross a column through a box.
//! 3. **Order.** Within each column, items are sorted by the barycentre of
//!    their neighbours in the next column, sweeping right and left in turn;
//!    the order with the fewest crossings wins.
//! 4. **Heights.** Items are pulled towards the pins they connect to
//!    (least squares with minimum gaps, solved by pooling adjacent
//!    violators), then snapped to a 16 px grid. Pins on a box's left edge, on
//!    its right edge and pass slots in even and odd columns sit at four
//!    different offsets within the grid, so two stubs meeting in one channel
//!    from opposite sides never share a height.
//! 5. **Channels.** Between columns each connection has a vertical track;
//!    tracks whose spans do not overlap share an x (left-edge packing).
//!
//! The output is plain coordinates; `render` writes them. Not for colours,
//! fonts or SVG.

use super::content::{Content, End, Marker, PinAt, Wire, WireKind};
use super::shape::{BoxShape, TagShape, box_shape, tag_shape};
use super::text;
use std::collections::BTreeMap;

/// The vertical grid every box top sits on.
pub(crate) const GRID: f64 = 16.0;
pub(crate) const NAME_SIZE: f64 = 11.0;
pub(crate) const TEXT_SIZE: f64 = 9.0;
pub(crate) const TAG_NAME_SIZE: f64 = 10.0;
pub(crate) const MARKER_TEXT_SIZE: f64 = 8.0;
pub(crate) const MARKER_HEIGHT: f64 = 14.0;
/// Height of a ground symbol below its pin.
pub(crate) const GROUND_SYMBOL: f64 = 14.0;
const TRACK_PITCH: f64 = 8.0;
const CHANNEL_PAD: f64 = 14.0;
const MIN_COLUMN: f64 = 24.0;
const SWEEPS: usize = 12;
const ROUNDS: usize = 6;

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum Side {
    Left,
    Right,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum Align {
    Start,
    Middle,
    End,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum Tone {
    /// Names.
    Strong,
    /// Class, rating, pin names, tag lines.
    Soft,
    /// The floating-ground warning.
    Alarm,
}

/// One line of text; `y` is the baseline.
#[derive(Clone, Debug, PartialEq)]
pub(crate) struct Label {
    pub x: f64,
    pub y: f64,
    pub size: f64,
    pub align: Align,
    pub text: String,
    pub bold: bool,
    pub tone: Tone,
}

impl Label {
    pub(super) fn shifted(&self, dx: f64, dy: f64) -> Label {
        Label {
            x: self.x + dx,
            y: self.y + dy,
            ..self.clone()
        }
    }
}

impl PlacedMarker {
    pub(super) fn shifted(&self, dx: f64, dy: f64) -> PlacedMarker {
        PlacedMarker {
            x: self.x + dx,
            y: self.y + dy,
            ..*self
        }
    }
}

#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct Rect {
    pub x: f64,
    pub y: f64,
    pub width: f64,
    pub height: f64,
}

/// A placed finding marker: its centre and size.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct PlacedMarker {
    pub marker: Marker,
    pub x: f64,
    pub y: f64,
    pub width: f64,
}

/// A ground symbol hanging from `(x, y)`.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct GroundMark {
    pub x: f64,
    pub y: f64,
    pub reaches_battery: bool,
}

pub(crate) struct PlacedBox {
    pub rect: Rect,
    pub labels: Vec<Label>,
    pub markers: Vec<PlacedMarker>,
    pub grounds: Vec<GroundMark>,
}

pub(crate) struct PlacedTag {
    pub labels: Vec<Label>,
    pub markers: Vec<PlacedMarker>,
    /// Where a ground tag's symbol hangs.
    pub ground_icon: Option<(f64, f64)>,
    /// The frame of a tag on a line: the line ends on it or runs through it.
    pub frame: Option<Rect>,
}

/// A drawn connection: straight horizontal and vertical segments
/// `(x1, y1, x2, y2)`, and the dots where three or more of them meet.
#[derive(Default)]
pub(crate) struct PlacedWire {
    pub segments: Vec<[f64; 4]>,
    pub dots: Vec<(f64, f64)>,
}

pub(crate) struct Geometry {
    pub width: f64,
    pub height: f64,
    pub parts: Vec<PlacedBox>,
    pub tags: Vec<PlacedTag>,
    /// Same order as `Content::wires`.
    pub wires: Vec<PlacedWire>,
}

/// Width of a finding marker big enough for the largest number.
pub(crate) fn marker_width(findings: usize) -> f64 {
    let digits = findings.max(1).to_string();
    // Room for the pointed ends of a warning marker on both sides.
    (text::width(&digits, MARKER_TEXT_SIZE) + 10.0).max(16.0)
}

pub(super) fn ceil_grid(v: f64) -> f64 {
    (v / GRID).ceil() * GRID
}

fn round_grid(v: f64) -> f64 {
    (v / GRID).round() * GRID
}

pub(super) fn ceil_to(v: f64, step: f64) -> f64 {
    (v / step).ceil() * step
}

/// Offset of a pass line (or tag line) within the grid: 4 px in even columns,
/// 12 px in odd ones; box pins use 8 px (left) and 0 px (right).
pub(super) fn pass_offset(column: usize) -> f64 {
    if column.is_multiple_of(2) { 4.0 } else { 12.0 }
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum ItemKind {
    Part(usize),
    Tag(usize),
    /// A connection crossing this column.
    Pass(usize),
}

struct Item {
    kind: ItemKind,
    column: usize,
    width: f64,
    height: f64,
    top: f64,
    x: f64,
    /// Room below the item kept free (ground symbols and their names).
    skirt: f64,
}

struct Anchor {
    item: usize,
    side: Side,
    /// The part's shown pin.
    pin: Option<usize>,
    group: usize,
    dy: f64,
}

impl Anchor {
    fn channel(&self, items: &[Item]) -> usize {
        items[self.item].column + usize::from(self.side == Side::Right)
    }
}

/// A part's shown pins by the edge they sit on.
#[derive(Default)]
struct PinSides {
    left: Vec<usize>,
    right: Vec<usize>,
    bottom: Vec<usize>,
}

/// The layout's working state: items in columns, and the anchors that tie
/// wires to them, grouped by wire and channel.
struct Board {
    items: Vec<Item>,
    anchors: Vec<Anchor>,
    /// The anchors of one wire in one channel.
    groups: Vec<Vec<usize>>,
    group_channel: Vec<usize>,
    group_wire: Vec<usize>,
    item_anchors: Vec<Vec<usize>>,
    /// Per tag: the wire it stands on.
    tag_wire: Vec<Option<usize>>,
}

/// The side of its box a wire end takes: towards the other ends of its wire;
/// with them all in its own column, out for a source and in otherwise.
fn facing(column: &[usize], wire: &Wire, end: &End) -> Side {
    let own = column[end.node] as f64;
    let others: Vec<f64> = wire
        .ends
        .iter()
        .filter(|e| e.node != end.node)
        .map(|e| column[e.node] as f64)
        .collect();
    let mean = if others.is_empty() {
        own
    } else {
        others.iter().sum::<f64>() / others.len() as f64
    };
    if mean > own + 1e-9 {
        Side::Right
    } else if mean < own - 1e-9 {
        Side::Left
    } else if end.source {
        Side::Right
    } else {
        Side::Left
    }
}

impl Board {
    fn new(content: &Content, column: &[usize]) -> Board {
        let part_count = content.parts.len();
        let mut items: Vec<Item> = column
            .iter()
            .enumerate()
            .map(|(node, &column)| Item {
                kind: if node < part_count {
                    ItemKind::Part(node)
                } else {
                    ItemKind::Tag(node - part_count)
                },
                column,
                width: 0.0,
                height: GRID,
                top: 0.0,
                x: 0.0,
                skirt: 0.0,
            })
            .collect();
        let mut anchors: Vec<Anchor> = Vec::new();
        let mut tag_wire = vec![None; content.tags.len()];
        let mut groups: Vec<Vec<usize>> = Vec::new();
        let mut group_channel = Vec::new();
        let mut group_wire = Vec::new();
        for (w, wire) in content.wires.iter().enumerate() {
            let first = anchors.len();
            for end in &wire.ends {
                if end.node >= part_count {
                    tag_wire[end.node - part_count] = Some(w);
                }
                anchors.push(Anchor {
                    item: end.node,
                    side: facing(column, wire, end),
                    pin: end.pin,
                    group: 0,
                    dy: 0.0,
                });
            }
            let channels = anchors[first..].iter().map(|a| a.channel(&items));
            let low = channels.clone().min().unwrap_or(0);
            let high = channels.max().unwrap_or(0);
            // Every column the wire crosses gets a pass, or its tag serves.
            for crossed in low..high {
                let tag_here = (first..first + wire.ends.len())
                    .find(|&a| anchors[a].pin.is_none() && column[anchors[a].item] == crossed);
                if let Some(tag) = tag_here {
                    let other = match anchors[tag].side {
                        Side::Left => Side::Right,
                        Side::Right => Side::Left,
                    };
                    let item = anchors[tag].item;
                    anchors.push(Anchor {
                        item,
                        side: other,
                        pin: None,
                        group: 0,
                        dy: 0.0,
                    });
                    continue;
                }
                let item = items.len();
                items.push(Item {
                    kind: ItemKind::Pass(w),
                    column: crossed,
                    width: 0.0,
                    height: GRID,
                    top: 0.0,
                    x: 0.0,
                    skirt: 0.0,
                });
                for side in [Side::Left, Side::Right] {
                    anchors.push(Anchor {
                        item,
                        side,
                        pin: None,
                        group: 0,
                        dy: pass_offset(crossed),
                    });
                }
            }
            // Group this wire's anchors by channel.
            let mut group_of: BTreeMap<usize, usize> = BTreeMap::new();
            for (offset, anchor) in anchors[first..].iter_mut().enumerate() {
                let channel = anchor.channel(&items);
                let id = *group_of.entry(channel).or_insert_with(|| {
                    groups.push(Vec::new());
                    group_channel.push(channel);
                    group_wire.push(w);
                    groups.len() - 1
                });
                groups[id].push(first + offset);
                anchor.group = id;
            }
        }
        let mut item_anchors: Vec<Vec<usize>> = vec![Vec::new(); items.len()];
        for (a, anchor) in anchors.iter().enumerate() {
            item_anchors[anchor.item].push(a);
        }
        Board {
            items,
            anchors,
            groups,
            group_channel,
            group_wire,
            item_anchors,
            tag_wire,
        }
    }

    /// Which edge each part's shown pins sit on (in pin order for now).
    fn pin_sides(&self, content: &Content) -> Vec<PinSides> {
        let mut sides: Vec<PinSides> = content
            .parts
            .iter()
            .map(|part| PinSides {
                bottom: (0..part.pins.len())
                    .filter(|&i| matches!(part.pins[i].at, PinAt::Ground { .. }))
                    .collect(),
                ..PinSides::default()
            })
            .collect();
        for anchor in &self.anchors {
            if let (ItemKind::Part(p), Some(pin)) = (self.items[anchor.item].kind, anchor.pin) {
                match anchor.side {
                    Side::Left => sides[p].left.push(pin),
                    Side::Right => sides[p].right.push(pin),
                }
            }
        }
        // A pin on a net that is not drawn still shows its name.
        for (part, side) in content.parts.iter().zip(&mut sides) {
            for (i, pin) in part.pins.iter().enumerate() {
                let placed =
                    side.left.contains(&i) || side.right.contains(&i) || side.bottom.contains(&i);
                if !placed && pin.at == PinAt::Wire {
                    side.left.push(i);
                }
            }
        }
        sides
    }

    /// Columns in the order a depth-first search from the sources met their
    /// items; a pass follows the earliest node of its wire.
    fn first_order(
        &self,
        content: &Content,
        discovery: &[usize],
        column_count: usize,
    ) -> Vec<Vec<usize>> {
        let part_count = content.parts.len();
        let key = |item: &Item| -> (usize, usize) {
            match item.kind {
                ItemKind::Part(p) => (discovery[p], 0),
                ItemKind::Tag(t) => (discovery[part_count + t], 0),
                ItemKind::Pass(w) => {
                    let first = content.wires[w]
                        .ends
                        .iter()
                        .map(|e| discovery[e.node])
                        .min()
                        .unwrap_or(0);
                    (first, 1)
                }
            }
        };
        let mut order: Vec<Vec<usize>> = vec![Vec::new(); column_count];
        for (i, item) in self.items.iter().enumerate() {
            order[item.column].push(i);
        }
        for column_items in &mut order {
            column_items.sort_by_key(|&i| (key(&self.items[i]), i));
        }
        order
    }

    /// Sorts the pins on each side of each part by where their wires' other
    /// ends stand in the neighbouring column, so pin-to-pin lines cross less.
    fn order_pins(&self, order: &[Vec<usize>], sides: &mut [PinSides]) {
        let mut index_in_column = vec![0usize; self.items.len()];
        for column_items in order {
            for (i, &item) in column_items.iter().enumerate() {
                index_in_column[item] = i;
            }
        }
        let mut pin_key: BTreeMap<(usize, usize), f64> = BTreeMap::new();
        for anchor in &self.anchors {
            let (ItemKind::Part(p), Some(pin)) = (self.items[anchor.item].kind, anchor.pin) else {
                continue;
            };
            let own = self.items[anchor.item].column;
            let others: Vec<f64> = self.groups[anchor.group]
                .iter()
                .map(|&o| self.anchors[o].item)
                .filter(|&o| self.items[o].column != own)
                .map(|o| index_in_column[o] as f64)
                .collect();
            if !others.is_empty() {
                pin_key.insert((p, pin), others.iter().sum::<f64>() / others.len() as f64);
            }
        }
        for (p, side) in sides.iter_mut().enumerate() {
            for pins in [&mut side.left, &mut side.right] {
                pins.sort_by(|a, b| {
                    let ka = pin_key.get(&(p, *a)).copied().unwrap_or(f64::MAX);
                    let kb = pin_key.get(&(p, *b)).copied().unwrap_or(f64::MAX);
                    ka.total_cmp(&kb).then(a.cmp(b))
                });
            }
        }
    }

    fn reached_from_both_sides(&self, item: usize) -> bool {
        let sides = || {
            self.item_anchors[item]
                .iter()
                .filter(|&&a| self.groups[self.anchors[a].group].len() >= 2)
                .map(|&a| self.anchors[a].side)
        };
        sides().any(|s| s == Side::Left) && sides().any(|s| s == Side::Right)
    }

    fn anchor_y(&self, anchor: usize) -> f64 {
        let a = &self.anchors[anchor];
        self.items[a.item].top + a.dy
    }

    /// Sets every item's x, gives each wire a track in each channel it uses,
    /// and draws the wires. Returns the drawing's width.
    fn route(
        &mut self,
        wire_count: usize,
        column_count: usize,
        tag_lines: &[Option<f64>],
    ) -> (f64, Vec<PlacedWire>) {
        let mut column_width = vec![MIN_COLUMN; column_count];
        for item in &self.items {
            column_width[item.column] = column_width[item.column].max(item.width);
        }
        let mut channel_groups: Vec<Vec<usize>> = vec![Vec::new(); column_count + 1];
        for (g, &channel) in self.group_channel.iter().enumerate() {
            channel_groups[channel].push(g);
        }
        // Left-edge packing: a track is reused once the span before it ends.
        let mut track_of = vec![0usize; self.groups.len()];
        let mut channel_tracks = vec![0usize; column_count + 1];
        let mut spans: Vec<(f64, f64)> = vec![(0.0, 0.0); self.groups.len()];
        for (channel, list) in channel_groups.iter().enumerate() {
            let mut ordered: Vec<usize> = list.clone();
            for &g in list {
                let ys = self.groups[g].iter().map(|&a| self.anchor_y(a));
                spans[g] = (
                    ys.clone().fold(f64::INFINITY, f64::min),
                    ys.fold(f64::NEG_INFINITY, f64::max),
                );
            }
            ordered.sort_by(|&a, &b| {
                spans[a]
                    .0
                    .total_cmp(&spans[b].0)
                    .then(spans[a].1.total_cmp(&spans[b].1))
                    .then(a.cmp(&b))
            });
            let mut track_ends: Vec<f64> = Vec::new();
            for g in ordered {
                let (low, high) = spans[g];
                let track = match track_ends.iter().position(|&end| end + TRACK_PITCH <= low) {
                    Some(t) => t,
                    None => {
                        track_ends.push(f64::NEG_INFINITY);
                        track_ends.len() - 1
                    }
                };
                track_ends[track] = high;
                track_of[g] = track;
            }
            channel_tracks[channel] = track_ends.len();
        }
        let mut channel_x = vec![0.0; column_count + 1];
        let mut column_x = vec![0.0; column_count];
        let mut x = 0.0;
        for c in 0..=column_count {
            channel_x[c] = x;
            let tracks = channel_tracks[c].saturating_sub(1) as f64;
            x += (2.0 * CHANNEL_PAD + TRACK_PITCH * tracks).max(32.0);
            if c < column_count {
                column_x[c] = x;
                x += column_width[c];
            }
        }
        for item in &mut self.items {
            let (cx, cw) = (column_x[item.column], column_width[item.column]);
            if let ItemKind::Pass(_) = item.kind {
                item.x = cx;
                item.width = cw;
            } else {
                item.x = (cx + (cw - item.width) / 2.0).floor();
            }
        }

        let mut wires: Vec<PlacedWire> = (0..wire_count).map(|_| PlacedWire::default()).collect();
        for (g, members) in self.groups.iter().enumerate() {
            // A lone end in a channel has nothing to meet there.
            if members.len() < 2 {
                continue;
            }
            let track_x =
                channel_x[self.group_channel[g]] + CHANNEL_PAD + TRACK_PITCH * track_of[g] as f64;
            let wire = &mut wires[self.group_wire[g]];
            let (low, high) = spans[g];
            if high > low {
                wire.segments.push([track_x, low, track_x, high]);
            }
            for &a in members {
                let y = self.anchor_y(a);
                let item = &self.items[self.anchors[a].item];
                let edge = match self.anchors[a].side {
                    Side::Left => item.x,
                    Side::Right => item.x + item.width,
                };
                if (edge - track_x).abs() > 1e-9 {
                    wire.segments.push([edge, y, track_x, y]);
                }
                // Three lines meet where a stub joins a track between its ends.
                if y > low && y < high {
                    wire.dots.push((track_x, y));
                }
            }
        }
        for (i, item) in self.items.iter().enumerate() {
            let (y, w) = match item.kind {
                ItemKind::Pass(w) => (item.top + pass_offset(item.column), w),
                ItemKind::Tag(t) => match (tag_lines[t], self.tag_wire[t]) {
                    // A tag reached from one side is where its line ends (on
                    // the tag's frame); only a tag the line runs through
                    // carries it across.
                    (Some(line), Some(w)) if self.reached_from_both_sides(i) => {
                        (item.top + line, w)
                    }
                    _ => continue,
                },
                ItemKind::Part(_) => continue,
            };
            wires[w].segments.push([item.x, y, item.x + item.width, y]);
        }
        (x, wires)
    }
}

/// Places everything. `marker_w` is the width of one finding marker.
pub(crate) fn place(content: &Content, marker_w: f64) -> Geometry {
    let part_count = content.parts.len();
    let node_count = part_count + content.tags.len();
    let (mut column, discovery) = columns(node_count, &content.edges, &content.sources, part_count);
    beside_signal_neighbours(content, part_count, &mut column);
    // A bundle's tag stands in the first column after the nearer of its two
    // parts (in the further one's column when they are neighbours), so the
    // bundle does not loop round behind both.
    for wire in &content.wires {
        let Some(tag) = wire.ends.iter().find(|e| e.pin.is_none()).map(|e| e.node) else {
            continue;
        };
        if !content.tags[tag - part_count].between {
            continue;
        }
        let parts = wire
            .ends
            .iter()
            .filter(|e| e.pin.is_some())
            .map(|e| column[e.node]);
        let (low, high) = (parts.clone().min(), parts.max());
        if let (Some(low), Some(high)) = (low, high)
            && high > low
        {
            column[tag] = low + 1;
        }
    }
    let mut board = Board::new(content, &column);
    let mut sides = board.pin_sides(content);

    // Sizes (pin order does not change them).
    let tag_shapes: Vec<TagShape> = content
        .tags
        .iter()
        .enumerate()
        .map(|(t, tag)| tag_shape(tag, column[part_count + t], marker_w))
        .collect();
    for item in &mut board.items {
        match item.kind {
            ItemKind::Part(p) => {
                let s = &sides[p];
                let shape = box_shape(&content.parts[p], &s.left, &s.right, &s.bottom, marker_w);
                item.width = shape.width;
                item.height = shape.height;
                item.skirt = shape.skirt;
            }
            ItemKind::Tag(t) => {
                item.width = tag_shapes[t].width;
                item.height = tag_shapes[t].height;
            }
            ItemKind::Pass(_) => {}
        }
    }

    let column_count = board.items.iter().map(|i| i.column + 1).max().unwrap_or(0);
    let order = board.first_order(content, &discovery, column_count);
    let order = minimise_crossings(
        order,
        &board.items,
        &board.anchors,
        &board.groups,
        &board.item_anchors,
    );
    board.order_pins(&order, &mut sides);
    let mut shapes: Vec<Option<BoxShape>> = content
        .parts
        .iter()
        .zip(&sides)
        .map(|(part, s)| Some(box_shape(part, &s.left, &s.right, &s.bottom, marker_w)))
        .collect();
    for anchor in &mut board.anchors {
        anchor.dy = match board.items[anchor.item].kind {
            ItemKind::Part(p) => anchor
                .pin
                .and_then(|pin| shapes[p].as_ref().and_then(|s| s.pins[pin]))
                .map_or(0.0, |(_, y)| y),
            ItemKind::Tag(t) => tag_shapes[t].line.unwrap_or(0.0),
            ItemKind::Pass(_) => anchor.dy,
        };
    }

    assign_heights(
        &order,
        &mut board.items,
        &board.anchors,
        &board.groups,
        &board.item_anchors,
    );
    let tag_lines: Vec<Option<f64>> = tag_shapes.iter().map(|s| s.line).collect();
    let (width, wires) = board.route(content.wires.len(), column_count, &tag_lines);

    let height = board
        .items
        .iter()
        .map(|i| i.top + i.height + i.skirt)
        .fold(0.0, f64::max);
    let mut parts = Vec::with_capacity(part_count);
    let mut tags = Vec::with_capacity(content.tags.len());
    for item in &board.items {
        match item.kind {
            ItemKind::Part(p) => {
                if let Some(shape) = shapes[p].take() {
                    parts.push(place_box(shape, item));
                }
            }
            ItemKind::Tag(t) => tags.push(place_tag(&tag_shapes[t], item)),
            ItemKind::Pass(_) => {}
        }
    }
    Geometry {
        width,
        height,
        parts,
        tags,
        wires,
    }
}

fn place_tag(shape: &TagShape, item: &Item) -> PlacedTag {
    PlacedTag {
        labels: shape
            .labels
            .iter()
            .map(|l| l.shifted(item.x, item.top))
            .collect(),
        markers: shape
            .markers
            .iter()
            .map(|m| m.shifted(item.x, item.top))
            .collect(),
        ground_icon: shape.ground_icon.map(|(x, y)| (x + item.x, y + item.top)),
        frame: shape.line.map(|_| Rect {
            x: item.x,
            y: item.top,
            width: item.width,
            height: item.height,
        }),
    }
}

fn place_box(shape: BoxShape, item: &Item) -> PlacedBox {
    PlacedBox {
        rect: Rect {
            x: item.x,
            y: item.top,
            width: item.width,
            height: item.height,
        },
        labels: shape
            .labels
            .iter()
            .map(|l| l.shifted(item.x, item.top))
            .collect(),
        markers: shape
            .markers
            .iter()
            .map(|m| m.shifted(item.x, item.top))
            .collect(),
        grounds: shape
            .grounds
            .iter()
            .map(|g| GroundMark {
                x: g.x + item.x,
                y: g.y + item.top,
                ..*g
            })
            .collect(),
    }
}

/// A part that nothing feeds and that gives no power (a series resistor in
/// a signal line) stands in the column of the deepest part its signals join,
/// rather than in the first column, so its lines do not cross the drawing.
fn beside_signal_neighbours(content: &Content, part_count: usize, column: &mut [usize]) {
    let mut fed = vec![false; part_count];
    for &(a, b) in &content.edges {
        if a != b && b < part_count {
            fed[b] = true;
        }
    }
    for &source in &content.sources {
        if source < part_count {
            fed[source] = true;
        }
    }
    let is_signal = |wire: &&Wire| matches!(wire.kind, WireKind::Signal | WireKind::Bundle);
    let mut deepest: Vec<Option<usize>> = vec![None; part_count];
    for wire in content.wires.iter().filter(is_signal) {
        let parts = || wire.ends.iter().map(|e| e.node).filter(|&n| n < part_count);
        for lonely in parts().filter(|&n| !fed[n]) {
            for other in parts().filter(|&o| fed[o]) {
                let here = column[other];
                deepest[lonely] = Some(deepest[lonely].map_or(here, |d: usize| d.max(here)));
            }
        }
    }
    let mut moved = false;
    for (part, deepest) in deepest.into_iter().enumerate() {
        if let Some(d) = deepest {
            moved |= column[part] != d;
            column[part] = d;
        }
    }
    if !moved {
        return;
    }
    // Their signals' tags follow, one column after the deepest end.
    for wire in content.wires.iter().filter(is_signal) {
        let Some(last) = wire
            .ends
            .iter()
            .filter(|e| e.node < part_count)
            .map(|e| column[e.node])
            .max()
        else {
            continue;
        };
        for tag in wire.ends.iter().filter(|e| e.node >= part_count) {
            column[tag.node] = column[tag.node].max(last + 1);
        }
    }
}

/// Column of every node, and the order a depth-first search from the
/// batteries found them in.
fn columns(
    node_count: usize,
    edges: &[(usize, usize)],
    sources: &[usize],
    part_count: usize,
) -> (Vec<usize>, Vec<usize>) {
    let mut out: Vec<Vec<usize>> = vec![Vec::new(); node_count];
    let mut has_in = vec![false; node_count];
    for &(a, b) in edges {
        if a < node_count && b < node_count && a != b {
            out[a].push(b);
            has_in[b] = true;
        }
    }
    let mut state = vec![0u8; node_count];
    let mut discovery = vec![0usize; node_count];
    let mut postorder = Vec::with_capacity(node_count);
    let mut kept: Vec<Vec<usize>> = vec![Vec::new(); node_count];
    let mut counter = 0;
    for start in sources.iter().copied().chain(0..node_count) {
        if start >= node_count || state[start] != 0 {
            continue;
        }
        state[start] = 1;
        discovery[start] = counter;
        counter += 1;
        let mut stack = vec![(start, 0usize)];
        while let Some(top) = stack.last_mut() {
            let (v, next) = *top;
            if next < out[v].len() {
                top.1 += 1;
                let w = out[v][next];
                match state[w] {
                    0 => {
                        kept[v].push(w);
                        state[w] = 1;
                        discovery[w] = counter;
                        counter += 1;
                        stack.push((w, 0));
                    }
                    // An edge back onto the search path closes a cycle: drop it.
                    1 => {}
                    _ => kept[v].push(w),
                }
            } else {
                state[v] = 2;
                postorder.push(v);
                stack.pop();
            }
        }
    }
    // Parts that nothing feeds and that are not sources start one column in,
    // so the first column holds only what gives power.
    let any_source = !sources.is_empty();
    let mut column: Vec<usize> = (0..node_count)
        .map(|v| {
            let is_source = sources.contains(&v);
            let is_tag = v >= part_count;
            usize::from(any_source && !has_in[v] && !is_source && !is_tag)
        })
        .collect();
    for &v in postorder.iter().rev() {
        for &w in &kept[v] {
            column[w] = column[w].max(column[v] + 1);
        }
    }
    (column, discovery)
}

/// Barycentre sweeps; returns the order with the fewest crossings seen.
fn minimise_crossings(
    mut order: Vec<Vec<usize>>,
    items: &[Item],
    anchors: &[Anchor],
    groups: &[Vec<usize>],
    item_anchors: &[Vec<usize>],
) -> Vec<Vec<usize>> {
    let columns = order.len();
    let mut position = vec![0.0; items.len()];
    let set_positions = |order: &Vec<Vec<usize>>, position: &mut Vec<f64>| {
        for column_items in order {
            let n = column_items.len() as f64;
            for (i, &item) in column_items.iter().enumerate() {
                position[item] = (i as f64 + 0.5) / n;
            }
        }
    };
    set_positions(&order, &mut position);
    // Per item: the items its connections on each side reach in the
    // neighbouring column, worked out once for all the sweeps.
    let left = Reach::build(
        items,
        item_anchors,
        |item| {
            let column = items[item].column;
            let neighbour = column.checked_sub(1)?;
            Some((Side::Left, neighbour))
        },
        anchors,
        groups,
    );
    let right = Reach::build(
        items,
        item_anchors,
        |item| Some((Side::Right, items[item].column + 1)),
        anchors,
        groups,
    );
    let mut best = order.clone();
    let mut best_crossings = crossings(&order, items, anchors, groups);
    for sweep in 0..SWEEPS {
        let rightwards = sweep % 2 == 0;
        let sequence: Vec<usize> = if rightwards {
            (1..columns).collect()
        } else {
            (0..columns.saturating_sub(1)).rev().collect()
        };
        let reach = if rightwards { &left } else { &right };
        for c in sequence {
            let mut keyed: Vec<(f64, f64, usize)> = order[c]
                .iter()
                .map(|&item| {
                    let others = reach.of(item);
                    let sum = others.iter().fold(0.0, |sum, &other| sum + position[other]);
                    let value = if others.is_empty() {
                        position[item]
                    } else {
                        sum / others.len() as f64
                    };
                    (value, position[item], item)
                })
                .collect();
            keyed.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.total_cmp(&b.1)));
            order[c] = keyed.into_iter().map(|(_, _, item)| item).collect();
            let n = order[c].len() as f64;
            for (i, &item) in order[c].iter().enumerate() {
                position[item] = (i as f64 + 0.5) / n;
            }
        }
        let count = crossings(&order, items, anchors, groups);
        if count < best_crossings {
            best_crossings = count;
            best = order.clone();
        }
    }
    best
}

/// Per item, the items at the other ends of its connections on one side
/// that sit in one other column, in anchor then member order (an item
/// reached twice is listed twice).
struct Reach {
    start: Vec<usize>,
    others: Vec<usize>,
}

impl Reach {
    /// `towards` gives, per item, the side and the column to look in
    /// (`None`: nothing to reach).
    fn build(
        items: &[Item],
        item_anchors: &[Vec<usize>],
        towards: impl Fn(usize) -> Option<(Side, usize)>,
        anchors: &[Anchor],
        groups: &[Vec<usize>],
    ) -> Reach {
        let mut reach = Reach {
            start: Vec::with_capacity(items.len() + 1),
            others: Vec::new(),
        };
        for item in 0..items.len() {
            reach.start.push(reach.others.len());
            let Some((side, column)) = towards(item) else {
                continue;
            };
            for &a in item_anchors.get(item).map_or(&[][..], Vec::as_slice) {
                if anchors[a].side != side {
                    continue;
                }
                for &o in &groups[anchors[a].group] {
                    let other = anchors[o].item;
                    if items[other].column == column {
                        reach.others.push(other);
                    }
                }
            }
        }
        reach.start.push(reach.others.len());
        reach
    }

    fn of(&self, item: usize) -> &[usize] {
        &self.others[self.start[item]..self.start[item + 1]]
    }
}

/// Crossings between the connections of neighbouring columns, counted on
/// item order (pairs of connections whose ends are in opposite order).
fn crossings(
    order: &[Vec<usize>],
    items: &[Item],
    anchors: &[Anchor],
    groups: &[Vec<usize>],
) -> u64 {
    let mut index = vec![0usize; items.len()];
    for column_items in order {
        for (i, &item) in column_items.iter().enumerate() {
            index[item] = i;
        }
    }
    let mut per_channel: BTreeMap<usize, Vec<(usize, usize)>> = BTreeMap::new();
    let (mut left, mut right) = (Vec::new(), Vec::new());
    for members in groups {
        let Some(&first) = members.first() else {
            continue;
        };
        let channel = anchors[first].channel(items);
        left.clear();
        right.clear();
        for &a in members {
            let item = anchors[a].item;
            if items[item].column + 1 == channel {
                left.push(index[item]);
            } else {
                right.push(index[item]);
            }
        }
        let pairs = per_channel.entry(channel).or_default();
        if left.len() * right.len() <= 64 {
            for &l in &left {
                for &r in &right {
                    pairs.push((l, r));
                }
            }
        } else if let (Some(&l0), Some(&r0)) = (left.first(), right.first()) {
            pairs.extend(right.iter().map(|&r| (l0, r)));
            pairs.extend(left.iter().map(|&l| (l, r0)));
        }
    }
    per_channel
        .into_values()
        .map(|mut pairs| {
            pairs.sort_unstable();
            let mut rights: Vec<usize> = pairs.iter().map(|p| p.1).collect();
            inversions(&mut rights)
        })
        .sum()
}

/// Number of pairs i < j with v[i] > v[j] (merge sort, sorting `values`).
fn inversions(values: &mut [usize]) -> u64 {
    let mut merged = vec![0; values.len()];
    merge_count(values, &mut merged)
}

/// [`inversions`], merging through `merged` (as long as `values`) instead of
/// a buffer of its own at every level.
fn merge_count(values: &mut [usize], merged: &mut [usize]) -> u64 {
    let n = values.len();
    if n < 2 {
        return 0;
    }
    let mid = n / 2;
    let mut count = merge_count(&mut values[..mid], &mut merged[..mid])
        + merge_count(&mut values[mid..], &mut merged[mid..]);
    let (mut i, mut j, mut k) = (0, mid, 0);
    while i < mid && j < n {
        if values[j] < values[i] {
            count += (mid - i) as u64;
            merged[k] = values[j];
            j += 1;
        } else {
            merged[k] = values[i];
            i += 1;
        }
        k += 1;
    }
    let rest_left = mid - i;
    merged[k..k + rest_left].copy_from_slice(&values[i..mid]);
    k += rest_left;
    merged[k..n].copy_from_slice(&values[j..n]);
    values.copy_from_slice(&merged[..n]);
    count
}

/// Vertical room kept between two neighbours in a column.
fn gap(upper: &Item, lower: &Item) -> f64 {
    let both_passes =
        matches!(upper.kind, ItemKind::Pass(_)) && matches!(lower.kind, ItemKind::Pass(_));
    let base = if both_passes { 0.0 } else { GRID };
    base + upper.skirt
}

fn assign_heights(
    order: &[Vec<usize>],
    items: &mut [Item],
    anchors: &[Anchor],
    groups: &[Vec<usize>],
    item_anchors: &[Vec<usize>],
) {
    for column_items in order {
        let mut top = 0.0;
        for (i, &item) in column_items.iter().enumerate() {
            items[item].top = top;
            let next = column_items.get(i + 1).map(|&n| &items[n]);
            top += items[item].height + next.map_or(0.0, |n| gap(&items[item], n));
        }
    }
    let pulls = Pulls::build(order, items, anchors, groups, item_anchors);
    // Each item's top, in a list of their own (the rounds read the tops of
    // far ends all over the drawing), and each column's offsets, which the
    // rounds do not change.
    let mut tops: Vec<f64> = items.iter().map(|item| item.top).collect();
    let offsets_of: Vec<Vec<f64>> = order
        .iter()
        .map(|column_items| {
            let mut offsets = Vec::with_capacity(column_items.len());
            let mut offset = 0.0;
            for (i, &item) in column_items.iter().enumerate() {
                offsets.push(offset);
                let next = column_items.get(i + 1).map(|&n| &items[n]);
                offset += items[item].height + next.map_or(0.0, |n| gap(&items[item], n));
            }
            offsets
        })
        .collect();
    let sequence: Vec<usize> = (0..order.len()).chain((0..order.len()).rev()).collect();
    for _ in 0..ROUNDS {
        for &c in &sequence {
            let column_items = &order[c];
            if column_items.is_empty() {
                continue;
            }
            let mut targets = Vec::with_capacity(column_items.len());
            let mut weights = Vec::with_capacity(column_items.len());
            for &item in column_items {
                let mut sum = 0.0;
                let mut count = 0.0;
                for &(dy, ref ends) in pulls.of(item) {
                    let (mut other_sum, mut other_count) = (0.0, 0.0);
                    for &(other, other_dy) in &pulls.ends[ends.clone()] {
                        other_sum += tops[other] + other_dy;
                        other_count += 1.0;
                    }
                    sum += other_sum / other_count - dy;
                    count += 1.0;
                }
                if count > 0.0 {
                    targets.push(sum / count);
                    weights.push(count);
                } else {
                    targets.push(tops[item]);
                    weights.push(1e-3);
                }
            }
            let placed = pool_adjacent(&targets, &weights, &offsets_of[c]);
            for (&item, top) in column_items.iter().zip(placed) {
                items[item].top = top;
                tops[item] = top;
            }
        }
    }
    // Snap onto the grid, keeping the gaps.
    let mut lowest = f64::INFINITY;
    for column_items in order {
        let mut floor = f64::NEG_INFINITY;
        for (i, &item) in column_items.iter().enumerate() {
            let top = round_grid(items[item].top).max(ceil_grid(floor));
            items[item].top = top;
            lowest = lowest.min(top);
            let next = column_items.get(i + 1).map(|&n| &items[n]);
            floor = top + items[item].height + next.map_or(0.0, |n| gap(&items[item], n));
        }
    }
    if lowest.is_finite() {
        for item in items.iter_mut() {
            item.top -= lowest;
        }
    }
}

/// Per item: each of its anchors that connects to items in other columns,
/// with the anchor's height on the item and the far ends (item, height),
/// in anchor then member order: what pulls the item up or down, worked out
/// once for all the rounds.
struct Pulls {
    start: Vec<usize>,
    anchors: Vec<(f64, std::ops::Range<usize>)>,
    ends: Vec<(usize, f64)>,
}

impl Pulls {
    fn build(
        order: &[Vec<usize>],
        items: &[Item],
        anchors: &[Anchor],
        groups: &[Vec<usize>],
        item_anchors: &[Vec<usize>],
    ) -> Pulls {
        let item_count = items.len();
        // The column an item is placed in (its own, once ordered).
        let mut column_of = vec![usize::MAX; item_count];
        for (c, column_items) in order.iter().enumerate() {
            for &item in column_items {
                column_of[item] = c;
            }
        }
        let mut pulls = Pulls {
            start: Vec::with_capacity(item_count + 1),
            anchors: Vec::new(),
            ends: Vec::new(),
        };
        for item in 0..item_count {
            pulls.start.push(pulls.anchors.len());
            for &a in &item_anchors[item] {
                let from = pulls.ends.len();
                for &o in &groups[anchors[a].group] {
                    let other = &anchors[o];
                    if items[other.item].column != column_of[item] {
                        pulls.ends.push((other.item, other.dy));
                    }
                }
                if pulls.ends.len() > from {
                    pulls.anchors.push((anchors[a].dy, from..pulls.ends.len()));
                }
            }
        }
        pulls.start.push(pulls.anchors.len());
        pulls
    }

    fn of(&self, item: usize) -> &[(f64, std::ops::Range<usize>)] {
        &self.anchors[self.start[item]..self.start[item + 1]]
    }
}

/// Tops as close as possible (weighted least squares) to `targets`, keeping
/// each item `offsets[i+1] − offsets[i]` below the one before: with
/// z = top − offset the constraint is z non-decreasing, an isotonic
/// regression solved by pooling adjacent violators.
fn pool_adjacent(targets: &[f64], weights: &[f64], offsets: &[f64]) -> Vec<f64> {
    // (weight, weighted sum, count)
    let mut blocks: Vec<(f64, f64, usize)> = Vec::with_capacity(targets.len());
    for i in 0..targets.len() {
        let z = targets[i] - offsets[i];
        blocks.push((weights[i], weights[i] * z, 1));
        while blocks.len() >= 2 {
            let (w2, s2, n2) = blocks[blocks.len() - 1];
            let (w1, s1, n1) = blocks[blocks.len() - 2];
            if s1 / w1 > s2 / w2 {
                blocks.pop();
                let last = blocks.len() - 1;
                blocks[last] = (w1 + w2, s1 + s2, n1 + n2);
            } else {
                break;
            }
        }
    }
    let mut tops = Vec::with_capacity(targets.len());
    for (w, s, n) in blocks {
        let z = s / w;
        for _ in 0..n {
            let i = tops.len();
            tops.push(z + offsets[i]);
        }
    }
    tops
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn pooling_keeps_order_and_gaps() {
        // Two items of height 10 with no gap both want top 0: least squares
        // with top2 ≥ top1 + 10 puts them at −5 and 5.
        let tops = pool_adjacent(&[0.0, 0.0], &[1.0, 1.0], &[0.0, 10.0]);
        assert_eq!(tops, vec![-5.0, 5.0]);
        // Far enough apart already: untouched.
        let tops = pool_adjacent(&[0.0, 50.0], &[1.0, 1.0], &[0.0, 10.0]);
        assert_eq!(tops, vec![0.0, 50.0]);
    }

    #[test]
    fn inversions_count_crossing_pairs() {
        // 3 1 2: (3,1) and (3,2) are out of order.
        assert_eq!(inversions(&mut [3, 1, 2]), 2);
        assert_eq!(inversions(&mut [1, 2, 3]), 0);
        assert_eq!(inversions(&mut [3, 2, 1]), 3);
        // A reversed run of n values has n(n-1)/2 inversions: 1000 → 499,500.
        let mut reversed: Vec<usize> = (0..1000).rev().collect();
        assert_eq!(inversions(&mut reversed), 499_500);
        // Against counting every pair, on a scrambled run with repeats
        // (a linear congruential sequence, so the test is fixed).
        let scrambled: Vec<usize> = (0..257usize).map(|i| (i * 7919 + 13) % 101).collect();
        let pairs = (0..scrambled.len())
            .flat_map(|i| (i + 1..scrambled.len()).map(move |j| (i, j)))
            .filter(|&(i, j)| scrambled[i] > scrambled[j])
            .count() as u64;
        let mut sorted = scrambled.clone();
        assert_eq!(inversions(&mut sorted), pairs);
        assert!(sorted.windows(2).all(|w| w[0] <= w[1]));
    }

    #[test]
    fn a_cycle_is_broken_and_columns_follow_the_longest_path() {
        // 0 → 1 → 2 → 1 (a converter feeding back) and 0 → 2: the edge 2 → 1
        // closes the cycle and is dropped; the longest path puts 2 after 1.
        let (column, _) = columns(3, &[(0, 1), (0, 2), (1, 2), (2, 1)], &[0], 3);
        assert_eq!(column, vec![0, 1, 2]);
    }
}
