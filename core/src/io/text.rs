//! Whole-file text reads with a size cap checked before reading, so a wrong path to a huge file
//! is refused with the number that was too large instead of exhausting memory.

use crate::error::{Error, Result};
use std::path::Path;

/// Read `path` as UTF-8 text if it holds at most `limit` bytes. Errors: [`Error::Io`] naming the
/// path (missing, unreadable, not UTF-8) or [`Error::TooLarge`] (`what` names the file).
pub fn read_text_capped(path: &Path, limit: usize) -> Result<String> {
    let name = path.display().to_string();
    let io = |e: std::io::Error| Error::Io { path: name.clone(), reason: e.to_string() };
    let len = std::fs::metadata(path).map_err(io)?.len();
    if len > limit as u64 {
        return Err(Error::TooLarge {
            what: format!("size of {name} (bytes)"),
            value: usize::try_from(len).unwrap_or(usize::MAX),
            limit,
        });
    }
    std::fs::read_to_string(path).map_err(io)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn refuses_a_file_over_the_cap_and_names_missing_files() {
        let dir = std::env::temp_dir().join(format!("stillsky-text-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let p = dir.join("a.txt");
        std::fs::write(&p, "0123456789").unwrap();
        assert_eq!(read_text_capped(&p, 10).unwrap(), "0123456789");
        let e = read_text_capped(&p, 9).unwrap_err();
        assert!(matches!(e, Error::TooLarge { value: 10, limit: 9, .. }), "{e:?}");
        let missing = dir.join("none.txt");
        let e = read_text_capped(&missing, 9).unwrap_err();
        assert!(matches!(&e, Error::Io { path, .. } if path.ends_with("none.txt")), "{e:?}");
        std::fs::remove_dir_all(&dir).unwrap();
    }
}
