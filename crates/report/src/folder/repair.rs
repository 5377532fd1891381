//! Before writing: put right what a run that was killed (or lost its
//! power) left beside `--out`.
//!
//! Only folders with a temporary marker ([`temporary::MARKER`]) whose
//! owner is gone are touched, plus empty folders with a temporary name
//! whose process id is gone:
//!
//! - a staging folder is removed: its report was never finished;
//! - a previous report whose `--out` folder is missing (the run stopped
//!   between the two renames) is moved back;
//! - a previous report whose `--out` folder holds a complete report is
//!   removed: the replacement had finished;
//! - a previous report whose `--out` folder now holds anything else is
//!   kept, and said so: only the user can tell which one they want.

use super::manifest::{self, Contents};
use super::temporary::{self, MarkerInfo, Owner, Role};
use std::ffi::OsStr;
use std::path::Path;

/// Repair every leftover in `parent`; `target` is this run's `--out` name
/// (a temporary marker left inside it is removed too). Returns one
/// sentence per thing done or found, for the user.
pub fn repair(parent: &Path, target: &OsStr) -> Vec<String> {
    let mut notes = Vec::new();
    let Ok(entries) = std::fs::read_dir(parent) else {
        return notes;
    };
    let mut found: Vec<_> = entries.filter_map(Result::ok).collect();
    found.sort_by_key(|e| e.file_name());
    for e in found {
        let name = e.file_name();
        let Some(name) = name.to_str() else { continue };
        if !(name.starts_with(temporary::STAGE_PREFIX) || name.starts_with(temporary::OLD_PREFIX)) {
            continue;
        }
        if !e.file_type().is_ok_and(|t| t.is_dir()) {
            continue;
        }
        let path = e.path();
        match temporary::read_marker(&path) {
            None => {
                // Made, but stopped before its marker was in place: empty
                // but for a marker being written, and `remove_dir` removes
                // nothing else.
                let gone = temporary::pid_in_name(name).is_some_and(|pid| {
                    let host = Owner::me().host;
                    !Owner { pid, host }.alive()
                });
                if gone {
                    let _ = std::fs::remove_file(path.join(temporary::MARKER_PART));
                }
                if gone && std::fs::remove_dir(&path).is_ok() {
                    notes.push(format!(
                        "removed {}, an empty temporary folder of a run that was stopped",
                        path.display()
                    ));
                }
            }
            Some(m) if m.owner.alive() => {}
            Some(m) if m.role == Role::Staging => {
                if temporary::remove_marker_last(&path).is_ok() {
                    notes.push(format!(
                        "removed {}, the unfinished report of a run that was stopped",
                        path.display()
                    ));
                }
            }
            Some(m) => old(parent, &path, &m, &mut notes),
        }
    }
    let inside = parent.join(target);
    if temporary::read_marker(&inside).is_some_and(|m| !m.owner.alive()) {
        let _ = std::fs::remove_file(inside.join(temporary::MARKER));
    }
    notes
}

/// A folder holding a previous report.
fn old(parent: &Path, path: &Path, m: &MarkerInfo, notes: &mut Vec<String>) {
    let target = parent.join(&m.target);
    let previous = path.join("previous");
    let has_previous = previous.symlink_metadata().is_ok();
    let has_target = target.symlink_metadata().is_ok();
    if has_previous && !has_target {
        if std::fs::rename(&previous, &target).is_ok() {
            let _ = temporary::remove_marker_last(path);
            notes.push(format!(
                "restored the earlier report in {}: a run that was replacing it was stopped",
                target.display()
            ));
        }
        return;
    }
    let replaced = !has_previous
        || (target.is_dir() && manifest::inspect(&target).is_ok_and(|c| c == Contents::OnlyListed));
    if replaced {
        if temporary::remove_marker_last(path).is_ok() {
            notes.push(if has_previous {
                format!(
                    "removed {}, the earlier report of {} that a stopped run had already replaced",
                    path.display(),
                    target.display()
                )
            } else {
                // Stopped before the earlier report was moved into it.
                format!(
                    "removed {}, an empty temporary folder of a run that was stopped",
                    path.display()
                )
            });
        }
    } else {
        notes.push(format!(
            "{} holds the earlier report of {}, kept by a run that was stopped while replacing it; {} now holds something else: keep one and delete the other",
            previous.display(),
            target.display(),
            target.display()
        ));
    }
}

#[cfg(all(test, unix))]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::super::temporary::TempFolder;
    use super::super::temporary::tests::dead_owner;
    use super::super::tests::names;
    use super::*;

    fn report(dir: &Path, text: &str) {
        std::fs::create_dir_all(dir).unwrap();
        std::fs::write(dir.join("report.json"), text).unwrap();
        std::fs::write(
            dir.join(super::super::MARKER),
            manifest::render(["report.json"].into_iter()),
        )
        .unwrap();
    }

    #[test]
    fn a_dead_run_s_staging_folder_goes_a_live_one_stays() {
        let root = tempfile::tempdir().unwrap();
        let dead = TempFolder::create(root.path(), Role::Staging, OsStr::new("out"), &dead_owner())
            .unwrap()
            .keep();
        std::fs::write(dead.join("report.json"), "{").unwrap();
        let live = TempFolder::create(root.path(), Role::Staging, OsStr::new("out"), &Owner::me())
            .unwrap();
        let notes = repair(root.path(), OsStr::new("out"));
        assert!(!dead.exists());
        assert!(
            live.path().exists(),
            "a running owner's folder is left alone"
        );
        assert_eq!(notes.len(), 1);
        assert!(notes[0].contains("unfinished report"), "{notes:?}");
    }

    #[test]
    fn a_previous_report_comes_back_when_out_is_missing() {
        let root = tempfile::tempdir().unwrap();
        let old = TempFolder::create(root.path(), Role::Old, OsStr::new("out"), &dead_owner())
            .unwrap()
            .keep();
        report(&old.join("previous"), "{\"v\":1}");
        let notes = repair(root.path(), OsStr::new("elsewhere"));
        assert_eq!(
            std::fs::read_to_string(root.path().join("out/report.json")).unwrap(),
            "{\"v\":1}"
        );
        assert_eq!(names(root.path()), ["out"]);
        assert!(notes[0].contains("restored"), "{notes:?}");
    }

    #[test]
    fn a_finished_replacement_drops_the_copy_an_unclear_one_keeps_it() {
        let root = tempfile::tempdir().unwrap();
        // Finished: out holds a complete report.
        let old = TempFolder::create(root.path(), Role::Old, OsStr::new("out"), &dead_owner())
            .unwrap()
            .keep();
        report(&old.join("previous"), "{\"v\":1}");
        report(&root.path().join("out"), "{\"v\":2}");
        // Unclear: `mine` now holds a user's file.
        let kept = TempFolder::create(root.path(), Role::Old, OsStr::new("mine"), &dead_owner())
            .unwrap()
            .keep();
        report(&kept.join("previous"), "{\"v\":1}");
        std::fs::create_dir(root.path().join("mine")).unwrap();
        std::fs::write(root.path().join("mine/thesis.tex"), "x").unwrap();
        let notes = repair(root.path(), OsStr::new("out"));
        assert!(!old.exists());
        assert_eq!(
            std::fs::read_to_string(root.path().join("out/report.json")).unwrap(),
            "{\"v\":2}"
        );
        assert!(kept.join("previous/report.json").is_file());
        assert_eq!(notes.len(), 2, "{notes:?}");
        assert!(
            notes.iter().any(|n| n.contains("already replaced")),
            "{notes:?}"
        );
        assert!(
            notes
                .iter()
                .any(|n| n.contains("keep one and delete the other")),
            "{notes:?}"
        );
    }

    #[test]
    fn folders_without_our_marker_are_never_touched() {
        let root = tempfile::tempdir().unwrap();
        let pid = dead_owner().pid;
        // Same names as ours, but no marker: a user's, or an older version's.
        let full = root.path().join(format!(".patternproof-stage-{pid}-abc"));
        std::fs::create_dir(&full).unwrap();
        std::fs::write(full.join("notes.txt"), "mine").unwrap();
        let legacy = root.path().join(".patternproof-old-xyz");
        std::fs::create_dir_all(legacy.join("previous")).unwrap();
        // Empty, named by a dead process: stopped before its marker.
        let empty = root.path().join(format!(".patternproof-stage-{pid}-def"));
        std::fs::create_dir(&empty).unwrap();
        // Marker-like text that is not ours.
        let fake = root.path().join(".patternproof-stage-1-ghi");
        std::fs::create_dir(&fake).unwrap();
        std::fs::write(fake.join(temporary::MARKER), "hello\n").unwrap();
        let notes = repair(root.path(), OsStr::new("out"));
        assert_eq!(notes.len(), 1, "{notes:?}");
        assert!(notes[0].contains("an empty temporary folder"), "{notes:?}");
        assert!(full.join("notes.txt").is_file());
        assert!(legacy.join("previous").is_dir());
        assert!(!empty.exists());
        assert!(fake.join(temporary::MARKER).is_file());
    }

    /// A run killed while writing its marker: the marker is only ever put
    /// in place whole (written as `.part`, then renamed), a cut marker
    /// (no final newline, e.g. its host name cut short) counts as none,
    /// and a dead run's folder holding only the `.part` file is removed.
    #[test]
    fn a_marker_cut_short_is_no_marker() {
        let root = tempfile::tempdir().unwrap();
        let me = dead_owner();
        let part = root
            .path()
            .join(format!(".patternproof-stage-{}-abc", me.pid));
        std::fs::create_dir(&part).unwrap();
        std::fs::write(part.join(temporary::MARKER_PART), "patternproof tem").unwrap();
        let cut = root
            .path()
            .join(format!(".patternproof-old-{}-def", me.pid));
        std::fs::create_dir(&cut).unwrap();
        let whole = format!(
            "{}\nrole: old\ntarget: out\npid: {}\nhost: {}\n",
            temporary::HEADER,
            me.pid,
            me.host
        );
        // Cut inside the host name: read whole, it would name another host.
        std::fs::write(cut.join(temporary::MARKER), &whole[..whole.len() - 2]).unwrap();
        assert!(temporary::read_marker(&cut).is_none());
        let notes = repair(root.path(), OsStr::new("out"));
        assert!(!part.exists(), "{notes:?}");
        assert!(
            notes
                .iter()
                .any(|n| n.contains("an empty temporary folder"))
        );
        // The cut marker's folder holds a file, so it is not ours to judge.
        assert!(cut.join(temporary::MARKER).is_file());
    }
}
