import { argumentText, type InputError } from '../../../src/errors';

/** The function argument an error of the numbers layer names, as text ("table[1][0]"), or undefined when it names none. */
export function argumentNamed(e: InputError): string | undefined {
  return e.location.argument === undefined ? undefined : argumentText(e.location.argument);
}
