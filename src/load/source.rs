//! Where the data came from, for the About sheet: the file's name, size and
//! SHA-256, taken while the file is read, so it is never held whole in memory.

use std::io::Read;
use std::path::Path;

use sha2::{Digest, Sha256};

/// What the About sheet says about the input file.
#[derive(Debug, Clone)]
pub struct SourceInfo {
    /// The path as given.
    pub path: String,
    /// The file's name without its folder.
    pub file_name: String,
    /// Bytes.
    pub size: u64,
    /// The SHA-256 of the file's bytes, in hexadecimal.
    pub sha256: String,
}

impl SourceInfo {
    /// Reads the file once to describe it.
    pub fn of_file(path: &Path) -> std::io::Result<SourceInfo> {
        let mut hashing = Hashing::new(std::fs::File::open(path)?);
        std::io::copy(&mut hashing, &mut std::io::sink())?;
        Ok(hashing.finish(path))
    }
}

/// A reader that hashes and counts the bytes passing through it.
pub struct Hashing<R> {
    inner: R,
    hasher: Sha256,
    size: u64,
}

impl<R: Read> Hashing<R> {
    pub fn new(inner: R) -> Self {
        Hashing {
            inner,
            hasher: Sha256::new(),
            size: 0,
        }
    }

    /// The description of everything read so far.
    pub fn finish(self, path: &Path) -> SourceInfo {
        SourceInfo {
            path: path.display().to_string(),
            file_name: path
                .file_name()
                .map(|n| n.to_string_lossy().into_owned())
                .unwrap_or_default(),
            size: self.size,
            sha256: self
                .hasher
                .finalize()
                .iter()
                .map(|b| format!("{b:02x}"))
                .collect(),
        }
    }
}

impl<R: Read> Read for Hashing<R> {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        let n = self.inner.read(buf)?;
        self.hasher.update(&buf[..n]);
        self.size += n as u64;
        Ok(n)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn hash_of_the_empty_input() {
        // The SHA-256 of no bytes (typed from memory; `sha256sum < /dev/null` prints it).
        let s = Hashing::new(&b""[..]).finish(Path::new("a/b.csv"));
        assert_eq!(
            s.sha256,
            "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855"
        );
        assert_eq!((s.size, s.file_name.as_str()), (0, "b.csv"));
    }
}
