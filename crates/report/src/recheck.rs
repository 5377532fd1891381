//! The terminal report of a recheck: the checks table, the implied
//! intervals, the readings tried, the windows (with points) and the
//! verdict line.

use comfy_table::{Cell, CellAlignment, ContentArrangement, Table, presets};
use patternproof_recheck::Recheck;
use patternproof_recheck::explain::Kind;
use patternproof_recheck::interval::{Interval, number};
use patternproof_recheck::reported::Quantity;

fn table(width: Option<u16>) -> Table {
    let mut t = Table::new();
    t.load_preset(presets::UTF8_BORDERS_ONLY);
    t.set_content_arrangement(ContentArrangement::Dynamic);
    match width {
        Some(w) => {
            t.set_width(w);
        }
        None => {
            if t.width().is_none() {
                t.set_width(120);
            }
        }
    }
    t
}

fn unit_of(r: &Recheck, q: Quantity) -> String {
    let u = r.points.as_ref().map(|p| p.unit.as_str());
    match (q, u) {
        (Quantity::MeanNn | Quantity::ExpectedNn, Some(u)) => format!(" {u}"),
        (Quantity::Area, Some(u)) => format!(" {u}²"),
        _ => String::new(),
    }
}

/// The whole report as text, `width` columns wide when known.
pub fn text(r: &Recheck, width: Option<u16>) -> String {
    let mut out = String::new();
    let f = &r.reported;
    let figs: Vec<String> = std::iter::once(format!("n = {}", f.n))
        .chain(f.figures.iter().map(|x| x.quoted()))
        .collect();
    out.push_str(&format!("Reported: {}", figs.join(", ")));
    if f.has(Quantity::P) {
        out.push_str(if f.one_sided {
            " (p declared one-sided)"
        } else {
            " (p read as two-sided or one-sided)"
        });
    }
    out.push('\n');
    let ranges: Vec<String> = f
        .figures
        .iter()
        .map(|x| format!("{} in {}", x.quantity.symbol(), x.interval))
        .collect();
    if !ranges.is_empty() {
        out.push_str(&format!("Rounding ranges: {}\n", ranges.join(", ")));
    }
    out.push('\n');

    let mut t = table(width);
    t.set_header(vec![
        "check",
        "reported",
        "recomputed",
        "result",
        "explanation",
    ]);
    for c in &r.checks {
        t.add_row(vec![
            Cell::new(&c.name),
            Cell::new(c.reported.clone().unwrap_or_else(|| "—".into())),
            Cell::new(&c.recomputed_text),
            Cell::new(c.status()),
            Cell::new(match &c.condition {
                Some(cond) => format!("{} (only if {cond})", c.detail),
                None => c.detail.clone(),
            }),
        ]);
    }
    if r.checks.is_empty() {
        t.add_row(vec![
            "—",
            "—",
            "—",
            "cannot tell",
            "no two figures are related by what was given",
        ]);
    }
    out.push_str(&t.to_string());
    out.push('\n');

    out.push_str("\nImplied by all figures together (no edge correction):\n");
    match &r.implied {
        Some(d) => {
            for q in Quantity::ALL {
                let iv = d.get(q);
                let given = if f.has(q) { "" } else { ", not reported" };
                let words = if q == Quantity::Area && !(iv.is_bounded() && iv.low > 0.0) {
                    "not fixed by these figures (the area cancels from R, z and p)".to_string()
                } else if !iv.is_bounded() || (q == Quantity::P && iv == Interval::new(0.0, 1.0)) {
                    "not fixed by these figures".to_string()
                } else {
                    format!("{iv}{}", unit_of(r, q))
                };
                out.push_str(&format!(
                    "  {} ({}{given}): {words}\n",
                    q.symbol(),
                    label(q)
                ));
            }
        }
        None => out.push_str("  nothing: the figures contradict each other (see the checks)\n"),
    }
    if r.implied.is_none()
        && let Some(a) = r.implied_area
    {
        out.push_str(&format!(
            "  the area from D with R or E alone: {a}{}\n",
            unit_of(r, Quantity::Area)
        ));
    }

    if !r.explanations.is_empty() {
        out.push_str("\nOther readings tried (the plain reading fails):\n");
        for e in r.explanations.iter().filter(|e| e.kind == Kind::Reading) {
            let mark = match &e.plausibility {
                Some(p) if e.fits && p.plausible => "fits, plausible",
                Some(_) if e.fits => "fits, implausible",
                _ if e.fits => "fits",
                _ => "no",
            };
            out.push_str(&format!("  [{mark}] {}\n", e.detail));
            if let Some(p) = e.plausibility.as_ref().filter(|_| e.fits) {
                out.push_str(&format!("      {}; {}\n", p.why, p.ask));
            }
        }
        let slips: Vec<_> = r
            .explanations
            .iter()
            .filter(|e| e.kind == Kind::Slip && e.fits)
            .collect();
        if !slips.is_empty() {
            out.push_str("Where the disagreement may sit:\n");
            for e in slips {
                out.push_str(&format!("  - {}\n", e.detail));
            }
        }
    }

    if let Some(p) = &r.points {
        let u = &p.unit;
        out.push_str(&format!(
            "\nWindows of the points ({} points; no simulations):\n",
            p.points
        ));
        let mut t = table(width);
        t.set_header(vec![
            "window".to_string(),
            "edge".into(),
            "n".into(),
            format!("area {u}²"),
            format!("D {u}"),
            format!("E {u}"),
            "R".into(),
            "z".into(),
            "p".into(),
            "reproduces?".into(),
        ]);
        for row in &p.rows {
            let n = match row.focal {
                Some(m) => format!("{m}/{}", row.n_used),
                None => row.n_used.to_string(),
            };
            let right = |s: String| Cell::new(s).set_alignment(CellAlignment::Right);
            t.add_row(vec![
                Cell::new(&row.window),
                Cell::new(&row.edge),
                right(n),
                right(number(row.area)),
                right(row.mean_nn.map_or("—".into(), number)),
                right(row.expected_nn.map_or("—".into(), number)),
                right(row.ratio.map_or("—".into(), |x| format!("{x:.3}"))),
                right(row.z.map_or("—".into(), |x| format!("{x:.2}"))),
                right(row.p.map_or("—".into(), number)),
                Cell::new(if row.matches {
                    match row.tail {
                        Some(tl) => format!("yes (p {})", tl.as_str()),
                        None => "yes".into(),
                    }
                } else {
                    format!("no ({} off)", row.mismatched.join(", "))
                }),
            ]);
        }
        out.push_str(&t.to_string());
        out.push('\n');
        out.push_str(&format!("{}\n", capitalise(&p.summary)));
    }

    out.push_str(&format!("\nVerdict: {}\n", r.verdict));
    if r.explanations.is_empty() {
        for c in &r.consistent_if {
            out.push_str(&format!(
                "  {}: {}; {}\n",
                c.condition, c.rating.why, c.rating.ask
            ));
        }
    }
    out.push_str(
        "  a recheck shows whether the printed figures can come from one nearest-neighbour test; it does not show that the study area or the test was a good choice\n",
    );
    out
}

fn label(q: Quantity) -> &'static str {
    match q {
        Quantity::Ratio => "ratio",
        Quantity::Z => "standardised difference",
        Quantity::P => "p-value",
        Quantity::MeanNn => "mean nearest-neighbour distance",
        Quantity::ExpectedNn => "expected distance under CSR",
        Quantity::Area => "study area",
    }
}

fn capitalise(s: &str) -> String {
    let mut c = s.chars();
    match c.next() {
        Some(first) => first.to_uppercase().collect::<String>() + c.as_str(),
        None => String::new(),
    }
}
