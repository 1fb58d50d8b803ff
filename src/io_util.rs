//! Output files that appear only when complete.
//!
//! Every file the program writes is first written to a temporary name in the
//! same folder (`.NAME.partial-PID`) and renamed onto its final name only after
//! the last byte is flushed and synced. A failed or interrupted run leaves no
//! file under the final name that looks finished. Writing onto a path that the
//! caller declares as an input is refused.

use crate::error::{Error, Result};
use std::fs::{self, File};
use std::io::{BufWriter, Write};
use std::path::{Path, PathBuf};

/// A file being written under a temporary name; [`AtomicFile::commit`] moves it
/// into place. Dropping it without committing removes the temporary file.
pub struct AtomicFile {
    final_path: PathBuf,
    tmp_path: PathBuf,
    writer: Option<BufWriter<File>>,
}

impl AtomicFile {
    /// Start writing `path`. Parent folders are created.
    pub fn create(path: impl AsRef<Path>) -> Result<Self> {
        let final_path = path.as_ref().to_path_buf();
        let parent = match final_path.parent() {
            Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
            _ => PathBuf::from("."),
        };
        fs::create_dir_all(&parent).map_err(|e| Error::io(&parent, e))?;
        let name = final_path
            .file_name()
            .ok_or_else(|| {
                Error::inconsistent(format!(
                    "output path {} has no file name",
                    final_path.display()
                ))
            })?
            .to_string_lossy()
            .into_owned();
        let tmp_path = parent.join(format!(".{name}.partial-{}", std::process::id()));
        let file = File::create(&tmp_path).map_err(|e| Error::io(&tmp_path, e))?;
        Ok(AtomicFile {
            final_path,
            tmp_path,
            writer: Some(BufWriter::with_capacity(1 << 16, file)),
        })
    }

    /// The buffered writer of the temporary file.
    pub fn writer(&mut self) -> &mut BufWriter<File> {
        // The writer is only taken by `commit`, which consumes self.
        self.writer
            .as_mut()
            .unwrap_or_else(|| unreachable!("writer taken before commit"))
    }

    /// Write all of `bytes`, naming the final path in any error.
    pub fn write_all(&mut self, bytes: &[u8]) -> Result<()> {
        let path = self.final_path.clone();
        self.writer()
            .write_all(bytes)
            .map_err(|e| Error::io(&path, e))
    }

    /// The path the file will have once committed.
    pub fn final_path(&self) -> &Path {
        &self.final_path
    }

    /// Flush, sync and rename onto the final name.
    pub fn commit(mut self) -> Result<()> {
        let w = self
            .writer
            .take()
            .unwrap_or_else(|| unreachable!("writer taken twice"));
        let file = w
            .into_inner()
            .map_err(|e| Error::io(&self.tmp_path, e.into_error()))?;
        file.sync_all().map_err(|e| Error::io(&self.tmp_path, e))?;
        drop(file);
        fs::rename(&self.tmp_path, &self.final_path).map_err(|e| Error::io(&self.final_path, e))
    }
}

impl Drop for AtomicFile {
    fn drop(&mut self) {
        if self.writer.is_some() {
            self.writer = None;
            let _ = fs::remove_file(&self.tmp_path);
        }
    }
}

/// Write `bytes` to `path` atomically.
pub fn write_atomic(path: impl AsRef<Path>, bytes: &[u8]) -> Result<()> {
    let mut f = AtomicFile::create(path)?;
    f.write_all(bytes)?;
    f.commit()
}

/// Refuse to write `output` when it is the same file as any of `inputs`.
pub fn refuse_overwrite_input(output: &Path, inputs: &[PathBuf]) -> Result<()> {
    let out = fs::canonicalize(output).ok();
    for inp in inputs {
        let same = match (&out, fs::canonicalize(inp).ok()) {
            (Some(a), Some(b)) => *a == b,
            _ => false,
        };
        if same {
            return Err(Error::inconsistent(format!(
                "refusing to write {}: it is an input of this project",
                output.display()
            )));
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn uncommitted_file_leaves_nothing() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("a.bin");
        {
            let mut f = AtomicFile::create(&p).unwrap();
            f.write_all(b"half").unwrap();
        }
        assert!(!p.exists());
        assert_eq!(fs::read_dir(dir.path()).unwrap().count(), 0);
        write_atomic(&p, b"whole").unwrap();
        assert_eq!(fs::read(&p).unwrap(), b"whole");
    }
}
