//! A vector PDF of parsed SVG trees, one page per tree: every path is
//! written as PDF path operators with its fill and stroke, text as text
//! objects that place each glyph where the SVG renderer laid it out, in the
//! same face embedded as a subset with a map back to Unicode (so the page
//! looks like the PNG and its words can be searched, copied and
//! extracted). A face that cannot be embedded (no TrueType or CFF
//! outlines) has its text drawn as outlines instead. Colours are plain
//! RGB; gradients, patterns, images and opacity are not used by the
//! diagram and are left out.
//!
//! The file follows ISO 32000-1: a catalogue, a page tree, one resource
//! dictionary the pages share, one page object and one deflated content
//! stream per page, five objects per embedded face (§9.7: Type 0 font, CID
//! font, descriptor, ToUnicode map, font program), a cross-reference table.
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

/// A font face the PDF embeds: the glyphs the pages use, renumbered from 1
/// in order of first use (glyph 0 stays the missing-glyph box), each with
/// the text it stands for.
struct Embedded {
    /// Resource name on the pages: `F0`, `F1`, … in order of first use.
    name: String,
    data: Vec<u8>,
    index: u32,
    remapper: subsetter::GlyphRemapper,
    /// Old glyph id to the characters it draws, for the ToUnicode map.
    text: std::collections::BTreeMap<u16, String>,
    cff: bool,
}

/// The fonts met so far: `None` for a face that cannot be embedded (its
/// text is then drawn as outlines).
#[derive(Default)]
struct Fonts {
    faces: Vec<(usvg::fontdb::ID, Option<usize>)>,
    embedded: Vec<Embedded>,
}

impl Fonts {
    /// The embedded face for `id`, loading it on first use.
    fn face(&mut self, id: usvg::fontdb::ID, db: &usvg::fontdb::Database) -> Option<usize> {
        if let Some((_, found)) = self.faces.iter().find(|(known, _)| *known == id) {
            return *found;
        }
        let loaded = db
            .with_face_data(id, |data, index| {
                embeddable(data, index).map(|cff| (data.to_vec(), index, cff))
            })
            .flatten()
            .map(|(data, index, cff)| {
                self.embedded.push(Embedded {
                    name: format!("F{}", self.embedded.len()),
                    data,
                    index,
                    remapper: subsetter::GlyphRemapper::new(),
                    text: std::collections::BTreeMap::new(),
                    cff,
                });
                self.embedded.len() - 1
            });
        self.faces.push((id, loaded));
        loaded
    }
}

/// Whether a face can be embedded as a CID font: `Some(true)` for CFF
/// outlines, `Some(false)` for TrueType ones, `None` for anything else
/// (CFF2, bitmaps only, unreadable, or not one the subsetter can cut down).
fn embeddable(data: &[u8], index: u32) -> Option<bool> {
    use skrifa::Tag;
    let font = skrifa::FontRef::from_index(data, index).ok()?;
    let has = |tag: &[u8; 4]| font.table_data(Tag::new(tag)).is_some();
    let cff = if has(b"glyf") && has(b"loca") {
        false
    } else if has(b"CFF ") {
        true
    } else {
        return None;
    };
    // A face the subsetter cannot read would be embedded empty: its text
    // is drawn as outlines instead.
    subsetter::subset(data, index, &subsetter::GlyphRemapper::new()).ok()?;
    Some(cff)
}

/// A text node as PDF text objects in its embedded fonts, so the words can
/// be searched, selected and extracted; `false` (and nothing written) when
/// one of its faces cannot be embedded.
fn text(t: &usvg::Text, db: &usvg::fontdb::Database, fonts: &mut Fonts, out: &mut String) -> bool {
    let mut faces = Vec::new();
    for span in t.layouted() {
        for glyph in &span.positioned_glyphs {
            match fonts.face(glyph.font, db) {
                Some(face) => faces.push(face),
                None => return false,
            }
        }
    }
    let ts = t.abs_transform();
    let mut faces = faces.into_iter();
    for span in t.layouted() {
        let fill = span.fill.as_ref().and_then(|f| colour(f.paint()));
        let size = span.font_size.get();
        let drawn = span.visible && fill.is_some();
        if drawn {
            let (r, g, b) = fill.unwrap_or_default();
            let _ = writeln!(
                out,
                "q {} {} {} {} {} {} cm\nBT\n{} {} {} rg",
                n(f64::from(ts.sx)),
                n(f64::from(ts.ky)),
                n(f64::from(ts.kx)),
                n(f64::from(ts.sy)),
                n(f64::from(ts.tx)),
                n(f64::from(ts.ty)),
                n(r),
                n(g),
                n(b)
            );
        }
        let mut current: Option<usize> = None;
        for glyph in &span.positioned_glyphs {
            let Some(face) = faces.next() else { break };
            if !drawn {
                continue;
            }
            let font = &mut fonts.embedded[face];
            let old = u16::try_from(glyph.id.0).unwrap_or(0);
            let cid = font.remapper.remap(old);
            font.text.entry(old).or_insert_with(|| glyph.text.clone());
            if current != Some(face) {
                let _ = writeln!(out, "/{} {} Tf", font.name, n(f64::from(size)));
                current = Some(face);
            }
            let upem = units_per_em(&font.data, font.index);
            // The glyph's outline transform maps font units (y up) onto the
            // page; PDF text space is in ems at the font size.
            let m = glyph
                .outline_transform()
                .pre_scale(upem / size, upem / size);
            let _ = writeln!(
                out,
                "{} {} {} {} {} {} Tm <{cid:04X}> Tj",
                n(f64::from(m.sx)),
                n(f64::from(m.ky)),
                n(f64::from(m.kx)),
                n(f64::from(m.sy)),
                n(f64::from(m.tx)),
                n(f64::from(m.ty))
            );
        }
        if drawn {
            out.push_str("ET\nQ\n");
        }
        for line in [&span.underline, &span.overline, &span.line_through]
            .into_iter()
            .flatten()
        {
            path(line, out);
        }
    }
    true
}

fn units_per_em(data: &[u8], index: u32) -> f32 {
    use skrifa::MetadataProvider;
    skrifa::FontRef::from_index(data, index)
        .map(|font| {
            f32::from(
                font.metrics(
                    skrifa::instance::Size::unscaled(),
                    skrifa::instance::LocationRef::default(),
                )
                .units_per_em,
            )
        })
        .unwrap_or(1000.0)
}

fn group(g: &usvg::Group, db: &usvg::fontdb::Database, fonts: &mut Fonts, out: &mut String) {
    for node in g.children() {
        match node {
            Node::Group(child) => group(child, db, fonts, out),
            Node::Path(p) => path(p, out),
            Node::Text(t) => {
                if !text(t, db, fonts, out) {
                    group(t.flattened(), db, fonts, out);
                }
            }
            Node::Image(_) => {}
        }
    }
}

/// Text as a PDF string of UTF-16BE code units in hex (ISO 32000-1 §9.10.3).
fn utf16_hex(text: &str) -> String {
    text.encode_utf16().map(|u| format!("{u:04X}")).collect()
}

/// The five objects of one embedded face, numbered from `first`: the
/// Type 0 font, its CID font, the descriptor, the ToUnicode map and the
/// subset font program (ISO 32000-1 §9.7).
fn font_objects(font: &Embedded, first: usize) -> Vec<Vec<u8>> {
    use skrifa::MetadataProvider;
    use skrifa::instance::{LocationRef, Size};
    let Ok(face) = skrifa::FontRef::from_index(&font.data, font.index) else {
        // Not reached: the face parsed when it was chosen. Keep the count.
        return vec![b"null".to_vec(); 5];
    };
    let metrics = face.metrics(Size::unscaled(), LocationRef::default());
    let upem = f64::from(metrics.units_per_em.max(1));
    let per_mille = |v: f32| n(f64::from(v) * 1000.0 / upem);
    let advances = face.glyph_metrics(Size::unscaled(), LocationRef::default());
    let widths: Vec<String> = font
        .remapper
        .remapped_gids()
        .map(|old| {
            per_mille(
                advances
                    .advance_width(skrifa::GlyphId::new(u32::from(old)))
                    .unwrap_or(0.0),
            )
        })
        .collect();
    let postscript: String = face
        .localized_strings(skrifa::string::StringId::POSTSCRIPT_NAME)
        .english_or_first()
        .map(|name| {
            name.chars()
                .filter(|c| c.is_ascii_alphanumeric() || *c == '-')
                .collect()
        })
        .filter(|name: &String| !name.is_empty())
        .unwrap_or_else(|| "Font".to_string());
    // A subset's name starts with six capitals and a plus (§9.6.4); derived
    // from the glyphs kept, so the same pages give the same name.
    let mut hash: u32 = 2_166_136_261;
    for gid in font.remapper.remapped_gids() {
        for byte in gid.to_be_bytes() {
            hash = (hash ^ u32::from(byte)).wrapping_mul(16_777_619);
        }
    }
    let tag: String = (0..6)
        .map(|i| char::from(b'A' + ((hash >> (i * 5)) % 26) as u8))
        .collect();
    let base = format!("{tag}+{postscript}");
    let (type0, cid, descriptor, cmap, program) =
        (first, first + 1, first + 2, first + 3, first + 4);
    let _ = type0;
    let mut objects = Vec::new();
    let encoding_name = if font.cff {
        format!("{base}-Identity-H")
    } else {
        base.clone()
    };
    objects.push(
        format!(
            "<< /Type /Font /Subtype /Type0 /BaseFont /{encoding_name} /Encoding /Identity-H /DescendantFonts [{cid} 0 R] /ToUnicode {cmap} 0 R >>"
        )
        .into_bytes(),
    );
    objects.push(
        format!(
            "<< /Type /Font /Subtype /{} /BaseFont /{base} /CIDSystemInfo << /Registry (Adobe) /Ordering (Identity) /Supplement 0 >> /FontDescriptor {descriptor} 0 R /DW 0 /W [0 [{}]]{} >>",
            if font.cff { "CIDFontType0" } else { "CIDFontType2" },
            widths.join(" "),
            if font.cff { "" } else { " /CIDToGIDMap /Identity" }
        )
        .into_bytes(),
    );
    let bounds = metrics.bounds.unwrap_or_default();
    // Flags (§9.8.2): fixed pitch (1) when monospaced, symbolic (3) always,
    // as the glyphs are addressed by id, not by a standard encoding.
    let flags = if metrics.is_monospace { 1 | 4 } else { 4 };
    objects.push(
        format!(
            "<< /Type /FontDescriptor /FontName /{base} /Flags {flags} /FontBBox [{} {} {} {}] /ItalicAngle {} /Ascent {} /Descent {} /CapHeight {} /StemV 80 /{} {program} 0 R >>",
            per_mille(bounds.x_min),
            per_mille(bounds.y_min),
            per_mille(bounds.x_max),
            per_mille(bounds.y_max),
            n(f64::from(metrics.italic_angle)),
            per_mille(metrics.ascent),
            per_mille(metrics.descent),
            per_mille(metrics.cap_height.unwrap_or(metrics.ascent)),
            if font.cff { "FontFile3" } else { "FontFile2" }
        )
        .into_bytes(),
    );
    // The ToUnicode map (§9.10.3), at most 100 pairs a block.
    let pairs: Vec<String> = font
        .text
        .iter()
        .filter(|(_, text)| !text.is_empty())
        .filter_map(|(old, text)| {
            Some(format!(
                "<{:04X}> <{}>",
                font.remapper.get(*old)?,
                utf16_hex(text)
            ))
        })
        .collect();
    let mut map = String::from(
        "/CIDInit /ProcSet findresource begin\n12 dict begin\nbegincmap\n/CIDSystemInfo << /Registry (Adobe) /Ordering (UCS) /Supplement 0 >> def\n/CMapName /Adobe-Identity-UCS def\n/CMapType 2 def\n1 begincodespacerange\n<0000> <FFFF>\nendcodespacerange\n",
    );
    for block in pairs.chunks(100) {
        let _ = writeln!(
            map,
            "{} beginbfchar\n{}\nendbfchar",
            block.len(),
            block.join("\n")
        );
    }
    map.push_str("endcmap\nCMapName currentdict /CMap defineresource pop\nend\nend\n");
    objects.push(stream(map.as_bytes(), ""));
    let subset = subsetter::subset(&font.data, font.index, &font.remapper);
    let program_bytes = if font.cff {
        subset
            .ok()
            .as_deref()
            .and_then(|subset| skrifa::FontRef::new(subset).ok())
            .and_then(|f| f.table_data(skrifa::Tag::new(b"CFF ")))
            .map(|d| d.as_bytes().to_vec())
            .unwrap_or_default()
    } else {
        subset.unwrap_or_default()
    };
    objects.push(stream(
        &program_bytes,
        if font.cff {
            " /Subtype /CIDFontType0C"
        } else {
            ""
        },
    ));
    objects
}

/// A deflated stream object with extra dictionary entries.
fn stream(content: &[u8], extra: &str) -> Vec<u8> {
    // Zlib-wrapped deflate, as FlateDecode reads it (ISO 32000-1 §7.4.4).
    let packed = miniz_oxide::deflate::compress_to_vec_zlib(content, 6);
    let mut out = format!(
        "<< /Length {} /Filter /FlateDecode{extra} >>\nstream\n",
        packed.len()
    )
    .into_bytes();
    out.extend_from_slice(&packed);
    out.extend_from_slice(b"\nendstream");
    out
}

/// The PDF of the trees, one page per tree, each page the tree's size.
/// Text is written in the faces the trees were laid out with, embedded as
/// subsets; a face that cannot be embedded has its text drawn as outlines.
pub(super) fn write(trees: &[usvg::Tree]) -> Vec<u8> {
    let mut objects: Vec<Vec<u8>> = Vec::new();
    // 1: catalogue, 2: page tree, 3: the resources all pages share, then
    // per page its page and its content, then per font five objects.
    let kids: Vec<String> = (0..trees.len())
        .map(|i| format!("{} 0 R", 4 + 2 * i))
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
    objects.push(Vec::new());
    let mut fonts = Fonts::default();
    for (i, tree) in trees.iter().enumerate() {
        let size = tree.size();
        let (w, h) = (
            f64::from(size.width()) * PT_PER_PX,
            f64::from(size.height()) * PT_PER_PX,
        );
        let mut content = format!("{} 0 0 {} 0 {} cm\n", n(PT_PER_PX), n(-PT_PER_PX), n(h));
        group(tree.root(), tree.fontdb(), &mut fonts, &mut content);
        objects.push(
            format!(
                "<< /Type /Page /Parent 2 0 R /MediaBox [0 0 {} {}] /Resources 3 0 R /Contents {} 0 R >>",
                n(w),
                n(h),
                5 + 2 * i
            )
            .into_bytes(),
        );
        objects.push(stream(content.as_bytes(), ""));
    }
    let mut resources = Vec::new();
    for font in &fonts.embedded {
        let first = objects.len() + 1;
        resources.push(format!("/{} {first} 0 R", font.name));
        objects.extend(font_objects(font, first));
    }
    objects[2] = format!("<< /Font << {} >> >>", resources.join(" ")).into_bytes();
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

    /// The inflated content of every FlateDecode stream in `pdf`.
    fn streams(pdf: &[u8]) -> Vec<String> {
        let mut out = Vec::new();
        let mut rest = pdf;
        while let Some(start) = rest.windows(7).position(|w| w == b"stream\n") {
            let body = &rest[start + 7..];
            let end = body.windows(10).position(|w| w == b"\nendstream").unwrap();
            if let Ok(bytes) = miniz_oxide::inflate::decompress_to_vec_zlib(&body[..end]) {
                out.push(String::from_utf8_lossy(&bytes).into_owned());
            }
            rest = &body[end + 10..];
        }
        out
    }

    #[test]
    fn text_is_written_as_text_in_an_embedded_subset() {
        let mut options = usvg::Options::default();
        options.fontdb_mut().load_system_fonts();
        // Any installed face that draws the text: the first one's family.
        let Some(family) = options
            .fontdb
            .faces()
            .find_map(|face| face.families.first().map(|(name, _)| name.clone()))
        else {
            eprintln!("no fonts installed: PDF text not checked");
            return;
        };
        let svg = format!(
            r##"<svg xmlns="http://www.w3.org/2000/svg" width="200" height="40"><text x="10" y="20" font-family="{family}" font-size="12" fill="#000000">BATT+ 5V</text></svg>"##
        );
        let tree = usvg::Tree::from_str(&svg, &options).unwrap();
        let pdf = write(std::slice::from_ref(&tree));
        let text = String::from_utf8_lossy(&pdf);
        // ISO 32000-1 §9.7: a Type 0 font over a CID font, Identity-H
        // encoded, with a ToUnicode map; the subset's name has a six-letter
        // tag and a plus (§9.6.4).
        assert!(text.contains("/Subtype /Type0"), "{text}");
        assert!(text.contains("/Encoding /Identity-H"));
        assert!(text.contains("/ToUnicode"));
        assert!(text.contains("/FontFile2") || text.contains("/FontFile3"));
        let streams = streams(&pdf);
        // Glyphs are shown with Tj inside BT … ET.
        assert!(
            streams
                .iter()
                .any(|s| s.contains(" Tj") && s.contains("BT"))
        );
        // The map sends glyphs back to B (U+0042), + (U+002B) and 5 (U+0035).
        let map = streams.iter().find(|s| s.contains("beginbfchar")).unwrap();
        for code in ["<0042>", "<002B>", "<0035>"] {
            assert!(map.contains(code), "{code} missing from {map}");
        }
        // The same tree gives the same bytes.
        assert_eq!(pdf, write(std::slice::from_ref(&tree)));
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
        // Catalogue, page tree, resources, page, content: no text, no font.
        assert_eq!(entries.len(), 5);
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
