//! The reference surface as a GeoTIFF (OGC GeoTIFF 1.1): one band of 32-bit
//! floats, density per unit², cells outside the window `NaN` (declared with
//! the `GDAL_NODATA` tag 42113, which most readers honour).
//!
//! Georeferencing tags:
//! - `ModelPixelScaleTag` (33550) = `[cell, cell, 0]`;
//! - `ModelTiepointTag` (33922) = `[0, 0, 0, x_west, y_north, 0]`: raster
//!   point (0, 0), the outer corner of the top-left cell, sits at the
//!   raster's north-west corner;
//! - `GeoKeyDirectoryTag` (34735): version 1.1.1; `GTModelTypeGeoKey` (1024) =
//!   1 (projected); `GTRasterTypeGeoKey` (1025) = 1 (`RasterPixelIsArea`: a
//!   value describes the whole cell, as a density does); `GTCitationGeoKey`
//!   (1026) pointing into `GeoAsciiParamsTag` (34737) with a description of
//!   the coordinates; `ProjectedCSTypeGeoKey` (3072) = 32767 (user-defined:
//!   a local survey grid or the tool's own equal-area projection has no EPSG
//!   code); `ProjLinearUnitsGeoKey` (3076) = 9001 (metre) when the unit is
//!   metres, else 32767 (user-defined, named in the citation).

use crate::grid::Grid;
use std::io::Cursor;
use tiff::encoder::{TiffEncoder, colortype};
use tiff::tags::Tag;

/// GeoKey ids used.
pub mod keys {
    /// GTModelTypeGeoKey.
    pub const MODEL_TYPE: u16 = 1024;
    /// GTRasterTypeGeoKey.
    pub const RASTER_TYPE: u16 = 1025;
    /// GTCitationGeoKey.
    pub const CITATION: u16 = 1026;
    /// ProjectedCSTypeGeoKey.
    pub const PROJECTED_CS: u16 = 3072;
    /// ProjLinearUnitsGeoKey.
    pub const LINEAR_UNITS: u16 = 3076;
    /// User-defined.
    pub const USER_DEFINED: u16 = 32767;
    /// EPSG linear unit metre.
    pub const METRE: u16 = 9001;
}

/// Whether a unit name means metres.
pub fn is_metre(unit: &str) -> bool {
    matches!(
        unit.trim().to_ascii_lowercase().as_str(),
        "m" | "metre" | "metres" | "meter" | "meters"
    )
}

/// Encode `values` (row 0 = south, as [`Grid`] stores them; `mask` false =
/// no data) as a GeoTIFF. `citation` describes the coordinates.
pub fn encode(
    grid: &Grid,
    values: &[f64],
    mask: &[bool],
    unit: &str,
    citation: &str,
) -> Result<Vec<u8>, String> {
    let (w, h) = (
        u32::try_from(grid.nx).map_err(|e| e.to_string())?,
        u32::try_from(grid.ny).map_err(|e| e.to_string())?,
    );
    let mut data = Vec::with_capacity(grid.len());
    for j in (0..grid.ny).rev() {
        for i in 0..grid.nx {
            let k = j * grid.nx + i;
            data.push(if mask[k] { values[k] as f32 } else { f32::NAN });
        }
    }
    let mut ascii = citation.replace('|', "/");
    ascii.push('|');
    let units = if is_metre(unit) {
        keys::METRE
    } else {
        keys::USER_DEFINED
    };
    let geokeys: Vec<u16> = vec![
        1,
        1,
        1,
        5, // version 1, revision 1.1, 5 keys
        keys::MODEL_TYPE,
        0,
        1,
        1,
        keys::RASTER_TYPE,
        0,
        1,
        1,
        keys::CITATION,
        34737,
        u16::try_from(ascii.len()).map_err(|e| e.to_string())?,
        0,
        keys::PROJECTED_CS,
        0,
        1,
        keys::USER_DEFINED,
        keys::LINEAR_UNITS,
        0,
        1,
        units,
    ];
    let north = grid.y0 + grid.ny as f64 * grid.cell;
    let mut buf = Cursor::new(Vec::new());
    {
        let mut enc = TiffEncoder::new(&mut buf).map_err(|e| e.to_string())?;
        let mut img = enc
            .new_image::<colortype::Gray32Float>(w, h)
            .map_err(|e| e.to_string())?;
        let d = img.encoder();
        d.write_tag(Tag::ModelPixelScaleTag, &[grid.cell, grid.cell, 0.0][..])
            .map_err(|e| e.to_string())?;
        d.write_tag(
            Tag::ModelTiepointTag,
            &[0.0, 0.0, 0.0, grid.x0, north, 0.0][..],
        )
        .map_err(|e| e.to_string())?;
        d.write_tag(Tag::GeoKeyDirectoryTag, &geokeys[..])
            .map_err(|e| e.to_string())?;
        d.write_tag(Tag::GeoAsciiParamsTag, ascii.as_str())
            .map_err(|e| e.to_string())?;
        d.write_tag(Tag::GdalNodata, "nan")
            .map_err(|e| e.to_string())?;
        img.write_data(&data).map_err(|e| e.to_string())?;
    }
    Ok(buf.into_inner())
}
