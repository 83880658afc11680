//! A column of short optional texts (the VINs) kept in one buffer: a million values cost two
//! allocations instead of a million, and freeing the market does not walk them one by one.

/// Optional texts, one per row. An empty text reads as none.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct TextColumn {
    text: String,
    /// End of each row's text in `text`; a row starts where the one before it ends.
    ends: Vec<usize>,
}

impl TextColumn {
    /// Number of rows.
    #[must_use]
    pub fn len(&self) -> usize {
        self.ends.len()
    }

    /// Whether the column has no rows.
    #[must_use]
    pub fn is_empty(&self) -> bool {
        self.ends.is_empty()
    }

    /// The text of row `row`; `None` when it is empty or the row does not exist.
    #[must_use]
    pub fn get(&self, row: usize) -> Option<&str> {
        let end = *self.ends.get(row)?;
        let start = row.checked_sub(1).map_or(0, |before| self.ends[before]);
        (end > start).then(|| &self.text[start..end])
    }

    /// Adds a row.
    pub fn push(&mut self, text: Option<&str>) {
        if let Some(t) = text {
            self.text.push_str(t);
        }
        self.ends.push(self.text.len());
    }

    /// Adds a row with its text in ASCII capitals.
    pub fn push_uppercase(&mut self, text: &str) {
        let start = self.text.len();
        self.text.push_str(text);
        self.text[start..].make_ascii_uppercase();
        self.ends.push(self.text.len());
    }

    /// Adds `rows` empty rows.
    pub fn push_none(&mut self, rows: usize) {
        let end = self.text.len();
        self.ends.resize(self.ends.len() + rows, end);
    }

    /// Makes room for `rows` more rows of about `bytes_per_row` bytes.
    pub fn reserve(&mut self, rows: usize, bytes_per_row: usize) {
        self.ends.reserve(rows);
        self.text.reserve(rows * bytes_per_row);
    }

    /// Appends another column's rows.
    pub fn append(&mut self, other: &TextColumn) {
        let offset = self.text.len();
        self.text.push_str(&other.text);
        self.ends.extend(other.ends.iter().map(|e| e + offset));
    }

    /// Every row's text in order.
    pub fn iter(&self) -> impl Iterator<Item = Option<&str>> + '_ {
        (0..self.len()).map(|row| self.get(row))
    }
}

impl<'a> FromIterator<Option<&'a str>> for TextColumn {
    fn from_iter<I: IntoIterator<Item = Option<&'a str>>>(iter: I) -> Self {
        let mut column = TextColumn::default();
        for text in iter {
            column.push(text);
        }
        column
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rows_keep_their_text_through_appends() {
        let mut a: TextColumn = [Some("1ab"), None, Some(""), Some("xyz")]
            .into_iter()
            .collect();
        let mut b = TextColumn::default();
        b.push_uppercase("vin9");
        b.push_none(2);
        b.push(Some("q"));
        a.append(&b);
        let all: Vec<Option<&str>> = a.iter().collect();
        assert_eq!(
            all,
            vec![
                Some("1ab"),
                None,
                None,
                Some("xyz"),
                Some("VIN9"),
                None,
                None,
                Some("q")
            ]
        );
        assert_eq!(a.len(), 8);
        assert_eq!(a.get(8), None);
    }
}
