/** Where each environment variable lands in the configuration. */
export const envMap: Record<string, { path: string[]; parse: (v: string) => unknown }> = {
  HOST: { path: ['server', 'host'], parse: (v) => v },
  PORT: { path: ['server', 'port'], parse: (v) => (/^\d+$/.test(v) ? Number(v) : v) },
  FOLDWISE_LOG_FORMAT: { path: ['server', 'logFormat'], parse: (v) => v },
  FOLDWISE_SOURCE_DIR: { path: ['origin', 'sourceDir'], parse: (v) => v },
  FOLDWISE_CACHE_DIR: { path: ['cache', 'dir'], parse: (v) => v },
  FOLDWISE_REDIS_URL: { path: ['cache', 'redisUrl'], parse: (v) => v },
  FOLDWISE_SPOOL_DIR: { path: ['pool', 'spoolDir'], parse: (v) => v },
  FOLDWISE_PUBLIC_URL: { path: ['server', 'publicUrl'], parse: (v) => v },
  FOLDWISE_STORE_URL: { path: ['origin', 'storeUrl'], parse: (v) => v },
  FOLDWISE_S3_ENDPOINT: { path: ['origin', 's3Endpoint'], parse: (v) => v },
  FOLDWISE_UPSTREAM_HOSTS: {
    path: ['origin', 'upstream', 'allowHosts'],
    parse: (v) => v.split(',').map((h) => h.trim()).filter((h) => h.length > 0),
  },
  FOLDWISE_SIGNING_KEY: {
    path: ['signing', 'keys'],
    parse: (v) => v.split(',').map((k) => k.trim()).filter((k) => k.length > 0),
  },
};
