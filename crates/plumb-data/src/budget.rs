//! A memory budget for loading: an absurdly large text file is refused with a clear message
//! before it is read, instead of driving the machine into swap or the out-of-memory killer.

use std::path::Path;

use crate::{DataError, Result};

/// Bytes of memory a delimited-text load needs per byte of file. Measured: the 38 MB, 1 M-row
/// demo sensor log peaks at 494 MB resident in `plumb columns` (13×); 16 leaves a margin.
pub const TEXT_EXPANSION: u64 = 16;

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

/// Refuses a text file whose load would need more than `limit` bytes (default: the memory
/// available now). Without a known limit nothing is refused.
pub(crate) fn check_text(path: &Path, limit: Option<u64>) -> Result<()> {
    let Ok(meta) = std::fs::metadata(path) else {
        return Ok(()); // the read reports the problem with its own message
    };
    check(
        path,
        meta.len(),
        meta.len().saturating_mul(TEXT_EXPANSION),
        limit,
    )
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
