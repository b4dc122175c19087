/**
 * The inspector's calls to the service. Failures become ServiceProblem with the words of the
 * service's problem details (RFC 9457), so the page can show them as they are.
 */

export class ServiceProblem extends Error {
  constructor(
    message: string,
    readonly status: number,
    readonly code?: string,
  ) {
    super(message);
    this.name = 'ServiceProblem';
  }
}

async function fail(response: Response, what: string): Promise<never> {
  let message = `${what}: the service answered ${response.status}`;
  let code: string | undefined;
  if ((response.headers.get('content-type') ?? '').includes('json')) {
    const body = (await response.json().catch(() => ({}))) as Record<string, unknown>;
    const text = [body.title, body.detail].filter((t) => typeof t === 'string' && t !== '');
    if (text.length > 0) message = `${what}: ${[...new Set(text)].join(' — ')}`;
    if (typeof body.code === 'string') code = body.code;
  }
  throw new ServiceProblem(message, response.status, code);
}

async function get(url: string, what: string, signal: AbortSignal): Promise<Response> {
  const response = await fetch(url, { signal });
  if (!response.ok) await fail(response, what);
  return response;
}

export async function getJson<T>(url: string, what: string, signal: AbortSignal): Promise<T> {
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
export function showImage(img: HTMLImageElement, objectUrl: string, alt: string): Promise<void> {
  const previous = img.src;
  const loaded = new Promise<void>((resolve, reject) => {
    img.addEventListener('load', () => resolve(), { once: true });
    img.addEventListener('error', () => reject(new ServiceProblem(`${alt}: the picture could not be shown`, 0)), {
      once: true,
    });
  });
  img.alt = alt;
  img.src = objectUrl;
  img.hidden = false;
  if (previous.startsWith('blob:')) URL.revokeObjectURL(previous);
  return loaded;
}
