//! The HTML audit report in a real browser: headless Chromium opens the demo board's report,
//! takes a screenshot and dumps the DOM. The test checks that the page rendered (the PNG is
//! not one colour), that the section headings and charts are in the rendered DOM, and that the
//! console stayed silent (the page has no scripts, so any console line is a fault: a blocked
//! resource, a parse error).
//!
//! Each check is first shown able to fail: a blank page must read as one colour, and a page
//! that logs to the console must be caught.
//!
//! Chromium is Debian's `chromium` (`NETMARGIN_CHROMIUM` names another binary). When it is
//! missing the test fails if `CI` is set, else it prints a notice and passes.

#[path = "notice/mod.rs"]
mod notice;
use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

fn chromium() -> Option<PathBuf> {
    if let Some(p) = std::env::var_os("NETMARGIN_CHROMIUM") {
        return Some(PathBuf::from(p));
    }
    let path = std::env::var_os("PATH")?;
    for dir in std::env::split_paths(&path) {
        for name in ["chromium", "chromium-browser"] {
            let p = dir.join(name);
            if p.is_file() {
                return Some(p);
            }
        }
    }
    None
}

fn temp_dir(tag: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("netmargin-browser-{tag}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).expect("temp dir");
    d
}

struct Run {
    stdout: String,
    stderr: String,
}

/// Runs Chromium headless on `url` with `args`, in a fresh profile, with a time limit.
fn browse(bin: &Path, work: &Path, url: &str, args: &[String]) -> Run {
    let profile = work.join(format!("profile-{}", args.len()));
    let _ = std::fs::remove_dir_all(&profile);
    let mut cmd = Command::new(bin);
    cmd.args([
        "--headless",
        "--no-sandbox",
        "--disable-gpu",
        "--disable-quic",
        "--no-first-run",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
        "--hide-scrollbars",
        "--enable-logging=stderr",
        "--v=0",
    ])
    .arg(format!("--user-data-dir={}", profile.display()))
    .args(args)
    .arg(url)
    .stdin(Stdio::null())
    .stdout(Stdio::piped())
    .stderr(Stdio::piped());
    let mut child = cmd
        .spawn()
        .unwrap_or_else(|e| panic!("cannot start {}: {e}", bin.display()));
    let (mut so, mut se) = (
        child.stdout.take().expect("piped"),
        child.stderr.take().expect("piped"),
    );
    let t_out = std::thread::spawn(move || {
        let mut s = String::new();
        let _ = std::io::Read::read_to_string(&mut so, &mut s);
        s
    });
    let t_err = std::thread::spawn(move || {
        let mut s = String::new();
        let _ = std::io::Read::read_to_string(&mut se, &mut s);
        s
    });
    let start = Instant::now();
    loop {
        match child.try_wait().expect("wait") {
            Some(_) => break,
            None if start.elapsed() > Duration::from_secs(120) => {
                let _ = child.kill();
                let _ = child.wait();
                panic!("chromium did not finish within 120 s on {url}");
            }
            None => std::thread::sleep(Duration::from_millis(100)),
        }
    }
    Run {
        stdout: t_out.join().expect("reader"),
        stderr: t_err.join().expect("reader"),
    }
}

/// Console lines Chromium logged for the page (`...:CONSOLE...] "message", source: ...`).
fn console_lines(stderr: &str) -> Vec<&str> {
    stderr.lines().filter(|l| l.contains(":CONSOLE")).collect()
}

fn screenshot(bin: &Path, work: &Path, url: &str, name: &str) -> (PathBuf, Run) {
    let png = work.join(name);
    let run = browse(
        bin,
        work,
        url,
        &[
            format!("--screenshot={}", png.display()),
            "--window-size=1280,3000".into(),
        ],
    );
    assert!(png.is_file(), "no screenshot of {url}:\n{}", run.stderr);
    (png, run)
}

fn file_url(p: &Path) -> String {
    format!("file://{}", p.canonicalize().expect("exists").display())
}

#[test]
fn the_report_renders_in_chromium() {
    let Some(bin) = chromium() else {
        notice::skipped(
            "the audit report in headless Chromium",
            "apt-get install -y chromium",
        );
        return;
    };
    notice::ran("the audit report in headless Chromium");
    let work = temp_dir("report");

    // the checks can fail: a blank page is one colour, a noisy page is heard
    let blank = work.join("blank.html");
    std::fs::write(&blank, "<!DOCTYPE html><html><body></body></html>").expect("write");
    let (png, _) = screenshot(&bin, &work, &file_url(&blank), "blank.png");
    let img =
        png::decode(&std::fs::read(&png).expect("read")).expect("chromium writes a valid PNG");
    assert_eq!(
        img.distinct_colours(2),
        1,
        "a blank page must read as one colour"
    );
    let noisy = work.join("noisy.html");
    std::fs::write(&noisy, "<!DOCTYPE html><html><body><p>x</p><script>console.error('marker-1'); missingFunction();</script></body></html>").expect("write");
    let run = browse(&bin, &work, &file_url(&noisy), &["--dump-dom".into()]);
    assert!(
        console_lines(&run.stderr).len() >= 2,
        "the console scan must catch a logged error and an exception:\n{}",
        run.stderr
    );

    // the report of the demo board
    let report = work.join("report.html");
    let out = Command::new(env!("CARGO_BIN_EXE_netmargin"))
        .args(["audit", "fixtures/demo/counter-timer.net", "-o"])
        .arg(&report)
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .output()
        .expect("the binary runs");
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let url = file_url(&report);

    let (png, run) = screenshot(&bin, &work, &url, "report.png");
    assert_eq!(
        console_lines(&run.stderr),
        Vec::<&str>::new(),
        "console output while rendering the report"
    );
    let img = png::decode(&std::fs::read(&png).expect("read")).expect("a valid PNG");
    assert_eq!((img.width, img.height), (1280, 3000));
    assert!(
        img.distinct_colours(64) >= 8,
        "the screenshot is (nearly) one colour: the page did not render"
    );
    // the page draws ink: more than 1 % of the pixels are not the background
    assert!(img.share_not(img.pixel(0, 0)) > 0.01, "too little drawn");
    if let Some(keep) = std::env::var_os("NETMARGIN_KEEP_SCREENSHOT") {
        let _ = std::fs::copy(&png, keep);
    }

    let run = browse(&bin, &work, &url, &["--dump-dom".into()]);
    assert_eq!(
        console_lines(&run.stderr),
        Vec::<&str>::new(),
        "console output while loading the report"
    );
    let dom = run.stdout;
    for h in [
        "<h2>Summary</h2>",
        "<h2>Findings</h2>",
        "<h2>Level charts</h2>",
        "<h2>Family compatibility</h2>",
        "<h2>Recapture review</h2>",
        "<h2>Data sources</h2>",
    ] {
        assert!(dom.contains(h), "the rendered DOM lacks {h}");
    }
    // the inline SVG charts were parsed as SVG elements, with their text
    assert!(
        dom.matches("class=\"level-chart\"").count() >= 2,
        "level charts in the DOM"
    );
    assert!(dom.contains("high short 0.80 V SHORT"));
    assert!(dom.contains("10.80 mA of 8.00 mA (135%) OVER"));
    let _ = std::fs::remove_dir_all(&work);
}

/// A small PNG reader (8-bit RGB and RGBA, as Chromium writes screenshots): zlib inflate,
/// scanline filters, pixels.
mod png {
    pub struct Image {
        pub width: usize,
        pub height: usize,
        bpp: usize,
        data: Vec<u8>,
    }

    impl Image {
        pub fn pixel(&self, x: usize, y: usize) -> [u8; 4] {
            let i = (y * self.width + x) * self.bpp;
            let p = &self.data[i..i + self.bpp];
            [p[0], p[1], p[2], if self.bpp == 4 { p[3] } else { 255 }]
        }
        /// Distinct colours, counting up to `limit`.
        pub fn distinct_colours(&self, limit: usize) -> usize {
            let mut seen: Vec<[u8; 4]> = Vec::new();
            for y in 0..self.height {
                for x in 0..self.width {
                    let p = self.pixel(x, y);
                    if !seen.contains(&p) {
                        seen.push(p);
                        if seen.len() >= limit {
                            return seen.len();
                        }
                    }
                }
            }
            seen.len()
        }
        /// The share of pixels that are not `c`.
        pub fn share_not(&self, c: [u8; 4]) -> f64 {
            let mut n = 0usize;
            for y in 0..self.height {
                for x in 0..self.width {
                    if self.pixel(x, y) != c {
                        n += 1;
                    }
                }
            }
            n as f64 / (self.width * self.height) as f64
        }
    }

    pub fn decode(bytes: &[u8]) -> Result<Image, String> {
        if bytes.len() < 8 || &bytes[..8] != b"\x89PNG\r\n\x1a\n" {
            return Err("not a PNG".into());
        }
        let (mut pos, mut idat) = (8, Vec::new());
        let (mut width, mut height, mut bpp) = (0usize, 0usize, 0usize);
        while pos + 8 <= bytes.len() {
            let len = u32::from_be_bytes(bytes[pos..pos + 4].try_into().expect("4 bytes")) as usize;
            let kind = &bytes[pos + 4..pos + 8];
            let body = bytes.get(pos + 8..pos + 8 + len).ok_or("truncated chunk")?;
            match kind {
                b"IHDR" => {
                    width = u32::from_be_bytes(body[0..4].try_into().expect("4")) as usize;
                    height = u32::from_be_bytes(body[4..8].try_into().expect("4")) as usize;
                    if body[8] != 8 || body[12] != 0 {
                        return Err(format!(
                            "bit depth {} / interlace {} not read here",
                            body[8], body[12]
                        ));
                    }
                    bpp = match body[9] {
                        2 => 3,
                        6 => 4,
                        t => return Err(format!("colour type {t} not read here")),
                    };
                }
                b"IDAT" => idat.extend_from_slice(body),
                b"IEND" => break,
                _ => {}
            }
            pos += 12 + len;
        }
        if idat.len() < 2 {
            return Err("no image data".into());
        }
        let raw = inflate(&idat[2..])?;
        let stride = width * bpp;
        if raw.len() < height * (stride + 1) {
            return Err(format!(
                "{} bytes of pixels, {} expected",
                raw.len(),
                height * (stride + 1)
            ));
        }
        let mut data = vec![0u8; height * stride];
        for y in 0..height {
            let f = raw[y * (stride + 1)];
            let line = &raw[y * (stride + 1) + 1..(y + 1) * (stride + 1)];
            for i in 0..stride {
                let a = if i >= bpp {
                    data[y * stride + i - bpp] as i32
                } else {
                    0
                };
                let b = if y > 0 {
                    data[(y - 1) * stride + i] as i32
                } else {
                    0
                };
                let c = if y > 0 && i >= bpp {
                    data[(y - 1) * stride + i - bpp] as i32
                } else {
                    0
                };
                let pred = match f {
                    0 => 0,
                    1 => a,
                    2 => b,
                    3 => (a + b) / 2,
                    4 => {
                        let p = a + b - c;
                        let (pa, pb, pc) = ((p - a).abs(), (p - b).abs(), (p - c).abs());
                        if pa <= pb && pa <= pc {
                            a
                        } else if pb <= pc {
                            b
                        } else {
                            c
                        }
                    }
                    _ => return Err(format!("filter {f}")),
                };
                data[y * stride + i] = (line[i] as i32 + pred) as u8;
            }
        }
        Ok(Image {
            width,
            height,
            bpp,
            data,
        })
    }

    struct Bits<'a> {
        d: &'a [u8],
        pos: usize,
        buf: u32,
        cnt: u32,
    }

    impl Bits<'_> {
        fn need(&mut self, n: u32) -> Result<u32, String> {
            while self.cnt < n {
                let b = *self.d.get(self.pos).ok_or("out of data")?;
                self.pos += 1;
                self.buf |= (b as u32) << self.cnt;
                self.cnt += 8;
            }
            let v = self.buf & ((1u32 << n) - 1);
            self.buf = if n == 32 { 0 } else { self.buf >> n };
            self.cnt -= n;
            Ok(v)
        }
        fn decode(&mut self, h: &Huffman) -> Result<usize, String> {
            let (mut code, mut first, mut index) = (0i32, 0i32, 0i32);
            for len in 1..16 {
                code |= self.need(1)? as i32;
                let count = h.count[len] as i32;
                if code - count < first {
                    return Ok(h.symbol[(index + code - first) as usize] as usize);
                }
                index += count;
                first += count;
                first <<= 1;
                code <<= 1;
            }
            Err("bad code".into())
        }
    }

    struct Huffman {
        count: [u16; 16],
        symbol: Vec<u16>,
    }

    impl Huffman {
        fn new(lengths: &[u8]) -> Huffman {
            let mut count = [0u16; 16];
            for &l in lengths {
                count[l as usize] += 1;
            }
            count[0] = 0;
            let mut offs = [0u16; 16];
            for len in 1..15 {
                offs[len + 1] = offs[len] + count[len];
            }
            let mut symbol = vec![0u16; lengths.len()];
            for (s, &l) in lengths.iter().enumerate() {
                if l != 0 {
                    symbol[offs[l as usize] as usize] = s as u16;
                    offs[l as usize] += 1;
                }
            }
            Huffman { count, symbol }
        }
    }

    const LBASE: [u16; 29] = [
        3, 4, 5, 6, 7, 8, 9, 10, 11, 13, 15, 17, 19, 23, 27, 31, 35, 43, 51, 59, 67, 83, 99, 115,
        131, 163, 195, 227, 258,
    ];
    const LEXT: [u8; 29] = [
        0, 0, 0, 0, 0, 0, 0, 0, 1, 1, 1, 1, 2, 2, 2, 2, 3, 3, 3, 3, 4, 4, 4, 4, 5, 5, 5, 5, 0,
    ];
    const DBASE: [u16; 30] = [
        1, 2, 3, 4, 5, 7, 9, 13, 17, 25, 33, 49, 65, 97, 129, 193, 257, 385, 513, 769, 1025, 1537,
        2049, 3073, 4097, 6145, 8193, 12289, 16385, 24577,
    ];
    const DEXT: [u8; 30] = [
        0, 0, 0, 0, 1, 1, 2, 2, 3, 3, 4, 4, 5, 5, 6, 6, 7, 7, 8, 8, 9, 9, 10, 10, 11, 11, 12, 12,
        13, 13,
    ];

    /// Raw DEFLATE (RFC 1951).
    fn inflate(d: &[u8]) -> Result<Vec<u8>, String> {
        let mut s = Bits {
            d,
            pos: 0,
            buf: 0,
            cnt: 0,
        };
        let mut out = Vec::new();
        loop {
            let last = s.need(1)?;
            match s.need(2)? {
                0 => {
                    s.buf = 0;
                    s.cnt = 0;
                    let h = d.get(s.pos..s.pos + 4).ok_or("stored header")?;
                    let len = u16::from_le_bytes([h[0], h[1]]) as usize;
                    s.pos += 4;
                    out.extend_from_slice(d.get(s.pos..s.pos + len).ok_or("stored data")?);
                    s.pos += len;
                }
                1 => {
                    let mut l = [0u8; 288];
                    l[..144].fill(8);
                    l[144..256].fill(9);
                    l[256..280].fill(7);
                    l[280..].fill(8);
                    codes(
                        &mut s,
                        &mut out,
                        &Huffman::new(&l),
                        &Huffman::new(&[5u8; 30]),
                    )?;
                }
                2 => {
                    let nlen = s.need(5)? as usize + 257;
                    let ndist = s.need(5)? as usize + 1;
                    let ncode = s.need(4)? as usize + 4;
                    const ORDER: [usize; 19] = [
                        16, 17, 18, 0, 8, 7, 9, 6, 10, 5, 11, 4, 12, 3, 13, 2, 14, 1, 15,
                    ];
                    let mut cl = [0u8; 19];
                    for &o in ORDER.iter().take(ncode) {
                        cl[o] = s.need(3)? as u8;
                    }
                    let ch = Huffman::new(&cl);
                    let mut lengths = Vec::with_capacity(nlen + ndist);
                    while lengths.len() < nlen + ndist {
                        let sym = s.decode(&ch)?;
                        match sym {
                            0..=15 => lengths.push(sym as u8),
                            16 => {
                                let prev = *lengths.last().ok_or("repeat with nothing before")?;
                                for _ in 0..3 + s.need(2)? {
                                    lengths.push(prev);
                                }
                            }
                            17 => lengths.extend(std::iter::repeat_n(0, 3 + s.need(3)? as usize)),
                            _ => lengths.extend(std::iter::repeat_n(0, 11 + s.need(7)? as usize)),
                        }
                    }
                    if lengths.len() > nlen + ndist {
                        return Err("too many lengths".into());
                    }
                    codes(
                        &mut s,
                        &mut out,
                        &Huffman::new(&lengths[..nlen]),
                        &Huffman::new(&lengths[nlen..]),
                    )?;
                }
                _ => return Err("bad block type".into()),
            }
            if last == 1 {
                return Ok(out);
            }
        }
    }

    fn codes(
        s: &mut Bits<'_>,
        out: &mut Vec<u8>,
        lit: &Huffman,
        dist: &Huffman,
    ) -> Result<(), String> {
        loop {
            let sym = s.decode(lit)?;
            if sym < 256 {
                out.push(sym as u8);
            } else if sym == 256 {
                return Ok(());
            } else {
                let i = sym - 257;
                if i >= 29 {
                    return Err("bad length".into());
                }
                let len = LBASE[i] as usize + s.need(LEXT[i] as u32)? as usize;
                let di = s.decode(dist)?;
                if di >= 30 {
                    return Err("bad distance".into());
                }
                let back = DBASE[di] as usize + s.need(DEXT[di] as u32)? as usize;
                if back > out.len() {
                    return Err("distance too far".into());
                }
                let start = out.len() - back;
                for k in 0..len {
                    let b = out[start + k];
                    out.push(b);
                }
            }
        }
    }
}
