/**
 * The fast path for a flat column chunk: hyparquet's own page decoders (page headers, decompression,
 * definition levels, PLAIN/RLE/delta/dictionary decoding), but without materialising the rows. A
 * dictionary-encoded page stays as dictionary indices, so a category column is coded once per dictionary
 * entry and then counted by index; nulls are index -1. Pages in any other encoding give their values.
 *
 * Why: hyparquet's row assembly (`assembleLists`, which builds one JavaScript array per column chunk value
 * by value) and the garbage it leaves took 2.4 of 4.3 s on the 10,000,000-row bench file (cpu profile,
 * 2026-12-03); see bench/tabular.ts for the figures with and without this path.
 */
import { parquetHeader } from 'hyparquet/src/column.js';
import { DEFAULT_PARSERS, convert } from 'hyparquet/src/convert.js';
import { decompressPage, readDataPage, readDataPageV2 } from 'hyparquet/src/datapage.js';
import { readPlain } from 'hyparquet/src/plain.js';
import { getMaxDefinitionLevel } from 'hyparquet/src/schema.js';
import type { ColumnMetaData, Compressors, SchemaTree } from 'hyparquet';
import { NULL_INDEX, VALUE_INDEX, type EncodedColumn } from './typed';

const MAX_PAGE_BYTES = 256 * 1024 * 1024;

/**
 * Decodes the pages of one flat column chunk (`bytes`: the chunk from its first page) for `rows` rows.
 * `path` is the schema path from the root to the column.
 */
export function readFlatChunk(bytes: ArrayBuffer, meta: ColumnMetaData, path: SchemaTree[], rows: number, compressors: Compressors): EncodedColumn {
  const element = path[path.length - 1].element;
  const decoder = { pathInSchema: meta.path_in_schema, element, schemaPath: path, type: meta.type, codec: meta.codec, compressors, parsers: DEFAULT_PARSERS, utf8: true };
  const maxDefinition = getMaxDefinitionLevel(path);
  const reader = { view: new DataView(bytes), offset: 0 };
  const index = new Int32Array(rows);
  let values: unknown[] | undefined;
  let dictionary: ArrayLike<unknown> = [];
  let row = 0;
  while (row < rows) {
    if (reader.offset >= bytes.byteLength - 1) throw new Error(`the column chunk ends after ${row} of ${rows} rows`);
    const header = parquetHeader(reader);
    // A page states its own sizes; a damaged or hostile one must not make us allocate gigabytes.
    if (header.compressed_page_size < 0 || reader.offset + header.compressed_page_size > bytes.byteLength)
      throw new Error(`a page of ${header.compressed_page_size} bytes runs past the end of its column chunk`);
    if (Number(header.uncompressed_page_size) > MAX_PAGE_BYTES) throw new Error(`a page claims ${header.uncompressed_page_size} bytes uncompressed, over the ${MAX_PAGE_BYTES} this reader accepts`);
    const compressed = new Uint8Array(bytes, reader.offset, header.compressed_page_size);
    reader.offset += header.compressed_page_size;
    if (header.type === 'DICTIONARY_PAGE') {
      const page = decompressPage(compressed, Number(header.uncompressed_page_size), meta.codec, compressors);
      const pageReader = { view: new DataView(page.buffer, page.byteOffset, page.byteLength), offset: 0 };
      dictionary = convert(readPlain(pageReader, meta.type, header.dictionary_page_header!.num_values, element.type_length), decoder);
      continue;
    }
    let levels: ArrayLike<number>;
    let data: ArrayLike<unknown>;
    let encoding: string;
    if (header.type === 'DATA_PAGE') {
      const page = decompressPage(compressed, Number(header.uncompressed_page_size), meta.codec, compressors);
      const d = readDataPage(page, header.data_page_header!, decoder);
      [levels, data, encoding] = [d.definitionLevels ?? [], d.dataPage, header.data_page_header!.encoding];
    } else if (header.type === 'DATA_PAGE_V2') {
      const d = readDataPageV2(compressed, header, decoder);
      [levels, data, encoding] = [d.definitionLevels ?? [], d.dataPage, header.data_page_header_v2!.encoding];
    } else {
      continue; // an index page: nothing to count
    }
    const count = levels.length > 0 ? levels.length : data.length;
    if (row + count > rows) throw new Error(`a page holds ${count} values where ${rows - row} rows remain`);
    const fromDictionary = encoding.endsWith('_DICTIONARY');
    const converted = fromDictionary ? data : convert(data as Parameters<typeof convert>[0], decoder);
    if (!fromDictionary && values === undefined) values = new Array(rows);
    let k = 0;
    for (let i = 0; i < count; i++, row++) {
      if (levels.length > 0 && levels[i] !== maxDefinition) index[row] = NULL_INDEX;
      else if (fromDictionary) index[row] = (converted as ArrayLike<number>)[k++];
      else {
        index[row] = VALUE_INDEX;
        values![row] = converted[k++];
      }
    }
    if (k !== data.length) throw new Error(`a page has ${data.length} values for ${k} non-null rows`);
  }
  return { dictionary, index, values };
}
