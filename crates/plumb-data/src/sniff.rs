//! Finding the records of a delimited text file and guessing how it is written:
//! delimiter, header row and decimal mark.

use crate::cell::{classify, parse_number, Cell, DecimalMark};

/// Whether the first row names the columns.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum HeaderMode {
    /// Decide from the content: a first row with no numbers above columns that hold numbers
    /// (or a table of text only) is a header.
    #[default]
    Auto,
    /// The first row is a header.
    Yes,
    /// There is no header; columns are named `column1`, `column2`, ….
    No,
}

/// Delimiters tried, in order of preference when they fit equally well.
const CANDIDATES: [u8; 4] = [b'\t', b';', b',', b'|'];
/// Records looked at when sniffing.
const SAMPLE: usize = 200;

/// One record (logical line) of the file.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct Record {
    /// Byte range, without the line ending.
    pub start: usize,
    /// End of the range (exclusive).
    pub end: usize,
    /// 1-based line where the record starts.
    pub line: usize,
}

/// Whether the byte at `i` ends a line: a line feed, or a carriage return not followed by one
/// (old spreadsheet exports end lines with a lone CR). A CR at the very end of `text` counts
/// only when `at_eof` (in a piece of a larger file, its LF may follow in the next piece).
pub(crate) fn ends_line(text: &[u8], i: usize, at_eof: bool) -> bool {
    match text[i] {
        b'\n' => true,
        b'\r' => match text.get(i + 1) {
            Some(&next) => next != b'\n',
            None => at_eof,
        },
        _ => false,
    }
}

/// Line breaks in `text` (LF, CRLF or a lone CR each count once).
pub(crate) fn count_line_breaks(text: &[u8], at_eof: bool) -> usize {
    memchr::memchr2_iter(b'\n', b'\r', text)
        .filter(|&i| ends_line(text, i, at_eof))
        .count()
}

/// Splits `text` into records at line endings (LF, CRLF or a lone CR) outside double quotes,
/// skipping blank lines. Returns the line of an unclosed quote as the error.
pub(crate) fn records(text: &[u8]) -> Result<Vec<Record>, usize> {
    let mut out = Vec::new();
    let (mut start, mut line, mut start_line) = (0, 1, 1);
    let mut quoted = false;
    let mut quote_line = 0;
    let push = |out: &mut Vec<Record>, start: usize, end: usize, line: usize| {
        let end = if end > start && text[end - 1] == b'\r' {
            end - 1
        } else {
            end
        };
        if text[start..end].iter().any(|b| !b.is_ascii_whitespace()) {
            out.push(Record { start, end, line });
        }
    };
    // Only quotes and line-ending bytes change anything: jump from one to the next.
    for i in memchr::memchr3_iter(b'"', b'\n', b'\r', text) {
        match text[i] {
            b'"' => {
                quoted = !quoted;
                if quoted {
                    quote_line = line;
                }
            }
            b'\n' | b'\r' if ends_line(text, i, true) => {
                if !quoted {
                    push(&mut out, start, i, start_line);
                    start = i + 1;
                    start_line = line + 1;
                }
                line += 1;
            }
            _ => {}
        }
    }
    if quoted {
        return Err(quote_line);
    }
    if start < text.len() {
        push(&mut out, start, text.len(), start_line);
    }
    Ok(out)
}

/// Number of fields of a record under `delimiter` (delimiters inside quotes do not count).
pub(crate) fn field_count(record: &[u8], delimiter: u8) -> usize {
    if memchr::memchr(b'"', record).is_none() {
        // No quotes: every delimiter counts (a loop the compiler vectorizes).
        return 1 + record.iter().filter(|&&b| b == delimiter).count();
    }
    let mut quoted = false;
    let mut count = 1;
    for &b in record {
        if b == b'"' {
            quoted = !quoted;
        } else if b == delimiter && !quoted {
            count += 1;
        }
    }
    count
}

/// Splits a record into unquoted field texts (used only on the sniffing sample).
pub(crate) fn fields(record: &[u8], delimiter: u8) -> Vec<String> {
    let mut out = Vec::new();
    let mut current = Vec::new();
    let mut quoted = false;
    let mut i = 0;
    while i < record.len() {
        let b = record[i];
        if b == b'"' {
            if quoted && record.get(i + 1) == Some(&b'"') {
                current.push(b'"');
                i += 1;
            } else {
                quoted = !quoted;
            }
        } else if b == delimiter && !quoted {
            out.push(String::from_utf8_lossy(&current).into_owned());
            current.clear();
        } else {
            current.push(b);
        }
        i += 1;
    }
    out.push(String::from_utf8_lossy(&current).into_owned());
    out
}

/// The delimiter whose field count is the same on the most sampled records (ties go to
/// the earlier of tab, semicolon, comma, bar); comma when none splits anything.
pub(crate) fn delimiter(text: &[u8], recs: &[Record]) -> u8 {
    let sample = &recs[..recs.len().min(SAMPLE)];
    let mut best = (b',', 0.0, 0usize);
    for &d in &CANDIDATES {
        let counts: Vec<usize> = sample
            .iter()
            .map(|r| field_count(&text[r.start..r.end], d))
            .collect();
        let mode = mode(&counts);
        if mode < 2 {
            continue;
        }
        let agree = counts.iter().filter(|&&c| c == mode).count() as f64 / counts.len() as f64;
        if agree > best.1 + 1e-12 {
            best = (d, agree, mode);
        }
    }
    best.0
}

fn mode(counts: &[usize]) -> usize {
    let mut sorted = counts.to_vec();
    sorted.sort_unstable();
    let mut best = (0, 0);
    let mut i = 0;
    while i < sorted.len() {
        let j = sorted[i..].iter().take_while(|&&c| c == sorted[i]).count();
        if j > best.1 {
            best = (sorted[i], j);
        }
        i += j;
    }
    best.0
}

/// Comma when, with a delimiter other than comma, some sampled cells read as numbers only
/// with a decimal comma (`12,5`, `1.234,5`) and none only with a decimal point (`12.5`,
/// `1,234.5`); point otherwise. Cells that read either way (`12`, `1,234`) do not vote.
#[cfg(test)]
pub(crate) fn decimal_mark(sample: &[Vec<String>], delimiter: u8) -> DecimalMark {
    decimal_guess(sample.iter().flatten().map(String::as_str), delimiter).mark
}

/// The decimal mark cells show, and whether the choice was a guess that changes numbers.
#[derive(Debug, Clone, PartialEq)]
pub(crate) struct DecimalGuess {
    /// The mark assumed.
    pub mark: DecimalMark,
    /// A cell that reads as two different numbers (`1,234`: 1234 or 1.234) when no cell
    /// settles the mark; the mark was then assumed.
    pub ambiguous: Option<String>,
}

/// [`decimal_mark`]'s vote over `cells`, keeping the first cell whose number depends on the
/// mark when the vote is empty.
pub(crate) fn decimal_guess<'a>(
    cells: impl Iterator<Item = &'a str>,
    delimiter: u8,
) -> DecimalGuess {
    if delimiter == b',' {
        return DecimalGuess {
            mark: DecimalMark::Point,
            ambiguous: None,
        };
    }
    let (mut comma, mut point, mut ambiguous) = (0usize, 0usize, None);
    for cell in cells {
        let s = cell.trim();
        let as_comma = parse_number(s, DecimalMark::Comma);
        let as_point = parse_number(s, DecimalMark::Point);
        comma += usize::from(as_comma.is_some() && as_point.is_none());
        point += usize::from(as_point.is_some() && as_comma.is_none());
        if let (Some(c), Some(p), None) = (as_comma, as_point, &ambiguous) {
            if c != p {
                ambiguous = Some(s.to_string());
            }
        }
    }
    let mark = if comma > 0 && point == 0 {
        DecimalMark::Comma
    } else {
        DecimalMark::Point
    };
    DecimalGuess {
        mark,
        ambiguous: ambiguous.filter(|_| comma == 0 && point == 0),
    }
}

/// Whether the first sampled row is a header (see [`HeaderMode::Auto`]).
pub(crate) fn has_header(sample: &[Vec<String>], decimal: DecimalMark, missing: &[String]) -> bool {
    let Some(first) = sample.first() else {
        return false;
    };
    let is_number = |s: &str| matches!(classify(s, decimal, missing), Cell::Number(_));
    if first.iter().any(|s| is_number(s)) {
        return false;
    }
    let body = &sample[1..];
    if body.is_empty() {
        return true;
    }
    let numeric_below =
        (0..first.len()).any(|j| body.iter().filter_map(|r| r.get(j)).any(|s| is_number(s)));
    let all_text = body.iter().flatten().all(|s| !is_number(s));
    numeric_below || all_text
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sniff(text: &str) -> (u8, DecimalMark, bool) {
        let recs = records(text.as_bytes()).expect("closed quotes");
        let d = delimiter(text.as_bytes(), &recs);
        let sample: Vec<Vec<String>> = recs
            .iter()
            .map(|r| fields(&text.as_bytes()[r.start..r.end], d))
            .collect();
        let mark = decimal_mark(&sample, d);
        (d, mark, has_header(&sample, mark, &[]))
    }

    #[test]
    fn semicolon_file_with_decimal_commas() {
        let (d, mark, header) = sniff("dose;turbidity\n1,5;12,25\n2,0;9,5\n");
        assert_eq!((d, mark, header), (b';', DecimalMark::Comma, true));
    }

    #[test]
    fn decimal_commas_with_thousands_points() {
        let (d, mark, header) = sniff("x;y\n1;1.234,5\n2;2.469,0\n");
        assert_eq!((d, mark, header), (b';', DecimalMark::Comma, true));
    }

    #[test]
    fn grouped_thousands_alone_are_ambiguous_and_a_voting_cell_settles_them() {
        let guess = |cells: &[&str]| decimal_guess(cells.iter().copied(), b';');
        let g = guess(&["1,234", "12"]);
        assert_eq!(g.mark, DecimalMark::Point);
        assert_eq!(g.ambiguous.as_deref(), Some("1,234"));
        assert_eq!(guess(&["1,234", "7,5"]).mark, DecimalMark::Comma);
        assert_eq!(guess(&["1,234", "7,5"]).ambiguous, None);
        assert_eq!(guess(&["1,234", "7.5"]).ambiguous, None);
        assert_eq!(guess(&["12", "3"]).ambiguous, None, "integers read alike");
        assert_eq!(
            decimal_guess(["1,234"].into_iter(), b',').ambiguous,
            None,
            "a comma delimiter leaves only the point"
        );
    }

    #[test]
    fn comma_file_without_header() {
        let (d, mark, header) = sniff("1.5,2.5,3\n2,3.5,4\n");
        assert_eq!((d, mark, header), (b',', DecimalMark::Point, false));
    }

    #[test]
    fn tab_file_with_quoted_commas() {
        let (d, _, header) = sniff("site\tnote\tvalue\n\"A\"\t\"x, y\"\t3\nB\tz\t4\n");
        assert_eq!((d, header), (b'\t', true));
    }

    #[test]
    fn records_skip_blank_lines_and_keep_quoted_newlines() {
        let text = b"a,b\r\n\r\n1,\"two\nlines\"\n   \n3,4";
        let recs = records(text).expect("closed");
        let lines: Vec<usize> = recs.iter().map(|r| r.line).collect();
        assert_eq!(lines, [1, 3, 6]);
        assert_eq!(&text[recs[0].start..recs[0].end], b"a,b");
    }

    #[test]
    fn a_lone_carriage_return_ends_a_line() {
        // Old spreadsheet exports: CR only, or CR mixed with CRLF and LF.
        let text = b"a,b\r1,2\r\n3,4\n5,\"six\rlines\"\r7,8\r";
        let recs = records(text).expect("closed quotes");
        let lines: Vec<&[u8]> = recs.iter().map(|r| &text[r.start..r.end]).collect();
        assert_eq!(
            lines,
            [&b"a,b"[..], b"1,2", b"3,4", b"5,\"six\rlines\"", b"7,8"]
        );
        assert_eq!(
            recs.iter().map(|r| r.line).collect::<Vec<_>>(),
            [1, 2, 3, 4, 6]
        );
        assert_eq!(
            count_line_breaks(b"x\ry\r\nz\r", false),
            2,
            "a CR at a piece's end waits"
        );
    }

    #[test]
    fn unclosed_quote_reports_its_line() {
        assert_eq!(records(b"a,b\n1,\"open\n2,3\n"), Err(2));
    }
}
