//! Reading input files safely: only regular files (a FIFO would block the
//! run forever, /dev/zero would fill memory), at most a stated size, read
//! through a bounded reader so that a file growing while it is read cannot
//! exceed it either, and UTF-8 text.

use std::io::Read;
use std::path::Path;

/// The text of a regular file of at most `max_bytes`, or a message naming
/// `what` it was and why it cannot be read.
pub fn read_text(path: &Path, what: &str, max_bytes: u64) -> Result<String, String> {
    let bytes = read_bytes(path, what, max_bytes)?;
    String::from_utf8(bytes).map_err(|_| format!("{} is not UTF-8 text (is it a binary file?)", path.display()))
}

/// The bytes of a regular file of at most `max_bytes` (see `read_text`).
pub fn read_bytes(path: &Path, what: &str, max_bytes: u64) -> Result<Vec<u8>, String> {
    let shown = path.display();
    let meta = std::fs::metadata(path).map_err(|e| format!("cannot read the {what} {shown}: {e}"))?;
    if meta.is_dir() {
        return Err(format!("{shown} is a directory, not a {what}"));
    }
    if !meta.is_file() {
        return Err(format!(
            "{shown} is not a regular file (a pipe, a device or a socket); the {what} must be a plain text file"
        ));
    }
    if meta.len() > max_bytes {
        return Err(format!(
            "{shown} is {} bytes; a {what} is plain text of at most {}",
            meta.len(),
            size_text(max_bytes)
        ));
    }
    let file = std::fs::File::open(path).map_err(|e| format!("cannot read the {what} {shown}: {e}"))?;
    let mut bytes = Vec::new();
    file.take(max_bytes + 1)
        .read_to_end(&mut bytes)
        .map_err(|e| format!("cannot read the {what} {shown}: {e}"))?;
    if bytes.len() as u64 > max_bytes {
        return Err(format!("{shown} grew past {} while it was read", size_text(max_bytes)));
    }
    Ok(bytes)
}

fn size_text(bytes: u64) -> String {
    if bytes >= 1 << 20 {
        format!("{} MiB", bytes >> 20)
    } else {
        format!("{} KiB", bytes >> 10)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    #[cfg(unix)]
    fn special_files_are_refused_without_reading_them() {
        let e = read_text(Path::new("/dev/zero"), "case file", 1 << 20).unwrap_err();
        assert!(e.contains("not a regular file"), "{e}");
        let e = read_text(Path::new("/"), "case file", 1 << 20).unwrap_err();
        assert!(e.contains("directory"), "{e}");
    }

    #[test]
    fn size_and_encoding_are_checked() {
        let dir = std::env::temp_dir().join(format!("lodestone-input-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let big = dir.join("big.csv");
        std::fs::write(&big, vec![b'1'; 3000]).unwrap();
        assert!(read_text(&big, "B-H table", 2048).unwrap_err().contains("at most 2 KiB"));
        let bin = dir.join("bin.csv");
        std::fs::write(&bin, [0xff, 0xfe, 0x00]).unwrap();
        assert!(read_text(&bin, "B-H table", 2048).unwrap_err().contains("not UTF-8"));
        std::fs::write(&bin, "0, 0\n").unwrap();
        assert_eq!(read_text(&bin, "B-H table", 2048).unwrap(), "0, 0\n");
        let _ = std::fs::remove_dir_all(&dir);
    }
}
