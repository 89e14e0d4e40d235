//! The diagram on paper: fitted to a page so no text prints smaller than
//! 7 pt, and when the drawing is too big for one sheet at that size, cut
//! into tiles between boxes, each line that leaves a tile ending on an
//! off-page connector that names its net and the sheet it continues on.
//!
//! Sheet 1 carries the title block and the first tile; every other sheet a
//! header line; the findings, legend and cautions follow on their own sheets.
//! Beside a vertical cut the flags stand in a fixed gutter, spread apart
//! with jogged leads; under or over a horizontal cut they stack one per row,
//! so that gutter is only as deep as the lines the cut crosses.
//! The scale is the same on every sheet, so tiles join edge to edge. Cuts run
//! only where no box, tag or label is, never along a line. Not for what is
//! drawn: `render` draws each piece, this module says where.

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
    /// All sheets in one SVG document, one under the other.
    pub combined: String,
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
/// Room beside a cut for its off-page connectors.
const GUTTER: f64 =
    8.0 + LANE * MAX_LANES as f64 + (FLAG_NAME_CELLS + 5) as f64 * 0.62 * FLAG_TEXT + 8.0;
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
    // Intervals sorted by start; walk down while the cut falls in one.
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

/// A row's top and bottom, and the gutters kept above and below it.
type Row = (f64, f64, f64, f64);
/// A strip's left and right and its rows.
type Strip = (f64, f64, Vec<Row>);

/// Room under (or over) a cut for `count` flags stacked one per row.
fn stack_gutter(count: usize) -> f64 {
    6.0 + count as f64 * (FLAG_HEIGHT + 2.0)
}

#[derive(Clone, Copy, Debug)]
struct Tile {
    window: Rect,
    /// Room kept for off-page connectors on the left, right, top and bottom.
    gutter: [f64; 4],
}

/// Cuts the drawing into tiles: strips across, then rows in each strip.
/// `first_height` is the room for the tile that shares sheet 1 with the
/// title block.
fn tiles(
    geometry: &Geometry,
    width: f64,
    height: f64,
    first_height: f64,
) -> Result<Vec<Tile>, (String, f64, f64)> {
    let blocks = blocks(geometry);
    let segments: Vec<[f64; 4]> = geometry
        .wires
        .iter()
        .flat_map(|w| w.segments.iter().copied())
        .collect();

    let mut x_blocks: Vec<(f64, f64)> = blocks.iter().map(|b| (b.x0 - 2.0, b.x1 + 2.0)).collect();
    for s in &segments {
        if s[0] == s[2] {
            x_blocks.push((s[0] - LINE_CLEARANCE, s[0] + LINE_CLEARANCE));
        }
    }
    // Rows of one strip: cuts across it where no box is, or the run of
    // boxes that leaves no room for one.
    let rows_of = |strip: usize, xa: f64, xb: f64| -> Result<Vec<Row>, (f64, f64)> {
        let overlaps = |b: &Bounds| b.x1 > xa && b.x0 < xb;
        let mut y_blocks: Vec<(f64, f64)> = blocks
            .iter()
            .filter(|b| overlaps(b))
            .map(|b| (b.y0 - 2.0, b.y1 + 2.0))
            .collect();
        for s in &segments {
            if s[1] == s[3] && s[0].max(s[2]) > xa && s[0].min(s[2]) < xb {
                y_blocks.push((s[1] - LINE_CLEARANCE, s[1] + LINE_CLEARANCE));
            }
        }
        // The strip starts where its first box, tag or line does.
        let lines_top = segments
            .iter()
            .filter(|s| s[0].max(s[2]) >= xa && s[0].min(s[2]) <= xb)
            .map(|s| s[1].min(s[3]))
            .fold(f64::INFINITY, f64::min);
        let first_top = y_blocks.iter().map(|b| b.0).fold(lines_top, f64::min);
        let mut top = if first_top.is_finite() {
            first_top.max(0.0)
        } else {
            0.0
        };
        // Lines a cut at `y` crosses in this strip: each needs a flag row.
        let crossing = |y: f64| {
            segments
                .iter()
                .filter(|s| s[0] == s[2] && s[0] >= xa && s[0] <= xb)
                .filter(|s| s[1].min(s[3]) < y && s[1].max(s[3]) > y)
                .count()
        };
        let mut rows: Vec<Row> = Vec::new();
        let mut top_gutter = 0.0;
        loop {
            let first = rows.is_empty();
            let tall = if strip == 0 && first {
                first_height
            } else {
                height
            };
            let room = tall - top_gutter;
            if geometry.height - top <= room {
                rows.push((top, geometry.height, top_gutter, 0.0));
                return Ok(rows);
            }
            // The gutter below grows with the lines the cut crosses; try
            // again higher up until the cut leaves room for them.
            let mut bottom_gutter = stack_gutter(1);
            loop {
                let limit = top + room - bottom_gutter;
                match cut_below(&y_blocks, top + 1.0, limit) {
                    Ok(cut) if cut > top + 1.0 => {
                        let need = stack_gutter(crossing(cut));
                        if need <= bottom_gutter {
                            rows.push((top, cut, top_gutter, need));
                            top = cut;
                            top_gutter = need;
                            break;
                        }
                        bottom_gutter = need;
                    }
                    Ok(_) => return Err((top, limit)),
                    Err(run) => return Err(run),
                }
            }
        }
    };

    let mut strips: Vec<Strip> = Vec::new();
    let mut start = 0.0;
    while start < geometry.width {
        let first = strips.is_empty();
        let room = width - if first { 0.0 } else { GUTTER };
        let mut limit = if geometry.width - start <= room {
            geometry.width
        } else {
            start + room - GUTTER
        };
        // Narrower strips leave more room to cut across: step back one gap
        // at a time until the rows can be cut.
        let mut failure = None;
        loop {
            let end = if limit >= geometry.width {
                Ok(geometry.width)
            } else {
                cut_below(&x_blocks, start + 1.0, limit)
            };
            let end = match end {
                Ok(end) if end > start + 1.0 => end,
                Ok(_) | Err(_) => {
                    let (what, w, h) = match failure {
                        Some((a, b)) => ("a run of boxes one above another", 0.0, b - a),
                        None => ("a part box with its labels", limit - start, 0.0),
                    };
                    return Err((what.to_string(), w + 2.0 * GUTTER, h + 2.0 * GUTTER));
                }
            };
            match rows_of(strips.len(), start, end) {
                Ok(rows) => {
                    strips.push((start, end, rows));
                    start = end;
                    break;
                }
                Err(run) => {
                    failure = Some(run);
                    limit = end - 1.0;
                }
            }
        }
    }

    let mut out = Vec::new();
    let strip_count = strips.len();
    for (strip, (xa, xb, rows)) in strips.iter().enumerate() {
        for &(ya, yb, above, below) in rows {
            out.push(Tile {
                window: Rect {
                    x: *xa,
                    y: ya,
                    width: xb - xa,
                    height: yb - ya,
                },
                gutter: [
                    if strip > 0 { GUTTER } else { 0.0 },
                    if strip + 1 < strip_count { GUTTER } else { 0.0 },
                    above,
                    below,
                ],
            });
        }
    }
    Ok(out)
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

/// Flags for the lines crossing a horizontal cut at `edge`, one per row
/// going away from it (`outward` +1 down, −1 up): the rightmost line takes
/// the nearest row and each flag reads rightwards from its line, so a line
/// running on to a further row always passes left of the flags before it.
fn stacked_flags(crossings: &mut [Crossing], edge: f64, outward: f64, dx: f64, dy: f64) -> Group {
    crossings.sort_by(|a, b| b.at.total_cmp(&a.at).then(a.name.cmp(&b.name)));
    let mut group = Group::new().set("class", "off-page-connectors");
    for (row, c) in crossings.iter().enumerate() {
        let mid = edge + outward * (6.0 + row as f64 * (FLAG_HEIGHT + 2.0) + FLAG_HEIGHT / 2.0);
        let words = flag_words(c);
        let length = text::width(&words, FLAG_TEXT) + 6.0;
        let lead = [[c.at, edge, c.at, mid], [c.at, mid, c.at + 4.0, mid]];
        let d = render::segments_path(&lead, dx, dy);
        group = group.add(render::connection(&d, c.kind, &c.name));
        let (rx, ry) = (c.at + 4.0, mid - FLAG_HEIGHT / 2.0);
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
    Findings(std::ops::Range<usize>),
    Legend,
    Cautions,
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
            combined: svg.clone(),
            svgs: vec![svg],
        });
    }

    let first_height = first_room(content, area_w, area_h);
    let tiles =
        tiles(geometry, area_w, area_h - HEADER, first_height).map_err(|(what, w, h)| {
            let needed = (
                (w.max(area_w) * SCALE) / PT_PER_MM + 2.0 * MARGIN_MM,
                (h.max(area_h) * SCALE) / PT_PER_MM + 2.0 * MARGIN_MM,
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

    // A tile with nothing in it gets no sheet.
    let tiles: Vec<Tile> = tiles
        .into_iter()
        .filter(|t| {
            let w = t.window;
            let inside = |r: Rect| {
                let (cx, cy) = (r.x + r.width / 2.0, r.y + r.height / 2.0);
                cx >= w.x && cx <= w.x + w.width && cy >= w.y && cy <= w.y + w.height
            };
            geometry.parts.iter().any(|p| inside(p.rect))
                || geometry.tags.iter().any(|t| inside(tag_bounds(t)))
                || geometry
                    .wires
                    .iter()
                    .flat_map(|wire| &wire.segments)
                    .any(|s| render::clip(*s, w).is_some_and(|c| c[0] != c[2] || c[1] != c[3]))
        })
        .collect();

    // Findings, legend and cautions fill the sheets after the drawing.
    let mut pieces: Vec<Vec<Piece>> = (0..tiles.len()).map(|t| vec![Piece::Tile(t)]).collect();
    let panel_room = area_h - HEADER;
    let mut notes: Vec<(Piece, f64)> = Vec::new();
    let findings = &content.findings;
    let mut start = 0;
    loop {
        let height = |end: usize| {
            render::findings_panel(&findings[start..end], 0.0, 0.0, area_w, marker_w).1
        };
        let mut end = (start + 1).min(findings.len());
        while end < findings.len() && height(end + 1) <= panel_room {
            end += 1;
        }
        notes.push((Piece::Findings(start..end), height(end)));
        if end >= findings.len() {
            break;
        }
        start = end;
    }
    let (_, legend_bottom) = render::legend(0.0, 0.0, area_w, marker_w, true);
    notes.push((Piece::Legend, legend_bottom));
    let (_, cautions_bottom) = render::cautions(&content.cautions, 0.0, 0.0, area_w);
    notes.push((Piece::Cautions, cautions_bottom));
    let mut used = f64::INFINITY;
    for (piece, height) in notes {
        if used + height > panel_room {
            pieces.push(Vec::new());
            used = 0.0;
        }
        if let Some(sheet) = pieces.last_mut() {
            sheet.push(piece);
        }
        used += height + MARGIN;
    }

    // Which sheet holds each tile, for the off-page connectors.
    let tile_at = |x: f64, y: f64| {
        tiles.iter().position(|t| {
            let w = t.window;
            x >= w.x && x <= w.x + w.width && y >= w.y && y <= w.y + w.height
        })
    };
    let count = pieces.len();
    let mut svgs = Vec::with_capacity(count);
    let mut bodies = Vec::with_capacity(count);
    for (sheet, list) in pieces.iter().enumerate() {
        let mut body = Group::new()
            .set("class", "sheet")
            .set("data-sheet", sheet + 1)
            .set("font-family", text::FONT_FAMILY);
        let mut y = margin;
        if sheet == 0 {
            let (title, bottom) = render::title_block(content, margin, y, area_w);
            body = body.add(title);
            y = bottom + MARGIN;
        } else {
            body = body.add(header(content, sheet, count, margin, y));
            y += HEADER;
        }
        for piece in list {
            match piece {
                Piece::Tile(t) => {
                    let tile = tiles[*t];
                    let w = tile.window;
                    let left = tile.gutter[0];
                    let top = tile.gutter[2];
                    let dx = margin + left - w.x;
                    let dy = y + top - w.y;
                    body = body.add(render::drawing(content, geometry, dx, dy, Some(w)));
                    body = body.add(connectors(content, geometry, &tile, &tile_at, dx, dy));
                }
                Piece::Findings(range) => {
                    let (g, bottom) = render::findings_panel(
                        &content.findings[range.clone()],
                        margin,
                        y,
                        area_w,
                        marker_w,
                    );
                    body = body.add(g);
                    y = bottom + MARGIN;
                }
                Piece::Legend => {
                    let (g, bottom) = render::legend(margin, y, area_w, marker_w, true);
                    body = body.add(g);
                    y = bottom + MARGIN;
                }
                Piece::Cautions => {
                    let (g, bottom) = render::cautions(&content.cautions, margin, y, area_w);
                    body = body.add(g);
                    y = bottom + MARGIN;
                }
            }
        }
        svgs.push(render::document(
            body.clone(),
            size.clone(),
            (0.0, 0.0, sheet_w, sheet_h),
        ));
        bodies.push(body);
    }
    // One document: the sheets one under the other, each on its own paper.
    let mut stack = Group::new().set("class", "sheets");
    for (i, body) in bodies.into_iter().enumerate() {
        let top = i as f64 * sheet_h;
        stack = stack
            .add(
                Rectangle::new()
                    .set("class", "sheet-edge")
                    .set("x", 0)
                    .set("y", num(top))
                    .set("width", num(sheet_w))
                    .set("height", num(sheet_h))
                    .set("fill", super::style::PAPER)
                    .set("stroke", super::style::RULE_LINE)
                    .set("stroke-width", "1"),
            )
            .add(
                Group::new()
                    .set("transform", format!("translate(0 {})", num(top)))
                    .add(body),
            );
    }
    let (mw, mh) = page.millimetres();
    let combined = render::document(
        stack,
        (
            format!("{}mm", num(mw)),
            format!("{}mm", num(mh * count as f64)),
        ),
        (0.0, 0.0, sheet_w, sheet_h * count as f64),
    );
    Ok(Sheets {
        page,
        svgs,
        combined,
    })
}

/// The off-page connectors of one tile: every line its window cuts.
fn connectors(
    content: &Content,
    geometry: &Geometry,
    tile: &Tile,
    tile_at: &dyn Fn(f64, f64) -> Option<usize>,
    dx: f64,
    dy: f64,
) -> Group {
    let w = tile.window;
    let (xa, xb, ya, yb) = (w.x, w.x + w.width, w.y, w.y + w.height);
    let mut edges: [Vec<Crossing>; 4] = Default::default();
    for (wire, placed) in content.wires.iter().zip(&geometry.wires) {
        let name = text::clean(&wire.name);
        for &[x1, y1, x2, y2] in &placed.segments {
            let (lx, hx, ly, hy) = (x1.min(x2), x1.max(x2), y1.min(y2), y1.max(y2));
            let mut add = |edge: usize, at: f64, beyond: (f64, f64)| {
                if let Some(sheet) = tile_at(beyond.0, beyond.1) {
                    edges[edge].push(Crossing {
                        at,
                        name: name.clone(),
                        kind: wire.kind,
                        sheet,
                    });
                }
            };
            if ly == hy && ly >= ya && ly <= yb {
                if lx < xa && hx > xa {
                    add(0, ly, (xa - 0.5, ly));
                }
                if lx < xb && hx > xb {
                    add(1, ly, (xb + 0.5, ly));
                }
            }
            if lx == hx && lx >= xa && lx <= xb {
                if ly < ya && hy > ya {
                    add(2, lx, (lx, ya - 0.5));
                }
                if ly < yb && hy > yb {
                    add(3, lx, (lx, yb + 0.5));
                }
            }
        }
    }
    let [mut left, mut right, mut up, mut down] = edges;
    Group::new()
        .add(flags(&mut left, xa, -1.0, dx, dy))
        .add(flags(&mut right, xb, 1.0, dx, dy))
        .add(stacked_flags(&mut up, ya, -1.0, dx, dy))
        .add(stacked_flags(&mut down, yb, 1.0, dx, dy))
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
