//! Fuzz the worksheet engine: the input's lines become the inputs of a 3×3 block
//! of cells (formulas, constants, anything), then the whole text is offered to the
//! document reader. Nothing may panic or hang; every shown number is finite;
//! whatever sheet results saves and reloads to the same bytes.
#![no_main]

use libfuzzer_sys::fuzz_target;
use loopwright::sheet::{from_document, CellRef, Sheet, Value};

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    let mut sheet = Sheet::new();
    let _ = sheet.set_name("gain", CellRef { row: 0, col: 0 });
    for (i, line) in text.split('\n').take(9).enumerate() {
        let cell = CellRef { row: i as u32 / 3, col: i as u32 % 3 };
        // Refusals (too long, too many cells) are typed errors, not panics.
        let _ = sheet.set_cell(cell, line);
    }
    for row in 0..4 {
        for col in 0..12 {
            if let Value::Number(x, _) = sheet.shown(CellRef { row, col }) {
                assert!(x.is_finite());
            }
        }
    }
    let doc = sheet.save_document();
    let mut again = Sheet::new();
    again.load_document(&doc).expect("a saved document loads");
    assert_eq!(again.save_document(), doc);
    let _ = from_document(text);
});
