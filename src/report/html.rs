//! The report as one self-contained HTML file: figures embedded as base64 `data:`
//! URIs, styles inline, no scripts, fonts or images fetched from anywhere, and
//! print rules for A4 (page margins, tables and figures kept whole, headings kept
//! with what follows).

use super::base64;
use super::doc::{Align, Block, Doc, Span, Text};
use std::fmt::Write as _;
use std::path::Path;

/// Escapes text for HTML element content and attribute values.
pub fn escape(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            _ => out.push(c),
        }
    }
    out
}

const STYLE: &str = r#"
@page { size: A4; margin: 16mm 15mm 17mm 15mm; }
:root { --ink: #1e2226; --muted: #5a5f66; --rule: #c8cbd0; --accent: #1d4e89; --warn: #b02e26; }
html { font-family: "Noto Sans", "DejaVu Sans", "Liberation Sans", Arial, sans-serif; font-size: 10.5pt; line-height: 1.45; color: var(--ink); background: #fff; }
body { max-width: 180mm; margin: 0 auto; padding: 8mm 4mm 12mm; }
header.top { border-bottom: 1.2pt solid var(--accent); padding-bottom: 3mm; margin-bottom: 4mm; }
h1 { font-size: 19pt; line-height: 1.2; color: var(--accent); margin: 0 0 1.5mm; }
p.sub { color: var(--muted); margin: 0; }
h2 { font-size: 14pt; color: var(--accent); margin: 8mm 0 2.5mm; padding-bottom: 0.8mm; border-bottom: 0.5pt solid var(--rule); }
h3 { font-size: 12pt; margin: 6mm 0 2mm; }
h4 { font-size: 10.5pt; margin: 4mm 0 1.5mm; }
h2 .no, h3 .no, h4 .no { color: var(--muted); font-weight: normal; margin-right: 0.6em; }
p { margin: 1.5mm 0 2.5mm; }
ul { margin: 1mm 0 3mm; padding-left: 6mm; }
li { margin: 0.6mm 0; }
code { font-family: "Noto Sans Mono", "DejaVu Sans Mono", "Liberation Mono", monospace; font-size: 0.9em; }
nav.toc { font-size: 9.5pt; margin: 3mm 0 5mm; }
nav.toc ol { list-style: none; margin: 0; padding-left: 0; }
nav.toc ol ol { padding-left: 6mm; }
nav.toc a { color: var(--ink); text-decoration: none; }
nav.toc .no { display: inline-block; min-width: 9mm; color: var(--muted); }
table { border-collapse: collapse; width: 100%; margin: 1mm 0 1.5mm; font-size: 8.8pt; font-variant-numeric: tabular-nums; }
table.wide { font-size: 7.6pt; }
caption { caption-side: top; text-align: left; font-weight: 600; padding: 0 0 1.2mm; }
caption .no { color: var(--accent); margin-right: 0.4em; }
th, td { padding: 0.8mm 1.4mm; border-bottom: 0.4pt solid var(--rule); vertical-align: top; text-align: left; }
thead th { border-bottom: 0.9pt solid var(--ink); font-weight: 600; }
th { overflow-wrap: break-word; }
th.r, td.r { text-align: right; }
td.r { white-space: nowrap; }
td code { white-space: nowrap; }
thead { display: table-header-group; }
tr { break-inside: avoid; page-break-inside: avoid; }
p.tnote { font-size: 8.5pt; color: var(--muted); margin: 0 0 4mm; }
figure { margin: 4mm 0 5mm; break-inside: avoid; page-break-inside: avoid; }
figure img { display: block; width: 100%; height: auto; }
figcaption { font-size: 9pt; color: var(--muted); margin-top: 1.2mm; }
figcaption .no { color: var(--accent); font-weight: 600; margin-right: 0.4em; }
p.missing { border: 0.5pt dashed var(--rule); padding: 3mm; color: var(--muted); }
div.eq { margin: 2mm 0 0 6mm; font-family: "Noto Serif", "DejaVu Serif", Georgia, serif; font-size: 11pt; break-inside: avoid; }
div.eqsrc { margin: 0 0 2.5mm 6mm; font-size: 8.5pt; color: var(--muted); }
aside.notice { border-left: 2mm solid var(--warn); background: #fbf2f1; padding: 2mm 4mm 2mm 4mm; margin: 4mm 0; break-inside: avoid; page-break-inside: avoid; }
aside.notice h3 { margin: 0 0 1mm; font-size: 10.5pt; color: var(--warn); }
aside.notice p { margin: 0.8mm 0; }
footer { margin-top: 10mm; padding-top: 2mm; border-top: 0.5pt solid var(--rule); font-size: 8.5pt; color: var(--muted); }
@media print {
  body { max-width: none; padding: 0; }
  h2, h3, h4 { break-after: avoid; page-break-after: avoid; }
  caption { break-after: avoid; }
  a { color: inherit; text-decoration: none; }
}
"#;

fn spans(t: &Text) -> String {
    let mut s = String::new();
    for sp in &t.0 {
        match sp {
            Span::Plain(x) => s.push_str(&escape(x)),
            Span::Strong(x) => {
                let _ = write!(s, "<strong>{}</strong>", escape(x));
            }
            Span::Em(x) => {
                let _ = write!(s, "<em>{}</em>", escape(x));
            }
            Span::Code(x) => {
                let _ = write!(s, "<code>{}</code>", escape(x));
            }
            Span::Num { text, src } => match src {
                Some(src) => {
                    let scale = if src.scale != 1.0 { format!(" data-scale=\"{}\"", src.scale) } else { String::new() };
                    let _ = write!(s, "<span class=\"n\" data-src=\"{}\"{scale}>{}</span>", escape(&src.text()), escape(text));
                }
                None => s.push_str(&escape(text)),
            },
        }
    }
    s
}

/// Renders `doc` as a self-contained HTML page; figures are read from `run_dir/figures/`.
// Over 100 lines on purpose: one HTML document written in order (head, style, blocks, footer); the template reads best as one piece.
pub fn render(doc: &Doc, run_dir: &Path, footer: &Text) -> String {
    let mut h = String::with_capacity(1 << 20);
    h.push_str("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n");
    h.push_str("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n");
    let _ = writeln!(h, "<meta name=\"generator\" content=\"yieldshift report\">\n<title>{}</title>", escape(&doc.title));
    let _ = writeln!(h, "<style>{STYLE}</style>\n</head>\n<body>");
    let _ =
        writeln!(h, "<header class=\"top\">\n<h1>{}</h1>\n<p class=\"sub\">{}</p>\n</header>", escape(&doc.title), escape(&doc.subtitle));

    // Contents.
    h.push_str("<nav class=\"toc\" aria-label=\"Contents\">\n<ol>\n");
    let mut open_sub = false;
    for (level, number, text, id) in doc.contents() {
        if level == 2 {
            if open_sub {
                h.push_str("</ol></li>\n");
            }
            let _ = writeln!(h, "<li><a href=\"#{id}\"><span class=\"no\">{}</span>{}</a><ol>", escape(number), escape(text));
            open_sub = true;
        } else {
            let _ = writeln!(h, "<li><a href=\"#{id}\"><span class=\"no\">{}</span>{}</a></li>", escape(number), escape(text));
        }
    }
    if open_sub {
        h.push_str("</ol></li>\n");
    }
    h.push_str("</ol>\n</nav>\n");

    for b in &doc.blocks {
        match b {
            Block::Heading { level, number, text, id } => {
                let _ = writeln!(h, "<h{level} id=\"{id}\"><span class=\"no\">{}</span>{}</h{level}>", escape(number), escape(text));
            }
            Block::Para(t) => {
                let _ = writeln!(h, "<p>{}</p>", spans(t));
            }
            Block::Bullets(items) => {
                h.push_str("<ul>\n");
                for i in items {
                    let _ = writeln!(h, "<li>{}</li>", spans(i));
                }
                h.push_str("</ul>\n");
            }
            Block::Equation { formula, source } => {
                let _ = writeln!(h, "<div class=\"eq\">{}</div>\n<div class=\"eqsrc\">{}</div>", escape(formula), escape(source));
            }
            Block::Table { number, table } => {
                let class = if table.head.len() > 9 { " class=\"wide\"" } else { "" };
                let _ =
                    writeln!(h, "<table{class}>\n<caption><span class=\"no\">Table {number}.</span>{}</caption>", escape(&table.caption));
                h.push_str("<thead><tr>");
                for (i, c) in table.head.iter().enumerate() {
                    let r = if table.align.get(i) == Some(&Align::Right) { " class=\"r\"" } else { "" };
                    // Allow breaks after underscores in long column names.
                    let _ = write!(h, "<th{r}>{}</th>", escape(c).replace('_', "_<wbr>"));
                }
                h.push_str("</tr></thead>\n<tbody>\n");
                for row in &table.rows {
                    h.push_str("<tr>");
                    for (i, c) in row.iter().enumerate() {
                        let r = if table.align.get(i) == Some(&Align::Right) { " class=\"r\"" } else { "" };
                        let _ = write!(h, "<td{r}>{}</td>", spans(c));
                    }
                    h.push_str("</tr>\n");
                }
                h.push_str("</tbody>\n</table>\n");
                if let Some(n) = &table.note {
                    let _ = writeln!(h, "<p class=\"tnote\">{}</p>", spans(n));
                } else {
                    h.push_str("<p class=\"tnote\"></p>\n");
                }
            }
            Block::Figure { number, figure } => match super::embed::embed(&run_dir.join("figures"), figure) {
                Some(e) => {
                    let _ = writeln!(
                        h,
                        "<figure>\n<img alt=\"{}\" src=\"data:{};base64,{}\">\n<figcaption><span class=\"no\">Figure {number}.</span>{}</figcaption>\n</figure>",
                        escape(&figure.caption.plain_text()),
                        e.mime,
                        base64::encode(&e.bytes),
                        spans(&figure.caption)
                    );
                }
                None => {
                    let _ = writeln!(
                        h,
                        "<p class=\"missing\">Figure {number} ({}) is not in this run folder's figures/. {}</p>",
                        escape(figure.shown()),
                        spans(&figure.caption)
                    );
                }
            },
            Block::Notice { title, lines } => {
                let _ = writeln!(h, "<aside class=\"notice\">\n<h3>{}</h3>", escape(title));
                for l in lines {
                    let _ = writeln!(h, "<p>{}</p>", spans(l));
                }
                h.push_str("</aside>\n");
            }
        }
    }
    let _ = writeln!(h, "<footer>{}</footer>\n</body>\n</html>", spans(footer));
    h
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::doc::Source;

    #[test]
    fn escapes_markup_and_quotes() {
        assert_eq!(escape("a<b & \"c\" 'd'>"), "a&lt;b &amp; &quot;c&quot; &#39;d&#39;&gt;");
    }

    #[test]
    fn numbers_carry_their_source() {
        let t = Text::new().num("−2.8", Some(Source::new("summary.csv", &["a&b", "no-control"], "yield_change_20y_pct")));
        assert_eq!(spans(&t), "<span class=\"n\" data-src=\"summary.csv|a&amp;b|no-control|yield_change_20y_pct\">−2.8</span>");
    }

    #[test]
    fn a_page_without_figures_has_no_external_reference() {
        let mut d = Doc::new("<T>".into(), "s".into());
        d.heading(2, "One");
        d.para("x < y");
        let html = render(&d, Path::new("/nonexistent"), &Text::new());
        assert!(html.contains("<h1>&lt;T&gt;</h1>"));
        assert!(!html.contains("http://") && !html.contains("https://"));
    }
}
