import { problems } from './problem';

/** Reads one string field of a JSON body; the contract validator normally catches these first. */
export function stringField(body: unknown, name: string, options: { optional?: boolean; max?: number } = {}): string {
  const value = typeof body === 'object' && body !== null ? (body as Record<string, unknown>)[name] : undefined;
  if (value === undefined && options.optional) return '';
  if (typeof value !== 'string') throw problems.invalidInput(`${name} must be a string.`, [{ name: `/${name}`, reason: 'must be a string' }]);
  if (options.max !== undefined && value.length > options.max) {
    throw problems.invalidInput(`${name} must be at most ${options.max} characters.`, [{ name: `/${name}`, reason: `longer than ${options.max}` }]);
  }
  return value;
}

/** Reads a route parameter that must be a positive integer id. */
export function idParam(value: string | string[] | undefined, name = 'id'): number {
  const id = Number(value);
  if (!Number.isInteger(id) || id < 1)
    throw problems.invalidInput(`${name} must be a positive integer.`, [{ name: `path.${name}`, reason: 'not a positive integer' }]);
  return id;
}
