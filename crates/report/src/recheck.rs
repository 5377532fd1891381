//! The terminal report of a recheck: the checks table, the implied
//! intervals, the readings tried, the windows (with points) and the
//! verdict line.

use crate::terminal_layout::{Column, Grid, wrap};
use patternproof_recheck::Recheck;
use patternproof_recheck::explain::Kind;
use patternproof_recheck::interval::{Interval, number};
use patternproof_recheck::reported::Quantity;

/// Where every column of the tables can be read when some are left out.
const ELSEWHERE: &str = "the output of `--json`";

/// Append `text` wrapped to `width`, with its indents, and a newline.
fn say(out: &mut String, text: &str, width: Option<u16>, first: &str, rest: &str) {
    out.push_str(&wrap(text, width, first, rest));
    out.push('\n');
}

fn unit_of(r: &Recheck, q: Quantity) -> String {
    let u = r.points.as_ref().map(|p| p.unit.as_str());
    match (q, u) {
        (Quantity::MeanNn | Quantity::ExpectedNn, Some(u)) => format!(" {u}"),
        (Quantity::Area, Some(u)) => format!(" {u}²"),
        _ => String::new(),
    }
}

/// The whole report as text, laid out for `width` columns (`None`:
/// piped, 100 columns) by [`terminal_layout`](crate::terminal_layout):
/// explanations wrap between words, and the windows table drops d̄ and
/// E, then the area and z, then n when they do not fit, never cutting a
/// number.
pub fn text(r: &Recheck, width: Option<u16>) -> String {
    let mut out = String::new();
    let f = &r.reported;
    let figs: Vec<String> = std::iter::once(format!("n = {}", f.n))
        .chain(f.figures.iter().map(|x| x.quoted()))
        .collect();
    let mut reported = format!("Reported: {}", figs.join(", "));
    if f.has(Quantity::P) {
        reported.push_str(if f.one_sided {
            " (p declared one-sided)"
        } else {
            " (p read as two-sided or one-sided)"
        });
    }
    say(&mut out, &reported, width, "", "  ");
    let ranges: Vec<String> = f
        .figures
        .iter()
        .map(|x| format!("{} in {}", x.quantity.symbol(), x.interval))
        .collect();
    if !ranges.is_empty() {
        say(
            &mut out,
            &format!("Rounding ranges: {}", ranges.join(", ")),
            width,
            "",
            "  ",
        );
    }
    out.push('\n');

    let mut t = Grid::new(
        vec![
            Column::prose("check"),
            Column::text("reported"),
            Column::prose("recomputed"),
            Column::text("result"),
            Column::prose("explanation"),
        ],
        1,
        ELSEWHERE,
    );
    for c in &r.checks {
        t.push(vec![
            c.name.clone(),
            c.reported.clone().unwrap_or_else(|| "—".into()),
            c.recomputed_text.clone(),
            c.status().to_string(),
            match &c.condition {
                Some(cond) => format!("{} (only if {cond})", c.detail),
                None => c.detail.clone(),
            },
        ]);
    }
    if r.checks.is_empty() {
        t.push(
            [
                "—",
                "—",
                "—",
                "cannot tell",
                "no two figures are related by what was given",
            ]
            .map(String::from)
            .to_vec(),
        );
    }
    out.push_str(&t.render(width));

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
                say(
                    &mut out,
                    &format!("{} ({}{given}): {words}", q.symbol(), label(q)),
                    width,
                    "  ",
                    "    ",
                );
            }
        }
        None => say(
            &mut out,
            "nothing: the figures contradict each other (see the checks)",
            width,
            "  ",
            "    ",
        ),
    }
    if r.implied.is_none()
        && let Some(a) = r.implied_area
    {
        say(
            &mut out,
            &format!(
                "the area from D with R or E alone: {a}{}",
                unit_of(r, Quantity::Area)
            ),
            width,
            "  ",
            "    ",
        );
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
            say(
                &mut out,
                &format!("[{mark}] {}", e.detail),
                width,
                "  ",
                "    ",
            );
            if let Some(p) = e.plausibility.as_ref().filter(|_| e.fits) {
                say(
                    &mut out,
                    &format!("{}; {}", p.why, p.ask),
                    width,
                    "      ",
                    "      ",
                );
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
                say(&mut out, &e.detail, width, "  - ", "    ");
            }
        }
    }

    if let Some(p) = &r.points {
        let u = &p.unit;
        out.push('\n');
        say(
            &mut out,
            &format!(
                "Windows of the points ({} points; no simulations):",
                p.points
            ),
            width,
            "",
            "  ",
        );
        let area = format!("area {u}²");
        let mean = format!("D {u}");
        let expected = format!("E {u}");
        let mut t = Grid::new(
            vec![
                Column::text("window"),
                Column::text("edge"),
                Column::number("n").rank(1),
                Column::number(&area).short(&format!("area\n{u}²")).rank(2),
                Column::number(&mean).rank(3),
                Column::number(&expected).rank(3),
                Column::number("R"),
                Column::number("z").rank(2),
                Column::number("p"),
                Column::prose("reproduces?").bare(),
            ],
            2,
            ELSEWHERE,
        );
        for row in &p.rows {
            let n = match row.focal {
                Some(m) => format!("{m}/{}", row.n_used),
                None => row.n_used.to_string(),
            };
            t.push(vec![
                row.window.clone(),
                row.edge.clone(),
                n,
                number(row.area),
                row.mean_nn.map_or("—".into(), number),
                row.expected_nn.map_or("—".into(), number),
                row.ratio.map_or("—".into(), |x| format!("{x:.3}")),
                row.z.map_or("—".into(), |x| format!("{x:.2}")),
                row.p.map_or("—".into(), number),
                if row.matches {
                    match row.tail {
                        Some(tl) => format!("yes (p {})", tl.as_str()),
                        None => "yes".into(),
                    }
                } else {
                    format!("no ({} off)", row.mismatched.join(", "))
                },
            ]);
        }
        out.push_str(&t.render(width));
        say(&mut out, &capitalise(&p.summary), width, "", "  ");
    }

    out.push('\n');
    say(
        &mut out,
        &format!("Verdict: {}", r.verdict),
        width,
        "",
        "  ",
    );
    if r.explanations.is_empty() {
        for c in &r.consistent_if {
            say(
                &mut out,
                &format!("{}: {}; {}", c.condition, c.rating.why, c.rating.ask),
                width,
                "  ",
                "    ",
            );
        }
    }
    say(
        &mut out,
        "a recheck shows whether the printed figures can come from one nearest-neighbour test; it does not show that the study area or the test was a good choice",
        width,
        "  ",
        "    ",
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
