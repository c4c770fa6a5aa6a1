//! Writing a recipe file so that it is never left half written: the new text
//! goes to a file beside it, which is then renamed over it (a rename within a
//! folder is atomic). A link is followed, so the file it points to is the one
//! replaced and the link stays.

use std::path::{Path, PathBuf};

/// What the file must hold just before it is replaced.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Expect<'a> {
    /// Anything (or nothing): the caller owns the file.
    Anything,
    /// Nothing: the file must not exist yet.
    Absent,
    /// This text, as read earlier; if another program changed it meanwhile, nothing is written.
    Text(&'a str),
}

/// Why a file was not written; it is as it was.
#[derive(Debug, thiserror::Error)]
#[error("{}: {reason}; the file is unchanged", path.display())]
pub struct SaveError {
    /// The file.
    pub path: PathBuf,
    /// What went wrong.
    pub reason: String,
}

/// Writes `text` to `path` through a file beside it, after checking `expect`.
pub fn save_text(path: &Path, expect: Expect<'_>, text: &str) -> Result<(), SaveError> {
    let fail = |reason: String| SaveError {
        path: path.to_path_buf(),
        reason,
    };
    let target = match std::fs::canonicalize(path) {
        Ok(real) => real,
        Err(_) => path.to_path_buf(),
    };
    let current = match std::fs::read_to_string(&target) {
        Ok(t) => Some(t),
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => None,
        Err(_) if expect == Expect::Anything => None,
        Err(e) => return Err(fail(format!("it cannot be read ({e})"))),
    };
    match (expect, &current) {
        (Expect::Absent, Some(_)) => return Err(fail("it appeared meanwhile".into())),
        (Expect::Text(_), None) => return Err(fail("it disappeared meanwhile".into())),
        (Expect::Text(was), Some(now)) if was != now => {
            return Err(fail("another program changed it meanwhile".into()));
        }
        _ => {}
    }
    let mut tmp = target.clone().into_os_string();
    tmp.push(".saving");
    let tmp = PathBuf::from(tmp);
    std::fs::write(&tmp, text)
        .map_err(|e| fail(format!("{} cannot be written ({e})", tmp.display())))?;
    if let Ok(meta) = std::fs::metadata(&target) {
        let _ = std::fs::set_permissions(&tmp, meta.permissions());
    }
    std::fs::rename(&tmp, &target).map_err(|e| {
        let _ = std::fs::remove_file(&tmp);
        fail(format!("it cannot be replaced ({e})"))
    })
}
