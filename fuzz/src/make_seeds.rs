//! Writes seed inputs for the fuzz targets into fuzz/corpus/: the bad-input corpus, the demo
//! scenarios, sessions, and a few small workbooks made here.

use std::path::Path;

fn main() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let corpus = root.join("corpus");
    for t in ["delimited", "sheet", "session", "parquet", "rows"] {
        std::fs::create_dir_all(corpus.join(t)).expect("corpus folder");
    }
    let sources = [root.join("../tests/bad-input"), root.join("../demo-scenarios/data")];
    for dir in &sources {
        for entry in std::fs::read_dir(dir).expect("seed folder").flatten() {
            let path = entry.path();
            let name = path.file_name().expect("name").to_string_lossy().into_owned();
            let Ok(bytes) = std::fs::read(&path) else { continue };
            if bytes.len() > 200_000 {
                continue;
            }
            let target = match path.extension().and_then(|e| e.to_str()) {
                Some("plumb") => "session",
                Some("xlsx") => "sheet",
                Some("parquet") => "parquet",
                Some("csv" | "tsv" | "txt") => "delimited",
                _ => continue,
            };
            let mut seed = bytes.clone();
            if target == "delimited" {
                seed.insert(0, 0); // the options byte: all automatic
            }
            std::fs::write(corpus.join(target).join(name), seed).expect("write seed");
        }
    }
    for (k, rows) in [3usize, 20].into_iter().enumerate() {
        let mut book = rust_xlsxwriter::Workbook::new();
        let sheet = book.add_worksheet();
        sheet.write_string(0, 0, "dose").expect("cell");
        sheet.write_string(0, 1, "response").expect("cell");
        sheet.write_string(0, 2, "note").expect("cell");
        for r in 1..=rows {
            sheet.write_number(r as u32, 0, r as f64 * 1.5).expect("cell");
            sheet.write_number(r as u32, 1, (r as f64).sqrt()).expect("cell");
            if r % 3 == 0 {
                sheet.write_string(r as u32, 2, "re-run").expect("cell");
            }
        }
        let bytes = book.save_to_buffer().expect("workbook");
        std::fs::write(corpus.join("sheet").join(format!("made-{k}.xlsx")), bytes).expect("write");
    }
    // Row lists: two bytes of table size (little-endian), then the list.
    let lists = ["3,17,40-42", "1-18446744073709551615", " , 4 ,", "5-2", "0", "7-7,1"];
    for (k, list) in lists.iter().enumerate() {
        let mut seed = 50u16.to_le_bytes().to_vec();
        seed.extend_from_slice(list.as_bytes());
        std::fs::write(corpus.join("rows").join(format!("list-{k}")), seed).expect("write");
    }
    println!("seeds written to {}", corpus.display());
}
