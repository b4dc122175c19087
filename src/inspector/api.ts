/**
 * The inspector's calls to the service. Failures become ServiceProblem with the words of the
 * service's problem details (RFC 9457), so the page can show them as they are.
 */

export class ServiceProblem extends Error {
  constructor(
    /** What was asked for, in words ("The risk report"). */
    readonly what: string,
    /** What went wrong, in the service's words. */
    readonly problem: string,
    readonly status: number,
    readonly code?: string,
  ) {
    super(`${what}: ${problem}`);
    this.name = 'ServiceProblem';
  }
}

async function fail(response: Response, what: string): Promise<never> {
  let problem = `the service answered ${response.status}`;
  let code: string | undefined;
  if ((response.headers.get('content-type') ?? '').includes('json')) {
    const body = (await response.json().catch(() => ({}))) as Record<string, unknown>;
    const text = [body.title, body.detail].filter((t) => typeof t === 'string' && t !== '');
    if (text.length > 0) problem = [...new Set(text)].join(' — ');
    if (typeof body.code === 'string') code = body.code;
  }
  throw new ServiceProblem(what, problem, response.status, code);
}

async function get(url: string, what: string, signal?: AbortSignal): Promise<Response> {
  const response = await fetch(url, { signal });
  if (!response.ok) await fail(response, what);
  return response;
}

export async function getJson<T>(url: string, what: string, signal?: AbortSignal): Promise<T> {
  return (await (await get(url, what, signal)).json()) as T;
}

/** A fetched image: a blob: URL to show it, and the response headers worth showing. */
export interface FetchedImage {
  objectUrl: string;
  plan: string | null;
}

/** Fetches an image; the caller revokes `objectUrl` when it replaces the picture. */
export async function getImage(url: string, what: string, signal: AbortSignal): Promise<FetchedImage> {
  const response = await get(url, what, signal);
  const blob = await response.blob();
  return { objectUrl: URL.createObjectURL(blob), plan: response.headers.get('rendition-plan') };
}

/** Shows `objectUrl` in `img` and resolves once it has loaded (decoded), rejects if it cannot. */
export function showImage(img: HTMLImageElement, objectUrl: string, what: string, alt: string): Promise<void> {
  const previous = img.src;
  const loaded = new Promise<void>((resolve, reject) => {
    const settle = (ok: boolean) => {
      img.removeEventListener('load', onLoad);
      img.removeEventListener('error', onError);
      if (ok) resolve();
      else reject(new ServiceProblem(what, 'the browser could not show the picture', 0));
    };
    const onLoad = () => settle(true);
    const onError = () => settle(false);
    img.addEventListener('load', onLoad);
    img.addEventListener('error', onError);
  });
  img.alt = alt;
  img.src = objectUrl;
  img.hidden = false;
  if (previous.startsWith('blob:')) URL.revokeObjectURL(previous);
  return loaded;
}

/** Takes a picture off the page, so nothing from an earlier request stays in its place. */
export function hideImage(img: HTMLImageElement): void {
  const previous = img.src;
  img.hidden = true;
  img.removeAttribute('src');
  img.alt = '';
  if (previous.startsWith('blob:')) URL.revokeObjectURL(previous);
}
