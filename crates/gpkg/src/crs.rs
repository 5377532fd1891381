//! What a `gpkg_spatial_ref_sys` definition says about the coordinates:
//! geographic (degrees) or projected, and in which linear unit.
//!
//! The definition column holds OGC WKT: WKT 1 (OGC 01-009, `GEOGCS[…]`,
//! `PROJCS[…]`) in most files, WKT 2 (ISO 19162 / OGC 18-010, `GEOGCRS[…]`,
//! `PROJCRS[…]`) where the CRS WKT extension is used. Only the outermost
//! keyword and the unit directly inside it are read: that is all the
//! analysis needs (is it degrees, and what is one unit called), and a
//! definition too odd to read that far is reported as unknown rather than
//! guessed.

/// One `KEYWORD[...]` node of WKT text: its keyword, its plain values
/// (quoted strings unquoted, numbers as written) and its child nodes.
#[derive(Debug, Clone, PartialEq)]
struct Node {
    keyword: String,
    values: Vec<String>,
    children: Vec<Node>,
}

/// Deepest nesting accepted; real definitions stay below ten.
const MAX_DEPTH: usize = 32;

fn parse(text: &str) -> Option<Node> {
    let chars: Vec<char> = text.trim().chars().collect();
    let mut at = 0;
    let node = node(&chars, &mut at, 0)?;
    while at < chars.len() && chars[at].is_whitespace() {
        at += 1;
    }
    (at == chars.len()).then_some(node)
}

fn node(c: &[char], at: &mut usize, depth: usize) -> Option<Node> {
    if depth > MAX_DEPTH {
        return None;
    }
    skip_space(c, at);
    let start = *at;
    while *at < c.len() && (c[*at].is_ascii_alphanumeric() || c[*at] == '_') {
        *at += 1;
    }
    if *at == start {
        return None;
    }
    let keyword: String = c[start..*at]
        .iter()
        .collect::<String>()
        .to_ascii_uppercase();
    skip_space(c, at);
    let close = match c.get(*at) {
        Some('[') => ']',
        Some('(') => ')',
        _ => return None,
    };
    *at += 1;
    let mut out = Node {
        keyword,
        values: Vec::new(),
        children: Vec::new(),
    };
    loop {
        skip_space(c, at);
        match c.get(*at)? {
            '"' => {
                *at += 1;
                let mut s = String::new();
                loop {
                    match c.get(*at)? {
                        '"' if c.get(*at + 1) == Some(&'"') => {
                            s.push('"');
                            *at += 2;
                        }
                        '"' => {
                            *at += 1;
                            break;
                        }
                        ch => {
                            s.push(*ch);
                            *at += 1;
                        }
                    }
                }
                out.values.push(s);
            }
            ch if ch.is_ascii_alphabetic() => {
                // A child node, or a bare word (an axis direction such as
                // EAST): look past the word for a bracket.
                let save = *at;
                let mut end = *at;
                while end < c.len() && (c[end].is_ascii_alphanumeric() || c[end] == '_') {
                    end += 1;
                }
                let mut look = end;
                while look < c.len() && c[look].is_whitespace() {
                    look += 1;
                }
                if matches!(c.get(look), Some('[') | Some('(')) {
                    out.children.push(node(c, at, depth + 1)?);
                } else {
                    out.values.push(c[save..end].iter().collect());
                    *at = end;
                }
            }
            _ => {
                let start = *at;
                while *at < c.len() && !matches!(c[*at], ',' | ']' | ')') {
                    *at += 1;
                }
                out.values
                    .push(c[start..*at].iter().collect::<String>().trim().to_string());
            }
        }
        skip_space(c, at);
        match c.get(*at)? {
            ',' => *at += 1,
            ch if *ch == close => {
                *at += 1;
                return Some(out);
            }
            _ => return None,
        }
    }
}

fn skip_space(c: &[char], at: &mut usize) {
    while *at < c.len() && c[*at].is_whitespace() {
        *at += 1;
    }
}

/// What a definition describes.
#[derive(Debug, Clone, PartialEq)]
pub enum CrsKind {
    /// Longitude/latitude; `degrees` is false when the angular unit is
    /// something else (grad, radian), which patternproof does not convert.
    Geographic {
        /// Whether the angular unit is the degree.
        degrees: bool,
        /// The unit's name as written.
        unit: Option<String>,
    },
    /// Planar coordinates in a linear unit.
    Projected {
        /// A short label for the unit (`m`, `ft`, `US survey ft`, `km`, or
        /// the name as written); `None` when the definition names none.
        unit: Option<String>,
    },
    /// A geocentric, vertical, engineering or other system.
    Other(String),
}

/// Read the outermost keyword and unit of a WKT definition; `None` if it
/// is not WKT at all (e.g. `undefined`).
pub fn kind_of(definition: &str) -> Option<CrsKind> {
    let root = parse(definition)?;
    let root = match root.keyword.as_str() {
        // WKT 2 may wrap the CRS in a bound CRS; the source CRS decides.
        "BOUNDCRS" => root
            .children
            .iter()
            .find(|c| c.keyword == "SOURCECRS")
            .and_then(|s| s.children.first())?
            .clone(),
        // WKT 1 with a TOWGS84 / compound wrapper: the horizontal part.
        "COMPD_CS" | "COMPOUNDCRS" => root
            .children
            .iter()
            .find(|c| {
                matches!(
                    c.keyword.as_str(),
                    "PROJCS" | "GEOGCS" | "PROJCRS" | "GEOGCRS" | "PROJECTEDCRS" | "GEOGRAPHICCRS"
                )
            })?
            .clone(),
        _ => root,
    };
    let unit = root
        .children
        .iter()
        .rev()
        .find(|c| matches!(c.keyword.as_str(), "UNIT" | "LENGTHUNIT" | "ANGLEUNIT"))
        .or_else(|| {
            // WKT 2 may give the unit on each axis instead.
            root.children
                .iter()
                .filter(|c| c.keyword == "AXIS")
                .flat_map(|c| c.children.iter())
                .find(|c| matches!(c.keyword.as_str(), "UNIT" | "LENGTHUNIT" | "ANGLEUNIT"))
        });
    let name = unit.and_then(|u| u.values.first().cloned());
    let factor = unit
        .and_then(|u| u.values.get(1))
        .and_then(|v| v.parse::<f64>().ok());
    Some(match root.keyword.as_str() {
        "GEOGCS" | "GEOGCRS" | "GEOGRAPHICCRS" => Geographic {
            degrees: is_degree(name.as_deref(), factor),
            unit: name,
        },
        // WKT 2's GEODCRS is geographic only with an ellipsoidal CS.
        "GEODCRS" | "GEODETICCRS" => {
            let ellipsoidal = root.children.iter().any(|c| {
                c.keyword == "CS"
                    && c.values
                        .first()
                        .is_some_and(|v| v.eq_ignore_ascii_case("ellipsoidal"))
            });
            if ellipsoidal {
                Geographic {
                    degrees: is_degree(name.as_deref(), factor),
                    unit: name,
                }
            } else {
                CrsKind::Other(root.keyword.clone())
            }
        }
        "PROJCS" | "PROJCRS" | "PROJECTEDCRS" => CrsKind::Projected {
            unit: linear_label(name.as_deref(), factor),
        },
        other => CrsKind::Other(other.to_string()),
    })
}

use CrsKind::Geographic;

fn is_degree(name: Option<&str>, factor: Option<f64>) -> bool {
    let by_name = name.is_some_and(|n| {
        let n = n.to_ascii_lowercase();
        n.starts_with("degree") || n == "deg"
    });
    let by_factor = factor.is_some_and(|f| (f - std::f64::consts::PI / 180.0).abs() < 1e-12);
    match factor {
        Some(_) => by_factor,
        None => by_name,
    }
}

/// A short label for a linear unit, from its conversion factor to metres
/// when that is a well-known one, else its name.
fn linear_label(name: Option<&str>, factor: Option<f64>) -> Option<String> {
    if let Some(f) = factor {
        // Foot: 0.3048 m exactly; US survey foot: 1200/3937 m (NIST SP 811, appendix B).
        let known = [
            (1.0, "m"),
            (1000.0, "km"),
            (0.3048, "ft"),
            (1200.0 / 3937.0, "US survey ft"),
        ];
        if let Some((_, label)) = known.iter().find(|(k, _)| (f - k).abs() <= 1e-12 * k) {
            return Some((*label).to_string());
        }
    }
    name.map(|n| match n.to_ascii_lowercase().as_str() {
        "metre" | "meter" | "metres" | "meters" => "m".to_string(),
        _ => n.to_string(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The WGS 84 definition the GeoPackage standard gives for srs_id 4326
    /// (OGC GeoPackage 1.3 §1.1.2.1.2, Table 3 / Annex).
    const WGS84: &str = r#"GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563,AUTHORITY["EPSG","7030"]],AUTHORITY["EPSG","6326"]],PRIMEM["Greenwich",0,AUTHORITY["EPSG","8901"]],UNIT["degree",0.0174532925199433,AUTHORITY["EPSG","9122"]],AUTHORITY["EPSG","4326"]]"#;

    #[test]
    fn wkt1_geographic_and_projected() {
        assert_eq!(
            kind_of(WGS84),
            Some(Geographic {
                degrees: true,
                unit: Some("degree".into())
            })
        );
        // A UTM definition in WKT 1 (OGC 01-009 §7.4 grammar); the
        // GEOGCS's own degree unit must not be taken for the linear one.
        let utm = format!(
            r#"PROJCS["WGS 84 / UTM zone 33N",{WGS84},PROJECTION["Transverse_Mercator"],PARAMETER["central_meridian",15],UNIT["metre",1,AUTHORITY["EPSG","9001"]],AXIS["Easting",EAST],AXIS["Northing",NORTH]]"#
        );
        assert_eq!(
            kind_of(&utm),
            Some(CrsKind::Projected {
                unit: Some("m".into())
            })
        );
        let feet = utm.replace(
            r#"UNIT["metre",1,"#,
            r#"UNIT["US survey foot",0.304800609601219,"#,
        );
        assert_eq!(
            kind_of(&feet),
            Some(CrsKind::Projected {
                unit: Some("US survey ft".into())
            })
        );
    }

    #[test]
    fn wkt2_keywords() {
        // WKT 2 (ISO 19162:2019 / OGC 18-010r7 §7, §9, §20) spellings.
        let geog = r#"GEOGCRS["WGS 84",DATUM["World Geodetic System 1984",ELLIPSOID["WGS 84",6378137,298.257223563]],CS[ellipsoidal,2],AXIS["latitude",north],AXIS["longitude",east],ANGLEUNIT["degree",0.0174532925199433]]"#;
        assert!(matches!(
            kind_of(geog),
            Some(Geographic { degrees: true, .. })
        ));
        let proj = r#"PROJCRS["grid",BASEGEOGCRS["WGS 84",DATUM["x",ELLIPSOID["WGS 84",6378137,298.257223563]]],CONVERSION["c",METHOD["Lambert Azimuthal Equal Area"]],CS[Cartesian,2],AXIS["(E)",east,ORDER[1],LENGTHUNIT["metre",1]],AXIS["(N)",north,ORDER[2],LENGTHUNIT["metre",1]]]"#;
        assert_eq!(
            kind_of(proj),
            Some(CrsKind::Projected {
                unit: Some("m".into())
            })
        );
    }

    #[test]
    fn grads_and_junk() {
        let grad = WGS84.replace(
            r#"UNIT["degree",0.0174532925199433"#,
            r#"UNIT["grad",0.015707963267949"#,
        );
        assert!(matches!(
            kind_of(&grad),
            Some(Geographic { degrees: false, .. })
        ));
        assert_eq!(kind_of("undefined"), None);
        assert_eq!(kind_of("PROJCS[\"a\""), None);
        assert_eq!(kind_of(&"A[".repeat(100_000)), None);
        assert!(matches!(
            kind_of(r#"LOCAL_CS["site grid"]"#),
            Some(CrsKind::Other(_))
        ));
    }
}
