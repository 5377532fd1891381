//! Fuzz target: any bytes as a .geojson file must give points/shapes or an
//! error, never a panic.
#![no_main]
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let path = std::env::temp_dir().join(format!("patternproof-fuzz-{}.geojson", std::process::id()));
    if std::fs::write(&path, data).is_ok() {
        let _ = patternproof_io::points::read_points(&path, patternproof_io::CoordChoice::Auto, Some("site"), None);
    }
});
