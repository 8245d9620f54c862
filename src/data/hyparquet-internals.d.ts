// Declarations for the hyparquet modules that src/data/parquetPages.ts and parquet.ts import by path (the package exports
// `./src/*.js`, but this project's module resolution does not read the export map's types). The signatures
// are those of hyparquet 1.33.0's types/*.d.ts.
declare module 'hyparquet/src/column.js' {
  import type { DataReader, PageHeader } from 'hyparquet';
  export function parquetHeader(reader: DataReader): PageHeader;
}
declare module 'hyparquet/src/convert.js' {
  import type { ColumnDecoder, DecodedArray, ParquetParsers } from 'hyparquet';
  export const DEFAULT_PARSERS: ParquetParsers;
  export function convert(data: DecodedArray, columnDecoder: ColumnDecoder): DecodedArray;
}
declare module 'hyparquet/src/datapage.js' {
  import type { ColumnDecoder, CompressionCodec, Compressors, DataPageHeader, DecodedArray, PageHeader } from 'hyparquet';
  interface DataPage {
    definitionLevels: number[] | undefined;
    repetitionLevels: number[];
    dataPage: DecodedArray;
  }
  export function readDataPage(bytes: Uint8Array, daph: DataPageHeader, columnDecoder: ColumnDecoder): DataPage;
  export function decompressPage(compressedBytes: Uint8Array, uncompressedPageSize: number, codec: CompressionCodec, compressors: Compressors | undefined): Uint8Array;
  export function readDataPageV2(compressedBytes: Uint8Array, ph: PageHeader, columnDecoder: ColumnDecoder): DataPage;
}
declare module 'hyparquet/src/plain.js' {
  import type { DataReader, DecodedArray, ParquetType } from 'hyparquet';
  export function readPlain(reader: DataReader, type: ParquetType, count: number, fixedLength: number | undefined): DecodedArray;
}
declare module 'hyparquet/src/schema.js' {
  import type { SchemaTree } from 'hyparquet';
  export function getMaxDefinitionLevel(schemaPath: SchemaTree[]): number;
}
declare module 'hyparquet-compressors/src/lz4.js' {
  export function decompressLz4(input: Uint8Array, outputLength: number): Uint8Array;
  export function decompressLz4Raw(input: Uint8Array, outputLength: number): Uint8Array;
}
