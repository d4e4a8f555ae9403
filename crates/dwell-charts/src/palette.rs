//! Colours: the Okabe–Ito set, chosen so that readers with the common colour-vision
//! deficiencies can tell the series apart, and the neutral tones of the dwell look.
//!
//! ## Reference
//! M. Okabe and K. Ito (2008), "Color Universal Design (CUD): how to make figures and
//! presentations that are friendly to colorblind people", J*Fly data depository; the eight
//! colours below are their published RGB values.

use plotters::style::RGBColor;

/// Okabe–Ito orange (230, 159, 0).
pub const ORANGE: RGBColor = RGBColor(230, 159, 0);
/// Okabe–Ito sky blue (86, 180, 233).
pub const SKY_BLUE: RGBColor = RGBColor(86, 180, 233);
/// Okabe–Ito bluish green (0, 158, 115).
pub const BLUISH_GREEN: RGBColor = RGBColor(0, 158, 115);
/// Okabe–Ito yellow (240, 228, 66).
pub const YELLOW: RGBColor = RGBColor(240, 228, 66);
/// Okabe–Ito blue (0, 114, 178).
pub const BLUE: RGBColor = RGBColor(0, 114, 178);
/// Okabe–Ito vermillion (213, 94, 0).
pub const VERMILLION: RGBColor = RGBColor(213, 94, 0);
/// Okabe–Ito reddish purple (204, 121, 167).
pub const REDDISH_PURPLE: RGBColor = RGBColor(204, 121, 167);
/// Okabe–Ito black (0, 0, 0).
pub const BLACK: RGBColor = RGBColor(0, 0, 0);

/// Series colours in the order they are handed out: the strongest contrasts first; yellow,
/// weak on a light background, last.
pub const SERIES: [RGBColor; 8] = [
    BLUE,
    VERMILLION,
    BLUISH_GREEN,
    REDDISH_PURPLE,
    ORANGE,
    SKY_BLUE,
    BLACK,
    YELLOW,
];

/// Paper: the warm off-white background of every dwell chart.
pub const PAPER: RGBColor = RGBColor(251, 250, 246);
/// Ink: titles, axis text and the outdoor-temperature line.
pub const INK: RGBColor = RGBColor(38, 41, 46);
/// Grid lines.
pub const GRID: RGBColor = RGBColor(226, 223, 214);
/// The comfort band's fill (bluish green, light).
pub const BAND: RGBColor = RGBColor(204, 236, 226);

/// The colour of series number `i` (wrapping after eight).
pub fn series(i: usize) -> RGBColor {
    SERIES[i % SERIES.len()]
}

/// A fill colour for index `i`: the eight series colours, then (8…15) the same at 45 %
/// strength over the paper, so up to sixteen areas stay distinct; wraps after that.
pub fn fill(i: usize) -> RGBColor {
    let c = SERIES[i % 8];
    if (i / 8).is_multiple_of(2) {
        c
    } else {
        let m = |x: u8, p: u8| (0.45 * x as f64 + 0.55 * p as f64).round() as u8;
        RGBColor(m(c.0, PAPER.0), m(c.1, PAPER.1), m(c.2, PAPER.2))
    }
}

/// `#rrggbb` of a colour, for CSS.
pub fn hex(c: RGBColor) -> String {
    format!("#{:02x}{:02x}{:02x}", c.0, c.1, c.2)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn okabe_ito_values() {
        // Okabe & Ito (2008): orange E69F00, sky blue 56B4E9, bluish green 009E73, yellow F0E442,
        // blue 0072B2, vermillion D55E00, reddish purple CC79A7, black 000000.
        let hexes: Vec<String> = [
            ORANGE,
            SKY_BLUE,
            BLUISH_GREEN,
            YELLOW,
            BLUE,
            VERMILLION,
            REDDISH_PURPLE,
            BLACK,
        ]
        .iter()
        .map(|c| hex(*c))
        .collect();
        assert_eq!(
            hexes,
            [
                "#e69f00", "#56b4e9", "#009e73", "#f0e442", "#0072b2", "#d55e00", "#cc79a7",
                "#000000"
            ]
        );
        let mut distinct = SERIES.to_vec();
        distinct.dedup();
        assert_eq!(distinct.len(), 8);
    }
}
