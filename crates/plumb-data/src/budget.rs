//! A memory budget for loading: an absurdly large text file is refused with a clear message
//! before it is read, instead of driving the machine into swap or the out-of-memory killer.

use std::path::Path;

use crate::{DataError, Result};

/// Memory a delimited-text load needs is [`TEXT_BYTE_FACTOR`] bytes per byte of text plus
/// [`TEXT_CELL_BYTES`] per cell: the cells dominate when they are short, the bytes when they
/// are long. The line covers the worst path a file can take, the cell-by-cell one, since
/// which path a file takes is known only once it is read. Measured by `bench/memory_cap.py`
/// (peak resident memory of `plumb columns` on 40 MB files of numbers and of text of 1 to
/// 100 bytes a cell, with stray words, and taking the cell-by-cell path): the cell-by-cell
/// path peaked at 636–690 MiB for 18–20 M one-byte cells, 201–223 MiB for 1.6 M 30-byte texts
/// and 179–196 MiB for 0.75 M 100-byte texts; the typed path at 318–410 MiB for 20 M cells
/// and 69–237 MiB for longer ones (two runs). With these constants the estimate is 1.2–2.0 ×
/// the peak on the cell-by-cell path and 1.6–3.9 × on the typed path, which most files take.
pub const TEXT_BYTE_FACTOR: u64 = 6;

/// See [`TEXT_BYTE_FACTOR`].
pub const TEXT_CELL_BYTES: u64 = 34;

/// Memory per byte assumed while reading an input of unknown size (cells of about 8 bytes);
/// once read, the text is checked with its own cells.
const UNSIZED_FACTOR: u64 = 16;

/// Bytes sampled from the start of a text file to estimate its cells per byte.
const CELL_SAMPLE: usize = 1 << 20;

/// Memory a text load of `bytes` bytes holding `cells` cells needs.
pub fn text_need(bytes: u64, cells: u64) -> u64 {
    bytes
        .saturating_mul(TEXT_BYTE_FACTOR)
        .saturating_add(cells.saturating_mul(TEXT_CELL_BYTES))
}

/// Cells in `total` bytes of text whose start is `sample`: the fields of the sample's
/// complete lines (split by the sniffed delimiter) scaled to the total. A sample without a
/// complete line, or with a quote left open, counts as cells of one byte and a delimiter,
/// the worst case.
pub(crate) fn estimate_cells(sample: &[u8], total: u64) -> u64 {
    let worst = total / 2 + 1;
    let Some(end) = sample.iter().rposition(|&b| b == b'\n' || b == b'\r') else {
        return worst;
    };
    let head = &sample[..=end];
    let Ok(recs) = crate::sniff::records(head) else {
        return worst;
    };
    if recs.is_empty() {
        return worst;
    }
    let delimiter = crate::sniff::delimiter(head, &recs);
    let fields: u64 = recs
        .iter()
        .map(|r| crate::sniff::field_count(&head[r.start..r.end], delimiter) as u64)
        .sum();
    let scaled = u128::from(fields) * u128::from(total) / head.len() as u128;
    u64::try_from(scaled)
        .unwrap_or(u64::MAX)
        .max(fields.min(total))
}

/// How much of a text file may be read: `None` for a regular file within the budget
/// (checked from its size and a sample of its cells, before the read); for an input of
/// unknown size (a pipe, a device) the bytes the read may take before it is refused, since
/// such inputs report a size of 0.
///
/// # Errors
/// [`DataError::TooLarge`] for a regular file over the budget.
pub(crate) fn text_read_cap(path: &Path, limit: Option<u64>) -> Result<Option<u64>> {
    let Ok(meta) = std::fs::metadata(path) else {
        return Ok(None); // the read reports the problem with its own message
    };
    let Some(limit) = limit.or_else(available_memory) else {
        return Ok(None);
    };
    if !meta.is_file() {
        return Ok(Some(limit / UNSIZED_FACTOR));
    }
    let mut sample = vec![0u8; CELL_SAMPLE.min(usize::try_from(meta.len()).unwrap_or(CELL_SAMPLE))];
    let read = std::fs::File::open(path)
        .and_then(|mut f| read_up_to(&mut f, &mut sample))
        .unwrap_or(0);
    let cells = estimate_cells(&sample[..read], meta.len());
    check(path, meta.len(), text_need(meta.len(), cells), Some(limit))?;
    Ok(None)
}

/// Checks text already read (from an input of unknown size) against the budget.
pub(crate) fn check_text_read(path: &Path, bytes: &[u8], limit: Option<u64>) -> Result<()> {
    let sample = &bytes[..bytes.len().min(CELL_SAMPLE)];
    let total = bytes.len() as u64;
    check(
        path,
        total,
        text_need(total, estimate_cells(sample, total)),
        limit,
    )
}

/// The error for an input of unknown size that went past `cap` bytes.
pub(crate) fn unsized_too_large(path: &Path, read: u64, limit: Option<u64>) -> DataError {
    let limit = limit.or_else(available_memory).unwrap_or(0);
    DataError::TooLarge {
        path: path.to_path_buf(),
        bytes: read,
        need: text_need(read, read / 2),
        limit,
    }
}

/// Reads a binary file (workbook, Parquet) whole; an input of unknown size is read only up
/// to the budget, then refused.
///
/// # Errors
/// [`DataError::Io`], or [`DataError::TooLarge`] past the budget.
pub(crate) fn read_binary(path: &Path, limit: Option<u64>) -> Result<Vec<u8>> {
    let no_size = std::fs::metadata(path).is_ok_and(|m| !m.is_file());
    let cap = no_size
        .then(|| {
            limit
                .or_else(available_memory)
                .map(|l| l / TEXT_BYTE_FACTOR)
        })
        .flatten();
    crate::progress::read_all(path, None, cap).map_err(|stop| match stop {
        crate::progress::ReadStop::Failed(e) => e,
        crate::progress::ReadStop::PastCap(read) => unsized_too_large(path, read, limit),
    })
}

fn read_up_to(f: &mut std::fs::File, buf: &mut [u8]) -> std::io::Result<usize> {
    let mut n = 0;
    while n < buf.len() {
        match std::io::Read::read(f, &mut buf[n..])? {
            0 => break,
            k => n += k,
        }
    }
    Ok(n)
}

/// Refuses a text file whose load would need more than `limit` bytes (default: the memory
/// available now); see [`text_read_cap`].
#[cfg(test)]
pub(crate) fn check_text(path: &Path, limit: Option<u64>) -> Result<()> {
    text_read_cap(path, limit).map(|_| ())
}

/// Bytes of memory a spreadsheet load needs per byte of its uncompressed XML (estimate: a cell
/// is 30–60 bytes of XML and 80–100 bytes once read and typed; not measured).
pub const SHEET_EXPANSION: u64 = 4;

/// Most XML a workbook may unpack to, whatever the memory: a spreadsheet program's own limits
/// keep real sheets far below it (a 10 MB file whose shared strings unpack to 6 GB was met);
/// data this large belongs in delimited text or Parquet.
pub const SHEET_XML_MAX: u64 = 2 << 30;

/// Bytes of memory per cell of a Parquet file once read and typed (estimate, not measured).
pub const PARQUET_CELL_BYTES: u64 = 96;

/// Memory the kernel reports as available (`MemAvailable` in `/proc/meminfo`), if known.
pub fn available_memory() -> Option<u64> {
    let text = std::fs::read_to_string("/proc/meminfo").ok()?;
    let line = text.lines().find(|l| l.starts_with("MemAvailable:"))?;
    let kib: u64 = line.split_whitespace().nth(1)?.parse().ok()?;
    kib.checked_mul(1024)
}

/// Refuses a zipped workbook (xlsx, xlsm, xlsb, ods) whose entries unpack to more than the
/// budget allows — a zip bomb included. The sizes the zip directory declares are checked
/// first (nothing unpacked); then the entries are inflated into a counter that stops at the
/// budget, since a directory can understate them (the spreadsheet reader would otherwise
/// unpack them whole, shared-strings table included). Other files pass (the reader then says
/// what is wrong with them).
pub(crate) fn check_sheet(path: &Path, limit: Option<u64>) -> Result<()> {
    let Ok(file) = std::fs::File::open(path) else {
        return Ok(());
    };
    let Ok(mut archive) = zip::ZipArchive::new(file) else {
        return Ok(());
    };
    let declared = (0..archive.len())
        .filter_map(|i| archive.by_index_raw(i).ok().map(|e| e.size()))
        .fold(0u64, u64::saturating_add);
    check(
        path,
        declared,
        declared.saturating_mul(SHEET_EXPANSION),
        limit,
    )?;
    let limit = limit
        .or_else(available_memory)
        .unwrap_or(u64::MAX)
        .min(SHEET_XML_MAX.saturating_mul(SHEET_EXPANSION));
    check(
        path,
        declared,
        declared.saturating_mul(SHEET_EXPANSION),
        Some(limit),
    )?;
    let allowed = limit / SHEET_EXPANSION;
    let mut unpacked = 0u64;
    for i in 0..archive.len() {
        let Ok(entry) = archive.by_index(i) else {
            continue; // the reader names a broken entry itself
        };
        let mut capped = std::io::Read::take(entry, allowed.saturating_sub(unpacked) + 1);
        unpacked += std::io::copy(&mut capped, &mut std::io::sink()).unwrap_or(0);
        if unpacked > allowed {
            return check(
                path,
                unpacked,
                unpacked.saturating_mul(SHEET_EXPANSION),
                Some(limit),
            );
        }
    }
    Ok(())
}

/// Refuses a Parquet file with more cells than the budget allows.
pub(crate) fn check_cells(path: &Path, cells: u64, limit: Option<u64>) -> Result<()> {
    let bytes = std::fs::metadata(path).map_or(0, |m| m.len());
    check(path, bytes, cells.saturating_mul(PARQUET_CELL_BYTES), limit)
}

fn check(path: &Path, bytes: u64, need: u64, limit: Option<u64>) -> Result<()> {
    let Some(limit) = limit.or_else(available_memory) else {
        return Ok(());
    };
    if need > limit {
        return Err(DataError::TooLarge {
            path: path.to_path_buf(),
            bytes,
            need,
            limit,
        });
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_file_beyond_the_budget_is_refused_with_the_sizes_named() {
        let dir = tempfile::tempdir().expect("dir");
        let path = dir.path().join("big.csv");
        std::fs::write(&path, "a,b\n".repeat(1000)).expect("write");
        assert!(check_text(&path, Some(1 << 30)).is_ok());
        let err = check_text(&path, Some(10_000))
            .expect_err("over budget")
            .to_string();
        assert!(
            err.contains("big.csv") && err.contains("4000 bytes"),
            "{err}"
        );
        assert!(err.contains("Parquet"), "says what to do: {err}");
        assert!(
            available_memory().is_some_and(|m| m > 0),
            "Linux reports MemAvailable"
        );
    }

    #[test]
    fn the_estimate_counts_cells_by_the_sniffed_delimiter() {
        // 1,5;2,25 holds two cells whatever its decimal commas.
        let text = "a;b\n1,5;2,25\n3,0;4,5\n";
        assert_eq!(estimate_cells(text.as_bytes(), text.len() as u64), 6);
        let doubled = estimate_cells(text.as_bytes(), 2 * text.len() as u64);
        assert_eq!(doubled, 12, "scaled to the file's size");
        assert_eq!(estimate_cells(b"no line end", 11), 6, "the worst case");
        // Short cells cost more than long ones of the same bytes.
        let short = "1,2\n".repeat(1000);
        let long = format!("{},{}\n", "1".repeat(30), "2".repeat(30)).repeat(65);
        let need =
            |t: &str| text_need(t.len() as u64, estimate_cells(t.as_bytes(), t.len() as u64));
        assert!(
            need(&short) > 2 * need(&long),
            "{} vs {}",
            need(&short),
            need(&long)
        );
    }

    #[test]
    fn an_input_of_unknown_size_is_capped_by_bytes_read() {
        let cap = text_read_cap(Path::new("/dev/zero"), Some(16_000))
            .expect("a device is not refused before the read");
        assert_eq!(cap, Some(1_000));
        let err = unsized_too_large(Path::new("/dev/zero"), 1_001, Some(16_000));
        assert!(err.to_string().contains("/dev/zero"), "{err}");
    }

    #[test]
    fn a_workbook_that_unpacks_beyond_the_budget_is_refused_before_unpacking() {
        let dir = tempfile::tempdir().expect("dir");
        let path = dir.path().join("book.xlsx");
        let mut book = rust_xlsxwriter::Workbook::new();
        let sheet = book.add_worksheet();
        for r in 0..2000u32 {
            sheet.write_number(r, 0, f64::from(r)).expect("cell");
        }
        book.save(&path).expect("save");
        assert!(check_sheet(&path, Some(1 << 30)).is_ok());
        let err = check_sheet(&path, Some(50_000))
            .expect_err("over budget")
            .to_string();
        assert!(
            err.contains("book.xlsx") && err.contains("more than"),
            "{err}"
        );
        // The shared-strings table counted as it is inflated, not as the directory says: a
        // table of 20 MB in a small file is refused under a 40 MB budget (10 MB of XML).
        let strings = dir.path().join("strings.xlsx");
        {
            use std::io::Write as _;
            let mut z = zip::ZipWriter::new(std::fs::File::create(&strings).expect("create"));
            let deflated = zip::write::SimpleFileOptions::default()
                .compression_method(zip::CompressionMethod::Deflated);
            z.start_file("xl/sharedStrings.xml", deflated)
                .expect("entry");
            let si = format!("<si><t>{}</t></si>", "A".repeat(2000));
            for _ in 0..10_000 {
                z.write_all(si.as_bytes()).expect("write");
            }
            z.finish().expect("zip");
        }
        assert!(std::fs::metadata(&strings).expect("size").len() < 200_000);
        let err = check_sheet(&strings, Some(40 << 20)).expect_err("over budget");
        assert!(err.to_string().contains("strings.xlsx"), "{err}");
        assert!(check_sheet(&strings, Some(1 << 30)).is_ok());
        // Not a zip: left to the reader, which names the problem itself.
        std::fs::write(&path, b"not a workbook").expect("write");
        assert!(check_sheet(&path, Some(1)).is_ok());
        assert!(check_cells(&path, 1_000_000, Some(1_000)).is_err());
    }
}
