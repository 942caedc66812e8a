//! Parquet reader: any bytes (seeds are real files with every column type we meet).
#![no_main]

use std::path::Path;

use libfuzzer_sys::fuzz_target;
use plumb_data::LoadOptions;

fuzz_target!(|data: &[u8]| {
    // A reader library's panic that the loader contains is a clean failure, not a crash; every
    // other panic still aborts (libfuzzer's hook is kept behind this one).
    plumb_data::quiet_reader_panics();
    let options = LoadOptions::default();
    if let Ok(table) = plumb_data::load_parquet_bytes(Path::new("fuzz.parquet"), data, &options) {
        for c in table.columns() {
            let _ = c.summary();
        }
    }
});
