//! Fuzz target: any bytes as one GeoPackage geometry blob (header, then
//! WKB) must decode or be refused, never panic. A blob is what the file
//! holds per feature, so this reaches the decoder without SQLite in the way.
#![no_main]
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    if let Ok(d) = patternproof_gpkg::blob::decode(data) {
        // The name goes into messages about the feature.
        let _ = d.shape.as_ref().map(|s| s.type_name());
    }
});
