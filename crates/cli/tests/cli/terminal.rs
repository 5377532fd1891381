//! Terminal layout (issue 22, "80 columns"): every command's terminal
//! text, rendered at 80, 100, 120 and 200 columns and piped, keeps every
//! line within the width and never cuts a number (`18282` read as `1828`
//! over `2`); a layout that leaves columns out says where the full table
//! is. The last test runs the binary in a real 80-column pseudo-terminal.

use crate::util::{bin, repo, repo_arg, stderr, stdout, tmp, under_ci};
use patternproof::options::{LoadOptions, Quantity, SitesOptions, parse_count, parse_figure};
use patternproof::{AuditOptions, Input, ScalesOptions, Silent, WindowOptions};
use patternproof_report::terminal_layout::{PIPED_COLUMNS, widest_line};
use std::collections::BTreeSet;
use std::process::Command;

const WIDTHS: [u16; 4] = [80, 100, 120, 200];

fn demo() -> patternproof::Dataset {
    patternproof::load(
        &repo().join("demo-data/meadow-burrows.csv"),
        &[repo().join("demo-data/meadow-boundary.geojson")],
        &LoadOptions::default(),
    )
    .expect("the demo data loads")
}

/// The words of a terminal text, with the table's borders taken away.
fn tokens(text: &str) -> BTreeSet<String> {
    text.split(|c: char| c.is_whitespace() || "│┌┐└┘─╞╡═".contains(c))
        .filter(|t| !t.is_empty())
        .map(str::to_string)
        .collect()
}

/// The text with its wrapped lines joined again, to find a sentence.
fn unwrapped(text: &str) -> String {
    text.split('\n')
        .map(str::trim)
        .collect::<Vec<_>>()
        .join(" ")
}

/// What every rendering of one command must satisfy. `render` lays the
/// text out for a width (`None`: piped); `whole` are numbers of the full
/// table that must appear whole wherever their column is shown (`key`
/// ones at every width); `pointer` is the sentence that says where the
/// full table is, required whenever a `whole` number is missing.
fn check_layouts(
    what: &str,
    render: impl Fn(Option<u16>) -> String,
    key: &[&str],
    whole: &[&str],
    pointer: &str,
) {
    let widest = render(Some(400));
    let known = tokens(&widest);
    for (width, text) in WIDTHS
        .iter()
        .map(|&w| (usize::from(w), render(Some(w))))
        .chain(std::iter::once((PIPED_COLUMNS, render(None))))
    {
        for line in text.lines() {
            assert!(
                widest_line(line) <= width,
                "{what} at {width}: a line of {} columns:\n{line}\n\n{text}",
                widest_line(line)
            );
        }
        // A number cut in two leaves tokens that the widest layout, where
        // nothing is cut, never prints.
        for t in tokens(&text) {
            if t.chars().any(|c| c.is_ascii_digit()) {
                assert!(
                    known.contains(&t),
                    "{what} at {width}: {t:?} is not a number of the full text:\n{text}"
                );
            }
        }
        let found = tokens(&text);
        for k in key {
            assert!(
                found.contains(*k),
                "{what} at {width}: {k} missing:\n{text}"
            );
        }
        let missing: Vec<&&str> = whole.iter().filter(|w| !found.contains(**w)).collect();
        if !missing.is_empty() {
            assert!(
                unwrapped(&text).contains(pointer),
                "{what} at {width}: {missing:?} left out without saying where they are:\n{text}"
            );
        }
    }
    // Nothing is left out when there is room for everything.
    assert!(!unwrapped(&widest).contains(pointer), "{widest}");
    // Piped text has one layout, whatever the environment says.
    assert_eq!(render(None), render(Some(100)), "{what}");
}

#[test]
fn audit_table_fits_every_width_without_cutting_a_number() {
    let input = Input::from_dataset(&demo());
    let options = AuditOptions {
        sims: 99,
        ..AuditOptions::default()
    };
    let report = patternproof::audit(&input, &options, &Silent).expect("the demo audits");
    let table = |w| patternproof_report::table::terminal_table(&report, w);
    check_layouts(
        "audit",
        table,
        &["0.015", "0.894", "clustered", "124/143"],
        &["18282", "5.052", "5.653", "-2.44"],
        "the full table is in verdict.md and verdict.csv.",
    );
    // 80 columns: the key columns, and the pointer to the full table.
    let t = table(Some(80));
    for heading in ["window", "edge", "n", "R", "p", "call", "false", "alarms"] {
        assert!(tokens(&t).contains(heading), "{heading} missing:\n{t}");
    }
    assert!(!t.contains("18282"), "{t}");
    assert!(
        unwrapped(&t).contains("Left out at this width: area m², d̄ m, E[d] m, z;"),
        "{t}"
    );
    // 200 columns: every column, the area whole.
    let t = table(Some(200));
    assert!(
        tokens(&t).contains("18282") && tokens(&t).contains("E[d]"),
        "{t}"
    );
    // Piped: 100 columns, the area and z kept, d̄ and E[d] left out.
    let t = table(None);
    assert!(
        tokens(&t).contains("18282") && tokens(&t).contains("-2.44"),
        "{t}"
    );
    assert!(
        unwrapped(&t).contains("Left out at this width: d̄ m, E[d] m;"),
        "{t}"
    );
}

#[test]
fn recheck_with_points_fits_every_width_without_cutting_a_number() {
    let data = demo();
    let figures = patternproof::Figures::new(parse_count("143").expect("a count"), false)
        .with(parse_figure("0.9", Quantity::Ratio).expect("a ratio"));
    let input = Input::from_dataset(&data);
    let result = patternproof::recheck(&figures, Some(&input)).expect("the recheck runs");
    check_layouts(
        "recheck --points",
        |w| patternproof_report::recheck::text(&result, w),
        &["0.894", "0.01488", "124/143", "[0.85,"],
        &["18282", "5.052", "5.653", "-2.44"],
        "the full table is in the output of `--json`.",
    );
}

#[test]
fn scales_text_fits_every_width_without_cutting_a_number() {
    let input = Input::from_dataset(&demo());
    let options = ScalesOptions {
        sims: 19,
        ..ScalesOptions::default()
    };
    let result = patternproof::scales(&input, &WindowOptions::default(), &options, &Silent)
        .expect("the demo runs");
    let rows = patternproof_report::scales::text::table_rows(&result.run);
    let statistic = rows[0][3].clone();
    let p = rows[0][4].clone();
    check_layouts(
        "scales",
        |w| patternproof_report::scales::terminal_text(&result.run, &result.notes, w),
        &[p.as_str(), "28.3", "isotropic"],
        &[statistic.as_str()],
        "the full table is in scales.md.",
    );
}

#[test]
fn density_sentence_fits_every_width_without_cutting_a_number() {
    let data = demo();
    let words = patternproof::words::DensityWords {
        kernels: &["gaussian".into(), "quartic".into()],
        bandwidths: &["scott".into(), "2x".into()],
        cell: None,
        levels: &["50".into(), "95".into()],
        edges: &["none".into(), "uniform".into()],
        reference: "gaussian:scott",
    };
    let config = patternproof::words::density(&words, &data.unit).expect("the words are good");
    let result = patternproof::density(&Input::from_dataset(&data), &config).expect("it runs");
    let sentence = &result.analysis.verdict.sentence;
    let numbers: Vec<String> = tokens(sentence)
        .into_iter()
        .filter(|t| t.chars().any(|c| c.is_ascii_digit()))
        .collect();
    assert!(numbers.len() >= 4, "{sentence}");
    let key: Vec<&str> = numbers.iter().map(String::as_str).collect();
    check_layouts(
        "density",
        |w| patternproof_report::density::terminal_text(&result.analysis, w),
        &key,
        &[],
        "the full table is in",
    );
}

#[test]
fn sites_text_fits_every_width_without_cutting_a_number() {
    let dir = tmp();
    let protocol_file = dir.path().join("protocol.json");
    let o = bin()
        .args([
            "protocol",
            "new",
            "--window",
            "boundary",
            "--edge",
            "simulation",
        ])
        .args(["--sims", "99", "--adjust", "holm", "--out"])
        .arg(&protocol_file)
        .output()
        .expect("the binary runs");
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let protocol = patternproof::read_verified(&protocol_file).expect("the protocol reads");
    let mut plots: Vec<_> = std::fs::read_dir(repo().join("demo-data/plots"))
        .expect("the plots")
        .map(|e| e.expect("an entry").path())
        .filter(|p| p.extension().is_some_and(|e| e == "csv"))
        .collect();
    plots.sort();
    let source = patternproof::SitesSource {
        inputs: plots,
        site_field: None,
        boundaries: Some(repo().join("demo-data/plots-boundaries.geojson")),
        boundary_layer: None,
        boundary_field: "name".into(),
        load: LoadOptions {
            coords: patternproof::CoordChoice::Projected,
            ..LoadOptions::default()
        },
    };
    let loaded = patternproof::load_sites(&source, &protocol, "protocol.json").expect("loads");
    let options = SitesOptions { sweep_sims: 19 };
    let runs = patternproof::sites(&loaded, &protocol, options, &Silent).expect("runs");
    let doc = patternproof::sites_document(&runs, &protocol, options.sweep_sims);
    let ratio = format!("{:.3}", doc.sites[0].ratio.expect("plot-a is tested"));
    check_layouts(
        "sites",
        |w| patternproof_report::sites::terminal::terminal_text(&doc, w),
        &["plot-a", ratio.as_str(), "plot-f"],
        &[],
        "the full table is in sites.md and sites.csv.",
    );
}

/// The binary in a real terminal of 80 columns (util-linux `script` gives
/// it a pseudo-terminal): the audit picks the key columns, every line
/// fits, no number is cut, and the pointer to `verdict.md` and
/// `verdict.csv` is printed.
#[test]
fn audit_in_an_80_column_terminal() {
    let has_script = Command::new("script")
        .arg("--version")
        .output()
        .is_ok_and(|o| o.status.success());
    if !has_script {
        assert!(
            !under_ci(),
            "`script` (util-linux) is needed to run the binary in a pseudo-terminal"
        );
        eprintln!("SKIPPED: no `script` to make a pseudo-terminal");
        return;
    }
    let dir = tmp();
    let out = dir.path().join("in-terminal");
    let piped_out = dir.path().join("piped");
    let args = |out: &std::path::Path| {
        format!(
            "audit {} --boundary {} --sims 99 --out {}",
            repo_arg("demo-data/meadow-burrows.csv"),
            repo_arg("demo-data/meadow-boundary.geojson"),
            out.display()
        )
    };
    let bin_path = env!("CARGO_BIN_EXE_patternproof");
    let shell = format!(
        "stty cols 80 rows 50; {bin_path} {} 2>{}",
        args(&out),
        dir.path().join("stderr").display()
    );
    // Colours are the matrix's business (tests/cli/glance.rs); widths
    // are measured here without them.
    let o = Command::new("script")
        .args(["-qec", &shell, "/dev/null"])
        .env("NO_COLOR", "1")
        .output()
        .expect("script runs");
    let text = stdout(&o).replace('\r', "");
    assert_eq!(o.status.code(), Some(0), "{text}\n{}", stderr(&o));
    // The closing line is the one line left whole: its folder path is
    // copied from it.
    for line in text.lines().filter(|l| !l.starts_with("wrote ")) {
        assert!(
            widest_line(line) <= 80,
            "a line wider than 80:\n{line}\n\n{text}"
        );
    }
    let found = tokens(&text);
    for k in ["0.015", "0.894", "124/143", "clustered"] {
        assert!(found.contains(k), "{k} missing:\n{text}");
    }
    assert!(
        unwrapped(&text).contains("the full table is in verdict.md and verdict.csv."),
        "{text}"
    );
    // The same run piped: every number the terminal showed is one of its
    // numbers (a cut number would not be).
    let piped = bin()
        .args(args(&piped_out).split(' '))
        .output()
        .expect("the binary runs");
    let piped_text = stdout(&piped).replace(&piped_out.display().to_string(), "DIR");
    let piped_tokens = tokens(&piped_text);
    for t in tokens(&text.replace(&out.display().to_string(), "DIR")) {
        if t.chars().any(|c| c.is_ascii_digit()) {
            assert!(piped_tokens.contains(&t), "{t:?} cut?\n{text}");
        }
    }
    for line in piped_text.lines().filter(|l| !l.starts_with("wrote ")) {
        assert!(widest_line(line) <= PIPED_COLUMNS, "{line}\n{piped_text}");
    }
}
