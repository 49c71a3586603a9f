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

/// Turns the bytes of `name` into a source file.
pub fn load(name: &str, bytes: Vec<u8>) -> Result<SourceFile, Box<LoadError>> {
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
    match String::from_utf8(bytes) {
        Ok(text) => Ok(SourceFile::from_string(name, text)),
        Err(e) => {
            let at = e.utf8_error().valid_up_to();
            let bad_len = e.utf8_error().error_len().unwrap_or(1);
            let bytes = e.into_bytes();
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
    }
}
