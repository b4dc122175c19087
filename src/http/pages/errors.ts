/**
 * The error pages: GET /docs/errors (every code of the registry, one anchor each, where a
 * problem's `type` points) and the page a browser gets instead of problem+json.
 */
import { errorCodes, type ErrorCode } from '../../errors.js';
import { esc, page } from './html.js';

const statusClass = (status: number) => `s${String(status)[0]}`;

/** GET /docs/errors: one table row per code, `id` = the code, so `/docs/errors#CODE` lands on it. */
export function errorsPage(): string {
  const rows = Object.entries(errorCodes).map(
    ([code, { status, title }]) =>
      `      <tr id="${esc(code)}"><td><a href="#${esc(code)}"><code>${esc(code)}</code></a></td><td class="status ${statusClass(status)}">${status}</td><td>${esc(title)}</td></tr>`,
  );
  const body = `    <p>Every error is answered as <code>application/problem+json</code> (RFC 9457) with a stable <code>code</code>; clients may match on it. A browser asking for HTML gets the same fields as a page. The <code>type</code> of a problem is a link to its row here. Codes are only ever added, never renamed. The same list as JSON: <a href="/docs/errors.json">/docs/errors.json</a>.</p>
    <pre>{"type":"/docs/errors#ERR_PARAM_UNKNOWN","title":"Unknown parameter","status":400,
 "detail":"unknown parameter \\"w\\"","code":"ERR_PARAM_UNKNOWN","requestId":"\u2026"}</pre>
    <table>
      <thead><tr><th scope="col">Code</th><th scope="col">Status</th><th scope="col">Meaning</th></tr></thead>
      <tbody>
${rows.join('\n')}
      </tbody>
    </table>
    <p class="muted">A 5xx shows only its title; the cause is in the service's log under the request id. Status 499 is never sent: it is logged when a client leaves before its answer.</p>
`;
  return page({ title: 'Error codes', current: '/docs/errors', body });
}

export interface ProblemFacts {
  status: number;
  title: string;
  detail: string;
  code: ErrorCode;
  type: string;
  requestId: string;
}

/** The HTML form of one problem: the same fields as the JSON, and where to go next. */
export function problemPage(p: ProblemFacts): string {
  const body = `    <div class="problem ${statusClass(p.status)}">
      <p>${esc(p.detail)}</p>
      <dl>
        <dt>status</dt><dd class="status ${statusClass(p.status)}">${p.status}</dd>
        <dt>code</dt><dd><a href="${esc(p.type)}"><code>${esc(p.code)}</code></a></dd>
        <dt>request id</dt><dd><code>${esc(p.requestId)}</code></dd>
      </dl>
    </div>
    <p>Machines get this as <code>application/problem+json</code>. See <a href="/docs">the API reference</a> or go to <a href="/">the start page</a>.</p>
`;
  return page({ title: `${p.status} \u2013 ${p.title}`, body });
}
