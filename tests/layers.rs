//! The library's layers only point down, and sibling modules form no cycle.
//!
//! Reads every `.rs` file under `src/`, collects the crate paths it names in code
//! (`crate::a::b`, `super::x`, `yieldshift::a`; comments and string literals are
//! skipped) and checks:
//!
//! 1. each top-level module imports only from layers below it (the table in
//!    `LAYERS`, also in `src/lib.rs` and `DEVELOPERS.md`);
//! 2. no two sibling modules import each other, directly or through other
//!    siblings (a cycle inside one folder);
//! 3. the model core names no crate beyond `std`, `rand`, `rand_chacha`, `statrs`;
//! 4. `anyhow` and the `yieldshift::` paths of the binary appear only in the
//!    binary (`src/main.rs`, `src/cli/`).

use std::collections::{BTreeMap, BTreeSet};
use std::path::{Path, PathBuf};

/// Top-level modules by layer: a module may import from its own layer's module
/// and from lower layers only.
const LAYERS: [(&str, usize); 9] =
    [("model", 0), ("schema", 1), ("error", 1), ("input", 2), ("output", 3), ("plot", 4), ("report", 5), ("run", 6), ("cli", 7)];

/// Crates other than `std` the model core may name.
const MODEL_CRATES: [&str; 3] = ["rand", "rand_chacha", "statrs"];

/// Crates the rest of the library uses, which the model must not.
const OTHER_CRATES: [&str; 14] = [
    "serde",
    "serde_json",
    "csv",
    "toml",
    "plotters",
    "ttf_noto_sans",
    "thiserror",
    "anyhow",
    "strsim",
    "rayon",
    "indicatif",
    "geo",
    "geojson",
    "clap",
];

fn src_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("src")
}

fn rust_files(dir: &Path, out: &mut Vec<PathBuf>) {
    for e in std::fs::read_dir(dir).unwrap() {
        let p = e.unwrap().path();
        if p.is_dir() {
            rust_files(&p, out);
        } else if p.extension().is_some_and(|x| x == "rs") {
            out.push(p);
        }
    }
}

/// Module path of a file: `src/run/ensemble.rs` → `["run", "ensemble"]`,
/// `src/input/gis/mod.rs` → `["input", "gis"]`, `src/lib.rs` → `[]`.
fn module_of(file: &Path) -> Vec<String> {
    let rel = file.strip_prefix(src_dir()).unwrap();
    let mut parts: Vec<String> = rel.iter().map(|c| c.to_string_lossy().into_owned()).collect();
    let last = parts.pop().unwrap();
    let stem = last.trim_end_matches(".rs");
    if !matches!(stem, "mod" | "lib" | "main") {
        parts.push(stem.to_string());
    }
    parts
}

/// The code of a file with comments, string and char literals blanked out.
fn code_only(text: &str) -> String {
    let b = text.as_bytes();
    let mut out = String::with_capacity(text.len());
    let mut i = 0;
    while i < b.len() {
        if b[i] == b'/' && b.get(i + 1) == Some(&b'/') {
            while i < b.len() && b[i] != b'\n' {
                i += 1;
            }
        } else if b[i] == b'/' && b.get(i + 1) == Some(&b'*') {
            i += 2;
            while i + 1 < b.len() && !(b[i] == b'*' && b[i + 1] == b'/') {
                i += 1;
            }
            i += 2;
        } else if b[i] == b'r' && (b.get(i + 1) == Some(&b'"') || b.get(i + 1) == Some(&b'#')) && !is_ident(b.get(i.wrapping_sub(1))) {
            // Raw string r"..." or r#"..."#.
            let mut j = i + 1;
            let mut hashes = 0;
            while b.get(j) == Some(&b'#') {
                hashes += 1;
                j += 1;
            }
            if b.get(j) != Some(&b'"') {
                out.push(b[i] as char);
                i += 1;
                continue;
            }
            j += 1;
            loop {
                if j >= b.len() {
                    break;
                }
                if b[j] == b'"' && (0..hashes).all(|h| b.get(j + 1 + h) == Some(&b'#')) {
                    j += 1 + hashes;
                    break;
                }
                j += 1;
            }
            out.push_str("\"\"");
            i = j;
        } else if b[i] == b'"' {
            i += 1;
            while i < b.len() && b[i] != b'"' {
                if b[i] == b'\\' {
                    i += 1;
                }
                i += 1;
            }
            i += 1;
            out.push_str("\"\"");
        } else if b[i] == b'\'' && b.get(i + 2) == Some(&b'\'') {
            out.push_str("' '");
            i += 3;
        } else if b[i] == b'\'' && b.get(i + 1) == Some(&b'\\') {
            let mut j = i + 2;
            while j < b.len() && b[j] != b'\'' {
                j += 1;
            }
            out.push_str("' '");
            i = j + 1;
        } else {
            let len = utf8_len(b[i]);
            out.push_str(&text[i..i + len]);
            i += len;
        }
    }
    out
}

fn utf8_len(first: u8) -> usize {
    match first {
        0xF0..=0xFF => 4,
        0xE0..=0xEF => 3,
        0xC0..=0xDF => 2,
        _ => 1,
    }
}

fn is_ident(c: Option<&u8>) -> bool {
    c.is_some_and(|c| c.is_ascii_alphanumeric() || *c == b'_')
}

/// Every path that starts with `root::` in `code`, as its segments after `root`
/// (up to three); braces of grouped imports are expanded one level.
fn paths_after(code: &str, root: &str) -> Vec<Vec<String>> {
    let mut out = Vec::new();
    let pat = format!("{root}::");
    let b = code.as_bytes();
    let mut start = 0;
    while let Some(k) = code[start..].find(&pat) {
        let at = start + k;
        start = at + pat.len();
        if at > 0 && (is_ident(b.get(at - 1)) || b[at - 1] == b':') {
            continue;
        }
        let rest = &code[start..];
        let segs: Vec<String> = rest
            .split("::")
            .take(3)
            .map(|s| s.chars().take_while(|c| c.is_ascii_alphanumeric() || *c == '_').collect::<String>())
            .take_while(|s| !s.is_empty())
            .collect();
        if let Some(group) = rest.strip_prefix('{') {
            // `crate::{a, b::c}`: one path per item.
            let inner: String = group.chars().take_while(|c| *c != '}').collect();
            for item in inner.split(',') {
                let first: String = item.trim().chars().take_while(|c| c.is_ascii_alphanumeric() || *c == '_').collect();
                if !first.is_empty() {
                    out.push(vec![first]);
                }
            }
        } else if !segs.is_empty() {
            out.push(segs);
        }
    }
    out
}

struct Source {
    module: Vec<String>,
    file: PathBuf,
    code: String,
}

fn sources() -> Vec<Source> {
    let mut files = Vec::new();
    rust_files(&src_dir(), &mut files);
    files.sort();
    files
        .into_iter()
        .map(|f| {
            let text = std::fs::read_to_string(&f).unwrap();
            Source { module: module_of(&f), code: code_only(&text), file: f }
        })
        .collect()
}

fn layer_of(top: &str) -> Option<usize> {
    LAYERS.iter().find(|(m, _)| *m == top).map(|&(_, l)| l)
}

fn is_binary(s: &Source) -> bool {
    s.file.ends_with("main.rs") || s.module.first().is_some_and(|m| m == "cli")
}

#[test]
fn every_top_level_module_has_a_layer() {
    for s in sources() {
        if let Some(top) = s.module.first() {
            assert!(layer_of(top).is_some(), "{}: module `{top}` is not in LAYERS (tests/layers.rs)", s.file.display());
        }
    }
}

#[test]
fn nothing_imports_from_a_layer_above_it() {
    let mut bad = Vec::new();
    for s in sources() {
        let Some(top) = s.module.first() else { continue };
        if is_binary(&s) {
            continue;
        }
        let own = layer_of(top).unwrap();
        for p in paths_after(&s.code, "crate") {
            let target = &p[0];
            // `crate::Error`, `crate::Result`, `crate::Problem`: the error module's re-exports.
            let target_layer = match target.as_str() {
                "Error" | "Result" | "Problem" => Some(1),
                t => layer_of(t),
            };
            if let Some(l) = target_layer {
                if l > own {
                    bad.push(format!("{}: `{top}` (layer {own}) names crate::{} (layer {l})", s.file.display(), p.join("::")));
                }
            }
        }
    }
    assert!(bad.is_empty(), "upward imports:\n{}", bad.join("\n"));
}

/// Sibling modules (files of one folder, the folder's `mod.rs` left out) must not
/// import each other in a cycle.
#[test]
fn sibling_modules_form_no_cycle() {
    let all = sources();
    let modules: BTreeSet<Vec<String>> = all.iter().map(|s| s.module.clone()).collect();
    // Edges between modules that share a parent.
    let mut edges: BTreeMap<Vec<String>, BTreeSet<Vec<String>>> = BTreeMap::new();
    for s in &all {
        if s.module.is_empty() {
            continue;
        }
        let parent = &s.module[..s.module.len() - 1];
        let mut targets: Vec<Vec<String>> = Vec::new();
        for p in paths_after(&s.code, "crate") {
            targets.push(p);
        }
        for p in paths_after(&s.code, "super") {
            let mut t = parent.to_vec();
            t.extend(p);
            targets.push(t);
        }
        for t in targets {
            // The longest module that is a prefix of the path.
            let Some(m) = (1..=t.len()).rev().map(|n| t[..n].to_vec()).find(|m| modules.contains(m)) else { continue };
            if m.len() == s.module.len() && m[..m.len() - 1] == *parent && m != s.module {
                edges.entry(s.module.clone()).or_default().insert(m.clone());
            }
            // An import of a sibling's child counts as an import of the sibling.
            if m.len() > s.module.len() && m[..s.module.len() - 1] == *parent && m[..s.module.len()] != s.module[..] {
                edges.entry(s.module.clone()).or_default().insert(m[..s.module.len()].to_vec());
            }
        }
    }
    let mut cycles = Vec::new();
    for start in edges.keys() {
        // Depth-first search for a path back to `start`.
        let mut stack = vec![(start.clone(), vec![start.join("::")])];
        let mut seen = BTreeSet::new();
        while let Some((m, path)) = stack.pop() {
            for n in edges.get(&m).into_iter().flatten() {
                if n == start {
                    cycles.push(format!("{} -> {}", path.join(" -> "), start.join("::")));
                } else if seen.insert(n.clone()) {
                    let mut p = path.clone();
                    p.push(n.join("::"));
                    stack.push((n.clone(), p));
                }
            }
        }
    }
    assert!(cycles.is_empty(), "import cycles between sibling modules:\n{}", cycles.join("\n"));
}

#[test]
fn the_model_core_names_no_crate_beyond_std_rand_and_statrs() {
    let mut bad = Vec::new();
    for s in sources().into_iter().filter(|s| s.module.first().is_some_and(|m| m == "model")) {
        for c in OTHER_CRATES.iter().chain(["yieldshift"].iter()) {
            if !paths_after(&s.code, c).is_empty() {
                bad.push(format!("{} names `{c}`", s.file.display()));
            }
        }
        for p in paths_after(&s.code, "crate") {
            if p[0] != "model" {
                bad.push(format!("{} names crate::{}", s.file.display(), p.join("::")));
            }
        }
    }
    assert!(bad.is_empty(), "the model core may use std, {MODEL_CRATES:?} and itself only:\n{}", bad.join("\n"));
}

#[test]
fn anyhow_and_the_command_line_live_in_the_binary_only() {
    let mut bad = Vec::new();
    for s in sources().into_iter().filter(|s| !is_binary(s)) {
        if !paths_after(&s.code, "anyhow").is_empty() || s.code.contains("anyhow!") {
            bad.push(format!("{} uses anyhow", s.file.display()));
        }
        if !paths_after(&s.code, "clap").is_empty() {
            bad.push(format!("{} uses clap", s.file.display()));
        }
    }
    let lib = std::fs::read_to_string(src_dir().join("lib.rs")).unwrap();
    assert!(!code_only(&lib).contains("mod cli"), "src/lib.rs declares the cli module");
    assert!(bad.is_empty(), "{}", bad.join("\n"));
}

#[test]
fn the_checker_sees_imports() {
    // The scanner must find what it is meant to find, or every test above passes vacuously.
    let code = code_only("use crate::run::ensemble::{a, b};\n// crate::report::x\nlet s = \"crate::plot\";\nuse crate::{input, schema::X};\nsuper::folder::Y;");
    let p = paths_after(&code, "crate");
    assert_eq!(p, vec![vec!["run".to_string(), "ensemble".into()], vec!["input".into()], vec!["schema".into()]]);
    assert_eq!(paths_after(&code, "super"), vec![vec!["folder".to_string(), "Y".into()]]);
    assert!(sources().len() > 50);
}
