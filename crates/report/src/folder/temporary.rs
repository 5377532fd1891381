//! The temporary folders beside `--out`: the staging folder the new report
//! is written into, and the folder the previous report waits in while the
//! new one is renamed into place.
//!
//! Both carry a name no user picks (`.patternproof-stage-PID-…`,
//! `.patternproof-old-PID-…`) and, inside, the marker [`MARKER`] naming
//! their role, the `--out` folder they belong to, and the process and host
//! that made them. A later run removes or repairs only folders that carry
//! such a marker and whose owner is no longer running on this host, so a
//! second run writing beside the same `--out` at the same time is never
//! disturbed, and a user's folder never touched.
//!
//! A temporary folder is removed with its marker last, so that a removal
//! cut short (by a kill or a power cut) still leaves a folder the next run
//! recognises.

use std::ffi::OsStr;
use std::io;
use std::path::{Path, PathBuf};

/// The marker inside every temporary folder.
pub const MARKER: &str = ".patternproof-temporary";

/// The marker while it is being written.
pub const MARKER_PART: &str = ".patternproof-temporary.part";
/// Name prefix of staging folders.
pub const STAGE_PREFIX: &str = ".patternproof-stage-";
/// Name prefix of the folders holding a previous report.
pub const OLD_PREFIX: &str = ".patternproof-old-";
/// First line of [`MARKER`].
pub(super) const HEADER: &str = "patternproof temporary folder";

/// What a temporary folder is for.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Role {
    /// The new report, being written.
    Staging,
    /// The previous report, in `previous/`, while the new one moves in.
    Old,
}

impl Role {
    fn word(self) -> &'static str {
        match self {
            Role::Staging => "staging",
            Role::Old => "old",
        }
    }
    fn prefix(self) -> &'static str {
        match self {
            Role::Staging => STAGE_PREFIX,
            Role::Old => OLD_PREFIX,
        }
    }
}

/// The process that made a temporary folder.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Owner {
    /// Its process id.
    pub pid: u32,
    /// The host it ran on.
    pub host: String,
}

impl Owner {
    /// This process.
    pub fn me() -> Self {
        Self {
            pid: std::process::id(),
            host: host_name(),
        }
    }

    /// Whether the owner may still be running. Unknown counts as alive:
    /// another host's process cannot be looked up from here.
    pub fn alive(&self) -> bool {
        if self.host != host_name() || self.pid == std::process::id() {
            return true;
        }
        pid_alive(self.pid)
    }
}

/// What a marker says.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct MarkerInfo {
    /// Staging or old.
    pub role: Role,
    /// File name of the `--out` folder, as bytes written by [`encode`].
    pub target: PathBuf,
    /// Who made the folder.
    pub owner: Owner,
}

/// A temporary folder that removes itself (marker last) when dropped,
/// unless [`TempFolder::keep`] is called: every early return cleans up.
#[derive(Debug)]
pub struct TempFolder {
    path: PathBuf,
    armed: bool,
}

impl TempFolder {
    /// Make a folder of `role` in `parent` for the `--out` folder named
    /// `target`, owned by `owner`.
    pub fn create(parent: &Path, role: Role, target: &OsStr, owner: &Owner) -> io::Result<Self> {
        let dir = tempfile::Builder::new()
            .prefix(&format!("{}{}-", role.prefix(), owner.pid))
            .tempdir_in(parent)?
            .keep();
        let folder = Self {
            path: dir,
            armed: true,
        };
        let text = format!(
            "{HEADER}\nrole: {}\ntarget: {}\npid: {}\nhost: {}\n",
            role.word(),
            encode(target),
            owner.pid,
            owner.host
        );
        // Written beside its final name and renamed, so a run killed while
        // writing leaves no marker at all rather than a cut one (whose
        // cut host name would make a dead run look like another host's).
        let part = folder.path.join(MARKER_PART);
        std::fs::write(&part, text)?;
        std::fs::rename(&part, folder.path.join(MARKER))?;
        Ok(folder)
    }

    /// Where it is.
    pub fn path(&self) -> &Path {
        &self.path
    }

    /// Leave the folder on disk (it was renamed away, or must be kept).
    pub fn keep(mut self) -> PathBuf {
        self.armed = false;
        std::mem::take(&mut self.path)
    }
}

impl Drop for TempFolder {
    fn drop(&mut self) {
        if self.armed {
            let _ = remove_marker_last(&self.path);
        }
    }
}

/// Remove a temporary folder: everything but its marker, then the marker,
/// then the folder.
pub fn remove_marker_last(dir: &Path) -> io::Result<()> {
    for e in std::fs::read_dir(dir)? {
        let e = e?;
        if e.file_name() == MARKER {
            continue;
        }
        if e.file_type()?.is_dir() {
            std::fs::remove_dir_all(e.path())?;
        } else {
            std::fs::remove_file(e.path())?;
        }
    }
    match std::fs::remove_file(dir.join(MARKER)) {
        Err(e) if e.kind() != io::ErrorKind::NotFound => return Err(e),
        _ => {}
    }
    std::fs::remove_dir(dir)
}

/// The marker of `dir`, if it carries a well-formed one.
pub fn read_marker(dir: &Path) -> Option<MarkerInfo> {
    let text = std::fs::read_to_string(dir.join(MARKER)).ok()?;
    if !text.ends_with('\n') {
        return None;
    }
    let mut lines = text.lines();
    if lines.next()? != HEADER {
        return None;
    }
    let mut field = |key: &str| {
        lines
            .next()
            .and_then(|l| l.strip_prefix(key))
            .and_then(|l| l.strip_prefix(": "))
            .map(str::to_string)
    };
    let role = match field("role")?.as_str() {
        "staging" => Role::Staging,
        "old" => Role::Old,
        _ => return None,
    };
    let target = decode(&field("target")?)?;
    let pid = field("pid")?.parse().ok()?;
    let host = field("host")?;
    Some(MarkerInfo {
        role,
        target,
        owner: Owner { pid, host },
    })
}

/// The process id in a temporary folder's name, for a folder whose marker
/// was never written (the run stopped right after making it).
pub fn pid_in_name(name: &str) -> Option<u32> {
    let rest = name
        .strip_prefix(STAGE_PREFIX)
        .or_else(|| name.strip_prefix(OLD_PREFIX))?;
    rest.split('-').next()?.parse().ok()
}

/// A file name as one line of ASCII: bytes outside `!`..`~` and `%`
/// itself become `%XX`, so any name (even one that is not UTF-8) comes
/// back exactly.
fn encode(name: &OsStr) -> String {
    let mut s = String::new();
    for &b in name.as_encoded_bytes() {
        if b.is_ascii_graphic() && b != b'%' {
            s.push(b as char);
        } else {
            s.push_str(&format!("%{b:02X}"));
        }
    }
    s
}

fn decode(s: &str) -> Option<PathBuf> {
    let mut bytes = Vec::with_capacity(s.len());
    let raw = s.as_bytes();
    let mut i = 0;
    while i < raw.len() {
        if raw[i] == b'%' {
            let hex = std::str::from_utf8(raw.get(i + 1..i + 3)?).ok()?;
            bytes.push(u8::from_str_radix(hex, 16).ok()?);
            i += 3;
        } else {
            bytes.push(raw[i]);
            i += 1;
        }
    }
    let name = bytes_to_name(bytes)?;
    // One plain name, never a path.
    let mut parts = Path::new(&name).components();
    match (parts.next(), parts.next()) {
        (Some(std::path::Component::Normal(_)), None) => Some(PathBuf::from(name)),
        _ => None,
    }
}

#[cfg(unix)]
fn bytes_to_name(bytes: Vec<u8>) -> Option<std::ffi::OsString> {
    use std::os::unix::ffi::OsStringExt;
    Some(std::ffi::OsString::from_vec(bytes))
}

#[cfg(not(unix))]
fn bytes_to_name(bytes: Vec<u8>) -> Option<std::ffi::OsString> {
    String::from_utf8(bytes).ok().map(Into::into)
}

#[cfg(unix)]
fn host_name() -> String {
    nix::unistd::gethostname()
        .map(|h| h.to_string_lossy().replace('\n', " "))
        .unwrap_or_else(|_| "unknown".into())
}

#[cfg(not(unix))]
fn host_name() -> String {
    std::env::var("COMPUTERNAME").unwrap_or_else(|_| "unknown".into())
}

/// Signal 0 tests for a process without touching it; "no such process" is
/// the only answer that counts as gone.
#[cfg(unix)]
fn pid_alive(pid: u32) -> bool {
    use nix::errno::Errno;
    use nix::sys::signal::kill;
    use nix::unistd::Pid;
    let Ok(raw) = i32::try_from(pid) else {
        return true;
    };
    if raw <= 0 {
        return true;
    }
    !matches!(kill(Pid::from_raw(raw), None), Err(Errno::ESRCH))
}

/// Without a way to look a process up, every owner counts as alive and
/// leftovers stay for the user to remove.
#[cfg(not(unix))]
fn pid_alive(_pid: u32) -> bool {
    true
}

#[cfg(all(test, unix))]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
pub mod tests {
    use super::*;

    /// An owner on this host whose process has ended.
    pub fn dead_owner() -> Owner {
        let mut child = std::process::Command::new("true").spawn().unwrap();
        let pid = child.id();
        child.wait().unwrap();
        Owner {
            pid,
            host: host_name(),
        }
    }

    #[test]
    fn the_marker_names_role_target_and_owner() {
        let dir = tempfile::tempdir().unwrap();
        let me = Owner::me();
        let t = TempFolder::create(dir.path(), Role::Old, OsStr::new("out 1%"), &me).unwrap();
        let name = t.path().file_name().unwrap().to_str().unwrap().to_string();
        assert!(name.starts_with(&format!(".patternproof-old-{}-", me.pid)));
        assert_eq!(pid_in_name(&name), Some(me.pid));
        let info = read_marker(t.path()).unwrap();
        assert_eq!(info.role, Role::Old);
        assert_eq!(info.target, PathBuf::from("out 1%"));
        assert_eq!(info.owner, me);
        assert!(me.alive());
        assert!(!dead_owner().alive());
        std::fs::create_dir_all(t.path().join("previous/site")).unwrap();
        std::fs::write(t.path().join("previous/site/a"), "x").unwrap();
        let path = t.path().to_path_buf();
        drop(t);
        assert!(!path.exists(), "dropped folders are removed");
    }

    #[test]
    fn a_marker_never_names_a_path() {
        assert_eq!(decode("a%2Fb"), None);
        assert_eq!(decode(".."), None);
        assert_eq!(decode("report%20x"), Some(PathBuf::from("report x")));
    }
}
