//! The report as Markdown (CommonMark with pipe tables), figures linked
//! relatively (`figures/<name>.png`) so the file works beside its run folder.

use super::doc::{Align, Block, Doc, Span, Text};
use std::fmt::Write as _;

/// Escapes characters that Markdown would read as markup.
pub fn escape(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '\\' | '`' | '*' | '_' | '[' | ']' | '<' | '>' | '|' | '#' => {
                out.push('\\');
                out.push(c);
            }
            '\n' | '\r' => out.push(' '),
            _ => out.push(c),
        }
    }
    out
}

fn code(s: &str) -> String {
    // A code span needs a fence longer than any backtick run inside it.
    let longest = s.split(|c| c != '`').map(str::len).max().unwrap_or(0);
    let fence = "`".repeat(longest + 1);
    let pad = if s.starts_with('`') || s.ends_with('`') { " " } else { "" };
    format!("{fence}{pad}{}{pad}{fence}", s.replace(['\n', '\r'], " ").replace('|', "\\|"))
}

/// Emphasis with the delimiters hugging the text (CommonMark does not close `**`
/// after a space): surrounding spaces go outside.
fn delimited(x: &str, mark: &str) -> String {
    let core = x.trim();
    if core.is_empty() {
        return escape(x);
    }
    let lead = &x[..x.len() - x.trim_start().len()];
    let trail = &x[x.trim_end().len()..];
    format!("{lead}{mark}{}{mark}{trail}", escape(core))
}

fn spans(t: &Text) -> String {
    let mut s = String::new();
    for sp in &t.0 {
        match sp {
            Span::Plain(x) => s.push_str(&escape(x)),
            Span::Strong(x) => s.push_str(&delimited(x, "**")),
            Span::Em(x) => s.push_str(&delimited(x, "*")),
            Span::Code(x) => s.push_str(&code(x)),
            Span::Num { text, .. } => s.push_str(&escape(text)),
        }
    }
    s
}

/// Renders `doc` as Markdown.
pub fn render(doc: &Doc, footer: &Text) -> String {
    let mut m = String::with_capacity(1 << 16);
    let _ = writeln!(m, "# {}\n\n*{}*\n", escape(&doc.title), escape(&doc.subtitle));
    m.push_str("**Contents**\n\n");
    for (level, number, text, _) in doc.contents() {
        let indent = if level == 3 { "    " } else { "" };
        let _ = writeln!(m, "{indent}- {} {}", escape(number), escape(text));
    }
    m.push('\n');
    for b in &doc.blocks {
        match b {
            Block::Heading { level, number, text, .. } => {
                let _ = writeln!(m, "{} {} {}\n", "#".repeat(*level as usize), escape(number), escape(text));
            }
            Block::Para(t) => {
                let _ = writeln!(m, "{}\n", spans(t));
            }
            Block::Bullets(items) => {
                for i in items {
                    let _ = writeln!(m, "- {}", spans(i));
                }
                m.push('\n');
            }
            Block::Equation { formula, source } => {
                let _ = writeln!(m, "```text\n{formula}\n```\n\n*{}*\n", escape(source));
            }
            Block::Table { number, table } => {
                let _ = writeln!(m, "**Table {number}.** {}\n", escape(&table.caption));
                let cells: Vec<String> = table.head.iter().map(|h| escape(h)).collect();
                let _ = writeln!(m, "| {} |", cells.join(" | "));
                let rule: Vec<&str> =
                    (0..table.head.len()).map(|i| if table.align.get(i) == Some(&Align::Right) { "---:" } else { "---" }).collect();
                let _ = writeln!(m, "|{}|", rule.join("|"));
                for row in &table.rows {
                    let cells: Vec<String> = row.iter().map(spans).collect();
                    let _ = writeln!(m, "| {} |", cells.join(" | "));
                }
                m.push('\n');
                if let Some(n) = &table.note {
                    let _ = writeln!(m, "{}\n", spans(n));
                }
            }
            Block::Figure { number, figure } => {
                let _ = writeln!(
                    m,
                    "![Figure {number}](figures/{})\n\n*Figure {number}.* {}{}\n",
                    figure.shown().replace(' ', "%20"),
                    spans(&figure.caption).trim_end(),
                    figure
                        .svg
                        .as_ref()
                        .filter(|_| figure.png.is_some())
                        .map(|s| format!(" Vector version: {}.", code(&format!("figures/{s}"))))
                        .unwrap_or_default()
                );
            }
            Block::Notice { title, lines } => {
                let _ = writeln!(m, "> **{}**\n>", escape(title));
                for l in lines {
                    let _ = writeln!(m, "> {}\n>", spans(l));
                }
                m.push('\n');
            }
        }
    }
    let _ = writeln!(m, "---\n\n{}", spans(footer));
    m
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn escapes_table_and_emphasis_characters() {
        assert_eq!(escape("a|b *c* _d_"), "a\\|b \\*c\\* \\_d\\_");
        assert_eq!(code("a`b"), "``a`b``");
        assert_eq!(delimited("Water yield. ", "**"), "**Water yield.** ");
    }
}
