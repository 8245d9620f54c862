/**
 * Questions for a saved-test field, derived from the procedure's field table: an enumerated string becomes a
 * choice, a number an input checked against the field's own bounds, an array of numbers a list. The prompt is
 * the field's description from the table, so the editor asks in the words the schema documents.
 */
import { checkValue, type Field, type FieldType, type SpecProblem } from '../savedtest/fields';
import { procedureFor } from '../savedtest/procedures/index';
import { tableText, text, verbatim, type Questions, type Shown } from './questions';

export function fieldOf(test: string, name: string): Field {
  const f = procedureFor(test)?.fields[name];
  if (!f) throw new Error(`procedure "${test}" has no field "${name}"`);
  return f;
}

function problemsOf(type: FieldType, value: unknown): SpecProblem[] {
  const problems: SpecProblem[] = [];
  checkValue(type, value, '$', problems);
  return problems;
}

/** A number list typed as "9:3:3:1", "0.5, 0.25, 0.25" or "1 2 3". */
export function parseNumberList(text: string): number[] {
  return text.split(/[,:;\s]+/).filter(Boolean).map(Number);
}

/** Asks for one field of a procedure, in the terms its field table gives. */
export async function askField(questions: Questions, test: string, name: string, titleText: string, options: { remembered?: unknown; unitsOf?: string; choiceLabels?: Readonly<Record<string, string>> } = {}): Promise<unknown> {
  const f = fieldOf(test, name);
  const title = tableText(titleText);
  // Pre-filled: the last answer on this source, else the field's default from its table.
  const preset = options.remembered ?? f.default;
  const prompt: Shown = options.unitsOf ? text('{0} (in the units of "{1}")', tableText(f.description), options.unitsOf) : tableText(f.description);
  // A field check's problem is the saved-test layer's English (src/savedtest/fields.ts), shown as it is.
  const problemOf = (problems: readonly SpecProblem[]): Shown | undefined => (problems.length ? verbatim(problems[0].message) : undefined);
  const type = f.type.kind === 'oneOf' ? (f.type.options.find((o) => o.kind === 'number') ?? f.type.options[0]) : f.type;
  if (type.kind === 'string' && type.enum) {
    return questions.choose({
      title,
      placeholder: prompt,
      choices: type.enum.map((value) => {
        const label = options.choiceLabels?.[value];
        return { label: label !== undefined ? tableText(label) : verbatim(value), description: label !== undefined ? verbatim(value) : undefined, value };
      }),
      remembered: (v) => v === preset,
    });
  }
  if (type.kind === 'number') {
    const entered = await questions.enter({
      title,
      prompt,
      value: typeof preset === 'number' ? String(preset) : undefined,
      validate: (v) => {
        const n = Number(v);
        if (v.trim() === '' || !Number.isFinite(n)) return text('Enter a number');
        return problemOf(problemsOf(type, n));
      },
    });
    return Number(entered);
  }
  if (type.kind === 'array') {
    const entered = await questions.enter({
      title,
      prompt,
      value: Array.isArray(preset) ? preset.join(', ') : undefined,
      validate: (v) => {
        const list = parseNumberList(v);
        if (list.some((n) => !Number.isFinite(n))) return text('Enter numbers separated by commas');
        return problemOf(problemsOf(type, list));
      },
    });
    return parseNumberList(entered);
  }
  throw new Error(`field "${name}" of "${test}" has no question form`);
}
