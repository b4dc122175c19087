/**
 * GET /docs: the API reference, rendered here from the OpenAPI document the routes generate
 * (GET /docs/openapi.json), so the page and the JSON cannot disagree. One section per tag,
 * one card per operation: parameters, request body, responses with their fields.
 */
import type { Operation } from '../../schemas/openapi.js';
import { esc, page } from './html.js';
import { fieldTree, type Schema, typeLine } from './schema-view.js';

interface Doc {
  info: { title: string; version: string; description?: string };
  paths: Record<string, Record<string, Operation>>;
  components?: { schemas?: Record<string, Schema> };
}

interface Parameter {
  name: string;
  in: string;
  required?: boolean;
  description?: string;
  schema?: Schema;
}

interface Media {
  schema?: Schema;
}

/** The anchor of an operation: `get-v1-renditions-source`. */
export const operationId = (method: string, path: string) =>
  `${method}-${path}`.replace(/[{}]/g, '').replace(/[^A-Za-z0-9]+/g, '-').replace(/-+$/, '').toLowerCase();

/** Descriptions are plain text; blank lines split paragraphs. */
const prose = (text: string | undefined) =>
  text ? text.split(/\n\s*\n/).map((p) => `<p>${esc(p.trim())}</p>`).join('\n') : '';

function parameters(list: Parameter[] | undefined): string {
  if (!list?.length) return '';
  const rows = list.map(
    (p) =>
      `<tr id="${esc(`param-${p.name}`)}"><td><code>${esc(p.name)}</code>${p.required ? ' <strong>required</strong>' : ''}</td><td>${esc(p.in)}</td><td>${typeLine(p.schema)}</td><td>${esc(p.description ?? '')}</td></tr>`,
  );
  return `<h4>Parameters</h4>
<table><thead><tr><th scope="col">Name</th><th scope="col">In</th><th scope="col">Values</th><th scope="col">Meaning</th></tr></thead><tbody>${rows.join('')}</tbody></table>`;
}

function contents(content: Record<string, Media> | undefined): string {
  if (!content) return '';
  return Object.entries(content)
    .map(([type, m]) => {
      const tree = fieldTree(m.schema);
      const ref = m.schema && typeof m.schema.$ref === 'string' ? ` (${typeLine(m.schema)})` : '';
      return tree ? `<details><summary><code>${esc(type)}</code> fields</summary>${tree}</details>` : `<div><code>${esc(type)}</code>${ref}</div>`;
    })
    .join('');
}

function responses(list: Record<string, unknown>): string {
  const rows = Object.entries(list).map(([status, r]) => {
    const { description, content } = r as { description?: string; content?: Record<string, Media> };
    return `<tr><td class="status s${status[0]}">${esc(status)}</td><td>${esc(description ?? '')}${contents(content)}</td></tr>`;
  });
  return `<h4>Responses</h4><table><tbody>${rows.join('')}</tbody></table>`;
}

function operation(method: string, path: string, op: Operation): string {
  const body = op.requestBody as { description?: string; content?: Record<string, Media> } | undefined;
  return `<section class="op" id="${operationId(method, path)}">
<h3><span class="verb ${esc(method)}">${esc(method.toUpperCase())}</span> <code>${esc(path)}</code> <span>${esc(op.summary)}</span></h3>
${prose(op.description)}
${parameters(op.parameters as Parameter[] | undefined)}
${body ? `<h4>Request body</h4>${prose(body.description)}${contents(body.content)}` : ''}
${responses(op.responses)}
</section>`;
}

export function referencePage(doc: Doc): string {
  const byTag = new Map<string, string[]>();
  const toc: string[] = [];
  for (const [path, methods] of Object.entries(doc.paths)) {
    for (const [method, op] of Object.entries(methods)) {
      const tag = op.tags?.[0] ?? 'other';
      (byTag.get(tag) ?? byTag.set(tag, []).get(tag))?.push(operation(method, path, op));
      toc.push(`<li><a href="#${operationId(method, path)}">${esc(method.toUpperCase())} ${esc(path)}</a> \u2013 ${esc(op.summary)}</li>`);
    }
  }
  const sections = [...byTag].map(([tag, ops]) => `<h2 id="tag-${esc(tag)}">${esc(tag)}</h2>\n${ops.join('\n')}`);
  const schemas = Object.entries(doc.components?.schemas ?? {}).map(
    ([name, s]) => `<section class="op" id="schema-${esc(name)}"><h3><code>${esc(name)}</code></h3>${fieldTree(s)}</section>`,
  );
  const body = `    <p>Version ${esc(doc.info.version)}. Generated from the same zod schemas the service validates with; the machine-readable form is <a href="/docs/openapi.json">/docs/openapi.json</a> (OpenAPI 3.1). Errors are listed under <a href="/docs/errors">error codes</a>.</p>
    <ul class="toc">${toc.join('')}</ul>
${sections.join('\n')}
<h2 id="schemas">Shared schemas</h2>
${schemas.join('\n')}
`;
  return page({ title: 'API reference', current: '/docs', lede: esc(doc.info.description ?? ''), body });
}
