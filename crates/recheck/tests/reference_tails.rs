//! The normal tails behind the one-sided/two-sided detection, checked
//! against `scipy.stats.norm` (reference library; values written by
//! `reference/make_reference.py` into the `recheck_tails` section of
//! `reference/values.json`, versions recorded there).

#![allow(clippy::unwrap_used, missing_docs)]

use approx::relative_eq;
use patternproof_recheck::checks::{PTail, plain_checks};
use patternproof_recheck::model::Tail;
use patternproof_recheck::reported::{Quantity, parse};
use patternproof_recheck::{Figures, recheck};
use serde_json::Value;

fn tails() -> Value {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/../../reference/values.json");
    let text = std::fs::read_to_string(path).unwrap_or_else(|e| panic!("read {path}: {e}"));
    let v: Value = serde_json::from_str(&text).unwrap();
    assert!(
        v["versions"]["scipy"].is_string(),
        "scipy version not recorded"
    );
    v["recheck_tails"].clone()
}

fn list(v: &Value, key: &str) -> Vec<f64> {
    v[key]
        .as_array()
        .unwrap_or_else(|| panic!("recheck_tails.{key} missing: run reference/regenerate.sh"))
        .iter()
        .map(|x| x.as_f64().unwrap())
        .collect()
}

fn assert_rel(what: &str, got: f64, want: f64, rel: f64) {
    let err = (got - want).abs() / want.abs().max(1e-300);
    assert!(
        relative_eq!(got, want, epsilon = 0.0, max_relative = rel),
        "{what}: got {got}, scipy {want}, relative error {err:e}"
    );
}

/// Reference: scipy.stats.norm.sf(|z|) and 2·norm.sf(|z|).
#[test]
fn tail_probabilities_match_scipy() {
    let v = tails();
    let z = list(&v, "z");
    let one = list(&v, "one_sided_p");
    let two = list(&v, "two_sided_p");
    assert_eq!(z.len(), 11);
    for i in 0..z.len() {
        let m = z[i].abs();
        assert_rel(
            &format!("one-sided p at z = {}", z[i]),
            Tail::OneSided.p_of_magnitude(m),
            one[i],
            1e-9,
        );
        assert_rel(
            &format!("two-sided p at z = {}", z[i]),
            Tail::TwoSided.p_of_magnitude(m),
            two[i],
            1e-9,
        );
    }
}

/// Reference: scipy.stats.norm.isf(p) and norm.isf(p/2).
#[test]
fn inverse_tails_match_scipy() {
    let v = tails();
    let p = list(&v, "p");
    let one = list(&v, "one_sided_z");
    let two = list(&v, "two_sided_z");
    for i in 0..p.len() {
        let got1 = Tail::OneSided.magnitude_of_p(p[i]);
        if one[i] == 0.0 {
            assert_eq!(got1, 0.0, "one-sided |z| at p = 0.5");
        } else {
            assert_rel(
                &format!("one-sided |z| at p = {}", p[i]),
                got1,
                one[i],
                1e-9,
            );
        }
        assert_rel(
            &format!("two-sided |z| at p = {}", p[i]),
            Tail::TwoSided.magnitude_of_p(p[i]),
            two[i],
            1e-9,
        );
    }
}

fn figures(z: &str, p: &str, one_sided: bool) -> Figures {
    Figures::new(100, one_sided)
        .with(parse(z, Quantity::Z).unwrap())
        .with(parse(p, Quantity::P).unwrap())
}

/// Known pairs: z printed with 2 decimals, p printed with 3 significant
/// digits from scipy's two-sided or one-sided value. The recheck must
/// name the tail (the two differ by a factor of 2, far beyond rounding).
#[test]
fn detection_on_known_pairs() {
    let v = tails();
    let z = list(&v, "z");
    let one = list(&v, "one_sided_p");
    let two = list(&v, "two_sided_p");
    for i in 0..z.len() {
        let zt = format!("{:.2}", z[i]);
        let p2 = format!("{:.2e}", two[i]);
        let p1 = format!("{:.2e}", one[i]);

        let f = figures(&zt, &p2, false);
        let (checks, tail) = plain_checks(&f);
        assert_eq!(tail, Some(PTail::TwoSided), "z = {zt}, p = {p2}");
        let p_check = checks.iter().find(|c| c.name == "p from z").unwrap();
        assert_eq!(p_check.ok, Some(true));
        assert_eq!(p_check.condition, None);
        // Without R nothing recomputes z itself.
        let z_check = checks.iter().find(|c| c.name == "z from R and n").unwrap();
        assert_eq!(z_check.ok, None);
        assert_eq!(
            recheck(&f, None).verdict,
            "consistent",
            "z = {zt}, p = {p2}"
        );

        let f = figures(&zt, &p1, false);
        let (checks, tail) = plain_checks(&f);
        assert_eq!(tail, Some(PTail::OneSided), "z = {zt}, p = {p1}");
        let p_check = checks.iter().find(|c| c.name == "p from z").unwrap();
        assert_eq!(
            p_check.condition.as_deref(),
            Some("the p-value is one-sided")
        );
        let r = recheck(&f, None);
        assert_eq!(r.consistent, Some(true));
        assert_eq!(r.verdict, "consistent only if the p-value is one-sided");

        // Declared one-sided: the one-sided p passes outright, the
        // two-sided one fails.
        let r = recheck(&figures(&zt, &p1, true), None);
        assert_eq!(
            r.verdict, "consistent",
            "declared one-sided, z = {zt}, p = {p1}"
        );
        let r = recheck(&figures(&zt, &p2, true), None);
        assert_eq!(
            r.consistent,
            Some(false),
            "declared one-sided, z = {zt}, p = {p2}"
        );

        // A p that is neither (three times the two-sided value, or 0.9 when
        // that exceeds 1) matches no tail.
        let wrong = format!("{:.2e}", (3.0 * two[i]).min(0.9));
        let (_, tail) = plain_checks(&figures(&zt, &wrong, false));
        assert_eq!(tail, Some(PTail::Neither), "z = {zt}, p = {wrong}");
    }
}

/// "p < 0.001" cannot tell the tails apart once both are below the bound
/// (z = −4.0: scipy two-sided 6.33e-5, one-sided 3.17e-5), but it can when
/// only the one-sided value is (z = 3.290 ± 0.0005 stays below
/// scipy's norm.isf(0.0005) = 3.29053, so its two-sided p exceeds 0.001).
#[test]
fn bounds_and_tails() {
    let (_, t) = plain_checks(&figures("-4.00", "<0.001", false));
    assert_eq!(t, Some(PTail::Either));
    let (_, t) = plain_checks(&figures("3.290", "<0.001", false));
    assert_eq!(t, Some(PTail::OneSided));
    let (_, t) = plain_checks(&figures("3.30", "<0.001", false));
    assert_eq!(t, Some(PTail::Either));
}
