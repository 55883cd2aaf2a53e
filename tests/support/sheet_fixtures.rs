//! The fixture worksheets of the spreadsheet-file tests (sheet_files.rs,
//! sheet_files_engine.rs).

use loopwright::sheet::Sheet;
use std::path::PathBuf;

/// The fixture worksheets: tests/fixtures/sheets/*.json (01-demo.json is the page's demo).
pub fn fixtures() -> Vec<(String, Sheet)> {
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/sheets");
    let mut paths: Vec<_> = std::fs::read_dir(&dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .collect();
    paths.sort();
    paths
        .into_iter()
        .map(|p| {
            let mut s = Sheet::new();
            s.load_document(&std::fs::read_to_string(&p).unwrap())
                .unwrap();
            (p.file_stem().unwrap().to_string_lossy().into_owned(), s)
        })
        .collect()
}
