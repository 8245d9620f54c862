// A minimal workbook writer for benchmark data only (never for reference fixtures: those are written by
// openpyxl, scripts/fixtures/xlsx_fixtures.py). One sheet, a header row, text in the shared-string table,
// numbers and booleans inline; zipped with fflate.
import { zipSync, strToU8 } from 'fflate';

export type BenchCell = string | number | boolean;

const escapeXml = (s: string): string => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');

function columnName(index: number): string {
  let name = '';
  for (let n = index + 1; n > 0; n = Math.floor((n - 1) / 26)) name = String.fromCharCode(65 + ((n - 1) % 26)) + name;
  return name;
}

export function workbookBytes(sheetName: string, header: readonly string[], rows: Iterable<readonly BenchCell[]>): Uint8Array {
  const strings = new Map<string, number>();
  const shared = (s: string): number => {
    let k = strings.get(s);
    if (k === undefined) strings.set(s, (k = strings.size));
    return k;
  };
  const columns = header.map((_, j) => columnName(j));
  const parts: string[] = ['<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<worksheet xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"><sheetData>'];
  const rowXml = (r: number, cells: readonly BenchCell[]): string => {
    let xml = `<row r="${r}">`;
    cells.forEach((v, j) => {
      const ref = `${columns[j]}${r}`;
      if (typeof v === 'number') xml += `<c r="${ref}"><v>${v}</v></c>`;
      else if (typeof v === 'boolean') xml += `<c r="${ref}" t="b"><v>${v ? 1 : 0}</v></c>`;
      else xml += `<c r="${ref}" t="s"><v>${shared(v)}</v></c>`;
    });
    return `${xml}</row>`;
  };
  parts.push(rowXml(1, header));
  let r = 2;
  for (const cells of rows) parts.push(rowXml(r++, cells));
  parts.push('</sheetData></worksheet>');
  const sst = [`<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<sst xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main" count="${strings.size}" uniqueCount="${strings.size}">`];
  for (const s of strings.keys()) sst.push(`<si><t>${escapeXml(s)}</t></si>`);
  sst.push('</sst>');
  const ns = 'http://schemas.openxmlformats.org';
  return zipSync({
    '[Content_Types].xml': strToU8(
      `<?xml version="1.0" encoding="UTF-8"?><Types xmlns="${ns}/package/2006/content-types"><Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/><Default Extension="xml" ContentType="application/xml"/><Override PartName="/xl/workbook.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml"/><Override PartName="/xl/worksheets/sheet1.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.worksheet+xml"/><Override PartName="/xl/sharedStrings.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.sharedStrings+xml"/></Types>`,
    ),
    '_rels/.rels': strToU8(
      `<?xml version="1.0" encoding="UTF-8"?><Relationships xmlns="${ns}/package/2006/relationships"><Relationship Id="rId1" Type="${ns}/officeDocument/2006/relationships/officeDocument" Target="xl/workbook.xml"/></Relationships>`,
    ),
    'xl/workbook.xml': strToU8(
      `<?xml version="1.0" encoding="UTF-8"?><workbook xmlns="${ns}/spreadsheetml/2006/main" xmlns:r="${ns}/officeDocument/2006/relationships"><sheets><sheet name="${escapeXml(sheetName)}" sheetId="1" r:id="rId1"/></sheets></workbook>`,
    ),
    'xl/_rels/workbook.xml.rels': strToU8(
      `<?xml version="1.0" encoding="UTF-8"?><Relationships xmlns="${ns}/package/2006/relationships"><Relationship Id="rId1" Type="${ns}/officeDocument/2006/relationships/worksheet" Target="worksheets/sheet1.xml"/><Relationship Id="rId2" Type="${ns}/officeDocument/2006/relationships/sharedStrings" Target="sharedStrings.xml"/></Relationships>`,
    ),
    'xl/worksheets/sheet1.xml': strToU8(parts.join('')),
    'xl/sharedStrings.xml': strToU8(sst.join('')),
  });
}
