//! Fuzz target: any bytes as a .gpkg file must give points, a boundary or
//! an error, never a panic. Read the way `audit FILE.gpkg --layer NAME`,
//! `audit FILE.gpkg` and `--boundary FILE.gpkg --boundary-layer NAME` read it.
#![no_main]
use libfuzzer_sys::fuzz_target;
use patternproof_io::CoordChoice;
use patternproof_io::geopackage::{GpkgChoice, read_boundary, read_points};

fuzz_target!(|data: &[u8]| {
    let path = std::env::temp_dir().join(format!("patternproof-fuzz-{}.gpkg", std::process::id()));
    if std::fs::write(&path, data).is_ok() {
        // Layer names of the seed file reference/gpkg/survey.gpkg.
        let named = GpkgChoice {
            layer: Some("plots_utm".into()),
            ..GpkgChoice::default()
        };
        let _ = read_points(&path, CoordChoice::Auto, None, &named);
        let _ = read_points(&path, CoordChoice::Auto, None, &GpkgChoice::default());
        let _ = read_boundary(&path, Some("area_utm"), CoordChoice::Auto);
    }
});
