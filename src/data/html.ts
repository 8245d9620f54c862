/**
 * A small reader for the HTML table a data-frame library renders in a notebook output: `<table>`
 * with `<thead>`/`<tbody>`, an index column (cells in `<th>`), column and index names, multi-level
 * headers (`colspan`) and multi-level indexes (`rowspan`). No DOM in Node, so it tokenises tags itself.
 */
import { numberedColumns } from './delimited';
import type { Records } from './records';
import { fail } from './where';

interface Cell {
  readonly text: string;
  readonly header: boolean;
  readonly colspan: number;
  readonly rowspan: number;
}

interface Row {
  readonly cells: Cell[];
  readonly section: 'head' | 'body';
}

const ENTITIES: Record<string, string> = { amp: '&', lt: '<', gt: '>', quot: '"', apos: "'", nbsp: ' ', '#39': "'" };

function decodeEntities(text: string): string {
  return text.replace(/&(#x[0-9a-f]+|#\d+|[a-z]+\d*);/gi, (whole, name: string) => {
    if (name[0] === '#') {
      const code = name[1] === 'x' || name[1] === 'X' ? parseInt(name.slice(2), 16) : parseInt(name.slice(1), 10);
      return Number.isFinite(code) && code > 0 && code < 0x110000 ? String.fromCodePoint(code) : whole;
    }
    return ENTITIES[name.toLowerCase()] ?? whole;
  });
}

function spanOf(attributes: string, name: string): number {
  const m = new RegExp(`${name}\\s*=\\s*["']?(\\d+)`, 'i').exec(attributes);
  const n = m ? Number(m[1]) : 1;
  return n >= 1 && n <= 1000 ? n : 1;
}

/** The rows of the first table in the HTML (nested tables are not expected and are refused). */
function tableRows(html: string, file: string | undefined): Row[] {
  const rows: Row[] = [];
  const tag = /<!--[\s\S]*?-->|<(style|script)\b[\s\S]*?<\/\1\s*>|<(\/?)([a-zA-Z][a-zA-Z0-9]*)([^>]*)>/g;
  let depth = 0;
  let done = false;
  let section: 'head' | 'body' = 'body';
  let row: Cell[] | undefined;
  let cell: { header: boolean; colspan: number; rowspan: number } | undefined;
  let text = '';
  let last = 0;
  for (let m = tag.exec(html); m !== null && !done; m = tag.exec(html)) {
    if (cell) text += html.slice(last, m.index);
    last = tag.lastIndex;
    const closing = m[2] === '/';
    const name = (m[3] ?? '').toLowerCase();
    if (name === '') continue;
    if (name === 'table') {
      if (!closing) {
        depth++;
        if (depth > 1) fail({ file }, 'found a table inside a table cell; expected one flat table', 'nested-table');
      } else if (depth > 0) {
        depth--;
        done = depth === 0;
      }
      continue;
    }
    if (depth === 0) continue;
    const endCell = () => {
      if (cell && row) row.push({ text: decodeEntities(text).replace(/\s+/g, ' ').trim(), header: cell.header, colspan: cell.colspan, rowspan: cell.rowspan });
      cell = undefined;
      text = '';
    };
    if (name === 'thead' || name === 'tbody' || name === 'tfoot') {
      endCell();
      section = !closing && name === 'thead' ? 'head' : 'body';
    } else if (name === 'tr') {
      endCell();
      if (row) rows.push({ cells: row, section });
      row = closing ? undefined : [];
    } else if (name === 'th' || name === 'td') {
      endCell();
      if (!closing) {
        row ??= [];
        cell = { header: name === 'th', colspan: spanOf(m[4], 'colspan'), rowspan: spanOf(m[4], 'rowspan') };
      }
    } else if (name === 'br' && cell) text += ' ';
  }
  if (depth > 0 && !done) fail({ file }, 'the table is not closed; expected `</table>`', 'bad-html');
  if (row && row.length > 0) rows.push({ cells: row, section });
  return rows;
}

/** Lays cells out on a grid, repeating spanned cells, so every row has the same width. */
function grid(rows: Row[]): { texts: string[][]; headers: boolean[][] } {
  const texts: string[][] = [];
  const headers: boolean[][] = [];
  const pending: { text: string; header: boolean; left: number }[] = [];
  rows.forEach((row, r) => {
    texts[r] = [];
    headers[r] = [];
    let col = 0;
    const place = (text: string, header: boolean) => {
      texts[r][col] = text;
      headers[r][col] = header;
      col++;
    };
    const flushPending = () => {
      while (pending[col] && pending[col].left > 0) {
        pending[col].left--;
        place(pending[col].text, pending[col].header);
      }
    };
    for (const cell of row.cells) {
      flushPending();
      for (let k = 0; k < cell.colspan; k++) {
        if (cell.rowspan > 1) pending[col] = { text: cell.text, header: cell.header, left: cell.rowspan - 1 };
        place(cell.text, cell.header);
      }
    }
    flushPending();
  });
  return { texts, headers };
}

export interface HtmlTableOptions {
  readonly file?: string;
  /** Multi-level column headers: joined with " / " (default) or refused. */
  readonly multiLevelHeaders?: 'flatten' | 'refuse';
}

/** Reads the first HTML table into records; positions are 1-based body rows. */
export function parseHtmlTable(html: string, options: HtmlTableOptions = {}): Records {
  const file = options.file;
  if (!/<table\b/i.test(html)) fail({ file }, 'found no `<table>`; expected an HTML table', 'no-table');
  const rows = tableRows(html, file);
  const hasHead = rows.some((r) => r.section === 'head');
  // Without <thead>, leading rows made only of <th> cells are the header.
  let headCount = hasHead ? rows.filter((r) => r.section === 'head').length : 0;
  if (!hasHead) while (headCount < rows.length && rows[headCount].cells.every((c) => c.header)) headCount++;
  const { texts, headers } = grid(rows);
  const width = Math.max(0, ...texts.map((t) => t.length));
  const body = texts.slice(headCount);
  if (body.length === 0) fail({ file }, 'the table has no body rows; expected rows of data', 'empty-input');
  body.forEach((r, i) => {
    if (r.length !== width) fail({ file, line: i + 1, unit: 'row' }, `expected ${width} cells (as the widest row), found ${r.length}`, 'ragged-row');
    if (r.some((t) => t === '...' || t === '…'))
      fail({ file, line: i + 1, unit: 'row' }, 'the table is shown truncated (a `...` cell); expected the full table (display it without truncation)', 'truncated-table');
  });
  // Index depth: leading header cells in the body rows.
  let indexColumns = 0;
  while (indexColumns < width && headers.slice(headCount).every((h) => h[indexColumns])) indexColumns++;
  let head = texts.slice(0, headCount).map((r) => Array.from({ length: width }, (_, j) => r[j] ?? ''));
  // A last header row with only index names (pandas writes the index name below the column labels).
  let indexNames: string[] = [];
  if (head.length >= 2 && indexColumns > 0) {
    const lastRow = head[head.length - 1];
    if (lastRow.slice(indexColumns).every((t) => t === '') && lastRow.slice(0, indexColumns).some((t) => t !== '')) {
      indexNames = lastRow.slice(0, indexColumns);
      head = head.slice(0, -1);
    }
  }
  if (head.length > 1 && options.multiLevelHeaders === 'refuse')
    fail({ file }, `the table has ${head.length} levels of column headers; expected one (flatten the columns first)`, 'multi-level-header');
  const columns =
    head.length === 0
      ? numberedColumns(width)
      : Array.from({ length: width }, (_, j) => {
          if (j < indexColumns && indexNames[j]) return indexNames[j];
          const parts: string[] = [];
          for (const level of head) if (level[j] !== '' && parts[parts.length - 1] !== level[j]) parts.push(level[j]);
          return parts.join(' / ') || (j < indexColumns ? (indexColumns > 1 ? `index ${j + 1}` : 'index') : String(j + 1));
        });
  return { columns, rows: body, lines: body.map((_, i) => i + 1), unit: 'row', indexColumns, ...(file !== undefined ? { file } : {}) };
}
