//! Option values from the words a person types — a command-line flag, a
//! Python keyword — checked once for every front end: a bad value is a
//! [`Refusal::Setting`] that names the flag it stands for (`alpha` is
//! `--alpha`), what is wrong and what to do.

use crate::error::{Error, Refusal};
use patternproof_audit::{BufferRule, Edge};
use patternproof_scales::Correction;

fn setting(subject: impl Into<String>, what: impl Into<String>, hint: impl Into<String>) -> Error {
    Error::refused(Refusal::Setting, subject, what, hint)
}

/// `--buffers 0.5x,1x,2x` or `--buffers 5,10`.
pub fn buffers(words: &[String]) -> Result<Vec<BufferRule>, Error> {
    let hint = "give distances in the unit (e.g. 5,10) or multiples of the mean nearest-neighbour distance (e.g. 0.5x,1x)";
    words
        .iter()
        .map(|w| {
            let w = w.trim();
            let (num, multiple) = match w.strip_suffix('x') {
                Some(n) => (n, true),
                None => (w, false),
            };
            let rule = num.parse::<f64>().ok().map(|v| {
                if multiple {
                    BufferRule::MeanNnMultiple(v)
                } else {
                    BufferRule::Distance(v)
                }
            });
            match rule.map(|r| (r, r.problem())) {
                Some((r, None)) => Ok(r),
                Some((_, Some(problem))) => {
                    Err(setting("--buffers", format!("`{w}` is {problem}"), hint))
                }
                None => Err(setting(
                    "--buffers",
                    format!("`{w}` is not a positive distance"),
                    hint,
                )),
            }
        })
        .collect()
}

/// `--concavity`.
pub fn concavity(c: f64) -> Result<f64, Error> {
    if c > 0.0 && c.is_finite() {
        Ok(c)
    } else {
        Err(setting(
            format!("--concavity {c}"),
            "must be a positive number",
            "give e.g. --concavity 2 (the default; smaller cuts deeper)",
        ))
    }
}

/// `--edges none,donnelly,…` of the nearest-neighbour audit.
pub fn edges(words: &[String]) -> Result<Vec<Edge>, Error> {
    let mut out = Vec::new();
    for w in words {
        let e = Edge::parse(w).ok_or_else(|| {
            setting(
                "--edges",
                format!("`{w}` is not an edge handling"),
                "choose from none, donnelly, border, toroidal, simulation",
            )
        })?;
        if !out.contains(&e) {
            out.push(e);
        }
    }
    Ok(out)
}

/// α strictly between 0 and 1.
pub fn alpha(alpha: f64) -> Result<f64, Error> {
    if alpha > 0.0 && alpha < 1.0 {
        Ok(alpha)
    } else {
        Err(setting(
            format!("--alpha {alpha}"),
            "the significance level must lie strictly between 0 and 1",
            "use e.g. --alpha 0.05",
        ))
    }
}

/// `--area`: positive, and within what a map can hold.
pub fn area(area: Option<f64>) -> Result<Option<f64>, Error> {
    use crate::options::{MAX_AREA, MIN_AREA};
    let Some(a) = area else { return Ok(None) };
    if !(a > 0.0 && a.is_finite()) {
        return Err(setting(
            format!("--area {a}"),
            "the area must be a positive number (in the unit squared)",
            "give the study area the analysis used, e.g. --area 12500",
        ));
    }
    if !(MIN_AREA..=MAX_AREA).contains(&a) {
        return Err(setting(
            format!("--area {a:e}"),
            format!(
                "the area must lie between {MIN_AREA:e} and {MAX_AREA:e} (in the unit squared); beyond that no map in any unit reaches (the Earth's surface is 5.1·10¹⁴ m²), and floating point cannot measure the intensities"
            ),
            "check the number and its unit, and give the study area the analysis used, e.g. --area 12500",
        ));
    }
    Ok(Some(a))
}

/// `--guard`: a non-negative distance.
pub fn guard(g: Option<f64>) -> Result<Option<f64>, Error> {
    match g {
        Some(g) if !(g >= 0.0 && g.is_finite()) => Err(setting(
            format!("--guard {g}"),
            "the guard width must be a non-negative distance",
            "give a width in the data's unit, or leave it out for the default",
        )),
        g => Ok(g),
    }
}

/// `--rmax` of `scales`.
pub fn rmax(r: Option<f64>) -> Result<Option<f64>, Error> {
    match r {
        Some(r) if !(r > 0.0 && r.is_finite()) => Err(setting(
            format!("--rmax {r}"),
            "the largest distance must be a positive number in the data's unit",
            "give e.g. --rmax 40, or leave it out for a quarter of the window's shorter side",
        )),
        r => Ok(r),
    }
}

/// Largest accepted `--steps`.
pub const MAX_STEPS: usize = 10_000;

/// `--steps` of `scales`.
pub fn steps(steps: usize) -> Result<usize, Error> {
    if steps == 0 || steps > MAX_STEPS {
        return Err(setting(
            format!("--steps {steps}"),
            format!("the distance grid needs between 1 and {MAX_STEPS} steps"),
            "use e.g. --steps 50",
        ));
    }
    Ok(steps)
}

/// `--edges` / `--test-edges` of `scales`.
pub fn corrections(flag: &str, words: &[String]) -> Result<Vec<Correction>, Error> {
    let mut out = Vec::new();
    for w in words {
        let c = Correction::parse(w).ok_or_else(|| {
            setting(
                flag,
                format!("`{w}` is not an edge correction for K"),
                "choose from border, isotropic, translation",
            )
        })?;
        if !out.contains(&c) {
            out.push(c);
        }
    }
    if out.is_empty() {
        return Err(setting(
            flag,
            "no correction given",
            "name at least one of border, isotropic, translation",
        ));
    }
    Ok(out)
}

/// The choices of `density`, read as `patternproof density` reads its
/// flags.
pub struct DensityWords<'a> {
    /// `--kernels`.
    pub kernels: &'a [String],
    /// `--bandwidths`.
    pub bandwidths: &'a [String],
    /// `--cell`.
    pub cell: Option<f64>,
    /// `--levels`, in per cent.
    pub levels: &'a [String],
    /// `--edge`.
    pub edges: &'a [String],
    /// `--reference`.
    pub reference: &'a str,
}

fn bad(option: &str, what: String, todo: &str) -> Error {
    setting(option, what, todo)
}

/// The density configuration of `w` for coordinates in `unit`.
pub fn density(w: &DensityWords<'_>, unit: &str) -> Result<crate::DensityConfig, Error> {
    use crate::options::{BandwidthSpec, DensityEdge, FIXED_RANGE, Kernel, MULTIPLE_RANGE};
    let mut ks = Vec::new();
    for k in w.kernels {
        let kernel = Kernel::parse(k).ok_or_else(|| {
            bad(
                "--kernels",
                format!("unknown kernel {k:?}"),
                "use gaussian, quartic, epanechnikov, triangular or uniform",
            )
        })?;
        if !ks.contains(&kernel) {
            ks.push(kernel);
        }
    }
    if ks.is_empty() {
        ks = crate::options::ALL_KERNELS.to_vec();
    }
    let mut bs = Vec::new();
    for b in w.bandwidths {
        let spec = BandwidthSpec::parse(b).ok_or_else(|| {
            bad(
                "--bandwidths",
                format!("{b:?} is not a bandwidth"),
                &format!(
                    "use scott, lcv, a multiple of Scott's value such as 0.5x (from {:e}x to {:e}x), or a number in the unit (from {:e} to {:e})",
                    MULTIPLE_RANGE.0, MULTIPLE_RANGE.1, FIXED_RANGE.0, FIXED_RANGE.1
                ),
            )
        })?;
        if !bs.contains(&spec) {
            bs.push(spec);
        }
    }
    let mut edges = Vec::new();
    for e in w.edges {
        let edge = DensityEdge::parse(e).ok_or_else(|| {
            bad(
                "--edges",
                format!("unknown edge handling {e:?}"),
                "use none, uniform or diggle",
            )
        })?;
        if !edges.contains(&edge) {
            edges.push(edge);
        }
    }
    let mut levels = Vec::new();
    for l in w.levels {
        let v: f64 = l.trim().trim_end_matches('%').parse().map_err(|_| {
            bad(
                "--levels",
                format!("{l:?} is not a number"),
                "give percentages between 0 and 100, e.g. --levels 50,95",
            )
        })?;
        if !(v > 0.0 && v < 100.0) {
            return Err(bad(
                "--levels",
                format!("{v} is outside (0, 100)"),
                "give percentages strictly between 0 and 100",
            ));
        }
        levels.push(v / 100.0);
    }
    levels.sort_by(f64::total_cmp);
    levels.dedup();
    if let Some(c) = w.cell
        && !(c.is_finite() && c > 0.0)
    {
        return Err(bad(
            "--cell",
            format!("{c} is not a positive cell size"),
            "give the cell side in the unit of the coordinates",
        ));
    }
    let not_reference = || {
        bad(
            "--reference",
            format!("{:?} is not KERNEL:BANDWIDTH[:EDGE]", w.reference),
            "e.g. --reference gaussian:scott or quartic:lcv:uniform",
        )
    };
    let parts: Vec<&str> = w.reference.split(':').collect();
    let reference = match parts.as_slice() {
        [k, b] | [k, b, _] => {
            let e = match parts.get(2) {
                Some(e) => DensityEdge::parse(e),
                None => Some(edges.first().copied().unwrap_or(DensityEdge::None)),
            };
            match (Kernel::parse(k), BandwidthSpec::parse(b), e) {
                (Some(k), Some(b), Some(e)) => (k, b, e),
                _ => return Err(not_reference()),
            }
        }
        _ => return Err(not_reference()),
    };
    Ok(crate::DensityConfig {
        kernels: ks,
        bandwidths: bs,
        edges,
        levels,
        cell: w.cell,
        reference,
        unit: unit.to_string(),
    })
}

/// A picture format of `--figures`: the SVG every report has, and the
/// print copies a journal may ask for.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PictureFormat {
    /// The SVG itself (always written; embedded in `index.html`).
    Svg,
    /// A PNG at `--dpi` dots per inch.
    Png,
    /// A vector PDF with its font embedded.
    Pdf,
}

impl PictureFormat {
    /// The file extension, which is also the word for it.
    pub fn extension(self) -> &'static str {
        match self {
            PictureFormat::Svg => "svg",
            PictureFormat::Png => "png",
            PictureFormat::Pdf => "pdf",
        }
    }
}

/// One word of `--figures svg,png,pdf`.
pub fn picture_format(word: &str) -> Result<PictureFormat, Error> {
    let w = word.trim();
    [PictureFormat::Svg, PictureFormat::Png, PictureFormat::Pdf]
        .into_iter()
        .find(|f| f.extension().eq_ignore_ascii_case(w))
        .ok_or_else(|| {
            setting(
                "--figures",
                format!("`{w}` is not a picture format"),
                "choose from svg, png, pdf (svg is always written), e.g. --figures svg,png,pdf",
            )
        })
}

/// The resolutions `--dpi` accepts, in dots per inch: from a screen's to
/// twice what journals ask of halftones; beyond that a PNG of a report
/// picture runs into hundreds of megabytes.
pub const DPI_RANGE: (u32, u32) = (72, 600);

/// `--dpi`, the resolution of the PNG copies.
pub fn dpi(dpi: u32) -> Result<u32, Error> {
    let (low, high) = DPI_RANGE;
    if (low..=high).contains(&dpi) {
        Ok(dpi)
    } else {
        Err(setting(
            format!("--dpi {dpi}"),
            format!("the resolution must lie between {low} and {high} dots per inch"),
            "use e.g. --dpi 300 (what most journals ask for), or 600 for line art",
        ))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn picture_formats_are_read_and_refused_with_the_flag() {
        assert_eq!(picture_format(" PNG ").ok(), Some(PictureFormat::Png));
        assert_eq!(picture_format("pdf").ok(), Some(PictureFormat::Pdf));
        let e = picture_format("tiff").expect_err("not a format");
        assert_eq!(e.kind(), crate::ErrorKind::Refused(Refusal::Setting));
        let text = e.to_string();
        assert!(
            text.starts_with("--figures: `tiff` is not a picture format"),
            "{text}"
        );
        assert!(text.contains("choose from svg, png, pdf"), "{text}");
    }

    #[test]
    fn dpi_is_bounded() {
        assert_eq!(dpi(72).ok(), Some(72));
        assert_eq!(dpi(600).ok(), Some(600));
        for bad in [0, 71, 601, 100_000] {
            let e = dpi(bad).expect_err("out of range");
            assert_eq!(e.kind(), crate::ErrorKind::Refused(Refusal::Setting));
            assert!(e.to_string().starts_with(&format!("--dpi {bad}: ")));
        }
    }
}

/// The choices of `protocol new`, as words and numbers.
#[derive(Debug, Clone)]
pub struct ProtocolWords<'a> {
    /// `--window`: hull, hull+D, hull+kNN, bbox, boundary, concave.
    pub window: &'a str,
    /// `--edge`: the one edge handling of the study.
    pub edge: &'a str,
    /// `--alpha`.
    pub alpha: f64,
    /// `--sims`.
    pub sims: usize,
    /// `--seed`.
    pub seed: u64,
    /// `--adjust`: holm, bh or none.
    pub adjust: &'a str,
    /// `--min-n`.
    pub min_n: usize,
    /// `--guard`.
    pub guard: Option<f64>,
    /// `--concavity`.
    pub concavity: f64,
    /// `--note`.
    pub note: Option<&'a str>,
}

/// The protocol `protocol new` writes, checked: every word parsed and
/// every choice in range ([`patternproof_protocol::Protocol::validate`]), refused in the same
/// words whichever front end asked.
pub fn protocol(w: &ProtocolWords<'_>) -> Result<patternproof_protocol::Protocol, Error> {
    use patternproof_protocol::{Adjust, Protocol, SCHEMA, WindowRule};
    let window = WindowRule::parse(w.window).map_err(|e| {
        setting(
            "--window",
            e.to_string(),
            "use hull, hull+25, hull+1nn, bbox, boundary or concave",
        )
    })?;
    let edge = Edge::parse(w.edge).ok_or_else(|| {
        setting(
            "--edge",
            format!("`{}` is not an edge handling", w.edge),
            "choose one of none, donnelly, border, toroidal, simulation",
        )
    })?;
    let adjust = Adjust::parse(w.adjust).ok_or_else(|| {
        setting(
            "--adjust",
            format!("`{}` is not an adjustment", w.adjust),
            "choose holm, bh or none",
        )
    })?;
    let protocol = Protocol {
        schema: SCHEMA.into(),
        window,
        edge,
        alpha: w.alpha,
        sims: w.sims,
        seed: w.seed,
        adjust,
        min_n: w.min_n,
        guard: w.guard,
        concavity: w.concavity,
        note: w.note.map(str::to_string),
    };
    protocol
        .validate()
        .map_err(|e| setting("protocol", e.what, e.hint))?;
    Ok(protocol)
}
