# Benchpost's production image (README, "Deploying it"). The build stage has every dependency; the
# runtime stage has only what `npm ci --omit=dev` installs, the build and the migrations. One image,
# three commands, all run from /app:
#   the web server (the default):  node build/web.js      (WEB_CONCURRENCY processes behind PORT)
#   the worker:                    node build/worker.js
#   the release step, once per release, before the new version serves: node build/migrate.js
FROM node:20-bookworm-slim AS build
WORKDIR /app
COPY package.json package-lock.json ./
RUN npm ci --no-audit --no-fund
COPY . .
RUN npm run build

FROM node:20-bookworm-slim AS runtime
ENV NODE_ENV=production HOST=0.0.0.0 PORT=3000
WORKDIR /app
COPY package.json package-lock.json ./
RUN npm ci --omit=dev --no-audit --no-fund && npm cache clean --force
COPY --from=build /app/build ./build
COPY drizzle ./drizzle
USER node
EXPOSE 3000
HEALTHCHECK --interval=30s --timeout=5s CMD node -e "fetch('http://127.0.0.1:' + process.env.PORT + '/healthz').then((r) => process.exit(r.ok ? 0 : 1), () => process.exit(1))"
CMD ["node", "build/web.js"]
