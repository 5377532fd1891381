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

use patternproof_density::grid::Grid;
use patternproof_density::is_metre;
use std::io::Cursor;
use tiff::encoder::{TiffEncoder, colortype};
use tiff::tags::Tag;

/// Why a raster could not be encoded. None of these comes from the user's
/// points directly: the grid and the citation are the tool's own.
#[derive(Debug, thiserror::Error)]
pub enum GeoTiffError {
    /// A side of the raster does not fit a TIFF's 32-bit dimensions.
    #[error(
        "the raster of {columns} × {rows} cells is too large for a TIFF (at most 4 294 967 295 cells a side)"
    )]
    TooLarge {
        /// Columns of the grid.
        columns: usize,
        /// Rows of the grid.
        rows: usize,
    },
    /// The citation does not fit the 16-bit length of a GeoKey.
    #[error(
        "the coordinate description is {0} bytes long; a GeoTIFF citation holds at most 65 535"
    )]
    CitationTooLong(usize),
    /// The values and the grid disagree in size.
    #[error("{values} values for a raster of {cells} cells")]
    WrongLength {
        /// Values given.
        values: usize,
        /// Cells of the grid.
        cells: usize,
    },
    /// The TIFF encoder failed.
    #[error("the TIFF encoder failed: {0}")]
    Encoder(#[from] tiff::TiffError),
}

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

/// Encode `values` (row 0 = south, as [`Grid`] stores them; `mask` false =
/// no data) as a GeoTIFF. `citation` describes the coordinates.
pub fn encode(
    grid: &Grid,
    values: &[f64],
    mask: &[bool],
    unit: &str,
    citation: &str,
) -> Result<Vec<u8>, GeoTiffError> {
    let too_large = || GeoTiffError::TooLarge {
        columns: grid.nx,
        rows: grid.ny,
    };
    let (w, h) = (
        u32::try_from(grid.nx).map_err(|_| too_large())?,
        u32::try_from(grid.ny).map_err(|_| too_large())?,
    );
    if values.len() != grid.len() || mask.len() != grid.len() {
        return Err(GeoTiffError::WrongLength {
            values: values.len().min(mask.len()),
            cells: grid.len(),
        });
    }
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
        u16::try_from(ascii.len()).map_err(|_| GeoTiffError::CitationTooLong(ascii.len()))?,
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
        let mut enc = TiffEncoder::new(&mut buf)?;
        let mut img = enc.new_image::<colortype::Gray32Float>(w, h)?;
        let d = img.encoder();
        d.write_tag(Tag::ModelPixelScaleTag, &[grid.cell, grid.cell, 0.0][..])?;
        d.write_tag(
            Tag::ModelTiepointTag,
            &[0.0, 0.0, 0.0, grid.x0, north, 0.0][..],
        )?;
        d.write_tag(Tag::GeoKeyDirectoryTag, &geokeys[..])?;
        d.write_tag(Tag::GeoAsciiParamsTag, ascii.as_str())?;
        d.write_tag(Tag::GdalNodata, "nan")?;
        img.write_data(&data)?;
    }
    Ok(buf.into_inner())
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used, clippy::panic)]
    use super::*;
    use tiff::decoder::Decoder;

    fn small_grid() -> Grid {
        Grid {
            x0: 1000.0,
            y0: 2000.0,
            cell: 5.0,
            nx: 4,
            ny: 3,
        }
    }

    /// Source: OGC GeoTIFF 1.1 (tags 33550, 33922, 34735; keys 1024, 1025,
    /// 3072, 3076); read back with the `tiff` crate's decoder.
    #[test]
    fn geotiff_tags_read_back() {
        let grid = small_grid();
        let values: Vec<f64> = (0..12).map(|k| k as f64 * 0.1).collect();
        let mut mask = vec![true; 12];
        mask[0] = false;
        let bytes = encode(&grid, &values, &mask, "m", "test grid").expect("encode");
        let mut d = Decoder::new(Cursor::new(bytes)).expect("decoder");
        assert_eq!(d.dimensions().expect("dims"), (4, 3));
        assert_eq!(
            d.get_tag_f64_vec(Tag::ModelPixelScaleTag).expect("scale"),
            vec![5.0, 5.0, 0.0]
        );
        assert_eq!(
            d.get_tag_f64_vec(Tag::ModelTiepointTag).expect("tiepoint"),
            vec![0.0, 0.0, 0.0, 1000.0, 2015.0, 0.0]
        );
        let keys = d.get_tag_u16_vec(Tag::GeoKeyDirectoryTag).expect("geokeys");
        assert_eq!(&keys[..4], &[1, 1, 1, 5]);
        let key = |id: u16| keys[4..].chunks(4).find(|k| k[0] == id).map(|k| k[3]);
        assert_eq!(key(1024), Some(1), "projected model");
        assert_eq!(key(1025), Some(1), "PixelIsArea");
        assert_eq!(key(3072), Some(32767), "user-defined projected CRS");
        assert_eq!(key(3076), Some(9001), "metre");
        let ids: Vec<u16> = keys[4..].chunks(4).map(|k| k[0]).collect();
        assert!(ids.windows(2).all(|w| w[0] < w[1]), "keys sorted");
        match d.read_image().expect("image") {
            tiff::decoder::DecodingResult::F32(v) => {
                // Top row first: the northern row j = 2 holds values 0.8..1.1.
                assert!((v[0] - 0.8).abs() < 1e-6);
                // Cell (0, 0) is outside the window: last row, first column.
                assert!(v[8].is_nan());
            }
            _ => panic!("expected 32-bit floats"),
        }
    }

    /// A citation beyond a GeoKey's 16-bit length is refused with its own
    /// kind (the length is the byte count after the closing `|`).
    #[test]
    fn an_overlong_citation_is_its_own_kind() {
        let grid = small_grid();
        let values = vec![1.0; 12];
        let mask = vec![true; 12];
        let citation = "x".repeat(70_000);
        match encode(&grid, &values, &mask, "m", &citation) {
            Err(GeoTiffError::CitationTooLong(n)) => assert_eq!(n, 70_001),
            other => panic!("expected CitationTooLong, got {other:?}"),
        }
        match encode(&grid, &values[..5], &mask, "m", "c") {
            Err(GeoTiffError::WrongLength { values, cells }) => {
                assert_eq!((values, cells), (5, 12))
            }
            other => panic!("expected WrongLength, got {other:?}"),
        }
    }
}
