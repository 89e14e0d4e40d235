//! The diagram on paper: fitted to a page so no text prints smaller than
//! 7 pt, and when the drawing is too big for one sheet at that size, cut
//! into pieces between boxes, each line that leaves a piece ending on an
//! off-page connector that names its net and the sheet it continues on.
//!
//! The cuts are guillotine cuts: each runs straight across the piece it
//! divides, not across the whole drawing, so it only has to miss that
//! piece's boxes, tags and labels (never along a line). Each step cuts off
//! the widest or tallest piece that fits with its connectors; near the top
//! both directions are tried and the division into fewer pieces kept.
//! Beside a vertical cut the flags stand in a gutter as wide as the longest
//! flag, spread apart with jogged leads; under or over a horizontal cut
//! they stack in rows, the rightmost and leftmost lines left sharing each
//! row with flags reading away from each other, so that gutter is only as
//! deep as half the lines the cut crosses. The pieces are then packed onto
//! sheets in shelves (several to a sheet when they fit, never two that a
//! line joins; in drawing order or tallest first, whichever takes fewer
//! sheets, which near the top of the cutting also picks between
//! divisions), sheet 1 under the title block, the others under a header
//! line; the findings, legend and cautions follow in the first free space
//! beside or under the pieces, as wide as that space, the findings split
//! where a space ends. The scale is the same on every sheet. Not for what
//! is drawn: `render` draws each piece, this module says where.

use super::content::{Content, WireKind};
use super::layout::{Align, GROUND_SYMBOL, Geometry, Label, PlacedTag, Rect, Tone};
use super::render::{self, BODY_SIZE, MARGIN, num};
use super::text;
use std::fmt;
use svg::node::element::{Group, Rectangle, Text};

/// A paper size.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord)]
pub enum Paper {
    /// ISO 216 A4, 210 × 297 mm.
    A4,
    /// US Letter, 8.5 × 11 in (215.9 × 279.4 mm).
    Letter,
    /// ISO 216 A3, 297 × 420 mm.
    A3,
    /// US Tabloid, 11 × 17 in (279.4 × 431.8 mm).
    Tabloid,
}

impl Paper {
    /// Every size, smallest area first.
    pub const ALL: [Paper; 4] = [Paper::Letter, Paper::A4, Paper::Tabloid, Paper::A3];

    /// Width and height in portrait, in millimetres (ISO 216; ANSI/ASME Y14.1).
    pub fn millimetres(self) -> (f64, f64) {
        match self {
            Paper::A4 => (210.0, 297.0),
            Paper::Letter => (215.9, 279.4),
            Paper::A3 => (297.0, 420.0),
            Paper::Tabloid => (279.4, 431.8),
        }
    }

    /// The name the command line takes.
    pub fn name(self) -> &'static str {
        match self {
            Paper::A4 => "a4",
            Paper::Letter => "letter",
            Paper::A3 => "a3",
            Paper::Tabloid => "tabloid",
        }
    }
}

/// A paper size and its orientation.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Page {
    /// The paper.
    pub paper: Paper,
    /// Long side across.
    pub landscape: bool,
}

impl Page {
    /// Width and height as the sheet is read, in millimetres.
    pub fn millimetres(self) -> (f64, f64) {
        let (w, h) = self.paper.millimetres();
        if self.landscape { (h, w) } else { (w, h) }
    }

    fn points(self) -> (f64, f64) {
        let (w, h) = self.millimetres();
        (w * PT_PER_MM, h * PT_PER_MM)
    }
}

impl fmt::Display for Page {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let orientation = if self.landscape {
            "landscape"
        } else {
            "portrait"
        };
        write!(f, "{} {orientation}", self.paper.name())
    }
}

/// The diagram cut into sheets of one page size.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Sheets {
    /// The page every sheet is printed on.
    pub page: Page,
    /// One SVG document per sheet, sized in millimetres.
    pub svgs: Vec<String>,
}

/// Why the diagram cannot be printed on the page asked for.
#[derive(Clone, Debug, PartialEq)]
pub struct PageError {
    /// The page asked for.
    pub page: Page,
    /// What does not fit.
    pub what: String,
    /// The width and height it needs with its margins, in millimetres.
    pub needed: (f64, f64),
    /// The smallest page it fits on, if any does.
    pub fits: Option<Page>,
}

impl fmt::Display for PageError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let (w, h) = self.needed;
        write!(
            f,
            "{} does not fit on {} with text of at least {MIN_TEXT_PT} pt: it needs {w:.0} × {h:.0} mm",
            self.what, self.page
        )?;
        match self.fits {
            Some(page) => write!(
                f,
                "; use `--page {}{}`",
                page.paper.name(),
                if page.landscape { " --landscape" } else { "" }
            ),
            None => f.write_str("; no supported page is that large"),
        }
    }
}

impl std::error::Error for PageError {}

/// Smallest printed text, in points.
pub const MIN_TEXT_PT: f64 = 7.0;
/// Points per millimetre (1 pt = 1/72 in, 1 in = 25.4 mm).
const PT_PER_MM: f64 = 72.0 / 25.4;
const MARGIN_MM: f64 = 10.0;
/// The smallest text the diagram writes, in its own units (finding numbers,
/// ground names, off-page connectors).
const SMALLEST_TEXT: f64 = 8.0;
/// Drawing units per printed point at the smallest size allowed.
const SCALE: f64 = MIN_TEXT_PT / SMALLEST_TEXT;
const HEADER: f64 = 24.0;
const FLAG_TEXT: f64 = SMALLEST_TEXT;
const FLAG_HEIGHT: f64 = 12.0;
const FLAG_NAME_CELLS: usize = 12;
const LANE: f64 = 3.0;
const MAX_LANES: usize = 6;
/// Keep-out either side of a line a cut must not run along.
const LINE_CLEARANCE: f64 = 0.5;

/// Rounded down to the two decimals the file writes.
fn floor2(v: f64) -> f64 {
    (v * 100.0).floor() / 100.0
}

/// Content area of a sheet in drawing units at the smallest scale.
fn content_area(page: Page) -> (f64, f64) {
    let (w, h) = page.points();
    let margin = MARGIN_MM * PT_PER_MM;
    ((w - 2.0 * margin) / SCALE, (h - 2.0 * margin) / SCALE)
}

/// Where a tag sits: its frame, or its labels' extent for a ground tag.
pub(super) fn tag_bounds(tag: &PlacedTag) -> Rect {
    if let Some(frame) = tag.frame {
        return frame;
    }
    let mut b = Bounds::empty();
    for l in &tag.labels {
        b.add(label_bounds(l));
    }
    if let Some((x, y)) = tag.ground_icon {
        b.add(Bounds::new(x - 7.0, y, x + 7.0, y + GROUND_SYMBOL));
    }
    b.rect()
}

#[derive(Clone, Copy, Debug)]
struct Bounds {
    x0: f64,
    y0: f64,
    x1: f64,
    y1: f64,
}

impl Bounds {
    fn new(x0: f64, y0: f64, x1: f64, y1: f64) -> Bounds {
        Bounds { x0, y0, x1, y1 }
    }

    fn empty() -> Bounds {
        Bounds::new(
            f64::INFINITY,
            f64::INFINITY,
            f64::NEG_INFINITY,
            f64::NEG_INFINITY,
        )
    }

    fn of(r: Rect) -> Bounds {
        Bounds::new(r.x, r.y, r.x + r.width, r.y + r.height)
    }

    fn add(&mut self, o: Bounds) {
        self.x0 = self.x0.min(o.x0);
        self.y0 = self.y0.min(o.y0);
        self.x1 = self.x1.max(o.x1);
        self.y1 = self.y1.max(o.y1);
    }

    fn rect(self) -> Rect {
        if self.x0 > self.x1 {
            return Rect {
                x: 0.0,
                y: 0.0,
                width: 0.0,
                height: 0.0,
            };
        }
        Rect {
            x: self.x0,
            y: self.y0,
            width: self.x1 - self.x0,
            height: self.y1 - self.y0,
        }
    }
}

fn label_bounds(l: &Label) -> Bounds {
    let width = text::width(&l.text, l.size);
    let x0 = match l.align {
        Align::Start => l.x,
        Align::Middle => l.x - width / 2.0,
        Align::End => l.x - width,
    };
    Bounds::new(
        x0,
        l.y - l.size * text::ASCENT_EM,
        x0 + width,
        l.y + l.size * text::DESCENT_EM,
    )
}

/// Everything a cut must not pass through: each box with its labels and
/// ground symbols, each tag.
fn blocks(geometry: &Geometry) -> Vec<Bounds> {
    let mut out = Vec::new();
    for part in &geometry.parts {
        let mut b = Bounds::of(part.rect);
        for l in &part.labels {
            b.add(label_bounds(l));
        }
        for g in &part.grounds {
            b.add(Bounds::new(g.x - 7.0, g.y, g.x + 7.0, g.y + GROUND_SYMBOL));
        }
        out.push(b);
    }
    for tag in &geometry.tags {
        out.push(Bounds::of(tag_bounds(tag)));
    }
    out
}

/// The largest cut at or below `limit` and above `floor` outside every
/// interval, or the interval in the way.
fn cut_below(intervals: &[(f64, f64)], floor: f64, limit: f64) -> Result<f64, (f64, f64)> {
    let mut cut = limit;
    // Walk down while the cut falls in an interval.
    loop {
        let hit = intervals.iter().filter(|&&(a, b)| a < cut && cut < b).fold(
            None,
            |m: Option<(f64, f64)>, &(a, b)| match m {
                Some((ma, mb)) => Some((ma.min(a), mb.max(b))),
                None => Some((a, b)),
            },
        );
        match hit {
            None => return Ok(cut),
            Some((a, b)) if a <= floor => return Err((a, b)),
            Some((a, _)) => cut = a,
        }
    }
}

/// Room under (or over) a cut for `count` flags stacked one per row.
fn stack_gutter(count: usize) -> f64 {
    6.0 + count as f64 * (FLAG_HEIGHT + 2.0)
}

/// A piece of the drawing and the room around it its off-page connectors
/// take (left, right, top, bottom), in drawing units.
#[derive(Clone, Copy, Debug)]
struct Tile {
    window: Rect,
    gutter: [f64; 4],
}

impl Tile {
    /// Width and height on the sheet, connectors included.
    fn size(&self) -> (f64, f64) {
        (
            self.window.width + self.gutter[0] + self.gutter[1],
            self.window.height + self.gutter[2] + self.gutter[3],
        )
    }
}

/// Where every line of the drawing crosses a window's edges (left, right,
/// top, bottom): the place along the edge, the connection, and a point just
/// beyond the edge on the line.
type EdgeCrossings = [Vec<(f64, usize, (f64, f64))>; 4];

fn edge_crossings(geometry: &Geometry, w: Rect) -> EdgeCrossings {
    let (xa, xb, ya, yb) = (w.x, w.x + w.width, w.y, w.y + w.height);
    let mut edges: EdgeCrossings = Default::default();
    for (wire, placed) in geometry.wires.iter().enumerate() {
        for &[x1, y1, x2, y2] in &placed.segments {
            let (lx, hx, ly, hy) = (x1.min(x2), x1.max(x2), y1.min(y2), y1.max(y2));
            if ly == hy && ly >= ya && ly <= yb {
                if lx < xa && hx > xa {
                    edges[0].push((ly, wire, (xa - 0.5, ly)));
                }
                if lx < xb && hx > xb {
                    edges[1].push((ly, wire, (xb + 0.5, ly)));
                }
            }
            if lx == hx && lx >= xa && lx <= xb {
                if ly < ya && hy > ya {
                    edges[2].push((lx, wire, (lx, ya - 0.5)));
                }
                if ly < yb && hy > yb {
                    edges[3].push((lx, wire, (lx, yb + 0.5)));
                }
            }
        }
    }
    edges
}

/// Width of a flag for `wire`, with room for a two-digit sheet number.
fn flag_length(content: &Content, wire: usize) -> f64 {
    let name = text::truncate(&text::clean(&content.wires[wire].name), FLAG_NAME_CELLS);
    text::width(&format!("{name} → 99"), FLAG_TEXT) + 6.0
}

/// Where flags beside a vertical cut sit along it: in order, no closer than
/// a flag's height (the same rule [`flags`] draws by).
fn flag_slots(ats: &mut [f64]) -> Vec<f64> {
    ats.sort_by(f64::total_cmp);
    let mut slot: Vec<f64> = Vec::with_capacity(ats.len());
    for &at in ats.iter() {
        let at = match slot.last() {
            Some(&prev) => at.max(prev + FLAG_HEIGHT + 2.0),
            None => at,
        };
        slot.push(at);
    }
    slot
}

/// How far the flags beside a window's vertical cuts (lines crossing at
/// `ats`) reach above its top `ya` and below its bottom `yb`, with a little
/// clearance: the flags under or over it stack beyond that.
fn overhang(mut ats: Vec<f64>, ya: f64, yb: f64) -> (f64, f64) {
    let left_and_right = ats.len();
    let slots = flag_slots(&mut ats);
    if left_and_right == 0 {
        return (0.0, 0.0);
    }
    // Each side spreads its own flags; both together reach no further than
    // one list of them all.
    let first = slots.first().copied().unwrap_or(ya);
    let last = slots.last().copied().unwrap_or(yb);
    (
        (ya - (first - FLAG_HEIGHT / 2.0) + 2.0).max(0.0),
        (last + FLAG_HEIGHT / 2.0 - yb + 2.0).max(0.0),
    )
}

/// The room a window's off-page connectors take on each side: flags beside
/// a vertical cut, stacked rows under or over a horizontal one, and what
/// either pushes past the window's corners.
fn gutters(content: &Content, geometry: &Geometry, w: Rect) -> [f64; 4] {
    let edges = edge_crossings(geometry, w);
    let (xa, xb, ya, yb) = (w.x, w.x + w.width, w.y, w.y + w.height);
    let mut g = [0.0f64; 4];
    for side in 0..2 {
        if edges[side].is_empty() {
            continue;
        }
        let longest = edges[side]
            .iter()
            .map(|c| flag_length(content, c.1))
            .fold(0.0, f64::max);
        g[side] = 8.0 + LANE * MAX_LANES as f64 + longest + 4.0;
    }
    let beside: Vec<f64> = edges[0].iter().chain(&edges[1]).map(|c| c.0).collect();
    let (over, under) = overhang(beside, ya, yb);
    g[2] = over;
    g[3] = under;
    for side in 2..4 {
        if edges[side].is_empty() {
            continue;
        }
        g[side] += stack_gutter(stack_row_count(edges[side].len()));
        // Stacked flags read away from their lines, past the window's sides.
        let ats: Vec<f64> = edges[side].iter().map(|c| c.0).collect();
        for (c, (_, rightwards)) in edges[side].iter().zip(stack_rows(&ats)) {
            let length = flag_length(content, c.1) + 4.0 + 2.0;
            if rightwards {
                g[1] = g[1].max(c.0 + length - xb);
            } else {
                g[0] = g[0].max(xa - (c.0 - length));
            }
        }
    }
    g
}

/// Everything a piece of the drawing holds, shrunk to what is in it: the
/// boxes and tags whose middle lies inside, and the lines clipped to it.
fn trimmed(blocks: &[Bounds], segments: &[[f64; 4]], r: Rect) -> Option<Rect> {
    let mut b = Bounds::empty();
    let inside = |x: f64, y: f64| x >= r.x && x <= r.x + r.width && y >= r.y && y <= r.y + r.height;
    for block in blocks {
        if inside((block.x0 + block.x1) / 2.0, (block.y0 + block.y1) / 2.0) {
            b.add(*block);
        }
    }
    for s in segments {
        if let Some(c) = render::clip(*s, r)
            && (c[0] != c[2] || c[1] != c[3])
        {
            b.add(Bounds::new(c[0], c[1], c[2], c[3]));
        }
    }
    if b.x0 > b.x1 {
        return None;
    }
    // Never wider than the piece: a box's labels may reach past its middle's side.
    Some(
        Bounds::new(
            b.x0.max(r.x),
            b.y0.max(r.y),
            b.x1.min(r.x + r.width),
            b.y1.min(r.y + r.height),
        )
        .rect(),
    )
}

/// Cuts the drawing into pieces that each fit a sheet of `width` ×
/// `height` with their connectors: guillotine cuts, each straight across
/// the piece it divides (not across the whole drawing), so a cut only has
/// to miss the boxes of that piece. Each step cuts off the widest (or
/// tallest) piece that fits and carries on with the rest; near the top the
/// other direction is tried too and the division into fewer pieces kept.
struct Cutter<'a> {
    content: &'a Content,
    geometry: &'a Geometry,
    blocks: Vec<Bounds>,
    segments: Vec<[f64; 4]>,
    width: f64,
    height: f64,
    /// Divisions already worked out, by piece.
    memo: std::cell::RefCell<std::collections::HashMap<[u64; 4], Division>>,
    tried: std::cell::Cell<usize>,
    /// Sheets a set of pieces packs onto: near the top, divisions are
    /// compared by it (then by pieces).
    sheets_for: &'a dyn Fn(&[Rect]) -> usize,
}

/// What cannot be cut small enough: its description and the width and
/// height it needs.
type CutError = (String, f64, f64);
/// A piece's division into pieces that fit, or what does not fit.
type Division = Result<Vec<Rect>, CutError>;

impl Cutter<'_> {
    /// Blocked stretches along x (`across` false) or y of everything in `r`.
    fn blocked(&self, r: Rect, vertical_cut: bool) -> Vec<(f64, f64)> {
        let overlaps =
            |b: &Bounds| b.x1 > r.x && b.x0 < r.x + r.width && b.y1 > r.y && b.y0 < r.y + r.height;
        let mut out: Vec<(f64, f64)> = self
            .blocks
            .iter()
            .filter(|b| overlaps(b))
            .map(|b| {
                if vertical_cut {
                    (b.x0 - 2.0, b.x1 + 2.0)
                } else {
                    (b.y0 - 2.0, b.y1 + 2.0)
                }
            })
            .collect();
        // Never along a line.
        for s in &self.segments {
            if let Some(c) = render::clip(*s, r) {
                if vertical_cut && c[0] == c[2] && c[1] != c[3] {
                    out.push((c[0] - LINE_CLEARANCE, c[0] + LINE_CLEARANCE));
                }
                if !vertical_cut && c[1] == c[3] && c[0] != c[2] {
                    out.push((c[1] - LINE_CLEARANCE, c[1] + LINE_CLEARANCE));
                }
            }
        }
        out
    }

    fn holds_a_block(&self, r: Rect) -> bool {
        self.blocks.iter().any(|b| {
            let (cx, cy) = ((b.x0 + b.x1) / 2.0, (b.y0 + b.y1) / 2.0);
            cx >= r.x && cx <= r.x + r.width && cy >= r.y && cy <= r.y + r.height
        })
    }

    /// The two halves of `r` cut at `at`.
    fn halves(r: Rect, vertical_cut: bool, at: f64) -> (Rect, Rect) {
        if vertical_cut {
            (
                Rect {
                    width: at - r.x,
                    ..r
                },
                Rect {
                    x: at,
                    width: r.x + r.width - at,
                    ..r
                },
            )
        } else {
            (
                Rect {
                    height: at - r.y,
                    ..r
                },
                Rect {
                    y: at,
                    height: r.y + r.height - at,
                    ..r
                },
            )
        }
    }

    /// The farthest cut across `r` whose first half fits the sheet in that
    /// direction, or the run of boxes that leaves none.
    fn cut(&self, r: Rect, vertical_cut: bool, bare: bool) -> Result<f64, (f64, f64)> {
        let blocked = self.blocked(r, vertical_cut);
        let (start, end, room) = if vertical_cut {
            (r.x, r.x + r.width, self.width)
        } else {
            (r.y, r.y + r.height, self.height)
        };
        let mut limit = (start + room).min(end - 1.0);
        loop {
            let at = cut_below(&blocked, start + 1.0, limit)?;
            if at <= start + 1.0 {
                return Err((start, limit));
            }
            let (first, rest) = Self::halves(r, vertical_cut, at);
            // Both halves hold a box or tag: a strip of bare lines between
            // them is no piece worth a sheet.
            if !bare && !self.holds_a_block(first) {
                return Err((start, limit));
            }
            if !bare && !self.holds_a_block(rest) {
                limit = at - 1.0;
                continue;
            }
            let Some(first) = trimmed(&self.blocks, &self.segments, first) else {
                return Ok(at);
            };
            let g = gutters(self.content, self.geometry, first);
            let size = if vertical_cut {
                first.width + g[0] + g[1]
            } else {
                first.height + g[2] + g[3]
            };
            if size <= room {
                return Ok(at);
            }
            // Step back by what the connectors took.
            limit = at - (size - room).max(1.0);
        }
    }

    fn split(&self, r: Rect, depth: usize) -> Result<Vec<Rect>, CutError> {
        let Some(r) = trimmed(&self.blocks, &self.segments, r) else {
            return Ok(Vec::new());
        };
        let key = [r.x, r.y, r.width, r.height].map(f64::to_bits);
        if let Some(known) = self.memo.borrow().get(&key) {
            return known.clone();
        }
        let result = self.divide(r, depth);
        self.memo.borrow_mut().insert(key, result.clone());
        result
    }

    fn divide(&self, r: Rect, depth: usize) -> Result<Vec<Rect>, CutError> {
        let g = gutters(self.content, self.geometry, r);
        let (w, h) = (r.width + g[0] + g[1], r.height + g[2] + g[3]);
        if w <= self.width && h <= self.height {
            return Ok(vec![r]);
        }
        // Each division tried counts against a budget: past it, the first
        // that works is kept, so a large plan cannot take long.
        self.tried.set(self.tried.get() + 1);
        let explore = depth < 4 && self.tried.get() < SPLIT_BUDGET;
        // The direction the piece overflows first; the other after; pieces
        // of bare lines only when nothing else divides it.
        let order = if w > self.width {
            [true, false]
        } else {
            [false, true]
        };
        let tries = order
            .iter()
            .map(|&v| (v, false))
            .chain(order.iter().map(|&v| (v, true)));
        let mut best: Option<Vec<Rect>> = None;
        let mut failure: Option<CutError> = None;
        for (vertical_cut, bare) in tries {
            if bare && best.is_some() {
                break;
            }
            let Ok(at) = self.cut(r, vertical_cut, bare) else {
                continue;
            };
            let (first, rest) = Self::halves(r, vertical_cut, at);
            let pieces = self.split(first, depth + 1).and_then(|mut pieces| {
                pieces.extend(self.split(rest, depth + 1)?);
                Ok(pieces)
            });
            match pieces {
                Ok(pieces) => {
                    let better = match &best {
                        None => true,
                        Some(b) if depth <= 1 => {
                            ((self.sheets_for)(&pieces), pieces.len())
                                < ((self.sheets_for)(b), b.len())
                        }
                        Some(b) => pieces.len() < b.len(),
                    };
                    if better {
                        best = Some(pieces);
                    }
                    if !explore || bare {
                        break;
                    }
                }
                Err(e) => {
                    failure.get_or_insert(e);
                }
            }
        }
        best.ok_or_else(|| {
            // Nothing divides this piece: it is what does not fit.
            failure.unwrap_or_else(|| {
                let what = if self.blocks_in(r) == 1 {
                    "a part box with its labels"
                } else if w > self.width {
                    "a run of boxes side by side"
                } else {
                    "a run of boxes one above another"
                };
                (what.to_string(), w, h)
            })
        })
    }

    fn blocks_in(&self, r: Rect) -> usize {
        self.blocks
            .iter()
            .filter(|b| {
                let (cx, cy) = ((b.x0 + b.x1) / 2.0, (b.y0 + b.y1) / 2.0);
                cx >= r.x && cx <= r.x + r.width && cy >= r.y && cy <= r.y + r.height
            })
            .count()
    }
}

/// Divisions explored for the fewest pieces before the cutter keeps the
/// first that works.
const SPLIT_BUDGET: usize = 1000;

/// Cuts the drawing into tiles that fit `width` × `height` each.
fn tiles(
    content: &Content,
    geometry: &Geometry,
    width: f64,
    height: f64,
    first: f64,
) -> Result<Vec<Tile>, CutError> {
    let as_tiles = |pieces: &[Rect]| -> Vec<Tile> {
        pieces
            .iter()
            .map(|&window| Tile {
                window,
                gutter: gutters(content, geometry, window),
            })
            .collect()
    };
    let sheets_for = |pieces: &[Rect]| {
        pack(geometry, &as_tiles(pieces), first, height, width)
            .0
            .len()
    };
    let sheets_for: &dyn Fn(&[Rect]) -> usize = &sheets_for;
    let cutter = Cutter {
        content,
        geometry,
        blocks: blocks(geometry),
        segments: geometry
            .wires
            .iter()
            .flat_map(|w| w.segments.iter().copied())
            .collect(),
        width,
        height,
        memo: Default::default(),
        tried: Default::default(),
        sheets_for,
    };
    // A box that cannot fit alone is named with its own size and room for
    // a column of connectors either side and a row above and below.
    let beside =
        8.0 + LANE * MAX_LANES as f64 + 4.0 + (FLAG_NAME_CELLS + 5) as f64 * 0.62 * FLAG_TEXT;
    for b in &cutter.blocks {
        let (w, h) = (b.x1 - b.x0, b.y1 - b.y0);
        if w > width || h > height {
            return Err((
                "a part box with its labels".to_string(),
                w + 2.0 * beside,
                h + 2.0 * stack_gutter(1),
            ));
        }
    }
    let whole = Rect {
        x: 0.0,
        y: 0.0,
        width: geometry.width,
        height: geometry.height,
    };
    let pieces = cutter.split(whole, 0)?;
    Ok(as_tiles(&pieces))
}

/// A line crossing a cut: where along the edge, which connection, and the
/// sheet it continues on.
struct Crossing {
    at: f64,
    name: String,
    kind: WireKind,
    sheet: usize,
}

/// Flags and the jogged lines leading to them along a vertical cut at
/// `edge`; `outward` is +1 (right) or −1 (left).
fn flags(crossings: &mut [Crossing], edge: f64, outward: f64, dx: f64, dy: f64) -> Group {
    crossings.sort_by(|a, b| a.at.total_cmp(&b.at).then(a.name.cmp(&b.name)));
    // Where each flag sits along the edge: no closer than a flag's height.
    let mut slot: Vec<f64> = Vec::with_capacity(crossings.len());
    for c in crossings.iter() {
        let at = match slot.last() {
            Some(&prev) => c.at.max(prev + FLAG_HEIGHT + 2.0),
            None => c.at,
        };
        slot.push(at);
    }
    // Runs of flags pushed along by the one before share a cluster; within
    // it, jogs step back towards the cut so no two leads cross.
    let mut lane = vec![0usize; crossings.len()];
    let mut i = 0;
    while i < crossings.len() {
        let mut j = i + 1;
        while j < crossings.len() && slot[j] > crossings[j].at {
            j += 1;
        }
        let len = j - i;
        for (k, slot_lane) in lane[i..j].iter_mut().enumerate() {
            *slot_lane = (len - 1 - k).min(MAX_LANES);
        }
        i = j;
    }
    let mut group = Group::new().set("class", "off-page-connectors");
    let flag_at = edge + outward * (8.0 + LANE * MAX_LANES as f64);
    for (n, c) in crossings.iter().enumerate() {
        let jog = edge + outward * (4.0 + LANE * lane[n] as f64);
        let words = flag_words(c);
        let length = text::width(&words, FLAG_TEXT) + 6.0;
        let mut lead = vec![[edge, c.at, jog, c.at]];
        if slot[n] != c.at {
            lead.push([jog, c.at, jog, slot[n]]);
        }
        lead.push([jog, slot[n], flag_at, slot[n]]);
        let d = render::segments_path(&lead, dx, dy);
        group = group.add(render::connection(&d, c.kind, &c.name));
        let near = if outward > 0.0 {
            flag_at
        } else {
            flag_at - length
        };
        let ry = slot[n] - FLAG_HEIGHT / 2.0;
        group = group
            .add(flag_frame(c, near + dx, ry + dy, length, FLAG_HEIGHT))
            .add(flag_text(words, near + 3.0 + dx, slot[n] + 3.0 + dy));
    }
    group
}

/// Rows for the flags of lines crossing a horizontal cut at `ats` (in any
/// order): per line, its row (0 nearest the cut) and whether its flag reads
/// rightwards. Row by row the rightmost line left takes a flag reading
/// right and the leftmost one a flag reading left, so every line running on
/// to a further row lies between the two and passes clear of both: half as
/// many rows as lines.
fn stack_rows(ats: &[f64]) -> Vec<(usize, bool)> {
    let mut order: Vec<usize> = (0..ats.len()).collect();
    order.sort_by(|&a, &b| ats[a].total_cmp(&ats[b]).then(a.cmp(&b)));
    let mut rows = vec![(0, true); ats.len()];
    let (mut left, mut right) = (0, order.len());
    let mut k = 0;
    while left < right {
        if k % 2 == 0 {
            right -= 1;
            rows[order[right]] = (k / 2, true);
        } else {
            rows[order[left]] = (k / 2, false);
            left += 1;
        }
        k += 1;
    }
    rows
}

/// Rows of flags that `count` lines crossing a horizontal cut take.
fn stack_row_count(count: usize) -> usize {
    count.div_ceil(2)
}

/// Flags for the lines crossing a horizontal cut at `edge`, in rows going
/// away from it (`outward` +1 down, −1 up), as [`stack_rows`] assigns them.
/// The rows start `push` further out, past the flags beside the vertical
/// cuts that run on beyond this edge.
fn stacked_flags(
    crossings: &mut [Crossing],
    edge: f64,
    outward: f64,
    push: f64,
    (dx, dy): (f64, f64),
) -> Group {
    crossings.sort_by(|a, b| a.at.total_cmp(&b.at).then(a.name.cmp(&b.name)));
    let ats: Vec<f64> = crossings.iter().map(|c| c.at).collect();
    let rows = stack_rows(&ats);
    let mut group = Group::new().set("class", "off-page-connectors");
    for (c, &(row, rightwards)) in crossings.iter().zip(&rows) {
        let mid =
            edge + outward * (push + 6.0 + row as f64 * (FLAG_HEIGHT + 2.0) + FLAG_HEIGHT / 2.0);
        let words = flag_words(c);
        let length = text::width(&words, FLAG_TEXT) + 6.0;
        let near = if rightwards { c.at + 4.0 } else { c.at - 4.0 };
        let lead = [[c.at, edge, c.at, mid], [c.at, mid, near, mid]];
        let d = render::segments_path(&lead, dx, dy);
        group = group.add(render::connection(&d, c.kind, &c.name));
        let rx = if rightwards { near } else { near - length };
        let ry = mid - FLAG_HEIGHT / 2.0;
        group = group
            .add(flag_frame(c, rx + dx, ry + dy, length, FLAG_HEIGHT))
            .add(flag_text(words, rx + 3.0 + dx, mid + 3.0 + dy));
    }
    group
}

fn flag_words(c: &Crossing) -> String {
    format!(
        "{} → {}",
        text::truncate(&c.name, FLAG_NAME_CELLS),
        c.sheet + 1
    )
}

fn flag_frame(c: &Crossing, x: f64, y: f64, width: f64, height: f64) -> Rectangle {
    Rectangle::new()
        .set("class", "off-page")
        .set("data-net", c.name.clone())
        .set("data-sheet", c.sheet + 1)
        .set("x", num(x))
        .set("y", num(y))
        .set("width", num(width))
        .set("height", num(height))
        .set("fill", super::style::PAPER)
        .set("stroke", super::style::INK)
        .set("stroke-width", "1")
}

fn flag_text(words: String, x: f64, y: f64) -> Text {
    Text::new(words)
        .set("class", "off-page-text")
        .set("x", num(x))
        .set("y", num(y))
        .set("font-size", num(FLAG_TEXT))
        .set("fill", super::style::INK)
}

/// A header line: the plan's name and the sheet's number.
fn header(content: &Content, sheet: usize, count: usize, x: f64, y: f64) -> Group {
    let words = format!(
        "{} · sheet {} of {count}",
        text::truncate(&content.heading.name, 60),
        sheet + 1
    );
    Group::new().set("class", "sheet-header").add(render::label(
        &Label {
            x,
            y: y + BODY_SIZE,
            size: BODY_SIZE,
            align: Align::Start,
            text: words,
            bold: true,
            tone: Tone::Strong,
        },
        "sheet-header-text",
    ))
}

/// One sheet's content, before it knows how many sheets there are.
enum Piece {
    Tile(usize),
    /// Findings panels, legend and cautions, each with its width.
    Findings(std::ops::Range<usize>, f64),
    Legend(f64),
    Cautions(f64),
}

/// Height left for the drawing on sheet 1, under the title block.
fn first_room(content: &Content, area_w: f64, area_h: f64) -> f64 {
    let (_, title_bottom) = render::title_block(content, 0.0, 0.0, area_w);
    area_h - title_bottom - MARGIN
}

/// Lays the diagram out on sheets of `page`.
pub(super) fn sheets(
    content: &Content,
    geometry: &Geometry,
    marker_w: f64,
    page: Page,
) -> Result<Sheets, PageError> {
    let (area_w, area_h) = content_area(page);
    let (page_w, page_h) = page.points();
    // Rounded down, so the written viewBox never prints text under 7 pt.
    let (sheet_w, sheet_h) = (floor2(page_w / SCALE), floor2(page_h / SCALE));
    let margin = (sheet_w - area_w) / 2.0;
    let size = (
        format!("{}mm", num(page.millimetres().0)),
        format!("{}mm", num(page.millimetres().1)),
    );

    // All on one sheet, when it fits at the smallest scale or larger.
    let (body, w, h) = render::compose(
        content,
        geometry,
        marker_w,
        render::MIN_WIDTH.min(area_w - 2.0 * MARGIN),
    );
    let scale = (page_w - 2.0 * MARGIN_MM * PT_PER_MM) / w;
    let scale = scale.min((page_h - 2.0 * MARGIN_MM * PT_PER_MM) / h);
    if scale >= SCALE {
        let (vw, vh) = (floor2(page_w / scale), floor2(page_h / scale));
        let view = (-(vw - w) / 2.0, -(vh - h) / 2.0, vw, vh);
        let svg = render::document(body.set("class", "sheet"), size.clone(), view);
        return Ok(Sheets {
            page,
            svgs: vec![svg],
        });
    }

    let first_height = first_room(content, area_w, area_h);
    let room = area_h - HEADER;
    let tiles = tiles(content, geometry, area_w, room, first_height).map_err(|(what, w, h)| {
        // The piece with its connectors, under a sheet header.
        let needed = (
            (w * SCALE) / PT_PER_MM + 2.0 * MARGIN_MM,
            ((h + HEADER) * SCALE) / PT_PER_MM + 2.0 * MARGIN_MM,
        );
        let fits = Paper::ALL
            .iter()
            .flat_map(|&paper| [false, true].map(|landscape| Page { paper, landscape }));
        let fits = fits.into_iter().find(|p| {
            let (pw, ph) = p.millimetres();
            // Half a millimetre for rounding.
            pw + 0.5 >= needed.0 && ph + 0.5 >= needed.1
        });
        PageError {
            page,
            what,
            needed,
            fits,
        }
    })?;

    let tile_at = |x: f64, y: f64| tile_at(&tiles, x, y);
    let (mut plans, tile_sheet) = pack(geometry, &tiles, first_height, room, area_w);
    // The findings, legend and cautions in that order, each in the first
    // space after the one before that takes it: beside the last shelf of
    // pieces or under it, as wide as that space (the findings as many as
    // fit there, the rest carried on).
    let findings = &content.findings;
    let mut sheet = 0;
    let mut start = 0;
    let mut notes_done = 0; // 0: findings, 1: legend, 2: cautions, 3: done
    while notes_done < 3 {
        if sheet == plans.len() {
            plans.push(SheetPlan::new(room));
        }
        let mut placed = false;
        // On an empty sheet a note goes in even when it is taller than the
        // sheet (a cut would not help it); otherwise that would never end.
        let empty = sheet > 0 && plans[sheet].items.is_empty();
        for space in plans[sheet].spaces(area_w) {
            let fits = |height: f64| height <= space.3 || empty;
            let (piece, height) = match notes_done {
                0 => {
                    let height = |end: usize| {
                        render::findings_panel(&findings[start..end], 0.0, 0.0, space.2, marker_w).1
                    };
                    let mut end = (start + 1).min(findings.len());
                    if !fits(height(end)) {
                        continue;
                    }
                    while end < findings.len() && height(end + 1) <= space.3 {
                        end += 1;
                    }
                    (Piece::Findings(start..end, space.2), height(end))
                }
                1 => (
                    Piece::Legend(space.2),
                    render::legend(0.0, 0.0, space.2, marker_w, true).1,
                ),
                _ => (
                    Piece::Cautions(space.2),
                    render::cautions(&content.cautions, 0.0, 0.0, space.2).1,
                ),
            };
            if !fits(height) {
                continue;
            }
            if let Piece::Findings(range, _) = &piece {
                start = range.end;
                if start >= findings.len() {
                    notes_done += 1;
                }
            } else {
                notes_done += 1;
            }
            plans[sheet].take(space, piece, height);
            placed = true;
            break;
        }
        if !placed {
            sheet += 1;
        }
    }
    let count = plans.len();
    let mut svgs = Vec::with_capacity(count);
    for (sheet, plan) in plans.iter().enumerate() {
        let mut body = Group::new()
            .set("class", "sheet")
            .set("data-sheet", sheet + 1)
            .set("font-family", text::FONT_FAMILY);
        let mut top = margin;
        if sheet == 0 {
            let (title, bottom) = render::title_block(content, margin, top, area_w);
            body = body.add(title);
            top = bottom + MARGIN;
        } else {
            body = body.add(header(content, sheet, count, margin, top));
            top += HEADER;
        }
        for (piece, x, y) in &plan.items {
            let (x, y) = (margin + x, top + y);
            match piece {
                Piece::Tile(t) => {
                    let tile = tiles[*t];
                    let w = tile.window;
                    let dx = x + tile.gutter[0] - w.x;
                    let dy = y + tile.gutter[2] - w.y;
                    body = body.add(render::drawing(content, geometry, dx, dy, Some(w)));
                    let sheet_at =
                        |px: f64, py: f64| tile_at(px, py).map(|other| tile_sheet[other]);
                    body = body.add(connectors(content, geometry, w, &sheet_at, dx, dy));
                }
                Piece::Findings(range, width) => {
                    let (g, _) = render::findings_panel(
                        &content.findings[range.clone()],
                        x,
                        y,
                        *width,
                        marker_w,
                    );
                    body = body.add(g);
                }
                Piece::Legend(width) => {
                    body = body.add(render::legend(x, y, *width, marker_w, true).0);
                }
                Piece::Cautions(width) => {
                    body = body.add(render::cautions(&content.cautions, x, y, *width).0);
                }
            }
        }
        svgs.push(render::document(
            body,
            size.clone(),
            (0.0, 0.0, sheet_w, sheet_h),
        ));
    }
    Ok(Sheets { page, svgs })
}

/// Which tile holds a point.
fn tile_at(tiles: &[Tile], x: f64, y: f64) -> Option<usize> {
    tiles.iter().position(|t| {
        let w = t.window;
        x >= w.x && x <= w.x + w.width && y >= w.y && y <= w.y + w.height
    })
}

/// Pieces onto sheets in shelves, each on the first sheet with room that
/// holds none of the pieces its lines go on to (so a connector always names
/// another sheet): in drawing order, and tallest first (which packs shelves
/// tighter); the fewer sheets win, drawing order on a tie. Sheet 1 has
/// `first` of height under the title block, the others `room`. Gives the
/// sheets and each tile's sheet.
fn pack(
    geometry: &Geometry,
    tiles: &[Tile],
    first: f64,
    room: f64,
    width: f64,
) -> (Vec<SheetPlan>, Vec<usize>) {
    let neighbours: Vec<Vec<usize>> = tiles
        .iter()
        .map(|t| {
            edge_crossings(geometry, t.window)
                .iter()
                .flatten()
                .filter_map(|c| tile_at(tiles, c.2.0, c.2.1))
                .collect()
        })
        .collect();
    let pack = |order: &[usize]| {
        let mut plans = vec![SheetPlan::new(first)];
        let mut placed: Vec<Option<usize>> = vec![None; tiles.len()];
        for &t in order {
            let (w, h) = tiles[t].size();
            let mut sheet = 0;
            loop {
                if sheet == plans.len() {
                    plans.push(SheetPlan::new(room));
                }
                let clash = neighbours[t].iter().any(|&n| placed[n] == Some(sheet));
                if !clash && plans[sheet].place(Piece::Tile(t), w, h, width) {
                    break;
                }
                sheet += 1;
            }
            placed[t] = Some(sheet);
        }
        let sheets: Vec<usize> = placed.into_iter().map(Option::unwrap_or_default).collect();
        (plans, sheets)
    };
    let in_order: Vec<usize> = (0..tiles.len()).collect();
    let mut tallest: Vec<usize> = in_order.clone();
    tallest.sort_by(|&a, &b| tiles[b].size().1.total_cmp(&tiles[a].size().1));
    let (plans, sheets) = pack(&in_order);
    let (other_plans, other_sheets) = pack(&tallest);
    if other_plans.len() < plans.len() {
        (other_plans, other_sheets)
    } else {
        (plans, sheets)
    }
}

/// Narrowest space beside the drawing a note panel goes in.
const NOTE_WIDTH: f64 = 360.0;

/// Space between pieces that share a sheet.
const GAP: f64 = 12.0;

/// What goes on one sheet, packed in shelves: each shelf as tall as its
/// tallest piece, pieces side by side in it, the next shelf below.
struct SheetPlan {
    room: f64,
    /// Top, height and used width of each shelf.
    shelves: Vec<(f64, f64, f64)>,
    /// Each piece with its place, relative to the sheet's content corner.
    items: Vec<(Piece, f64, f64)>,
}

impl SheetPlan {
    fn new(room: f64) -> SheetPlan {
        SheetPlan {
            room,
            shelves: Vec::new(),
            items: Vec::new(),
        }
    }

    /// Places a piece of `w` × `h` beside the last shelf's or on a new
    /// shelf under it, or hands it back when the sheet has no room.
    fn try_place(&mut self, piece: Piece, w: f64, h: f64, width: f64) -> Result<(), Piece> {
        if let Some(last) = self.shelves.last_mut()
            && last.2 + GAP + w <= width
            && last.0 + h <= self.room
        {
            let x = last.2 + GAP;
            last.2 = x + w;
            last.1 = last.1.max(h);
            self.items.push((piece, x, last.0));
            return Ok(());
        }
        let y = self.shelves.last().map_or(0.0, |s| s.0 + s.1 + GAP);
        if w <= width && y + h <= self.room {
            self.shelves.push((y, h, w));
            self.items.push((piece, 0.0, y));
            return Ok(());
        }
        Err(piece)
    }

    fn place(&mut self, piece: Piece, w: f64, h: f64, width: f64) -> bool {
        self.try_place(piece, w, h, width).is_ok()
    }

    /// Free spaces for a note (left, top, width, height): beside the last
    /// shelf, down to the foot of the sheet, when at least [`NOTE_WIDTH`]
    /// wide; and under it, full width.
    fn spaces(&self, width: f64) -> Vec<(f64, f64, f64, f64)> {
        let mut out = Vec::new();
        if let Some(last) = self.shelves.last() {
            let x = last.2 + GAP;
            if width - x >= NOTE_WIDTH {
                out.push((x, last.0, width - x, self.room - last.0));
            }
        }
        let y = self.shelves.last().map_or(0.0, |s| s.0 + s.1 + GAP);
        if self.room - y > 0.0 {
            out.push((0.0, y, width, self.room - y));
        }
        out
    }

    /// Puts a note of height `h` at the top of `space`, which fills the
    /// space's width: nothing more goes beside it.
    fn take(&mut self, space: (f64, f64, f64, f64), piece: Piece, h: f64) {
        let (x, y, w, _) = space;
        match self.shelves.last_mut() {
            Some(last) if last.0 == y => {
                last.2 = x + w;
                last.1 = last.1.max(h);
            }
            _ => self.shelves.push((y, h, x + w)),
        }
        self.items.push((piece, x, y));
    }
}

/// The off-page connectors of one piece: every line its window cuts, each
/// flag naming the sheet `sheet_at` gives for the point beyond the cut.
fn connectors(
    content: &Content,
    geometry: &Geometry,
    w: Rect,
    sheet_at: &dyn Fn(f64, f64) -> Option<usize>,
    dx: f64,
    dy: f64,
) -> Group {
    let (xa, xb, ya, yb) = (w.x, w.x + w.width, w.y, w.y + w.height);
    let mut edges: [Vec<Crossing>; 4] = Default::default();
    for (side, list) in edge_crossings(geometry, w).into_iter().enumerate() {
        for (at, wire, beyond) in list {
            if let Some(sheet) = sheet_at(beyond.0, beyond.1) {
                edges[side].push(Crossing {
                    at,
                    name: text::clean(&content.wires[wire].name),
                    kind: content.wires[wire].kind,
                    sheet,
                });
            }
        }
    }
    let [mut left, mut right, mut up, mut down] = edges;
    let beside: Vec<f64> = left.iter().chain(&right).map(|c| c.at).collect();
    let (over, under) = overhang(beside, ya, yb);
    Group::new()
        .add(flags(&mut left, xa, -1.0, dx, dy))
        .add(flags(&mut right, xb, 1.0, dx, dy))
        .add(stacked_flags(&mut up, ya, -1.0, over, (dx, dy)))
        .add(stacked_flags(&mut down, yb, 1.0, under, (dx, dy)))
}

/// The page for a plan when none is asked for: the smallest (either way
/// round) whose sheets hold the whole drawing uncut; when none does, the one
/// that needs the fewest sheets (the smaller paper on a tie).
pub(super) fn best(
    content: &Content,
    geometry: &Geometry,
    marker_w: f64,
) -> Result<Sheets, PageError> {
    let pages: Vec<Page> = Paper::ALL
        .iter()
        .flat_map(|&paper| [false, true].map(|landscape| Page { paper, landscape }))
        .collect();
    for &page in &pages {
        let (w, h) = content_area(page);
        if geometry.width <= w && geometry.height <= first_room(content, w, h) {
            return sheets(content, geometry, marker_w, page);
        }
    }
    let mut best: Option<Sheets> = None;
    let mut last_error = None;
    for &page in &pages {
        match sheets(content, geometry, marker_w, page) {
            Ok(s) => {
                if best.as_ref().is_none_or(|b| s.svgs.len() < b.svgs.len()) {
                    best = Some(s);
                }
            }
            Err(e) => last_error = Some(e),
        }
    }
    match (best, last_error) {
        (Some(s), _) => Ok(s),
        (None, Some(e)) => Err(e),
        (None, None) => sheets(content, geometry, marker_w, pages[0]),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn paper_sizes_are_the_standard_ones() {
        // ISO 216: A4 is 210 × 297 mm and A3 twice its area; ANSI Letter is
        // 8.5 × 11 in and Tabloid 11 × 17 in (25.4 mm to the inch).
        assert_eq!(Paper::A4.millimetres(), (210.0, 297.0));
        let (w, h) = Paper::A3.millimetres();
        assert!((w * h - 2.0 * 210.0 * 297.0).abs() < 1.0);
        assert!((Paper::Letter.millimetres().0 - 8.5 * 25.4).abs() < 1e-9);
        assert!((Paper::Tabloid.millimetres().1 - 17.0 * 25.4).abs() < 1e-9);
        let a4 = Page {
            paper: Paper::A4,
            landscape: true,
        };
        assert_eq!(a4.millimetres(), (297.0, 210.0));
    }

    #[test]
    fn flags_under_a_cut_share_rows_without_crossing_a_line() {
        // Five lines 10 apart: the outermost pair takes row 0 (40 reading
        // right, 0 reading left), the next pair row 1, the middle one row 2.
        let rows = stack_rows(&[20.0, 0.0, 40.0, 10.0, 30.0]);
        assert_eq!(
            rows,
            vec![(2, true), (0, false), (0, true), (1, false), (1, true)]
        );
        assert_eq!(stack_row_count(5), 3);
        // Any bundle: no flag spans the x of a line that runs on to a
        // further row (each flag is 60 long, lines 6 apart).
        for count in 1..=9 {
            let ats: Vec<f64> = (0..count).map(|i| i as f64 * 6.0).collect();
            let rows = stack_rows(&ats);
            assert_eq!(
                rows.iter().map(|r| r.0).max(),
                Some(stack_row_count(count) - 1)
            );
            for (i, &(row, right)) in rows.iter().enumerate() {
                let (a, b) = if right {
                    (ats[i] + 4.0, ats[i] + 64.0)
                } else {
                    (ats[i] - 64.0, ats[i] - 4.0)
                };
                for (j, &(other, _)) in rows.iter().enumerate() {
                    assert!(
                        other <= row || ats[j] < a || ats[j] > b,
                        "{count} lines: the flag of line {i} on row {row} covers line {j} going on to row {other}"
                    );
                }
            }
        }
    }

    #[test]
    fn a_cut_steps_back_out_of_what_it_would_split() {
        // A box from 90 to 120: a cut wanted at 100 moves to 90; one wanted at
        // 130 stays.
        assert_eq!(cut_below(&[(90.0, 120.0)], 0.0, 100.0), Ok(90.0));
        assert_eq!(cut_below(&[(90.0, 120.0)], 0.0, 130.0), Ok(130.0));
        // Overlapping blocks chain: 60–95 and 90–120 push it to 60.
        assert_eq!(
            cut_below(&[(60.0, 95.0), (90.0, 120.0)], 0.0, 100.0),
            Ok(60.0)
        );
        // Nothing left above the floor: the block is named.
        assert_eq!(cut_below(&[(5.0, 120.0)], 10.0, 100.0), Err((5.0, 120.0)));
    }
}
