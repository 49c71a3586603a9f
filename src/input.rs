//! Loading an input file: size limit, binary detection, UTF-8 validation. Produces the
//! [`SourceFile`] every later layer shares, or a diagnostic that points at the place.

use crate::diag::Diag;
use crate::source::{line_col_in, line_starts, SourceFile, Span};

/// Default limit on an input's size: generous for any real netlist, small enough to refuse
/// a file that would exhaust memory.
pub const DEFAULT_MAX_BYTES: u64 = 2 << 30;

/// Options that shape how a file is read.
#[derive(Debug, Clone)]
pub struct ReadOptions {
    pub max_bytes: u64,
}

impl Default for ReadOptions {
    fn default() -> Self {
        ReadOptions {
            max_bytes: DEFAULT_MAX_BYTES,
        }
    }
}

/// A failed load: the diagnostic and, where the bytes could be shown, a source to show them
/// from (invalid UTF-8 is shown with replacement characters).
#[derive(Debug)]
pub struct LoadError {
    pub diag: Diag,
    pub source: SourceFile,
}

/// A file at least this large is mapped into memory rather than read into it
/// ([`Bytes::Mapped`]): its text is then the system's cache of the file, with no copy and no
/// fresh memory for it. Below, the copy costs a few milliseconds at most, and a file read
/// whole cannot be cut short under netmargin by another program while it runs.
pub const MAP_FROM_BYTES: u64 = 16 << 20;

/// An input's bytes: read into memory, or the file mapped (a large one, [`MAP_FROM_BYTES`]).
#[derive(Debug)]
pub enum Bytes {
    Read(Vec<u8>),
    Mapped(memmap2::Mmap),
}

impl From<Vec<u8>> for Bytes {
    fn from(v: Vec<u8>) -> Bytes {
        Bytes::Read(v)
    }
}

impl std::ops::Deref for Bytes {
    type Target = [u8];
    fn deref(&self) -> &[u8] {
        match self {
            Bytes::Read(v) => v,
            Bytes::Mapped(m) => m,
        }
    }
}

/// The bytes of the file `file` (opened, `len` bytes long): mapped when it is
/// [`MAP_FROM_BYTES`] or longer, else read.
pub fn file_bytes(file: std::fs::File, len: u64) -> std::io::Result<Bytes> {
    bytes_mapped_from(file, len, MAP_FROM_BYTES)
}

fn bytes_mapped_from(mut file: std::fs::File, len: u64, map_from: u64) -> std::io::Result<Bytes> {
    if len >= map_from {
        // SAFETY: the map is only read. A file cut short by another program while netmargin
        // reads it ends the process (a bus error) instead of giving a partial text; a file
        // changed in place is read as it is then
        if let Ok(map) = unsafe { memmap2::Mmap::map(&file) } {
            return Ok(Bytes::Mapped(map));
        }
        // a file that cannot be mapped (a pipe, some file systems) is read
    }
    let mut buf = Vec::with_capacity(len as usize);
    std::io::Read::read_to_end(&mut file, &mut buf)?;
    Ok(Bytes::Read(buf))
}

/// Turns the bytes of `name` into a source file.
pub fn load(name: &str, bytes: impl Into<Bytes>) -> Result<SourceFile, Box<LoadError>> {
    let bytes = bytes.into();
    if let Some(p) = memchr::memchr(0, &bytes) {
        let shown = String::from_utf8_lossy(&bytes[..p.min(4096)]).into_owned();
        let src = SourceFile::from_string(name, shown);
        let lc = line_col_in(&bytes, &line_starts(&bytes[..p]), p);
        return Err(Box::new(LoadError {
            diag: Diag::error(
                "binary-file",
                format!("a NUL byte at byte offset {p} (line {}, column {}): this is a binary file, not a netlist", lc.line, lc.column),
            )
            .with_help("give netmargin the `.net` text file that KiCad exports"),
            source: src,
        }));
    }
    let (bytes, e) = match bytes {
        Bytes::Read(v) => match String::from_utf8(v) {
            Ok(text) => return Ok(SourceFile::from_string(name, text)),
            Err(e) => {
                let u = e.utf8_error();
                (Bytes::Read(e.into_bytes()), u)
            }
        },
        Bytes::Mapped(m) => match SourceFile::from_mapped(name, m) {
            Ok(src) => return Ok(src),
            Err((m, u)) => (Bytes::Mapped(m), u),
        },
    };
    let at = e.valid_up_to();
    let bad_len = e.error_len().unwrap_or(1);
    let lc = line_col_in(&bytes, &line_starts(&bytes), at);
    let bad: Vec<String> = bytes[at..(at + bad_len).min(bytes.len())]
        .iter()
        .map(|b| format!("0x{b:02X}"))
        .collect();
    let shown = String::from_utf8_lossy(&bytes).into_owned();
    // The lossy text is identical up to `at`, so the span is right.
    let src = SourceFile::from_string(name, shown);
    Err(Box::new(LoadError {
        diag: Diag::error(
            "invalid-utf8",
            format!(
                "invalid UTF-8 at byte offset {at} (line {}, column {}): byte {}",
                lc.line,
                lc.column,
                bad.join(" ")
            ),
        )
        .at(Span::new(at, at + 1), "not UTF-8")
        .with_help("KiCad writes netlists in UTF-8; the file was re-encoded (e.g. saved as Latin-1) or damaged: export it again"),
        source: src,
    }))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A file of its own under the system's temporary folder, removed when dropped.
    struct TempFile(std::path::PathBuf);
    impl TempFile {
        fn new(tag: &str, bytes: &[u8]) -> TempFile {
            let p = std::env::temp_dir()
                .join(format!("netmargin-input-{}-{tag}.net", std::process::id()));
            std::fs::write(&p, bytes).unwrap();
            TempFile(p)
        }
        /// The file's bytes, mapped when `map_from` is at most its length.
        fn bytes(&self, map_from: u64) -> Bytes {
            let f = std::fs::File::open(&self.0).unwrap();
            let len = f.metadata().unwrap().len();
            bytes_mapped_from(f, len, map_from).unwrap()
        }
    }
    impl Drop for TempFile {
        fn drop(&mut self) {
            let _ = std::fs::remove_file(&self.0);
        }
    }

    /// What a load gives, to compare: the text, or the error's code, message, places and the
    /// text it is shown from.
    fn outcome(r: Result<SourceFile, Box<LoadError>>) -> (bool, String, String) {
        match r {
            Ok(s) => (true, s.text().to_string(), String::new()),
            Err(e) => (
                false,
                e.source.text().to_string(),
                format!(
                    "{} {} {:?}",
                    e.diag.code,
                    e.diag.message,
                    e.diag.labels.iter().map(|l| l.span).collect::<Vec<_>>()
                ),
            ),
        }
    }

    #[test]
    fn a_mapped_file_loads_as_the_same_file_read() {
        let netlist = std::fs::read("fixtures/demo/counter-timer.net").unwrap();
        let mut bad_utf8 = netlist.clone();
        bad_utf8.splice(200..200, [b'x', 0xE9, b'y']);
        let mut nul = netlist.clone();
        nul[300] = 0;
        for (tag, bytes) in [("ok", &netlist), ("latin1", &bad_utf8), ("nul", &nul)] {
            let f = TempFile::new(tag, bytes);
            let read = f.bytes(u64::MAX);
            let mapped = f.bytes(0);
            assert!(matches!(read, Bytes::Read(_)), "{tag}");
            assert!(matches!(mapped, Bytes::Mapped(_)), "{tag}");
            assert_eq!(&*read, &*mapped, "{tag}");
            let (a, b) = (outcome(load("f.net", read)), outcome(load("f.net", mapped)));
            assert_eq!(a, b, "{tag}");
            // the three cases are what they claim: one loads, two fail at their place
            assert_eq!(a.0, tag == "ok", "{tag}: {}", a.2);
        }
        // a source taken apart gives its text, mapped or not
        let f = TempFile::new("taken", &netlist);
        let src = load("f.net", f.bytes(0)).unwrap();
        assert_eq!(src.into_text().as_bytes(), &netlist[..]);
    }

    #[test]
    fn only_a_large_file_is_mapped() {
        let f = TempFile::new("small", b"(export (version \"E\"))\n");
        let file = std::fs::File::open(&f.0).unwrap();
        let len = file.metadata().unwrap().len();
        assert!(matches!(file_bytes(file, len).unwrap(), Bytes::Read(_)));
        assert!(matches!(f.bytes(len), Bytes::Mapped(_)));
        assert!(matches!(f.bytes(len + 1), Bytes::Read(_)));
    }
}
