/** `node --import tsx server/index.ts`: start, print the URL, close cleanly on SIGINT/SIGTERM. */
import { startServer } from './runtime.ts';

const server = await startServer();
console.info(`Orderly listening on ${server.url}`);

let stopping = false;
for (const signal of ['SIGINT', 'SIGTERM'] as const) {
  process.on(signal, () => {
    if (stopping) return;
    stopping = true;
    console.info(`${signal}: shutting down`);
    server.close().then(
      () => process.exit(0),
      (error: unknown) => {
        console.error('shutdown failed:', error);
        process.exit(1);
      },
    );
  });
}
