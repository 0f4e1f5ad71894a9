// Serves the built app (dist/) on localhost and prints the address. `npm start` builds first.
// Vite's preview server runs in this process, so stopping this process stops the server.
import { existsSync } from 'node:fs';
import { preview } from 'vite';

const port = Number(process.env.PORT ?? 4173);
const host = process.env.HOST ?? '127.0.0.1';

if (!existsSync(new URL('../dist/index.html', import.meta.url))) {
  console.error('dist/index.html is missing: run `npm run build` first (npm start does both).');
  process.exit(1);
}

const server = await preview({ preview: { port, host, strictPort: true, open: false } });
const address = server.resolvedUrls?.local[0] ?? `http://${host}:${port}/`;
console.log(`\nRipplewright is served at ${address}  (Ctrl+C to stop)\n`);

for (const signal of ['SIGINT', 'SIGTERM']) {
  process.once(signal, () => {
    setTimeout(() => process.exit(0), 2000).unref(); // open keep-alive sockets must not hold the exit
    server.close().finally(() => process.exit(0));
  });
}
