/**
 * JSON Schema (as the OpenAPI document carries it, from zod) in words and nested lists: a
 * type line for a parameter, a field tree for a body. Read-only rendering; nothing validated.
 */
import { esc } from './html.js';

export type Schema = Record<string, unknown>;

const refName = (ref: string) => ref.split('/').pop() ?? ref;

/** "integer, 1 to 8192, default 1", "one of contain, cover", "array of string". */
export function typeLine(s: Schema | undefined): string {
  if (!s) return 'any';
  if (typeof s.$ref === 'string') return `<a href="#schema-${esc(refName(s.$ref))}">${esc(refName(s.$ref))}</a>`;
  const parts: string[] = [];
  const alts = (s.anyOf ?? s.oneOf) as Schema[] | undefined;
  if (Array.isArray(s.enum)) parts.push(`one of ${s.enum.map((v) => `<code>${esc(String(v))}</code>`).join(', ')}`);
  else if (s.const !== undefined) parts.push(`<code>${esc(JSON.stringify(s.const))}</code>`);
  else if (alts) parts.push(alts.map(typeLine).join(' or '));
  else if (s.type === 'array') parts.push(`array of ${typeLine(s.items as Schema | undefined)}`);
  else if (s.type !== undefined) parts.push(esc([s.type].flat().join(' or ')));
  else parts.push('any');
  // zod writes every int's safe-integer range as bounds: they say nothing to a reader.
  const bound = (v: unknown) => (typeof v === 'number' && Math.abs(v) !== Number.MAX_SAFE_INTEGER ? v : undefined);
  const min = bound(s.minimum ?? s.exclusiveMinimum);
  const max = bound(s.maximum ?? s.exclusiveMaximum);
  if (typeof min === 'number' && typeof max === 'number') parts.push(`${min} to ${max}`);
  else if (typeof min === 'number') parts.push(`at least ${min}`);
  else if (typeof max === 'number') parts.push(`at most ${max}`);
  if (typeof s.pattern === 'string') parts.push(`pattern <code>${esc(s.pattern)}</code>`);
  if (s.default !== undefined) parts.push(`default <code>${esc(JSON.stringify(s.default))}</code>`);
  return parts.join(', ');
}

/** The object a schema describes, through arrays and single-branch unions; else undefined. */
function objectOf(s: Schema | undefined): Schema | undefined {
  if (!s) return undefined;
  if (s.properties) return s;
  if (s.type === 'array') return objectOf(s.items as Schema | undefined);
  const alts = (s.anyOf ?? s.oneOf) as Schema[] | undefined;
  return alts?.map(objectOf).find((o) => o !== undefined);
}

/** A nested list of an object's fields with their types and descriptions, `depth` levels down. */
export function fieldTree(s: Schema | undefined, depth = 4): string {
  const obj = objectOf(s);
  if (!obj || depth === 0) return '';
  const required = new Set((obj.required as string[] | undefined) ?? []);
  const items = Object.entries(obj.properties as Record<string, Schema>).map(([name, p]) => {
    const about = typeof p.description === 'string' ? ` \u2013 ${esc(p.description)}` : '';
    const req = required.has(name) ? '' : ' <span class="muted">(optional)</span>';
    return `<li><code>${esc(name)}</code> <em>${typeLine(p)}</em>${req}${about}${fieldTree(p, depth - 1)}</li>`;
  });
  return `<ul class="fields">${items.join('')}</ul>`;
}
