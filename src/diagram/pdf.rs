//! A vector PDF of parsed SVG trees, one page per tree: every path is
//! written as PDF path operators with its fill and stroke, text as the glyph
//! outlines the SVG renderer lays out (so the page looks exactly like the
//! PNG, with no font to embed). Colours are plain RGB; gradients, patterns,
//! images and opacity are not used by the diagram and are left out.
//!
//! The file follows ISO 32000-1: a catalogue, a page tree, one page object
//! and one deflated content stream per page, a cross-reference table.
//! The same trees give the same bytes (no dates or random identifiers).

use resvg::usvg::{self, Node, Paint, tiny_skia_path::PathSegment};
use std::fmt::Write;

/// Points per CSS pixel: usvg sizes are in px at 96 per inch, PDF in points
/// at 72 per inch.
const PT_PER_PX: f64 = 72.0 / 96.0;

/// A number as PDF writes it: at most three decimals, no exponent.
fn n(v: f64) -> String {
    let v = if v.is_finite() { v } else { 0.0 };
    let text = format!("{:.3}", v);
    let text = text.trim_end_matches('0').trim_end_matches('.');
    if text == "-0" || text.is_empty() {
        "0".to_string()
    } else {
        text.to_string()
    }
}

fn colour(paint: &Paint) -> Option<(f64, f64, f64)> {
    match paint {
        Paint::Color(c) => Some((
            f64::from(c.red) / 255.0,
            f64::from(c.green) / 255.0,
            f64::from(c.blue) / 255.0,
        )),
        _ => None,
    }
}

fn path(p: &usvg::Path, out: &mut String) {
    if !p.is_visible() {
        return;
    }
    let fill = p.fill().and_then(|f| Some((colour(f.paint())?, f.rule())));
    let stroke = p.stroke().and_then(|s| Some((colour(s.paint())?, s)));
    if fill.is_none() && stroke.is_none() {
        return;
    }
    let t = p.abs_transform();
    let _ = writeln!(
        out,
        "q {} {} {} {} {} {} cm",
        n(f64::from(t.sx)),
        n(f64::from(t.ky)),
        n(f64::from(t.kx)),
        n(f64::from(t.sy)),
        n(f64::from(t.tx)),
        n(f64::from(t.ty))
    );
    let mut last = (0.0f32, 0.0f32);
    for segment in p.data().segments() {
        match segment {
            PathSegment::MoveTo(pt) => {
                let _ = writeln!(out, "{} {} m", n(pt.x.into()), n(pt.y.into()));
                last = (pt.x, pt.y);
            }
            PathSegment::LineTo(pt) => {
                let _ = writeln!(out, "{} {} l", n(pt.x.into()), n(pt.y.into()));
                last = (pt.x, pt.y);
            }
            PathSegment::QuadTo(c, pt) => {
                // A quadratic as a cubic: control points two thirds of the
                // way from each end to the quadratic's one.
                let c1 = (
                    last.0 + 2.0 / 3.0 * (c.x - last.0),
                    last.1 + 2.0 / 3.0 * (c.y - last.1),
                );
                let c2 = (
                    pt.x + 2.0 / 3.0 * (c.x - pt.x),
                    pt.y + 2.0 / 3.0 * (c.y - pt.y),
                );
                let _ = writeln!(
                    out,
                    "{} {} {} {} {} {} c",
                    n(c1.0.into()),
                    n(c1.1.into()),
                    n(c2.0.into()),
                    n(c2.1.into()),
                    n(pt.x.into()),
                    n(pt.y.into())
                );
                last = (pt.x, pt.y);
            }
            PathSegment::CubicTo(c1, c2, pt) => {
                let _ = writeln!(
                    out,
                    "{} {} {} {} {} {} c",
                    n(c1.x.into()),
                    n(c1.y.into()),
                    n(c2.x.into()),
                    n(c2.y.into()),
                    n(pt.x.into()),
                    n(pt.y.into())
                );
                last = (pt.x, pt.y);
            }
            PathSegment::Close => out.push_str("h\n"),
        }
    }
    if let Some(((r, g, b), _)) = fill {
        let _ = writeln!(out, "{} {} {} rg", n(r), n(g), n(b));
    }
    if let Some(((r, g, b), s)) = stroke {
        let _ = writeln!(out, "{} {} {} RG", n(r), n(g), n(b));
        let _ = writeln!(out, "{} w", n(s.width().get().into()));
        let cap = match s.linecap() {
            usvg::LineCap::Butt => 0,
            usvg::LineCap::Round => 1,
            usvg::LineCap::Square => 2,
        };
        let join = match s.linejoin() {
            usvg::LineJoin::Miter | usvg::LineJoin::MiterClip => 0,
            usvg::LineJoin::Round => 1,
            usvg::LineJoin::Bevel => 2,
        };
        let _ = writeln!(out, "{cap} J {join} j {} M", n(s.miterlimit().get().into()));
        if let Some(dashes) = s.dasharray() {
            let list: Vec<String> = dashes.iter().map(|d| n((*d).into())).collect();
            let _ = writeln!(out, "[{}] {} d", list.join(" "), n(s.dashoffset().into()));
        }
    }
    let even_odd = matches!(fill, Some((_, usvg::FillRule::EvenOdd)));
    let op = match (fill.is_some(), stroke.is_some(), even_odd) {
        (true, true, false) => "B",
        (true, true, true) => "B*",
        (true, false, false) => "f",
        (true, false, true) => "f*",
        _ => "S",
    };
    out.push_str(op);
    out.push_str("\nQ\n");
}

fn group(g: &usvg::Group, out: &mut String) {
    for node in g.children() {
        match node {
            Node::Group(child) => group(child, out),
            Node::Path(p) => path(p, out),
            Node::Text(t) => group(t.flattened(), out),
            Node::Image(_) => {}
        }
    }
}

/// The PDF of the trees, one page per tree, each page the tree's size.
pub(super) fn write(trees: &[usvg::Tree]) -> Vec<u8> {
    let mut objects: Vec<Vec<u8>> = Vec::new();
    // 1: catalogue, 2: page tree, then per page its page and its content.
    let kids: Vec<String> = (0..trees.len())
        .map(|i| format!("{} 0 R", 3 + 2 * i))
        .collect();
    objects.push(b"<< /Type /Catalog /Pages 2 0 R >>".to_vec());
    objects.push(
        format!(
            "<< /Type /Pages /Kids [{}] /Count {} >>",
            kids.join(" "),
            trees.len()
        )
        .into_bytes(),
    );
    for (i, tree) in trees.iter().enumerate() {
        let size = tree.size();
        let (w, h) = (
            f64::from(size.width()) * PT_PER_PX,
            f64::from(size.height()) * PT_PER_PX,
        );
        let mut content = format!("{} 0 0 {} 0 {} cm\n", n(PT_PER_PX), n(-PT_PER_PX), n(h));
        group(tree.root(), &mut content);
        objects.push(
            format!(
                "<< /Type /Page /Parent 2 0 R /MediaBox [0 0 {} {}] /Resources << >> /Contents {} 0 R >>",
                n(w),
                n(h),
                4 + 2 * i
            )
            .into_bytes(),
        );
        // Zlib-wrapped deflate, as FlateDecode reads it (ISO 32000-1 §7.4.4).
        let packed = miniz_oxide::deflate::compress_to_vec_zlib(content.as_bytes(), 6);
        let mut stream = format!(
            "<< /Length {} /Filter /FlateDecode >>\nstream\n",
            packed.len()
        )
        .into_bytes();
        stream.extend_from_slice(&packed);
        stream.extend_from_slice(b"\nendstream");
        objects.push(stream);
    }
    let mut out: Vec<u8> = b"%PDF-1.4\n%\xe2\xe3\xcf\xd3\n".to_vec();
    let mut offsets = Vec::with_capacity(objects.len());
    for (i, body) in objects.iter().enumerate() {
        offsets.push(out.len());
        out.extend_from_slice(format!("{} 0 obj\n", i + 1).as_bytes());
        out.extend_from_slice(body);
        out.extend_from_slice(b"\nendobj\n");
    }
    let xref = out.len();
    let mut table = format!("xref\n0 {}\n0000000000 65535 f \n", objects.len() + 1);
    for offset in offsets {
        let _ = writeln!(table, "{offset:010} 00000 n ");
    }
    let _ = write!(
        table,
        "trailer\n<< /Size {} /Root 1 0 R >>\nstartxref\n{xref}\n%%EOF\n",
        objects.len() + 1
    );
    out.extend_from_slice(table.as_bytes());
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_are_plain_decimals() {
        assert_eq!(n(1.0), "1");
        assert_eq!(n(0.75), "0.75");
        assert_eq!(n(-0.0001), "0");
        assert_eq!(n(f64::NAN), "0");
        assert_eq!(n(1.0 / 3.0), "0.333");
    }

    #[test]
    fn the_cross_reference_table_points_at_each_object() {
        // ISO 32000-1 §7.5.4: each entry is the byte offset of "N 0 obj".
        let tree = usvg::Tree::from_str(
            r##"<svg xmlns="http://www.w3.org/2000/svg" width="96" height="48"><rect width="10" height="10" fill="#ff0000"/></svg>"##,
            &usvg::Options::default(),
        )
        .unwrap();
        let pdf = write(&[tree]);
        let text = String::from_utf8_lossy(&pdf);
        let start = pdf.windows(5).position(|w| w == b"xref\n").unwrap();
        let table = std::str::from_utf8(&pdf[start..]).unwrap();
        let entries: Vec<usize> = table
            .lines()
            .skip(3)
            .take_while(|l| l.ends_with(" n "))
            .map(|l| l[..10].parse().unwrap())
            .collect();
        assert_eq!(entries.len(), 4);
        for (i, offset) in entries.iter().enumerate() {
            assert!(pdf[*offset..].starts_with(format!("{} 0 obj", i + 1).as_bytes()));
        }
        // 96 × 48 px at 96 px per inch is 72 × 36 pt.
        assert!(text.contains("/MediaBox [0 0 72 36]"), "{text}");
        // The content inflates back to the red fill's operators.
        let start = pdf.windows(7).position(|w| w == b"stream\n").unwrap() + 7;
        let end = pdf.windows(10).position(|w| w == b"\nendstream").unwrap();
        let content = miniz_oxide::inflate::decompress_to_vec_zlib(&pdf[start..end]).unwrap();
        let content = String::from_utf8(content).unwrap();
        assert!(content.contains("1 0 0 rg"), "{content}");
    }
}
