import { z } from 'zod';
import { errorCodes } from '../errors.js';

/** One OpenAPI 3.1 operation, as routes attach it to their `config.openapi`. */
export interface Operation {
  summary: string;
  description?: string;
  tags?: string[];
  parameters?: unknown[];
  requestBody?: unknown;
  responses: Record<string, unknown>;
}

/** RFC 9457 problem details as the service sends them. */
export const problemSchema = z.object({
  type: z.string().meta({ description: 'Reference into GET /docs/errors.' }),
  title: z.string(),
  status: z.number().int().min(400).max(599),
  detail: z.string(),
  code: z.enum(Object.keys(errorCodes) as [string, ...string[]]),
  requestId: z.string(),
});

const jsonSchema = (schema: z.ZodType) => {
  const { $schema: _drop, ...rest } = z.toJSONSchema(schema, { io: 'output', unrepresentable: 'any' }) as Record<string, unknown>;
  return rest;
};

/** The problem response for the given statuses. */
export function problemResponses(...statuses: number[]): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const s of statuses) {
    const codes = Object.entries(errorCodes).filter(([, v]) => v.status === s).map(([k]) => k);
    out[String(s)] = {
      description: `Problem details; code one of ${codes.join(', ')}`,
      content: { 'application/problem+json': { schema: { $ref: '#/components/schemas/Problem' } } },
    };
  }
  return out;
}

/** Query parameters of a strict zod object, one OpenAPI parameter per key (none required). */
export function queryParameters(schema: z.ZodObject): unknown[] {
  const json = jsonSchema(schema) as { properties: Record<string, Record<string, unknown>> };
  return Object.entries(json.properties).map(([name, { description, ...s }]) => ({
    name,
    in: 'query',
    required: false,
    description,
    schema: s,
  }));
}

/** A JSON response body schema from zod. */
export function jsonBody(description: string, schema: z.ZodType): unknown {
  return { description, content: { 'application/json': { schema: jsonSchema(schema) } } };
}

/** The whole document from collected operations (path -> method -> operation). */
export function openApiDocument(paths: Record<string, Record<string, Operation>>, version: string): unknown {
  return {
    openapi: '3.1.0',
    info: {
      title: 'foldwise',
      version,
      description: 'Image renditions made correctly: linear-light, alias-aware resampling.',
    },
    paths,
    components: { schemas: { Problem: jsonSchema(problemSchema) } },
  };
}
