//! The layering the architecture promises, checked on the manifests:
//! analyses and the facade never depend on the presentation crate or on
//! drawing and terminal crates, and the command line reaches the analyses
//! only through the facade.

use std::path::PathBuf;

fn repo() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../..")
}

/// The package names listed under `[dependencies]` (and target-specific
/// dependency tables) of `crates/<dir>/Cargo.toml`; dev-dependencies are
/// left out, since tests may look at anything.
fn dependencies(dir: &str) -> Vec<String> {
    let path = repo().join("crates").join(dir).join("Cargo.toml");
    let text = std::fs::read_to_string(&path).expect("the manifest");
    let mut names = Vec::new();
    let mut inside = false;
    for line in text.lines() {
        let line = line.trim();
        if line.starts_with('[') {
            inside = line == "[dependencies]"
                || (line.starts_with("[target.") && line.ends_with(".dependencies]"));
            continue;
        }
        if inside && !line.is_empty() && !line.starts_with('#') {
            let name = line.split(['=', '.', ' ']).next().unwrap_or_default();
            names.push(name.to_string());
        }
    }
    assert!(
        !names.is_empty(),
        "{}: no dependencies read",
        path.display()
    );
    names
}

const PRESENTATION: [&str; 8] = [
    "patternproof-report",
    "plotters",
    "maud",
    "comfy-table",
    "png",
    "tiff",
    "indicatif",
    "clap",
];

#[test]
fn analyses_and_the_facade_do_not_depend_on_presentation() {
    for dir in [
        "core",
        "io",
        "gpkg",
        "window",
        "audit",
        "scales",
        "density",
        "sites",
        "recheck",
        "protocol",
        "patternproof",
    ] {
        let deps = dependencies(dir);
        for p in PRESENTATION {
            assert!(!deps.iter().any(|d| d == p), "crates/{dir} depends on {p}");
        }
    }
}

#[test]
fn the_command_line_reaches_analyses_only_through_the_facade() {
    let deps = dependencies("cli");
    assert!(deps.iter().any(|d| d == "patternproof"), "{deps:?}");
    for analysis in [
        "patternproof-core",
        "patternproof-io",
        "patternproof-gpkg",
        "patternproof-window",
        "patternproof-audit",
        "patternproof-scales",
        "patternproof-density",
        "patternproof-sites",
        "patternproof-recheck",
        "patternproof-protocol",
    ] {
        assert!(
            !deps.iter().any(|d| d == analysis),
            "the CLI depends on {analysis}"
        );
    }
}
