/**
 * Questions for a saved-test field, derived from the procedure's field table: an enumerated string becomes a
 * choice, a number an input checked against the field's own bounds, an array of numbers a list. The prompt is
 * the field's description from the table, so the editor asks in the words the schema documents.
 */
import { checkValue, type Field, type FieldType, type SpecProblem } from '../savedtest/fields';
import { procedureFor } from '../savedtest/procedures/index';
import type { Questions } from './questions';

/** The field a question names: a top-level field, or with a dotted name a member of an object field. */
export function fieldOf(test: string, name: string): Field {
  const [first, ...members] = name.split('.');
  let f: Field | undefined = procedureFor(test)?.fields[first];
  for (const member of members) {
    const type: FieldType | undefined = f?.type.kind === 'oneOf' ? f.type.options.find((o) => o.kind === 'object') : f?.type;
    f = type?.kind === 'object' ? type.properties[member] : undefined;
  }
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
export async function askField(questions: Questions, test: string, name: string, title: string, options: { remembered?: unknown; extraPrompt?: string; choiceLabels?: Readonly<Record<string, string>>; choiceDetails?: Readonly<Record<string, string>> } = {}): Promise<unknown> {
  const f = fieldOf(test, name);
  // Pre-filled: the last answer on this source, else the field's default from its table.
  const preset = options.remembered ?? f.default;
  const prompt = options.extraPrompt ? `${f.description} ${options.extraPrompt}` : f.description;
  const type = f.type.kind === 'oneOf' ? (f.type.options.find((o) => o.kind === 'number') ?? f.type.options[0]) : f.type;
  if (type.kind === 'string' && type.enum) {
    return questions.choose({
      title,
      placeholder: prompt,
      choices: type.enum.map((value) => ({ label: options.choiceLabels?.[value] ?? value, description: options.choiceLabels?.[value] ? value : undefined, detail: options.choiceDetails?.[value], value })),
      remembered: (v) => v === preset,
    });
  }
  if (type.kind === 'number') {
    const text = await questions.enter({
      title,
      prompt,
      value: typeof preset === 'number' ? String(preset) : undefined,
      validate: (v) => {
        const n = Number(v);
        if (v.trim() === '' || !Number.isFinite(n)) return 'Enter a number';
        const problems = problemsOf(type, n);
        return problems.length ? problems[0].message : undefined;
      },
    });
    return Number(text);
  }
  if (type.kind === 'array') {
    const text = await questions.enter({
      title,
      prompt,
      value: Array.isArray(preset) ? preset.join(', ') : undefined,
      validate: (v) => {
        const list = parseNumberList(v);
        if (list.some((n) => !Number.isFinite(n))) return 'Enter numbers separated by commas';
        const problems = problemsOf(type, list);
        return problems.length ? problems[0].message : undefined;
      },
    });
    return parseNumberList(text);
  }
  throw new Error(`field "${name}" of "${test}" has no question form`);
}
