// Spreadsheet files on the worksheet toolbar: the sheet exported as an OpenDocument
// spreadsheet (.ods) or an Office Open XML workbook (.xlsx), and .ods, .xlsx, .csv
// or .tsv files imported. The file-format module (www/pkg/sheetfiles/, the zip and
// XML code) is loaded on the first export or import, not with the page (the
// single-file page carries it inlined, decoded only then). An import
// goes through the panel's one load path (replacing.js): the sheet it replaces is
// kept with an undo, and a file that cannot be read leaves the sheet as it was.

import { el, downloadBlob } from '../dom.js';
import { sheetfilesSource } from '../wasm-source.js';

const TYPES = {
  ods: 'application/vnd.oasis.opendocument.spreadsheet',
  xlsx: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
};
const IMPORTED = ['ods', 'xlsx', 'csv', 'tsv'];

let loading = null;

/** The file-format module, loaded and started once. */
function fileModule() {
  loading ??= import('../../pkg/sheetfiles/loopwright.js').then(async (m) => {
    // Fetched beside the module on the served page; inlined in the single file.
    await m.default({ module_or_path: await sheetfilesSource() });
    return m;
  });
  loading.catch(() => {
    loading = null;
  });
  return loading;
}

async function exportAs(panel, format) {
  try {
    const files = await fileModule();
    const bytes = files.exportSheetFile(panel.sheet.saveDocument(), format);
    downloadBlob(new Blob([bytes], { type: TYPES[format] }), `worksheet.${format}`);
    panel.note.textContent = `Exported the sheet as worksheet.${format}.`;
  } catch (err) {
    panel.note.textContent = `The sheet was not exported: ${err.message}.`;
  }
}

async function importFile(panel, file) {
  const format = file.name.split('.').pop().toLowerCase();
  let result;
  try {
    if (!IMPORTED.includes(format))
      throw new Error('the file name must end in .ods, .xlsx, .csv or .tsv');
    const files = await fileModule();
    result = files.importSheetFile(new Uint8Array(await file.arrayBuffer()), format);
  } catch (err) {
    panel.note.textContent = `"${file.name}" was not imported: ${err.message}. The sheet is as it was.`;
    return;
  }
  const done = await panel.replaceWith(
    result.document,
    `"${file.name}"`,
    `by the file "${file.name}"`,
  );
  if (!done) return;
  const notKept = result.problems.length
    ? ` Not kept as it was (${result.problems.length}): ${result.problems.join(' ')}`
    : '';
  panel.announce(done, `Imported "${file.name}".${notKept}`);
}

/** The export and import buttons, appended to `toolbar`. */
export function mountSheetFiles(panel, toolbar) {
  const input = el('input', {
    type: 'file',
    accept: IMPORTED.map((f) => `.${f}`).join(','),
    class: 'visually-hidden',
    id: 'sheet-import-file',
    tabindex: '-1',
  });
  input.addEventListener('change', () => {
    const file = input.files?.[0];
    input.value = '';
    if (file) importFile(panel, file);
  });
  const button = (id, label, onclick) =>
    el('button', { type: 'button', class: 'button', id, onclick }, label);
  toolbar.append(
    button('sheet-export-ods', 'Export .ods', () => exportAs(panel, 'ods')),
    button('sheet-export-xlsx', 'Export .xlsx', () => exportAs(panel, 'xlsx')),
    button('sheet-import', 'Import spreadsheet…', () => input.click()),
    input,
  );
}
