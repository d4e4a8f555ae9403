//! The embedded font: DejaVu Sans 2.37 (Bitstream Vera licence, see `fonts/`), registered with
//! plotters' `ab_glyph` renderer so no system font library or installed font is needed.

use std::sync::Once;

/// The font file (TrueType), compiled into the binary.
pub static FONT_TTF: &[u8] = include_bytes!("../fonts/DejaVuSans.ttf");

/// The licence of [`FONT_TTF`], to ship beside anything that embeds it.
pub static FONT_LICENSE: &str = include_str!("../fonts/DejaVuSans-LICENSE.txt");

/// Family name under which the font is registered, and which SVG `font-family` attributes
/// name; the HTML report defines it with an inline `@font-face`.
pub const FAMILY: &str = "DejaVu Sans";

static REGISTER: Once = Once::new();

/// Registers the embedded font with plotters (once per process).
pub fn register() {
    REGISTER.call_once(|| {
        if plotters::style::register_font(FAMILY, plotters::style::FontStyle::Normal, FONT_TTF)
            .is_err()
        {
            // The bytes are compiled in and tested below; reaching this is a build defect.
            unreachable!("the embedded DejaVu Sans font does not parse");
        }
    });
}

#[cfg(test)]
mod tests {
    #[test]
    fn the_font_registers_and_the_licence_ships() {
        super::register();
        assert!(super::FONT_LICENSE.contains("Bitstream"));
        assert!(super::FONT_TTF.len() > 500_000);
    }
}
