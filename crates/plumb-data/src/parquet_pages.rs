//! A look at every page header of a Parquet file before polars decodes it.
//!
//! The decoder of polars-parquet 0.52 sizes its buffers from the counts in page headers
//! without checking them: a negative value count (read as an enormous unsigned one) makes it
//! ask for exabytes, and the process aborts — a panic can be contained, an allocation failure
//! cannot. The headers are small, so reading them all first costs little.

use std::io::Cursor;
use std::path::Path;

use polars_parquet::parquet::page::{CompressedPage, DataPageHeader};
use polars_parquet::parquet::read::{get_page_iterator, read_metadata};
use polars_utils::mmap::{MemReader, MemSlice};

use crate::{DataError, Result};

/// Refuses a file whose page headers claim value counts outside their column chunk's. A file
/// whose metadata or pages cannot be read at all is left for the reader to report.
pub(crate) fn check(path: &Path, whole: &MemSlice) -> Result<()> {
    let bytes: &[u8] = whole;
    let Ok(meta) = read_metadata(&mut Cursor::new(bytes)) else {
        return Ok(());
    };
    for (g, group) in meta.row_groups.iter().enumerate() {
        for chunk in group.parquet_columns() {
            let total = chunk.num_values();
            let name = chunk.descriptor().path_in_schema.join(".");
            let Ok(pages) = get_page_iterator(
                chunk,
                MemReader::new(whole.clone()),
                Vec::new(),
                bytes.len(),
            ) else {
                continue;
            };
            // Each header read moves on through the file, so this ends; a page that cannot be
            // read ends the look at its chunk (the reader will report it).
            for page in pages {
                let page = match page {
                    Ok(CompressedPage::Data(page)) => page,
                    Ok(CompressedPage::Dict(_)) => continue,
                    Err(_) => break,
                };
                if let Some(count) = bad_count(page.header(), total) {
                    return Err(DataError::Parse {
                        path: path.to_path_buf(),
                        message: format!(
                            "a page of column '{name}' (row group {}) claims {count} values where its column holds {total}; the file is damaged. Save it again from the program that wrote it, or export it as CSV",
                            g + 1
                        ),
                    });
                }
            }
        }
    }
    Ok(())
}

/// The first count in a data page header that is negative or more than the chunk holds.
fn bad_count(header: &DataPageHeader, total: i64) -> Option<i64> {
    let counts: [i32; 3] = match header {
        DataPageHeader::V1(h) => [h.num_values, 0, 0],
        DataPageHeader::V2(h) => [h.num_values, h.num_rows, h.num_nulls],
    };
    counts
        .into_iter()
        .map(i64::from)
        .find(|&n| n < 0 || n > total.max(0))
}
