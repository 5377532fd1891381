//! The one font every text is drawn with: DejaVu Sans, as the `dejavu`
//! crate ships it (font licence: Bitstream Vera with
//! DejaVu's public-domain changes, in that crate's
//! `assets/dejavu-fonts-ttf-2.37/LICENSE`).
//!
//! The database holds nothing else: every generic family (`sans-serif`,
//! `serif`, `monospace`, …) and every named family that is not there
//! resolves to it, so the choice of font never depends on the machine.
//! DejaVu Sans covers Latin, Greek and Cyrillic and the mathematical signs
//! the pictures use (×, −, σ, ², ≥).
//!
//! One face only, the regular one: bold text is drawn in it too. With two
//! faces `svg2pdf` would write them in an order that changes from run to
//! run (`vector.rs`), and the pictures use no bold.

use resvg::usvg::fontdb::{Database, Source};
use std::sync::{Arc, OnceLock};

/// The family name inside the bundled font files.
pub const FAMILY: &str = "DejaVu Sans";

/// The font database, built once per process.
pub fn database() -> Arc<Database> {
    static DATABASE: OnceLock<Arc<Database>> = OnceLock::new();
    DATABASE
        .get_or_init(|| {
            let mut db = Database::new();
            db.load_font_source(Source::Binary(Arc::new(dejavu::sans::regular())));
            db.set_sans_serif_family(FAMILY);
            db.set_serif_family(FAMILY);
            db.set_monospace_family(FAMILY);
            db.set_cursive_family(FAMILY);
            db.set_fantasy_family(FAMILY);
            Arc::new(db)
        })
        .clone()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn only_the_bundled_faces_are_loaded() {
        let db = database();
        let families: Vec<String> = db
            .faces()
            .flat_map(|f| f.families.iter().map(|(name, _)| name.clone()))
            .collect();
        assert_eq!(families, vec![FAMILY.to_string()]);
    }
}
