/**
 * Three-way counts (stratum × row × column) as level ids arrive, shared by the record aggregator and the SQL
 * decoder so that a table counted in a file and one counted on a server show the same levels in the same order.
 */
import type { CategoryCoder } from './categories';
import type { StratifiedCounts } from './types';

export class StrataCounter {
  private readonly cells = new Map<number, Map<number, Map<number, number>>>();
  /** Levels that occur in a record that was kept (a level seen only in dropped records is left out, as in a two-way table). */
  private readonly used = [new Set<number>(), new Set<number>(), new Set<number>()];

  add(stratum: number, row: number, column: number, weight: number): void {
    let byRow = this.cells.get(stratum);
    if (!byRow) this.cells.set(stratum, (byRow = new Map()));
    let byColumn = byRow.get(row);
    if (!byColumn) byRow.set(row, (byColumn = new Map()));
    byColumn.set(column, (byColumn.get(column) ?? 0) + weight);
    this.used[0].add(stratum);
    this.used[1].add(row);
    this.used[2].add(column);
  }

  /** The counts in each coder's order: given levels always, others once kept; rows and columns are the union over strata. */
  result(strata: CategoryCoder, rows: CategoryCoder, columns: CategoryCoder): StratifiedCounts {
    const shown = [strata, rows, columns].map((coder, k) => coder.order().filter((i) => coder.isGiven(i) || this.used[k].has(i)));
    const [so, ro, co] = shown;
    return {
      stratumLabels: so.map((k) => strata.labels[k]),
      rowLabels: ro.map((i) => rows.labels[i]),
      columnLabels: co.map((j) => columns.labels[j]),
      counts: so.map((k) => ro.map((i) => co.map((j) => this.cells.get(k)?.get(i)?.get(j) ?? 0))),
    };
  }
}
