/**
 * One Origin over two: source paths that start with `~upstream/` go to the HTTP(S) upstream
 * origin (`~upstream/<host>[:port]/<path>`), every other path to the local origin. With no
 * upstream configured, `~upstream/` paths are refused as a switched-off origin.
 */
import type { Config } from '../config.js';
import { FoldwiseError } from '../errors.js';
import { createHttpOrigin } from './http.js';
import type { Origin } from './types.js';

/** The first path segment that selects the upstream origin. */
export const upstreamSegment = '~upstream';

/** The upstream origin the configuration describes, or undefined when its allowlist is empty. */
export function upstreamFromConfig(config: Config): Origin | undefined {
  const u = config.origin.upstream;
  if (u.allowHosts.length === 0) return undefined;
  return createHttpOrigin({
    allowHosts: u.allowHosts,
    allowPrivate: u.allowPrivate,
    allowAddresses: u.allowAddresses,
    timeouts: { connectMs: u.connectTimeoutMs, headersMs: u.headersTimeoutMs, bodyMs: u.bodyTimeoutMs },
    maxBytes: config.limits.maxSourceBytes,
    maxRedirects: u.maxRedirects,
    perHostConcurrency: u.perHostConcurrency,
    identityTtlMs: config.cache.identityTtlMs,
  });
}

/** Routes `~upstream/...` to `upstream` and everything else to `local`. */
export function withUpstream(local: Origin, upstream: Origin | undefined): Origin {
  const prefix = `${upstreamSegment}/`;
  const pick = (path: string): [Origin, string] => {
    if (path !== upstreamSegment && !path.startsWith(prefix)) return [local, path];
    if (!upstream) throw new FoldwiseError('ERR_ORIGIN_DISABLED', 'No upstream hosts are configured.');
    return [upstream, path.slice(prefix.length)];
  };
  const origin: Origin = {
    name: upstream ? `${local.name}+${upstream.name}` : local.name,
    read(path, signal) {
      const [o, rest] = pick(path);
      return o.read(rest, signal);
    },
    identify(path, signal) {
      const [o, rest] = pick(path);
      return o.identify(rest, signal);
    },
  };
  if (local.list) origin.list = local.list.bind(local);
  if (local.write) origin.write = local.write.bind(local);
  if (local.remove) {
    const remove = local.remove.bind(local);
    origin.remove = async (path) => {
      if (pick(path)[0] !== local) throw new FoldwiseError('ERR_SOURCE_PATH_INVALID', 'Upstream sources cannot be deleted here.');
      return remove(path);
    };
  }
  return origin;
}
