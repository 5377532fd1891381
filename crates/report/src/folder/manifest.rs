//! The marker file of an output folder, and the check that a folder holds
//! nothing but what it lists.
//!
//! The marker `.patternproof` lists every file the tool wrote, one path
//! (relative, `/`-separated) per line, sorted, so it is the same bytes for
//! the same report. `--force` replaces a folder only while it holds
//! nothing but those files: a user's file saved into an old report folder
//! makes the folder theirs again, and it is left alone.

use super::temporary;
use std::collections::BTreeSet;
use std::io;
use std::path::Path;

/// First line of the marker; a file that does not start with it is not
/// this tool's list.
pub const HEADER: &str = "patternproof output folder";

/// How many foreign entries a refusal names.
const SHOWN: usize = 5;

/// The marker's text for these file names.
pub fn render<'a>(names: impl Iterator<Item = &'a str>) -> Vec<u8> {
    let sorted: BTreeSet<&str> = names.collect();
    let mut s = format!(
        "{HEADER}\n# every file patternproof wrote here, one per line; --force replaces this folder only while it holds nothing else\n"
    );
    for n in sorted {
        s.push_str(n);
        s.push('\n');
    }
    s.into_bytes()
}

/// The files a marker lists, or `None` when it is not this tool's list
/// (absent, unreadable, or written by a version before the list).
pub fn read(marker: &Path) -> Option<BTreeSet<String>> {
    let text = std::fs::read_to_string(marker).ok()?;
    let mut lines = text.lines();
    if lines.next()? != HEADER {
        return None;
    }
    Some(
        lines
            .filter(|l| !l.is_empty() && !l.starts_with('#'))
            .map(str::to_string)
            .collect(),
    )
}

/// What an existing folder holds, as far as replacing it goes.
#[derive(Debug, PartialEq, Eq)]
pub enum Contents {
    /// Nothing at all.
    Empty,
    /// A list and nothing but the files it names (some may be gone).
    OnlyListed,
    /// A list and other entries besides: the first few, and how many.
    Foreign(Vec<String>, usize),
    /// A report of a version before the list (its marker, or only
    /// `report.json`): what else is in it cannot be told.
    Unlisted,
    /// No marker at all.
    NoMarker,
}

/// Inspect `dir` (which exists and is a folder). Symbolic links count as
/// foreign entries and are never followed.
pub fn inspect(dir: &Path) -> io::Result<Contents> {
    let mut entries = std::fs::read_dir(dir)?;
    if entries.next().is_none() {
        return Ok(Contents::Empty);
    }
    let marker = dir.join(super::MARKER);
    let Some(listed) = read(&marker) else {
        let legacy = marker.is_file() || dir.join("report.json").is_file();
        return Ok(if legacy {
            Contents::Unlisted
        } else {
            Contents::NoMarker
        });
    };
    let mut folders: BTreeSet<String> = BTreeSet::new();
    for name in &listed {
        let mut prefix = name.as_str();
        while let Some((head, _)) = prefix.rsplit_once('/') {
            folders.insert(head.to_string());
            prefix = head;
        }
    }
    let mut foreign = Vec::new();
    let mut count = 0;
    walk(dir, "", &mut |rel, kind| {
        let ok = match kind {
            Kind::Folder => folders.contains(rel),
            Kind::File => {
                listed.contains(rel)
                    || rel == super::MARKER
                    // Left by a run stopped between moving the report into
                    // place and deleting its temporary marker.
                    || (rel == temporary::MARKER && temporary::read_marker(dir).is_some())
            }
            Kind::Other => false,
        };
        if !ok {
            count += 1;
            if foreign.len() < SHOWN {
                foreign.push(rel.to_string());
            }
        }
        // Look inside only the folders the list accounts for.
        ok && kind == Kind::Folder
    })?;
    Ok(if count == 0 {
        Contents::OnlyListed
    } else {
        Contents::Foreign(foreign, count)
    })
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Kind {
    Folder,
    File,
    Other,
}

/// Visit every entry under `dir`; `visit` returns whether to descend.
fn walk(dir: &Path, rel: &str, visit: &mut dyn FnMut(&str, Kind) -> bool) -> io::Result<()> {
    let mut entries: Vec<_> = std::fs::read_dir(dir)?.collect::<Result<_, _>>()?;
    entries.sort_by_key(|e| e.file_name());
    for e in entries {
        let name = e.file_name();
        // A name that is not UTF-8 was never written by this tool.
        let shown = name.to_string_lossy();
        let path = if rel.is_empty() {
            shown.to_string()
        } else {
            format!("{rel}/{shown}")
        };
        let t = e.file_type()?;
        let kind = if name.to_str().is_none() {
            Kind::Other
        } else if t.is_dir() {
            Kind::Folder
        } else if t.is_file() {
            Kind::File
        } else {
            Kind::Other
        };
        if visit(&path, kind) {
            walk(&e.path(), &path, visit)?;
        }
    }
    Ok(())
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::*;

    #[test]
    fn the_list_is_sorted_and_read_back() {
        let text = render(["b.md", "a/x.json", "report.json"].into_iter());
        let text = String::from_utf8(text).unwrap();
        assert!(text.starts_with("patternproof output folder\n# "));
        assert!(text.ends_with("\na/x.json\nb.md\nreport.json\n"));
        let dir = tempfile::tempdir().unwrap();
        std::fs::write(dir.path().join("m"), &text).unwrap();
        let listed = read(&dir.path().join("m")).unwrap();
        assert_eq!(
            listed.into_iter().collect::<Vec<_>>(),
            ["a/x.json", "b.md", "report.json"]
        );
    }

    #[test]
    fn a_folder_is_only_listed_while_it_holds_nothing_else() {
        let dir = tempfile::tempdir().unwrap();
        let d = dir.path();
        assert_eq!(inspect(d).unwrap(), Contents::Empty);
        std::fs::write(d.join("report.json"), "{}").unwrap();
        assert_eq!(inspect(d).unwrap(), Contents::Unlisted);
        std::fs::create_dir_all(d.join("site/a")).unwrap();
        std::fs::write(d.join("site/a/report.json"), "{}").unwrap();
        std::fs::write(
            d.join(super::super::MARKER),
            render(["report.json", "site/a/report.json", "verdict.md"].into_iter()),
        )
        .unwrap();
        // A listed file that is gone is fine.
        assert_eq!(inspect(d).unwrap(), Contents::OnlyListed);
        std::fs::write(d.join("site/a/notes.txt"), "mine").unwrap();
        std::fs::create_dir(d.join("drafts")).unwrap();
        std::fs::write(d.join("drafts/ch1.tex"), "mine").unwrap();
        assert_eq!(
            inspect(d).unwrap(),
            Contents::Foreign(vec!["drafts".into(), "site/a/notes.txt".into()], 2)
        );
    }

    #[test]
    fn a_folder_without_the_list_is_not_ours() {
        let dir = tempfile::tempdir().unwrap();
        std::fs::write(dir.path().join("thesis.tex"), "x").unwrap();
        assert_eq!(inspect(dir.path()).unwrap(), Contents::NoMarker);
        std::fs::write(
            dir.path().join(super::super::MARKER),
            "written by patternproof; the folder may be replaced with --force\n",
        )
        .unwrap();
        assert_eq!(inspect(dir.path()).unwrap(), Contents::Unlisted);
    }
}
