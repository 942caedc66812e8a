//! Delimited-text loader: any bytes, under options chosen by the first byte.
#![no_main]

use std::path::Path;

use libfuzzer_sys::fuzz_target;
use plumb_data::{DecimalMark, HeaderMode, LoadOptions};

fuzz_target!(|data: &[u8]| {
    // A reader library's panic that the loader contains is a clean failure, not a crash; every
    // other panic still aborts (libfuzzer's hook is kept behind this one).
    plumb_data::quiet_reader_panics();
    let Some((&knob, text)) = data.split_first() else { return };
    let options = LoadOptions {
        delimiter: [None, Some(b','), Some(b';'), Some(b'\t')][usize::from(knob & 3)],
        header: [HeaderMode::Auto, HeaderMode::Yes, HeaderMode::No, HeaderMode::Auto]
            [usize::from((knob >> 2) & 3)],
        decimal: [None, Some(DecimalMark::Point), Some(DecimalMark::Comma), None]
            [usize::from((knob >> 4) & 3)],
        missing_tokens: if knob & 64 != 0 { vec!["-999".into()] } else { Vec::new() },
        ..LoadOptions::default()
    };
    if let Ok(table) = plumb_data::load_bytes(Path::new("fuzz.csv"), text, false, &options) {
        // Everything downstream of a successful load must hold up too.
        let names: Vec<String> = table.columns().iter().map(|c| c.name.clone()).collect();
        for c in table.columns() {
            let _ = c.summary();
        }
        if let [a, b, ..] = names.as_slice() {
            let _ = table.complete_rows(&[a, b], &[1]);
        }
    }
});
