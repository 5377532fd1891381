//! Point readers: CSV (comma, semicolon or tab) and GeoJSON.
//!
//! CSV columns are chosen by header name: `x,y` or `easting,northing` for
//! projected coordinates, `lon,lat` (also `lng`, `long`, `longitude`,
//! `latitude`) for geographic ones. GeoJSON is RFC 7946 lon/lat unless it
//! carries a legacy `crs` member naming something else. Every point keeps
//! the place it came from (`line 12`, `feature 3`) so later checks can point
//! back into the file.

use crate::coords::{Basis, CoordChoice, CoordSystem};
use crate::error::{InputError, InputErrorKind, cannot_read, read_text};
use geojson::{GeoJson, GeometryValue};
use patternproof_gpkg::Filter;
use std::path::Path;

/// Where a point came from, for messages: a CSV line or a GeoJSON
/// feature. Eight bytes, not a string, so ten million points stay cheap.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Place {
    /// A CSV line (1 = header).
    Line(u64),
    /// A GeoJSON feature (1-based).
    Feature(u32),
    /// A GeoPackage feature, by its `fid`.
    Fid(i64),
}

impl std::fmt::Display for Place {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            Place::Line(n) => write!(f, "line {n}"),
            Place::Feature(n) => write!(f, "feature {n}"),
            Place::Fid(n) => write!(f, "feature fid {n}"),
        }
    }
}

/// Longest CSV line read (bytes). A longer one is refused before it is
/// held in memory: no coordinate row is anywhere near this long.
pub const MAX_LINE: usize = 1 << 20;

/// A reader that fails once a line grows beyond [`MAX_LINE`] bytes, so a
/// file with a gigabyte-long line is refused while streaming.
struct LineLimit<R> {
    inner: R,
    run: usize,
    line: u64,
}

impl<R: std::io::Read> std::io::Read for LineLimit<R> {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        let n = self.inner.read(buf)?;
        for &b in &buf[..n] {
            if b == b'\n' {
                self.run = 0;
                self.line += 1;
            } else {
                self.run += 1;
                if self.run > MAX_LINE {
                    return Err(std::io::Error::new(
                        std::io::ErrorKind::InvalidData,
                        LineTooLong(self.line + 1),
                    ));
                }
            }
        }
        Ok(n)
    }
}

#[derive(Debug)]
struct LineTooLong(u64);

impl std::fmt::Display for LineTooLong {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "line {} is longer than {} bytes", self.0, MAX_LINE)
    }
}

impl std::error::Error for LineTooLong {}

/// Points as read, before projection.
#[derive(Debug, Clone, PartialEq)]
pub struct RawPoints {
    /// `[x, y]` or `[lon, lat]` in file order.
    pub coords: Vec<[f64; 2]>,
    /// Where each point came from, for messages.
    pub places: Vec<Place>,
    /// How the coordinates are to be read.
    pub system: CoordSystem,
    /// Why they are read so.
    pub basis: Basis,
    /// One value per point of the requested attribute field, when asked for.
    pub field_values: Option<Vec<String>>,
    /// Features without geometry, skipped.
    pub skipped_empty: usize,
    /// The first coordinate written with a decimal comma (`10,5` in a
    /// `;`- or tab-separated CSV) and where, so the reading can say so.
    pub decimal_comma: Option<(Place, String)>,
}

const PROJECTED_PAIRS: [(&str, &str); 2] = [("x", "y"), ("easting", "northing")];
const LON_NAMES: [&str; 4] = ["lon", "lng", "long", "longitude"];
const LAT_NAMES: [&str; 2] = ["lat", "latitude"];

/// Read a point file, choosing the reader from the extension
/// (`.geojson`/`.json` → GeoJSON, anything else → CSV). `field` names an
/// optional attribute (CSV column or GeoJSON property) to carry along;
/// `filter` (`--where FIELD=VALUE`) keeps only the rows or features whose
/// attribute equals the value as text, exactly as the GeoPackage reader does.
pub fn read_points(
    path: &Path,
    choice: CoordChoice,
    field: Option<&str>,
    filter: Option<&Filter>,
) -> Result<RawPoints, InputError> {
    use std::io::Read;
    let cannot = |e| cannot_read(path, e);
    let mut file = std::fs::File::open(path).map_err(cannot)?;
    // The first 64 KiB decide the format; a CSV is then streamed, never
    // held whole in memory.
    let mut head = Vec::new();
    (&mut file)
        .take(64 * 1024)
        .read_to_end(&mut head)
        .map_err(cannot)?;
    let full = head.len() < 64 * 1024;
    let start = String::from_utf8_lossy(&head);
    if full && start.trim().is_empty() {
        return Err(InputError::new(
            InputErrorKind::Empty,
            path,
            "the file is empty",
            "give a CSV with a header row (x,y / easting,northing / lon,lat) or a GeoJSON FeatureCollection of points",
        ));
    }
    if is_geojson(path, &start) {
        let text = read_text(path)?;
        read_geojson_points(path, &text, choice, field, filter)
    } else {
        let delimiter = sniff_delimiter(&start);
        let stream = LineLimit {
            inner: std::io::Cursor::new(head).chain(file),
            run: 0,
            line: 0,
        };
        read_csv_points(path, stream, delimiter, choice, field, filter)
    }
}

/// A name from a file (a site, a boundary) on one visible line: control
/// characters (a line break inside a quoted CSV cell), bidirectional
/// overrides and zero-width characters are written as escapes (`\n`,
/// `\u{202e}`). A name ends up in table rows, file names and ids; a line
/// break would start a new row, an override would reverse what follows.
pub fn one_line(name: &str) -> String {
    let mut out = String::with_capacity(name.len());
    for c in name.chars() {
        let escaped = c.escape_debug().to_string();
        if escaped.chars().count() == 1 || matches!(c, '\'' | '"' | '\\') {
            out.push(c);
        } else {
            out.push_str(&escaped);
        }
    }
    out
}

/// The error of a `--where` that kept nothing.
fn nothing_kept(path: &Path, f: &Filter, rows: usize, what: &str) -> InputError {
    InputError::new(
        InputErrorKind::Filter,
        path,
        format!(
            "--where {}={}: no {what} has this value (the file holds {rows})",
            f.field, f.value
        ),
        "check the value (text is compared exactly, case included) or leave --where out",
    )
}

/// GeoJSON by extension (`.geojson`, `.json`) or by a leading `{`
/// whatever the name: the one rule for point and boundary files.
pub(crate) fn is_geojson(path: &Path, start: &str) -> bool {
    let ext = path
        .extension()
        .and_then(|e| e.to_str())
        .unwrap_or("")
        .to_ascii_lowercase();
    ext == "geojson"
        || ext == "json"
        || start
            .trim_start_matches('\u{feff}')
            .trim_start()
            .starts_with('{')
}

/// Refuse a key repeated within one JSON object (see [`crate::json_keys`]):
/// a property map would keep the last value without a word.
pub(crate) fn refuse_repeated_keys(path: &Path, text: &str) -> Result<(), InputError> {
    match crate::json_keys::first_repeated_key(text) {
        None => Ok(()),
        Some((key, line, column)) => Err(InputError::new(
            InputErrorKind::Malformed,
            path,
            format!(
                "the key `{key}` appears twice in one object, so which value holds cannot be told"
            ),
            "remove or rename one of the two (each key of a GeoJSON object is written once)",
        )
        .at(format!("line {line}, column {column}"))),
    }
}

fn sniff_delimiter(text: &str) -> u8 {
    let header = text.lines().next().unwrap_or("");
    let candidates = [b',', b';', b'\t'];
    let mut best = b',';
    let mut best_count = 0;
    for c in candidates {
        let count = header.bytes().filter(|b| *b == c).count();
        if count > best_count {
            best = c;
            best_count = count;
        }
    }
    best
}

fn find(headers: &[String], names: &[&str]) -> Option<usize> {
    headers.iter().position(|h| names.contains(&h.as_str()))
}

/// A column the reader uses whose name (compared as read: trimmed,
/// lower-case) appears again in the header, as (name, first, second) with
/// 1-based column numbers. The reader would take the first silently.
fn repeated_name(headers: &[String], used: &[usize]) -> Option<(String, usize, usize)> {
    used.iter().find_map(|&c| {
        let name = &headers[c];
        let mut at = headers
            .iter()
            .enumerate()
            .filter(|(_, h)| *h == name)
            .map(|(k, _)| k + 1);
        let first = at.next()?;
        at.next().map(|second| (name.clone(), first, second))
    })
}

fn read_csv_points<R: std::io::Read>(
    path: &Path,
    stream: R,
    delimiter: u8,
    choice: CoordChoice,
    field: Option<&str>,
    filter: Option<&Filter>,
) -> Result<RawPoints, InputError> {
    let mut reader = csv::ReaderBuilder::new()
        .delimiter(delimiter)
        .flexible(false)
        .trim(csv::Trim::All)
        .from_reader(stream);
    let headers: Vec<String> = reader
        .headers()
        .map_err(|e| csv_error(path, e, 1))?
        .iter()
        .map(|h| h.trim_start_matches('\u{feff}').trim().to_ascii_lowercase())
        .collect();

    let projected = PROJECTED_PAIRS
        .iter()
        .find_map(|(a, b)| Some((find(&headers, &[a])?, find(&headers, &[b])?)));
    let lonlat = find(&headers, &LON_NAMES).zip(find(&headers, &LAT_NAMES));
    // Invisible characters (a zero-width space, a stray control byte)
    // are shown escaped, so the message explains why a name did not match.
    let shown = headers
        .iter()
        .map(|h| h.escape_debug().to_string())
        .collect::<Vec<_>>()
        .join(", ");
    let (cols, system) = match (choice, projected, lonlat) {
        (CoordChoice::Auto, Some(p), None) => (p, CoordSystem::Projected),
        (CoordChoice::Auto, None, Some(l)) => (l, CoordSystem::LonLat),
        (CoordChoice::Auto, Some(_), Some(_)) => {
            return Err(InputError::new(
                InputErrorKind::CoordSystem,
                path,
                format!("the header has both projected and lon/lat columns ({shown})"),
                "say which to use with --coords projected or --coords lonlat",
            )
            .at("line 1"));
        }
        (CoordChoice::Projected, Some(p), _) => (p, CoordSystem::Projected),
        (CoordChoice::LonLat, _, Some(l)) => (l, CoordSystem::LonLat),
        (CoordChoice::LonLat, Some(p), None) => (p, CoordSystem::LonLat),
        (CoordChoice::Projected, None, Some(_)) => {
            return Err(InputError::new(
                InputErrorKind::CoordSystem,
                path,
                format!("--coords projected was given but the columns are named as lon/lat ({shown})"),
                "rename the columns to x,y (or easting,northing) if they really are planar, or use --coords lonlat",
            )
            .at("line 1"));
        }
        (_, None, None) => {
            return Err(InputError::new(
                InputErrorKind::BadHeader,
                path,
                format!("no coordinate columns found in the header ({shown})"),
                "name the columns x,y or easting,northing (projected) or lon,lat / longitude,latitude (geographic)",
            )
            .at("line 1"));
        }
    };
    let mut used = vec![cols.0, cols.1];
    let basis = Basis::forced(choice).unwrap_or_else(|| {
        Basis::inferred(format!(
            "the CSV columns are named {},{}",
            headers[cols.0], headers[cols.1]
        ))
    });
    let field_col = match field {
        Some(name) => Some(
            find(&headers, &[name.to_ascii_lowercase().as_str()]).ok_or_else(|| {
                InputError::new(
                    InputErrorKind::BadHeader,
                    path,
                    format!("there is no column named '{name}' (columns: {shown})"),
                    "check the field name",
                )
                .at("line 1")
            })?,
        ),
        None => None,
    };

    let filter_col = match filter {
        Some(f) => Some((
            find(&headers, &[f.field.to_ascii_lowercase().as_str()]).ok_or_else(|| {
                InputError::new(
                    InputErrorKind::Filter,
                    path,
                    format!(
                        "--where {}={}: there is no column named '{}' (columns: {shown})",
                        f.field, f.value, f.field
                    ),
                    "name one of the columns, or leave --where out",
                )
                .at("line 1")
            })?,
            f.value.trim(),
        )),
        None => None,
    };
    used.extend(field_col);
    used.extend(filter_col.map(|(c, _)| c));
    if let Some((name, first, second)) = repeated_name(&headers, &used) {
        return Err(InputError::new(
            InputErrorKind::BadHeader,
            path,
            format!(
                "the column name '{name}' appears twice (columns {first} and {second}), so which one to read cannot be told"
            ),
            "rename or remove one of the two columns",
        )
        .at("line 1"));
    }
    let mut rows = 0usize;

    let lenient_decimal_comma = delimiter != b',';
    let mut coords = Vec::new();
    let mut places = Vec::new();
    let mut values = Vec::new();
    let mut record = csv::StringRecord::new();
    let mut decimal_comma = None;
    loop {
        match reader.read_record(&mut record) {
            Ok(true) => {}
            Ok(false) => break,
            Err(e) => {
                let line = e.position().map(|p| p.line()).unwrap_or(0);
                return Err(csv_error(path, e, line));
            }
        }
        rows += 1;
        // Rows the filter leaves out are not read further: a bad number in
        // another year's row does not stop this year's analysis.
        if let Some((c, value)) = filter_col
            && record.get(c).unwrap_or("") != value
        {
            continue;
        }
        let line = record.position().map(|p| p.line()).unwrap_or(0);
        let place = Place::Line(line);
        let mut number = |col: usize| {
            let raw = record.get(col).unwrap_or("");
            let (v, comma) = parse_number(path, place, &headers[col], raw, lenient_decimal_comma)?;
            if comma && decimal_comma.is_none() {
                decimal_comma = Some((place, raw.to_string()));
            }
            Ok::<f64, InputError>(v)
        };
        let x = number(cols.0)?;
        let y = number(cols.1)?;
        if let Some(c) = field_col {
            let v = record.get(c).unwrap_or("");
            // An empty cell names no site: grouping such rows into a site
            // called "" would analyse them together without a word.
            if v.trim().is_empty() {
                return Err(InputError::new(
                    InputErrorKind::MissingValue,
                    path,
                    format!("column '{}' is empty: the row names no site", headers[c]),
                    "give every row the name of its site, or leave the row out with --where",
                )
                .at(place.to_string()));
            }
            values.push(one_line(v));
        }
        coords.push([x, y]);
        places.push(place);
    }
    if let Some(f) = filter
        && coords.is_empty()
        && rows > 0
    {
        return Err(nothing_kept(path, f, rows, "row"));
    }
    coords.shrink_to_fit();
    places.shrink_to_fit();
    Ok(RawPoints {
        coords,
        places,
        system,
        basis,
        field_values: field_col.map(|_| values),
        skipped_empty: 0,
        decimal_comma,
    })
}

/// A CSV reading error as the user needs it: which line, and what to do.
fn csv_error(path: &Path, e: csv::Error, line: u64) -> InputError {
    let at = format!("line {}", line.max(1));
    match e.kind() {
        csv::ErrorKind::Io(io) => {
            match io.get_ref().and_then(|r| r.downcast_ref::<LineTooLong>()) {
                Some(long) => InputError::new(
                    InputErrorKind::TooLarge,
                    path,
                    format!("{long}: not a table of coordinates"),
                    "check that this is the right file; a coordinate row is a few dozen bytes",
                ),
                None => InputError::new(
                    InputErrorKind::Unreadable,
                    path,
                    format!("cannot read the file ({io})"),
                    "check the path and that the file is readable",
                ),
            }
        }
        csv::ErrorKind::Utf8 { pos, .. } => InputError::new(
            InputErrorKind::Unreadable,
            path,
            "the file is not UTF-8 text",
            "save it as UTF-8 (plain CSV, GeoJSON or WKT text)",
        )
        .at(format!("line {}", pos.as_ref().map_or(line, |p| p.line()))),
        _ => InputError::new(
            InputErrorKind::Malformed,
            path,
            format!("malformed row ({e})"),
            "every row needs as many fields as the header",
        )
        .at(at),
    }
}

/// `place` is formatted only when the value is refused, so the common
/// case allocates nothing per row. The flag says whether the value was
/// read with a decimal comma.
fn parse_number(
    path: &Path,
    place: Place,
    column: &str,
    raw: &str,
    decimal_comma: bool,
) -> Result<(f64, bool), InputError> {
    let mut comma = false;
    let parsed = raw.parse::<f64>().ok().or_else(|| {
        if decimal_comma && raw.matches(',').count() == 1 && !raw.contains('.') {
            comma = true;
            raw.replace(',', ".").parse::<f64>().ok()
        } else {
            None
        }
    });
    match parsed {
        Some(v) if v.is_finite() => Ok((v, comma)),
        Some(_) => Err(InputError::new(
            InputErrorKind::BadCoordinate,
            path,
            format!("column '{column}' holds '{raw}', which is not a finite number"),
            "remove or fix the row; missing or infinite coordinates cannot be placed",
        )
        .at(place.to_string())),
        None if raw.contains(',') && raw.replace(',', ".").parse::<f64>().is_ok() => Err(InputError::new(
            InputErrorKind::BadCoordinate,
            path,
            format!("column '{column}' holds '{raw}': a decimal comma in a comma-separated file"),
            "write decimals with a point (512.25), or separate the columns with ';' so that decimal commas can be read",
        )
        .at(place.to_string())),
        None => Err(InputError::new(
            InputErrorKind::BadCoordinate,
            path,
            format!("column '{column}' holds '{raw}', which is not a number"),
            "coordinates must be plain decimal numbers (e.g. 512.25); fix or remove the row",
        )
        .at(place.to_string())),
    }
}

/// The legacy `crs` member of a GeoJSON object (dropped by RFC 7946,
/// still written by some exporters).
pub(crate) fn legacy_crs(gj: &GeoJson) -> Option<&serde_json::Value> {
    let members = match gj {
        GeoJson::FeatureCollection(fc) => &fc.foreign_members,
        GeoJson::Feature(f) => &f.foreign_members,
        GeoJson::Geometry(g) => &g.foreign_members,
    };
    members.as_ref()?.get("crs")
}

/// Is a GeoJSON file lon/lat? Without a `crs` member it is (RFC 7946);
/// `None` when the member names a system that cannot be told.
pub(crate) fn declared_lonlat(crs: Option<&serde_json::Value>) -> Option<bool> {
    crs.map_or(Some(true), crs_is_lonlat)
}

/// Does a legacy GeoJSON `crs` member name a lon/lat system?
fn crs_is_lonlat(crs: &serde_json::Value) -> Option<bool> {
    let name = crs
        .get("properties")?
        .get("name")?
        .as_str()?
        .trim()
        .to_ascii_uppercase();
    // An empty name states nothing: ask rather than read it as planar.
    if name.is_empty() {
        return None;
    }
    if name.contains("CRS84") {
        return Some(true);
    }
    let code = name
        .rsplit(':')
        .next()
        .and_then(|c| c.trim().parse::<u32>().ok());
    match code {
        Some(c) if name.contains("EPSG") => epsg_is_lonlat(c),
        // Another coded system (a URN of some other authority): ask.
        _ if name.starts_with("URN:") => None,
        // A free-text name ("local survey grid, metres"): planar.
        _ => Some(false),
    }
}

/// Well-known EPSG codes: geographic 2-D systems (lon/lat on some datum)
/// and projected families. Anything else is not guessed: a wrong guess
/// would turn degrees into metres.
pub(crate) fn epsg_is_lonlat(code: u32) -> Option<bool> {
    const GEOGRAPHIC: [u32; 15] = [
        4326, 4258, 4269, 4283, 7844, 4167, 4617, 4019, 4674, 4612, 6668, 4490, 4230, 4277, 4267,
    ];
    const PROJECTED: [u32; 10] = [3035, 3857, 3395, 27700, 2056, 28992, 5070, 3006, 2193, 3577];
    if GEOGRAPHIC.contains(&code) {
        Some(true)
    } else if PROJECTED.contains(&code)
        || (32601..=32660).contains(&code)
        || (32701..=32760).contains(&code)
        || (25828..=25838).contains(&code)
        || (31466..=31469).contains(&code)
    {
        Some(false)
    } else {
        None
    }
}

/// The crs member's name, or the member itself (shortened) when it has no
/// name string, so the message shows what the file holds.
fn crs_name(crs: &serde_json::Value) -> String {
    match crs
        .get("properties")
        .and_then(|p| p.get("name"))
        .and_then(|n| n.as_str())
    {
        Some(name) => name.to_string(),
        None => {
            let text = crs.to_string();
            match text.char_indices().nth(80) {
                Some((cut, _)) => format!("{}…", &text[..cut]),
                None => text,
            }
        }
    }
}

fn read_geojson_points(
    path: &Path,
    text: &str,
    choice: CoordChoice,
    field: Option<&str>,
    filter: Option<&Filter>,
) -> Result<RawPoints, InputError> {
    let gj: GeoJson = text.parse().map_err(|e| {
        InputError::new(
            InputErrorKind::Malformed,
            path,
            format!("not valid GeoJSON ({e})"),
            "check the file against RFC 7946 (a FeatureCollection of Point or MultiPoint features)",
        )
    })?;
    refuse_repeated_keys(path, text)?;
    let crs = legacy_crs(&gj);
    let basis = match (Basis::forced(choice), crs) {
        (Some(forced), _) => forced,
        (None, None) => Basis::inferred("GeoJSON without a crs member is lon/lat by RFC 7946"),
        (None, Some(c)) => Basis::stated(format!("the GeoJSON crs member names `{}`", crs_name(c))),
    };
    let system = match (choice, declared_lonlat(crs)) {
        (CoordChoice::Projected, _) => CoordSystem::Projected,
        (CoordChoice::LonLat, _) => CoordSystem::LonLat,
        (CoordChoice::Auto, Some(true)) => CoordSystem::LonLat,
        (CoordChoice::Auto, Some(false)) => CoordSystem::Projected,
        (CoordChoice::Auto, None) => {
            return Err(InputError::new(
                InputErrorKind::CoordSystem,
                path,
                format!(
                    "the legacy 'crs' member names `{}`, which patternproof cannot identify as lon/lat or projected",
                    crs.map(crs_name).unwrap_or_default()
                ),
                "say how to read the coordinates: --coords projected (with --unit) or --coords lonlat",
            ));
        }
    };
    let features = match gj {
        GeoJson::FeatureCollection(fc) => fc.features,
        GeoJson::Feature(f) => vec![f],
        GeoJson::Geometry(g) => vec![geojson::Feature {
            geometry: Some(g),
            ..Default::default()
        }],
    };
    let mut coords = Vec::new();
    let mut places = Vec::new();
    let mut values = Vec::new();
    let mut skipped = 0;
    let text_of = |v: &serde_json::Value| {
        v.as_str()
            .map(str::to_string)
            .unwrap_or_else(|| v.to_string())
    };
    if let Some(w) = filter
        && !features.iter().any(|f| {
            f.properties
                .as_ref()
                .is_some_and(|p| p.contains_key(&w.field))
        })
    {
        return Err(InputError::new(
            InputErrorKind::Filter,
            path,
            format!(
                "--where {}={}: no feature has a property named '{}'",
                w.field, w.value, w.field
            ),
            "name a property of the features, or leave --where out",
        ));
    }
    for (i, f) in features.iter().enumerate() {
        let place = format!("feature {}", i + 1);
        if let Some(w) = filter {
            let value = f.properties.as_ref().and_then(|p| p.get(&w.field));
            if value.map(text_of).as_deref() != Some(w.value.as_str()) {
                continue;
            }
        }
        // A feature without geometry (allowed by RFC 7946) has no place to
        // analyse: skipped and counted, not fatal.
        let Some(geometry) = &f.geometry else {
            skipped += 1;
            continue;
        };
        let value = match field {
            None => None,
            // null and "" name no site: they are missing, not a site
            // called "null" or "".
            Some(name) => Some(
                f.properties
                    .as_ref()
                    .and_then(|p| p.get(name))
                    .filter(|v| !v.is_null())
                    .map(|v| one_line(&text_of(v)))
                    .filter(|t| !t.trim().is_empty())
                    .ok_or_else(|| {
                        InputError::new(
                            InputErrorKind::MissingValue,
                            path,
                            format!("the feature has no value in property '{name}'"),
                            "give every feature that property, with the name of its site",
                        )
                        .at(place.clone())
                    })?,
            ),
        };
        let positions: Vec<&geojson::Position> = match &geometry.value {
            GeometryValue::Point { coordinates } => vec![coordinates],
            // An empty MultiPoint places nothing, like a null geometry.
            GeometryValue::MultiPoint { coordinates } if coordinates.is_empty() => {
                skipped += 1;
                continue;
            }
            GeometryValue::MultiPoint { coordinates } => coordinates.iter().collect(),
            other => {
                return Err(InputError::new(
                    InputErrorKind::BadGeometry,
                    path,
                    format!("the feature is a {}, not a point", other.type_name()),
                    "point files may hold only Point and MultiPoint features; put study-area polygons in a --boundary file",
                )
                .at(place));
            }
        };
        for pos in positions {
            let s = pos.as_slice();
            if s.len() < 2 || !s[0].is_finite() || !s[1].is_finite() {
                return Err(InputError::new(
                    InputErrorKind::BadCoordinate,
                    path,
                    "a position needs two finite numbers",
                    "fix the coordinates",
                )
                .at(place));
            }
            coords.push([s[0], s[1]]);
            places.push(Place::Feature((i + 1) as u32));
            if let Some(v) = &value {
                values.push(v.clone());
            }
        }
    }
    if let Some(w) = filter
        && coords.is_empty()
        && skipped == 0
    {
        return Err(nothing_kept(path, w, features.len(), "feature"));
    }
    Ok(RawPoints {
        coords,
        places,
        system,
        basis,
        field_values: field.map(|_| values),
        skipped_empty: skipped,
        decimal_comma: None,
    })
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::*;
    use crate::test_files::file;

    #[test]
    fn csv_picks_columns_by_name_and_delimiter() {
        let f = file(".csv", "id;Easting;Northing\n1;10,5;20\n2;11;21\n");
        let p = read_points(f.path(), CoordChoice::Auto, None, None).unwrap();
        assert_eq!(p.coords, vec![[10.5, 20.0], [11.0, 21.0]]);
        assert_eq!(p.system, CoordSystem::Projected);
        assert_eq!(p.places[1], Place::Line(3));
        assert_eq!(p.places[1].to_string(), "line 3");
    }

    /// A used column whose name appears twice (case aside) is refused with
    /// both column numbers; a repeated name the reader does not use is not.
    #[test]
    fn csv_refuses_a_repeated_coordinate_or_filter_column() {
        let dup = file(".csv", "x,X,y\n1,2,3\n4,5,6\n");
        let e = read_points(dup.path(), CoordChoice::Auto, None, None).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::BadHeader, "{e}");
        assert_eq!(e.location.as_deref(), Some("line 1"));
        assert!(
            e.what.contains("'x' appears twice (columns 1 and 2)"),
            "{}",
            e.what
        );
        let year = file(".csv", "x,y,year,year\n1,2,2023,2024\n");
        let e = read_points(
            year.path(),
            CoordChoice::Auto,
            None,
            Some(&keep("year", "2024")),
        )
        .unwrap_err();
        assert_eq!(e.kind, InputErrorKind::BadHeader, "{e}");
        assert!(e.what.contains("'year' appears twice (columns 3 and 4)"));
        assert!(read_points(year.path(), CoordChoice::Auto, None, None).is_ok());
    }

    /// Issue 20: a row or feature without a site name (an empty cell, an
    /// empty string, JSON null) is refused with its place, rather than
    /// grouped into a site called "" or "null".
    #[test]
    fn a_missing_site_name_is_refused() {
        let csv = file(".csv", "x,y,site\n1,2,north\n3,4, \n5,6,south\n");
        let e = read_points(csv.path(), CoordChoice::Projected, Some("site"), None).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::MissingValue, "{e}");
        assert_eq!(e.location.as_deref(), Some("line 3"));
        assert!(e.what.contains("column 'site' is empty"), "{}", e.what);
        for missing in ["null", "\"\""] {
            let gj = file(
                ".geojson",
                &format!(
                    r#"{{"type":"FeatureCollection","features":[
                  {{"type":"Feature","properties":{{"site":"north"}},"geometry":{{"type":"Point","coordinates":[1,2]}}}},
                  {{"type":"Feature","properties":{{"site":{missing}}},"geometry":{{"type":"Point","coordinates":[3,4]}}}}]}}"#
                ),
            );
            let e = read_points(gj.path(), CoordChoice::Projected, Some("site"), None).unwrap_err();
            assert_eq!(e.kind, InputErrorKind::MissingValue, "{e}");
            assert_eq!(e.location.as_deref(), Some("feature 2"), "{missing}");
            assert!(e.what.contains("no value in property 'site'"), "{}", e.what);
        }
        let ok = file(".csv", "x,y,site\n1,2,north\n3,4,7\n");
        let p = read_points(ok.path(), CoordChoice::Projected, Some("site"), None).unwrap();
        assert_eq!(
            p.field_values,
            Some(vec!["north".to_string(), "7".to_string()])
        );
    }

    /// Names keep their letters (accents, quotes, slashes included) and
    /// lose only what would break a line or reverse the text.
    #[test]
    fn names_are_kept_on_one_visible_line() {
        assert_eq!(one_line("Wiese Süd / 2"), "Wiese Süd / 2");
        assert_eq!(one_line("a\"b'c\\d"), "a\"b'c\\d");
        assert_eq!(one_line("north\nplot"), "north\\nplot");
        assert_eq!(one_line("a\u{202e}b\tc"), "a\\u{202e}b\\tc");
        let csv = file(".csv", "x,y,site\n1,2,\"north\nplot\"\n");
        let p = read_points(csv.path(), CoordChoice::Projected, Some("site"), None).unwrap();
        assert_eq!(p.field_values, Some(vec!["north\\nplot".to_string()]));
    }

    /// Issue 20: a `crs` member with an empty name states nothing and is
    /// asked about (it was read as a planar system); one without a name
    /// string is shown as written; an empty MultiPoint counts with the
    /// features without geometry; an invisible character in a header
    /// name is shown escaped.
    #[test]
    fn odd_crs_members_empty_multipoints_and_invisible_headers() {
        let fc = |crs: &str| {
            file(
                ".geojson",
                &format!(
                    r#"{{"type":"FeatureCollection","crs":{crs},"features":[
                  {{"type":"Feature","properties":{{}},"geometry":{{"type":"MultiPoint","coordinates":[]}}}},
                  {{"type":"Feature","properties":{{}},"geometry":{{"type":"Point","coordinates":[10.1,50.2]}}}}]}}"#
                ),
            )
        };
        let empty = fc(r#"{"type":"name","properties":{"name":" "}}"#);
        let e = read_points(empty.path(), CoordChoice::Auto, None, None).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::CoordSystem, "{e}");
        assert!(e.what.contains("cannot identify"), "{}", e.what);
        let bare = fc(r#""EPSG:4326""#);
        let e = read_points(bare.path(), CoordChoice::Auto, None, None).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::CoordSystem, "{e}");
        assert!(e.what.contains("names `\"EPSG:4326\"`"), "{}", e.what);
        let p = read_points(empty.path(), CoordChoice::LonLat, None, None).unwrap();
        assert_eq!((p.coords.len(), p.skipped_empty), (1, 1));
        let zw = file(".csv", "x\u{200b},y\n1,2\n");
        let e = read_points(zw.path(), CoordChoice::Auto, None, None).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::BadHeader, "{e}");
        assert!(e.what.contains("(x\\u{200b}, y)"), "{}", e.what);
    }

    fn keep(field: &str, value: &str) -> Filter {
        Filter {
            field: field.into(),
            value: value.into(),
        }
    }

    /// `--where` on a CSV keeps the rows whose column equals the value as
    /// text (the column found as the coordinate columns are, case aside),
    /// never parses the rows it leaves out, and says what is wrong when the
    /// column is missing or nothing matches. By hand on five rows.
    #[test]
    fn csv_where_keeps_matching_rows_only() {
        let f = file(
            ".csv",
            "x,y,Year
1,2,2023
3,4,2024
not-a-number,6,2023
7,8, 2024
9,10,20240
",
        );
        let p = read_points(
            f.path(),
            CoordChoice::Auto,
            None,
            Some(&keep("year", "2024")),
        )
        .unwrap();
        assert_eq!(p.coords, vec![[3.0, 4.0], [7.0, 8.0]]);
        assert_eq!(p.places, vec![Place::Line(3), Place::Line(5)]);
        let e = read_points(
            f.path(),
            CoordChoice::Auto,
            None,
            Some(&keep("season", "dry")),
        )
        .unwrap_err();
        assert_eq!(e.kind, InputErrorKind::Filter, "{e}");
        assert!(e.what.contains("no column named 'season'"), "{}", e.what);
        assert!(e.what.contains("x, y, year"), "{}", e.what);
        let e = read_points(
            f.path(),
            CoordChoice::Auto,
            None,
            Some(&keep("year", "1999")),
        )
        .unwrap_err();
        assert_eq!(e.kind, InputErrorKind::Filter, "{e}");
        assert!(
            e.what.contains("no row has this value (the file holds 5)"),
            "{}",
            e.what
        );
        // Without the filter the bad number stops the run, as before.
        let e = read_points(f.path(), CoordChoice::Auto, None, None).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::BadCoordinate, "{e}");
        assert_eq!(e.location.as_deref(), Some("line 4"));
    }

    /// `--where` on GeoJSON compares the property as text: a string as it
    /// is, a number as JSON writes it; features without the property are
    /// left out, and a property no feature has is an error.
    #[test]
    fn geojson_where_compares_properties_as_text() {
        let f = file(
            ".geojson",
            r#"{"type":"FeatureCollection","features":[
              {"type":"Feature","properties":{"year":2024,"kind":"nest"},"geometry":{"type":"Point","coordinates":[1,2]}},
              {"type":"Feature","properties":{"year":"2024","kind":"burrow"},"geometry":{"type":"Point","coordinates":[3,4]}},
              {"type":"Feature","properties":{"year":2023,"kind":"nest"},"geometry":{"type":"Point","coordinates":[5,6]}},
              {"type":"Feature","properties":{},"geometry":{"type":"Point","coordinates":[7,8]}}]}"#,
        );
        let read = |w: Filter| read_points(f.path(), CoordChoice::Projected, None, Some(&w));
        assert_eq!(
            read(keep("year", "2024")).unwrap().coords,
            vec![[1.0, 2.0], [3.0, 4.0]]
        );
        assert_eq!(
            read(keep("kind", "nest")).unwrap().coords,
            vec![[1.0, 2.0], [5.0, 6.0]]
        );
        let e = read(keep("season", "dry")).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::Filter, "{e}");
        assert!(
            e.what.contains("no feature has a property named 'season'"),
            "{}",
            e.what
        );
        let e = read(keep("kind", "den")).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::Filter, "{e}");
        assert!(
            e.what
                .contains("no feature has this value (the file holds 4)"),
            "{}",
            e.what
        );
    }

    #[test]
    fn csv_lonlat_columns_are_geographic() {
        let f = file(".csv", "lat\tlon\n50.1\t8.2\n");
        let p = read_points(f.path(), CoordChoice::Auto, None, None).unwrap();
        assert_eq!(p.coords, vec![[8.2, 50.1]]);
        assert_eq!(p.system, CoordSystem::LonLat);
    }

    #[test]
    fn small_planar_values_are_never_read_as_degrees() {
        let f = file(".csv", "x,y\n12.0,45.0\n13.0,46.0\n");
        assert_eq!(
            read_points(f.path(), CoordChoice::Auto, None, None)
                .unwrap()
                .system,
            CoordSystem::Projected
        );
    }

    #[test]
    fn bad_number_names_line_and_column() {
        let f = file(".csv", "x,y\n1,2\n3,abc\n");
        let e = read_points(f.path(), CoordChoice::Auto, None, None).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::BadCoordinate, "{e}");
        assert_eq!(e.location.as_deref(), Some("line 3"));
        assert!(e.what.contains("'y'") && e.what.contains("abc"), "{e}");
        let f = file(".csv", "x,y\n1,NaN\n");
        let e = read_points(f.path(), CoordChoice::Auto, None, None).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::BadCoordinate, "{e}");
        assert!(e.what.contains("not a finite number"), "{e}");
    }

    #[test]
    fn ambiguous_or_unknown_headers_stop() {
        let f = file(".csv", "x,y,lon,lat\n1,2,3,4\n");
        let e = read_points(f.path(), CoordChoice::Auto, None, None).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::CoordSystem, "{e}");
        assert!(e.hint.contains("--coords"), "{e}");
        let f = file(".csv", "a,b\n1,2\n");
        let e = read_points(f.path(), CoordChoice::Auto, None, None).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::BadHeader, "{e}");
        assert_eq!(e.location.as_deref(), Some("line 1"));
    }

    #[test]
    fn geojson_legacy_crs_means_projected() {
        let body = r#"{"type":"FeatureCollection","crs":{"type":"name","properties":{"name":"urn:ogc:def:crs:EPSG::32632"}},
          "features":[{"type":"Feature","properties":{"plot":"a"},"geometry":{"type":"MultiPoint","coordinates":[[500000,5500000],[500010,5500000]]}}]}"#;
        let f = file(".geojson", body);
        let p = read_points(f.path(), CoordChoice::Auto, Some("plot"), None).unwrap();
        assert_eq!(p.system, CoordSystem::Projected);
        assert_eq!(p.coords.len(), 2);
        assert_eq!(p.field_values.unwrap(), vec!["a", "a"]);
    }

    #[test]
    fn geojson_rejects_polygons_in_point_file() {
        let body = r#"{"type":"FeatureCollection","features":[{"type":"Feature","properties":null,"geometry":{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1],[0,0]]]}}]}"#;
        let f = file(".geojson", body);
        let e = read_points(f.path(), CoordChoice::Auto, None, None).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::BadGeometry, "{e}");
        assert_eq!(e.location.as_deref(), Some("feature 1"));
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod streaming {
    use super::*;

    /// A line longer than MAX_LINE is refused while streaming, with its
    /// line number, before the rest of the file is read.
    #[test]
    fn refuses_an_overlong_line() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("long.csv");
        let mut text = String::from("x,y\n1,2\n");
        text.push_str(&"9".repeat(MAX_LINE + 10));
        text.push_str(",1\n");
        std::fs::write(&path, text).unwrap();
        let e = read_points(&path, CoordChoice::Auto, None, None).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::TooLarge, "{e}");
        assert!(e.what.contains("line 3 is longer than"), "{}", e.what);
    }

    /// A file larger than the 64 KiB format probe streams through intact.
    #[test]
    fn streams_a_file_larger_than_the_probe() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("big.csv");
        let mut text = String::from("x,y\n");
        for i in 0..20_000 {
            text.push_str(&format!("{i},{}\n", i % 97));
        }
        std::fs::write(&path, text).unwrap();
        let p = read_points(&path, CoordChoice::Auto, None, None).unwrap();
        assert_eq!(p.coords.len(), 20_000);
        assert_eq!(p.coords[19_999], [19_999.0, (19_999 % 97) as f64]);
        assert_eq!(p.places[19_999], Place::Line(20_001));
    }
}
