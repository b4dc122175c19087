/**
 * The inspector's state: what the form holds, what the page URL says, and the API queries
 * made from it. The page URL carries only what differs from the defaults, so a shared link
 * stays short and reads like the request it shows.
 */
import { legacyLook, pointSampling } from './copies.js';

export interface InspectState {
  source: string;
  width: string;
  height: string;
  fit: string;
  kernel: string;
  prefilter: string;
  light: string;
  /** 'shown' when point sampling is shown as a third copy; a page parameter only. */
  points: string;
}

/** Field names in form order; each is also a page URL parameter and a form control's name. */
export const fields = ['source', 'width', 'height', 'fit', 'kernel', 'prefilter', 'light', 'points'] as const;

/** Values the service assumes when a parameter is absent; they are left out of URLs. */
const defaults: InspectState = {
  source: '',
  width: '',
  height: '',
  fit: '',
  kernel: 'auto',
  prefilter: 'auto',
  light: 'linear',
  points: '',
};

/**
 * What a bare /inspect opens on: the demo's pinstripe shirting at 320 px, where the stripes
 * (2.1 output px apart, just under the new Nyquist) are where the legacy look and the
 * foldwise copy differ most plainly. Any other first picture if the folder lacks it.
 */
export const startSource = 'fabrics/pinstripe.png';
export const startWidth = '320';


export function fromParams(params: URLSearchParams): InspectState {
  const state = { ...defaults };
  for (const name of fields) {
    const value = params.get(name);
    if (value !== null && value.trim() !== '') state[name] = value.trim();
  }
  return state;
}

function changed(state: InspectState): [string, string][] {
  return fields.filter((name) => state[name] !== defaults[name]).map((name) => [name, state[name]]);
}

/**
 * The page's own query string for this state (`?source=fabrics/pinstripe.png&width=320`).
 * Slashes may stand unescaped in a query (RFC 3986, section 3.4), which keeps paths readable.
 */
export function pageSearch(state: InspectState): string {
  return `?${new URLSearchParams(changed(state)).toString().replace(/%2F/gi, '/')}`;
}

export function readForm(form: HTMLFormElement): InspectState {
  const data = new FormData(form);
  const state = { ...defaults };
  for (const name of fields) {
    const value = data.get(name);
    if (typeof value === 'string' && value.trim() !== '') state[name] = value.trim();
  }
  return state;
}

export function writeForm(form: HTMLFormElement, state: InspectState): void {
  for (const name of fields) {
    const control = form.elements.namedItem(name);
    if (control instanceof HTMLInputElement && control.type === 'checkbox') control.checked = state[name] === control.value;
    else if (control instanceof HTMLInputElement || control instanceof HTMLSelectElement) control.value = state[name];
  }
}

/** A source path as URL path segments, each escaped, slashes kept. */
function sourcePath(source: string): string {
  return source.split('/').filter((part) => part !== '').map(encodeURIComponent).join('/');
}

function apiQuery(state: InspectState, extra: Record<string, string>): string {
  const params = new URLSearchParams(changed({ ...state, source: '', points: '' }));
  for (const [name, value] of Object.entries(extra)) params.set(name, value);
  return params.toString();
}

/**
 * URLs relative to the page (which lives at the service root), so the page also works when
 * the service is mounted under a path prefix. Renditions are asked for as PNG: a lossless
 * format neither hides moiré nor adds compression artefacts of its own.
 */
export function apiUrls(state: InspectState) {
  const path = sourcePath(state.source);
  const legacy = { ...state, ...legacyLook };
  const points = { ...state, ...pointSampling };
  return {
    legacy: `v1/renditions/${path}?${apiQuery(legacy, { format: 'png' })}`,
    planned: `v1/renditions/${path}?${apiQuery(state, { format: 'png' })}`,
    points: `v1/renditions/${path}?${apiQuery(points, { format: 'png' })}`,
    report: `v1/alias-risk/${path}?${apiQuery(state, {})}`,
    legacyReport: `v1/alias-risk/${path}?${apiQuery(legacy, {})}`,
    pointsReport: `v1/alias-risk/${path}?${apiQuery(points, {})}`,
    map: `v1/alias-risk/${path}?${apiQuery(state, { view: 'map' })}`,
    spectrum: `v1/alias-risk/${path}?${apiQuery(state, { view: 'spectrum' })}`,
  };
}

export type ApiUrls = ReturnType<typeof apiUrls>;
