//! The output folder appears whole or not at all, and never takes a
//! user's files with it.
//!
//! Files are written into a staging folder beside the target and renamed
//! into place in one step; an earlier report is first moved aside into a
//! second temporary folder and deleted only once the new one is in place
//! (`temporary` explains both). Every early return, and an interrupt
//! between two files, removes what this run made and leaves the earlier
//! report where it was.
//!
//! The marker [`MARKER`] lists every file written (`manifest`). An
//! existing target is replaced only with `--force`, and only while it
//! holds nothing but the files its marker lists; an empty folder is
//! filled; anything else (a user's folder, an old report with a user's
//! notes saved into it, a report from before the list) is refused, so a
//! typo in `--out` cannot delete anyone's work.
//!
//! Before writing, leftovers of a run that was killed are put right
//! (`repair`).

mod manifest;
mod repair;
mod temporary;

use std::collections::HashSet;
use std::ffi::OsString;
use std::io;
use std::path::{Component, Path, PathBuf};
use temporary::{Owner, Role, TempFolder};

/// Marker file written into every output folder: the list of the files
/// this tool wrote there, so that a later run can tell its own folders
/// from a user's.
pub const MARKER: &str = ".patternproof";

/// Files to write: name and content.
#[derive(Debug, Default)]
pub struct OutputFolder {
    files: Vec<(String, Vec<u8>)>,
    /// Sub-folders described for error messages: prefix and words.
    parts: Vec<(String, String)>,
}

impl OutputFolder {
    /// Add one file.
    pub fn add(&mut self, name: &str, content: Vec<u8>) {
        self.files.push((name.to_string(), content));
    }

    /// Add every file of `other` under the sub-folder `prefix`.
    pub fn nest(&mut self, prefix: &str, other: OutputFolder) {
        for (name, content) in other.files {
            self.files.push((format!("{prefix}/{name}"), content));
        }
        for (p, what) in other.parts {
            self.parts.push((format!("{prefix}/{p}"), what));
        }
    }

    /// Say what the sub-folder `prefix` holds (e.g. which site and input),
    /// so that an error writing it names that rather than a path alone.
    pub fn describe(&mut self, prefix: &str, what: &str) {
        self.parts.push((prefix.to_string(), what.to_string()));
    }

    /// Names added so far.
    pub fn names(&self) -> impl Iterator<Item = &str> {
        self.files.iter().map(|(n, _)| n.as_str())
    }

    /// Names and contents added so far, in order (e.g. to add print
    /// copies of the pictures before the folder is written).
    pub fn files(&self) -> impl Iterator<Item = (&str, &[u8])> {
        self.files.iter().map(|(n, c)| (n.as_str(), c.as_slice()))
    }

    /// The description of the deepest described sub-folder holding `name`.
    fn part_of(&self, name: &str) -> Option<&str> {
        self.parts
            .iter()
            .filter(|(p, _)| {
                name.strip_prefix(p.as_str())
                    .is_some_and(|rest| rest.starts_with('/'))
            })
            .max_by_key(|(p, _)| p.len())
            .map(|(_, w)| w.as_str())
    }

    /// Every name must be a plain relative path, given once.
    fn check_names(&self) -> Result<(), FolderError> {
        let mut seen = HashSet::new();
        for (name, _) in &self.files {
            let plain = !name.is_empty()
                && name.split('/').all(|c| {
                    !c.is_empty()
                        && c != "."
                        && c != ".."
                        && !c.contains(['\\', ':'])
                        && !c.chars().any(char::is_control)
                })
                && name != MARKER
                && name != temporary::MARKER;
            if !plain || !seen.insert(name.as_str()) {
                return Err(FolderError::BadName(name.clone()));
            }
        }
        Ok(())
    }
}

/// What a write did besides writing.
#[derive(Debug, Default)]
pub struct Written {
    /// Leftovers of stopped runs that were put right (or found and kept),
    /// one sentence each, for the user.
    pub repaired: Vec<String>,
}

/// Why the folder could not be written. Apart from [`FolderError::BadName`]
/// (a bug), every case is the user's to act on.
#[derive(Debug, thiserror::Error)]
pub enum FolderError {
    /// The target may not be replaced: what it is, and what to do.
    #[error("{}: {what}\n  what to do: {todo}", path.display())]
    Refused {
        /// The target as given.
        path: PathBuf,
        /// What is wrong.
        what: String,
        /// What to do.
        todo: String,
    },
    /// The target is an earlier report and `--force` was not given.
    #[error(
        "{}: the folder already holds a report\n  what to do: pass --force to replace it, or choose a new --out folder",
        .0.display()
    )]
    Exists(PathBuf),
    /// A file-system error: the path as the user will know it (never the
    /// staging folder), what was being done, and what the path belongs to.
    #[error(
        "{}: could not {action}{}: {error}\n  what to do: {}",
        path.display(),
        part.as_deref().map_or(String::new(), |w| format!(" ({w})")),
        advice(error)
    )]
    Io {
        /// The path involved.
        path: PathBuf,
        /// What was being done.
        action: &'static str,
        /// Which part of the report (a site and its input), if known.
        part: Option<String>,
        /// The error.
        error: io::Error,
    },
    /// The new report could not be moved into place and the earlier one
    /// could not be moved back: it is kept whole in `kept`.
    #[error(
        "{}: the new report could not be moved into place ({error}), and the earlier report could not be moved back; it is kept whole in {}\n  what to do: move {} back to {} (the next run beside it does so too), then check that the folder is writable",
        path.display(),
        kept.display(),
        kept.display(),
        path.display()
    )]
    Stranded {
        /// The target.
        path: PathBuf,
        /// Where the earlier report is.
        kept: PathBuf,
        /// Why the new one could not move in.
        error: io::Error,
    },
    /// Stopped (a signal) before the report was in place; nothing changed.
    #[error("stopped before the new report was in place; nothing was changed")]
    Interrupted,
    /// A file name that is not a plain relative path: a bug.
    #[error("the report has a file named `{0}`, which is not a plain relative path")]
    BadName(String),
}

/// Advice for a file-system error, by its kind.
fn advice(e: &io::Error) -> &'static str {
    if name_too_long(e) {
        return "a file or folder name is too long for this file system; choose a shorter --out path";
    }
    match e.kind() {
        io::ErrorKind::PermissionDenied | io::ErrorKind::ReadOnlyFilesystem => {
            "choose an --out folder you may write to"
        }
        io::ErrorKind::StorageFull | io::ErrorKind::QuotaExceeded => {
            "free some space, or choose an --out folder on another disk"
        }
        _ => "check that the folder is writable and the disk not full",
    }
}

#[cfg(unix)]
fn name_too_long(e: &io::Error) -> bool {
    e.raw_os_error() == Some(nix::errno::Errno::ENAMETOOLONG as i32)
}

#[cfg(not(unix))]
fn name_too_long(_e: &io::Error) -> bool {
    false
}

/// When to replace an earlier report and when to give up.
#[derive(Clone, Copy)]
pub struct WriteOptions<'a> {
    /// Replace an earlier report folder at the target (`--force`).
    pub force: bool,
    /// Asked between files whether to give up (a signal arrived): if so,
    /// what this run made is removed, the earlier report stays, and the
    /// answer is [`FolderError::Interrupted`]. Once the two renames begin
    /// they are finished, so the target holds either the old or the new
    /// report, whole.
    pub stop: &'a dyn Fn() -> bool,
}

impl WriteOptions<'_> {
    /// Never replace, never stop.
    pub const KEEP: WriteOptions<'static> = WriteOptions {
        force: false,
        stop: &never,
    };
    /// Replace an earlier report, never stop.
    pub const FORCE: WriteOptions<'static> = WriteOptions {
        force: true,
        stop: &never,
    };
}

fn never() -> bool {
    false
}

/// Write every file into `target` atomically: the one way any output
/// folder reaches the disk.
pub fn write_folder(
    target: &Path,
    folder: &OutputFolder,
    options: WriteOptions<'_>,
) -> Result<Written, FolderError> {
    write_with(target, folder, options.force, options.stop, &|from, to| {
        std::fs::rename(from, to)
    })
}

type Rename<'a> = &'a dyn Fn(&Path, &Path) -> io::Result<()>;

/// The writer, with the rename passed in so tests can make it fail.
fn write_with(
    target: &Path,
    folder: &OutputFolder,
    force: bool,
    stop: &dyn Fn() -> bool,
    rename: Rename<'_>,
) -> Result<Written, FolderError> {
    folder.check_names()?;
    let (parent, name) = split_target(target)?;
    std::fs::create_dir_all(&parent).map_err(|error| FolderError::Io {
        path: parent.clone(),
        action: "create the folder",
        part: None,
        error,
    })?;
    let repaired = repair::repair(&parent, &name);
    let place = parent.join(&name);
    let replace = check_target(target, &place, &parent, force)?;
    if stop() {
        return Err(FolderError::Interrupted);
    }
    let me = Owner::me();
    let at = |path: PathBuf, action: &'static str| {
        move |error: io::Error| FolderError::Io {
            path,
            action,
            part: None,
            error,
        }
    };
    let staging = TempFolder::create(&parent, Role::Staging, &name, &me)
        .map_err(at(parent.clone(), "make a temporary folder here"))?;
    for (file, content) in &folder.files {
        if stop() {
            return Err(FolderError::Interrupted);
        }
        let path = staging.path().join(file);
        let written = match path.parent() {
            Some(dir) => std::fs::create_dir_all(dir),
            None => Ok(()),
        }
        .and_then(|()| std::fs::write(&path, content));
        written.map_err(|error| FolderError::Io {
            path: target.join(file),
            action: "write",
            part: folder.part_of(file).map(str::to_string),
            error,
        })?;
    }
    std::fs::write(
        staging.path().join(MARKER),
        manifest::render(folder.names()),
    )
    .map_err(at(target.join(MARKER), "write"))?;
    if stop() {
        return Err(FolderError::Interrupted);
    }
    // From here on no interrupt is taken: the renames are finished.
    if replace {
        let old = TempFolder::create(&parent, Role::Old, &name, &me)
            .map_err(at(parent.clone(), "make a temporary folder here"))?;
        let previous = old.path().join("previous");
        rename(&place, &previous)
            .map_err(at(target.to_path_buf(), "move the earlier report aside"))?;
        if let Err(error) = rename(staging.path(), &place) {
            if rename(&previous, &place).is_ok() {
                return Err(FolderError::Io {
                    path: target.to_path_buf(),
                    action: "move the new report into place",
                    part: None,
                    error,
                });
            }
            let kept = old.keep().join("previous");
            return Err(FolderError::Stranded {
                path: target.to_path_buf(),
                kept,
                error,
            });
        }
        staging.keep();
        let _ = std::fs::remove_file(place.join(temporary::MARKER));
        drop(old);
    } else {
        rename(staging.path(), &place)
            .map_err(at(target.to_path_buf(), "move the new report into place"))?;
        staging.keep();
        let _ = std::fs::remove_file(place.join(temporary::MARKER));
    }
    Ok(Written { repaired })
}

/// The folder that holds the target, and the target's own name. `.`,
/// `..` and `/` name no folder that could be renamed, and the temporary
/// names are the tool's own.
fn split_target(target: &Path) -> Result<(PathBuf, OsString), FolderError> {
    let refuse = |what: &str, todo: &str| FolderError::Refused {
        path: target.to_path_buf(),
        what: what.into(),
        todo: todo.into(),
    };
    // `a/../b` would create `a`, a folder outside the one asked for, on
    // the way to `b`: `..` may follow only a folder that already exists.
    let mut walked = PathBuf::new();
    for c in target.components() {
        if c == Component::ParentDir
            && matches!(walked.components().next_back(), Some(Component::Normal(_)))
            && !walked.is_dir()
        {
            return Err(refuse(
                "--out goes down into a folder that does not exist and back up with `..`, which would create a folder outside the one asked for",
                "give the folder's path without that detour, e.g. --out b instead of --out a/../b",
            ));
        }
        walked.push(c);
    }
    let last = target.components().next_back();
    let Some(Component::Normal(name)) = last else {
        return Err(refuse(
            "--out must name a folder to create or replace; `.`, `..` and `/` cannot be replaced",
            "give the name of a new folder, e.g. --out report",
        ));
    };
    let text = name.to_string_lossy();
    if text.starts_with(temporary::STAGE_PREFIX) || text.starts_with(temporary::OLD_PREFIX) {
        return Err(refuse(
            "names starting with .patternproof- are kept for patternproof's temporary folders",
            "choose another --out name",
        ));
    }
    let parent = match target.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => PathBuf::from("."),
    };
    Ok((parent, name.to_os_string()))
}

/// Whether an existing target is to be replaced (`true`) or there is none
/// (`false`); a refusal otherwise.
fn check_target(
    target: &Path,
    place: &Path,
    parent: &Path,
    force: bool,
) -> Result<bool, FolderError> {
    let refuse = |what: String, todo: &str| FolderError::Refused {
        path: target.to_path_buf(),
        what,
        todo: todo.into(),
    };
    let meta = match place.symlink_metadata() {
        Ok(m) => m,
        Err(e) if e.kind() == io::ErrorKind::NotFound => return Ok(false),
        Err(error) => {
            return Err(FolderError::Io {
                path: target.to_path_buf(),
                action: "read its details",
                part: None,
                error,
            });
        }
    };
    if meta.file_type().is_symlink() {
        return Err(refuse(
            "is a symbolic link; patternproof does not replace links".into(),
            "give the folder itself, or a new --out folder",
        ));
    }
    if !meta.is_dir() {
        return Err(refuse(
            "is a file, not a folder".into(),
            "choose a new --out folder",
        ));
    }
    if is_mount_point(place, parent) {
        return Err(refuse(
            "is a mount point; patternproof replaces a folder by renaming a new one into its place, which a mount point does not allow".into(),
            &format!(
                "give a folder inside it, e.g. --out {}",
                target.join("report").display()
            ),
        ));
    }
    let contents = manifest::inspect(place).map_err(|error| FolderError::Io {
        path: target.to_path_buf(),
        action: "list its contents",
        part: None,
        error,
    })?;
    match contents {
        manifest::Contents::Empty => Ok(true),
        manifest::Contents::OnlyListed if force => Ok(true),
        manifest::Contents::OnlyListed => Err(FolderError::Exists(target.to_path_buf())),
        manifest::Contents::Foreign(shown, count) => Err(refuse(
            format!(
                "the folder holds a patternproof report and {count} file(s) or folder(s) that patternproof did not write ({}{}), so it is not replaced",
                shown.join(", "),
                if count > shown.len() { ", …" } else { "" }
            ),
            "move those files elsewhere and run again, or choose a new --out folder",
        )),
        manifest::Contents::Unlisted => Err(refuse(
            "the folder holds a report from an earlier patternproof that did not list its files, so patternproof cannot tell them from yours".into(),
            "look through the folder and delete it yourself, or choose a new --out folder",
        )),
        manifest::Contents::NoMarker => Err(refuse(
            "the folder exists and does not hold an earlier report (it has no .patternproof file list)".into(),
            "choose a new --out folder, or empty this one",
        )),
    }
}

#[cfg(unix)]
fn is_mount_point(place: &Path, parent: &Path) -> bool {
    use std::os::unix::fs::MetadataExt;
    match (place.metadata(), parent.metadata()) {
        (Ok(a), Ok(b)) => a.dev() != b.dev(),
        _ => false,
    }
}

#[cfg(not(unix))]
fn is_mount_point(_place: &Path, _parent: &Path) -> bool {
    false
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::*;
    use std::cell::Cell;

    /// Every entry of `dir`, sorted (shared with the repair tests).
    pub(super) fn names(dir: &Path) -> Vec<String> {
        let mut v: Vec<String> = std::fs::read_dir(dir)
            .unwrap()
            .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
            .collect();
        v.sort();
        v
    }

    fn report(v: u32) -> OutputFolder {
        let mut f = OutputFolder::default();
        f.add("report.json", format!("{{\"v\":{v}}}").into_bytes());
        f.add("site/a/verdict.md", b"# a\n".to_vec());
        f
    }

    fn version(out: &Path) -> String {
        std::fs::read_to_string(out.join("report.json")).unwrap()
    }

    #[test]
    fn replaces_an_old_report_but_refuses_a_foreign_folder() {
        let root = tempfile::tempdir().unwrap();
        let target = root.path().join("out");
        write_folder(&target, &report(1), WriteOptions::KEEP).unwrap();
        assert_eq!(names(&target), [".patternproof", "report.json", "site"]);
        assert_eq!(
            std::fs::read_to_string(target.join(MARKER))
                .unwrap()
                .lines()
                .skip(2)
                .collect::<Vec<_>>(),
            ["report.json", "site/a/verdict.md"]
        );
        assert!(matches!(
            write_folder(&target, &report(2), WriteOptions::KEEP),
            Err(FolderError::Exists(_))
        ));
        write_folder(&target, &report(2), WriteOptions::FORCE).unwrap();
        assert_eq!(version(&target), "{\"v\":2}");
        let foreign = root.path().join("mine");
        std::fs::create_dir(&foreign).unwrap();
        std::fs::write(foreign.join("thesis.tex"), "x").unwrap();
        let e = write_folder(&foreign, &report(2), WriteOptions::FORCE).unwrap_err();
        assert!(matches!(e, FolderError::Refused { .. }), "{e:?}");
        assert!(e.to_string().contains("no .patternproof file list"), "{e}");
        assert!(foreign.join("thesis.tex").exists());
        assert_eq!(
            names(root.path()),
            ["mine", "out"],
            "no temporary folder left"
        );
    }

    /// Issue 20: a report folder the user saved their own file into, and
    /// a folder with just some `report.json`, are theirs: never replaced.
    #[test]
    fn force_never_takes_a_user_s_files() {
        let root = tempfile::tempdir().unwrap();
        let out = root.path().join("out");
        write_folder(&out, &report(1), WriteOptions::KEEP).unwrap();
        std::fs::write(out.join("site/a/my-notes.txt"), "mine").unwrap();
        let e = write_folder(&out, &report(2), WriteOptions::FORCE).unwrap_err();
        assert!(matches!(e, FolderError::Refused { .. }), "{e:?}");
        let text = e.to_string();
        assert!(
            text.contains(
                "1 file(s) or folder(s) that patternproof did not write (site/a/my-notes.txt)"
            ),
            "{text}"
        );
        assert!(text.contains("what to do"), "{text}");
        assert_eq!(version(&out), "{\"v\":1}");
        assert!(out.join("site/a/my-notes.txt").is_file());

        let theirs = root.path().join("theirs");
        std::fs::create_dir(&theirs).unwrap();
        std::fs::write(theirs.join("report.json"), "{}").unwrap();
        std::fs::write(theirs.join("data.csv"), "x,y").unwrap();
        let e = write_folder(&theirs, &report(2), WriteOptions::FORCE).unwrap_err();
        assert!(matches!(e, FolderError::Refused { .. }), "{e:?}");
        assert!(e.to_string().contains("did not list its files"), "{e}");
        assert_eq!(names(&theirs), ["data.csv", "report.json"]);
        assert_eq!(names(root.path()), ["out", "theirs"]);
    }

    #[test]
    fn out_must_name_a_folder_of_its_own() {
        for bad in [".", "..", "/", "a/..", ".patternproof-old-1-x"] {
            let e = write_folder(Path::new(bad), &report(1), WriteOptions::FORCE).unwrap_err();
            assert!(matches!(e, FolderError::Refused { .. }), "{bad}: {e}");
            assert!(e.to_string().contains("what to do"));
        }
        // `dir/.` is `dir`.
        let root = tempfile::tempdir().unwrap();
        write_folder(&root.path().join("out/."), &report(1), WriteOptions::KEEP).unwrap();
        assert_eq!(names(root.path()), ["out"]);
    }

    /// Issue 20: when moving the old report aside fails, or moving the new
    /// one in, nothing of this run is left and the old report is whole.
    #[test]
    fn a_failed_rename_leaves_no_staging_folder() {
        let root = tempfile::tempdir().unwrap();
        let out = root.path().join("out");
        write_folder(&out, &report(1), WriteOptions::KEEP).unwrap();
        for fail_at in [1, 2] {
            let calls = Cell::new(0);
            let rename = |from: &Path, to: &Path| {
                calls.set(calls.get() + 1);
                if calls.get() == fail_at {
                    Err(io::Error::from_raw_os_error(16)) // busy, as a mount point
                } else {
                    std::fs::rename(from, to)
                }
            };
            let e = write_with(&out, &report(2), true, &|| false, &rename).unwrap_err();
            assert!(matches!(e, FolderError::Io { .. }), "{e}");
            let text = e.to_string();
            assert!(
                text.starts_with(&format!("{}: could not", out.display())),
                "{text}"
            );
            assert!(
                !text.contains(".patternproof-"),
                "names no temporary folder: {text}"
            );
            assert_eq!(version(&out), "{\"v\":1}");
            assert_eq!(names(root.path()), ["out"], "failing at rename {fail_at}");
        }
    }

    #[test]
    fn a_report_that_cannot_go_back_is_kept_and_named() {
        let root = tempfile::tempdir().unwrap();
        let out = root.path().join("out");
        write_folder(&out, &report(1), WriteOptions::KEEP).unwrap();
        let calls = Cell::new(0);
        let rename = |from: &Path, to: &Path| {
            calls.set(calls.get() + 1);
            if calls.get() >= 2 {
                Err(io::Error::from_raw_os_error(16))
            } else {
                std::fs::rename(from, to)
            }
        };
        let e = write_with(&out, &report(2), true, &|| false, &rename).unwrap_err();
        let FolderError::Stranded { kept, .. } = &e else {
            panic!("{e}")
        };
        assert_eq!(version(kept), "{\"v\":1}");
        assert!(e.to_string().contains(&kept.display().to_string()));
        // Only the folder holding the earlier report is left.
        let left = names(root.path());
        assert_eq!(left.len(), 1, "{left:?}");
        assert!(left[0].starts_with(".patternproof-old-"));
    }

    #[test]
    fn an_interrupt_between_files_changes_nothing() {
        let root = tempfile::tempdir().unwrap();
        let out = root.path().join("out");
        write_folder(&out, &report(1), WriteOptions::KEEP).unwrap();
        for after in 0..4 {
            let asked = Cell::new(0);
            let stop = || {
                asked.set(asked.get() + 1);
                asked.get() > after
            };
            let r = write_folder(
                &out,
                &report(2),
                WriteOptions {
                    force: true,
                    stop: &stop,
                },
            );
            assert!(matches!(r, Err(FolderError::Interrupted)), "after {after}");
            assert_eq!(version(&out), "{\"v\":1}");
            assert_eq!(names(root.path()), ["out"]);
        }
    }

    #[test]
    fn an_error_names_the_output_path_and_the_part() {
        let root = tempfile::tempdir().unwrap();
        let out = root.path().join("out");
        let mut site = OutputFolder::default();
        site.add(&format!("{}/x", "n".repeat(300)), b"x".to_vec());
        let mut f = OutputFolder::default();
        f.nest("site/a", site);
        f.describe("site/a", "the report of site `a`, from a.csv");
        let e = write_folder(&out, &f, WriteOptions::KEEP).unwrap_err();
        assert!(matches!(e, FolderError::Io { .. }), "{e:?}");
        let text = e.to_string();
        assert!(
            text.starts_with(&format!("{}/site/a/nnn", out.display())),
            "{text}"
        );
        assert!(
            text.contains("(the report of site `a`, from a.csv)"),
            "{text}"
        );
        assert!(text.contains("name is too long"), "{text}");
        assert!(!root.path().join("out").exists());
        assert!(names(root.path()).is_empty());
    }

    #[test]
    fn bad_names_are_a_bug_not_a_write() {
        for bad in ["", "../x", "a//b", ".patternproof", "a\nb"] {
            let mut f = OutputFolder::default();
            f.add(bad, Vec::new());
            let root = tempfile::tempdir().unwrap();
            let r = write_folder(&root.path().join("out"), &f, WriteOptions::KEEP);
            assert!(matches!(r, Err(FolderError::BadName(_))), "{bad:?}");
        }
    }

    /// `--out a/../b` with no folder `a` is refused before anything is
    /// made: no folder `a` appears. Through a folder that exists the path
    /// is fine.
    #[test]
    fn out_may_not_go_down_and_back_up() {
        let root = tempfile::tempdir().unwrap();
        let target = root.path().join("a/../b");
        let mut f = OutputFolder::default();
        f.add("report.json", b"{}".to_vec());
        let e = write_folder(&target, &f, WriteOptions::KEEP).unwrap_err();
        assert!(matches!(e, FolderError::Refused { .. }), "{e:?}");
        assert!(e.to_string().contains("and back up with `..`"), "{e}");
        assert!(!root.path().join("a").exists());
        assert!(!root.path().join("b").exists());
        let climbing = root.path().join("inner");
        std::fs::create_dir(&climbing).unwrap();
        write_folder(&climbing.join("../c"), &f, WriteOptions::KEEP).unwrap();
        assert!(root.path().join("c/report.json").is_file());
    }
}
