//! The exported files opened in a real spreadsheet engine: LibreOffice Calc,
//! headless (`soffice --headless --convert-to csv`, installed by scripts/setup.sh
//! from Debian's `libreoffice-calc-nogui`), converts the Design sheet of each
//! exported .ods and .xlsx to CSV after recalculating every formula, and each value
//! is compared with the worksheet's own.
//!
//! Recalculation: the files are written without the results of their live
//! formulas (`cache_formula_results: false`), so the engine must compute them;
//! and its user profile (made here, in a temporary folder) sets "recalculate on
//! load: always" for both formats (`ODFRecalcMode` and `OOXMLRecalcMode` = 0 under
//! /org.openoffice.Office.Calc/Formula/Load). A formula the engine could not
//! compute would show an error or an empty field, and fail the comparison.
//!
//! Without soffice on the PATH the test fails when LOOPWRIGHT_REQUIRE_SOFFICE=1
//! (as `make test-sheetfiles` sets it), and is skipped with a message otherwise.

use loopwright::sheet::files::{export_ods, export_xlsx, ExportOptions};
use loopwright::sheet::{CellRef, Sheet, Value};
use std::path::Path;
use std::process::Command;

#[path = "support/sheet_fixtures.rs"]
mod sheet_fixtures;

/// Relative tolerance of a number read back from the engine's CSV: it writes
/// numbers with 15 significant digits at most (IEEE 754 doubles carry 15.95), so
/// the values agree to about 5e-15 relative; 1e-12 leaves room for the last digit
/// of the engine's own arithmetic on chained formulas.
const REL_TOLERANCE: f64 = 1e-12;

const PROFILE: &str = r#"<?xml version="1.0" encoding="UTF-8"?>
<oor:items xmlns:oor="http://openoffice.org/2001/registry" xmlns:xs="http://www.w3.org/2001/XMLSchema" xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance">
<item oor:path="/org.openoffice.Office.Calc/Formula/Load"><prop oor:name="OOXMLRecalcMode" oor:op="fuse"><value>0</value></prop></item>
<item oor:path="/org.openoffice.Office.Calc/Formula/Load"><prop oor:name="ODFRecalcMode" oor:op="fuse"><value>0</value></prop></item>
</oor:items>
"#;

/// CSV filter options (LibreOffice's CSV filter tokens, in order): comma, double
/// quote, UTF-8 (76), from line 1, no column formats, language en-US (1033),
/// quoted fields as text off, detect special numbers on, save cell contents as
/// shown OFF (raw values, not the number format with its unit), export formulas
/// off, remove spaces off, sheet 2 (the Design sheet; the first is the cover;
/// LibreOffice 7.2 and later, which name the output `<file>-<sheet>.csv`).
const CSV_FILTER: &str =
    "csv:Text - txt - csv (StarCalc):44,34,76,1,,1033,false,true,false,false,false,2";

fn soffice() -> Option<String> {
    let found = Command::new("soffice")
        .arg("--version")
        .output()
        .is_ok_and(|o| o.status.success());
    found.then(|| String::from("soffice"))
}

fn convert(soffice: &str, dir: &Path, files: &[std::path::PathBuf]) {
    convert_to(soffice, dir, CSV_FILTER, &dir.join("csv"), files);
}

fn convert_to(
    soffice: &str,
    dir: &Path,
    filter: &str,
    out_dir: &Path,
    files: &[std::path::PathBuf],
) {
    let profile = dir.join("profile");
    std::fs::create_dir_all(profile.join("user")).unwrap();
    std::fs::write(profile.join("user/registrymodifications.xcu"), PROFILE).unwrap();
    let out = Command::new(soffice)
        .arg(format!(
            "-env:UserInstallation=file://{}",
            profile.display()
        ))
        .args([
            "--headless",
            "--norestore",
            "--convert-to",
            filter,
            "--outdir",
        ])
        .arg(out_dir)
        .args(files)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "soffice failed: {}",
        String::from_utf8_lossy(&out.stderr)
    );
}

/// The worksheet's shown value against the engine's CSV field.
fn agrees(ours: &Value, field: &str) -> Result<(), String> {
    match ours {
        Value::Number(x, _) => {
            let theirs: f64 = field
                .parse()
                .map_err(|_| format!("the engine shows \"{field}\", the worksheet {x}"))?;
            let scale = x.abs().max(f64::MIN_POSITIVE);
            if (theirs - x).abs() <= REL_TOLERANCE * scale {
                Ok(())
            } else {
                Err(format!("the engine computes {theirs}, the worksheet {x}"))
            }
        }
        Value::Bool(b) => {
            let want = if *b { "TRUE" } else { "FALSE" };
            (field == want)
                .then_some(())
                .ok_or_else(|| format!("the engine shows \"{field}\", the worksheet {want}"))
        }
        Value::Empty => (field.is_empty())
            .then_some(())
            .ok_or_else(|| format!("the engine shows \"{field}\" in an empty cell")),
        v => {
            let want = v.display();
            (field == want)
                .then_some(())
                .ok_or_else(|| format!("the engine shows \"{field}\", the worksheet \"{want}\""))
        }
    }
}

/// Every cell of the used range, compared; the count of cells compared.
fn compare(name: &str, sheet: &Sheet, csv: &str, failures: &mut Vec<String>) -> usize {
    let rows = loopwright::csv::read_all(csv, b',', loopwright::csv::BlankLines::Keep);
    let Some(used) = sheet.used_range() else {
        return 0;
    };
    let mut compared = 0;
    for row in 0..=used.end.row {
        for col in 0..=used.end.col {
            let c = CellRef { row, col };
            let field = rows
                .get(row as usize)
                .and_then(|r| r.fields.get(col as usize))
                .map_or("", String::as_str);
            let ours = sheet.shown(c);
            compared += usize::from(ours != Value::Empty);
            if let Err(why) = agrees(&ours, field) {
                failures.push(format!("{name} {c}: {why}"));
            }
        }
    }
    compared
}

/// How many formulas the Design sheet of an .xlsx carries live (`<f>` elements).
fn live_formulas(xlsx: &[u8]) -> usize {
    let mut zip = zip::ZipArchive::new(std::io::Cursor::new(xlsx)).unwrap();
    let mut part = zip.by_name("xl/worksheets/sheet2.xml").unwrap();
    let mut text = String::new();
    std::io::Read::read_to_string(&mut part, &mut text).unwrap();
    text.matches("<f>").count()
}

#[test]
fn the_engine_recomputes_every_value_alike() {
    let Some(soffice) = soffice() else {
        assert!(
            std::env::var("LOOPWRIGHT_REQUIRE_SOFFICE").is_err(),
            "soffice is not installed (scripts/setup.sh installs it)"
        );
        eprintln!("skipped: soffice is not installed");
        return;
    };
    let dir = std::env::temp_dir().join(format!("loopwright-sheetfiles-{}", std::process::id()));
    std::fs::create_dir_all(dir.join("csv")).unwrap();
    let options = ExportOptions {
        date: "2026-12-03T12:00:00Z".into(),
        cache_formula_results: false,
    };
    let sheets = sheet_fixtures::fixtures();
    let mut files = Vec::new();
    let mut live = 0;
    for (name, sheet) in &sheets {
        let ods = dir.join(format!("{name}-ods.ods"));
        std::fs::write(&ods, export_ods(sheet, &options).unwrap()).unwrap();
        let xlsx = dir.join(format!("{name}-xlsx.xlsx"));
        let bytes = export_xlsx(sheet, &options).unwrap();
        live += live_formulas(&bytes);
        std::fs::write(&xlsx, bytes).unwrap();
        files.extend([ods, xlsx]);
    }
    convert(&soffice, &dir, &files);
    let mut failures = Vec::new();
    let mut compared = 0;
    for (name, sheet) in &sheets {
        for format in ["ods", "xlsx"] {
            let path = dir.join("csv").join(format!("{name}-{format}-Design.csv"));
            let csv = std::fs::read_to_string(&path)
                .unwrap_or_else(|e| panic!("{}: {e}", path.display()));
            compared += compare(&format!("{name}.{format}"), sheet, &csv, &mut failures);
        }
    }
    eprintln!(
        "{compared} values compared in {} files; {live} live formulas in each format",
        files.len()
    );
    // The fixtures exercise every open-formula function and operator (see
    // tests/fixtures/sheets/02…04): at least this many are written live.
    assert!(live >= 50, "only {live} live formulas");
    assert!(
        failures.is_empty(),
        "{} differences:\n{}",
        failures.len(),
        failures.join("\n")
    );
    saved_by_the_engine_and_read_back(&soffice, &dir, &sheets, &files);
    let _ = std::fs::remove_dir_all(&dir);
}

/// Each exported file saved again by the engine in the other format (.ods → .xlsx,
/// .xlsx → .ods) and imported: files written by another program, with its shared
/// strings, styles and formula spelling. The preserved inputs bring back the same
/// document where the engine kept a cell as it was; where it respelled a live
/// formula, the translated formula must give the same value.
fn saved_by_the_engine_and_read_back(
    soffice: &str,
    dir: &Path,
    sheets: &[(String, Sheet)],
    files: &[std::path::PathBuf],
) {
    use loopwright::sheet::files::{import_ods, import_xlsx};
    let resaved = dir.join("resaved");
    std::fs::create_dir_all(&resaved).unwrap();
    let (ods, xlsx): (Vec<_>, Vec<_>) = files
        .iter()
        .cloned()
        .partition(|f| f.extension().is_some_and(|e| e == "ods"));
    convert_to(soffice, dir, "xlsx:Calc MS Excel 2007 XML", &resaved, &ods);
    convert_to(soffice, dir, "ods", &resaved, &xlsx);
    let mut failures = Vec::new();
    let (mut same, mut total) = (0, 0);
    for (name, sheet) in sheets {
        for (from, to) in [("ods", "xlsx"), ("xlsx", "ods")] {
            let path = resaved.join(format!("{name}-{from}.{to}"));
            let bytes = std::fs::read(&path).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
            let got = if to == "ods" {
                import_ods(&bytes)
            } else {
                import_xlsx(&bytes)
            };
            let got = got.unwrap_or_else(|e| panic!("{}: {e}", path.display()));
            let mut back = Sheet::new();
            back.load_document(&got.document().unwrap()).unwrap();
            total += 1;
            same += usize::from(back.save_document() == sheet.save_document());
            let Some(used) = sheet.used_range() else {
                continue;
            };
            for c in used.cells() {
                let (ours, theirs) = (sheet.shown(c), back.shown(c));
                let agree = match (&ours, &theirs) {
                    (Value::Number(x, _), Value::Number(y, _)) => {
                        (x - y).abs() <= REL_TOLERANCE * x.abs().max(f64::MIN_POSITIVE)
                    }
                    _ => ours.display() == theirs.display(),
                };
                if !agree {
                    failures.push(format!(
                        "{name} {from}→{to} {c}: read back {}, the worksheet {}",
                        theirs.display(),
                        ours.display()
                    ));
                }
            }
            if !got.problems.is_empty() {
                failures.push(format!("{name} {from}→{to}: {:?}", got.problems));
            }
        }
    }
    eprintln!("saved again by the engine: {same} of {total} documents the same byte for byte, every value the same");
    assert!(
        failures.is_empty(),
        "{} differences:\n{}",
        failures.len(),
        failures.join("\n")
    );
}
