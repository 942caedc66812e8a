//! Session parser: any text.
#![no_main]

use std::path::Path;

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let text = String::from_utf8_lossy(data);
    if let Ok(s) = plumb_report::Session::from_json(Path::new("fuzz.plumb"), &text) {
        // What the workbench does with a session it accepted.
        let _ = s.data_path(Path::new("/tmp/fuzz.plumb"));
        let _ = s.data.load.to_options();
        for m in &s.models {
            let _ = m.request(s.exclusions.iter().map(|e| e.row).collect());
        }
    }
});
