//! Writes the placed diagram as SVG with the `svg` crate: title block, the
//! drawing, the findings panel, the legend and the caution footer, stacked
//! top to bottom so none can overlap another.
//!
//! Every element that carries geometry is written in absolute coordinates
//! (no transforms), and boxes, connections and labels carry a `class`, so
//! tests can check the picture geometrically. User text only ever reaches the
//! file as a text node or an attribute value, which the `svg` crate escapes,
//! after `text::clean` has dropped what XML cannot hold. Not for deciding
//! where things go: that is `layout`.

use super::content::{Content, Listed, Marker, WireKind};
use super::layout::{
    Align, GROUND_SYMBOL, Geometry, Label, MARKER_HEIGHT, MARKER_TEXT_SIZE, PlacedMarker, Rect,
    Tone,
};
use super::style::{self, LineStyle, MarkerShape, Stage};
use super::text;
use crate::rules::Severity;
use svg::Document;
use svg::node::element::{Circle, Group, Path, Polygon, Rectangle, Text, Title};

pub(super) const MARGIN: f64 = 24.0;
pub(super) const MIN_WIDTH: f64 = 880.0;
pub(super) const PANEL_PAD: f64 = 10.0;
pub(super) const TITLE_SIZE: f64 = 16.0;
pub(super) const HEADING_SIZE: f64 = 12.0;
pub(super) const BODY_SIZE: f64 = 10.0;
pub(super) const LINE_STEP: f64 = 14.0;

/// A number as the file writes it: at most two decimals, no trailing zeros.
pub(super) fn num(v: f64) -> String {
    let hundredths = (v * 100.0).round();
    // Below 10^12 hundredths the nearest double to h/100 prints with two
    // decimals as h/100 exactly, so the digits are the integer's: written
    // straight from it, without the float formatter's exact mode (slow on
    // some values, and a drawing writes millions of numbers).
    if hundredths.abs() < 1e12 {
        let h = hundredths as i64;
        let sign = if h < 0 { "-" } else { "" };
        let (whole, cents) = (h.unsigned_abs() / 100, h.unsigned_abs() % 100);
        return match cents {
            0 => format!("{sign}{whole}"),
            c if c % 10 == 0 => format!("{sign}{whole}.{}", c / 10),
            c => format!("{sign}{whole}.{c:02}"),
        };
    }
    let rounded = hundredths / 100.0;
    let text = format!("{rounded:.2}");
    let text = text.trim_end_matches('0').trim_end_matches('.');
    text.to_string()
}

pub(super) fn label(l: &Label, class: &str) -> Text {
    let anchor = match l.align {
        Align::Start => "start",
        Align::Middle => "middle",
        Align::End => "end",
    };
    let fill = match l.tone {
        Tone::Strong => style::INK,
        Tone::Soft => style::INK_SOFT,
        Tone::Alarm => style::FLOATING,
    };
    let mut t = Text::new(l.text.clone())
        .set("class", class)
        .set("x", num(l.x))
        .set("y", num(l.y))
        .set("font-size", num(l.size))
        .set("text-anchor", anchor)
        .set("fill", fill);
    if l.bold {
        t = t.set("font-weight", "bold");
    }
    t
}

pub(super) fn plain(x: f64, y: f64, size: f64, content: &str, bold: bool) -> Label {
    Label {
        x,
        y,
        size,
        align: Align::Start,
        text: content.to_string(),
        bold,
        tone: Tone::Strong,
    }
}

pub(super) fn stroked(path: Path, line: &LineStyle, width: f64) -> Path {
    let mut path = path
        .set("fill", "none")
        .set("stroke", line.colour)
        .set("stroke-width", num(width))
        .set("stroke-linecap", "butt");
    if let Some(dash) = line.dash {
        path = path.set("stroke-dasharray", dash);
    }
    path
}

pub(super) fn line_style(kind: WireKind) -> LineStyle {
    match kind {
        WireKind::Rail => style::RAIL,
        WireKind::Bundle => style::BUNDLE,
        WireKind::Ground => style::GROUND,
        WireKind::MotorLead => style::MOTOR_LEAD,
        WireKind::Signal => style::SIGNAL,
        WireKind::Cable => style::CABLE,
    }
}

pub(super) fn kind_class(kind: WireKind) -> &'static str {
    match kind {
        WireKind::Rail => "rail",
        WireKind::Bundle => "bundle",
        WireKind::Ground => "ground-lead",
        WireKind::MotorLead => "motor-lead",
        WireKind::Signal => "signal",
        WireKind::Cable => "cable",
    }
}

/// A connection drawn along `d`: one stroke, or for a cable a dark band with
/// a paper stripe down its middle.
pub(super) fn connection(d: &str, kind: WireKind, name: &str) -> Group {
    let line = line_style(kind);
    let class = format!("wire {}", kind_class(kind));
    let mut group = Group::new().add(stroked(
        Path::new()
            .set("class", class)
            .set("data-net", name)
            .set("d", d),
        &line,
        line.width,
    ));
    if let Some(core) = line.core {
        let stripe = LineStyle {
            colour: style::PAPER,
            ..line
        };
        group = group.add(stroked(
            Path::new().set("class", "wire-core").set("d", d),
            &stripe,
            core,
        ));
    }
    group
}

pub(super) fn segments_path(segments: &[[f64; 4]], dx: f64, dy: f64) -> String {
    let mut d = String::new();
    for [x1, y1, x2, y2] in segments {
        if !d.is_empty() {
            d.push(' ');
        }
        d.push_str(&format!(
            "M{} {} L{} {}",
            num(x1 + dx),
            num(y1 + dy),
            num(x2 + dx),
            num(y2 + dy)
        ));
    }
    d
}

fn severity_class(severity: Severity) -> &'static str {
    severity.name()
}

pub(super) fn marker(m: &PlacedMarker) -> Group {
    let look = style::marker(m.marker.severity);
    let (x, y, w, h) = (m.x, m.y, m.width, MARKER_HEIGHT);
    let shape: Box<dyn svg::Node> = match look.shape {
        MarkerShape::Disc => Box::new(
            Rectangle::new()
                .set("x", num(x - w / 2.0))
                .set("y", num(y - h / 2.0))
                .set("width", num(w))
                .set("height", num(h))
                .set("rx", num(h / 2.0)),
        ),
        MarkerShape::Hexagon => {
            let points = [
                (x - w / 2.0, y),
                (x - w / 2.0 + 4.0, y - h / 2.0),
                (x + w / 2.0 - 4.0, y - h / 2.0),
                (x + w / 2.0, y),
                (x + w / 2.0 - 4.0, y + h / 2.0),
                (x - w / 2.0 + 4.0, y + h / 2.0),
            ]
            .iter()
            .map(|(px, py)| format!("{},{}", num(*px), num(*py)))
            .collect::<Vec<_>>()
            .join(" ");
            Box::new(Polygon::new().set("points", points))
        }
        MarkerShape::Square => Box::new(
            Rectangle::new()
                .set("x", num(x - w / 2.0 + 0.5))
                .set("y", num(y - h / 2.0 + 0.5))
                .set("width", num(w - 1.0))
                .set("height", num(h - 1.0)),
        ),
    };
    let mut group = Group::new()
        .set(
            "class",
            format!("marker {}", severity_class(m.marker.severity)),
        )
        .set("data-finding", m.marker.number)
        .set("fill", look.fill)
        .set("stroke", look.outline)
        .set("stroke-width", "1.2");
    group = group.add(shape);
    group.add(
        Text::new(m.marker.number.to_string())
            .set("class", "marker-number")
            .set("x", num(x))
            .set("y", num(y + 3.0))
            .set("font-size", num(MARKER_TEXT_SIZE))
            .set("text-anchor", "middle")
            .set("fill", look.number)
            .set("stroke", "none")
            .set("font-weight", "bold"),
    )
}

/// A ground symbol hanging from (x, y): a stem and three shortening bars; a
/// floating ground is a dashed stem ending in an open circle with a cross.
fn ground_symbol(x: f64, y: f64, reaches_battery: bool) -> Path {
    if reaches_battery {
        let d = format!(
            "M{x} {y} L{x} {y5} M{a1} {y5} L{b1} {y5} M{a2} {y8} L{b2} {y8} M{a3} {y11} L{b3} {y11}",
            x = num(x),
            y = num(y),
            y5 = num(y + 5.0),
            y8 = num(y + 8.5),
            y11 = num(y + 12.0),
            a1 = num(x - 6.0),
            b1 = num(x + 6.0),
            a2 = num(x - 4.0),
            b2 = num(x + 4.0),
            a3 = num(x - 1.5),
            b3 = num(x + 1.5),
        );
        Path::new()
            .set("class", "ground-symbol")
            .set("d", d)
            .set("fill", "none")
            .set("stroke", style::INK)
            .set("stroke-width", "1.4")
    } else {
        let (cx, cy, r) = (x, y + GROUND_SYMBOL - 5.0, 4.5);
        let k = r * 0.7;
        let d = format!(
            "M{x} {y} L{x} {top} M{cx} {top} A{r} {r} 0 1 0 {cx} {bottom} A{r} {r} 0 1 0 {cx} {top} M{a} {b} L{c} {e} M{a} {e} L{c} {b}",
            x = num(x),
            y = num(y),
            top = num(cy - r),
            bottom = num(cy + r),
            cx = num(cx),
            r = num(r),
            a = num(cx - k),
            b = num(cy - k),
            c = num(cx + k),
            e = num(cy + k),
        );
        Path::new()
            .set("class", "floating-ground")
            .set("d", d)
            .set("fill", "none")
            .set("stroke", style::FLOATING)
            .set("stroke-width", "1.6")
    }
}

/// Stacks the panels and writes the document.
pub(crate) fn write(content: &Content, geometry: &Geometry, marker_w: f64) -> String {
    let (body, total_width, total_height) = compose(content, geometry, marker_w, MIN_WIDTH);
    let size = (num(total_width), num(total_height));
    document(body, size, (0.0, 0.0, total_width, total_height))
}

/// The whole diagram on one sheet: title block, drawing, findings, legend
/// and cautions stacked, at least `min_width` wide inside the margins.
/// Returns the body and its width and height.
pub(super) fn compose(
    content: &Content,
    geometry: &Geometry,
    marker_w: f64,
    min_width: f64,
) -> (Group, f64, f64) {
    let width = geometry.width.max(min_width);
    let inner = width;
    let mut body = Group::new().set("font-family", text::FONT_FAMILY);
    let mut y = MARGIN;

    // Title block.
    let (title, bottom) = title_block(content, MARGIN, y, inner);
    body = body.add(title);
    y = (bottom + MARGIN).ceil();
    let origin_x = MARGIN + (inner - geometry.width) / 2.0;
    let origin_y = (y / 16.0).ceil() * 16.0;
    body = body.add(drawing(content, geometry, origin_x, origin_y, None));
    y = origin_y + geometry.height + MARGIN;

    let (panel, bottom) = findings_panel(&content.findings, MARGIN, y, inner, marker_w);
    body = body.add(panel);
    y = bottom + MARGIN;
    let (legend, bottom) = legend(MARGIN, y, inner, marker_w, false);
    body = body.add(legend);
    y = bottom + MARGIN;
    let (footer, bottom) = cautions(&content.cautions, MARGIN, y, inner);
    body = body.add(footer);
    y = bottom + MARGIN;
    (body, width + 2.0 * MARGIN, y.ceil())
}

/// An SVG document of `size` (width and height attributes as written) showing
/// `view` (x, y, width, height) of `body` on white paper.
pub(super) fn document(body: Group, size: (String, String), view: (f64, f64, f64, f64)) -> String {
    let (x, y, w, h) = view;
    let document = Document::new()
        .set("width", size.0)
        .set("height", size.1)
        .set(
            "viewBox",
            format!("{} {} {} {}", num(x), num(y), num(w), num(h)),
        )
        .add(
            Rectangle::new()
                .set("class", "paper")
                .set("x", num(x))
                .set("y", num(y))
                .set("width", num(w))
                .set("height", num(h))
                .set("fill", style::PAPER),
        )
        .add(body);
    let mut out = document.to_string();
    out.push('\n');
    out
}

/// The part of an axis-parallel segment inside a window, if any.
pub(super) fn clip([x1, y1, x2, y2]: [f64; 4], w: Rect) -> Option<[f64; 4]> {
    let (lx, hx) = (x1.min(x2).max(w.x), x1.max(x2).min(w.x + w.width));
    let (ly, hy) = (y1.min(y2).max(w.y), y1.max(y2).min(w.y + w.height));
    if lx > hx || ly > hy || (lx == hx && ly == hy && (x1 != x2 || y1 != y2)) {
        return None;
    }
    Some([lx, ly, hx, hy])
}

pub(super) fn frame(x: f64, y: f64, width: f64, height: f64, class: &str) -> Rectangle {
    Rectangle::new()
        .set("class", class)
        .set("x", num(x))
        .set("y", num(y))
        .set("width", num(width))
        .set("height", num(height))
        .set("fill", "none")
        .set("stroke", style::RULE_LINE)
        .set("stroke-width", "1")
}

fn cells_for(width: f64, size: f64) -> usize {
    ((width / (text::ADVANCE_EM * size)).floor() as usize).max(8)
}

pub(super) fn title_block(content: &Content, x: f64, top: f64, width: f64) -> (Group, f64) {
    let heading = &content.heading;
    let mut group = Group::new().set("class", "title-block");
    let text_x = x + PANEL_PAD;
    let text_width = width - 2.0 * PANEL_PAD;
    let mut baseline = top + PANEL_PAD;
    let mut lines: Vec<(String, f64, bool)> = Vec::new();
    for line in text::wrap(&heading.name, cells_for(text_width, TITLE_SIZE)) {
        lines.push((line, TITLE_SIZE, true));
    }
    let file = format!(
        "file: {} · railcheck {}",
        heading.file,
        env!("CARGO_PKG_VERSION")
    );
    for line in text::wrap(&file, cells_for(text_width, BODY_SIZE)) {
        lines.push((line, BODY_SIZE, false));
    }
    let record: Vec<String> = [
        heading.revision.as_ref().map(|r| format!("revision {r}")),
        heading.date.as_ref().map(|d| format!("dated {d}")),
        heading.author.as_ref().map(|a| format!("drawn by {a}")),
    ]
    .into_iter()
    .flatten()
    .collect();
    if !record.is_empty() {
        for line in text::wrap(&record.join(" · "), cells_for(text_width, BODY_SIZE)) {
            lines.push((line, BODY_SIZE, false));
        }
    }
    lines.push((heading.summary.clone(), BODY_SIZE, false));
    let note = if heading.solved {
        "Rail tags: voltage from empty to full battery in the typical mode; current typical / peak over all modes; wire size and length."
    } else {
        "The operating point was not solved (a short or a power loop): no voltages or currents are shown."
    };
    for line in text::wrap(note, cells_for(text_width, BODY_SIZE)) {
        lines.push((line, BODY_SIZE, false));
    }
    let mut previous_size = 0.0;
    for (line, size, bold) in lines {
        baseline += if previous_size == 0.0 {
            size
        } else {
            previous_size * text::DESCENT_EM + size * text::ASCENT_EM + 2.0
        };
        previous_size = size;
        group = group.add(label(&plain(text_x, baseline, size, &line, bold), "title"));
    }
    let bottom = baseline + previous_size * text::DESCENT_EM + PANEL_PAD;
    group = group.add(frame(x, top, width, bottom - top, "title-frame"));
    (group, bottom)
}

/// The drawing moved by (dx, dy); with a window, only the boxes and tags
/// inside it and the lines clipped to it.
pub(super) fn drawing(
    content: &Content,
    geometry: &Geometry,
    dx: f64,
    dy: f64,
    window: Option<Rect>,
) -> Group {
    let inside = |r: Rect| {
        window.is_none_or(|w| {
            let (cx, cy) = (r.x + r.width / 2.0, r.y + r.height / 2.0);
            cx >= w.x && cx <= w.x + w.width && cy >= w.y && cy <= w.y + w.height
        })
    };
    let mut wires = Layer::new("wires");
    // Signals under power, cables on top: draw by kind.
    let mut by_kind: Vec<usize> = (0..content.wires.len()).collect();
    by_kind.sort_by_key(|&w| (std::cmp::Reverse(content.wires[w].kind), w));
    for w in by_kind {
        let wire = &content.wires[w];
        let placed = &geometry.wires[w];
        let clipped: Vec<[f64; 4]>;
        let segments = match window {
            Some(win) => {
                clipped = placed
                    .segments
                    .iter()
                    .filter_map(|s| clip(*s, win))
                    .collect();
                &clipped
            }
            None => &placed.segments,
        };
        if segments.is_empty() {
            continue;
        }
        let d = segments_path(segments, dx, dy);
        let name = text::clean(&wire.name);
        let mut group = connection(&d, wire.kind, &name).add(Title::new(name.clone()));
        let line = line_style(wire.kind);
        // A bundle's signals only run together: where they meet is no join.
        let dots: &[(f64, f64)] = if wire.kind == WireKind::Bundle {
            &[]
        } else {
            &placed.dots
        };
        for &(x, y) in dots.iter().filter(|(x, y)| {
            inside(Rect {
                x: *x,
                y: *y,
                width: 0.0,
                height: 0.0,
            })
        }) {
            group = group.add(
                Circle::new()
                    .set("class", "junction")
                    .set("cx", num(x + dx))
                    .set("cy", num(y + dy))
                    .set("r", num(line.width.max(2.0) + 0.6))
                    .set("fill", line.colour),
            );
        }
        wires.push(&group);
    }

    let mut boxes = Layer::new("parts");
    for (part, placed) in content.parts.iter().zip(&geometry.parts) {
        let r = placed.rect;
        if !inside(r) {
            continue;
        }
        let mut rect = Rectangle::new()
            .set("class", "part-box")
            .set("x", num(r.x + dx))
            .set("y", num(r.y + dy))
            .set("width", num(r.width))
            .set("height", num(r.height))
            .set("rx", "3")
            .set("fill", part.stage.tint());
        rect = if part.floating {
            rect.set("stroke", style::FLOATING)
                .set("stroke-width", "2.4")
                .set("stroke-dasharray", "6 3")
        } else {
            rect.set("stroke", style::INK).set("stroke-width", "1.2")
        };
        let mut group = Group::new()
            .set(
                "class",
                if part.floating {
                    "part floating"
                } else {
                    "part"
                },
            )
            .set("data-part", part.id.clone())
            .add(rect);
        for l in &placed.labels {
            group = group.add(label(&l.shifted(dx, dy), "part-text"));
        }
        for m in &placed.markers {
            group = group.add(marker(&m.shifted(dx, dy)));
        }
        for g in &placed.grounds {
            group = group.add(ground_symbol(g.x + dx, g.y + dy, g.reaches_battery));
        }
        boxes.push(&group);
    }

    let mut tags = Layer::new("tags");
    for (tag, placed) in content.tags.iter().zip(&geometry.tags) {
        if !inside(super::page::tag_bounds(placed)) {
            continue;
        }
        let mut group = Group::new()
            .set("class", if tag.ground { "tag ground" } else { "tag" })
            .set("data-net", tag.net.clone());
        if let Some(r) = placed.frame {
            group = group.add(
                Rectangle::new()
                    .set("class", "tag-frame")
                    .set("x", num(r.x + dx))
                    .set("y", num(r.y + dy))
                    .set("width", num(r.width))
                    .set("height", num(r.height))
                    .set("rx", "2")
                    .set("fill", "none")
                    .set("stroke", style::RULE_LINE)
                    .set("stroke-width", "0.8"),
            );
        }
        for l in &placed.labels {
            group = group.add(label(&l.shifted(dx, dy), "tag-text"));
        }
        for m in &placed.markers {
            group = group.add(marker(&m.shifted(dx, dy)));
        }
        if let Some((x, y)) = placed.ground_icon {
            group = group.add(ground_symbol(x + dx, y + dy, true));
        }
        tags.push(&group);
    }
    Group::new()
        .set("class", "drawing")
        .add(wires.group())
        .add(boxes.group())
        .add(tags.group())
}

/// One layer of the drawing (wires, boxes or tags), its elements written
/// out as text as each is made: a large plan's drawing holds hundreds of
/// thousands of elements, and kept as a tree each would hold its own map
/// of attributes until the document is written. The text is what the tree
/// would print: each child on a line of its own.
struct Layer {
    class: &'static str,
    text: String,
    empty: bool,
}

impl Layer {
    fn new(class: &'static str) -> Layer {
        Layer {
            class,
            text: String::new(),
            empty: true,
        }
    }

    fn push(&mut self, element: &Group) {
        use std::fmt::Write;
        if !self.empty {
            self.text.push('\n');
        }
        self.empty = false;
        // Writing to a String cannot fail.
        let _ = write!(self.text, "{element}");
    }

    fn group(self) -> Group {
        let group = Group::new().set("class", self.class);
        if self.empty {
            group
        } else {
            group.add(svg::node::Blob::new(self.text))
        }
    }
}

pub(super) fn findings_panel(
    findings: &[Listed],
    x: f64,
    top: f64,
    width: f64,
    marker_w: f64,
) -> (Group, f64) {
    let mut group = Group::new().set("class", "findings-panel");
    let mut y = top + PANEL_PAD + HEADING_SIZE;
    group = group.add(label(
        &plain(x + PANEL_PAD, y, HEADING_SIZE, "Findings", true),
        "panel-heading",
    ));
    y += HEADING_SIZE * text::DESCENT_EM + 6.0;
    let text_x = x + PANEL_PAD + marker_w + 8.0;
    let cells = cells_for(x + width - PANEL_PAD - text_x, BODY_SIZE);
    if findings.is_empty() {
        y += BODY_SIZE;
        group = group.add(label(
            &plain(text_x, y, BODY_SIZE, "No findings.", false),
            "panel-text",
        ));
        y += BODY_SIZE * text::DESCENT_EM;
    }
    for listed in findings {
        let lines = text::wrap(
            &format!("{} {}", listed.marker.severity.name(), listed.text),
            cells,
        );
        let row_top = y + 2.0;
        group = group.add(marker(&PlacedMarker {
            marker: listed.marker,
            x: x + PANEL_PAD + marker_w / 2.0,
            y: row_top + MARKER_HEIGHT / 2.0,
            width: marker_w,
        }));
        let mut baseline = row_top + 11.0;
        for line in &lines {
            group = group.add(label(
                &plain(text_x, baseline, BODY_SIZE, line, false),
                "panel-text",
            ));
            baseline += LINE_STEP;
        }
        if let Some(fix) = &listed.fix {
            let fix_x = text_x + 2.0 * text::ADVANCE_EM * BODY_SIZE;
            let fix_cells = cells_for(x + width - PANEL_PAD - fix_x, BODY_SIZE);
            for line in text::wrap(&format!("fix: {fix}"), fix_cells) {
                let mut l = plain(fix_x, baseline, BODY_SIZE, &line, false);
                l.tone = Tone::Soft;
                group = group.add(label(&l, "panel-fix"));
                baseline += LINE_STEP;
            }
        }
        let text_bottom = baseline - LINE_STEP + BODY_SIZE * text::DESCENT_EM;
        y = text_bottom.max(row_top + MARKER_HEIGHT) + 3.0;
    }
    let bottom = y + PANEL_PAD;
    group = group.add(frame(x, top, width, bottom - top, "panel-frame"));
    (group, bottom)
}

/// One legend row: a sample drawing in a 56 px slot and its words.
enum Sample {
    Line(WireKind),
    Junction,
    Ground(bool),
    Marker(Severity),
    Tint(Stage),
    FloatingBox,
    OffPage,
}

/// The legend; `paged` adds the off-page connector (only sheets have them).
pub(super) fn legend(x: f64, top: f64, width: f64, marker_w: f64, paged: bool) -> (Group, f64) {
    let mut rows: Vec<(Sample, &str)> = vec![
        (
            Sample::Line(WireKind::Rail),
            "supply rail: heavy solid line; its tag gives the name, the lowest and highest voltage (battery empty to full), the current (typical / peak) and the wire size and length",
        ),
        (
            Sample::Line(WireKind::Ground),
            "ground return: heavy grey dash-dot line; its tag gives the name, the current and the wire size and length",
        ),
        (
            Sample::Line(WireKind::MotorLead),
            "motor lead: heavy long dashes",
        ),
        (
            Sample::Line(WireKind::Signal),
            "logic signal: thin short dashes; each pin it leaves or enters names it (pin: signal)",
        ),
        (
            Sample::Line(WireKind::Bundle),
            "signals between the same two parts, run together: wide medium dashes; its tag lists them, and each pin names its signal",
        ),
        (
            Sample::Line(WireKind::Cable),
            "USB cable: hollow band (power, data and ground together)",
        ),
        (
            Sample::Junction,
            "dot: lines joined; lines that cross without a dot do not touch",
        ),
        (
            Sample::Ground(true),
            "ground pin returning to a battery negative",
        ),
        (
            Sample::Ground(false),
            "ground that does not reach any battery negative",
        ),
        (
            Sample::FloatingBox,
            "part whose ground does not reach any battery negative (dashed outline)",
        ),
        (
            Sample::Marker(Severity::Error),
            "finding number, error: dark rounded marker",
        ),
        (
            Sample::Marker(Severity::Warning),
            "finding number, warning: mid-grey pointed marker",
        ),
        (
            Sample::Marker(Severity::Note),
            "finding number, note: light square marker",
        ),
    ];
    rows.extend(Stage::ALL.map(|stage| (Sample::Tint(stage), stage.describe())));
    if paged {
        rows.push((
            Sample::OffPage,
            "off-page connector: the line goes on, on the sheet numbered after its net's name",
        ));
    }
    let mut group = Group::new().set("class", "legend");
    let mut y = top + PANEL_PAD + HEADING_SIZE;
    group = group.add(label(
        &plain(x + PANEL_PAD, y, HEADING_SIZE, "Legend", true),
        "panel-heading",
    ));
    y += HEADING_SIZE * text::DESCENT_EM + 6.0;
    let sample_x = x + PANEL_PAD;
    let text_x = sample_x + 64.0;
    let cells = cells_for(x + width - PANEL_PAD - text_x, BODY_SIZE);
    for (sample, words) in rows {
        let lines = text::wrap(words, cells);
        let row_top = y + 2.0;
        let mid = row_top + 8.0;
        group = match sample {
            Sample::Line(kind) => {
                let d = format!(
                    "M{} {} L{} {}",
                    num(sample_x),
                    num(mid),
                    num(sample_x + 52.0),
                    num(mid)
                );
                let line = line_style(kind);
                let mut sample_group = Group::new().set("class", "legend-sample").add(stroked(
                    Path::new().set("d", d.clone()),
                    &line,
                    line.width,
                ));
                if let Some(core) = line.core {
                    let stripe = LineStyle {
                        colour: style::PAPER,
                        ..line
                    };
                    sample_group =
                        sample_group.add(stroked(Path::new().set("d", d), &stripe, core));
                }
                group.add(sample_group)
            }
            Sample::Junction => group.add(
                Group::new()
                    .set("class", "legend-sample")
                    .add(stroked(
                        Path::new().set(
                            "d",
                            format!(
                                "M{} {} L{} {} M{} {} L{} {}",
                                num(sample_x),
                                num(mid),
                                num(sample_x + 52.0),
                                num(mid),
                                num(sample_x + 26.0),
                                num(mid),
                                num(sample_x + 26.0),
                                num(mid + 8.0)
                            ),
                        ),
                        &style::RAIL,
                        style::RAIL.width,
                    ))
                    .add(
                        Circle::new()
                            .set("cx", num(sample_x + 26.0))
                            .set("cy", num(mid))
                            .set("r", num(style::RAIL.width + 0.6))
                            .set("fill", style::RAIL.colour),
                    ),
            ),
            Sample::Ground(reaches) => group.add(ground_symbol(sample_x + 26.0, row_top, reaches)),
            Sample::Marker(severity) => group.add(marker(&PlacedMarker {
                marker: Marker {
                    number: 1,
                    severity,
                },
                x: sample_x + 26.0,
                y: mid,
                width: marker_w,
            })),
            Sample::Tint(stage) => group.add(
                Rectangle::new()
                    .set("class", "legend-sample")
                    .set("x", num(sample_x + 8.0))
                    .set("y", num(row_top + 1.0))
                    .set("width", "36")
                    .set("height", "14")
                    .set("rx", "3")
                    .set("fill", stage.tint())
                    .set("stroke", style::INK)
                    .set("stroke-width", "1.2"),
            ),
            Sample::OffPage => group.add(
                Group::new()
                    .set("class", "legend-sample")
                    .add(stroked(
                        Path::new().set(
                            "d",
                            format!(
                                "M{} {} L{} {}",
                                num(sample_x),
                                num(mid),
                                num(sample_x + 14.0),
                                num(mid)
                            ),
                        ),
                        &style::RAIL,
                        style::RAIL.width,
                    ))
                    .add(
                        Rectangle::new()
                            .set("x", num(sample_x + 14.0))
                            .set("y", num(mid - 6.0))
                            .set("width", "40")
                            .set("height", "12")
                            .set("fill", style::PAPER)
                            .set("stroke", style::INK)
                            .set("stroke-width", "1"),
                    )
                    .add(
                        Text::new("5V → 2")
                            .set("x", num(sample_x + 17.0))
                            .set("y", num(mid + 3.0))
                            .set("font-size", "8")
                            .set("fill", style::INK),
                    ),
            ),
            Sample::FloatingBox => group.add(
                Rectangle::new()
                    .set("class", "legend-sample")
                    .set("x", num(sample_x + 8.0))
                    .set("y", num(row_top + 1.0))
                    .set("width", "36")
                    .set("height", "14")
                    .set("rx", "3")
                    .set("fill", Stage::Load.tint())
                    .set("stroke", style::FLOATING)
                    .set("stroke-width", "2.4")
                    .set("stroke-dasharray", "6 3"),
            ),
        };
        let mut baseline = row_top + 11.0;
        for line in &lines {
            group = group.add(label(
                &plain(text_x, baseline, BODY_SIZE, line, false),
                "legend-text",
            ));
            baseline += LINE_STEP;
        }
        let text_bottom = baseline - LINE_STEP + BODY_SIZE * text::DESCENT_EM;
        y = text_bottom.max(row_top + 16.0) + 4.0;
    }
    let bottom = y + PANEL_PAD;
    group = group.add(frame(x, top, width, bottom - top, "panel-frame"));
    (group, bottom)
}

pub(super) fn cautions(cautions: &[String], x: f64, top: f64, width: f64) -> (Group, f64) {
    let mut group = Group::new().set("class", "cautions");
    let mut y = top + PANEL_PAD + HEADING_SIZE;
    group = group.add(label(
        &plain(x + PANEL_PAD, y, HEADING_SIZE, "Safety", true),
        "panel-heading",
    ));
    y += HEADING_SIZE * text::DESCENT_EM + 4.0;
    let text_x = x + PANEL_PAD + 14.0;
    let cells = cells_for(x + width - PANEL_PAD - text_x, BODY_SIZE);
    for caution in cautions {
        let mut baseline = y + 12.0;
        group = group.add(label(
            &plain(x + PANEL_PAD, baseline, BODY_SIZE, "•", false),
            "caution-text",
        ));
        for line in text::wrap(caution, cells) {
            group = group.add(label(
                &plain(text_x, baseline, BODY_SIZE, &line, false),
                "caution-text",
            ));
            baseline += LINE_STEP;
        }
        y = baseline - LINE_STEP + BODY_SIZE * text::DESCENT_EM + 3.0;
    }
    let bottom = y + PANEL_PAD;
    group = group.add(frame(x, top, width, bottom - top, "panel-frame"));
    (group, bottom)
}

#[cfg(test)]
mod tests {
    use super::num;

    /// `num` writes what the standard formatter writes for the value
    /// rounded to hundredths (`{:.2}`, trailing zeros and point dropped),
    /// across signs, magnitudes and values that round at the half.
    #[test]
    fn numbers_are_written_as_the_standard_formatter_rounds_them() {
        let reference = |v: f64| {
            let rounded = (v * 100.0).round() / 100.0;
            let rounded = if rounded == 0.0 { 0.0 } else { rounded };
            let text = format!("{rounded:.2}");
            text.trim_end_matches('0').trim_end_matches('.').to_string()
        };
        let mut values = vec![0.0, -0.0, 0.004, -0.004, 0.005, -0.005, 0.125, 1.005, 2.675];
        values.extend([
            10.0,
            100.5,
            1234.5678,
            -99.999,
            1e9 + 0.01,
            9.99e9,
            1e13,
            -1e15,
        ]);
        // A fixed walk over many magnitudes (a linear congruential sequence).
        let mut x: u64 = 12345;
        for _ in 0..20_000 {
            x = x
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            let unit = (x >> 11) as f64 / (1u64 << 53) as f64;
            let scale = 10f64.powi(((x >> 3) % 12) as i32 - 3);
            let sign = if x & 1 == 0 { 1.0 } else { -1.0 };
            values.push(sign * unit * scale);
        }
        for v in values {
            assert_eq!(num(v), reference(v), "{v:?}");
        }
    }

    #[test]
    fn numbers_are_short_and_stable() {
        assert_eq!(num(12.0), "12");
        assert_eq!(num(12.5), "12.5");
        assert_eq!(num(1.0 / 3.0), "0.33");
        assert_eq!(num(-0.001), "0");
    }
}
