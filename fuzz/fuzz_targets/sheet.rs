//! Spreadsheet loader (xlsx, xls, xlsb, ods detected from the bytes).
#![no_main]

use std::path::Path;

use libfuzzer_sys::fuzz_target;
use plumb_data::LoadOptions;

fuzz_target!(|data: &[u8]| {
    // A reader library's panic that the loader contains is a clean failure, not a crash; every
    // other panic still aborts (libfuzzer's hook is kept behind this one).
    plumb_data::quiet_reader_panics();
    if let Ok(table) = plumb_data::load_bytes(Path::new("fuzz.xlsx"), data, true, &LoadOptions::default()) {
        for c in table.columns() {
            let _ = c.summary();
        }
    }
});
