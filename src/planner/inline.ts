/** Counts from records held in memory (a selection, a cell, a small file), written inline into a saved test. */
import { aggregateRecords } from '../data/aggregate';
import type { Records } from '../data/records';
import type { AggregateRequest } from '../data/types';
import { sum, type DataFacts } from './view';

/** Counts from records held in memory, written inline into the spec. */
export function inlineFromRecords(records: Records, test: string, columns: readonly string[], weight: string | undefined, description: string): DataFacts {
  const read = (req: AggregateRequest, levels?: { rowLevels?: readonly string[]; columnLevels?: readonly string[] }) =>
    aggregateRecords(records, req, { description, keepValues: true, ...(levels ? { categories: levels } : {}) });
  switch (test) {
    case 'goodness-of-fit': {
      const a = read({ kind: 'categories', column: columns[0], weight });
      if (a.kind !== 'categories') break;
      return { fields: { observed: a.counts.counts, categories: a.counts.labels, variable: columns[0] }, levels: a.counts.labels, n: sum(a.counts.counts) };
    }
    case 'variance':
    case 'distribution-fit': {
      const a = read({ kind: 'numeric', column: columns[0] });
      if (a.kind !== 'moments' || !a.values) break;
      return { fields: { values: a.values, ...(test === 'variance' ? { variable: columns[0] } : {}) }, n: a.values.length };
    }
    case 'paired': {
      const a = read({ kind: 'crosstab', rowColumn: columns[0], columnColumn: columns[1], weight });
      if (a.kind !== 'table') break;
      const labels = [...a.table.rowLabels, ...a.table.columnLabels.filter((l) => !a.table.rowLabels.includes(l))];
      const square = read({ kind: 'crosstab', rowColumn: columns[0], columnColumn: columns[1], weight }, { rowLevels: labels, columnLevels: labels });
      if (square.kind !== 'table') break;
      return { fields: { table: square.table.counts, rowLabels: square.table.rowLabels, columnLabels: square.table.columnLabels } };
    }
    case 'stratified': {
      const [stratumColumn, rowColumn, columnColumn] = columns;
      const a = read({ kind: 'strata', stratumColumn, rowColumn, columnColumn, weight });
      if (a.kind !== 'strata') break;
      const { counts, stratumLabels, rowLabels, columnLabels } = a.strata;
      return { fields: { strata: counts, stratumLabels, rowLabels, columnLabels, rowVariable: rowColumn, columnVariable: columnColumn } };
    }
    default: {
      const a = read({ kind: 'crosstab', rowColumn: columns[0], columnColumn: columns[1], weight });
      if (a.kind !== 'table') break;
      const t = a.table;
      const extra = test === 'independence' ? { rowVariable: columns[0], columnVariable: columns[1] } : {};
      return { fields: { table: t.counts, rowLabels: t.rowLabels, columnLabels: t.columnLabels, ...extra }, rows: t.rowLabels.length, columns: t.columnLabels.length, n: sum(t.counts.map((r) => sum(r))) };
    }
  }
  throw new Error(`records did not aggregate for ${test}`);
}

