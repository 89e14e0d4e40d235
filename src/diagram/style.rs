//! The diagram's palette and line styles, in one place so the legend, the
//! drawing and the tests agree.
//!
//! Every distinction is carried twice: by shape, dash or width, and by a grey
//! level far enough from the others to survive greyscale print. Hue only
//! repeats what those already say, so readers who do not tell red from green
//! (or any two hues apart) lose nothing. Not for layout sizes: those live with
//! the layout.

use crate::rules::Severity;

/// Text, box outlines, ground symbols.
pub(crate) const INK: &str = "#1b1f24";
/// Secondary text (class names, pin names).
pub(crate) const INK_SOFT: &str = "#3d444d";
pub(crate) const PAPER: &str = "#ffffff";
/// Frames of the title block, panels and rail tags.
pub(crate) const RULE_LINE: &str = "#8a939e";

/// How a kind of connection is drawn.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct LineStyle {
    pub colour: &'static str,
    pub width: f64,
    /// `None` for a solid line.
    pub dash: Option<&'static str>,
    /// A hollow line (a cable): a paper-coloured stripe of this width down the middle.
    pub core: Option<f64>,
}

/// A supply rail: the heaviest solid line.
pub(crate) const RAIL: LineStyle = LineStyle {
    colour: "#1c4f8a",
    width: 2.6,
    dash: None,
    core: None,
};

/// A ground return with its own lead: as heavy as a rail, in long and short
/// dashes (a dash-dot), and a neutral grey lighter than the rail's ink.
pub(crate) const GROUND: LineStyle = LineStyle {
    colour: "#6b6b6b",
    width: 2.6,
    dash: Some("12 3 2 3"),
    core: None,
};

/// A motor lead: as heavy as a rail, in long dashes.
pub(crate) const MOTOR_LEAD: LineStyle = LineStyle {
    colour: "#6e3f0c",
    width: 2.6,
    dash: Some("10 4"),
    core: None,
};

/// A logic signal: thin, short dashes.
pub(crate) const SIGNAL: LineStyle = LineStyle {
    colour: "#3a6f4c",
    width: 1.2,
    dash: Some("3 2.5"),
    core: None,
};

/// Logic signals between the same two parts, drawn together: wider than a
/// motor lead, in medium dashes, in the signal's colour.
pub(crate) const BUNDLE: LineStyle = LineStyle {
    colour: "#3a6f4c",
    width: 3.4,
    dash: Some("6 2"),
    core: None,
};

/// A USB cable: a hollow band (power, data and ground in one sheath).
pub(crate) const CABLE: LineStyle = LineStyle {
    colour: "#4b3f78",
    width: 5.0,
    dash: None,
    core: Some(1.8),
};

/// Marks of a part or a ground symbol whose ground does not reach a battery
/// negative; the same dark red as an error.
pub(crate) const FLOATING: &str = "#a11d21";

/// Fill and number colour of a finding marker, and its shape.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct MarkerStyle {
    pub fill: &'static str,
    pub outline: &'static str,
    pub number: &'static str,
    pub shape: MarkerShape,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum MarkerShape {
    /// A filled disc: dark.
    Disc,
    /// A filled hexagon pointed left and right: mid grey.
    Hexagon,
    /// An outlined square: light.
    Square,
}

pub(crate) fn marker(severity: Severity) -> MarkerStyle {
    match severity {
        Severity::Error => MarkerStyle {
            fill: "#a11d21",
            outline: "#5c0e10",
            number: PAPER,
            shape: MarkerShape::Disc,
        },
        Severity::Warning => MarkerStyle {
            fill: "#d99a00",
            outline: "#6b4b00",
            number: INK,
            shape: MarkerShape::Hexagon,
        },
        Severity::Note => MarkerStyle {
            fill: "#eef3fa",
            outline: INK,
            number: INK,
            shape: MarkerShape::Square,
        },
    }
}

/// Where a part sits in the power path; tints its box (its class is written
/// in the box as well, so the tint only helps the eye).
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord)]
pub(crate) enum Stage {
    Source,
    Protection,
    Conversion,
    Load,
}

impl Stage {
    pub const ALL: [Stage; 4] = [
        Stage::Source,
        Stage::Protection,
        Stage::Conversion,
        Stage::Load,
    ];

    pub fn tint(self) -> &'static str {
        match self {
            Stage::Source => "#f7e3d3",
            Stage::Protection => "#f6efc8",
            Stage::Conversion => "#dcefe2",
            Stage::Load => "#e4e8f5",
        }
    }

    pub fn describe(self) -> &'static str {
        match self {
            Stage::Source => "source (battery)",
            Stage::Protection => "protection (fuse, switch, connector)",
            Stage::Conversion => "conversion (regulator, driver, shifter)",
            Stage::Load => "load (board, motor, sensor, ...)",
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// WCAG 2.x relative luminance of an sRGB colour written `#rrggbb`.
    fn luminance(hex: &str) -> f64 {
        let channel = |i: usize| {
            let v = f64::from(u8::from_str_radix(&hex[i..i + 2], 16).unwrap()) / 255.0;
            // sRGB transfer function as WCAG 2.x defines it.
            if v <= 0.03928 {
                v / 12.92
            } else {
                ((v + 0.055) / 1.055).powf(2.4)
            }
        };
        0.2126 * channel(1) + 0.7152 * channel(3) + 0.0722 * channel(5)
    }

    /// WCAG 2.x contrast ratio.
    fn contrast(a: &str, b: &str) -> f64 {
        let (la, lb) = (luminance(a), luminance(b));
        (la.max(lb) + 0.05) / (la.min(lb) + 0.05)
    }

    const SEVERITIES: [Severity; 3] = [Severity::Error, Severity::Warning, Severity::Note];

    #[test]
    fn luminance_matches_the_wcag_end_points() {
        // WCAG 2.x: black 0, white 1, so black on white is 21:1.
        assert!(luminance("#000000").abs() < 1e-12);
        assert!((luminance("#ffffff") - 1.0).abs() < 1e-12);
        assert!((contrast("#000000", "#ffffff") - 21.0).abs() < 1e-9);
    }

    #[test]
    fn marker_numbers_are_readable_on_their_fill() {
        // WCAG 2.1 success criterion 1.4.3: at least 4.5:1 for normal text.
        for severity in SEVERITIES {
            let style = marker(severity);
            let ratio = contrast(style.number, style.fill);
            assert!(ratio >= 4.5, "{severity:?}: {ratio:.2}");
        }
    }

    #[test]
    fn severities_differ_in_grey_level_and_shape() {
        // In greyscale only luminance is left: every pair of severities must
        // stay apart by a clear step (1.7:1, a design choice) as well as by shape.
        for (i, a) in SEVERITIES.iter().enumerate() {
            for b in &SEVERITIES[i + 1..] {
                let (sa, sb) = (marker(*a), marker(*b));
                let ratio = contrast(sa.fill, sb.fill);
                assert!(ratio >= 1.7, "{a:?} vs {b:?}: {ratio:.2}");
                assert_ne!(sa.shape, sb.shape);
            }
        }
    }

    #[test]
    fn text_stays_readable_on_every_box_tint() {
        // WCAG 2.1 SC 1.4.3 again: pin names and class lines sit on the tints.
        for stage in Stage::ALL {
            for ink in [INK, INK_SOFT, FLOATING] {
                let ratio = contrast(ink, stage.tint());
                assert!(ratio >= 4.5, "{stage:?} {ink}: {ratio:.2}");
            }
        }
    }

    #[test]
    fn connection_kinds_differ_without_colour() {
        // Each pair of line styles must differ in width, dash or hollowness,
        // so they stay apart in greyscale.
        let styles = [RAIL, GROUND, MOTOR_LEAD, SIGNAL, BUNDLE, CABLE];
        for (i, a) in styles.iter().enumerate() {
            for b in &styles[i + 1..] {
                let differs =
                    (a.width - b.width).abs() > 0.5 || a.dash != b.dash || a.core != b.core;
                assert!(differs, "{a:?} vs {b:?}");
            }
        }
        // Lines must stand out from paper: WCAG 2.1 SC 1.4.11 asks 3:1 for graphics.
        for style in styles {
            assert!(contrast(style.colour, PAPER) >= 3.0, "{style:?}");
        }
    }

    #[test]
    fn ground_leads_differ_from_power_in_grey_level_too() {
        // Supply and return are the two leads a builder must never swap: apart
        // from the dash, their grey levels stay a clear step apart (1.5:1,
        // a design choice) so greyscale print keeps them apart twice.
        for power in [RAIL, MOTOR_LEAD] {
            let ratio = contrast(GROUND.colour, power.colour);
            assert!(ratio >= 1.5, "{power:?}: {ratio:.2}");
            assert_ne!(GROUND.dash, power.dash);
        }
    }
}
