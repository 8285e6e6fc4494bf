//! Registration of the embedded DejaVu fonts with the drawing library (no system fonts).

use std::sync::OnceLock;

use plotters::style::{FontStyle, register_font};

use crate::PlotError;

/// The family name every chart asks for; in SVG output the viewer's own sans-serif is used.
pub const FAMILY: &str = "sans-serif";

static REGISTERED: OnceLock<Result<(), PlotError>> = OnceLock::new();

/// Registers the embedded DejaVu Sans faces (regular, bold, oblique) under [`FAMILY`].
///
/// Idempotent and thread-safe: the registration runs once per process and its outcome is
/// kept. Every renderer of this crate calls it; callers need not, but may.
pub fn init_fonts() -> Result<(), PlotError> {
    REGISTERED
        .get_or_init(|| {
            let faces: [(FontStyle, &'static [u8], &'static str); 3] = [
                (FontStyle::Normal, dejavu::sans::regular(), "DejaVu Sans"),
                (FontStyle::Bold, dejavu::sans::bold(), "DejaVu Sans Bold"),
                (
                    FontStyle::Oblique,
                    dejavu::sans::oblique(),
                    "DejaVu Sans Oblique",
                ),
            ];
            for (style, bytes, name) in faces {
                register_font(FAMILY, style, bytes).map_err(|_| PlotError::Font(name))?;
            }
            Ok(())
        })
        .clone()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn registration_is_idempotent() {
        assert_eq!(init_fonts(), Ok(()));
        assert_eq!(init_fonts(), Ok(()));
    }
}
