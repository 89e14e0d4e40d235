//! The inside of a part box and of a rail tag: where the name, class,
//! rating, pin names, finding markers and ground symbols go, relative to the
//! box's top left corner, and how big that makes the box. Not for where boxes
//! stand: that is `layout`.

use super::content::{Marker, PartBox, PinAt, Tag};
use super::layout::{
    Align, GRID, GROUND_SYMBOL, GroundMark, Label, MARKER_HEIGHT, NAME_SIZE, PlacedMarker,
    TAG_NAME_SIZE, TEXT_SIZE, Tone, ceil_grid, ceil_to, pass_offset,
};
use super::text;

/// Size of the ground's name under its symbol, when there are several grounds.
const GROUND_LABEL_SIZE: f64 = 8.0;
/// Text of the line a floating part carries in its box.
const FLOATING_TEXT: &str = "ground not joined to the battery negative";

const BOX_PAD: f64 = 6.0;
const TAG_PAD: f64 = 5.0;
const GROUND_ICON: f64 = 16.0;
const MARKERS_PER_ROW: usize = 6;
const MARKER_GAP: f64 = 3.0;

/// Text lines, markers and pin positions of a part box, relative to its top
/// left corner.
pub(super) struct BoxShape {
    pub width: f64,
    pub height: f64,
    /// Room kept free below the box for ground symbols and their names.
    pub skirt: f64,
    pub labels: Vec<Label>,
    pub markers: Vec<PlacedMarker>,
    /// Per shown pin: the point where its connection meets the box.
    pub pins: Vec<Option<(f64, f64)>>,
    pub grounds: Vec<GroundMark>,
}

/// Lays out text lines and marker rows from `top`; returns labels, markers
/// and the lowest point used.
fn header(
    lines: &[(String, f64, bool, Tone)],
    markers: &[Marker],
    marker_w: f64,
    left: f64,
    top: f64,
) -> (Vec<Label>, Vec<PlacedMarker>, f64) {
    let mut labels = Vec::new();
    let mut baseline = top;
    let mut bottom = top;
    let mut gap_before = 0.0;
    for (text, size, bold, tone) in lines {
        baseline = if labels.is_empty() {
            top + size * text::ASCENT_EM
        } else {
            baseline + gap_before + size * text::ASCENT_EM
        };
        labels.push(Label {
            x: left,
            y: baseline,
            size: *size,
            align: Align::Start,
            text: text.clone(),
            bold: *bold,
            tone: *tone,
        });
        bottom = baseline + size * text::DESCENT_EM;
        gap_before = size * text::DESCENT_EM + 0.5;
    }
    let mut placed = Vec::new();
    for (row, chunk) in markers.chunks(MARKERS_PER_ROW).enumerate() {
        let row_top = bottom + 3.0 + row as f64 * (MARKER_HEIGHT + MARKER_GAP);
        for (i, marker) in chunk.iter().enumerate() {
            placed.push(PlacedMarker {
                marker: *marker,
                x: left + i as f64 * (marker_w + MARKER_GAP) + marker_w / 2.0,
                y: row_top + MARKER_HEIGHT / 2.0,
                width: marker_w,
            });
        }
    }
    let rows = markers.len().div_ceil(MARKERS_PER_ROW);
    if rows > 0 {
        bottom += 3.0 + rows as f64 * (MARKER_HEIGHT + MARKER_GAP) - MARKER_GAP;
    }
    (labels, placed, bottom)
}

fn markers_width(count: usize, marker_w: f64) -> f64 {
    let per_row = count.min(MARKERS_PER_ROW) as f64;
    if per_row == 0.0 {
        0.0
    } else {
        per_row * (marker_w + MARKER_GAP) - MARKER_GAP
    }
}

pub(super) fn box_shape(
    part: &PartBox,
    left: &[usize],
    right: &[usize],
    bottom: &[usize],
    marker_w: f64,
) -> BoxShape {
    let mut lines = vec![(part.name.clone(), NAME_SIZE, true, Tone::Strong)];
    if let Some(library) = &part.library {
        lines.push((library.clone(), TEXT_SIZE, false, Tone::Soft));
    }
    lines.push((part.class.clone(), TEXT_SIZE, false, Tone::Soft));
    if let Some(rating) = &part.rating {
        lines.push((rating.clone(), TEXT_SIZE, false, Tone::Soft));
    }
    if part.floating {
        lines.push((FLOATING_TEXT.to_string(), TEXT_SIZE, false, Tone::Alarm));
    }
    let (mut labels, markers, text_bottom) = header(&lines, &part.markers, marker_w, BOX_PAD, 4.0);
    let head = ceil_grid(text_bottom + 4.0);

    let name_width = |&pin: &usize| text::width(&part.pins[pin].name, TEXT_SIZE);
    let widest = |pins: &[usize]| pins.iter().map(name_width).fold(0.0, f64::max);
    let ground_width = |&pin: &usize| {
        part.pins[pin]
            .ground
            .as_deref()
            .map_or(0.0, |g| text::width(g, GROUND_LABEL_SIZE))
    };
    let bottom_slots: Vec<f64> = bottom
        .iter()
        .map(|p| name_width(p).max(ground_width(p)).max(14.0))
        .collect();
    let bottom_total: f64 =
        bottom_slots.iter().sum::<f64>() + 10.0 * (bottom_slots.len().max(1) - 1) as f64;
    let mut width = lines
        .iter()
        .map(|(t, size, _, _)| text::width(t, *size))
        .fold(0.0, f64::max)
        .max(markers_width(part.markers.len(), marker_w))
        .max(widest(left) + widest(right) + 12.0)
        .max(bottom_total)
        + 2.0 * BOX_PAD;
    width = ceil_to(width.max(80.0), 8.0);

    let rows = left.len().max(right.len());
    let pins_height = if rows > 0 {
        GRID * (rows + 1) as f64
    } else {
        0.0
    };
    let bottom_height = if bottom.is_empty() { 0.0 } else { GRID };
    let height = (head + pins_height + bottom_height).max(2.0 * GRID);

    let mut pins = vec![None; part.pins.len()];
    let pin_label = |x: f64, y: f64, align: Align, pin: usize| Label {
        x,
        y: y + 3.0,
        size: TEXT_SIZE,
        align,
        text: part.pins[pin].name.clone(),
        bold: false,
        tone: Tone::Soft,
    };
    for (i, &pin) in left.iter().enumerate() {
        let y = head + 8.0 + GRID * i as f64;
        pins[pin] = Some((0.0, y));
        labels.push(pin_label(BOX_PAD, y, Align::Start, pin));
    }
    for (i, &pin) in right.iter().enumerate() {
        let y = head + GRID + GRID * i as f64;
        pins[pin] = Some((width, y));
        labels.push(pin_label(width - BOX_PAD, y, Align::End, pin));
    }
    let mut grounds = Vec::new();
    let row_top = head + pins_height;
    let mut cursor = (width - bottom_total) / 2.0;
    for (slot, &pin) in bottom_slots.iter().zip(bottom) {
        let x = cursor + slot / 2.0;
        labels.push(Label {
            x,
            y: row_top + 11.0,
            size: TEXT_SIZE,
            align: Align::Middle,
            text: part.pins[pin].name.clone(),
            bold: false,
            tone: Tone::Soft,
        });
        if let PinAt::Ground { reaches_battery } = part.pins[pin].at {
            grounds.push(GroundMark {
                x,
                y: height,
                reaches_battery,
            });
            if let Some(ground) = &part.pins[pin].ground {
                labels.push(Label {
                    x,
                    y: height + GROUND_SYMBOL + GROUND_LABEL_SIZE,
                    size: GROUND_LABEL_SIZE,
                    align: Align::Middle,
                    text: ground.clone(),
                    bold: false,
                    tone: Tone::Soft,
                });
            }
        }
        cursor += slot + 10.0;
    }
    if part.floating && grounds.is_empty() {
        grounds.push(GroundMark {
            x: width / 2.0,
            y: height,
            reaches_battery: false,
        });
    }
    let named = bottom.iter().any(|&p| part.pins[p].ground.is_some());
    let skirt = match (grounds.is_empty(), named) {
        (true, _) => 0.0,
        (false, false) => GRID,
        (false, true) => 2.0 * GRID,
    };
    BoxShape {
        width,
        height,
        skirt,
        labels,
        markers,
        pins,
        grounds,
    }
}

pub(super) struct TagShape {
    pub width: f64,
    pub height: f64,
    pub labels: Vec<Label>,
    pub markers: Vec<PlacedMarker>,
    /// Offset of the tag's line from its top; `None` for a ground tag.
    pub line: Option<f64>,
    pub ground_icon: Option<(f64, f64)>,
}

pub(super) fn tag_shape(tag: &Tag, column: usize, marker_w: f64) -> TagShape {
    let mut lines = vec![(tag.name.clone(), TAG_NAME_SIZE, true, Tone::Strong)];
    for line in &tag.lines {
        lines.push((line.clone(), TEXT_SIZE, false, Tone::Soft));
    }
    let left = if tag.ground {
        TAG_PAD + GROUND_ICON
    } else {
        TAG_PAD
    };
    let (labels, markers, text_bottom) = header(&lines, &tag.markers, marker_w, left, 3.0);
    let width = lines
        .iter()
        .map(|(t, size, _, _)| text::width(t, *size))
        .fold(0.0, f64::max)
        .max(markers_width(tag.markers.len(), marker_w))
        + left
        + TAG_PAD;
    let width = ceil_to(width.max(40.0), 8.0);
    if tag.ground {
        return TagShape {
            width,
            height: text_bottom + 5.0,
            labels,
            markers,
            line: None,
            ground_icon: Some((TAG_PAD + 6.0, 4.0)),
        };
    }
    let offset = pass_offset(column);
    let mut line = offset;
    while line < text_bottom + 3.0 {
        line += GRID;
    }
    TagShape {
        width,
        height: line + 4.0,
        labels,
        markers,
        line: Some(line),
        ground_icon: None,
    }
}
