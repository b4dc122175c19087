# foldwise: multi-stage build. The build stage compiles TypeScript to dist/; the runtime stage
# carries only production dependencies and the compiled service, and runs as a non-root user.
#   docker build -t foldwise .
#   docker run --rm -p 8080:8080 --shm-size=512m -v foldwise-cache:/data/cache foldwise
# (--shm-size: decodes spool their rows in /dev/shm, 64 MB by default in a container; README.)
# Own pictures: mount them at /data/images and a config file that turns the demo off, e.g.
#   echo '{"origin":{"generateDemo":false}}' > foldwise.json
#   docker run --rm -p 8080:8080 --shm-size=512m -v "$PWD/pictures:/data/images:ro" \
#     -v "$PWD/foldwise.json:/etc/foldwise.json:ro" -e FOLDWISE_CONFIG=/etc/foldwise.json foldwise

FROM node:24-bookworm-slim AS build
WORKDIR /app
COPY package.json package-lock.json ./
# --ignore-scripts: the project's `prepare` (the CLI bundle) needs src/, which is not here yet,
# and the image's CLI runs tsc's dist/ anyway; esbuild's own install script then runs alone.
RUN npm ci --no-audit --no-fund --ignore-scripts && npm rebuild esbuild
COPY tsconfig.json tsconfig.build.json ./
COPY src ./src
COPY tools/demo ./tools/demo
COPY scripts/bundle-inspector.mjs ./scripts/
RUN npm run build && npm prune --omit=dev --no-audit --no-fund --ignore-scripts

FROM node:24-bookworm-slim AS runtime
ENV NODE_ENV=production \
    HOST=0.0.0.0 \
    PORT=8080 \
    FOLDWISE_SOURCE_DIR=/data/images \
    FOLDWISE_CACHE_DIR=/data/cache
WORKDIR /app
COPY --from=build /app/node_modules ./node_modules
COPY --from=build /app/dist ./dist
COPY package.json ./
COPY bin ./bin
COPY config ./config
# The /inspect page's HTML, CSS and icon (its script is bundled at build time: dist/inspector).
COPY src/inspector ./src/inspector
RUN mkdir -p /data/images /data/cache && chown -R node:node /data
# The official Node image's unprivileged user (uid 1000).
USER node
EXPOSE 8080
VOLUME ["/data/cache"]
# Liveness through the service's own /healthz; Node has fetch, so no curl in the image.
HEALTHCHECK --interval=30s --timeout=3s --start-period=60s --retries=3 \
  CMD ["node", "-e", "fetch('http://127.0.0.1:'+(process.env.PORT||8080)+'/healthz').then(r=>process.exit(r.ok?0:1),()=>process.exit(1))"]
CMD ["node", "dist/server.js"]
