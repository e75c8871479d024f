//! Writing rendered output to files atomically: a temporary file in the same
//! folder, flushed and then renamed over the target, so a failure never leaves
//! a half-written table, plot or record behind.

use std::io::Write;
use std::path::Path;

use super::error::RenderError;

/// Write `bytes` to `path` atomically (temporary file in the same folder, then rename).
///
/// On any error the target is untouched and the temporary file is removed.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> Result<(), RenderError> {
    let fail = |source: std::io::Error| RenderError::Write {
        path: path.to_path_buf(),
        source,
    };
    if path.file_name().is_none() || path.is_dir() {
        return Err(fail(std::io::Error::new(
            std::io::ErrorKind::InvalidInput,
            "the path names a folder, not a file",
        )));
    }
    let dir = match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p,
        _ => Path::new("."),
    };
    if !dir.is_dir() {
        let missing = format!("the folder {} does not exist", dir.display());
        return Err(fail(std::io::Error::new(
            std::io::ErrorKind::NotFound,
            missing,
        )));
    }
    // tempfile names its random file in errors; report only what went wrong.
    let plain = |e: std::io::Error| fail(std::io::Error::from(e.kind()));
    let mut tmp = tempfile::Builder::new()
        .prefix(".siccant-")
        .suffix(".tmp")
        .tempfile_in(dir)
        .map_err(plain)?;
    tmp.write_all(bytes).map_err(fail)?;
    tmp.as_file().sync_all().map_err(fail)?;
    tmp.persist(path).map_err(|e| plain(e.error))?;
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn writes_and_replaces() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("out.txt");
        write_atomic(&path, b"one").unwrap();
        write_atomic(&path, b"two").unwrap();
        assert_eq!(std::fs::read(&path).unwrap(), b"two");
        assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 1);
    }

    #[test]
    fn missing_folder_is_an_error_and_leaves_nothing() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("no/such/folder/out.txt");
        let err = write_atomic(&path, b"x").unwrap_err();
        assert!(err.to_string().starts_with("cannot write"), "{err}");
        assert!(!path.exists());
        assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 0);
    }

    #[test]
    fn folder_as_target_is_an_error() {
        let dir = tempfile::tempdir().unwrap();
        assert!(write_atomic(dir.path(), b"x").is_err());
    }
}
