/** Validates request bodies and queries with zod; failures become 422 with one message per field. */
import type { z } from 'zod';
import { fromZodError } from '../http-error';

export function parseBody<S extends z.ZodType>(schema: S, body: unknown): z.output<S> {
  const result = schema.safeParse(body ?? {});
  if (!result.success) throw fromZodError(result.error);
  return result.data;
}

export function parseQuery<S extends z.ZodType>(schema: S, query: unknown): z.output<S> {
  const result = schema.safeParse(query ?? {});
  if (!result.success) throw fromZodError(result.error);
  return result.data;
}
