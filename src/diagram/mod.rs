//! The block diagram of a checked plan, as SVG text for build notes.
//!
//! `draw` lays the parts out in columns that follow the power from the
//! batteries through protection and conversion to the loads, draws rails,
//! motor leads, signals and USB cables as orthogonal lines, marks grounds and
//! findings, and adds a title block, a findings panel, a legend and the
//! safety cautions. The steps: `content` decides what is shown, `layout`
//! where it goes (`shape` fills in each box), `render` writes it; `text`
//! cleans and measures labels and `style` holds the palette. `png`
//! rasterises the SVG through the same renderer the tests use, with `fonts`
//! choosing the installed face for the generic `monospace` family.
//! [`draw_pages`] fits the diagram to paper (`page`), over several sheets
//! with off-page connectors when it must, and [`pdf`] writes those sheets
//! as a vector PDF from the same parsed SVG trees.
//!
//! No I/O here: the caller reads the plan, loads fonts and writes files.
//! Not a schematic: pins are shown where nets attach, not by package.

mod content;
mod fonts;
mod layout;
mod page;
mod pdf;
mod render;
mod shape;
mod style;
mod text;

use crate::Checked;
use std::fmt;

pub use page::{MIN_TEXT_PT, Page, PageError, Paper, Sheets};

/// The plan's block diagram as an SVG document. The same plan always gives
/// the same bytes.
///
/// ```
/// use railcheck::model::Library;
///
/// // An orchard sensor post: a 3S pack, a 5 V buck and a board on its rail.
/// let plan = "\
/// railcheck: 1
/// name: Orchard sensor post
/// parts:
///   pack: { use: battery/lipo-3s }
///   buck: { use: regulator/buck-5v-3a }
///   logger: { use: board/sbc-5v }
/// nets:
///   BATT+: [pack.pos, buck.vin]
///   5V: [buck.vout, logger.vin]
///   GND: [pack.neg, buck.gnd, logger.gnd]
/// ";
/// let checked = railcheck::check("post.yaml", plan, &Library::builtin()).unwrap();
/// let svg = railcheck::diagram::draw(&checked);
/// assert!(svg.starts_with("<svg"), "{}", &svg[..40]);
/// assert!(svg.trim_end().ends_with("</svg>"));
/// // Every part is drawn under its name, and the title block carries the plan's.
/// for name in ["pack", "buck", "logger", "Orchard sensor post"] {
///     assert!(svg.contains(name), "{name} is missing");
/// }
/// assert_eq!(svg, railcheck::diagram::draw(&checked));
/// ```
pub fn draw(checked: &Checked) -> String {
    let content = content::gather(checked);
    let marker_w = layout::marker_width(content.findings.len());
    let geometry = layout::place(&content, marker_w);
    render::write(&content, &geometry, marker_w)
}

/// The diagram on sheets of `page` (or, with `None`, of the smallest page
/// that holds the drawing uncut, else the page that needs the fewest
/// sheets), no text smaller than
/// [`MIN_TEXT_PT`]. When the drawing is too big for one sheet it is cut
/// between boxes into tiles, and every line a cut crosses ends on an
/// off-page connector naming its net and the sheet it goes on to. An error
/// names what does not fit and the page that would take it.
pub fn draw_pages(checked: &Checked, page: Option<Page>) -> Result<Sheets, PageError> {
    let content = content::gather(checked);
    let marker_w = layout::marker_width(content.findings.len());
    let geometry = layout::place(&content, marker_w);
    match page {
        Some(page) => page::sheets(&content, &geometry, marker_w, page),
        None => page::best(&content, &geometry, marker_w),
    }
}

/// A vector PDF of the sheets, one page each, drawn from the same SVG trees
/// the PNG renderer draws, with the text as text in the faces it was laid
/// out with, embedded as subsets (so it can be searched and extracted).
/// `options` carries the fonts, as for [`png`]. The same sheets and fonts
/// give the same bytes: no dates or random identifiers.
pub fn pdf(svgs: &[String], options: &resvg::usvg::Options) -> Result<Vec<u8>, PngError> {
    let trees = svgs
        .iter()
        .map(|svg| tree(svg, options))
        .collect::<Result<Vec<_>, _>>()?;
    Ok(pdf::write(&trees))
}

/// Parses SVG text with the fonts of `options`, the generic monospace family
/// mapped onto an installed monospaced face (see [`png`]).
fn tree(svg: &str, options: &resvg::usvg::Options) -> Result<resvg::usvg::Tree, PngError> {
    let remapped;
    let options = match fonts::with_monospace(&options.fontdb) {
        Some(fontdb) => {
            remapped = with_fonts(options, fontdb);
            &remapped
        }
        None => options,
    };
    resvg::usvg::Tree::from_str(svg, options).map_err(|e| PngError::Svg(e.to_string()))
}

/// Largest PNG drawn at full scale, in pixels; a larger diagram is scaled
/// down to this area so a plan of thousands of parts cannot exhaust memory.
const MAX_PIXELS: f64 = 40_000_000.0;

/// Why an SVG could not be turned into a PNG.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum PngError {
    /// The SVG did not parse.
    Svg(String),
    /// The picture has no area (or is too large to allocate).
    Size,
    /// The PNG encoder failed, with its reason.
    Encode(String),
}

impl fmt::Display for PngError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            PngError::Svg(e) => write!(f, "the diagram did not parse as SVG: {e}"),
            PngError::Size => f.write_str("the diagram has no drawable size"),
            PngError::Encode(e) => write!(f, "cannot encode the PNG: {e}"),
        }
    }
}

impl std::error::Error for PngError {}

/// Renders SVG text to PNG bytes on a white background. `options` carries
/// the fonts (the caller loads them). The diagram asks for the generic
/// `monospace` family: when the fonts' own choice for it is not installed or
/// not monospaced, the first installed monospaced face stands in, so the
/// labels keep the widths the layout counted on. Text without any matching
/// font is left out, the rest still draws.
pub fn png(svg: &str, options: &resvg::usvg::Options) -> Result<Vec<u8>, PngError> {
    let tree = tree(svg, options)?;
    let size = tree.size();
    let area = f64::from(size.width()) * f64::from(size.height());
    let scale = if area > MAX_PIXELS {
        (MAX_PIXELS / area).sqrt() as f32
    } else {
        1.0
    };
    let width = (size.width() * scale).ceil() as u32;
    let height = (size.height() * scale).ceil() as u32;
    let mut pixmap = resvg::tiny_skia::Pixmap::new(width, height).ok_or(PngError::Size)?;
    pixmap.fill(resvg::tiny_skia::Color::WHITE);
    resvg::render(
        &tree,
        resvg::tiny_skia::Transform::from_scale(scale, scale),
        &mut pixmap.as_mut(),
    );
    pixmap
        .encode_png()
        .map_err(|e| PngError::Encode(e.to_string()))
}

/// The caller's options with another font database. The resolvers cannot be
/// cloned, so the copy forwards to the caller's.
fn with_fonts<'a>(
    options: &'a resvg::usvg::Options,
    fontdb: std::sync::Arc<resvg::usvg::fontdb::Database>,
) -> resvg::usvg::Options<'a> {
    use resvg::usvg::{FontResolver, ImageHrefResolver, Options};
    let images = &options.image_href_resolver;
    let fonts = &options.font_resolver;
    Options {
        resources_dir: options.resources_dir.clone(),
        dpi: options.dpi,
        font_family: options.font_family.clone(),
        font_size: options.font_size,
        languages: options.languages.clone(),
        shape_rendering: options.shape_rendering,
        text_rendering: options.text_rendering,
        image_rendering: options.image_rendering,
        default_size: options.default_size,
        image_href_resolver: ImageHrefResolver {
            resolve_data: Box::new(|mime, data, opts| (images.resolve_data)(mime, data, opts)),
            resolve_string: Box::new(|href, opts| (images.resolve_string)(href, opts)),
        },
        font_resolver: FontResolver {
            select_font: Box::new(|font, db| (fonts.select_font)(font, db)),
            select_fallback: Box::new(|c, used, db| (fonts.select_fallback)(c, used, db)),
        },
        fontdb,
        style_sheet: options.style_sheet.clone(),
    }
}
