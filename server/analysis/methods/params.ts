/**
 * From a method's parameter descriptions to the zod schema that checks them (every field optional
 * here: defaults fill them in first) and to the JSON description GET /methods answers. Messages
 * name the parameter and say what it must be.
 */
import { z } from 'zod';
import type { Frequency } from '../../schemas/frequency.js';
import { LAMBDA_MAX, LAMBDA_MIN, type ParamDescription, type ParamSpec, type ParamSpecs, type ParamValue } from '../../schemas/methods.js';
import type { AnyMethod } from './types.js';

/** "1, 2 or 3"; strings are quoted: "\"bic\" or \"fixed\"". */
function either(values: readonly (string | number)[]): string {
  const words = values.map((v) => (typeof v === 'string' ? `"${v}"` : String(v)));
  return words.length === 1 ? words[0] : `${words.slice(0, -1).join(', ')} or ${words[words.length - 1]}`;
}

const lambdaSchema = z
  .number({ error: 'λ must be a finite number.' })
  .refine((v) => v > 0, 'λ must be greater than 0.')
  .refine((v) => v >= LAMBDA_MIN && v <= LAMBDA_MAX, `λ must lie between ${LAMBDA_MIN} and ${LAMBDA_MAX}.`);

function fieldSchema(name: string, spec: ParamSpec): z.ZodType {
  switch (spec.kind) {
    case 'lambda':
      return lambdaSchema;
    case 'boolean':
      return z.boolean({ error: `${name} must be true or false.` });
    case 'enum': {
      const values = spec.options.map((o) => o.value);
      const error = `${name} must be ${either(values)}.`;
      return values.every((v) => typeof v === 'string')
        ? z.enum(values as [string, ...string[]], { error })
        : z.union(values.map((v) => z.literal(v)) as unknown as [z.ZodLiteral, z.ZodLiteral], { error });
    }
    case 'number':
    case 'integer': {
      const periods = spec.unit === 'periods' ? ' periods' : '';
      let n =
        spec.kind === 'integer'
          ? z.number({ error: `${name} must be a whole number.` }).int(`${name} must be a whole number.`)
          : z.number({ error: `${name} must be a finite number${periods ? ' of periods' : ''}.` });
      if (spec.min !== undefined) n = n.min(spec.min, `${name} must be at least ${spec.min}${spec.kind === 'number' ? periods : ''}.`);
      if (spec.max !== undefined) n = n.max(spec.max, `${name} must be at most ${spec.max}${spec.kind === 'number' ? periods : ''}.`);
      if (!spec.choices?.length) return n;
      const named = spec.choices.map((c) => c.value);
      return z.union([n, z.enum(named as [string, ...string[]])], { error: `${name} must be a number or ${either(named)}.` });
    }
  }
}

const built = new WeakMap<ParamSpecs, z.ZodObject>();

/** The zod schema of a method's parameters: strict (an unknown parameter is refused), every field optional. Built once per method. */
export function paramsSchema(specs: ParamSpecs): z.ZodObject {
  let schema = built.get(specs);
  if (!schema) {
    schema = z.object(Object.fromEntries(Object.entries(specs).map(([name, spec]) => [name, fieldSchema(name, spec).optional()]))).strict();
    built.set(specs, schema);
  }
  return schema;
}

/** The description of a method for GET /methods and the parameter editor. */
export function describeParams(method: AnyMethod, frequency: Frequency = 'Q'): ParamDescription[] {
  const defaults = method.defaults(frequency) as Record<string, ParamValue>;
  return Object.entries(method.params as ParamSpecs).map(([name, spec]) => ({ ...spec, name, required: defaults[name] === undefined }));
}
