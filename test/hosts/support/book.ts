/**
 * A small .xlsx package for the workbook tests: sheets "Data" and "2024" (an integer-like name, which
 * the engine orders before "Data") and a name k local to "2024", with the given sheet data (the
 * rows inside <sheetData>).
 */
import JSZip from 'jszip';

const NS = 'http://schemas.openxmlformats.org/spreadsheetml/2006/main';
const R = 'http://schemas.openxmlformats.org/officeDocument/2006/relationships';

export function dataAnd2024Book(k: string, dataRows: string, rows2024: string): Promise<Buffer> {
  const zip = new JSZip();
  zip.file('_rels/.rels', `<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="rId1" Type="${R}/officeDocument" Target="xl/workbook.xml"/></Relationships>`);
  zip.file('xl/workbook.xml', `<workbook xmlns="${NS}" xmlns:r="${R}"><sheets><sheet name="Data" sheetId="1" r:id="rId1"/><sheet name="2024" sheetId="2" r:id="rId2"/></sheets>`
    + `<definedNames><definedName name="k" localSheetId="1">${k}</definedName></definedNames></workbook>`);
  zip.file('xl/_rels/workbook.xml.rels', `<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="rId1" Type="${R}/worksheet" Target="worksheets/sheet1.xml"/><Relationship Id="rId2" Type="${R}/worksheet" Target="worksheets/sheet2.xml"/></Relationships>`);
  zip.file('xl/worksheets/sheet1.xml', `<worksheet xmlns="${NS}"><sheetData>${dataRows}</sheetData></worksheet>`);
  zip.file('xl/worksheets/sheet2.xml', `<worksheet xmlns="${NS}"><sheetData>${rows2024}</sheetData></worksheet>`);
  return zip.generateAsync({ type: 'nodebuffer' });
}
