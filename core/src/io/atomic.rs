//! Crash-safe output: whole-file atomic writes and a row-atomic CSV writer for batch runs.
//!
//! - [`write_atomic`]: write a temporary file in the target's directory, fsync it, rename it
//!   over the target, fsync the directory. Readers see the old file or the new one, never a mix.
//! - [`AtomicCsvWriter`]: rows go to `<name>.partial`; each row is encoded completely in memory
//!   and handed to the OS in one `write_all`, then flushed. An interrupted run leaves the rows
//!   written so far (at worst a torn last line if the machine itself dies mid-write, which
//!   [`completed_keys`] and [`AtomicCsvWriter::resume`] drop). [`AtomicCsvWriter::finish`] fsyncs
//!   and renames `<name>.partial` to `<name>`.
//! - [`completed_keys`]: the key column of the complete rows of an output, for `--resume`.

use std::collections::HashSet;
use std::fs::{self, File, OpenOptions};
use std::io::Write;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicU64, Ordering};

use crate::error::{Error, Result};

fn io_err(path: &Path, e: std::io::Error) -> Error {
    Error::Io { path: path.display().to_string(), reason: e.to_string() }
}

fn parent_dir(path: &Path) -> PathBuf {
    match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => PathBuf::from("."),
    }
}

fn sync_dir(dir: &Path) -> Result<()> {
    // Directory fsync makes the rename durable on POSIX; it is not available on Windows.
    #[cfg(unix)]
    File::open(dir).and_then(|d| d.sync_all()).map_err(|e| io_err(dir, e))?;
    #[cfg(not(unix))]
    let _ = dir;
    Ok(())
}

static TMP_COUNTER: AtomicU64 = AtomicU64::new(0);

/// Write `bytes` to `path` atomically (temporary file in the same directory, fsync, rename).
///
/// ```
/// # let dir = std::env::temp_dir().join(format!("stillsky-wa-{}", std::process::id()));
/// # std::fs::create_dir_all(&dir).unwrap();
/// let p = dir.join("report.json");
/// stillsky::io::atomic::write_atomic(&p, b"{}").unwrap();
/// assert_eq!(std::fs::read(&p).unwrap(), b"{}");
/// ```
pub fn write_atomic(path: impl AsRef<Path>, bytes: &[u8]) -> Result<()> {
    let path = path.as_ref();
    let name = path
        .file_name()
        .ok_or_else(|| Error::invalid("path", format!("{} has no file name", path.display())))?;
    let dir = parent_dir(path);
    let n = TMP_COUNTER.fetch_add(1, Ordering::Relaxed);
    let tmp = dir.join(format!(".{}.{}.{n}.tmp", name.to_string_lossy(), std::process::id()));
    let result = (|| {
        let mut f =
            OpenOptions::new().write(true).create_new(true).open(&tmp).map_err(|e| io_err(&tmp, e))?;
        f.write_all(bytes).map_err(|e| io_err(&tmp, e))?;
        f.sync_all().map_err(|e| io_err(&tmp, e))?;
        drop(f);
        fs::rename(&tmp, path).map_err(|e| io_err(path, e))?;
        sync_dir(&dir)
    })();
    if result.is_err() {
        let _ = fs::remove_file(&tmp);
    }
    result
}

/// The `<name>.partial` path a writer for `path` uses.
pub fn partial_path(path: impl AsRef<Path>) -> PathBuf {
    let p = path.as_ref();
    let mut s = p.as_os_str().to_os_string();
    s.push(".partial");
    PathBuf::from(s)
}

pub(crate) fn encode_row<S: AsRef<str>>(fields: &[S], what: &Path) -> Result<Vec<u8>> {
    for (i, f) in fields.iter().enumerate() {
        if f.as_ref().contains(['\n', '\r']) {
            return Err(Error::invalid(
                format!("field {} of a row for {}", i + 1, what.display()),
                "contains a line break (rows must be single lines)",
            ));
        }
    }
    let mut w = csv::WriterBuilder::new().terminator(csv::Terminator::Any(b'\n')).from_writer(Vec::new());
    w.write_record(fields.iter().map(AsRef::as_ref))
        .map_err(|e| Error::Io { path: what.display().to_string(), reason: e.to_string() })?;
    w.into_inner().map_err(|e| Error::Io { path: what.display().to_string(), reason: e.to_string() })
}

/// Length of the prefix of `bytes` made of complete lines (up to and including the last '\n').
fn complete_prefix(bytes: &[u8]) -> usize {
    bytes.iter().rposition(|&b| b == b'\n').map_or(0, |i| i + 1)
}

/// Parse complete rows (header first) of CSV bytes.
fn parse_rows(bytes: &[u8], file: &Path) -> Result<(Vec<String>, Vec<csv::StringRecord>)> {
    let mut rdr = csv::ReaderBuilder::new().has_headers(true).from_reader(bytes);
    let parse = |e: csv::Error| {
        let line = e.position().map_or(0, |p| p.line());
        Error::Parse {
            file: file.display().to_string(),
            location: format!("line {line}"),
            reason: e.to_string(),
        }
    };
    let header: Vec<String> = rdr.headers().map_err(parse)?.iter().map(str::to_string).collect();
    let rows = rdr.records().collect::<std::result::Result<Vec<_>, _>>().map_err(parse)?;
    Ok((header, rows))
}

/// The rows of a finished CSV table, each with its line number (from 2), after checking that
/// its header is `columns`; a different header is a parse error on line 1 whose reason is
/// `not_this` followed by the header found.
pub fn read_table(
    path: &Path,
    columns: &[impl AsRef<str>],
    not_this: &str,
) -> Result<Vec<(usize, csv::StringRecord)>> {
    let file = path.display().to_string();
    let bytes = fs::read(path).map_err(|e| io_err(path, e))?;
    let mut rdr = csv::ReaderBuilder::new().has_headers(true).from_reader(bytes.as_slice());
    let header: Vec<String> = rdr
        .headers()
        .map_err(|e| Error::Parse { file: file.clone(), location: "line 1".into(), reason: e.to_string() })?
        .iter()
        .map(str::to_string)
        .collect();
    if header.len() != columns.len() || header.iter().zip(columns).any(|(h, c)| h != c.as_ref()) {
        return Err(Error::Parse {
            file,
            location: "line 1".into(),
            reason: format!("{not_this}: header {header:?}"),
        });
    }
    rdr.records()
        .enumerate()
        .map(|(i, rec)| {
            rec.map(|r| (i + 2, r)).map_err(|e| Error::Parse {
                file: file.clone(),
                location: format!("line {}", i + 2),
                reason: e.to_string(),
            })
        })
        .collect()
}

/// A CSV writer that only ever leaves whole rows on disk (see the module docs).
///
/// ```
/// use stillsky::io::atomic::{AtomicCsvWriter, completed_keys};
/// # let dir = std::env::temp_dir().join(format!("stillsky-acw-{}", std::process::id()));
/// # std::fs::create_dir_all(&dir).unwrap();
/// let out = dir.join("sweep.csv");
/// let mut w = AtomicCsvWriter::create(&out, &["case", "rms_px"]).unwrap();
/// w.write_row(&["a", "0.31"]).unwrap();
/// drop(w); // interrupted: sweep.csv.partial holds the header and row "a"
/// let done = completed_keys(&out, "case").unwrap();
/// assert!(done.contains("a"));
/// let mut w = AtomicCsvWriter::resume(&out, &["case", "rms_px"]).unwrap();
/// w.write_row(&["b", "0.42"]).unwrap();
/// w.finish().unwrap();
/// assert_eq!(std::fs::read_to_string(&out).unwrap(), "case,rms_px\na,0.31\nb,0.42\n");
/// ```
#[derive(Debug)]
pub struct AtomicCsvWriter {
    file: File,
    partial: PathBuf,
    target: PathBuf,
    n_cols: usize,
    rows: usize,
}

impl AtomicCsvWriter {
    /// Start a new output for `path`: truncate `<path>.partial` and write the header row.
    pub fn create<S: AsRef<str>>(path: impl AsRef<Path>, header: &[S]) -> Result<Self> {
        let target = path.as_ref().to_path_buf();
        if header.is_empty() {
            return Err(Error::invalid("header", "needs at least one column"));
        }
        let partial = partial_path(&target);
        let row = encode_row(header, &target)?;
        let mut file = File::create(&partial).map_err(|e| io_err(&partial, e))?;
        file.write_all(&row).and_then(|_| file.flush()).map_err(|e| io_err(&partial, e))?;
        Ok(AtomicCsvWriter { file, partial, target, n_cols: header.len(), rows: 0 })
    }

    /// Continue an interrupted output: open `<path>.partial`, drop a trailing incomplete line,
    /// check the header equals `header`, and append. Without a `.partial` file this is
    /// [`create`](Self::create).
    pub fn resume<S: AsRef<str>>(path: impl AsRef<Path>, header: &[S]) -> Result<Self> {
        let target = path.as_ref().to_path_buf();
        let partial = partial_path(&target);
        let bytes = match fs::read(&partial) {
            Ok(b) => b,
            Err(e) if e.kind() == std::io::ErrorKind::NotFound => return Self::create(path, header),
            Err(e) => return Err(io_err(&partial, e)),
        };
        let keep = complete_prefix(&bytes);
        if keep == 0 {
            return Self::create(path, header);
        }
        let (found, rows) = parse_rows(&bytes[..keep], &partial)?;
        let want: Vec<&str> = header.iter().map(AsRef::as_ref).collect();
        if found != want {
            return Err(Error::Parse {
                file: partial.display().to_string(),
                location: "line 1".into(),
                reason: format!("header {found:?} differs from the expected {want:?}"),
            });
        }
        let file = OpenOptions::new().write(true).open(&partial).map_err(|e| io_err(&partial, e))?;
        file.set_len(keep as u64).map_err(|e| io_err(&partial, e))?;
        let mut file = OpenOptions::new().append(true).open(&partial).map_err(|e| io_err(&partial, e))?;
        file.flush().map_err(|e| io_err(&partial, e))?;
        Ok(AtomicCsvWriter { file, partial, target, n_cols: header.len(), rows: rows.len() })
    }

    /// Append one row (as many fields as the header); it reaches the OS whole before return.
    pub fn write_row<S: AsRef<str>>(&mut self, fields: &[S]) -> Result<()> {
        if fields.len() != self.n_cols {
            return Err(Error::shape(
                format!("row for {}", self.target.display()),
                self.n_cols,
                fields.len(),
            ));
        }
        let row = encode_row(fields, &self.target)?;
        self.file.write_all(&row).and_then(|_| self.file.flush()).map_err(|e| io_err(&self.partial, e))?;
        self.rows += 1;
        Ok(())
    }

    /// Compute the rows of each of `items` in parallel (rayon) and write them in the order of
    /// `items`, each item's rows as soon as every earlier item's are written, so an interrupted
    /// run leaves a complete prefix. `done` is called in order with each item's row count.
    /// Every item is computed even after a write fails; the first write error is returned.
    pub fn write_in_order<R: Send>(
        &mut self,
        items: &[usize],
        rows_of: &(dyn Fn(usize) -> Vec<R> + Sync),
        fields: impl Fn(&R) -> Vec<String>,
        mut done: impl FnMut(usize),
    ) -> Result<()> {
        use rayon::prelude::*;
        let (tx, rx) = std::sync::mpsc::channel::<(usize, Vec<R>)>();
        let mut err: Option<Error> = None;
        std::thread::scope(|scope| {
            scope.spawn(move || {
                items.par_iter().enumerate().for_each_with(tx, |tx, (pos, &i)| {
                    let _ = tx.send((pos, rows_of(i)));
                });
            });
            let mut pending: std::collections::BTreeMap<usize, Vec<R>> = std::collections::BTreeMap::new();
            let mut next = 0usize;
            for (pos, rows) in rx {
                pending.insert(pos, rows);
                while let Some(rows) = pending.remove(&next) {
                    for row in &rows {
                        if err.is_none()
                            && let Err(e) = self.write_row(&fields(row))
                        {
                            err = Some(e);
                        }
                    }
                    done(rows.len());
                    next += 1;
                }
            }
        });
        err.map_or(Ok(()), Err)
    }

    /// Rows written (including those kept by [`resume`](Self::resume)), header excluded.
    pub fn rows(&self) -> usize {
        self.rows
    }

    /// The `.partial` file being written.
    pub fn partial(&self) -> &Path {
        &self.partial
    }

    /// Fsync, rename `<path>.partial` to `<path>`, fsync the directory; returns the final path.
    pub fn finish(self) -> Result<PathBuf> {
        self.file.sync_all().map_err(|e| io_err(&self.partial, e))?;
        drop(self.file);
        fs::rename(&self.partial, &self.target).map_err(|e| io_err(&self.target, e))?;
        sync_dir(&parent_dir(&self.target))?;
        Ok(self.target)
    }
}

/// The values in column `key_column` of the complete rows of an output: of `<path>.partial`
/// if it exists (an interrupted run), else of `<path>`; empty if neither exists. A trailing
/// line without its newline is ignored.
pub fn completed_keys(path: impl AsRef<Path>, key_column: &str) -> Result<HashSet<String>> {
    let target = path.as_ref();
    let partial = partial_path(target);
    let (file, bytes) = match fs::read(&partial) {
        Ok(b) => (partial, b),
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => match fs::read(target) {
            Ok(b) => (target.to_path_buf(), b),
            Err(e) if e.kind() == std::io::ErrorKind::NotFound => return Ok(HashSet::new()),
            Err(e) => return Err(io_err(target, e)),
        },
        Err(e) => return Err(io_err(&partial, e)),
    };
    let keep = complete_prefix(&bytes);
    if keep == 0 {
        return Ok(HashSet::new());
    }
    let (header, rows) = parse_rows(&bytes[..keep], &file)?;
    let Some(k) = header.iter().position(|h| h == key_column) else {
        return Err(Error::UnknownName {
            kind: format!("column of {}", file.display()),
            name: key_column.to_string(),
            known: header.join(", "),
        });
    };
    Ok(rows.iter().filter_map(|r| r.get(k).map(str::to_string)).collect())
}
