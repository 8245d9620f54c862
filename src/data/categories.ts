/**
 * Category coding shared by every reader: trimming, optional case folding, missing-value tokens,
 * a given level set (levels never seen still count) and the final level order.
 */
import { looksNumeric, parseDecimal } from './numbers';
import { DEFAULT_MISSING_TOKENS, type CategoryOptions, type MissingOptions } from './options';
import { fail, shown, type PositionUnit } from './where';

/** Code of a value that is missing under the drop policy. */
export const MISSING = -1;

export interface CoderSettings {
  readonly file?: string;
  readonly unit?: PositionUnit;
  readonly missing?: MissingOptions;
  readonly categories?: CategoryOptions;
  /** Treat missing tokens as ordinary labels (used for labels of a counted table). */
  readonly ignoreMissing?: boolean;
}

export function missingTokens(missing: MissingOptions | undefined): ReadonlySet<string> {
  return new Set((missing?.tokens ?? DEFAULT_MISSING_TOKENS).map((t) => t.trim()));
}

function listed(levels: readonly string[]): string {
  const head = levels.slice(0, 12).map((l) => `\`${l}\``);
  return head.join(', ') + (levels.length > 12 ? `, … (${levels.length} in all)` : '');
}

export class CategoryCoder {
  readonly labels: string[] = [];
  private readonly ids = new Map<string, number>();
  private readonly given: readonly string[] | undefined;
  private readonly tokens: ReadonlySet<string>;
  private readonly caseFold: boolean;
  private readonly maxLevels: number;
  private missingId = MISSING;

  constructor(
    readonly column: string,
    given: readonly string[] | undefined,
    private readonly settings: CoderSettings,
  ) {
    this.tokens = settings.ignoreMissing ? new Set() : missingTokens(settings.missing);
    this.caseFold = settings.categories?.caseFold ?? false;
    this.maxLevels = settings.categories?.maxLevels ?? 10_000;
    if (settings.categories?.order === 'given' && given === undefined)
      fail({ file: settings.file }, `category order "given" needs the list of categories for column \`${column}\``, 'missing-levels');
    this.given = given;
    for (const level of given ?? []) {
      const label = level.trim();
      const key = this.key(label);
      if (this.ids.has(key)) fail({ file: settings.file }, `the given categories for column \`${column}\` list ${shown(label)} twice`, 'duplicate-level');
      this.ids.set(key, this.labels.length);
      this.labels.push(label);
    }
  }

  private key(label: string): string {
    return this.caseFold ? label.toLowerCase() : label;
  }

  /** The category id of a raw field value, or MISSING. */
  code(raw: string, line: number): number {
    const label = raw.trim();
    if (this.tokens.has(label)) return this.missing();
    const key = this.key(label);
    const known = this.ids.get(key);
    if (known !== undefined) return known;
    const where = { file: this.settings.file, line, unit: this.settings.unit, column: this.column };
    if (this.given !== undefined)
      fail(where, `found ${shown(label)}, which is not one of the given categories (${listed(this.given)})`, 'unknown-category');
    if (this.labels.length >= this.maxLevels)
      fail(where, `found more than ${this.maxLevels} distinct values (the latest ${shown(label)}); expected a categorical column`, 'too-many-levels');
    const id = this.labels.length;
    this.ids.set(key, id);
    this.labels.push(label);
    return id;
  }

  /** The code of a missing value (an empty cell, a null): MISSING, or the missing level under the `category` policy. */
  missing(): number {
    if (this.settings.missing?.policy !== 'category') return MISSING;
    if (this.missingId === MISSING) {
      this.missingId = this.labels.length;
      this.labels.push(this.settings.missing.label ?? '(missing)');
    }
    return this.missingId;
  }

  /** Whether the level was among the given categories. */
  isGiven(id: number): boolean {
    return this.given !== undefined && id < this.given.length;
  }

  /** Ids in presentation order: given, first seen or sorted; the missing level last. */
  order(): number[] {
    const ids = this.labels.map((_, i) => i).filter((i) => i !== this.missingId);
    if (this.given === undefined && this.settings.categories?.order === 'sorted') {
      const labels = this.labels;
      const numeric = ids.every((i) => looksNumeric(labels[i]));
      ids.sort(numeric ? (a, b) => parseDecimal(labels[a]) - parseDecimal(labels[b]) : (a, b) => (labels[a] < labels[b] ? -1 : labels[a] > labels[b] ? 1 : 0));
    }
    if (this.missingId !== MISSING) ids.push(this.missingId);
    return ids;
  }
}
