//! End-to-end tests of the report: the real binary runs the demo into a
//! temporary folder, then `yieldshift report DIR` writes report.html and
//! report.md from that folder's files. The tests read the report back and check
//! it against the run's own files: every catchment and strategy appears, every
//! number that names its source cell equals that cell (to the decimals shown),
//! every figure decodes (PNG) or parses (SVG), and the HTML refers to nothing
//! outside itself.

use std::collections::{BTreeMap, BTreeSet};
use std::path::{Path, PathBuf};
use std::process::{Command, Output};
use std::sync::OnceLock;

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_yieldshift"))
}

fn demo_scenario() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-data").join("scenario.toml")
}

fn ok(out: &Output, what: &str) {
    assert!(
        out.status.success(),
        "{what} failed ({:?}):\nstdout: {}\nstderr: {}",
        out.status.code(),
        String::from_utf8_lossy(&out.stdout),
        String::from_utf8_lossy(&out.stderr)
    );
}

/// One demo run per test binary, shared read-only; tests that change files copy it.
fn demo_run() -> &'static Path {
    static RUN: OnceLock<(tempfile::TempDir, PathBuf)> = OnceLock::new();
    let (_, dir) = RUN.get_or_init(|| {
        let tmp = tempfile::tempdir().unwrap();
        let dir = tmp.path().join("run");
        let out = bin().arg("run").arg(demo_scenario()).arg("--out").arg(&dir).arg("--quiet").output().unwrap();
        ok(&out, "yieldshift run");
        (tmp, dir)
    });
    dir
}

/// A run of the demo scenario without its `[ensemble]` section (same inputs otherwise).
fn run_without_ensemble(tmp: &Path) -> PathBuf {
    let src = demo_scenario();
    let data = src.parent().unwrap();
    let inputs = tmp.join("inputs");
    std::fs::create_dir_all(&inputs).unwrap();
    // Every table the scenario may name (catchments, climate, boundaries, …).
    for e in std::fs::read_dir(data).unwrap() {
        let p = e.unwrap().path();
        if p.is_file() && p.extension().is_some_and(|x| x != "toml") {
            std::fs::copy(&p, inputs.join(p.file_name().unwrap())).unwrap();
        }
    }
    let mut keep = true;
    let text: String = std::fs::read_to_string(&src)
        .unwrap()
        .lines()
        .filter(|l| {
            let t = l.trim_start();
            if t.starts_with('[') {
                keep = t != "[ensemble]";
            }
            keep
        })
        .map(|l| format!("{l}\n"))
        .collect();
    assert!(!text.contains("[ensemble]"));
    let scenario = inputs.join("scenario.toml");
    std::fs::write(&scenario, text).unwrap();
    let dir = tmp.join("run");
    ok(&bin().arg("run").arg(&scenario).arg("--out").arg(&dir).arg("--quiet").output().unwrap(), "run without ensemble");
    assert!(!dir.join("ensemble.csv").exists());
    dir
}

fn copy_dir(from: &Path, to: &Path) {
    std::fs::create_dir_all(to).unwrap();
    for e in std::fs::read_dir(from).unwrap() {
        let e = e.unwrap();
        let p = e.path();
        if p.is_dir() {
            copy_dir(&p, &to.join(e.file_name()));
        } else {
            std::fs::copy(&p, to.join(e.file_name())).unwrap();
        }
    }
}

/// A private copy of the demo run.
fn fresh_copy(name: &str) -> (tempfile::TempDir, PathBuf) {
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path().join(name);
    copy_dir(demo_run(), &dir);
    // A copy never carries an earlier report.
    for f in ["report.html", "report.md"] {
        let _ = std::fs::remove_file(dir.join(f));
    }
    (tmp, dir)
}

fn report(dir: &Path) -> Output {
    bin().arg("report").arg(dir).output().unwrap()
}

// ------------------------------------------------------------ reading back

fn unescape(s: &str) -> String {
    s.replace("&lt;", "<").replace("&gt;", ">").replace("&quot;", "\"").replace("&#39;", "'").replace("&amp;", "&")
}

/// A number the HTML shows with its source: (source, scale, shown text).
#[derive(Debug, Clone)]
struct Sourced {
    file: String,
    key: Vec<String>,
    column: String,
    scale: f64,
    text: String,
}

fn sourced_numbers(html: &str) -> Vec<Sourced> {
    let mut out = Vec::new();
    let mut rest = html;
    while let Some(i) = rest.find("<span class=\"n\" data-src=\"") {
        rest = &rest[i + "<span class=\"n\" data-src=\"".len()..];
        let end = rest.find('"').unwrap();
        let src = unescape(&rest[..end]);
        rest = &rest[end + 1..];
        let close = rest.find('>').unwrap();
        let attrs = &rest[..close];
        let scale = attrs.split("data-scale=\"").nth(1).map(|s| s.split('"').next().unwrap().parse::<f64>().unwrap()).unwrap_or(1.0);
        rest = &rest[close + 1..];
        let stop = rest.find("</span>").unwrap();
        let text = unescape(&rest[..stop]);
        let parts: Vec<&str> = src.split('|').collect();
        assert!(parts.len() >= 2, "source {src}");
        out.push(Sourced {
            file: parts[0].to_string(),
            key: parts[1..parts.len() - 1].iter().map(|s| s.to_string()).collect(),
            column: parts[parts.len() - 1].to_string(),
            scale,
            text,
        });
    }
    out
}

/// The shown number and its rounding tolerance (half a unit of the last decimal shown).
fn shown_value(text: &str) -> (f64, f64) {
    let t: String = text.replace('\u{2212}', "-").replace([',', '+'], "");
    let v: f64 = t.trim().parse().unwrap_or_else(|_| panic!("not a number as shown: {text:?}"));
    let decimals = t.split('.').nth(1).map_or(0, str::len) as i32;
    (v, 0.5 * 10f64.powi(-decimals))
}

struct CsvFile {
    headers: Vec<String>,
    rows: Vec<Vec<String>>,
}

fn read_csv(path: &Path) -> CsvFile {
    let mut rd = csv::Reader::from_path(path).unwrap();
    let headers = rd.headers().unwrap().iter().map(str::to_string).collect();
    let rows = rd.records().map(|r| r.unwrap().iter().map(str::to_string).collect()).collect();
    CsvFile { headers, rows }
}

impl CsvFile {
    fn col(&self, name: &str) -> usize {
        self.headers.iter().position(|h| h == name).unwrap_or_else(|| panic!("no column {name}"))
    }

    /// The cell of the row whose key columns equal `key`.
    fn cell(&self, key_cols: &[&str], key: &[String], column: &str) -> String {
        let kc: Vec<usize> = key_cols.iter().map(|k| self.col(k)).collect();
        let c = self.col(column);
        let row = self
            .rows
            .iter()
            .find(|r| kc.iter().zip(key).all(|(&i, k)| &r[i] == k))
            .unwrap_or_else(|| panic!("no row {key:?} ({key_cols:?})"));
        row[c].clone()
    }
}

fn json_at<'a>(v: &'a serde_json::Value, path: &str) -> &'a serde_json::Value {
    let mut cur = v;
    for k in path.split('.') {
        cur = match cur {
            serde_json::Value::Array(a) => {
                a.iter().find(|x| x.get("name").and_then(|n| n.as_str()) == Some(k)).unwrap_or_else(|| panic!("{path}"))
            }
            _ => cur.get(k).unwrap_or_else(|| panic!("{path}")),
        };
    }
    cur
}

/// Checks every sourced number of the HTML against its cell; returns how many per file.
fn check_sources(dir: &Path, html: &str) -> BTreeMap<String, usize> {
    let mut files: BTreeMap<String, CsvFile> = BTreeMap::new();
    let info: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(dir.join("run_info.json")).unwrap()).unwrap();
    let mut counts = BTreeMap::new();
    for s in sourced_numbers(html) {
        let (shown, tol) = shown_value(&s.text);
        let expected: f64 = if s.file == "run_info.json" {
            json_at(&info, &s.column).as_f64().unwrap()
        } else if s.file.ends_with(".toml") {
            let t: toml::Table = std::fs::read_to_string(dir.join(&s.file)).unwrap().parse().unwrap();
            let v = &t[&s.key[0]][&s.column];
            v.as_float().or(v.as_integer().map(|i| i as f64)).unwrap()
        } else {
            let key_cols: &[&str] = match s.file.as_str() {
                "summary.csv" => &["catchment", "scope", "strategy"],
                "yearly.csv" => &["catchment", "strategy", "year"],
                "nodes.csv" => &["node", "strategy", "year"],
                "delay.csv" => &["strategy", "delay_yr"],
                "ensemble.csv" => &["catchment", "scope", "strategy", "year", "variable"],
                "sensitivity.csv" => &["catchment", "strategy", "at", "parameter"],
                "economics.csv" => &["catchment", "scope", "strategy", "variable"],
                other => panic!("number sourced from an unexpected file {other}"),
            };
            let f = files.entry(s.file.clone()).or_insert_with(|| read_csv(&dir.join(&s.file)));
            let cell = f.cell(key_cols, &s.key, &s.column);
            cell.parse().unwrap_or_else(|_| panic!("{s:?}: the cell {cell:?} is not a number, yet the report shows one"))
        };
        let diff = (shown * s.scale - expected).abs();
        assert!(diff <= tol * s.scale.abs() * (1.0 + 1e-9) + 1e-9, "{s:?}: shows {shown} (×{}) but the file has {expected}", s.scale);
        *counts.entry(s.file).or_insert(0) += 1;
    }
    counts
}

// ------------------------------------------------------------ figure checks

/// Decodes a PNG; returns (width, height) and the variance of its grey levels.
fn png_stats(bytes: &[u8]) -> ((u32, u32), f64) {
    let dec = png::Decoder::new(std::io::Cursor::new(bytes));
    let mut r = dec.read_info().unwrap();
    let mut buf = vec![0; r.output_buffer_size()];
    let info = r.next_frame(&mut buf).unwrap();
    let ch = info.color_type.samples();
    let px = &buf[..info.buffer_size()];
    let n = (px.len() / ch) as f64;
    let grey: Vec<f64> = px.chunks(ch).map(|c| c.iter().take(3).map(|&v| v as f64).sum::<f64>() / c.len().min(3) as f64).collect();
    let mean = grey.iter().sum::<f64>() / n;
    let var = grey.iter().map(|g| (g - mean) * (g - mean)).sum::<f64>() / n;
    ((info.width, info.height), var)
}

/// A small XML well-formedness check: balanced, properly nested elements with one
/// root, quoted attributes, known or numeric entities, no stray `<` or `&`.
fn xml_well_formed(s: &str) -> Result<(), String> {
    let b = s.as_bytes();
    let mut i = 0;
    let mut stack: Vec<String> = Vec::new();
    let mut roots = 0;
    let is_name_start = |c: u8| c.is_ascii_alphabetic() || c == b'_' || c == b':';
    let is_name = |c: u8| c.is_ascii_alphanumeric() || matches!(c, b'_' | b':' | b'-' | b'.');
    let check_text = |t: &str| -> Result<(), String> {
        let mut rest = t;
        while let Some(p) = rest.find('&') {
            let after = &rest[p + 1..];
            let end = after.find(';').ok_or_else(|| format!("bare & near {:?}", &after[..after.len().min(20)]))?;
            let ent = &after[..end];
            let known = matches!(ent, "amp" | "lt" | "gt" | "quot" | "apos")
                || (ent.starts_with("#x") && ent.len() > 2 && ent[2..].chars().all(|c| c.is_ascii_hexdigit()))
                || (ent.starts_with('#') && ent.len() > 1 && ent[1..].chars().all(|c| c.is_ascii_digit()));
            if !known {
                return Err(format!("unknown entity &{ent};"));
            }
            rest = &after[end + 1..];
        }
        Ok(())
    };
    while i < b.len() {
        if b[i] != b'<' {
            let next = s[i..].find('<').map_or(b.len(), |p| i + p);
            let text = &s[i..next];
            check_text(text)?;
            if stack.is_empty() && !text.trim().is_empty() {
                return Err(format!("text outside the root element: {:?}", &text[..text.len().min(30)]));
            }
            i = next;
            continue;
        }
        let rest = &s[i..];
        if rest.starts_with("<?") {
            i += rest.find("?>").ok_or("unclosed <?")? + 2;
        } else if rest.starts_with("<!--") {
            i += rest.find("-->").ok_or("unclosed comment")? + 3;
        } else if rest.starts_with("<![CDATA[") {
            i += rest.find("]]>").ok_or("unclosed CDATA")? + 3;
        } else if rest.starts_with("<!") {
            i += rest.find('>').ok_or("unclosed declaration")? + 1;
        } else if rest.starts_with("</") {
            let end = rest.find('>').ok_or("unclosed end tag")?;
            let name = rest[2..end].trim();
            match stack.pop() {
                Some(open) if open == name => {}
                other => return Err(format!("</{name}> closes {other:?}")),
            }
            i += end + 1;
        } else {
            // Start tag: name, attributes, optional '/'.
            let mut j = i + 1;
            if j >= b.len() || !is_name_start(b[j]) {
                return Err(format!("bad tag start at byte {i}"));
            }
            while j < b.len() && is_name(b[j]) {
                j += 1;
            }
            let name = s[i + 1..j].to_string();
            loop {
                while j < b.len() && b[j].is_ascii_whitespace() {
                    j += 1;
                }
                if j >= b.len() {
                    return Err(format!("unclosed <{name}"));
                }
                if b[j] == b'>' || (b[j] == b'/' && b.get(j + 1) == Some(&b'>')) {
                    break;
                }
                if !is_name_start(b[j]) {
                    return Err(format!("bad attribute in <{name}> at byte {j}"));
                }
                while j < b.len() && is_name(b[j]) {
                    j += 1;
                }
                while j < b.len() && b[j].is_ascii_whitespace() {
                    j += 1;
                }
                if b.get(j) != Some(&b'=') {
                    return Err(format!("attribute without value in <{name}>"));
                }
                j += 1;
                while j < b.len() && b[j].is_ascii_whitespace() {
                    j += 1;
                }
                let q = *b.get(j).ok_or("truncated attribute")?;
                if q != b'"' && q != b'\'' {
                    return Err(format!("unquoted attribute in <{name}>"));
                }
                let vend = s[j + 1..].find(q as char).ok_or("unclosed attribute value")? + j + 1;
                let value = &s[j + 1..vend];
                if value.contains('<') {
                    return Err(format!("'<' in an attribute of <{name}>"));
                }
                check_text(value)?;
                j = vend + 1;
            }
            if b[j] == b'/' {
                j += 2;
                if stack.is_empty() {
                    roots += 1;
                }
            } else {
                j += 1;
                if stack.is_empty() {
                    roots += 1;
                }
                stack.push(name);
            }
            i = j;
        }
    }
    if !stack.is_empty() {
        return Err(format!("unclosed elements {stack:?}"));
    }
    if roots != 1 {
        return Err(format!("{roots} root elements"));
    }
    Ok(())
}

#[test]
fn the_xml_check_rejects_what_is_not_xml() {
    assert!(xml_well_formed("<?xml version=\"1.0\"?>\n<svg a=\"1\"><g><text>x &amp; y</text></g><path d='M0 0'/></svg>\n").is_ok());
    for bad in [
        "<svg><g></svg>",
        "<svg></g>",
        "<svg a=1></svg>",
        "<svg>a & b</svg>",
        "<svg></svg><svg></svg>",
        "<svg a=\"<\"></svg>",
        "<svg><text>&nbsp;</text></svg>",
        "<svg>",
    ] {
        assert!(xml_well_formed(bad).is_err(), "accepted {bad:?}");
    }
}

fn base64_decode(s: &str) -> Vec<u8> {
    let val = |c: u8| -> u32 {
        match c {
            b'A'..=b'Z' => (c - b'A') as u32,
            b'a'..=b'z' => (c - b'a' + 26) as u32,
            b'0'..=b'9' => (c - b'0' + 52) as u32,
            b'+' => 62,
            b'/' => 63,
            _ => panic!("not base64: {c}"),
        }
    };
    let mut out = Vec::new();
    for chunk in s.as_bytes().chunks(4) {
        let pad = chunk.iter().filter(|&&c| c == b'=').count();
        let n = chunk.iter().filter(|&&c| c != b'=').fold(0u32, |acc, &c| (acc << 6) | val(c)) << (6 * pad);
        let bytes = [(n >> 16) as u8, (n >> 8) as u8, n as u8];
        out.extend_from_slice(&bytes[..3 - pad]);
    }
    out
}

/// Every `src`/`href` value of the HTML.
fn references(html: &str) -> Vec<String> {
    let mut out = Vec::new();
    for attr in [" src=\"", " href=\"", " src='", " href='"] {
        let q = attr.chars().last().unwrap();
        let mut rest = html;
        while let Some(p) = rest.find(attr) {
            rest = &rest[p + attr.len()..];
            let end = rest.find(q).unwrap();
            out.push(rest[..end].to_string());
            rest = &rest[end..];
        }
    }
    out
}

// ------------------------------------------------------------ the tests

#[test]
fn report_of_the_demo_run_matches_its_files() {
    let (_tmp, dir) = fresh_copy("demo");
    let out = report(&dir);
    ok(&out, "yieldshift report");
    let html = std::fs::read_to_string(dir.join("report.html")).unwrap();
    let md = std::fs::read_to_string(dir.join("report.md")).unwrap();
    let summary = read_csv(&dir.join("summary.csv"));

    // Every catchment and strategy appears in both documents.
    let (cc, nc, sc) = (summary.col("catchment"), summary.col("name"), summary.col("strategy"));
    let scope = summary.col("scope");
    for r in &summary.rows {
        if r[cc] != "basin" {
            assert!(html.contains(&r[nc]) && md.contains(&r[nc]), "catchment {} missing", r[nc]);
            assert!(html.contains(&r[cc]) && md.contains(&r[cc]), "catchment id {} missing", r[cc]);
        }
        assert!(html.contains(&r[sc]) && md.contains(&r[sc]), "strategy {} missing", r[sc]);
    }

    // Every sourced number equals its cell; summary, yearly, delay, nodes and run_info are all used.
    let counts = check_sources(&dir, &html);
    for f in ["summary.csv", "yearly.csv", "delay.csv", "run_info.json", "ensemble.csv", "sensitivity.csv"] {
        assert!(counts.get(f).copied().unwrap_or(0) > 0, "no numbers from {f}: {counts:?}");
    }

    // The key numbers of every summary row are in the report, and the Markdown shows the same text.
    let sourced = sourced_numbers(&html);
    let mut key_cols: Vec<String> =
        summary.headers.iter().filter(|h| h.starts_with("yield_change_") || h.ends_with("_first_exceedance_year")).cloned().collect();
    key_cols.extend(["total_cost", "water_saved_m3", "levelised_cost_per_m3", "benefit_cost_ratio"].map(String::from));
    let mut checked = 0;
    for r in &summary.rows {
        for col in &key_cols {
            let cell = &r[summary.col(col)];
            let programme_col = ["total_cost", "water_saved_m3", "levelised_cost_per_m3", "benefit_cost_ratio"].contains(&col.as_str());
            if cell.is_empty() || (programme_col && r[sc] == "no-control") {
                continue;
            }
            let hits: Vec<&Sourced> = sourced
                .iter()
                .filter(|s| s.file == "summary.csv" && s.key == [r[cc].clone(), r[scope].clone(), r[sc].clone()] && &s.column == col)
                .collect();
            assert!(!hits.is_empty(), "{}/{}: {col} = {cell} is not in the report", r[cc], r[sc]);
            for h in hits {
                assert!(md.contains(&h.text), "Markdown lacks {:?} ({}/{}/{col})", h.text, r[cc], r[sc]);
            }
            checked += 1;
        }
    }
    assert!(checked > 100, "only {checked} key numbers checked");

    // Methods, cautions, references.
    assert!(html.contains("ET/P = (1 + w·E0/P) / (1 + w·E0/P + P/E0)"), "Zhang's equation");
    for phrase in [
        "Screening-level estimate",
        "Mean-annual curves ignore storage",
        "Not a substitute for a site hydrological assessment",
        "Defer to local regulation and qualified practitioners",
    ] {
        assert!(html.contains(phrase) && md.contains(phrase), "{phrase}");
    }
    assert!(html.contains("Water Resources Research, 37(3), 701–708"));

    // Self-contained HTML: no network references; every image is an embedded PNG of full size.
    let refs = references(&html);
    assert!(refs.iter().all(|r| !r.starts_with("http:") && !r.starts_with("https:") && !r.starts_with("//")), "{refs:?}");
    assert!(!html.contains("http://") && !html.contains("https://"));
    assert!(!html.contains("url("), "no external style resources");
    let images: Vec<&String> = refs.iter().filter(|r| r.starts_with("data:")).collect();
    assert!(images.len() >= 30, "{} embedded images", images.len());
    assert!(html.matches("<img ").count() == images.len(), "every image is embedded");
    for r in refs.iter().filter(|r| !r.starts_with("data:")) {
        assert!(r.starts_with('#'), "only in-page links: {r}");
    }
    // Each figure embedded as a self-contained SVG or as a PNG at report resolution.
    for img in images {
        if let Some(b64) = img.strip_prefix("data:image/png;base64,") {
            let (size, var) = png_stats(&base64_decode(b64));
            assert_eq!(size.0, yieldshift::report::embed::EMBED_WIDTH_PX);
            assert!(var > 50.0, "an embedded figure looks blank");
        } else {
            let b64 = img.strip_prefix("data:image/svg+xml;base64,").expect("PNG or SVG data URI");
            let svg = String::from_utf8(base64_decode(b64)).unwrap();
            xml_well_formed(&svg).unwrap();
            assert!(svg.contains("<text") && !svg.contains("href=\"http"), "an embedded SVG with text, fetching nothing");
        }
    }
    // Small enough to e-mail.
    let bytes = std::fs::metadata(dir.join("report.html")).unwrap().len();
    assert!(bytes < yieldshift::report::MAX_HTML_BYTES, "report.html is {bytes} bytes");

    // The report's own figures were drawn, and the Markdown links figures that exist.
    for stem in ["basin_budyko_space", "basin_yield_change_by_catchment"] {
        assert!(dir.join("figures").join(format!("{stem}.png")).is_file(), "{stem}.png");
        assert!(dir.join("figures").join(format!("{stem}.svg")).is_file(), "{stem}.svg");
    }
    let mut links = 0;
    for part in md.split("](figures/").skip(1) {
        let name = part.split(')').next().unwrap();
        assert!(dir.join("figures").join(name).is_file(), "{name}");
        links += 1;
    }
    assert!(links >= 30, "{links} figure links");
}

#[test]
fn every_figure_decodes_at_full_size_and_every_svg_is_xml() {
    let (_tmp, dir) = fresh_copy("figs");
    ok(&report(&dir), "yieldshift report");
    let mut pngs = 0;
    let mut svgs = 0;
    for e in std::fs::read_dir(dir.join("figures")).unwrap() {
        let p = e.unwrap().path();
        match p.extension().and_then(|e| e.to_str()) {
            Some("png") => {
                let (size, var) = png_stats(&std::fs::read(&p).unwrap());
                assert_eq!(size, yieldshift::plot::SIZE, "{}", p.display());
                assert!(size.0 >= 2000, "{}: at least 2000 px wide", p.display());
                assert!(var > 50.0, "{} looks blank (grey variance {var})", p.display());
                pngs += 1;
            }
            Some("svg") => {
                let text = std::fs::read_to_string(&p).unwrap();
                if let Err(e) = xml_well_formed(&text) {
                    panic!("{}: {e}", p.display());
                }
                assert!(text.contains("<text"), "{}: has text", p.display());
                svgs += 1;
            }
            _ => {}
        }
    }
    assert_eq!(pngs, svgs);
    assert!(pngs >= 40, "{pngs} figures: the run's and the report's");
}

#[test]
fn ensemble_ranges_distributions_and_sensitivity_come_from_the_run() {
    let (_tmp, dir) = fresh_copy("ens");
    ok(&report(&dir), "yieldshift report");
    let html = std::fs::read_to_string(dir.join("report.html")).unwrap();
    let md = std::fs::read_to_string(dir.join("report.md")).unwrap();
    let counts = check_sources(&dir, &html);
    // Ranges at 10/20/50 years and the horizon for 6 catchments × 4 strategies (both ends).
    assert!(counts.get("ensemble.csv").copied().unwrap_or(0) >= 2 * 4 * 6 * 4, "ranges shown: {counts:?}");
    assert!(counts.get("sensitivity.csv").copied().unwrap_or(0) >= 2 * 2 * 4, "ranking shown: {counts:?}");

    // The basin ranking appears in rank order, as sensitivity.csv has it.
    let sens = read_csv(&dir.join("sensitivity.csv"));
    let (c, at, p, rk) = (sens.col("catchment"), sens.col("at"), sens.col("parameter"), sens.col("rank"));
    let section = &html[html.find("Sensitivity</h3>").expect("sensitivity section")..];
    for when in ["year-20", "horizon"] {
        let mut rows: Vec<&Vec<String>> = sens.rows.iter().filter(|r| r[c] == "basin" && r[at] == when).collect();
        assert!(rows.len() >= 2, "{when}");
        rows.sort_by_key(|r| r[rk].parse::<u32>().unwrap());
        let marker = format!("|basin|no-control|{when}|");
        let order: Vec<&str> = section
            .split("data-src=\"sensitivity.csv")
            .skip(1)
            .filter(|x| x.starts_with(&marker) && x[marker.len()..].split('"').next().unwrap().ends_with("|rank"))
            .map(|x| x[marker.len()..].split('|').next().unwrap())
            .collect();
        let expected: Vec<&str> = rows.iter().map(|r| r[p].as_str()).collect();
        assert_eq!(order, expected, "ranking at {when}");
    }

    // Every distribution of the scenario, in its natural parameter order.
    for d in [
        "pert: min 1.5, mode 2.0, max 2.5",
        "uniform: min 0.35, max 0.7 (drawn independently for each catchment)",
        "triangular: min 0.04, mode 0.06, max 0.08",
        "normal: mean 12, sd 2, min 6, max 20",
    ] {
        assert!(html.contains(d) && md.contains(d), "distribution {d:?}");
    }
    assert!(!html.contains("no ensemble.csv"));
    for stem in [
        "basin_sensitivity_year-20",
        "basin_sensitivity_horizon",
        "corvisk_yield_range",
        "corvisk_nitrate_n_range",
        "corvisk_total_p_range",
    ] {
        let (size, var) = png_stats(&std::fs::read(dir.join("figures").join(format!("{stem}.png"))).unwrap());
        assert_eq!(size, yieldshift::plot::SIZE);
        assert!(var > 50.0, "{stem}");
        assert!(xml_well_formed(&std::fs::read_to_string(dir.join("figures").join(format!("{stem}.svg"))).unwrap()).is_ok(), "{stem}.svg");
        assert!(md.contains(&format!("figures/{stem}.png")), "{stem} is in the report");
    }
}

#[test]
fn without_an_ensemble_the_report_says_there_are_no_ranges() {
    let tmp = tempfile::tempdir().unwrap();
    let dir = run_without_ensemble(tmp.path());
    ok(&report(&dir), "yieldshift report");
    let html = std::fs::read_to_string(dir.join("report.html")).unwrap();
    assert!(html.contains("no ensemble.csv"));
    assert!(html.contains("no sensitivity.csv"));
    let counts = check_sources(&dir, &html);
    assert!(!counts.contains_key("ensemble.csv"));
    let names: Vec<String> =
        std::fs::read_dir(dir.join("figures")).unwrap().map(|e| e.unwrap().file_name().to_string_lossy().into_owned()).collect();
    assert!(!names.iter().any(|n| n.starts_with("basin_sensitivity_") || n.ends_with("_range.png")), "{names:?}");
    // The scenario still states its distributions; the single run used their central values.
    assert!(html.contains("triangular: min 0.04, mode 0.06, max 0.08"));
}

fn expect_invalid(dir: &Path, needles: &[&str]) {
    let out = report(dir);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "exit code; stderr: {err}");
    for n in needles {
        assert!(err.contains(n), "stderr lacks {n:?}: {err}");
    }
    assert!(!err.contains("panicked"), "{err}");
}

#[test]
fn a_folder_missing_its_files_is_invalid_input_naming_them() {
    let tmp = tempfile::tempdir().unwrap();
    expect_invalid(&tmp.path().join("nowhere"), &["nowhere", "not a folder"]);
    let (_t, dir) = fresh_copy("partial");
    std::fs::remove_file(dir.join("summary.csv")).unwrap();
    std::fs::remove_file(dir.join("run_info.json")).unwrap();
    expect_invalid(&dir, &["summary.csv", "run_info.json", "missing"]);
}

#[test]
fn hand_edited_files_give_located_errors_not_panics() {
    // A word where a number belongs: file, row and column named.
    let (_t, dir) = fresh_copy("edited");
    let p = dir.join("summary.csv");
    let text = std::fs::read_to_string(&p).unwrap();
    let mut lines: Vec<String> = text.lines().map(str::to_string).collect();
    let header: Vec<&str> = lines[0].split(',').collect();
    let col = header.iter().position(|h| *h == "total_cost").unwrap();
    let mut row3: Vec<String> = lines[2].split(',').map(str::to_string).collect();
    row3[col] = "lots".into();
    lines[2] = row3.join(",");
    std::fs::write(&p, lines.join("\n") + "\n").unwrap();
    expect_invalid(&dir, &["summary.csv", "row 3", "total_cost", "'lots' is not a number"]);

    // A truncated row in yearly.csv.
    let (_t2, dir2) = fresh_copy("truncated");
    let p = dir2.join("yearly.csv");
    let text = std::fs::read_to_string(&p).unwrap();
    let cut: String = text.lines().take(5).map(|l| format!("{l}\n")).collect::<String>() + "skelvane,no-control,2031,1700\n";
    std::fs::write(&p, cut).unwrap();
    expect_invalid(&dir2, &["yearly.csv", "row 6", "fields"]);

    // run_info.json that is not JSON.
    let (_t3, dir3) = fresh_copy("badjson");
    std::fs::write(dir3.join("run_info.json"), "{ \"title\": ").unwrap();
    expect_invalid(&dir3, &["run_info.json", "not valid JSON"]);

    // Percentiles out of order in ensemble.csv.
    let (_t4, dir4) = fresh_copy("badens");
    std::fs::write(dir4.join("ensemble.csv"), "catchment,strategy,year,variable,p5,p25,p50,p75,p95,mean,members,prob_above_guideline\nskelvane,no-control,2037,yield_mm,5,4,3,2,1,3,10,\n").unwrap();
    expect_invalid(&dir4, &["ensemble.csv", "row 2", "p5 ≤ p25"]);
}

#[test]
fn report_is_a_pure_function_of_the_folder() {
    let (_t, dir) = fresh_copy("twice");
    ok(&report(&dir), "first report");
    let first = std::fs::read_to_string(dir.join("report.md")).unwrap();
    let first_html = std::fs::read_to_string(dir.join("report.html")).unwrap();
    ok(&report(&dir), "second report");
    assert_eq!(first, std::fs::read_to_string(dir.join("report.md")).unwrap());
    assert_eq!(first_html, std::fs::read_to_string(dir.join("report.html")).unwrap());
}

#[test]
fn an_svg_only_run_gets_svg_figures_embedded() {
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path().join("svg");
    let out = bin().arg("run").arg(demo_scenario()).arg("--out").arg(&dir).args(["--figure-format", "svg", "--quiet"]).output().unwrap();
    ok(&out, "yieldshift run --figure-format svg");
    ok(&report(&dir), "yieldshift report");
    let names: Vec<String> =
        std::fs::read_dir(dir.join("figures")).unwrap().map(|e| e.unwrap().file_name().to_string_lossy().into_owned()).collect();
    assert!(!names.iter().any(|n| n.ends_with(".png")), "the report keeps to the run's formats: {names:?}");
    assert!(names.iter().any(|n| n == "basin_budyko_space.svg"));
    let html = std::fs::read_to_string(dir.join("report.html")).unwrap();
    let images: Vec<String> = references(&html).into_iter().filter(|r| r.starts_with("data:")).collect();
    assert!(images.len() >= 30, "{} images", images.len());
    for img in images {
        let b64 = img.strip_prefix("data:image/svg+xml;base64,").expect("SVG data URI");
        let svg = String::from_utf8(base64_decode(b64)).unwrap();
        if let Err(e) = xml_well_formed(&svg) {
            panic!("an embedded SVG is not XML: {e}");
        }
    }
}

/// The HTML between the heading `<h2 …>…title</h2>` and the next `<h2`.
fn h2_section<'a>(html: &'a str, title: &str) -> &'a str {
    let start = html.find(&format!("{title}</h2>")).unwrap_or_else(|| panic!("no section {title}"));
    let rest = &html[start..];
    &rest[..rest[5..].find("<h2").map_or(rest.len(), |e| e + 5)]
}

#[test]
fn the_report_opens_with_an_executive_summary_of_what_reaches_the_nodes() {
    let html = std::fs::read_to_string(demo_run().join("report.html")).unwrap();
    let first = html.split("<h2").nth(1).expect("a section");
    assert!(first.contains("Executive summary</h2>"), "first section: {}", &first[..first.len().min(120)]);
    let exec = h2_section(&html, "Executive summary");
    // Every number of the section equals its cell.
    let counts = check_sources(demo_run(), exec);
    for f in ["nodes.csv", "summary.csv", "delay.csv", "run_info.json", "ensemble.csv"] {
        assert!(counts.get(f).copied().unwrap_or(0) > 0, "no numbers from {f}: {counts:?}");
    }
    // Each receiving node's change at 20 and 50 years is the 10-year mean of what
    // arrives there (its arriving row of summary.csv, which tests/multi_intake.rs
    // recomputes from nodes.csv), and the node's own local row is not used.
    let nodes = read_csv(&demo_run().join("nodes.csv"));
    let (nc, sc, yc) = (nodes.col("node"), nodes.col("strategy"), nodes.col("year"));
    let ids: BTreeSet<String> = nodes.rows.iter().filter(|r| r[sc] == "no-control").map(|r| r[nc].clone()).collect();
    assert!(ids.contains("quessendale-lower"), "the demo's intake is a node");
    let sourced = sourced_numbers(exec);
    for id in &ids {
        for year in ["2047", "2077"] {
            assert!(nodes.rows.iter().any(|r| &r[nc] == id && r[yc] == year));
            let column = if year == "2047" { "yield_change_20y_pct" } else { "yield_change_50y_pct" };
            let hit = sourced
                .iter()
                .find(|s| s.file == "summary.csv" && s.key == [id.clone(), "arriving".into(), "no-control".into()] && s.column == column);
            assert!(hit.is_some(), "{id} {year}: no arriving yield change in the executive summary");
        }
        assert!(
            !sourced
                .iter()
                .any(|s| s.file == "summary.csv" && s.key.first() == Some(id) && s.key.get(1).map(String::as_str) == Some("local")),
            "{id}: the executive summary uses the node catchment's local row"
        );
    }
    assert!(exec.contains("guideline"), "guideline status");
    assert!(exec.contains("levelised cost") && exec.contains("years later"), "best programme and delay");
    assert!(exec.contains("Not a substitute for a site hydrological assessment"), "cautions");
    let md = std::fs::read_to_string(demo_run().join("report.md")).unwrap();
    assert!(md.find("Executive summary").unwrap() < md.find("Scenario summary").unwrap());
}

#[test]
fn a_report_with_png_figures_only_embeds_them_at_report_resolution_under_the_size_limit() {
    let (_tmp, dir) = fresh_copy("pngonly");
    for e in std::fs::read_dir(dir.join("figures")).unwrap() {
        let p = e.unwrap().path();
        if p.extension().is_some_and(|x| x == "svg") {
            std::fs::remove_file(p).unwrap();
        }
    }
    ok(&report(&dir), "yieldshift report");
    let html = std::fs::read_to_string(dir.join("report.html")).unwrap();
    assert!((html.len() as u64) < yieldshift::report::MAX_HTML_BYTES, "report.html is {} bytes", html.len());
    let images: Vec<String> = references(&html).into_iter().filter(|r| r.starts_with("data:")).collect();
    assert!(images.len() >= 30);
    for img in images {
        let b64 = img.strip_prefix("data:image/png;base64,").expect("only PNG figures are there");
        let ((w, h), var) = png_stats(&base64_decode(b64));
        assert_eq!((w, h), (yieldshift::report::embed::EMBED_WIDTH_PX, 750));
        assert!(var > 50.0, "an embedded figure looks blank");
    }
    // The files in figures/ keep their full size.
    let (size, _) = png_stats(&std::fs::read(dir.join("figures").join("basin_budyko_space.png")).unwrap());
    assert_eq!(size, yieldshift::plot::SIZE);
}

#[test]
fn report_catchments_limits_the_pages_to_the_most_affected_and_names_the_rest() {
    let (_tmp, dir) = fresh_copy("pages");
    let out = bin().arg("report").arg(&dir).arg("--report-catchments").arg("2").output().unwrap();
    ok(&out, "yieldshift report --report-catchments 2");
    let html = std::fs::read_to_string(dir.join("report.html")).unwrap();
    let summary = read_csv(&dir.join("summary.csv"));
    let (cc, nc, sc, hc) =
        (summary.col("catchment"), summary.col("name"), summary.col("strategy"), summary.col("yield_change_horizon_pct"));
    let scope = summary.col("scope");
    let mut rows: Vec<&Vec<String>> = summary.rows.iter().filter(|r| r[sc] == "no-control" && r[scope] == "local").collect();
    rows.sort_by(|a, b| a[hc].parse::<f64>().unwrap().total_cmp(&b[hc].parse::<f64>().unwrap()));
    let note = html.split("<p>Pages follow for the 2 catchments").nth(1).expect("the note on pages").split("</p>").next().unwrap();
    for (k, r) in rows.iter().enumerate() {
        let page = format!("</span>{}</h4>", unescape_name(&r[nc]));
        if k < 2 {
            assert!(html.contains(&page), "{} has its page", r[nc]);
            assert!(!note.contains(&format!("<code>{}</code>", r[cc])), "{} is not left out", r[cc]);
        } else {
            assert!(!html.contains(&page), "{} has no page", r[nc]);
            assert!(note.contains(&format!("<code>{}</code>", r[cc])), "{} is named as left out", r[cc]);
        }
    }
    assert!(note.contains("--report-catchments all"), "how to get every page");
    // All pages: no note; a word that is not a number is a usage error.
    ok(&bin().arg("report").arg(&dir).arg("--report-catchments").arg("all").output().unwrap(), "all");
    let html = std::fs::read_to_string(dir.join("report.html")).unwrap();
    assert!(!html.contains("left out:"));
    let bad = bin().arg("report").arg(&dir).arg("--report-catchments").arg("some").output().unwrap();
    assert_eq!(bad.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&bad.stderr).contains("not a number of catchments"));
}

fn unescape_name(s: &str) -> String {
    yieldshift::report::html::escape(s)
}

#[test]
fn sensitivity_names_parameters_for_readers_and_keeps_the_key_path() {
    let sens = read_csv(&demo_run().join("sensitivity.csv"));
    let (p, l) = (sens.col("parameter"), sens.col("label"));
    assert!(sens.rows.iter().all(|r| !r[l].is_empty()));
    assert!(sens.rows.iter().any(|r| r[p] == "invasion.spread_rate_per_yr" && r[l] == "spread_rate_per_yr (invasion)"));
    let html = std::fs::read_to_string(demo_run().join("report.html")).unwrap();
    let section = h2_section(&html, "Results");
    assert!(
        section.contains("spread_rate_per_yr (invasion) (<code>invasion.spread_rate_per_yr</code>)"),
        "label and path in the ranking table"
    );
}
