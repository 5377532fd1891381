//! The verdict at a glance: the matrix of calls (window × edge handling)
//! and the sentence under it come first, in a pipe, in a real 80-column
//! pseudo-terminal and in a real headless browser at 1400 px. The last two
//! leave their captures in `target/tmp/glance/` for a person to look at.

use crate::util::{bin, chromium, read, repo_arg, screenshot, stderr, stdout, tmp, under_ci};
use serde_json::Value;
use std::path::{Path, PathBuf};
use std::process::Command;
use unicode_width::UnicodeWidthStr;

fn demo_args(out: &Path) -> Vec<String> {
    vec![
        "audit".into(),
        repo_arg("demo-data/meadow-burrows.csv"),
        "--boundary".into(),
        repo_arg("demo-data/meadow-boundary.geojson"),
        "--sims".into(),
        "199".into(),
        "--quiet".into(),
        "--out".into(),
        out.display().to_string(),
    ]
}

fn report_json(out: &Path) -> Value {
    serde_json::from_str(&read(&out.join("report.json"))).expect("report.json parses")
}

/// Where the captures go: inside the build folder, kept after the run.
fn captures() -> PathBuf {
    let dir = Path::new(env!("CARGO_TARGET_TMPDIR")).join("glance");
    std::fs::create_dir_all(&dir).expect("capture folder");
    dir
}

/// The symbol the matrix shows for a call in report.json.
fn symbol(call: &Value) -> &'static str {
    match call.as_str() {
        Some("clustered") => "◆",
        Some("dispersed") => "◇",
        Some("not-significant") => "○",
        _ => "—",
    }
}

/// Every line of the matrix against report.json, independently of the
/// code that drew it: a header naming the edge handlings in order, then one
/// line per window whose cells carry the symbol of that row's call, a `!`
/// exactly where the row's false-alarm rate exceeds twice α, and `·` where
/// the edge handling did not run.
fn check_matrix(lines: &[String], j: &Value) {
    let results = j["results"].as_array().expect("results");
    let alpha = j["alpha"].as_f64().expect("alpha");
    let mut edges: Vec<&str> = Vec::new();
    for e in ["none", "donnelly", "border", "toroidal", "simulation"] {
        if results.iter().any(|r| r["edge"] == e) {
            edges.push(e);
        }
    }
    let header: Vec<&str> = lines[0].split_whitespace().collect();
    assert_eq!(header[0], "window", "{lines:?}");
    assert_eq!(&header[1..], &edges[..], "{lines:?}");
    let windows = j["windows"].as_array().expect("windows");
    for (k, w) in windows.iter().enumerate() {
        let id = w["id"].as_str().expect("id");
        let line = &lines[k + 1];
        assert!(line.starts_with(id), "row {k} should be {id}: {line}");
        let cells: Vec<&str> = line[id.len()..]
            .split("  ")
            .map(str::trim)
            .filter(|c| !c.is_empty())
            .collect();
        assert_eq!(cells.len(), edges.len(), "{line}");
        for (cell, e) in cells.iter().zip(&edges) {
            match results
                .iter()
                .find(|r| r["window"] == id && r["edge"] == *e)
            {
                None => assert_eq!(*cell, "·", "{id}/{e}: {line}"),
                Some(r) => {
                    assert!(cell.starts_with(symbol(&r["call"])), "{id}/{e}: {line}");
                    let inflated = r["size_under_csr"]
                        .as_f64()
                        .is_some_and(|s| s > 2.0 * alpha);
                    assert_eq!(cell.ends_with('!'), inflated, "{id}/{e}: {line}");
                }
            }
        }
    }
}

/// The sentence names every window that does not share the majority call
/// (no "and N more"), and the counts agree with a recount of the rows.
fn check_sentence(text: &str, j: &Value) {
    let s = &j["summary"];
    let sentence = s["verdict"].as_str().expect("verdict");
    let flat = text.split_whitespace().collect::<Vec<_>>().join(" ");
    assert!(flat.contains(&format!("Verdict: {sentence}.")), "{text}");
    assert!(!sentence.contains("more"), "{sentence}");
    let majority = &s["majority"];
    let results = j["results"].as_array().expect("results");
    for r in results {
        if !r["call"].is_null() && r["call"] != *majority {
            let w = r["window"].as_str().expect("window");
            assert!(sentence.contains(&format!("{w} is ")), "{w}: {sentence}");
        }
    }
    let alpha = j["alpha"].as_f64().expect("alpha");
    let called = results.iter().filter(|r| !r["call"].is_null()).count();
    let inflated = results
        .iter()
        .filter(|r| !r["call"].is_null())
        .filter(|r| {
            r["size_under_csr"]
                .as_f64()
                .is_some_and(|x| x > 2.0 * alpha)
        })
        .count();
    assert_eq!(s["inflated"], inflated);
    assert_eq!(s["trustworthy"], called - inflated);
    assert!(
        flat.contains(&format!(
            "{} of {called} rows trustworthy",
            called - inflated
        )),
        "{text}"
    );
}

/// Piped: the matrix is the first thing on stdout, the sentence follows,
/// and the same matrix opens `verdict.md` and `index.html`.
#[test]
fn piped_output_opens_with_the_matrix_and_the_sentence() {
    let dir = tmp();
    let out = dir.path().join("r");
    let o = bin().args(demo_args(&out)).output().expect("runs");
    assert!(o.status.success(), "{}", stderr(&o));
    let j = report_json(&out);
    let text = stdout(&o);
    let lines: Vec<String> = text.lines().map(String::from).collect();
    check_matrix(&lines, &j);
    assert!(!text.contains('\u{1b}'), "no colour codes in a pipe");
    let verdict_at = lines
        .iter()
        .position(|l| l.starts_with("Verdict: "))
        .expect("a verdict line");
    let windows = j["windows"].as_array().expect("windows").len();
    // Header, one line per window, at most three lines of key, a blank
    // line.
    assert!(verdict_at <= windows + 5, "{text}");
    check_sentence(&text, &j);

    let md = read(&out.join("verdict.md"));
    let first_table = md.find("| window |").expect("matrix in verdict.md");
    assert!(
        first_table < md.find("**Verdict:**").expect("verdict"),
        "{md}"
    );
    assert!(first_table < md.find("## ").expect("sections"), "{md}");

    let html = read(&out.join("index.html"));
    let matrix = html
        .find("<table class=\"matrix\">")
        .expect("matrix in index.html");
    let verdict = html.find("class=\"verdict\"").expect("verdict paragraph");
    assert!(matrix < verdict, "matrix before the sentence");
    for later in ["<h2", "<figure", "<svg"] {
        assert!(verdict < html.find(later).expect(later), "{later}");
    }
}

/// A real pseudo-terminal of 80 columns (util-linux `script`): the matrix
/// comes first, in colour, with every call's symbol, and no line of the
/// matrix, the sentence or the cautions is wider than 80 columns.
#[test]
fn an_80_column_terminal_shows_the_matrix_first() {
    if Command::new("script").arg("--version").output().is_err() {
        assert!(
            !under_ci(),
            "`script` (util-linux) is missing, and CI needs this test"
        );
        eprintln!("SKIPPED an_80_column_terminal_shows_the_matrix_first: no `script` on PATH");
        return;
    }
    let dir = tmp();
    let out = dir.path().join("r");
    let quoted: Vec<String> = std::iter::once(env!("CARGO_BIN_EXE_patternproof").to_string())
        .chain(demo_args(&out))
        .map(|a| format!("'{}'", a.replace('\'', "'\\''")))
        .collect();
    let inner = format!("stty cols 80 rows 50; {} 2>/dev/null", quoted.join(" "));
    let o = Command::new("script")
        .args(["-q", "-e", "-c", &inner, "/dev/null"])
        .env_remove("NO_COLOR")
        .output()
        .expect("script runs");
    assert!(o.status.success(), "{}", stderr(&o));
    let raw = String::from_utf8_lossy(&o.stdout).replace("\r\n", "\n");
    std::fs::write(captures().join("terminal-80.txt"), raw.as_bytes()).expect("capture");
    assert!(
        raw.contains("\u{1b}[1;38;2;230;159;0m◆"),
        "clustered cells in colour"
    );
    let plain: String = {
        let mut s = String::new();
        let mut chars = raw.chars();
        while let Some(c) = chars.next() {
            if c == '\u{1b}' {
                for d in chars.by_ref() {
                    if d.is_ascii_alphabetic() {
                        break;
                    }
                }
            } else {
                s.push(c);
            }
        }
        s
    };
    let lines: Vec<String> = plain.lines().map(String::from).collect();
    let j = report_json(&out);
    check_matrix(&lines, &j);
    check_sentence(&plain, &j);
    let end = lines
        .iter()
        .position(|l| l.starts_with("wrote "))
        .unwrap_or(lines.len());
    for l in &lines[..end] {
        // Box-drawn table lines are the table's own business; the rest is
        // laid out for the terminal.
        if !l.starts_with(['┌', '│', '╞', '└', '├']) {
            assert!(l.width() <= 80, "{} columns: {l}", l.width());
        }
    }
}

/// A real headless Chromium at 1400 px: the first screen shows the matrix
/// (the tints of its clustered and dispersed cells) and the verdict
/// sentence (its blue rule), before any picture.
#[test]
fn the_page_at_1400_px_shows_the_matrix_first() {
    let Some(browser) = chromium("the_page_at_1400_px_shows_the_matrix_first") else {
        return;
    };
    let dir = tmp();
    let out = dir.path().join("r");
    let o = bin().args(demo_args(&out)).output().expect("runs");
    assert!(o.status.success(), "{}", stderr(&o));
    let png = captures().join("index-1400.png");
    let (width, height, channels, buf) =
        screenshot(browser, &out.join("index.html"), (1400, 700), &png);
    assert_eq!((width, height), (1400, 700));
    let count = |rgb: [u8; 3]| buf.chunks(channels).filter(|px| px[..3] == rgb).count();
    // The stylesheet's tints (page.rs): clustered, dispersed cells, the
    // verdict's rule. A cell of text is some 100 × 20 px.
    let clustered = count([0xfb, 0xe7, 0xbf]);
    let dispersed = count([0xc9, 0xee, 0xe2]);
    let rule = count([0x00, 0x72, 0xb2]);
    let j = report_json(&out);
    let dispersed_rows = j["summary"]["calls"]["dispersed"].as_u64().expect("count");
    assert!(
        clustered > 5_000,
        "clustered cells in the first screen: {clustered} px"
    );
    assert_eq!(
        dispersed > 500,
        dispersed_rows > 0,
        "dispersed cells: {dispersed} px"
    );
    assert!(
        rule > 100,
        "the verdict's rule in the first screen: {rule} px"
    );
}
