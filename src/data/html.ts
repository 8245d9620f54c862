/**
 * The HTML table a data-frame library renders in a notebook output: `<table>` with `<thead>`/`<tbody>`, an
 * index column (cells in `<th>`), column and index names, multi-level headers (`colspan`), multi-level indexes
 * (`rowspan`), and polars' column-type row and quoted text. Tags, attributes and entities are read by
 * htmlparser2's tokenizer.
 *
 * Bundle cost, measured 2026-12-03 with esbuild's metafile of a minified build: htmlparser2 60 KB and the
 * entity tables of `entities` 77 KB, 140 KB in all (dist/extension.js 340 KB → 479 KB if inlined). It is
 * therefore loaded on first use (`require` here; scripts/build.mjs makes it the chunk dist/htmlparser2.js),
 * so activation does not pay for it. parse5 carries the same entity tables.
 */
import type { Parser as HtmlParser } from 'htmlparser2';
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

function spanOf(attributes: Readonly<Record<string, string>>, name: string): number {
  const m = /^\s*(\d+)/.exec(attributes[name] ?? '');
  const n = m ? Number(m[1]) : 1;
  return n >= 1 && n <= 1000 ? n : 1;
}

/**
 * The rows of the first table in the HTML (nested tables are refused). htmlparser2's tokenizer does the HTML:
 * every named and numeric character reference, attributes holding `>`, comments, raw-text elements (style,
 * script) and the end tags HTML lets a writer omit (`</td>`, `</th>`, `</tr>`, `</tbody>`).
 */
function tableRows(html: string, file: string | undefined): Row[] {
  const rows: Row[] = [];
  let depth = 0;
  let done = false;
  let closedExplicitly = false;
  let section: 'head' | 'body' = 'body';
  let row: Cell[] | undefined;
  let cell: { header: boolean; colspan: number; rowspan: number } | undefined;
  let text = '';
  const endCell = () => {
    if (cell && row) row.push({ text: text.replace(/\s+/g, ' ').trim(), header: cell.header, colspan: cell.colspan, rowspan: cell.rowspan });
    cell = undefined;
    text = '';
  };
  const endRow = () => {
    endCell();
    if (row) rows.push({ cells: row, section });
    row = undefined;
  };
  const { Parser } = require('htmlparser2') as { Parser: typeof HtmlParser }; // eslint-disable-line @typescript-eslint/no-require-imports
  const parser = new Parser(
    {
      onopentag(name, attributes) {
        if (done) return;
        if (name === 'table') {
          depth++;
          if (depth > 1) fail({ file }, 'found a table inside a table cell; expected one flat table', 'nested-table');
          return;
        }
        if (depth === 0) return;
        if (name === 'thead' || name === 'tbody' || name === 'tfoot') {
          endRow();
          section = name === 'thead' ? 'head' : 'body';
        } else if (name === 'tr') {
          endRow();
          row = [];
        } else if (name === 'th' || name === 'td') {
          endCell();
          row ??= [];
          cell = { header: name === 'th', colspan: spanOf(attributes, 'colspan'), rowspan: spanOf(attributes, 'rowspan') };
        } else if (name === 'br' && cell) text += ' ';
      },
      ontext(chunk) {
        if (!done && cell) text += chunk;
      },
      onclosetag(name, isImplied) {
        if (done || depth === 0) return;
        if (name === 'table') {
          endRow();
          depth--;
          done = depth === 0;
          closedExplicitly = !isImplied;
        } else if (name === 'th' || name === 'td') endCell();
        else if (name === 'tr') endRow();
        else if (name === 'thead' || name === 'tbody' || name === 'tfoot') {
          endRow();
          section = 'body';
        }
      },
    },
    { decodeEntities: true, lowerCaseTags: true, lowerCaseAttributeNames: true },
  );
  parser.end(html);
  if (!closedExplicitly) fail({ file }, 'the table is not closed; expected `</table>`', 'bad-html');
  return rows;
}

/**
 * Polars writes the column types as a second header row of `<td>` cells ("str", "i64", "f64", "datetime[μs]")
 * and shows text values in double quotes. Returns the types when the last head row is such a row.
 */
const DTYPE = /^(str|cat|enum|bool|null|object|binary|decimal(\[\d+, *\d+\])?|[iu](8|16|32|64|128)|f(32|64)|date|time|duration\[\w+\]|datetime\[[^\]]+\]|list\[.+\]|array\[.+\]|struct\[\d+\])$/;
function dtypeRow(rows: readonly Row[]): string[] | undefined {
  const head = rows.filter((r) => r.section === 'head');
  const last = head[head.length - 1];
  if (head.length < 2 || !last || last.cells.some((c) => c.header || c.colspan !== 1) || !last.cells.every((c) => DTYPE.test(c.text))) return undefined;
  return last.cells.map((c) => c.text);
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
  let rows = tableRows(html, file);
  const dtypes = dtypeRow(rows);
  if (dtypes) {
    rows = rows.filter((r) => r !== rows.filter((h) => h.section === 'head').at(-1));
    // Text columns show their values quoted: "A" → A (only a value quoted at both ends).
    rows = rows.map((r) => (r.section === 'head' ? r : { ...r, cells: r.cells.map((c, j) => (dtypes[j] === 'str' && /^".*"$/s.test(c.text) && c.text.length >= 2 ? { ...c, text: c.text.slice(1, -1) } : c)) }));
  }
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
