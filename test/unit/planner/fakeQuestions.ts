// A scripted stand-in for the editor's QuickPicks and input boxes: each question is answered from a table
// keyed by its title (or placeholder); a question without an answer fails the test, naming the question.
import { Cancelled, type Choice, type Questions } from '../../../src/planner/questions';

export interface Asked {
  readonly title: string;
  readonly placeholder?: string;
  readonly choices?: readonly string[];
  readonly details?: readonly (string | undefined)[];
}

export class ScriptedQuestions implements Questions {
  readonly asked: Asked[] = [];
  /** Answers by title: a choice's label (or its value), the text to enter, or true/false to a confirmation. */
  constructor(private readonly answers: Record<string, string | boolean | readonly string[]>) {}

  private answer(title: string, placeholder?: string): string | boolean | readonly string[] {
    const key = Object.keys(this.answers).find((k) => k === title || (placeholder !== undefined && placeholder.includes(k)));
    if (key === undefined) throw new Error(`unexpected question "${title}"${placeholder ? ` (${placeholder})` : ''}`);
    const value = this.answers[key];
    // A list answers the same question several times in turn (column choices).
    if (Array.isArray(value)) {
      const next = value[0];
      this.answers[key] = value.slice(1);
      return next;
    }
    return value as string | boolean;
  }

  async choose<T>(q: { title: string; placeholder: string; choices: readonly Choice<T>[] }): Promise<T> {
    this.asked.push({ title: q.title, placeholder: q.placeholder, choices: q.choices.map((c) => c.label), details: q.choices.map((c) => c.detail) });
    const a = this.answer(q.title, q.placeholder);
    if (a === false) throw new Cancelled();
    // "#1" takes the first choice offered (orders of levels, whose labels depend on the data).
    const hit = a === '#1' ? q.choices[0] : q.choices.find((c) => c.label === a || c.value === a);
    if (!hit) throw new Error(`"${q.title}" (${q.placeholder}) offers no "${String(a)}"; it offers ${q.choices.map((c) => c.label).join(' | ')}`);
    return hit.value;
  }

  async enter(q: { title: string; prompt: string; validate: (text: string) => string | undefined }): Promise<string> {
    this.asked.push({ title: q.title, placeholder: q.prompt });
    const a = String(this.answer(q.title, q.prompt));
    const problem = q.validate(a);
    if (problem) throw new Error(`"${q.title}" refused "${a}": ${problem}`);
    return a;
  }

  async confirm(q: { title: string; message: string }): Promise<boolean> {
    this.asked.push({ title: q.title, placeholder: q.message });
    return this.answer(q.title, q.message) === true;
  }
}
