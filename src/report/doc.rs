//! The report as a small document tree, rendered twice: to HTML ([`super::html`])
//! and to Markdown ([`super::markdown`]). Both renderings come from the same tree,
//! so they always say the same thing with the same numbers.
//!
//! Every number taken from a run file carries its [`Source`]: the file, the row
//! key and the column (and the scale it is shown at). The HTML keeps it as a
//! `data-src` attribute, so a reader (or a test) can trace any figure in the text
//! back to the cell it came from.

/// Where a number in the report came from.
#[derive(Debug, Clone, PartialEq)]
pub struct Source {
    /// File relative to the run folder, e.g. `summary.csv`.
    pub file: String,
    /// Row key: the identifying cells of the row, e.g. `["skelvane", "no-control"]`.
    pub key: Vec<String>,
    /// Column (for ensemble rows: the statistic, e.g. `p95`).
    pub column: String,
    /// Shown value = file value ÷ scale (1e6 for millions).
    pub scale: f64,
}

impl Source {
    /// A source shown at its own scale.
    pub fn new(file: &str, key: &[&str], column: &str) -> Source {
        Source { file: file.to_string(), key: key.iter().map(|s| s.to_string()).collect(), column: column.to_string(), scale: 1.0 }
    }

    /// The same source shown divided by `scale`.
    pub fn scaled(mut self, scale: f64) -> Source {
        self.scale = scale;
        self
    }

    /// Compact text form, `file|key1|key2|column`.
    pub fn text(&self) -> String {
        let mut s = self.file.clone();
        for k in &self.key {
            s.push('|');
            s.push_str(k);
        }
        s.push('|');
        s.push_str(&self.column);
        s
    }
}

/// A piece of running text.
#[derive(Debug, Clone, PartialEq)]
pub enum Span {
    /// Plain text.
    Plain(String),
    /// Bold text.
    Strong(String),
    /// Italic text.
    Em(String),
    /// An identifier or file name, set in monospace.
    Code(String),
    /// A number from the run, with where it came from.
    Num {
        /// The number as shown.
        text: String,
        /// Its source cell, if it was read (not derived) from one.
        src: Option<Source>,
    },
}

/// A run of spans.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Text(pub Vec<Span>);

impl Figure {
    /// The file shown: the PNG when there is one, else the SVG.
    pub fn shown(&self) -> &str {
        self.png.as_deref().or(self.svg.as_deref()).unwrap_or("")
    }
}

impl Text {
    /// Empty text.
    pub fn new() -> Text {
        Text(Vec::new())
    }

    /// Plain text.
    pub fn plain(mut self, s: impl Into<String>) -> Text {
        self.0.push(Span::Plain(s.into()));
        self
    }

    /// Bold text.
    pub fn strong(mut self, s: impl Into<String>) -> Text {
        self.0.push(Span::Strong(s.into()));
        self
    }

    /// Italic text.
    pub fn em(mut self, s: impl Into<String>) -> Text {
        self.0.push(Span::Em(s.into()));
        self
    }

    /// Monospace text.
    pub fn code(mut self, s: impl Into<String>) -> Text {
        self.0.push(Span::Code(s.into()));
        self
    }

    /// A number with its source.
    pub fn num(mut self, text: impl Into<String>, src: Option<Source>) -> Text {
        self.0.push(Span::Num { text: text.into(), src });
        self
    }

    /// Appends another text.
    pub fn then(mut self, other: Text) -> Text {
        self.0.extend(other.0);
        self
    }

    /// The text without markup.
    pub fn plain_text(&self) -> String {
        self.0
            .iter()
            .map(|s| match s {
                Span::Plain(t) | Span::Strong(t) | Span::Em(t) | Span::Code(t) => t.as_str(),
                Span::Num { text, .. } => text.as_str(),
            })
            .collect()
    }
}

impl From<&str> for Text {
    fn from(s: &str) -> Text {
        Text::new().plain(s)
    }
}

impl From<String> for Text {
    fn from(s: String) -> Text {
        Text::new().plain(s)
    }
}

/// Alignment of a table column.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Align {
    /// Text.
    Left,
    /// Numbers.
    Right,
}

/// A numbered table.
#[derive(Debug, Clone, PartialEq)]
pub struct Table {
    /// Caption (without the "Table n." prefix).
    pub caption: String,
    /// Column headings.
    pub head: Vec<String>,
    /// Column alignment.
    pub align: Vec<Align>,
    /// Rows of cells.
    pub rows: Vec<Vec<Text>>,
    /// A note under the table.
    pub note: Option<Text>,
}

/// A numbered figure from `figures/`.
#[derive(Debug, Clone, PartialEq)]
pub struct Figure {
    /// PNG file name inside `figures/`, if one exists.
    pub png: Option<String>,
    /// SVG file name inside `figures/`, if one exists.
    pub svg: Option<String>,
    /// Caption (without the "Figure n." prefix).
    pub caption: Text,
}

/// A block of the document.
#[derive(Debug, Clone, PartialEq)]
pub enum Block {
    /// A heading; level 2 = section, 3 = subsection, 4 = minor. `number` like "3.2".
    Heading {
        /// 2, 3 or 4.
        level: u8,
        /// Section number ("" for none).
        number: String,
        /// Heading text.
        text: String,
        /// Anchor id.
        id: String,
    },
    /// A paragraph.
    Para(Text),
    /// A bulleted list.
    Bullets(Vec<Text>),
    /// A displayed equation (plain text with Unicode symbols) and what it is.
    Equation {
        /// The formula.
        formula: String,
        /// Where it comes from (equation number and source).
        source: String,
    },
    /// A numbered table.
    Table {
        /// Number.
        number: usize,
        /// The table.
        table: Table,
    },
    /// A numbered figure.
    Figure {
        /// Number.
        number: usize,
        /// The figure.
        figure: Figure,
    },
    /// A highlighted notice (the cautions).
    Notice {
        /// Heading of the notice.
        title: String,
        /// Its lines.
        lines: Vec<Text>,
    },
}

/// The whole report.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Doc {
    /// Title.
    pub title: String,
    /// One line under the title.
    pub subtitle: String,
    /// Blocks in order.
    pub blocks: Vec<Block>,
    section: [usize; 3],
    tables: usize,
    figures: usize,
}

impl Doc {
    /// An empty document.
    pub fn new(title: String, subtitle: String) -> Doc {
        Doc { title, subtitle, ..Default::default() }
    }

    /// Adds a numbered heading (level 2, 3 or 4) and returns its number.
    pub fn heading(&mut self, level: u8, text: &str) -> String {
        let l = (level.clamp(2, 4) - 2) as usize;
        self.section[l] += 1;
        for s in self.section.iter_mut().skip(l + 1) {
            *s = 0;
        }
        let number = self.section[..=l].iter().map(|n| n.to_string()).collect::<Vec<_>>().join(".");
        let id = format!("s{}", number.replace('.', "-"));
        self.blocks.push(Block::Heading { level: level.clamp(2, 4), number: number.clone(), text: text.to_string(), id });
        number
    }

    /// Adds a paragraph.
    pub fn para(&mut self, t: impl Into<Text>) {
        self.blocks.push(Block::Para(t.into()));
    }

    /// Adds a bulleted list.
    pub fn bullets(&mut self, items: Vec<Text>) {
        if !items.is_empty() {
            self.blocks.push(Block::Bullets(items));
        }
    }

    /// Adds a displayed equation.
    pub fn equation(&mut self, formula: impl Into<String>, source: impl Into<String>) {
        self.blocks.push(Block::Equation { formula: formula.into(), source: source.into() });
    }

    /// Adds a numbered table; returns its number.
    pub fn table(&mut self, table: Table) -> usize {
        self.tables += 1;
        self.blocks.push(Block::Table { number: self.tables, table });
        self.tables
    }

    /// Adds a numbered figure; returns its number.
    pub fn figure(&mut self, figure: Figure) -> usize {
        self.figures += 1;
        self.blocks.push(Block::Figure { number: self.figures, figure });
        self.figures
    }

    /// Adds a notice box.
    pub fn notice(&mut self, title: &str, lines: Vec<Text>) {
        self.blocks.push(Block::Notice { title: title.to_string(), lines });
    }

    /// Headings of level 2 and 3, for a table of contents: (level, number, text, id).
    pub fn contents(&self) -> Vec<(u8, &str, &str, &str)> {
        self.blocks
            .iter()
            .filter_map(|b| match b {
                Block::Heading { level, number, text, id } if *level <= 3 => Some((*level, number.as_str(), text.as_str(), id.as_str())),
                _ => None,
            })
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn headings_number_hierarchically() {
        let mut d = Doc::new("t".into(), "s".into());
        assert_eq!(d.heading(2, "A"), "1");
        assert_eq!(d.heading(3, "a"), "1.1");
        assert_eq!(d.heading(3, "b"), "1.2");
        assert_eq!(d.heading(2, "B"), "2");
        assert_eq!(d.heading(3, "c"), "2.1");
        assert_eq!(d.contents().len(), 5);
    }
}
