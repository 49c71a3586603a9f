//! Loading a project from its root sheet: every sheet file the hierarchy names is read once
//! (a file used by several sheet symbols is one file with several uses), the texts are
//! joined into one [`SourceFile`] made of several files, and the uses of sheets are laid
//! out as a tree of sheet paths. Missing or unreadable sheets, recursion between sheets and
//! malformed sheets are errors that point at the sheet symbol that names them.

use std::path::{Path, PathBuf};

use rustc_hash::FxHashMap as HashMap;

use crate::diag::Diag;
use crate::input;
use crate::sexpr::{self, NodeId, Tree};
use crate::source::{SourceFile, Span};

use super::sheet::{self, Reader, Sheet};

/// Where a project failed: the diagnostic, and the text to show it in when there is one.
#[derive(Debug)]
pub struct Failed {
    pub diag: Diag,
    pub source: Option<SourceFile>,
}

impl Failed {
    fn bare(diag: Diag) -> Box<Failed> {
        Box::new(Failed { diag, source: None })
    }
}

/// One use of a sheet in the hierarchy.
#[derive(Debug, Clone)]
pub struct Use {
    /// Index of the sheet file in [`Project::sheets`].
    pub file: usize,
    /// The sheet symbols' uuids from the root down (empty for the root).
    pub uuids: Vec<String>,
    /// KiCad's readable sheet path: `/` for the root, `/name/` below it, `/a/b/` deeper.
    pub path: String,
    /// (parent use, index of the sheet symbol in the parent's sheet).
    pub parent: Option<(usize, usize)>,
}

/// The files read, joined, before they are parsed into sheets.
#[derive(Debug)]
pub struct Files {
    pub source: SourceFile,
    /// The name of each file, in the order of `source.files()`.
    pub names: Vec<String>,
}

/// A loaded project.
pub struct Project<'a> {
    pub sheets: Vec<Sheet<'a>>,
    pub uses: Vec<Use>,
    pub diags: Vec<Diag>,
}

/// Most sheets a project may use (a guard against hierarchies that multiply without
/// recursing).
pub const MAX_USES: usize = 100_000;

/// The bytes of a sheet file, within the size limit (the codes and words of the netlist
/// reader's own file reading).
fn read_bytes(name: &str, max_bytes: u64) -> Result<Vec<u8>, Diag> {
    let io = |e: std::io::Error| {
        let what = match e.kind() {
            std::io::ErrorKind::NotFound => "no such file".to_string(),
            std::io::ErrorKind::PermissionDenied => "permission denied".to_string(),
            _ => e.to_string(),
        };
        Diag::error("unreadable", format!("cannot read `{name}`: {what}"))
    };
    let meta = std::fs::metadata(name).map_err(io)?;
    if meta.is_dir() {
        return Err(Diag::error("unreadable", format!("`{name}` is a folder")));
    }
    if meta.len() > max_bytes {
        return Err(Diag::error(
            "too-large",
            format!(
                "the file is {} bytes, above the limit of {max_bytes} bytes",
                meta.len()
            ),
        )
        .with_help("raise the limit with --max-bytes if the machine has the memory for it"));
    }
    std::fs::read(name).map_err(io)
}

fn read_text(name: &str, max_bytes: u64) -> Result<String, Box<Failed>> {
    let bytes = read_bytes(name, max_bytes).map_err(Failed::bare)?;
    match input::load(name, bytes) {
        Ok(s) => Ok(s.into_text()),
        Err(e) => Err(Box::new(Failed {
            diag: e.diag,
            source: Some(e.source),
        })),
    }
}

/// The first diagnostic of a file that is not a KiCad 6-9 sheet (a legacy sheet, another
/// KiCad file, not an S-expression), or `None`.
pub fn sniff_sheet(text: &str) -> Option<Diag> {
    match sexpr::sniff(text) {
        Some(d) if d.code == "wrong-format" && d.message.contains("(`.kicad_sch`)") => None,
        Some(mut d) => {
            if d.message.contains("legacy KiCad schematic") {
                d.message = "this is a legacy KiCad schematic (`.sch`, \"EESchema Schematic File\", KiCad 5 or older), which netmargin does not read".into();
                d.help = Some("export a netlist from it (File > Export > Netlist) and check the `.net` file, or open and save the project in KiCad 6 or newer".into());
            }
            Some(d)
        }
        None => {
            let t = text.trim_start_matches('\u{feff}').trim_start();
            if t.starts_with("(export") {
                None
            } else {
                Some(
                    Diag::error(
                        "not-a-schematic",
                        "this is not a KiCad schematic sheet: it does not begin with `(kicad_sch`",
                    )
                    .at(Span::new(0, t.len().min(1)), "expected `(kicad_sch`"),
                )
            }
        }
    }
}

/// The sub-sheet file names a sheet's text refers to, with the offsets of the names.
fn sheet_files(tree: &Tree<'_>) -> Vec<(String, Span)> {
    let mut out = Vec::new();
    let root = tree.root();
    for c in tree.children(root) {
        if !tree.head_is(c, "sheet") {
            continue;
        }
        sheet_file_props(tree, c, 0, &mut out);
    }
    out
}

/// The file names in the properties of the sheet symbol `c`, their spans moved by `base`.
fn sheet_file_props(tree: &Tree<'_>, c: NodeId, base: u32, out: &mut Vec<(String, Span)>) {
    for p in tree.children(c) {
        if !tree.head_is(p, "property") {
            continue;
        }
        let mut it = tree.children(p).skip(1);
        let (Some(n), Some(v)) = (it.next(), it.next()) else {
            continue;
        };
        let name = tree.text(n).unwrap_or_default();
        if name == "Sheetfile" || name == "Sheet file" {
            let span = tree.span(v);
            out.push((
                tree.text(v).unwrap_or_default().into_owned(),
                Span {
                    start: span.start + base,
                    end: span.end + base,
                },
            ));
        }
    }
}

/// [`sheet_files`] of a sheet's text, or the error of reading it. The text is read whole
/// later, with the project's other files: here only its sheet symbols are read into trees,
/// found by [`sexpr::root_lists`]; a text that finds fails is read whole at once, for its
/// error (or, should a sheet symbol alone not read, for its names).
fn sheet_files_in(text: &str) -> Result<Vec<(String, Span)>, Diag> {
    if let Some(spans) = sexpr::root_lists(text, "sheet") {
        let mut out = Vec::new();
        let all_read = spans.iter().all(|s| match sexpr::parse(&text[s.range()]) {
            Ok(tree) => {
                sheet_file_props(&tree, tree.root(), s.start, &mut out);
                true
            }
            Err(_) => false,
        });
        if all_read {
            return Ok(out);
        }
    }
    sexpr::parse(text).map(|tree| sheet_files(&tree))
}

/// Resolves a sheet file named in `parent` (a path relative to the project folder, or
/// failing that to the parent's folder).
fn resolve(root_dir: &Path, parent: &str, file: &str) -> PathBuf {
    let f = Path::new(file);
    if f.is_absolute() {
        return f.to_path_buf();
    }
    let p = root_dir.join(f);
    if p.exists() {
        return p;
    }
    let beside = Path::new(parent).parent().map(|d| d.join(f));
    match beside {
        Some(b) if b.exists() => b,
        _ => p,
    }
}

fn display(p: &Path) -> String {
    let s = p.to_string_lossy().into_owned();
    s.strip_prefix("./").map(str::to_string).unwrap_or(s)
}

/// Reads the root sheet and every sheet file below it, once each.
pub fn read_files(root: &str, max_bytes: u64) -> Result<Files, Box<Failed>> {
    read_files_from(root, None, max_bytes)
}

/// [`read_files`], with the root sheet's text when the caller has already read it (it is
/// not read again).
pub fn read_files_from(
    root: &str,
    mut root_text: Option<String>,
    max_bytes: u64,
) -> Result<Files, Box<Failed>> {
    let root_dir = Path::new(root)
        .parent()
        .map(Path::to_path_buf)
        .unwrap_or_default();
    let mut names: Vec<String> = vec![root.to_string()];
    let mut texts: Vec<String> = Vec::new();
    let mut by_path: HashMap<PathBuf, usize> = HashMap::default();
    by_path.insert(PathBuf::from(root), 0);
    // (file, referring file, span of the name in the referring file's own text)
    let mut missing: Option<(String, usize, Span, Diag)> = None;
    let mut i = 0;
    while i < names.len() {
        let read = match root_text.take() {
            Some(t) if i == 0 => Ok(t),
            _ => read_text(&names[i], max_bytes),
        };
        let text = match read {
            Ok(t) => t,
            Err(f) if i == 0 => return Err(f),
            Err(f) => {
                // pointed at from the referring sheet below
                missing = Some((names[i].clone(), usize::MAX, Span::default(), f.diag));
                texts.push(String::new());
                break;
            }
        };
        if let Some(d) = sniff_sheet(&text) {
            let src = SourceFile::from_string(names[i].as_str(), text);
            let mut d = d;
            if i > 0 {
                d.message = format!("sheet `{}`: {}", names[i], d.message).into();
            }
            return Err(Box::new(Failed {
                diag: d,
                source: Some(src),
            }));
        }
        let refs = match sheet_files_in(&text) {
            Ok(refs) => refs,
            Err(d) => {
                let src = SourceFile::from_string(names[i].as_str(), text);
                return Err(Box::new(Failed {
                    diag: d,
                    source: Some(src),
                }));
            }
        };
        for (f, span) in refs {
            let p = resolve(&root_dir, &names[i], &f);
            if !by_path.contains_key(&p) {
                if !p.is_file() {
                    let d = if p.exists() {
                        Diag::error(
                            "missing-sheet",
                            format!("the sheet file `{}` is not a file", display(&p)),
                        )
                    } else {
                        Diag::error(
                            "missing-sheet",
                            format!("the sheet file `{}` does not exist", display(&p)),
                        )
                    };
                    missing = Some((display(&p), i, span, d));
                    break;
                }
                by_path.insert(p.clone(), names.len());
                names.push(display(&p));
            }
        }
        texts.push(text);
        if missing.is_some() {
            break;
        }
        i += 1;
    }
    if let Some((file, from, span, d)) = missing {
        // show it in the sheet that names it
        let from = if from == usize::MAX {
            // the file exists but could not be read: find who names it
            texts
                .iter()
                .position(|t| t.contains(file.rsplit('/').next().unwrap_or(&file)))
                .unwrap_or(0)
        } else {
            from
        };
        let parent = names[from].clone();
        let text = std::mem::take(&mut texts[from]);
        let span = if span == Span::default() {
            let name = file.rsplit('/').next().unwrap_or(&file);
            text.find(&format!("\"{name}\""))
                .map_or(Span::default(), |p| Span::new(p, p + name.len() + 2))
        } else {
            span
        };
        let src = SourceFile::from_string(parent.as_str(), text);
        let d = Diag {
            message: format!("{} (named by sheet `{parent}`)", d.message).into(),
            ..d
        }
        .at(span, "this sheet symbol's file")
        .with_help("restore the sheet file, or fix the sheet symbol's file name in KiCad");
        return Err(Box::new(Failed {
            diag: d,
            source: Some(src),
        }));
    }
    let source = SourceFile::from_files(root, names.iter().cloned().zip(texts).collect::<Vec<_>>());
    Ok(Files { source, names })
}

/// Parses the joined files into sheets and lays out the uses of sheets from the root. A
/// source of one file (not made by [`read_files`]) is a project of one sheet.
pub fn project(source: &SourceFile) -> Result<Project<'_>, Diag> {
    let text = source.text();
    let one = [crate::source::FilePart {
        name: source.name().into(),
        start: 0,
        len: text.len() as u32,
    }];
    let parts: &[crate::source::FilePart] = if source.files().is_empty() {
        &one
    } else {
        source.files()
    };
    let names: Vec<&str> = parts.iter().map(|p| &*p.name).collect();
    let mut sheets = Vec::with_capacity(parts.len());
    let mut diags = Vec::new();
    let mut index_of: HashMap<&str, usize> = HashMap::default();
    for (i, part) in parts.iter().enumerate() {
        let start = part.start as usize;
        let own = &text[start..start + part.len as usize];
        // item by item, so the sheet is never held as one tree; read whole where that
        // stops, for the error
        let sheet = match sheet::read_by_items(own, part.start, &mut diags) {
            Some(sheet) => sheet,
            None => {
                let tree = sexpr::parse(own).map_err(|d| shift(d, part.start))?;
                let reader = Reader {
                    t: &tree,
                    base: part.start,
                };
                reader.sheet(&mut diags)?
            }
        };
        sheets.push(sheet);
        index_of.insert(names[i], i);
    }
    // uses, depth first from the root; recursion is an error at the sheet symbol
    let root_dir = Path::new(names[0])
        .parent()
        .map(Path::to_path_buf)
        .unwrap_or_default();
    let mut uses = vec![Use {
        file: 0,
        uuids: Vec::new(),
        path: "/".to_string(),
        parent: None,
    }];
    let mut stack = vec![0usize];
    while let Some(u) = stack.pop() {
        let file = uses[u].file;
        for (si, s) in sheets[file].sheets.iter().enumerate() {
            let p = display(&resolve(&root_dir, names[file], &s.file));
            let Some(&child) = index_of.get(p.as_str()) else {
                continue;
            };
            // recursion: the child file is this use or one of its ancestors
            let mut a = Some(u);
            while let Some(x) = a {
                if uses[x].file == child {
                    return Err(Diag::error(
                        "recursive-sheet",
                        format!(
                            "sheet `{}` uses `{}`, which is already above it in the hierarchy: the sheets recurse",
                            names[file], names[child]
                        ),
                    )
                    .at(s.file_span, "this sheet symbol's file")
                    .with_help("a sheet cannot contain itself, directly or through other sheets: point this sheet symbol at another file"));
                }
                a = uses[x].parent.map(|p| p.0);
            }
            if uses.len() >= MAX_USES {
                return Err(Diag::error(
                    "too-many-sheets",
                    format!("the hierarchy uses more than {MAX_USES} sheets"),
                )
                .at(s.file_span, "here"));
            }
            let mut uuids = uses[u].uuids.clone();
            uuids.push(s.uuid.to_string());
            let path = format!("{}{}/", uses[u].path, s.name);
            uses.push(Use {
                file: child,
                uuids,
                path,
                parent: Some((u, si)),
            });
            stack.push(uses.len() - 1);
        }
    }
    // keep the uses in a stable order: by path of uuids as KiCad lists sheets
    Ok(Project {
        sheets,
        uses,
        diags,
    })
}

fn shift(mut d: Diag, by: u32) -> Diag {
    for l in &mut d.labels {
        l.span.start += by;
        l.span.end += by;
    }
    d
}

/// The sheet files a sheet's text names, found by a plain scan of its `Sheetfile`
/// properties (cheap enough to run over every sheet in a folder).
pub fn named_sheets(text: &str) -> Vec<String> {
    let mut out = Vec::new();
    let names = SheetNames::new();
    names.scan(text.as_bytes(), true, &mut out);
    out
}

/// The scan of [`named_sheets`] over a text given in blocks: a file's text is looked at a
/// block at a time and never held whole (a folder's other sheets can be far larger than the
/// sheet being looked for).
struct SheetNames {
    key: memchr::memmem::Finder<'static>,
}

/// What follows `(property "Sheet` in the two spellings of the property.
const SHEET_FILE_TAILS: [&[u8]; 2] = [b"file\" \"", b" file\" \""];

impl SheetNames {
    fn new() -> SheetNames {
        SheetNames {
            key: memchr::memmem::Finder::new(b"(property \"Sheet"),
        }
    }

    /// Pushes the names found in `bytes` onto `out` and returns how many leading bytes are
    /// done with: the rest may hold a property cut off by the block's end and is to be
    /// looked at again with the next block in front of it. With `last` (the text ends
    /// here), everything is done with. A name whose bytes are not UTF-8 is `None`.
    fn scan(&self, bytes: &[u8], last: bool, out: &mut Vec<String>) -> usize {
        let key = self.key.needle().len();
        let mut from = 0;
        while let Some(p) = self.key.find(&bytes[from..]).map(|p| p + from) {
            let after = p + key;
            let rest = &bytes[after..];
            let tail = SHEET_FILE_TAILS.iter().find(|t| rest.starts_with(t));
            let Some(tail) = tail else {
                // cut off by the block's end: it may still be one of the two
                if !last && SHEET_FILE_TAILS.iter().any(|t| t.starts_with(rest)) {
                    return p;
                }
                from = after;
                continue;
            };
            let start = after + tail.len();
            match memchr::memchr(b'"', &bytes[start..]) {
                Some(len) => {
                    if let Ok(name) = std::str::from_utf8(&bytes[start..start + len]) {
                        out.push(sexpr::unescape(name).into_owned());
                    }
                }
                None if !last => return p,
                None => {}
            }
            from = after;
        }
        if last {
            bytes.len()
        } else {
            // the start of a property cut off by the block's end is kept
            bytes.len().saturating_sub(key - 1).max(from)
        }
    }

    /// [`named_sheets`] of the file at `path`, read a block at a time; `None` when it cannot
    /// be read or is not UTF-8 text.
    fn in_file(&self, path: &Path) -> Option<Vec<String>> {
        const BLOCK: usize = 1 << 16;
        self.in_reader(std::fs::File::open(path).ok()?, BLOCK)
    }

    fn in_reader(&self, mut r: impl std::io::Read, block: usize) -> Option<Vec<String>> {
        use std::io::Read;
        let mut out = Vec::new();
        let mut buf: Vec<u8> = Vec::with_capacity(2 * block);
        // bytes at the start of `buf` known to be UTF-8
        let mut valid = 0;
        loop {
            // appended without zeroing the block first
            let n = (&mut r).take(block as u64).read_to_end(&mut buf).ok()?;
            let last = n == 0;
            match std::str::from_utf8(&buf[valid..]) {
                Ok(_) => valid = buf.len(),
                // a character cut off by the block's end
                Err(e) if e.error_len().is_none() && !last => valid += e.valid_up_to(),
                Err(_) => return None,
            }
            let done = self.scan(&buf[..valid], last, &mut out);
            if last {
                return Some(out);
            }
            buf.drain(..done);
            valid -= done;
        }
    }
}

/// How many folders above a sheet its root sheet may be (sheets in sub-folders of the
/// project folder).
const ROOT_SEARCH_DEPTH: usize = 3;

/// For each folder, the sheets its `.kicad_sch` files name (by canonical path) and the sheet
/// naming each: read once per folder per run.
type FolderIndex = HashMap<PathBuf, PathBuf>;
static FOLDERS: std::sync::Mutex<Option<HashMap<PathBuf, FolderIndex>>> =
    std::sync::Mutex::new(None);

fn folder_index(dir: &Path) -> FolderIndex {
    let listing = if dir.as_os_str().is_empty() {
        Path::new(".")
    } else {
        dir
    };
    let key = listing
        .canonicalize()
        .unwrap_or_else(|_| listing.to_path_buf());
    if let Ok(guard) = FOLDERS.lock() {
        if let Some(ix) = guard.as_ref().and_then(|m| m.get(&key)) {
            return ix.clone();
        }
    }
    let mut names: Vec<PathBuf> = std::fs::read_dir(listing)
        .into_iter()
        .flatten()
        .flatten()
        .map(|e| e.path())
        .filter(|p| p.extension().is_some_and(|x| x == "kicad_sch"))
        .collect();
    names.sort();
    let mut ix = FolderIndex::default();
    let scan = SheetNames::new();
    for n in names {
        let Some(named) = scan.in_file(&n) else {
            continue;
        };
        let own = n.canonicalize().ok();
        let parent = dir.join(n.file_name().unwrap_or_default());
        for child in named {
            let child = listing.join(child.replace('\\', "/"));
            if let Ok(c) = child.canonicalize() {
                if Some(&c) != own.as_ref() {
                    ix.entry(c).or_insert_with(|| parent.clone());
                }
            }
        }
    }
    if let Ok(mut guard) = FOLDERS.lock() {
        guard
            .get_or_insert_with(HashMap::default)
            .insert(key, ix.clone());
    }
    ix
}

/// The sheet that names `sheet` as a sub-sheet: one in its folder or a folder above it.
fn parent_sheet(sheet: &Path) -> Option<PathBuf> {
    let target = sheet.canonicalize().ok()?;
    let mut dir = sheet.parent().map(Path::to_path_buf).unwrap_or_default();
    for _ in 0..ROOT_SEARCH_DEPTH {
        if let Some(p) = folder_index(&dir).get(&target) {
            return Some(p.clone());
        }
        match dir.parent() {
            Some(up) if !dir.as_os_str().is_empty() => dir = up.to_path_buf(),
            _ => break,
        }
    }
    None
}

/// The root sheet of the project `sheet` belongs to: the sheet that names it as a
/// sub-sheet (in its folder or up to [`ROOT_SEARCH_DEPTH`] folders above), followed upwards;
/// a sheet no other sheet names is a root, and so is a sheet of sheets that name each other
/// (the recursion is reported when it is read).
pub fn project_root(sheet: &Path) -> PathBuf {
    let mut cur = sheet.to_path_buf();
    let mut seen = vec![sheet.canonicalize().unwrap_or_else(|_| sheet.to_path_buf())];
    while let Some(p) = parent_sheet(&cur) {
        let c = p.canonicalize().unwrap_or_else(|_| p.clone());
        if seen.contains(&c) {
            return sheet.to_path_buf();
        }
        seen.push(c);
        cur = p;
    }
    cur
}

/// A project of one sheet given as text (standard input, fuzzing, tests): its sub-sheets,
/// which would be found beside its file, are left out.
pub fn single(name: &str, text: String) -> Result<Files, Box<Failed>> {
    if let Some(d) = sniff_sheet(&text) {
        return Err(Box::new(Failed {
            diag: d,
            source: Some(SourceFile::from_string(name, text)),
        }));
    }
    Ok(Files {
        source: SourceFile::from_files(name, vec![(name.to_string(), text)]),
        names: vec![name.to_string()],
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The names as a search of the whole text for each spelling finds them.
    fn whole(text: &str) -> Vec<String> {
        let mut out = Vec::new();
        for key in ["(property \"Sheetfile\" \"", "(property \"Sheet file\" \""] {
            let mut rest = text;
            while let Some(p) = rest.find(key) {
                rest = &rest[p + key.len()..];
                if let Some(end) = rest.find('"') {
                    out.push(sexpr::unescape(&rest[..end]).into_owned());
                }
            }
        }
        out.sort();
        out
    }

    /// Read in blocks of every size from 1 byte up, a text names the same sheets as when it
    /// is searched whole: properties and characters cut by a block's end are joined again.
    #[test]
    fn block_reading_finds_the_names_of_a_whole_reading() {
        let text = "(kicad_sch (sheet (property \"Sheetname\" \"a\")\n  (property \"Sheetfile\" \"sub/ä.kicad_sch\"))\n\
                    (sheet (property \"Sheet file\" \"old.kicad_sch\") (property \"Sheet\" \"x\"))\n\
                    (property \"Sheetfile\" \"esc\\\"aped.kicad_sch\") (property \"Sheetfile\" \"é\")\n\
                    (property \"Sheetfile\" \"cut";
        let want = whole(text);
        assert_eq!(want.len(), 4, "{want:?}");
        let scan = SheetNames::new();
        for block in 1..=text.len() + 1 {
            let mut got = scan.in_reader(text.as_bytes(), block).unwrap();
            got.sort();
            assert_eq!(got, want, "blocks of {block} bytes");
        }
        let mut got = named_sheets(text);
        got.sort();
        assert_eq!(got, want);
    }

    /// The sheet files found from the sheet symbols alone are those a reading of the whole
    /// tree finds, at the same places; a text that does not read fails with the whole
    /// reading's error. Every sheet of the fixtures and the project's own test texts.
    #[test]
    fn sheet_files_from_the_sheet_symbols_are_the_whole_trees() {
        let mut texts: Vec<String> = vec![
            "(kicad_sch (sheet (property \"Sheetfile\" \"a.kicad_sch\" (at 1 2 0)))\n (sheet (property \"Sheet file\" \"b\\\"c.kicad_sch\")) (sheet (property Sheetfile (x))) (sheet (property \"Sheetfile\")))".into(),
            "(kicad_sch (sheet (property \"Sheetfile\" \"a.kicad_sch\"))".into(),
            "(kicad_sch (sheet (property \"Sheetfile\" \"a.kicad_sch\"))) x".into(),
        ];
        texts.extend(crate::schematic::tests::fixture_sheets());
        assert!(texts.len() > 10, "{}", texts.len());
        let mut names = 0;
        for t in &texts {
            let whole = sexpr::parse(t).map(|tree| sheet_files(&tree));
            let got = sheet_files_in(t);
            assert_eq!(got, whole, "{t}");
            names += got.map_or(0, |v| v.len());
        }
        assert!(names >= 3);
    }

    /// A file that is not UTF-8 names nothing (as one that cannot be read as text), wherever
    /// the bad byte falls.
    #[test]
    fn block_reading_refuses_text_that_is_not_utf8() {
        let mut bytes = b"(property \"Sheetfile\" \"a.kicad_sch\") ".to_vec();
        bytes.push(0xff);
        bytes.extend_from_slice(b" (property \"Sheetfile\" \"b.kicad_sch\")");
        let scan = SheetNames::new();
        for block in 1..=bytes.len() {
            assert_eq!(scan.in_reader(&bytes[..], block), None, "blocks of {block}");
        }
        // a character cut off at the very end
        assert_eq!(
            scan.in_reader("x é".as_bytes().split_last().unwrap().1, 2),
            None
        );
        assert_eq!(
            scan.in_reader(&b"(property \"Sheetfile\" \"a\")"[..], 3),
            Some(vec!["a".to_string()])
        );
    }
}
