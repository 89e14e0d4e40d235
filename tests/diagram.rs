//! The SVG block diagram, checked from the outside: every drawing is parsed
//! by an XML parser and drawn by an SVG renderer; its geometry is read back
//! from the file and checked (no two part boxes overlap, no label overlaps a
//! box or another label, connections are orthogonal and never run through a
//! box or a label); the same plan gives the same bytes; user text stays text;
//! and the picture shows what the plan and its operating point say.
//!
//! Regenerate the committed example diagrams with
//! `RAILCHECK_UPDATE_DIAGRAMS=1 cargo test --test diagram`.

#[path = "common/generate.rs"]
mod generate;

use railcheck::model::Library;
use roxmltree::{Document, Node};
use std::path::{Path, PathBuf};

/// Width of a character cell as a share of the font size. The diagram asks
/// for a monospace face; those advance 0.6 em (common practice), and 0.62
/// leaves a margin for a fallback face.
const ADVANCE_EM: f64 = 0.62;
/// Room above and below the baseline, as shares of the font size: ascenders
/// and accents stay below 0.95 em and descenders within 0.25 em in common
/// faces (common practice).
const ASCENT_EM: f64 = 0.95;
const DESCENT_EM: f64 = 0.25;
/// Touching edges are not an overlap.
const EPS: f64 = 0.01;

fn check(name: &str, text: &str) -> railcheck::Checked {
    match railcheck::check(name, text, &Library::builtin()) {
        Ok(c) => c,
        Err(f) => panic!("{name}: input errors {:?}", f.errors),
    }
}

fn draw(name: &str, text: &str) -> String {
    railcheck::diagram::draw(&check(name, text))
}

#[derive(Clone, Copy, Debug, PartialEq)]
struct Bounds {
    x0: f64,
    y0: f64,
    x1: f64,
    y1: f64,
}

impl Bounds {
    fn overlaps(&self, o: &Bounds) -> bool {
        self.x0 < o.x1 - EPS && o.x0 < self.x1 - EPS && self.y0 < o.y1 - EPS && o.y0 < self.y1 - EPS
    }

    fn contains(&self, o: &Bounds) -> bool {
        o.x0 >= self.x0 - EPS
            && o.x1 <= self.x1 + EPS
            && o.y0 >= self.y0 - EPS
            && o.y1 <= self.y1 + EPS
    }

    /// Whether an axis-parallel segment enters the inside of this box.
    fn crossed_by(&self, [x1, y1, x2, y2]: [f64; 4]) -> bool {
        let (lx, hx) = (x1.min(x2), x1.max(x2));
        let (ly, hy) = (y1.min(y2), y1.max(y2));
        lx < self.x1 - EPS && hx > self.x0 + EPS && ly < self.y1 - EPS && hy > self.y0 + EPS
            || (lx == hx
                && lx > self.x0 + EPS
                && lx < self.x1 - EPS
                && ly < self.y1 - EPS
                && hy > self.y0 + EPS)
            || (ly == hy
                && ly > self.y0 + EPS
                && ly < self.y1 - EPS
                && lx < self.x1 - EPS
                && hx > self.x0 + EPS)
    }
}

#[derive(Debug)]
struct Label {
    text: String,
    bounds: Bounds,
    /// The part whose box group holds the label.
    part: Option<String>,
}

struct Picture {
    boxes: Vec<(String, Bounds)>,
    labels: Vec<Label>,
    /// (class, net, segment)
    segments: Vec<(String, String, [f64; 4])>,
    /// Per drawn connection (one path each): its segments.
    paths: Vec<(String, Vec<[f64; 4]>)>,
    /// Frames of rail tags and off-page connectors: places a line may end on.
    frames: Vec<Bounds>,
    /// Centres of junction dots.
    dots: Vec<(f64, f64)>,
}

fn has_class(node: &Node, class: &str) -> bool {
    node.attribute("class")
        .is_some_and(|c| c.split(' ').any(|x| x == class))
}

fn number(node: &Node, name: &str) -> f64 {
    let value = node
        .attribute(name)
        .unwrap_or_else(|| panic!("<{}> without {name}", node.tag_name().name()));
    value
        .parse()
        .unwrap_or_else(|_| panic!("{name}={value:?} is not a number"))
}

/// A text element's content as SVG shows it: the line breaks the writer puts
/// around it are dropped and leading and trailing spaces stripped (SVG 1.1
/// §10.15, `xml:space="default"`).
fn text_of(node: &Node) -> String {
    let raw: String = node
        .descendants()
        .filter(|n| n.is_text())
        .filter_map(|n| n.text())
        .collect();
    raw.replace('\n', "").trim().to_string()
}

/// Straight segments of a path written with absolute `M` and `L` commands.
fn segments(d: &str) -> Vec<[f64; 4]> {
    let mut out = Vec::new();
    let mut tokens = d.split_whitespace().peekable();
    let mut at = (0.0, 0.0);
    while let Some(token) = tokens.next() {
        let (command, first) = token.split_at(1);
        let x: f64 = if first.is_empty() {
            tokens.next().unwrap().parse().unwrap()
        } else {
            first.parse().unwrap()
        };
        let y: f64 = tokens.next().unwrap().parse().unwrap();
        match command {
            "M" => at = (x, y),
            "L" => {
                out.push([at.0, at.1, x, y]);
                at = (x, y);
            }
            other => panic!("unexpected path command {other} in {d}"),
        }
    }
    out
}

fn picture(svg: &str) -> Picture {
    let doc = Document::parse(svg).expect("the diagram is well-formed XML");
    let mut boxes = Vec::new();
    let mut labels = Vec::new();
    let mut segs = Vec::new();
    let mut paths = Vec::new();
    let mut frames = Vec::new();
    let mut dots = Vec::new();
    for node in doc.descendants() {
        if node.has_tag_name("rect") && has_class(&node, "part-box") {
            let part = node
                .parent()
                .and_then(|g| g.attribute("data-part"))
                .expect("a part box sits in its part's group")
                .to_string();
            let (x, y) = (number(&node, "x"), number(&node, "y"));
            let bounds = Bounds {
                x0: x,
                y0: y,
                x1: x + number(&node, "width"),
                y1: y + number(&node, "height"),
            };
            boxes.push((part, bounds));
        }
        if node.has_tag_name("text") {
            let text = text_of(&node);
            let size = number(&node, "font-size");
            let (x, y) = (number(&node, "x"), number(&node, "y"));
            let width = text.chars().count() as f64 * ADVANCE_EM * size;
            let x0 = match node.attribute("text-anchor") {
                Some("middle") => x - width / 2.0,
                Some("end") => x - width,
                _ => x,
            };
            let part = node
                .ancestors()
                .find(|a| has_class(a, "part"))
                .and_then(|g| g.attribute("data-part"))
                .map(str::to_string);
            labels.push(Label {
                text,
                bounds: Bounds {
                    x0,
                    y0: y - ASCENT_EM * size,
                    x1: x0 + width,
                    y1: y + DESCENT_EM * size,
                },
                part,
            });
        }
        if node.has_tag_name("path") && has_class(&node, "wire") {
            let class = node.attribute("class").unwrap_or_default().to_string();
            let net = node.attribute("data-net").unwrap_or_default().to_string();
            let path = segments(node.attribute("d").expect("a wire path has d"));
            for s in &path {
                segs.push((class.clone(), net.clone(), *s));
            }
            paths.push((net, path));
        }
        if node.has_tag_name("rect")
            && (has_class(&node, "tag-frame") || has_class(&node, "off-page"))
        {
            let (x, y) = (number(&node, "x"), number(&node, "y"));
            frames.push(Bounds {
                x0: x,
                y0: y,
                x1: x + number(&node, "width"),
                y1: y + number(&node, "height"),
            });
        }
        if node.has_tag_name("circle") && has_class(&node, "junction") {
            dots.push((number(&node, "cx"), number(&node, "cy")));
        }
    }
    Picture {
        boxes,
        labels,
        segments: segs,
        paths,
        frames,
        dots,
    }
}

/// Everything the issue asks of the picture's geometry.
fn assert_clean_geometry(svg: &str, what: &str) {
    assert!(!picture(svg).boxes.is_empty(), "{what}: no part boxes");
    assert_nothing_overlaps(svg, what);
}

/// No line ends in open space, no two boxes overlap, no label overlaps a
/// box it is not inside of or another label, no line runs through a box
/// or a label.
fn assert_nothing_overlaps(svg: &str, what: &str) {
    assert_line_ends_attached(svg, what);
    let pic = picture(svg);
    for (i, (a, ba)) in pic.boxes.iter().enumerate() {
        for (b, bb) in &pic.boxes[i + 1..] {
            assert!(!ba.overlaps(bb), "{what}: boxes `{a}` and `{b}` overlap");
        }
    }
    for label in &pic.labels {
        for (part, bounds) in &pic.boxes {
            if label.bounds.overlaps(bounds) {
                assert!(
                    bounds.contains(&label.bounds) && label.part.as_deref() == Some(part.as_str()),
                    "{what}: label {:?} overlaps box `{part}`",
                    label.text
                );
            }
        }
    }
    let mut by_left: Vec<&Label> = pic.labels.iter().collect();
    by_left.sort_by(|a, b| a.bounds.x0.total_cmp(&b.bounds.x0));
    for (i, a) in by_left.iter().enumerate() {
        for b in &by_left[i + 1..] {
            if b.bounds.x0 >= a.bounds.x1 {
                break;
            }
            assert!(
                !a.bounds.overlaps(&b.bounds),
                "{what}: labels {:?} and {:?} overlap",
                a.text,
                b.text
            );
        }
    }
    for (class, net, s) in &pic.segments {
        let [x1, y1, x2, y2] = *s;
        assert!(
            x1 == x2 || y1 == y2,
            "{what}: {class} `{net}` has a slanted segment {s:?}"
        );
        for (part, bounds) in &pic.boxes {
            assert!(
                !bounds.crossed_by(*s),
                "{what}: {class} `{net}` runs through box `{part}` at {s:?}"
            );
        }
        for label in &pic.labels {
            assert!(
                !label.bounds.crossed_by(*s),
                "{what}: {class} `{net}` runs through label {:?} at {s:?}",
                label.text
            );
        }
    }
}

/// Whether a point lies on the outline of a box.
fn on_outline(b: &Bounds, (x, y): (f64, f64)) -> bool {
    let within_y = y >= b.y0 - EPS && y <= b.y1 + EPS;
    let within_x = x >= b.x0 - EPS && x <= b.x1 + EPS;
    ((x - b.x0).abs() < EPS || (x - b.x1).abs() < EPS) && within_y
        || ((y - b.y0).abs() < EPS || (y - b.y1).abs() < EPS) && within_x
}

/// Whether a point lies on an axis-parallel segment.
fn on_segment([x1, y1, x2, y2]: [f64; 4], (x, y): (f64, f64)) -> bool {
    x >= x1.min(x2) - EPS
        && x <= x1.max(x2) + EPS
        && y >= y1.min(y2) - EPS
        && y <= y1.max(y2) + EPS
        && ((x1 - x2).abs() < EPS || (y1 - y2).abs() < EPS)
}

/// No line ends in open space: every end of every segment of a connection
/// lies on a part box's outline (a pin), on a tag's or off-page connector's
/// frame, on a junction dot, or on another segment of the same connection.
fn assert_line_ends_attached(svg: &str, what: &str) {
    let pic = picture(svg);
    for (net, path) in &pic.paths {
        for (i, s) in path.iter().enumerate() {
            for end in [(s[0], s[1]), (s[2], s[3])] {
                let attached = pic.boxes.iter().any(|(_, b)| on_outline(b, end))
                    || pic.frames.iter().any(|b| on_outline(b, end))
                    || pic
                        .dots
                        .iter()
                        .any(|d| (d.0 - end.0).abs() < EPS && (d.1 - end.1).abs() < EPS)
                    || path
                        .iter()
                        .enumerate()
                        .any(|(j, other)| j != i && on_segment(*other, end))
                    // A line cut at a sheet's edge goes on as its off-page
                    // connector's lead, drawn as a path of the same net.
                    || pic.paths.iter().any(|(other_net, other)| {
                        other_net == net
                            && !std::ptr::eq(other, path)
                            && other.iter().any(|o| on_segment(*o, end))
                    });
                assert!(
                    attached,
                    "{what}: `{net}` ends in open space at {end:?} (segment {s:?})"
                );
            }
        }
    }
}

#[test]
#[should_panic(expected = "ends in open space")]
fn a_line_left_hanging_is_caught() {
    // A box with one line leaving its right edge and stopping short of
    // anything: the check must refuse it.
    let svg = r#"<svg xmlns="http://www.w3.org/2000/svg">
<g class="part" data-part="a"><rect class="part-box" x="0" y="0" width="40" height="40"/></g>
<path class="wire rail" data-net="X" d="M40 20 L90 20"/>
</svg>"#;
    assert_line_ends_attached(svg, "hanging");
}

#[test]
fn signals_are_named_at_their_pins_and_shared_runs_are_bundled() {
    let text = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/orchard-rover.yaml"),
    )
    .unwrap();
    let checked = check("examples/orchard-rover.yaml", &text);
    let svg = railcheck::diagram::draw(&checked);
    let doc = Document::parse(&svg).unwrap();
    let part_texts = |part: &str| -> Vec<String> {
        doc.descendants()
            .find(|n| n.attribute("data-part") == Some(part))
            .unwrap()
            .descendants()
            .filter(|n| n.has_tag_name("text"))
            .map(|n| text_of(&n))
            .collect()
    };
    let drawn: Vec<(String, String)> = doc
        .descendants()
        .filter(|n| has_class(n, "wire"))
        .map(|n| {
            (
                n.attribute("class").unwrap().to_string(),
                n.attribute("data-net").unwrap().to_string(),
            )
        })
        .collect();
    let plan = &checked.plan;
    let mut bundled = 0;
    for net in &plan.nets {
        let signal = drawn
            .iter()
            .any(|(c, n)| c.contains("signal") && n == &net.name);
        let bundle = drawn.iter().find(|(c, n)| {
            c.contains("bundle")
                && n.split(": ")
                    .nth(1)
                    .is_some_and(|members| members.split(", ").any(|m| m == net.name))
        });
        if !signal && bundle.is_none() {
            continue;
        }
        assert!(!(signal && bundle.is_some()), "{} drawn twice", net.name);
        // Where it leaves and where it enters each box, the pin says which
        // signal it carries.
        for pin in &net.pins {
            let part = &plan.parts[pin.part];
            let wanted = format!("{}: {}", part.pins[pin.pin].name, net.name);
            assert!(
                part_texts(&part.name).contains(&wanted),
                "{wanted:?} not on `{}`",
                part.name
            );
        }
        if let Some((_, name)) = bundle {
            bundled += 1;
            // The bundle's tag lists every member.
            let listed = tag_lines(&svg, name).join(" ");
            assert!(listed.contains(&net.name), "{listed}");
        }
    }
    // The rover's motor driver takes six signals from the controller (in1–in4,
    // ena, enb), all between the same two parts: at least those run as one.
    assert!(bundled >= 6, "{bundled} signals bundled");
}

/// Points per millimetre: 72 pt to the inch, 25.4 mm to the inch.
const PT_PER_MM: f64 = 72.0 / 25.4;

/// Printed size in points of every text element of one sheet: its font size
/// in drawing units times the sheet's scale, which is the page width in
/// points (from the `width` attribute in mm) over the viewBox width.
fn printed_text_sizes(svg: &str) -> Vec<(String, f64)> {
    let doc = Document::parse(svg).unwrap();
    let root = doc.root_element();
    let width = root.attribute("width").unwrap();
    let millimetres: f64 = width
        .strip_suffix("mm")
        .unwrap_or_else(|| panic!("sheet width {width:?} is not in mm"))
        .parse()
        .unwrap();
    let view: Vec<f64> = root
        .attribute("viewBox")
        .unwrap()
        .split(' ')
        .map(|v| v.parse().unwrap())
        .collect();
    let scale = millimetres * PT_PER_MM / view[2];
    doc.descendants()
        .filter(|n| n.has_tag_name("text"))
        .map(|n| (text_of(&n), number(&n, "font-size") * scale))
        .collect()
}

fn rover_plan() -> railcheck::Checked {
    let text = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/orchard-rover.yaml"),
    )
    .unwrap();
    check("examples/orchard-rover.yaml", &text)
}

#[test]
fn the_rover_prints_on_a4_with_no_text_under_7_pt() {
    use railcheck::diagram::{Page, Paper};
    let checked = rover_plan();
    for landscape in [false, true] {
        let page = Page {
            paper: Paper::A4,
            landscape,
        };
        let sheets = railcheck::diagram::draw_pages(&checked, Some(page))
            .unwrap_or_else(|e| panic!("{page}: {e}"));
        assert!(
            sheets.svgs.len() >= 2,
            "{page}: the rover needs several sheets"
        );
        // ISO 216 A4: 210 × 297 mm.
        let (w, h) = if landscape {
            ("297mm", "210mm")
        } else {
            ("210mm", "297mm")
        };
        let mut connectors = 0;
        let mut parts = std::collections::BTreeSet::new();
        for (i, svg) in sheets.svgs.iter().enumerate() {
            let what = format!("{page} sheet {}", i + 1);
            let doc = Document::parse(svg).unwrap();
            assert_eq!(doc.root_element().attribute("width"), Some(w), "{what}");
            assert_eq!(doc.root_element().attribute("height"), Some(h), "{what}");
            for (text, size) in printed_text_sizes(svg) {
                // The 7 pt floor, with rounding of the written numbers.
                assert!(
                    size >= 7.0 - 1e-6,
                    "{what}: {text:?} prints at {size:.2} pt"
                );
            }
            assert_line_ends_attached(svg, &what);
            // Every connector names a net and a sheet that exists.
            for node in doc.descendants().filter(|n| has_class(n, "off-page")) {
                connectors += 1;
                let to: usize = node.attribute("data-sheet").unwrap().parse().unwrap();
                assert!(
                    to >= 1 && to <= sheets.svgs.len() && to != i + 1,
                    "{what}: to {to}"
                );
                assert!(!node.attribute("data-net").unwrap().is_empty());
            }
            for node in doc.descendants().filter(|n| has_class(n, "part")) {
                let part = node.attribute("data-part").unwrap().to_string();
                assert!(parts.insert(part.clone()), "{what}: `{part}` drawn twice");
            }
        }
        assert!(
            connectors > 0,
            "{page}: cut lines without off-page connectors"
        );
        assert_eq!(
            parts.len(),
            checked.plan.parts.len(),
            "{page}: parts missing"
        );
        // A connector on one side of a cut has its partner on the other.
        let flags = |sheet: usize| -> Vec<(String, usize)> {
            let doc = Document::parse(&sheets.svgs[sheet]).unwrap();
            doc.descendants()
                .filter(|n| has_class(n, "off-page"))
                .map(|n| {
                    (
                        n.attribute("data-net").unwrap().to_string(),
                        n.attribute("data-sheet").unwrap().parse().unwrap(),
                    )
                })
                .collect()
        };
        for sheet in 0..sheets.svgs.len() {
            for (net, to) in flags(sheet) {
                assert!(
                    flags(to - 1).contains(&(net.clone(), sheet + 1)),
                    "{page}: `{net}` goes from sheet {} to {to} but does not come back",
                    sheet + 1
                );
            }
        }
        let again = railcheck::diagram::draw_pages(&checked, Some(page)).unwrap();
        assert_eq!(again, sheets, "{page}: two runs differ");
    }
}

#[test]
fn without_a_page_the_smallest_that_holds_the_drawing_is_chosen() {
    use railcheck::diagram::{Page, Paper};
    // Papers by area: US Letter 215.9 × 279.4 mm, ISO A4 210 × 297 mm, US
    // Tabloid 279.4 × 431.8 mm, ISO A3 297 × 420 mm (ANSI/ASME Y14.1, ISO 216).
    let checked = check("chain.yaml", CHAIN);
    let sheets = railcheck::diagram::draw_pages(&checked, None).unwrap();
    let uncut = |svgs: &[String]| !svgs.iter().any(|s| s.contains(r#"class="off-page""#));
    assert!(uncut(&sheets.svgs), "{}: the drawing is cut", sheets.page);
    // Every smaller page, either way round, would have to cut it.
    let order: Vec<Page> = Paper::ALL
        .iter()
        .flat_map(|&paper| [false, true].map(|landscape| Page { paper, landscape }))
        .collect();
    let chosen = order.iter().position(|p| *p == sheets.page).unwrap();
    for &smaller in &order[..chosen] {
        let on = railcheck::diagram::draw_pages(&checked, Some(smaller));
        assert!(
            on.as_ref().map_or(true, |s| !uncut(&s.svgs)),
            "{smaller} holds the drawing uncut, yet {} was chosen",
            sheets.page
        );
    }
    for svg in &sheets.svgs {
        for (text, size) in printed_text_sizes(svg) {
            assert!(size >= 7.0 - 1e-6, "{text:?} prints at {size:.2} pt");
        }
    }
    // Asked for a page, it keeps to it.
    let a3 = Page {
        paper: Paper::A3,
        landscape: false,
    };
    let on_a3 = railcheck::diagram::draw_pages(&checked, Some(a3)).unwrap();
    assert_eq!(on_a3.page, a3);
    assert!(on_a3.svgs[0].contains(r#"width="297mm""#));
}

#[test]
fn a_box_taller_than_the_page_names_the_page_it_needs() {
    use railcheck::diagram::{Page, Paper};
    // A logger with 48 signal inputs from one sensor head: its box is 49 pin
    // rows of 16 units, about 800 units, taller than the 615 units an A4
    // landscape sheet has at 7 pt (210 mm − 20 mm margins = 538.6 pt,
    // / 0.875 pt per unit).
    let mut plan = String::from(
        "railcheck: 1\nname: tall logger\nparts:\n  pack: { use: battery/lipo-3s }\n  buck: { use: regulator/buck-5v-3a }\n  head:\n    class: sensor\n    pins:\n      vcc: { role: supply-in, range: 4.5 V..5.5 V, draw: { typical: 10 mA } }\n      gnd: { role: ground }\n",
    );
    for i in 0..48 {
        plan.push_str(&format!(
            "      o{i}: {{ role: logic-out, ref: vcc, family: cmos5 }}\n"
        ));
    }
    plan.push_str("  logger:\n    class: board\n    pins:\n      vin: { role: supply-in, range: 4.5 V..5.5 V, draw: { typical: 50 mA } }\n      gnd: { role: ground }\n");
    for i in 0..48 {
        plan.push_str(&format!(
            "      i{i}: {{ role: logic-in, ref: vin, family: cmos5 }}\n"
        ));
    }
    plan.push_str("nets:\n  BATT+: [pack.pos, buck.vin]\n  GND: [pack.neg, buck.gnd, head.gnd, logger.gnd]\n  5V: [buck.vout, head.vcc, logger.vin]\n");
    for i in 0..48 {
        plan.push_str(&format!("  S{i}: [head.o{i}, logger.i{i}]\n"));
    }
    let checked = check("tall.yaml", &plan);
    let page = Page {
        paper: Paper::A4,
        landscape: true,
    };
    let error = railcheck::diagram::draw_pages(&checked, Some(page)).unwrap_err();
    let message = error.to_string();
    assert!(message.contains("a4 landscape"), "{message}");
    assert!(message.contains("7 pt"), "{message}");
    let fits = error.fits.expect("a larger page holds it");
    assert!(
        message.contains(&format!("--page {}", fits.paper.name())),
        "{message}"
    );
    // The page it names does take it.
    assert!(railcheck::diagram::draw_pages(&checked, Some(fits)).is_ok());
}

/// Frames of rail tags and off-page connectors, each with the texts inside.
fn frames_of(svg: &str) -> Vec<(String, Bounds)> {
    let doc = Document::parse(svg).unwrap();
    doc.descendants()
        .filter(|n| {
            n.has_tag_name("rect") && (has_class(n, "tag-frame") || has_class(n, "off-page"))
        })
        .map(|n| {
            let (x, y) = (number(&n, "x"), number(&n, "y"));
            let name = n
                .attribute("data-net")
                .map(|net| format!("flag {net}"))
                .unwrap_or_else(|| "tag".to_string());
            (
                name,
                Bounds {
                    x0: x,
                    y0: y,
                    x1: x + number(&n, "width"),
                    y1: y + number(&n, "height"),
                },
            )
        })
        .collect()
}

/// Everything a printed sheet must keep: the checks of the unpaged drawing
/// (no overlaps, no line through a box or label, no line end in open
/// space), frames (rail tags, off-page connectors) clear of each other and
/// of boxes, every text inside a frame or clear of them all, everything on
/// the paper, and no text under 7 pt.
fn assert_clean_sheet(svg: &str, what: &str) {
    assert_nothing_overlaps(svg, what);
    let pic = picture(svg);
    let frames = frames_of(svg);
    for (i, (a, fa)) in frames.iter().enumerate() {
        for (b, fb) in &frames[i + 1..] {
            assert!(
                !fa.overlaps(fb),
                "{what}: {a} and {b} overlap at {fa:?} / {fb:?}"
            );
        }
        for (part, bounds) in &pic.boxes {
            assert!(!fa.overlaps(bounds), "{what}: {a} overlaps box `{part}`");
        }
        for label in &pic.labels {
            assert!(
                !label.bounds.overlaps(fa) || fa.contains(&label.bounds),
                "{what}: label {:?} straddles {a} at {fa:?}",
                label.text
            );
        }
    }
    let doc = Document::parse(svg).unwrap();
    let view: Vec<f64> = doc
        .root_element()
        .attribute("viewBox")
        .unwrap()
        .split(' ')
        .map(|v| v.parse().unwrap())
        .collect();
    let paper = Bounds {
        x0: view[0],
        y0: view[1],
        x1: view[0] + view[2],
        y1: view[1] + view[3],
    };
    for (part, bounds) in &pic.boxes {
        assert!(
            paper.contains(bounds),
            "{what}: box `{part}` is off the paper"
        );
    }
    for (name, frame) in &frames {
        assert!(paper.contains(frame), "{what}: {name} is off the paper");
    }
    for label in &pic.labels {
        assert!(
            paper.contains(&label.bounds),
            "{what}: {:?} is off the paper at {:?}",
            label.text,
            label.bounds
        );
    }
    for (class, net, s) in &pic.segments {
        for end in [(s[0], s[1]), (s[2], s[3])] {
            assert!(
                paper.contains(&Bounds {
                    x0: end.0,
                    y0: end.1,
                    x1: end.0,
                    y1: end.1
                }),
                "{what}: {class} `{net}` runs off the paper at {end:?}"
            );
        }
    }
    for (text, size) in printed_text_sizes(svg) {
        // The 7 pt floor, with rounding of the written numbers.
        assert!(
            size >= 7.0 - 1e-6,
            "{what}: {text:?} prints at {size:.2} pt"
        );
    }
}

#[test]
fn every_sheet_is_clean_on_every_page() {
    use railcheck::diagram::{Page, Paper};
    let mut plans: Vec<(String, railcheck::Checked)> = examples()
        .iter()
        .map(|path| {
            let name = format!("examples/{}", path.file_name().unwrap().to_string_lossy());
            let text = std::fs::read_to_string(path).unwrap();
            (name.clone(), check(&name, &text))
        })
        .collect();
    plans.push((
        "50-part plan".to_string(),
        check("generated.yaml", &generate::plan(50)),
    ));
    for (name, checked) in &plans {
        for paper in Paper::ALL {
            for landscape in [false, true] {
                let page = Page { paper, landscape };
                let sheets = railcheck::diagram::draw_pages(checked, Some(page))
                    .unwrap_or_else(|e| panic!("{name} on {page}: {e}"));
                for (i, svg) in sheets.svgs.iter().enumerate() {
                    assert_clean_sheet(svg, &format!("{name} on {page}, sheet {}", i + 1));
                }
            }
        }
    }
}

#[test]
fn the_pdf_has_a_page_per_sheet() {
    use railcheck::diagram::{Page, Paper};
    let checked = rover_plan();
    let page = Page {
        paper: Paper::A4,
        landscape: false,
    };
    let sheets = railcheck::diagram::draw_pages(&checked, Some(page)).unwrap();
    let mut options = resvg::usvg::Options::default();
    options.fontdb_mut().load_system_fonts();
    let pdf = railcheck::diagram::pdf(&sheets.svgs, &options).unwrap();
    assert!(pdf.starts_with(b"%PDF-"), "not a PDF");
    let text = String::from_utf8_lossy(&pdf);
    let pages = text.matches("/Type /Page ").count();
    assert_eq!(pages, sheets.svgs.len());
    assert!(text.contains(&format!("/Count {pages}")));
    // A4 portrait in points: 210 mm × 72 / 25.4 = 595.28, 297 mm → 841.89.
    assert_eq!(
        text.matches("/MediaBox [0 0 595.276 841.89]").count(),
        pages
    );
    assert!(text.trim_end().ends_with("%%EOF"));
}

fn examples() -> Vec<PathBuf> {
    let mut plans: Vec<PathBuf> =
        std::fs::read_dir(Path::new(env!("CARGO_MANIFEST_DIR")).join("examples"))
            .expect("examples folder")
            .map(|e| e.unwrap().path())
            .filter(|p| p.extension().is_some_and(|e| e == "yaml"))
            .collect();
    plans.sort();
    plans
}

#[test]
fn example_plans_draw_cleanly() {
    let plans = examples();
    assert!(!plans.is_empty());
    for path in plans {
        let text = std::fs::read_to_string(&path).unwrap();
        let name = format!("examples/{}", path.file_name().unwrap().to_string_lossy());
        let svg = draw(&name, &text);
        assert_clean_geometry(&svg, &name);
        assert!(!picture(&svg).segments.is_empty(), "{name}: no connections");
        assert_eq!(svg, draw(&name, &text), "{name}: two runs differ");
    }
}

#[test]
fn generated_plans_of_10_50_and_200_parts_draw_cleanly() {
    for parts in [10, 50, 200] {
        let text = generate::plan(parts);
        let what = format!("{parts}-part plan");
        let svg = draw("generated.yaml", &text);
        assert_clean_geometry(&svg, &what);
        let pic = picture(&svg);
        assert!(!pic.segments.is_empty(), "{what}: no connections");
        assert_eq!(
            pic.boxes.len(),
            check("generated.yaml", &text).plan.parts.len()
        );
    }
}

#[test]
fn the_same_plan_gives_the_same_bytes() {
    let text = generate::plan(50);
    let first = draw("generated.yaml", &text);
    for _ in 0..3 {
        assert_eq!(first, draw("generated.yaml", &text));
    }
}

#[test]
fn a_plan_named_like_markup_stays_text() {
    let plan = "railcheck: 1\nname: \"<script>alert(1)</script>\"\nparts:\n  pack: { use: battery/lipo-3s }\n  lamp: { use: load/lamp-12v }\nnets:\n  BATT+: [pack.pos, lamp.vin]\n  GND: [pack.neg, lamp.gnd]\n";
    let svg = draw("a<b>&\"c\".yaml", plan);
    assert!(!svg.contains("<script"), "raw markup in the output");
    let doc = Document::parse(&svg).expect("well-formed XML");
    // XML 1.0: an element is only what the markup opens; escaped text is data.
    assert!(doc.descendants().all(|n| !n.has_tag_name("script")));
    let texts: Vec<String> = doc
        .descendants()
        .filter(|n| n.has_tag_name("text"))
        .map(|n| text_of(&n))
        .collect();
    assert!(
        texts.iter().any(|t| t == "<script>alert(1)</script>"),
        "{texts:?}"
    );
    assert!(
        texts.iter().any(|t| t.contains("a<b>&\"c\".yaml")),
        "{texts:?}"
    );
}

#[test]
fn characters_xml_cannot_hold_are_dropped() {
    // XML 1.0 §2.2 allows no U+0001..U+0008 in a document, escaped or not;
    // YAML writes them as `\x01` in double quotes.
    let plan = "railcheck: 1\nname: \"bell\\x07 and\\x01 start\"\nparts:\n  pack: { use: battery/lipo-3s }\n  lamp: { use: load/lamp-12v }\nnets:\n  BATT+: [pack.pos, lamp.vin]\n  GND: [pack.neg, lamp.gnd]\n";
    let svg = draw("plan.yaml", plan);
    let doc = Document::parse(&svg).expect("well-formed XML despite control characters");
    assert!(
        doc.descendants()
            .any(|n| n.has_tag_name("text") && text_of(&n) == "bell and start")
    );
}

/// A battery, a fuse, a switch, a regulator and a board in a chain.
const CHAIN: &str = "railcheck: 1
name: bench chain
parts:
  pack: { use: battery/lipo-3s }
  fuse: { use: fuse/blade-5a }
  kill: { use: switch/estop-20a }
  buck: { use: regulator/buck-5v-3a }
  brain: { use: board/sbc-5v }
nets:
  BATT+: [pack.pos, fuse.a]
  FUSED: [fuse.b, kill.a]
  VSYS: [kill.b, buck.vin]
  5V: [buck.vout, brain.vin]
  GND: [pack.neg, buck.gnd, brain.gnd]
";

fn part_box(svg: &str, part: &str) -> Bounds {
    picture(svg)
        .boxes
        .into_iter()
        .find(|(p, _)| p == part)
        .unwrap_or_else(|| panic!("no box for {part}"))
        .1
}

#[test]
fn columns_follow_the_power_from_source_to_load() {
    let svg = draw("chain.yaml", CHAIN);
    assert_clean_geometry(&svg, "chain");
    // The issue: sources → protection → conversion → loads, left to right.
    let order = ["pack", "fuse", "kill", "buck", "brain"];
    for pair in order.windows(2) {
        let (a, b) = (part_box(&svg, pair[0]), part_box(&svg, pair[1]));
        assert!(a.x1 < b.x0, "{} should stand left of {}", pair[0], pair[1]);
    }
}

fn tag_lines(svg: &str, net: &str) -> Vec<String> {
    let doc = Document::parse(svg).unwrap();
    let tag = doc
        .descendants()
        .find(|n| has_class(n, "tag") && n.attribute("data-net") == Some(net))
        .unwrap_or_else(|| panic!("no tag for {net}"));
    tag.descendants()
        .filter(|n| has_class(n, "tag-text"))
        .map(|n| text_of(&n))
        .collect()
}

#[test]
fn a_rail_tag_shows_its_voltage_window_current_and_wire() {
    // A 3S lithium-polymer pack with no internal resistance straight onto a
    // lamp: open-circuit 3 × 3.00 V = 9 V empty and 3 × 4.20 V = 12.6 V full
    // (per-cell window, format reference §3). The lamp draws 0.4 A typical and
    // 0.6 A peak (`worst` puts it at peak). The supply is 1 m of 18 AWG:
    // d = 0.127 mm × 92^((36 − 18)/39) = 1.024 mm (ASTM B258), A = 0.823 mm²,
    // R = 0.017241 Ω·mm²/m / 0.823 mm² × 1 m = 20.9 mΩ (IEC 60028 annealed
    // copper). At the lamp in the typical mode: 9 − 0.4 × 0.0209 = 8.992 V
    // empty → 8.99 V at three figures, 12.6 − 0.008 = 12.59 V full → 12.6 V.
    let plan = "railcheck: 1
name: lamp test
parts:
  pack: { class: battery, chemistry: lipo, cells: 3 }
  lamp:
    class: load
    pins:
      vin: { role: supply-in, range: 8 V..13 V, max: 16 V, draw: { typical: 0.4 A, peak: 0.6 A } }
      gnd: { role: ground }
nets:
  BATT+: { pins: [pack.pos, lamp.vin], wire: 18 AWG, length: 1 m }
  GND: [pack.neg, lamp.gnd]
";
    let svg = draw("lamp.yaml", plan);
    let lines = tag_lines(&svg, "BATT+");
    assert_eq!(
        lines,
        vec![
            "BATT+",
            "8.99 V–12.6 V",
            "400 mA typical / 600 mA peak",
            "18 AWG · 1 m"
        ]
    );
    assert_clean_geometry(&svg, "lamp");
}

#[test]
fn a_part_whose_ground_misses_the_battery_is_marked() {
    // The sensor's ground goes to a net no battery negative is on: the
    // `ground/floating` rule fires, and the picture must show it.
    let plan = "railcheck: 1
name: loose ground
parts:
  pack: { use: battery/lipo-3s }
  buck: { use: regulator/buck-5v-3a }
  probe:
    class: sensor
    pins:
      vcc: { role: supply-in, range: 4.5 V..5.5 V, draw: { typical: 20 mA } }
      gnd: { role: ground }
nets:
  BATT+: [pack.pos, buck.vin]
  5V: [buck.vout, probe.vcc]
  GND: [pack.neg, buck.gnd]
  PROBE_GND: [probe.gnd]
";
    let checked = check("loose.yaml", plan);
    let floating = checked
        .findings
        .iter()
        .position(|f| f.rule == "ground/floating")
        .expect("the rule fires");
    let svg = railcheck::diagram::draw(&checked);
    assert_clean_geometry(&svg, "loose ground");
    let doc = Document::parse(&svg).unwrap();
    let probe = doc
        .descendants()
        .find(|n| n.attribute("data-part") == Some("probe"))
        .unwrap();
    assert!(has_class(&probe, "floating"), "the part is not marked");
    assert!(
        probe
            .descendants()
            .any(|n| has_class(&n, "floating-ground")),
        "no floating-ground symbol at its ground pin"
    );
    let number = (floating + 1).to_string();
    assert!(
        probe.descendants().any(|n| has_class(&n, "marker")
            && has_class(&n, "error")
            && n.attribute("data-finding") == Some(number.as_str())),
        "no error marker {number} on the part"
    );
    // A grounded part is never marked floating; its ground here is the
    // battery negative's lead, drawn as a line.
    let buck = doc
        .descendants()
        .find(|n| n.attribute("data-part") == Some("buck"))
        .unwrap();
    assert!(!buck.descendants().any(|n| has_class(&n, "floating-ground")));
    assert!(
        doc.descendants()
            .any(|n| has_class(&n, "ground-lead") && n.attribute("data-net") == Some("GND")),
        "the battery negative's lead is not drawn"
    );
    // With two grounds in the plan, each symbol says which one it is.
    let texts = |part: Node| -> Vec<String> {
        part.descendants()
            .filter(|n| n.has_tag_name("text"))
            .map(|n| text_of(&n))
            .collect()
    };
    assert!(
        texts(probe).contains(&"PROBE_GND".to_string()),
        "{:?}",
        texts(probe)
    );
    // With one ground, the symbols need no names.
    let chain = draw("chain.yaml", CHAIN);
    let chain_doc = Document::parse(&chain).unwrap();
    let chain_buck = chain_doc
        .descendants()
        .find(|n| n.attribute("data-part") == Some("buck"))
        .unwrap();
    assert!(!texts(chain_buck).contains(&"GND".to_string()));
}

/// A pack through a two-way power connector to a buck, and a probe whose
/// ground comes through a header contact: BATT− and GND have wire sizes,
/// PROBE_GND has none.
const RETURNS: &str = "railcheck: 1
name: greenhouse probe cart
parts:
  pack: { use: battery/lipo-3s }
  plug: { use: connector/power-2pin-30a }
  buck: { use: regulator/buck-5v-3a }
  header: { use: connector/header-2pin-3a }
  probe:
    class: sensor
    pins:
      vcc: { role: supply-in, range: 4.5 V..5.5 V, draw: { typical: 20 mA } }
      gnd: { role: ground }
nets:
  BATT+: { pins: [pack.pos, plug.a1], wire: 12 AWG, length: 20 cm }
  BATT-: { pins: [pack.neg, plug.a2], wire: 12 AWG, length: 20 cm }
  VBAT: { pins: [plug.b1, buck.vin], wire: 14 AWG, length: 30 cm }
  GND: { pins: [plug.b2, buck.gnd, header.a1], wire: 14 AWG, length: 30 cm }
  5V: [buck.vout, header.a2]
  PROBE_5V: [header.b2, probe.vcc]
  PROBE_GND: [header.b1, probe.gnd]
";

#[test]
fn ground_leads_with_a_wire_are_drawn_through_their_contacts() {
    let svg = draw("returns.yaml", RETURNS);
    assert_clean_geometry(&svg, "returns");
    let pic = picture(&svg);
    let doc = Document::parse(&svg).unwrap();
    // BATT− and GND are lines of their own kind, never a rail's.
    for net in ["BATT-", "GND"] {
        let classes: Vec<&str> = pic
            .segments
            .iter()
            .filter(|(_, n, _)| n == net)
            .map(|(c, _, _)| c.as_str())
            .collect();
        assert!(!classes.is_empty(), "{net} is not drawn");
        assert!(
            classes
                .iter()
                .all(|c| c.contains("ground-lead") && !c.contains("rail")),
            "{net}: {classes:?}"
        );
    }
    // Their tags give the wire: 12 AWG for 20 cm, 14 AWG for 30 cm.
    assert!(tag_lines(&svg, "BATT-").contains(&"12 AWG · 0.2 m".to_string()));
    assert!(tag_lines(&svg, "GND").contains(&"14 AWG · 0.3 m".to_string()));
    // The power connector's ground contact sits on the path: a lead ends on
    // each side of the plug's box, at pins a2 and b2.
    let plug = part_box(&svg, "plug");
    let on_edge = |net: &str, x: f64| {
        pic.segments.iter().any(|(_, n, [x1, y1, x2, y2])| {
            n == net
                && [(x1, y1), (x2, y2)]
                    .iter()
                    .any(|(px, py)| (**px - x).abs() < EPS && **py > plug.y0 && **py < plug.y1)
        })
    };
    assert!(on_edge("BATT-", plug.x0) || on_edge("BATT-", plug.x1));
    assert!(on_edge("GND", plug.x0) || on_edge("GND", plug.x1));
    let plug_texts: Vec<String> = doc
        .descendants()
        .find(|n| n.attribute("data-part") == Some("plug"))
        .unwrap()
        .descendants()
        .filter(|n| n.has_tag_name("text"))
        .map(|n| text_of(&n))
        .collect();
    for pin in ["a2", "b2"] {
        assert!(
            plug_texts.iter().any(|t| t.split(' ').next() == Some(pin)),
            "{pin}: {plug_texts:?}"
        );
    }
    // PROBE_GND has no wire given and no battery on it: a symbol at the probe.
    assert!(!pic.segments.iter().any(|(_, n, _)| n == "PROBE_GND"));
    let probe = doc
        .descendants()
        .find(|n| n.attribute("data-part") == Some("probe"))
        .unwrap();
    assert!(probe.descendants().any(|n| has_class(&n, "ground-symbol")));
}

#[test]
fn every_finding_is_numbered_marked_and_listed() {
    // A rig wired in a hurry (the fixture's comment lists its mistakes):
    // errors and a warning, on parts and on nets.
    let text = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/diagram/many-findings.yaml"),
    )
    .unwrap();
    let checked = check("many-findings.yaml", &text);
    assert!(checked.findings.len() >= 2, "{:?}", checked.findings);
    let svg = railcheck::diagram::draw(&checked);
    assert_clean_geometry(&svg, "many findings");
    let doc = Document::parse(&svg).unwrap();
    let panel = doc
        .descendants()
        .find(|n| has_class(n, "findings-panel"))
        .unwrap();
    for (i, finding) in checked.findings.iter().enumerate() {
        let number = (i + 1).to_string();
        let listed = panel.descendants().find(|n| {
            has_class(n, "marker") && n.attribute("data-finding") == Some(number.as_str())
        });
        let listed = listed.unwrap_or_else(|| panic!("finding {number} not in the panel"));
        assert!(has_class(&listed, finding.severity.name()));
        let panel_text: String = panel
            .descendants()
            .filter(|n| n.has_tag_name("text"))
            .map(|n| text_of(&n))
            .collect::<Vec<_>>()
            .join(" ");
        assert!(
            panel_text.contains(finding.rule),
            "{} not listed",
            finding.rule
        );
        // On the drawing: a marker on every named part.
        for part in &finding.parts {
            let group = doc
                .descendants()
                .find(|n| has_class(n, "part") && n.attribute("data-part") == Some(part.as_str()))
                .unwrap();
            assert!(
                group.descendants().any(|n| has_class(&n, "marker")
                    && n.attribute("data-finding") == Some(number.as_str())),
                "finding {number} has no marker on `{part}`"
            );
        }
        // And on the tag of every named net.
        for net in &finding.nets {
            let tag = doc
                .descendants()
                .find(|n| has_class(n, "tag") && n.attribute("data-net") == Some(net.as_str()))
                .unwrap_or_else(|| panic!("no tag for net `{net}`"));
            assert!(
                tag.descendants().any(|n| has_class(&n, "marker")
                    && n.attribute("data-finding") == Some(number.as_str())),
                "finding {number} has no marker on net `{net}`"
            );
        }
    }
    // Each finding's fix is printed under its message, so the printed notes
    // say what to change, not only what is wrong.
    let fixes: String = panel
        .descendants()
        .filter(|n| has_class(n, "panel-fix"))
        .map(|n| text_of(&n))
        .collect::<Vec<_>>()
        .join(" ");
    for finding in &checked.findings {
        let help = finding
            .help
            .as_deref()
            .expect("every rule here suggests a fix");
        let first_words: String = help
            .replace('`', "")
            .split(' ')
            .take(4)
            .collect::<Vec<_>>()
            .join(" ");
        assert!(
            fixes.contains(&first_words),
            "fix {first_words:?} of {} missing",
            finding.rule
        );
    }
    // No terminal markup reaches the paper.
    assert!(!panel_texts(&doc).contains('`'));
    let severities: std::collections::BTreeSet<_> =
        checked.findings.iter().map(|f| f.severity).collect();
    assert!(severities.len() >= 2, "{severities:?}");
    assert!(checked.findings.iter().any(|f| !f.nets.is_empty()));
}

#[test]
fn without_an_operating_point_the_diagram_still_draws() {
    // The fuse joins the pack's positive to its negative: a short, so the
    // operating point is not solved (format reference §7) and no voltage is shown.
    let plan = "railcheck: 1
name: greenhouse cart, miswired fuse
parts:
  pack: { use: battery/lipo-3s }
  main_fuse: { use: fuse/blade-10a }
  lamp: { use: load/lamp-12v }
nets:
  BATT+: [pack.pos, main_fuse.a]
  OOPS: [main_fuse.b, pack.neg, lamp.gnd]
  LAMP: [lamp.vin]
";
    let checked = check("short.yaml", plan);
    assert!(checked.analysis.is_none());
    let svg = railcheck::diagram::draw(&checked);
    assert_clean_geometry(&svg, "short");
    let doc = Document::parse(&svg).unwrap();
    let tag_text: Vec<String> = doc
        .descendants()
        .filter(|n| has_class(n, "tag-text"))
        .map(|n| text_of(&n))
        .collect();
    assert!(!tag_text.is_empty());
    assert!(
        tag_text
            .iter()
            .all(|t| !t.ends_with(" V") && !t.contains(" V–")),
        "{tag_text:?}"
    );
    assert!(svg.contains("not solved"));
    // The shorted rail is still drawn as a rail, so the short shows.
    assert!(
        picture(&svg)
            .segments
            .iter()
            .any(|(class, net, _)| class.contains("rail") && net == "BATT+")
    );
}

#[test]
fn a_power_loop_still_draws_in_columns() {
    // The boost feeds the buck and the buck feeds the boost: the cycle is
    // broken for the columns, and both converters still get a place.
    let plan = "railcheck: 1
name: lab prototype, converter ring
parts:
  pack: { use: battery/lipo-3s }
  boost: { use: regulator/boost-12v }
  buck: { use: regulator/buck-5v-3a }
  lamp: { use: load/lamp-12v }
nets:
  VIN: [boost.vout, buck.vin, lamp.vin]
  5V: [buck.vout, boost.vin]
  GND: [pack.neg, boost.gnd, buck.gnd, lamp.gnd]
  BATT+: [pack.pos]
";
    let svg = draw("ring.yaml", plan);
    assert_clean_geometry(&svg, "ring");
    assert_eq!(picture(&svg).boxes.len(), 4);
}

fn stroke_of(node: &Node) -> (String, String, String) {
    (
        node.attribute("stroke").unwrap_or_default().to_string(),
        node.attribute("stroke-width")
            .unwrap_or_default()
            .to_string(),
        node.attribute("stroke-dasharray")
            .unwrap_or_default()
            .to_string(),
    )
}

#[test]
fn signals_look_different_from_power_and_the_legend_shows_every_style() {
    let text = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/orchard-rover.yaml"),
    )
    .unwrap();
    let svg = draw("orchard-rover.yaml", &text);
    let doc = Document::parse(&svg).unwrap();
    let mut styles: std::collections::BTreeMap<String, (String, String, String)> =
        std::collections::BTreeMap::new();
    for node in doc.descendants().filter(|n| has_class(n, "wire")) {
        let kind = node
            .attribute("class")
            .unwrap()
            .split(' ')
            .find(|c| *c != "wire")
            .unwrap()
            .to_string();
        let style = stroke_of(&node);
        if let Some(seen) = styles.get(&kind) {
            assert_eq!(seen, &style, "{kind} drawn two ways");
        }
        styles.insert(kind, style);
    }
    for kind in ["rail", "signal", "motor-lead", "cable"] {
        assert!(
            styles.contains_key(kind),
            "the rover has {kind} connections"
        );
    }
    let (rail, signal) = (&styles["rail"], &styles["signal"]);
    assert!(
        rail.1 != signal.1 && rail.2 != signal.2,
        "{rail:?} vs {signal:?}"
    );
    // Every connection style and every marker class drawn appears in the legend.
    let legend = doc.descendants().find(|n| has_class(n, "legend")).unwrap();
    let legend_styles: Vec<(String, String, String)> = legend
        .descendants()
        .filter(|n| n.has_tag_name("path"))
        .map(|n| stroke_of(&n))
        .collect();
    for (kind, style) in &styles {
        assert!(
            legend_styles.contains(style),
            "{kind} {style:?} not in the legend"
        );
    }
    for severity in ["error", "warning", "note"] {
        assert!(
            legend
                .descendants()
                .any(|n| has_class(&n, "marker") && has_class(&n, severity)),
            "{severity} marker not in the legend"
        );
    }
    assert!(legend.descendants().any(|n| has_class(&n, "ground-symbol")));
    assert!(
        legend
            .descendants()
            .any(|n| has_class(&n, "floating-ground"))
    );
}

#[test]
fn title_block_and_cautions() {
    let svg = draw("chain.yaml", CHAIN);
    let doc = Document::parse(&svg).unwrap();
    let texts = |class: &str| -> String {
        let group = doc.descendants().find(|n| has_class(n, class)).unwrap();
        group
            .descendants()
            .filter(|n| n.has_tag_name("text"))
            .map(|n| text_of(&n))
            .collect::<Vec<_>>()
            .join(" ")
    };
    let title = texts("title-block");
    assert!(title.contains("bench chain"));
    assert!(title.contains("chain.yaml"));
    assert!(title.contains(&format!("railcheck {}", env!("CARGO_PKG_VERSION"))));
    let footer = texts("cautions");
    let checked = check("chain.yaml", CHAIN);
    for caution in railcheck::safety::cautions(&checked.plan) {
        let first_words: String = caution.split(' ').take(4).collect::<Vec<_>>().join(" ");
        assert!(footer.contains(&first_words), "{first_words:?} missing");
    }
    assert!(
        footer.contains("Lithium"),
        "a lipo pack needs the lithium caution"
    );
}

fn panel_texts(doc: &Document) -> String {
    doc.descendants()
        .filter(|n| has_class(n, "findings-panel"))
        .flat_map(|g| g.descendants().filter(|n| n.has_tag_name("text")))
        .map(|n| text_of(&n))
        .collect::<Vec<_>>()
        .join(" ")
}

#[test]
fn boxes_name_their_library_part_and_the_title_block_its_revision() {
    // The rover's plan gives revision D, its date and its author; its pack is
    // `use: battery/lipo-3s` (examples/orchard-rover.yaml).
    let svg = rover_svg();
    let doc = Document::parse(&svg).unwrap();
    let title: String = doc
        .descendants()
        .filter(|n| has_class(n, "title"))
        .map(|n| text_of(&n))
        .collect::<Vec<_>>()
        .join(" ");
    assert!(
        title.contains("revision D · dated 2026-11-20 · drawn by Orchard robotics group"),
        "{title}"
    );
    let pack = doc
        .descendants()
        .find(|n| n.attribute("data-part") == Some("pack"))
        .unwrap();
    let lines: Vec<String> = pack
        .descendants()
        .filter(|n| n.has_tag_name("text"))
        .map(|n| text_of(&n))
        .collect();
    assert_eq!(&lines[..2], ["pack", "battery/lipo-3s"], "{lines:?}");
    // A plan without those fields prints no empty record line.
    let chain = draw("chain.yaml", CHAIN);
    assert!(!chain.contains("revision") && !chain.contains("drawn by"));
}

fn rover_svg() -> String {
    let text = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/orchard-rover.yaml"),
    )
    .unwrap();
    draw("examples/orchard-rover.yaml", &text)
}

#[test]
fn an_svg_renderer_draws_it() {
    let svg = rover_svg();
    let options = resvg::usvg::Options::default();
    let tree = resvg::usvg::Tree::from_str(&svg, &options).expect("usvg reads the diagram");
    let size = tree.size().to_int_size();
    let mut pixmap = resvg::tiny_skia::Pixmap::new(size.width(), size.height()).unwrap();
    resvg::render(
        &tree,
        resvg::tiny_skia::Transform::default(),
        &mut pixmap.as_mut(),
    );
    let pixels = pixmap.pixels();
    let inked = pixels
        .iter()
        .filter(|p| p.alpha() == 255 && (p.red() < 200 || p.green() < 200 || p.blue() < 200))
        .count();
    assert!(inked > pixels.len() / 100, "only {inked} inked pixels");
    // The middle of the battery box's top edge is outline ink, not paper.
    let pack = part_box(&svg, "pack");
    let x = ((pack.x0 + pack.x1) / 2.0) as u32;
    let y = pack.y0.round() as u32;
    let darkest = (y - 1..=y + 1)
        .filter_map(|row| pixmap.pixel(x, row))
        .map(|p| u32::from(p.red()) + u32::from(p.green()) + u32::from(p.blue()))
        .min()
        .unwrap();
    // Paper sums to 765 and the box tint to about 685; the outline ink is far darker.
    assert!(darkest < 450, "the box outline at ({x}, {y}) is not drawn");
}

#[test]
fn png_export_writes_a_png() {
    let svg = draw("chain.yaml", CHAIN);
    let png = railcheck::diagram::png(&svg, &resvg::usvg::Options::default()).unwrap();
    // PNG signature, ISO/IEC 15948 §5.2.
    assert_eq!(&png[..8], &[0x89, b'P', b'N', b'G', 0x0d, 0x0a, 0x1a, 0x0a]);
    assert!(railcheck::diagram::png("not svg", &resvg::usvg::Options::default()).is_err());
}

#[test]
fn laid_out_text_from_a_real_font_stays_in_place() {
    // The estimate above counts characters; here the renderer lays the text
    // out with a real monospace face (when the machine has one) and the
    // same rules must hold for the glyph boxes it measures.
    let svg = rover_svg();
    let mut options = resvg::usvg::Options::default();
    options.fontdb_mut().load_system_fonts();
    let Some(family) = first_monospaced_family(&options.fontdb) else {
        eprintln!("no monospace font installed: the real-font check is skipped");
        return;
    };
    // The SVG asks for the generic family only; point it at that face.
    options.fontdb_mut().set_monospace_family(family);
    let tree = resvg::usvg::Tree::from_str(&svg, &options).unwrap();
    let mut measured = Vec::new();
    collect_text_boxes(tree.root(), &mut measured);
    let pic = picture(&svg);
    assert!(
        measured.len() >= pic.labels.len() * 9 / 10,
        "texts went missing"
    );
    for (content, b) in &measured {
        for (part, bounds) in &pic.boxes {
            if b.overlaps(bounds) {
                assert!(bounds.contains(b), "{content:?} spills out of box `{part}`");
            }
        }
    }
    for (i, (ta, a)) in measured.iter().enumerate() {
        for (tb, b) in &measured[i + 1..] {
            assert!(!a.overlaps(b), "{ta:?} and {tb:?} overlap");
        }
    }
}

/// The family of the first face the font database flags as monospaced (the
/// fixed-pitch flag of the face's `post` table).
fn first_monospaced_family(fonts: &resvg::usvg::fontdb::Database) -> Option<String> {
    fonts
        .faces()
        .filter(|face| face.monospaced)
        .find_map(|face| face.families.first().map(|(name, _)| name.clone()))
}

#[test]
fn png_export_draws_labels_when_the_generic_monospace_face_is_missing() {
    // A font database whose generic families all name faces that are not
    // installed: the PNG must still carry the labels, drawn with a face that
    // is installed and monospaced.
    let svg = rover_svg();
    let mut options = resvg::usvg::Options::default();
    options.fontdb_mut().load_system_fonts();
    if first_monospaced_family(&options.fontdb).is_none() {
        eprintln!("no monospace font installed: the PNG font check is skipped");
        return;
    }
    let missing = "no face is installed under this family name";
    let fonts = options.fontdb_mut();
    fonts.set_monospace_family(missing);
    fonts.set_serif_family(missing);
    fonts.set_sans_serif_family(missing);
    let png = railcheck::diagram::png(&svg, &options).unwrap();
    let pixmap = resvg::tiny_skia::Pixmap::decode_png(&png).unwrap();
    let pic = picture(&svg);
    // A label's box holds ink when its darkest and lightest pixels differ
    // clearly; without text the inside of a label is one flat fill.
    let inked = |b: &Bounds| {
        let sums: Vec<u32> = (b.y0.ceil() as u32..b.y1.floor() as u32)
            .flat_map(|y| (b.x0.ceil() as u32..b.x1.floor() as u32).map(move |x| (x, y)))
            .filter_map(|(x, y)| pixmap.pixel(x, y))
            .map(|p| u32::from(p.red()) + u32::from(p.green()) + u32::from(p.blue()))
            .collect();
        let (Some(low), Some(high)) = (sums.iter().min(), sums.iter().max()) else {
            return false;
        };
        high - low > 150
    };
    let drawn = pic.labels.iter().filter(|l| inked(&l.bounds)).count();
    assert!(
        drawn >= pic.labels.len() * 9 / 10,
        "only {drawn} of {} labels were drawn",
        pic.labels.len()
    );
}

fn collect_text_boxes(group: &resvg::usvg::Group, out: &mut Vec<(String, Bounds)>) {
    for node in group.children() {
        match node {
            resvg::usvg::Node::Group(g) => collect_text_boxes(g, out),
            resvg::usvg::Node::Text(t) => {
                let r = t.abs_bounding_box();
                let content: String = t.chunks().iter().map(|c| c.text()).collect();
                out.push((
                    content,
                    Bounds {
                        x0: f64::from(r.left()),
                        y0: f64::from(r.top()),
                        x1: f64::from(r.right()),
                        y1: f64::from(r.bottom()),
                    },
                ));
            }
            _ => {}
        }
    }
}

#[test]
fn committed_example_diagrams_are_current() {
    // `RAILCHECK_UPDATE_DIAGRAMS=1 cargo test --test diagram` rewrites them.
    let update = std::env::var_os("RAILCHECK_UPDATE_DIAGRAMS").is_some_and(|v| v == "1");
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let rover = root.join("examples/orchard-rover.svg");
    for plan in examples() {
        let svg_path = plan.with_extension("svg");
        if !svg_path.exists() && svg_path != rover {
            continue;
        }
        let text = std::fs::read_to_string(&plan).unwrap();
        let name = format!("examples/{}", plan.file_name().unwrap().to_string_lossy());
        let fresh = draw(&name, &text);
        if update {
            std::fs::write(&svg_path, &fresh).unwrap();
            continue;
        }
        let committed = std::fs::read_to_string(&svg_path).unwrap_or_else(|_| {
            panic!(
                "{} is missing: run `RAILCHECK_UPDATE_DIAGRAMS=1 cargo test --test diagram`",
                svg_path.display()
            )
        });
        assert!(
            committed == fresh,
            "{} is stale: run `RAILCHECK_UPDATE_DIAGRAMS=1 cargo test --test diagram`",
            svg_path.display()
        );
    }
}

/// A small deterministic pseudo-random sequence (64-bit linear congruential
/// generator, constants from Knuth's MMIX), so the random plans below are
/// the same on every run.
struct Sequence(u64);

impl Sequence {
    fn next(&mut self, below: usize) -> usize {
        self.0 = self
            .0
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        ((self.0 >> 33) % below as u64) as usize
    }
}

/// A plan of library parts whose pins are dealt into nets at random: shorts,
/// loops, floating grounds, unfed rails and odd mixtures of roles included.
fn random_plan(seed: u64) -> String {
    const TEMPLATES: &[(&str, &str, &[&str])] = &[
        ("pack", "battery/lipo-3s", &["pos", "neg"]),
        ("fuse", "fuse/blade-5a", &["a", "b"]),
        ("stop", "switch/estop-20a", &["a", "b"]),
        (
            "plug",
            "connector/header-2pin-3a",
            &["a1", "b1", "a2", "b2"],
        ),
        ("buck", "regulator/buck-5v-3a", &["vin", "vout", "gnd"]),
        ("ldo", "regulator/linear-3v3-800ma", &["vin", "vout", "gnd"]),
        (
            "drive",
            "driver/mosfet-dual-hbridge",
            &["vm", "vlogic", "gnd", "out1a", "out1b", "in1", "ena"],
        ),
        ("wheel", "motor/gearmotor-small", &["a", "b"]),
        (
            "mcu",
            "board/mcu-3v3",
            &["vin", "3v3", "gnd", "gpio1", "sda", "scl"],
        ),
        (
            "imu",
            "sensor/imu-3v3",
            &["vcc", "gnd", "scl", "sda", "int"],
        ),
        ("pull", "resistor/pullup-10k", &["a", "b"]),
        ("fan", "load/fan-12v", &["vin", "gnd"]),
        ("sbc", "board/sbc-5v", &["vin", "gnd"]),
    ];
    let mut random = Sequence(seed);
    let names = ["random rig", "电池 rig ✓", "a & b <rig>", "rig 'quoted'"];
    let mut text = format!(
        "railcheck: 1\nname: \"{}\"\nparts:\n",
        names[random.next(names.len())]
    );
    let mut pins = Vec::new();
    let mut boards = (Vec::new(), Vec::new());
    let count = 3 + random.next(28);
    for i in 0..count {
        // Every plan starts from a battery; the rest is chance.
        let (prefix, id, part_pins) = if i == 0 {
            TEMPLATES[0]
        } else {
            TEMPLATES[random.next(TEMPLATES.len())]
        };
        let name = format!("{prefix}{i}");
        text.push_str(&format!("  {name}: {{ use: {id} }}\n"));
        for pin in part_pins {
            pins.push(format!("{name}.{pin}"));
        }
        match prefix {
            "sbc" => boards.0.push(name),
            "mcu" => boards.1.push(name),
            _ => {}
        }
    }
    // Deal the pins (a few stay unconnected) into nets of one to five.
    for i in (1..pins.len()).rev() {
        pins.swap(i, random.next(i + 1));
    }
    text.push_str("nets:\n");
    let mut rest = &pins[..];
    let mut net = 0;
    while !rest.is_empty() {
        let take = (1 + random.next(5)).min(rest.len());
        if random.next(10) > 0 {
            text.push_str(&format!("  N{net}: [{}]\n", rest[..take].join(", ")));
            net += 1;
        }
        rest = &rest[take..];
    }
    let links: Vec<String> = boards
        .0
        .iter()
        .zip(&boards.1)
        .map(|(host, device)| format!("  - {{ usb: [{host}.usb1, {device}.usb] }}\n"))
        .collect();
    if !links.is_empty() {
        text.push_str("links:\n");
        text.push_str(&links.concat());
    }
    text
}

#[test]
fn random_plans_never_break_the_picture() {
    let mut drawn = 0;
    for seed in 0..100 {
        let text = random_plan(seed);
        let Ok(checked) = railcheck::check("random.yaml", &text, &Library::builtin()) else {
            continue;
        };
        let svg = railcheck::diagram::draw(&checked);
        assert_clean_geometry(&svg, &format!("random plan {seed}:\n{text}"));
        drawn += 1;
    }
    assert!(
        drawn >= 90,
        "only {drawn} of 100 random plans could be read"
    );
}

mod command {
    //! `railcheck draw` and `railcheck check --diagram`: files written whole,
    //! the plan never overwritten, exit codes as for `check`.

    use assert_cmd::Command;
    use std::path::Path;

    const PLAN: &str = "railcheck: 1\nname: bench lamp\nparts:\n  pack: { use: battery/lipo-3s }\n  fuse: { use: fuse/blade-5a }\n  lamp: { use: load/lamp-12v }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  LAMP: [fuse.b, lamp.vin]\n  GND: [pack.neg, lamp.gnd]\n";

    fn railcheck() -> Command {
        Command::cargo_bin("railcheck").unwrap()
    }

    fn plan_in(dir: &Path) -> std::path::PathBuf {
        let plan = dir.join("plan.yaml");
        std::fs::write(&plan, PLAN).unwrap();
        plan
    }

    #[test]
    fn draw_writes_a_parsable_svg() {
        let dir = tempfile::tempdir().unwrap();
        let plan = plan_in(dir.path());
        let out = dir.path().join("plan.svg");
        railcheck()
            .arg("draw")
            .arg(&plan)
            .arg("-o")
            .arg(&out)
            .assert()
            .code(0);
        let svg = std::fs::read_to_string(&out).unwrap();
        roxmltree::Document::parse(&svg).expect("well-formed XML");
        assert!(svg.contains("bench lamp"));
        // No temporary file is left beside it.
        let names: Vec<_> = std::fs::read_dir(dir.path()).unwrap().collect();
        assert_eq!(names.len(), 2, "{names:?}");
    }

    #[test]
    fn draw_refuses_to_overwrite_the_plan() {
        let dir = tempfile::tempdir().unwrap();
        let plan = plan_in(dir.path());
        railcheck()
            .arg("draw")
            .arg(&plan)
            .arg("-o")
            .arg(&plan)
            .assert()
            .code(2)
            .stderr(predicates::str::contains("plan"));
        assert_eq!(std::fs::read_to_string(&plan).unwrap(), PLAN);
        // Nor through another spelling of the same path.
        let other = dir.path().join(".").join("plan.yaml");
        railcheck()
            .arg("draw")
            .arg(&plan)
            .arg("--png")
            .arg(&other)
            .assert()
            .code(2);
        assert_eq!(std::fs::read_to_string(&plan).unwrap(), PLAN);
    }

    #[test]
    fn an_unreadable_plan_or_folder_is_exit_code_2() {
        let dir = tempfile::tempdir().unwrap();
        let bad = dir.path().join("bad.yaml");
        std::fs::write(
            &bad,
            "railcheck: 1\nparts:\n  pack: { use: battery/no-such-pack }\nnets: {}\n",
        )
        .unwrap();
        let out = dir.path().join("bad.svg");
        railcheck()
            .arg("draw")
            .arg(&bad)
            .arg("-o")
            .arg(&out)
            .assert()
            .code(2);
        assert!(
            !out.exists(),
            "nothing is drawn from a plan that cannot be read"
        );
        let plan = plan_in(dir.path());
        railcheck()
            .arg("draw")
            .arg(&plan)
            .arg("-o")
            .arg(dir.path().join("missing-folder/plan.svg"))
            .assert()
            .code(2);
        railcheck().arg("draw").arg(&plan).assert().code(2);
    }

    #[test]
    fn check_writes_the_diagram_alongside_the_report() {
        let dir = tempfile::tempdir().unwrap();
        let plan = plan_in(dir.path());
        let out = dir.path().join("notes.svg");
        let expected = railcheck()
            .arg("check")
            .arg(&plan)
            .output()
            .unwrap()
            .status
            .code();
        railcheck()
            .arg("check")
            .arg(&plan)
            .arg("--diagram")
            .arg(&out)
            .assert()
            .code(expected.unwrap());
        roxmltree::Document::parse(&std::fs::read_to_string(&out).unwrap()).unwrap();
        railcheck()
            .arg("check")
            .arg(&plan)
            .arg("--diagram")
            .arg(&plan)
            .assert()
            .code(2);
        assert_eq!(std::fs::read_to_string(&plan).unwrap(), PLAN);
    }

    #[test]
    fn draw_png_writes_a_png() {
        let dir = tempfile::tempdir().unwrap();
        let plan = plan_in(dir.path());
        let out = dir.path().join("plan.png");
        railcheck()
            .arg("draw")
            .arg(&plan)
            .arg("--png")
            .arg(&out)
            .assert()
            .code(0);
        let bytes = std::fs::read(&out).unwrap();
        // PNG signature, ISO/IEC 15948 §5.2.
        assert_eq!(
            &bytes[..8],
            &[0x89, b'P', b'N', b'G', 0x0d, 0x0a, 0x1a, 0x0a]
        );
    }

    #[test]
    fn no_sheet_is_written_when_one_would_go_over_the_plan() {
        // The plan is named like the second sheet: nothing at all is
        // written, not even the first sheet.
        let dir = tempfile::tempdir().unwrap();
        let rover = std::fs::read_to_string(
            Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/orchard-rover.yaml"),
        )
        .unwrap();
        let plan = dir.path().join("out-2.svg");
        std::fs::write(&plan, &rover).unwrap();
        let run = railcheck()
            .arg("draw")
            .arg(&plan)
            .args(["--page", "a4", "-o"])
            .arg(dir.path().join("out.svg"))
            .assert()
            .code(2);
        let said = String::from_utf8_lossy(&run.get_output().stderr).to_string();
        assert!(
            said.contains("refusing to write the diagram over the plan"),
            "{said}"
        );
        assert_eq!(std::fs::read_to_string(&plan).unwrap(), rover);
        assert!(!dir.path().join("out-1.svg").exists());
    }

    #[test]
    fn sheets_left_from_a_longer_drawing_are_named_not_deleted() {
        let dir = tempfile::tempdir().unwrap();
        let rover = Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/orchard-rover.yaml");
        let out = dir.path().join("rover.svg");
        let sheets_on = |page: &str| {
            let run = railcheck()
                .arg("draw")
                .arg(&rover)
                .args(["--page", page, "-o"])
                .arg(&out)
                .assert()
                .code(0);
            String::from_utf8_lossy(&run.get_output().stderr).to_string()
        };
        // A4 takes more sheets than A3 (twice its area, ISO 216).
        sheets_on("a4");
        let count = |dir: &Path| {
            std::fs::read_dir(dir)
                .unwrap()
                .filter(|e| {
                    e.as_ref()
                        .unwrap()
                        .file_name()
                        .to_string_lossy()
                        .starts_with("rover-")
                })
                .count()
        };
        let on_a4 = count(dir.path());
        let said = sheets_on("a3");
        assert!(said.contains("left from an earlier drawing"), "{said}");
        assert!(said.contains(&format!("rover-{on_a4}.svg")), "{said}");
        assert_eq!(count(dir.path()), on_a4, "no sheet was deleted");
    }

    #[test]
    fn one_sheet_keeps_the_name_given() {
        let dir = tempfile::tempdir().unwrap();
        let plan = plan_in(dir.path());
        let out = dir.path().join("lamp.svg");
        // Three parts with the legend and cautions fill one A3 sheet.
        railcheck()
            .arg("draw")
            .arg(&plan)
            .args(["--page", "a3", "-o"])
            .arg(&out)
            .assert()
            .code(0);
        let text = std::fs::read_to_string(&out).unwrap();
        assert!(text.contains(r#"width="297mm""#));
        assert!(!dir.path().join("lamp-1.svg").exists());
    }

    #[test]
    fn draw_on_a_page_writes_sheets_and_a_pdf() {
        let dir = tempfile::tempdir().unwrap();
        let rover = Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/orchard-rover.yaml");
        let svg = dir.path().join("rover.svg");
        let pdf = dir.path().join("rover.pdf");
        let run = railcheck()
            .arg("draw")
            .arg(&rover)
            .args(["--page", "a4", "--landscape", "-o"])
            .arg(&svg)
            .arg("--pdf")
            .arg(&pdf)
            .assert()
            .code(0);
        let said = String::from_utf8_lossy(&run.get_output().stderr).to_string();
        assert!(said.contains("sheets on a4 landscape"), "{said}");
        // A PDF file starts with its header (ISO 32000-1 §7.5.2).
        let bytes = std::fs::read(&pdf).unwrap();
        assert!(bytes.starts_with(b"%PDF-"));
        // One SVG per sheet beside the name given, each 297 mm × 210 mm, and
        // the name given itself is not written.
        assert!(!svg.exists(), "the sheets go to numbered files");
        let mut sheets = 0;
        while let Ok(text) =
            std::fs::read_to_string(dir.path().join(format!("rover-{}.svg", sheets + 1)))
        {
            let doc = roxmltree::Document::parse(&text).unwrap();
            assert_eq!(doc.root_element().attribute("width"), Some("297mm"));
            assert_eq!(doc.root_element().attribute("height"), Some("210mm"));
            let header = format!("sheet {} of", sheets + 1);
            assert!(sheets == 0 || text.contains(&header), "{header} missing");
            sheets += 1;
        }
        assert!(sheets >= 2);
        assert!(
            said.contains(&format!("{sheets} sheets on a4 landscape")),
            "{said}"
        );
        // The same count of pages in the PDF.
        let pages = String::from_utf8_lossy(&bytes)
            .matches("/Type /Page ")
            .count();
        assert_eq!(pages, sheets);
        // Several sheets cannot go to standard output as one document.
        let refused = railcheck()
            .arg("draw")
            .arg(&rover)
            .args(["--page", "a4", "-o", "-"])
            .assert()
            .code(2);
        let said = String::from_utf8_lossy(&refused.get_output().stderr).to_string();
        assert!(said.contains("OUT-1.svg"), "{said}");
        assert!(refused.get_output().stdout.is_empty());
        // --landscape needs a page.
        railcheck()
            .arg("draw")
            .arg(&rover)
            .args(["--landscape", "-o"])
            .arg(&svg)
            .assert()
            .code(2);
    }
}
