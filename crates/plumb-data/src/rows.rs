//! Row numbers as an analyst writes them (`3,17,40-42`), kept as ranges so a list naming
//! rows far past any table (`1-18446744073709551615`) costs nothing until it meets a table.

use std::path::Path;

/// Row numbers, 1-based data rows, as inclusive ranges in the order given.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct RowList(pub Vec<(usize, usize)>);

impl RowList {
    /// Parses `3, 17,40-42` (spaces and empty parts are ignored).
    ///
    /// # Errors
    /// The first part that is not a row number (from 1) or a rising range, quoted.
    pub fn parse(s: &str) -> Result<Self, String> {
        let mut rows = Vec::new();
        for part in s.split(',').map(str::trim).filter(|p| !p.is_empty()) {
            let bad = || {
                format!("'{part}' is not a row number or range such as 40-42 (rows count from 1)")
            };
            let number = |t: &str| t.trim().parse::<usize>().ok().filter(|&r| r > 0);
            let range = match part.split_once('-') {
                Some((a, b)) => number(a).zip(number(b)).filter(|(a, b)| a <= b),
                None => number(part).map(|r| (r, r)),
            };
            rows.push(range.ok_or_else(bad)?);
        }
        Ok(Self(rows))
    }

    /// The rows, in order, of a table of `n_rows` data rows read from `file`.
    ///
    /// # Errors
    /// Rows the table does not have, named as ranges with the table's size (nothing is
    /// expanded past the table).
    pub fn within(&self, n_rows: usize, file: &Path) -> Result<Vec<usize>, String> {
        let beyond: Vec<String> = self
            .0
            .iter()
            .filter(|(_, b)| *b > n_rows)
            .map(|&(a, b)| {
                let a = a.max(n_rows + 1);
                if a == b {
                    a.to_string()
                } else {
                    format!("{a}-{b}")
                }
            })
            .collect();
        if !beyond.is_empty() {
            return Err(format!(
                "{}: --exclude names rows the file does not have ({}): it has {n_rows} data rows, numbered from 1 after the header",
                file.display(),
                beyond.join(", ")
            ));
        }
        Ok(self.0.iter().flat_map(|&(a, b)| a..=b).collect())
    }

    /// The rows, in order, at most `cap` of them (`None` past that): for a caller whose
    /// table is not loaded yet.
    pub fn first(&self, cap: usize) -> Option<Vec<usize>> {
        let total = self
            .0
            .iter()
            .try_fold(0usize, |n, &(a, b)| n.checked_add(b - a + 1))?;
        (total <= cap).then(|| self.0.iter().flat_map(|&(a, b)| a..=b).collect())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn row_lists_take_numbers_and_ranges() {
        let rows = RowList::parse("3, 17,40-42").expect("parses");
        assert_eq!(
            rows.within(50, Path::new("f.csv")),
            Ok(vec![3, 17, 40, 41, 42])
        );
        // A range to the end of the addressable rows costs nothing and says what is missing.
        let huge = RowList::parse("1-18446744073709551615").expect("parses");
        let e = huge.within(48, Path::new("f.csv")).expect_err("beyond");
        assert!(
            e.contains("49-18446744073709551615") && e.contains("48 data rows"),
            "{e}"
        );
        assert_eq!(huge.first(1000), None);
        assert_eq!(
            RowList::parse("2,5-6").expect("parses").first(10),
            Some(vec![2, 5, 6])
        );
        assert!(RowList::parse("0").is_err());
        assert!(RowList::parse("5-2").is_err());
        assert!(RowList::parse("x").is_err());
    }

    #[test]
    fn odd_parts_are_refused_by_name() {
        for bad in ["1-", "-3", "1-2-3", "+", "2 3", "18446744073709551616"] {
            let e = RowList::parse(bad).expect_err(bad);
            assert!(e.contains(&format!("'{bad}'")), "{e}");
        }
        assert_eq!(RowList::parse(" , 4 ,"), Ok(RowList(vec![(4, 4)])));
    }
}
