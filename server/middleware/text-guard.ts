/**
 * The safety net of the text rule (shared/api/safe-text.ts) for every API request: each string of the JSON
 * body and of the query (keys too) is checked before any route sees it, so a NUL or a direction control in
 * any field is a 422 that names the field, never a server fault. Tabs and line breaks pass here; the
 * field's own schema decides whether it may hold them.
 */
import type { RequestHandler } from 'express';
import { unsafeTextProblem } from '../../shared/api/safe-text';
import { validationFailed } from '../http-error';

const NET = { tab: true, lineBreaks: true } as const;
const MAX_DEPTH = 64;

/** The first refused string in a JSON value, as [field path, message]; null when all are fine. */
export function findUnsafeText(value: unknown, path: string[] = [], depth = 0): [string, string] | null {
  if (typeof value === 'string') {
    const problem = unsafeTextProblem(value, NET);
    return problem ? [path.join('.') || '_', problem] : null;
  }
  if (typeof value !== 'object' || value === null || depth > MAX_DEPTH) return null;
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) {
      const found = findUnsafeText(value[i], [...path, String(i)], depth + 1);
      if (found) return found;
    }
    return null;
  }
  for (const [key, inner] of Object.entries(value)) {
    const keyProblem = unsafeTextProblem(key, NET);
    if (keyProblem) return [[...path, JSON.stringify(key)].join('.'), `A field name is not allowed. ${keyProblem}`];
    const found = findUnsafeText(inner, [...path, key], depth + 1);
    if (found) return found;
  }
  return null;
}

export const textGuard: RequestHandler = (req, _res, next) => {
  const found = findUnsafeText(req.query) ?? (Buffer.isBuffer(req.body) ? null : findUnsafeText(req.body));
  if (found) throw validationFailed({ [found[0]]: found[1] });
  // Path segments (ids, tokens) are checked too: they never hold control or direction characters.
  const pathProblem = unsafeTextProblem(safeDecode(req.path));
  if (pathProblem) throw validationFailed({ _: `The address is not valid. ${pathProblem}` }, `The address is not valid. ${pathProblem}`);
  next();
};

function safeDecode(path: string): string {
  try {
    return decodeURIComponent(path);
  } catch {
    return path;
  }
}
