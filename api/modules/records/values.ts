import type { EntryValues } from '../../../procedures/engine';
import { readingProblem } from '../../../procedures/maths';
import type { Step } from '../../../procedures/schema';
import { AppError, type FieldProblem } from '../../lib/errors';

/** Check that each value fits its input's type (the limits are judged later, by the engine). */
export function checkValues(step: Step, values: Record<string, unknown>): EntryValues {
  const problems: FieldProblem[] = [];
  const at = (id: string) => `#/values/${id}`;
  for (const key of Object.keys(values)) {
    if (!step.inputs.some((i) => i.id === key)) problems.push({ pointer: at(key), detail: `Step "${step.title}" has no input "${key}".` });
  }
  for (const input of step.inputs) {
    const v = values[input.id];
    if (v === undefined || v === null || v === '') continue;
    const wrong = (detail: string) => problems.push({ pointer: at(input.id), detail });
    switch (input.type) {
      case 'number':
        if (typeof v !== 'number') wrong(`${input.label}: enter a number in ${input.unit}.`);
        else {
          // JSON can carry 1e400 (read as Infinity) or 1e308: refuse what no gauge could read.
          const problem = readingProblem(v, input.unit, input.label);
          if (problem) wrong(problem);
        }
        break;
      case 'choice':
        if (typeof v !== 'string' || !input.options.some((o) => o.value === v)) wrong(`${input.label}: choose one of the options.`);
        break;
      case 'yesno':
        if (typeof v !== 'boolean') wrong(`${input.label}: answer yes or no.`);
        break;
      case 'text':
        if (typeof v !== 'string') wrong(`${input.label}: enter text.`);
        else if (v.length > input.maxLength) wrong(`${input.label}: keep it under ${input.maxLength} characters.`);
        break;
      case 'photo':
        if (!Array.isArray(v)) wrong(`${input.label}: send a list of photo ids.`);
        else if (v.length > input.max) wrong(`${input.label}: at most ${input.max} photos.`);
        else if (new Set(v).size !== v.length) wrong(`${input.label}: the same photo is listed twice.`);
        break;
    }
  }
  if (problems.length) throw AppError.badRequest('Some values do not fit this step.', problems);
  return values as EntryValues;
}
