//! One tool, one set of habits (issue 22): a flag that several commands
//! take means the same there, and the simulation counts follow one rule.
//! Read from each command's own `-h`, as a user reads them.

use crate::util::{run, stderr, stdout};

/// The short help of `command` (with a sub-command for `protocol new`).
fn help(command: &[&str]) -> String {
    let mut args = command.to_vec();
    args.push("-h");
    let o = run(&args);
    assert!(o.status.success(), "{command:?}: {}", stderr(&o));
    stdout(&o)
}

/// The words of one option's entry in a short help (its name, help text
/// and default), whitespace collapsed, since each command aligns its
/// columns to its own longest flag.
fn entry(help: &str, flag: &str) -> String {
    let lines: Vec<&str> = help.lines().collect();
    let start = lines
        .iter()
        .position(|l| {
            let t = l.trim_start();
            t.starts_with(flag) || t.starts_with(&format!("-q, {flag}"))
        })
        .unwrap_or_else(|| panic!("{flag} not in\n{help}"));
    let mut words = lines[start]
        .split_whitespace()
        .collect::<Vec<_>>()
        .join(" ");
    for l in &lines[start + 1..] {
        let t = l.trim_start();
        if t.is_empty() || t.starts_with('-') {
            break;
        }
        words.push(' ');
        words.push_str(&t.split_whitespace().collect::<Vec<_>>().join(" "));
    }
    words
}

/// `-q` is the same option with the same words in every command that
/// takes it, and it keeps the results (it used to mean "nothing but
/// errors" in `density` and "no progress bar" elsewhere).
#[test]
fn quiet_means_one_thing_everywhere() {
    let want = "-q, --quiet No progress bar and no forecast of the run's time; the reading line, warnings, results and the closing `wrote … to DIR` line still print, and errors always do";
    for command in ["audit", "scales", "density", "sites"] {
        assert_eq!(entry(&help(&[command]), "--quiet"), want, "{command}");
    }
}

/// The simulation counts follow one rule: 999 where the p-value is the
/// result (the audit, a protocol), 99 where simulations screen windows or
/// distances (`scales`, `audit --scales`, the sites' sweeps); the help
/// of each says so with the same words.
#[test]
fn default_simulation_counts_follow_one_rule() {
    let rule = "(default by the one rule of every command: 999 where the p-value is the result, 99 where simulations screen windows or distances at α)";
    let cases: [(&[&str], &str, &str); 5] = [
        (&["audit"], "--sims", "[default: 999]"),
        (&["protocol", "new"], "--sims", "[default: 999]"),
        (&["audit"], "--scales-sims", "[default: 99]"),
        (&["scales"], "--sims", "[default: 99]"),
        (&["sites"], "--sweep-sims", "[default: 99]"),
    ];
    for (command, flag, default) in cases {
        let e = entry(&help(command), flag);
        assert!(e.contains(rule), "{command:?} {flag}: {e}");
        assert!(e.ends_with(default), "{command:?} {flag}: {e}");
    }
}

/// The edge handlings to sweep are `--edges LIST` in every command that
/// sweeps them; `--edge` names the one edge handling of a protocol.
#[test]
fn edges_is_a_list_and_edge_is_one() {
    for command in ["audit", "scales", "density"] {
        let h = help(&[command]);
        assert!(h.contains("--edges <LIST>"), "{command}");
        assert!(!h.contains("--edge "), "{command}");
    }
    assert!(help(&["protocol", "new"]).contains("--edge <E>"));
}

/// `recheck --points` reads its input with the same flags as the other
/// commands, and no help names an internal library.
#[test]
fn shared_input_flags_and_no_library_names() {
    let recheck = help(&["recheck"]);
    let audit = help(&["audit"]);
    for flag in [
        "--layer",
        "--boundary-layer",
        "--where",
        "--coords",
        "--unit",
    ] {
        assert_eq!(entry(&recheck, flag), entry(&audit, flag), "{flag}");
    }
    for command in [
        &["audit"][..],
        &["scales"],
        &["density"],
        &["sites"],
        &["recheck"],
        &["protocol", "new"],
    ] {
        let h = help(command);
        for name in [
            "geo's", "geo ", "rstar", "statrs", "plotters", "maud", "rusqlite",
        ] {
            assert!(!h.contains(name), "{command:?} mentions {name}");
        }
    }
}
