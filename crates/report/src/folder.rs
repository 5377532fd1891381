//! The output folder appears whole or not at all.
//!
//! Files are written into a fresh temporary folder beside the target and
//! renamed into place in one step. An existing target is replaced only
//! with `--force` and only if it is an earlier patternproof folder (it holds
//! the marker file [`MARKER`], or `report.json` from before the marker);
//! an empty folder is filled; anything else is refused, so a typo in
//! `--out` cannot delete a user's folder.

use std::io;
use std::path::{Path, PathBuf};

/// Marker file written into every output folder, so that a later run can
/// tell its own folders from a user's.
pub const MARKER: &str = ".patternproof";

/// Files to write: name and content.
#[derive(Debug, Default)]
pub struct OutputFolder {
    files: Vec<(String, Vec<u8>)>,
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
    }

    /// Names added so far.
    pub fn names(&self) -> impl Iterator<Item = &str> {
        self.files.iter().map(|(n, _)| n.as_str())
    }
}

/// Why the folder could not be written.
#[derive(Debug)]
pub enum FolderError {
    /// The target exists and is not an earlier report.
    NotAReportFolder(PathBuf),
    /// The target is an earlier report and `--force` was not given.
    Exists(PathBuf),
    /// A file-system error, with the path involved.
    Io(PathBuf, io::Error),
}

impl std::fmt::Display for FolderError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            FolderError::NotAReportFolder(p) => write!(
                f,
                "{}: the folder exists and does not hold an earlier report (no report.json)\n  what to do: choose a new --out folder, or empty this one",
                p.display()
            ),
            FolderError::Exists(p) => write!(
                f,
                "{}: the folder already holds a report\n  what to do: pass --force to replace it, or choose a new --out folder",
                p.display()
            ),
            FolderError::Io(p, e) => write!(
                f,
                "{}: {e}\n  what to do: check that the folder is writable and the disk not full",
                p.display()
            ),
        }
    }
}

/// Write every file into `target` atomically; an existing report folder
/// is left alone (see [`write_folder_with`]).
pub fn write_folder(target: &Path, folder: &OutputFolder) -> Result<(), FolderError> {
    write_folder_with(target, folder, false)
}

/// Write every file into `target` atomically; with `force`, an earlier
/// report folder there is replaced.
pub fn write_folder_with(
    target: &Path,
    folder: &OutputFolder,
    force: bool,
) -> Result<(), FolderError> {
    let parent = match target.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => PathBuf::from("."),
    };
    std::fs::create_dir_all(&parent).map_err(|e| FolderError::Io(parent.clone(), e))?;
    if target.exists() {
        let is_dir = target.is_dir();
        let empty = is_dir
            && std::fs::read_dir(target)
                .map(|mut d| d.next().is_none())
                .unwrap_or(false);
        let ours = target.join(MARKER).is_file() || target.join("report.json").is_file();
        if !is_dir || !(empty || ours) {
            return Err(FolderError::NotAReportFolder(target.to_path_buf()));
        }
        if !empty && !force {
            return Err(FolderError::Exists(target.to_path_buf()));
        }
    }
    let staging = tempfile::Builder::new()
        .prefix(".patternproof-")
        .tempdir_in(&parent)
        .map_err(|e| FolderError::Io(parent.clone(), e))?;
    let marker = staging.path().join(MARKER);
    std::fs::write(
        &marker,
        b"written by patternproof; the folder may be replaced with --force\n",
    )
    .map_err(|e| FolderError::Io(marker.clone(), e))?;
    for (name, content) in &folder.files {
        let path = staging.path().join(name);
        if let Some(dir) = path.parent() {
            std::fs::create_dir_all(dir).map_err(|e| FolderError::Io(dir.to_path_buf(), e))?;
        }
        std::fs::write(&path, content).map_err(|e| FolderError::Io(path.clone(), e))?;
    }
    let staged = staging.keep();
    if target.exists() {
        let old = tempfile::Builder::new()
            .prefix(".patternproof-old-")
            .tempdir_in(&parent)
            .map_err(|e| FolderError::Io(parent.clone(), e))?;
        let old_path = old.path().join("previous");
        std::fs::rename(target, &old_path).map_err(|e| FolderError::Io(target.to_path_buf(), e))?;
        if let Err(e) = std::fs::rename(&staged, target) {
            let _ = std::fs::rename(&old_path, target);
            let _ = std::fs::remove_dir_all(&staged);
            return Err(FolderError::Io(target.to_path_buf(), e));
        }
        drop(old);
    } else if let Err(e) = std::fs::rename(&staged, target) {
        let _ = std::fs::remove_dir_all(&staged);
        return Err(FolderError::Io(target.to_path_buf(), e));
    }
    Ok(())
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::*;

    #[test]
    fn replaces_an_old_report_but_refuses_a_foreign_folder() {
        let root = tempfile::tempdir().unwrap();
        let target = root.path().join("out");
        let mut f = OutputFolder::default();
        f.add("report.json", b"{}".to_vec());
        write_folder(&target, &f).unwrap();
        let mut g = OutputFolder::default();
        g.add("report.json", b"{\"v\":2}".to_vec());
        assert!(matches!(
            write_folder(&target, &g),
            Err(FolderError::Exists(_))
        ));
        write_folder_with(&target, &g, true).unwrap();
        assert_eq!(
            std::fs::read(target.join("report.json")).unwrap(),
            b"{\"v\":2}"
        );
        let foreign = root.path().join("mine");
        std::fs::create_dir(&foreign).unwrap();
        std::fs::write(foreign.join("thesis.tex"), "x").unwrap();
        assert!(matches!(
            write_folder(&foreign, &g),
            Err(FolderError::NotAReportFolder(_))
        ));
        assert!(foreign.join("thesis.tex").exists());
        // No staging folders left behind.
        let leftovers: Vec<_> = std::fs::read_dir(root.path())
            .unwrap()
            .filter_map(|e| e.ok())
            .filter(|e| e.file_name().to_string_lossy().starts_with(".patternproof"))
            .collect();
        assert!(leftovers.is_empty());
    }
}
