//! The text encoding of a delimited file: what instruments and spreadsheets export besides
//! UTF-8 — UTF-16 with a byte-order mark ("Unicode text"), and Windows-1252 (the superset of
//! Latin-1 that older Windows exports use: µ, °, ², ä as single bytes). Decoding is
//! `encoding_rs`'s; only the choice is made here.

use std::borrow::Cow;
use std::path::Path;

use crate::{DataError, Result};

/// A text encoding Plumbline reads.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum TextEncoding {
    /// UTF-8 (with or without a byte-order mark).
    Utf8,
    /// UTF-16, little-endian.
    Utf16Le,
    /// UTF-16, big-endian.
    Utf16Be,
    /// Windows-1252 (read for Latin-1 / ISO-8859-1 too, of which it is a superset in print).
    Windows1252,
}

impl TextEncoding {
    /// Every encoding, in the order offered.
    pub const ALL: [Self; 4] = [Self::Utf8, Self::Utf16Le, Self::Utf16Be, Self::Windows1252];

    /// The name used in output, options and session files.
    pub fn as_str(self) -> &'static str {
        match self {
            Self::Utf8 => "utf-8",
            Self::Utf16Le => "utf-16le",
            Self::Utf16Be => "utf-16be",
            Self::Windows1252 => "windows-1252",
        }
    }

    /// Reads a name as written by [`Self::as_str`] or a common alias (`utf8`, `latin-1`,
    /// `iso-8859-1`, `cp1252`), in any case.
    pub fn parse(name: &str) -> Option<Self> {
        match name.trim().to_ascii_lowercase().as_str() {
            "utf-8" | "utf8" => Some(Self::Utf8),
            "utf-16le" | "utf16le" => Some(Self::Utf16Le),
            "utf-16be" | "utf16be" => Some(Self::Utf16Be),
            "windows-1252" | "cp1252" | "latin-1" | "latin1" | "iso-8859-1" => {
                Some(Self::Windows1252)
            }
            _ => None,
        }
    }

    fn codec(self) -> &'static encoding_rs::Encoding {
        match self {
            Self::Utf8 => encoding_rs::UTF_8,
            Self::Utf16Le => encoding_rs::UTF_16LE,
            Self::Utf16Be => encoding_rs::UTF_16BE,
            Self::Windows1252 => encoding_rs::WINDOWS_1252,
        }
    }
}

/// Text as UTF-8, with the encoding it was read in and, when that was a guess, a note.
pub(crate) struct Decoded<'a> {
    /// The text, UTF-8, without a byte-order mark.
    pub text: Cow<'a, [u8]>,
    /// The encoding read.
    pub encoding: TextEncoding,
    /// Set when the encoding was a fallback the analyst should check.
    pub note: Option<String>,
}

/// Decodes `bytes`: in `asked` when given; else by its byte-order mark; else UTF-16 when
/// every other byte of the start is zero (an export without a mark); else UTF-8 when the
/// bytes are valid UTF-8; else Windows-1252, with a note naming the first line that is not
/// UTF-8.
///
/// # Errors
/// [`DataError::NotUtf8`] when UTF-8 was asked for and the bytes are not; [`DataError::Parse`]
/// when UTF-16 was asked for and the bytes do not decode.
pub(crate) fn decode<'a>(
    path: &Path,
    bytes: &'a [u8],
    asked: Option<TextEncoding>,
) -> Result<Decoded<'a>> {
    // Whether the whole of `bytes` was already found to be valid UTF-8 (checked once).
    let mut checked = false;
    let encoding = match asked {
        Some(e) => e,
        None => match encoding_rs::Encoding::for_bom(bytes) {
            Some((codec, _)) if codec == encoding_rs::UTF_16LE => TextEncoding::Utf16Le,
            Some((codec, _)) if codec == encoding_rs::UTF_16BE => TextEncoding::Utf16Be,
            Some(_) => TextEncoding::Utf8,
            // Zero bytes are valid UTF-8, so UTF-16 without a mark is looked for first.
            None => utf16_without_mark(bytes).unwrap_or_else(|| {
                if is_utf8(bytes) {
                    checked = true;
                    TextEncoding::Utf8
                } else {
                    TextEncoding::Windows1252
                }
            }),
        },
    };
    let note = (asked.is_none() && encoding == TextEncoding::Windows1252).then(|| {
        format!(
            "the bytes are not UTF-8 (first at line {}); read as Windows-1252 (Latin-1), \
             the usual encoding of older Windows exports: check that names and text such as \
             µ, ° or ä look right, or choose the encoding (--encoding)",
            first_bad_line(bytes)
        )
    });
    let text = match encoding {
        TextEncoding::Utf8 => {
            let body = bytes.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(bytes);
            if !checked && !is_utf8(body) {
                return Err(DataError::NotUtf8 {
                    path: path.to_path_buf(),
                    line: first_bad_line(body),
                });
            }
            Cow::Borrowed(body)
        }
        other => {
            let (text, had_errors) = other.codec().decode_with_bom_removal(bytes);
            if had_errors && other != TextEncoding::Windows1252 {
                return Err(DataError::Parse {
                    path: path.to_path_buf(),
                    message: format!(
                        "the bytes are not valid {} (an odd length, or a broken pair); choose \
                         another encoding (--encoding) or re-save the file as UTF-8",
                        other.as_str()
                    ),
                });
            }
            Cow::Owned(text.into_owned().into_bytes())
        }
    };
    Ok(Decoded {
        text,
        encoding,
        note,
    })
}

/// UTF-16 without a byte-order mark, told by zero bytes: text exports of Latin letters and
/// digits have a zero in every other byte. At least 16 units are needed to judge.
fn utf16_without_mark(bytes: &[u8]) -> Option<TextEncoding> {
    let head = &bytes[..bytes.len().min(4096) & !1];
    let units = head.len() / 2;
    if units < 16 {
        return None;
    }
    let zeros = |offset: usize| {
        head.iter()
            .skip(offset)
            .step_by(2)
            .filter(|&&b| b == 0)
            .count()
    };
    let (even, odd) = (zeros(0), zeros(1));
    if odd * 10 >= units * 9 && even == 0 {
        Some(TextEncoding::Utf16Le)
    } else if even * 10 >= units * 9 && odd == 0 {
        Some(TextEncoding::Utf16Be)
    } else {
        None
    }
}

/// Whether `bytes` are valid UTF-8 (checked with SIMD; the slower standard check is kept
/// for finding where they are not).
fn is_utf8(bytes: &[u8]) -> bool {
    simdutf8::basic::from_utf8(bytes).is_ok()
}

fn first_bad_line(bytes: &[u8]) -> usize {
    let valid = std::str::from_utf8(bytes).map_or_else(|e| e.valid_up_to(), |_| bytes.len());
    1 + count_newlines(&bytes[..valid])
}

fn count_newlines(bytes: &[u8]) -> usize {
    bytes.iter().filter(|&&b| b == b'\n').count()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn read(bytes: &[u8], asked: Option<TextEncoding>) -> (String, TextEncoding, bool) {
        let d = decode(Path::new("f.csv"), bytes, asked).expect("decodes");
        let text = String::from_utf8(d.text.into_owned()).expect("utf-8 out");
        (text, d.encoding, d.note.is_some())
    }

    fn utf16(text: &str, big: bool, mark: bool) -> Vec<u8> {
        let mut out = Vec::new();
        if mark {
            out.extend_from_slice(if big { &[0xFE, 0xFF] } else { &[0xFF, 0xFE] });
        }
        for unit in text.encode_utf16() {
            let b = if big {
                unit.to_be_bytes()
            } else {
                unit.to_le_bytes()
            };
            out.extend_from_slice(&b);
        }
        out
    }

    #[test]
    fn marks_then_utf8_then_windows_1252() {
        let text = "conc_µg_L;temp_°C\n1,5;20\n";
        assert_eq!(
            read(text.as_bytes(), None),
            (text.into(), TextEncoding::Utf8, false)
        );
        let bom = [b"\xEF\xBB\xBF".as_slice(), text.as_bytes()].concat();
        assert_eq!(read(&bom, None).0, text, "the mark is dropped");
        assert_eq!(
            read(&utf16(text, false, true), None),
            (text.into(), TextEncoding::Utf16Le, false)
        );
        assert_eq!(
            read(&utf16(text, true, true), None),
            (text.into(), TextEncoding::Utf16Be, false)
        );
        // µ is 0xB5 and ° is 0xB0 in Windows-1252: not UTF-8, so the fallback, with a note.
        let legacy = b"conc_\xB5g_L;temp_\xB0C\n1,5;20\n";
        assert_eq!(
            read(legacy, None),
            (text.into(), TextEncoding::Windows1252, true)
        );
    }

    #[test]
    fn utf16_without_a_mark_is_told_by_its_zero_bytes() {
        let text = "dose,response\n1,2\n2,4\n3,6\n";
        assert_eq!(
            read(&utf16(text, false, false), None).1,
            TextEncoding::Utf16Le
        );
        assert_eq!(
            read(&utf16(text, true, false), None).1,
            TextEncoding::Utf16Be
        );
    }

    #[test]
    fn an_asked_encoding_wins_and_a_wrong_one_is_named() {
        let legacy = b"a\xE4b\n1\n";
        assert_eq!(
            read(legacy, Some(TextEncoding::Windows1252)),
            ("aäb\n1\n".into(), TextEncoding::Windows1252, false)
        );
        let e = decode(Path::new("f.csv"), legacy, Some(TextEncoding::Utf8))
            .err()
            .expect("not utf-8");
        assert!(matches!(e, DataError::NotUtf8 { line: 1, .. }), "{e}");
        let odd = decode(Path::new("f.csv"), b"abc", Some(TextEncoding::Utf16Le))
            .err()
            .expect("odd length");
        assert!(odd.to_string().contains("not valid utf-16le"), "{odd}");
    }

    #[test]
    fn names_parse_with_their_aliases() {
        for e in TextEncoding::ALL {
            assert_eq!(TextEncoding::parse(e.as_str()), Some(e));
        }
        assert_eq!(
            TextEncoding::parse("Latin-1"),
            Some(TextEncoding::Windows1252)
        );
        assert_eq!(TextEncoding::parse("ebcdic"), None);
    }
}
