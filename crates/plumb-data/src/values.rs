//! Compact column storage: a number column as one `f64` per row, a text column as a
//! dictionary (a 4-byte code per row and each distinct text once).

use std::hash::BuildHasher;

use hashbrown::{DefaultHashBuilder, HashTable};

/// A numeric column: one `f64` per row, a missing cell held as NaN. A NaN read from a file
/// is missing too (every reader already counted it so), which is why no separate mask is
/// needed: 8 bytes a value instead of the 16 of `Option<f64>`.
#[derive(Debug, Clone, Default)]
pub struct Numbers(Vec<f64>);

impl Numbers {
    /// A column from values where NaN marks a missing cell.
    pub fn from_nan_missing(values: Vec<f64>) -> Self {
        Self(values)
    }

    /// Number of rows.
    pub fn len(&self) -> usize {
        self.0.len()
    }

    /// Whether there are no rows.
    pub fn is_empty(&self) -> bool {
        self.0.is_empty()
    }

    /// Row `i` (0-based); `None` when missing or out of range.
    pub fn get(&self, i: usize) -> Option<f64> {
        self.0.get(i).copied().filter(|v| !v.is_nan())
    }

    /// Every row, `None` where missing.
    pub fn iter(&self) -> impl ExactSizeIterator<Item = Option<f64>> + Clone + '_ {
        self.0.iter().map(|&v| (!v.is_nan()).then_some(v))
    }

    /// The values as stored: NaN where missing.
    pub fn as_nan_missing(&self) -> &[f64] {
        &self.0
    }

    /// Missing cells.
    pub fn missing(&self) -> usize {
        self.0.iter().filter(|v| v.is_nan()).count()
    }

    /// Whether every cell is missing (true for no rows).
    pub fn all_missing(&self) -> bool {
        self.0.iter().all(|v| v.is_nan())
    }
}

impl PartialEq for Numbers {
    /// Equal lengths, missing in the same rows, equal values elsewhere.
    fn eq(&self, other: &Self) -> bool {
        self.len() == other.len() && self.iter().eq(other.iter())
    }
}

impl FromIterator<Option<f64>> for Numbers {
    fn from_iter<I: IntoIterator<Item = Option<f64>>>(iter: I) -> Self {
        Self(iter.into_iter().map(|v| v.unwrap_or(f64::NAN)).collect())
    }
}

/// The code of a missing cell in [`Texts`].
const MISSING: u32 = u32::MAX;

/// A text column as a dictionary: each distinct text once (in order of first appearance),
/// back to back in one buffer, and a 4-byte code per row. A level costs its bytes and one
/// offset, with no allocation of its own.
#[derive(Debug, Clone)]
pub struct Texts {
    codes: Vec<u32>,
    /// Every distinct text, back to back.
    text: String,
    /// Level `k` is `text[ends[k]..ends[k + 1]]`; starts with 0.
    ends: Vec<usize>,
}

impl Default for Texts {
    fn default() -> Self {
        Self {
            codes: Vec::new(),
            text: String::new(),
            ends: vec![0],
        }
    }
}

impl Texts {
    /// Number of rows.
    pub fn len(&self) -> usize {
        self.codes.len()
    }

    /// Whether there are no rows.
    pub fn is_empty(&self) -> bool {
        self.codes.is_empty()
    }

    /// Row `i` (0-based); `None` when missing or out of range.
    pub fn get(&self, i: usize) -> Option<&str> {
        self.codes.get(i).and_then(|&c| self.level(c))
    }

    /// Every row, `None` where missing.
    pub fn iter(&self) -> impl ExactSizeIterator<Item = Option<&str>> + Clone + '_ {
        self.codes.iter().map(|&c| self.level(c))
    }

    /// The distinct texts, in order of first appearance.
    pub fn levels(&self) -> impl ExactSizeIterator<Item = &str> + Clone + '_ {
        self.ends.windows(2).map(|w| &self.text[w[0]..w[1]])
    }

    /// Number of distinct texts.
    pub fn level_count(&self) -> usize {
        self.ends.len() - 1
    }

    /// Missing cells.
    pub fn missing(&self) -> usize {
        self.codes.iter().filter(|&&c| c == MISSING).count()
    }

    fn level(&self, code: u32) -> Option<&str> {
        (code != MISSING).then(|| self.level_text(code as usize))
    }

    fn level_text(&self, k: usize) -> &str {
        &self.text[self.ends[k]..self.ends[k + 1]]
    }
}

impl PartialEq for Texts {
    /// The same text (or missing) in every row, however the dictionary was built.
    fn eq(&self, other: &Self) -> bool {
        self.len() == other.len() && self.iter().eq(other.iter())
    }
}

impl<S: AsRef<str>> FromIterator<Option<S>> for Texts {
    fn from_iter<I: IntoIterator<Item = Option<S>>>(iter: I) -> Self {
        let iter = iter.into_iter();
        let mut builder = TextsBuilder::with_capacity(iter.size_hint().0);
        for cell in iter {
            builder.push(cell.as_ref().map(AsRef::as_ref));
        }
        builder.finish()
    }
}

/// Builds [`Texts`] a cell at a time, storing each distinct text once. The index holds only
/// codes; a code's text is read from the dictionary being built.
#[derive(Default)]
pub(crate) struct TextsBuilder {
    texts: Texts,
    index: HashTable<u32>,
    hasher: DefaultHashBuilder,
}

impl TextsBuilder {
    pub(crate) fn with_capacity(rows: usize) -> Self {
        Self {
            texts: Texts {
                codes: Vec::with_capacity(rows),
                ..Texts::default()
            },
            ..Self::default()
        }
    }

    /// Appends a row: a text, or `None` for a missing cell; returns the text's code.
    pub(crate) fn push(&mut self, cell: Option<&str>) -> Option<u32> {
        let code = cell.map(|s| self.code_of(s));
        self.texts.codes.push(code.unwrap_or(MISSING));
        code
    }

    /// Appends a row holding the text of a code already given out.
    pub(crate) fn push_code(&mut self, code: u32) {
        self.texts.codes.push(code);
    }

    /// The code of `s` when it is already in the dictionary.
    pub(crate) fn code_if_known(&self, s: &str) -> Option<u32> {
        let texts = &self.texts;
        self.index
            .find(self.hasher.hash_one(s), |&c| {
                texts.level_text(c as usize) == s
            })
            .copied()
    }

    /// The code of `s`, added to the dictionary when new.
    fn code_of(&mut self, s: &str) -> u32 {
        let Self {
            texts,
            index,
            hasher,
        } = self;
        let hash = hasher.hash_one(s);
        if let Some(&c) = index.find(hash, |&c| texts.level_text(c as usize) == s) {
            return c;
        }
        // More distinct texts than u32 codes would need far more memory than any machine
        // this runs on has; the last code is shared past that.
        let Some(c) = u32::try_from(texts.level_count())
            .ok()
            .filter(|&c| c != MISSING)
        else {
            return MISSING - 1;
        };
        texts.text.push_str(s);
        texts.ends.push(texts.text.len());
        index.insert_unique(hash, c, |&k| hasher.hash_one(texts.level_text(k as usize)));
        c
    }

    pub(crate) fn finish(self) -> Texts {
        self.texts
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_hold_missing_cells_and_a_read_nan_alike() {
        let n: Numbers = [Some(1.5), None, Some(f64::NAN), Some(f64::INFINITY)]
            .into_iter()
            .collect();
        assert_eq!(n.len(), 4);
        assert_eq!(n.get(0), Some(1.5));
        assert_eq!((n.get(1), n.get(2), n.get(9)), (None, None, None));
        assert_eq!(n.get(3), Some(f64::INFINITY));
        assert_eq!(n.missing(), 2);
        assert!(!n.all_missing());
        let same: Numbers = [Some(1.5), None, None, Some(f64::INFINITY)]
            .into_iter()
            .collect();
        assert_eq!(n, same);
        let other: Numbers = [Some(1.5), Some(0.0), None, Some(f64::INFINITY)]
            .into_iter()
            .collect();
        assert_ne!(n, other);
    }

    #[test]
    fn texts_keep_each_distinct_value_once_and_read_back_in_row_order() {
        let cells = [Some("north"), None, Some("south"), Some("north"), Some("")];
        let t: Texts = cells.into_iter().collect();
        assert_eq!(t.levels().collect::<Vec<_>>(), ["north", "south", ""]);
        assert_eq!(t.level_count(), 3);
        assert_eq!(t.iter().collect::<Vec<_>>(), cells);
        assert_eq!((t.get(3), t.get(1), t.get(7)), (Some("north"), None, None));
        assert_eq!(t.missing(), 1);
        let owned: Texts = cells.iter().map(|c| c.map(String::from)).collect();
        assert_eq!(t, owned);
    }
}
