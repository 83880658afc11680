//! The report as blocks, independent of the output format.

use crate::figure::Figure;

/// How a table column is aligned.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Align {
    /// Text.
    Left,
    /// Numbers.
    Right,
}

/// A table column: title, alignment and its share of the page width.
#[derive(Debug, Clone, PartialEq)]
pub struct Column {
    /// Header text.
    pub title: String,
    /// Alignment.
    pub align: Align,
    /// Relative width.
    pub width: f32,
}

impl Column {
    /// A left-aligned column.
    #[must_use]
    pub fn text(title: &str, width: f32) -> Self {
        Self {
            title: title.to_owned(),
            align: Align::Left,
            width,
        }
    }

    /// A right-aligned column.
    #[must_use]
    pub fn number(title: &str, width: f32) -> Self {
        Self {
            title: title.to_owned(),
            align: Align::Right,
            width,
        }
    }
}

/// One piece of the report.
#[derive(Debug, Clone, PartialEq)]
pub enum Block {
    /// A section heading.
    Heading(String),
    /// A paragraph of running text.
    Paragraph(String),
    /// Large figures: (label, value) shown prominently.
    Headline(Vec<(String, String)>),
    /// Label and value pairs.
    Facts(Vec<(String, String)>),
    /// A table.
    Table {
        /// Columns.
        columns: Vec<Column>,
        /// Rows of cells.
        rows: Vec<Vec<String>>,
    },
    /// A chart.
    Chart(Figure),
    /// A bulleted list.
    List(Vec<String>),
    /// A boxed warning (the cautions).
    Cautions(Vec<String>),
    /// What the market cannot support, boxed beside the value on the first page.
    Warnings(Vec<String>),
}

/// A whole report.
#[derive(Debug, Clone, PartialEq)]
pub struct Report {
    /// Title.
    pub title: String,
    /// Line under the title.
    pub subtitle: String,
    /// Footer text on every page (the session's identity).
    pub footer: String,
    /// The blocks, in order.
    pub blocks: Vec<Block>,
}
