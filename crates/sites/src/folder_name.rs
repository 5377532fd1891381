//! The folder name of each site's report (`site/NAME/`).
//!
//! Site names come from file stems or from a column of the user's data,
//! so they may be 300 characters long, hold `/`, markup or letters of any
//! script, or differ only in case. A folder name must be short enough for
//! every file system, mean nothing to a shell or a browser, and never be
//! shared by two sites, even on a file system that ignores case. The rule
//! (documented in `docs/sites-schema.md`):
//!
//! 1. keep ASCII letters, digits, `-`, `_` and `.`; every other run of
//!    characters becomes one `_`;
//! 2. drop leading `.` and `-` (hidden files, options) and trailing `.`;
//!    cut to [`MAX_SLUG`] characters; an empty result becomes `site`;
//! 3. if that changed the name, or the name is a device name on Windows
//!    (`con`, `nul`, `com1`…), append `~` and the first 10 hex digits of
//!    the SHA-256 of the full name. `~` is never kept by step 1, so a
//!    hashed folder cannot equal another site's unchanged name;
//! 4. a name already taken (compared without case) gets the hashed form,
//!    then `-2`, `-3`… in input order, so even a shortened-hash collision
//!    cannot merge two sites.
//!
//! The full name stays in `sites.*` and in the site's own report.

use sha2::Digest;

/// Longest kept part of a site name, in characters (all ASCII).
pub const MAX_SLUG: usize = 60;

/// One folder name per site, in input order, unique without case.
pub fn site_folders<S: AsRef<str>>(names: &[S]) -> Vec<String> {
    let mut taken: Vec<String> = Vec::with_capacity(names.len());
    for name in names {
        let name = name.as_ref();
        let mut candidate = natural(name);
        if is_taken(&taken, &candidate) {
            candidate = hashed(name);
        }
        let base = candidate.clone();
        let mut k = 2;
        while is_taken(&taken, &candidate) {
            candidate = format!("{base}-{k}");
            k += 1;
        }
        taken.push(candidate);
    }
    taken
}

fn is_taken(taken: &[String], candidate: &str) -> bool {
    taken.iter().any(|t| t.eq_ignore_ascii_case(candidate))
}

/// The name itself when it is already a safe folder name, else
/// [`hashed`].
fn natural(name: &str) -> String {
    let s = slug(name);
    if s == name && !is_device_name(&s) {
        s
    } else {
        hashed(name)
    }
}

fn hashed(name: &str) -> String {
    let digest = sha2::Sha256::digest(name.as_bytes());
    let hex: String = digest.iter().take(5).map(|b| format!("{b:02x}")).collect();
    format!("{}~{hex}", slug(name))
}

/// Steps 1 and 2 of the rule.
fn slug(name: &str) -> String {
    let mut s = String::with_capacity(name.len().min(MAX_SLUG));
    let mut replaced = false;
    for c in name.chars() {
        if c.is_ascii_alphanumeric() || matches!(c, '-' | '_' | '.') {
            s.push(c);
            replaced = false;
        } else if !replaced {
            s.push('_');
            replaced = true;
        }
    }
    let s = s.trim_start_matches(['.', '-']);
    let mut s: String = s.chars().take(MAX_SLUG).collect();
    while s.ends_with('.') {
        s.pop();
    }
    if s.is_empty() { "site".into() } else { s }
}

/// Names Windows reserves for devices, with or without an extension.
fn is_device_name(s: &str) -> bool {
    let stem = s.split('.').next().unwrap_or(s).to_ascii_lowercase();
    matches!(stem.as_str(), "con" | "prn" | "aux" | "nul")
        || ((stem.starts_with("com") || stem.starts_with("lpt"))
            && stem.len() == 4
            && stem.as_bytes()[3].is_ascii_digit())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn plain_names_are_kept() {
        assert_eq!(
            site_folders(&["plot-3", "north_field.2"]),
            ["plot-3", "north_field.2"]
        );
    }

    #[test]
    fn odd_names_become_safe_and_carry_a_hash() {
        let f = site_folders(&["plot 3/b", "..", "<script>", "Wiese Süd", "con"]);
        // SHA-256 prefixes from Python's hashlib.
        assert_eq!(f[0], "plot_3_b~ea9d5a5aea");
        assert_eq!(f[1], "site~5ec1f7e700");
        assert_eq!(f[2], "_script_~5b63e5b209");
        assert_eq!(f[3], "Wiese_S_d~e171bb9de7");
        assert_eq!(f[4], "con~1143da2bc5");
    }

    #[test]
    fn long_names_are_cut_and_stay_distinct() {
        let a = "a".repeat(300);
        let b = format!("{}b", "a".repeat(299));
        let f = site_folders(&[a.as_str(), b.as_str()]);
        assert_eq!(f[0].len(), MAX_SLUG + 11);
        assert!(f[0].starts_with(&"a".repeat(MAX_SLUG)));
        assert_ne!(f[0], f[1]);
    }

    #[test]
    fn no_two_sites_share_a_folder_even_without_case() {
        // A name that copies another's hashed folder (its `~` is replaced,
        // so it cannot take it), names that differ in case only, and the
        // same name twice.
        let f = site_folders(&["plot_3_b~ea9d5a5aea", "plot 3/b", "Plot", "plot", "plot"]);
        assert_eq!(f[0], "plot_3_b_ea9d5a5aea~50342a17db");
        assert_eq!(f[1], "plot_3_b~ea9d5a5aea");
        assert_eq!(f[2], "Plot");
        assert_eq!(f[3], "plot~0f3850ab36");
        assert_eq!(f[4], "plot~0f3850ab36-2");
        let lower: std::collections::HashSet<String> =
            f.iter().map(|s| s.to_ascii_lowercase()).collect();
        assert_eq!(lower.len(), f.len());
    }
}
