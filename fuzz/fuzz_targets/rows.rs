//! The row-list parser of `--exclude` (`3,17,40-42`), then the list against a table size taken
//! from the first bytes: nothing may panic, overflow or allocate past the table.
#![no_main]

use std::path::Path;

use libfuzzer_sys::fuzz_target;
use plumb_data::RowList;

fuzz_target!(|data: &[u8]| {
    let Some((size, text)) = data.split_at_checked(2) else { return };
    let n_rows = usize::from(u16::from_le_bytes([size[0], size[1]]));
    let Ok(text) = std::str::from_utf8(text) else { return };
    if let Ok(list) = RowList::parse(text) {
        if let Ok(rows) = list.within(n_rows, Path::new("fuzz.csv")) {
            assert!(rows.iter().all(|&r| (1..=n_rows).contains(&r)));
        }
        if let Some(rows) = list.first(1000) {
            assert!(rows.len() <= 1000);
        }
    }
});
