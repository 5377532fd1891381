//! The facade called as a library user calls it: each refusal has its
//! kind, and the per-site entry of a distributed run gives what the
//! whole-study entry gives.

use patternproof::{
    AuditOptions, Edge, ErrorKind, Input, LoadOptions, Protocol, Refusal, Silent, SitesOptions,
    SitesSource, adjust, audit, load_sites, read_verified, site_result, sites,
};
use patternproof_protocol::{Adjust, SCHEMA, WindowRule};
use std::path::PathBuf;
use std::sync::atomic::{AtomicU64, Ordering};

fn repo() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../..")
}

fn protocol(window: WindowRule) -> Protocol {
    Protocol {
        schema: SCHEMA.into(),
        window,
        edge: Edge::Simulation,
        alpha: 0.05,
        sims: 39,
        seed: 7,
        adjust: Adjust::Holm,
        min_n: 10,
        guard: None,
        concavity: 0.3,
        note: None,
    }
}

#[test]
fn points_on_one_line_are_refused_as_untestable() {
    // On one horizontal line even the bounding box has no area.
    let line: Vec<[f64; 2]> = (0..40).map(|i| [i as f64, 0.0]).collect();
    let Err(e) = audit(
        &Input::from_points(line, "m"),
        &AuditOptions::default(),
        &Silent,
    ) else {
        panic!("no window can be drawn around points on one line");
    };
    assert_eq!(e.kind(), ErrorKind::Refused(Refusal::NoTestableWindow));
    assert!(e.to_string().contains("what to do:"), "{e}");
}

#[test]
fn one_point_is_refused_as_too_few() {
    let one = Input::from_points(vec![[1.0, 1.0]], "m");
    let Err(e) = audit(&one, &AuditOptions::default(), &Silent) else {
        panic!("one point has no neighbour");
    };
    assert_eq!(e.kind(), ErrorKind::Refused(Refusal::TooFewPoints));
}

#[test]
fn a_changed_protocol_is_refused_with_its_kind() {
    let dir = tempfile::tempdir().expect("a temporary folder");
    let path = dir.path().join("p.json");
    let text = protocol(WindowRule::Hull).to_file_text();
    std::fs::write(&path, text.replace("\"alpha\": 0.05", "\"alpha\": 0.1")).expect("written");
    let e = read_verified(&path).expect_err("the hash no longer matches");
    assert_eq!(e.kind(), ErrorKind::Refused(Refusal::Protocol));
    assert!(e.to_string().contains("CHANGED"), "{e}");
    std::fs::write(&path, &text).expect("written");
    assert_eq!(read_verified(&path).expect("intact").alpha, 0.05);
}

#[test]
fn a_boundary_protocol_without_boundaries_is_refused_before_reading() {
    let source = SitesSource {
        inputs: vec![repo().join("demo-data/plots/plot-a.csv")],
        site_field: None,
        boundaries: None,
        boundary_layer: None,
        boundary_field: "name".into(),
        load: LoadOptions::default(),
    };
    let e = load_sites(&source, &protocol(WindowRule::Boundary), "p.json")
        .expect_err("no boundary to use");
    assert_eq!(e.kind(), ErrorKind::Refused(Refusal::Sites));
}

/// A distributed run computes each site alone and adjusts where the
/// results meet; that must give the rows the whole-study entry gives.
#[test]
fn sites_one_at_a_time_then_adjusted_equal_the_whole_run() {
    let plots = repo().join("demo-data/plots");
    let mut inputs: Vec<PathBuf> = std::fs::read_dir(&plots)
        .expect("the demo plots")
        .map(|e| e.expect("an entry").path())
        .collect();
    inputs.sort();
    let source = SitesSource {
        inputs,
        site_field: None,
        boundaries: Some(repo().join("demo-data/plots-boundaries.geojson")),
        boundary_layer: None,
        boundary_field: "name".into(),
        load: LoadOptions {
            coords: patternproof::CoordChoice::Projected,
            ..LoadOptions::default()
        },
    };
    let protocol = protocol(WindowRule::Boundary);
    let loaded = load_sites(&source, &protocol, "p.json").expect("the demo plots load");
    let options = SitesOptions { sweep_sims: 19 };
    let whole = sites(&loaded, &protocol, options, &Silent).expect("nothing stops it");
    let mut pieces: Vec<_> = loaded
        .sites
        .iter()
        .map(|s| site_result(s, &protocol, options))
        .collect();
    adjust(&mut pieces, &protocol);
    assert_eq!(whole.len(), 6);
    let json = |runs: &[patternproof::SiteRun]| {
        serde_json::to_string(&runs.iter().map(|r| &r.row).collect::<Vec<_>>()).expect("rows")
    };
    assert_eq!(json(&whole), json(&pieces));
    assert!(whole.iter().any(|r| r.row.p_adjusted.is_some()));
}

/// A progress that asks the run to stop after `after` steps, as a
/// notebook's Ctrl-C does.
struct StopAfter {
    after: u64,
    steps: AtomicU64,
    total: AtomicU64,
}

impl patternproof::Progress for StopAfter {
    fn start(&self, total: u64, _what: &str) {
        self.total.store(total, Ordering::SeqCst);
    }
    fn step(&self) {
        self.steps.fetch_add(1, Ordering::SeqCst);
    }
    fn cancelled(&self) -> bool {
        self.steps.load(Ordering::SeqCst) >= self.after
    }
}

/// A stop asked for by the progress ends the audit early with its own
/// kind of refusal, and nothing is printed or left running; a progress
/// that never asks changes nothing.
#[test]
fn a_progress_can_stop_a_long_run() {
    let points: Vec<[f64; 2]> = (0..200)
        .map(|i| [(i * 37 % 101) as f64, (i * 53 % 97) as f64])
        .collect();
    let options = AuditOptions {
        sims: 2000,
        ..AuditOptions::default()
    };
    let input = Input::from_points(points, "m");
    let stop = StopAfter {
        after: 50,
        steps: AtomicU64::new(0),
        total: AtomicU64::new(0),
    };
    let Err(e) = audit(&input, &options, &stop) else {
        panic!("the run should have stopped");
    };
    assert_eq!(e.kind(), ErrorKind::Refused(Refusal::Stopped), "{e}");
    assert!(e.to_string().contains("stopped before it finished"), "{e}");
    let (steps, total) = (
        stop.steps.load(Ordering::SeqCst),
        stop.total.load(Ordering::SeqCst),
    );
    // Each worker thread finishes at most the pattern it is on.
    assert!(steps < 50 + 64, "{steps} of {total} steps ran");
    assert!(total >= 2000 * 3, "{total}");
    let never = StopAfter {
        after: u64::MAX,
        steps: AtomicU64::new(0),
        total: AtomicU64::new(0),
    };
    let small = AuditOptions {
        sims: 19,
        ..AuditOptions::default()
    };
    let a = audit(&input, &small, &never).expect("runs");
    let b = audit(&input, &small, &Silent).expect("runs");
    assert_eq!(
        serde_json::to_string(&a).expect("json"),
        serde_json::to_string(&b).expect("json")
    );
}

/// The default simulation counts of every entry follow the one rule of
/// `options::default_sims`: 999 where the p-value is the result (the
/// audit), 99 where simulations screen (the K envelopes, the sites'
/// sweeps), so a front end that takes the defaults agrees with the CLI.
#[test]
fn default_simulation_counts_follow_the_rule() {
    use patternproof::options::{SCREEN_SIMS, ScalesOptions, TEST_SIMS};
    assert_eq!((TEST_SIMS, SCREEN_SIMS), (999, 99));
    assert_eq!(AuditOptions::default().sims, TEST_SIMS);
    assert_eq!(ScalesOptions::default().sims, SCREEN_SIMS);
    assert_eq!(SitesOptions::default().sweep_sims, SCREEN_SIMS);
}

/// The density page's provenance needs the input checksums: a loaded
/// file is hashed by `Input::checksummed` (the SHA-256 of the demo track,
/// recomputed with sha2), and `Input::from_dataset` takes none.
#[test]
fn checksummed_input_names_the_bytes_it_was_read_from() {
    use sha2::Digest;
    let track = repo().join("demo-data/marsh-hare-track.csv");
    let data =
        patternproof::load(&track, &[], &LoadOptions::default()).expect("the demo track loads");
    let input = Input::checksummed(&data).expect("the track is hashed");
    let want: String = sha2::Sha256::digest(std::fs::read(&track).expect("the track reads"))
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect();
    assert_eq!(input.digests.len(), 1);
    assert_eq!(input.digests[0].sha256, want);
    assert!(Input::from_dataset(&data).digests.is_empty());
}
