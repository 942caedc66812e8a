//! Session texts kept from fuzzing (`fuzz/regressions/session/`): each must parse or be
//! refused with a message naming the file — never panic. See fuzz/README.md.

use std::path::Path;

#[test]
fn session_inputs_from_fuzzing_parse_or_fail_cleanly() {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../fuzz/regressions/session");
    let mut n = 0;
    for entry in std::fs::read_dir(&dir)
        .expect("regression folder")
        .flatten()
    {
        let path = entry.path();
        if path.file_name().is_some_and(|f| f == "README.md") {
            continue;
        }
        n += 1;
        let text = String::from_utf8_lossy(&std::fs::read(&path).expect("read")).into_owned();
        match plumb_report::Session::from_json(Path::new("kept.plumb"), &text) {
            Ok(s) => {
                let _ = s.data_path(Path::new("/tmp/kept.plumb"));
                let _ = s.data.load.to_options();
            }
            Err(e) => assert!(
                e.to_string().contains("kept.plumb"),
                "{}: {e}",
                path.display()
            ),
        }
    }
    assert!(n > 0, "fuzz/regressions/session holds the kept inputs");
}
