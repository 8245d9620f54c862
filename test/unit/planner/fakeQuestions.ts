// A scripted stand-in for the editor's QuickPicks and input boxes: each question is answered from a table
// keyed by its title (or placeholder); a question without an answer fails the test, naming the question.
import { Cancelled, english, type Choice, type Questions, type Shown } from '../../../src/planner/questions';

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

  // The planner's words arrive as templates; the fake reads them in English, as the command line would.
  async choose<T>(q: { title: Shown; placeholder: Shown; choices: readonly Choice<T>[] }): Promise<T> {
    const [title, placeholder] = [english(q.title), english(q.placeholder)];
    const labels = q.choices.map((c) => english(c.label));
    this.asked.push({ title, placeholder, choices: labels, details: q.choices.map((c) => (c.detail ? english(c.detail) : undefined)) });
    const a = this.answer(title, placeholder);
    if (a === false) throw new Cancelled();
    // "#1" takes the first choice offered (orders of levels, whose labels depend on the data).
    const hit = a === '#1' ? q.choices[0] : q.choices.find((c, i) => labels[i] === a || c.value === a);
    if (!hit) throw new Error(`"${title}" (${placeholder}) offers no "${String(a)}"; it offers ${labels.join(' | ')}`);
    return hit.value;
  }

  async enter(q: { title: Shown; prompt: Shown; validate: (text: string) => Shown | undefined }): Promise<string> {
    const [title, prompt] = [english(q.title), english(q.prompt)];
    this.asked.push({ title, placeholder: prompt });
    const a = String(this.answer(title, prompt));
    const problem = q.validate(a);
    if (problem) throw new Error(`"${title}" refused "${a}": ${english(problem)}`);
    return a;
  }

  async confirm(q: { title: Shown; message: Shown }): Promise<boolean> {
    const [title, message] = [english(q.title), english(q.message)];
    this.asked.push({ title, placeholder: message });
    return this.answer(title, message) === true;
  }
}
