import type { AddressInfo } from 'node:net';
import { ConfigError, loadConfig } from './config';
import { createApp } from './app';
import { demoSignInLines } from './db/seeders/0002-demo-scenario';

/** How long in-flight requests get to finish after SIGTERM before the process exits anyway. */
const SHUTDOWN_GRACE_MS = 10_000;

async function main(): Promise<void> {
  const config = loadConfig();
  const { app, context, close } = await createApp(config);
  const server = app.listen(config.port, () => {
    const { port } = server.address() as AddressInfo;
    const url = `http://localhost:${port}`;
    context.logger.info({ url }, 'Sylvasift is listening');
    console.log(`\nSylvasift is running at ${url}  (API docs: ${url}/api/docs)\n`);
    const demo = demoSignInLines(config);
    if (demo.length > 0) console.log(`${demo.join('\n')}\n`);
  });

  let stopping = false;
  const shutdown = (signal: string) => {
    if (stopping) return;
    stopping = true;
    context.logger.info({ signal }, 'shutting down');
    const force = setTimeout(() => {
      context.logger.warn('forcing exit: connections did not close in time');
      process.exit(1);
    }, SHUTDOWN_GRACE_MS);
    force.unref();
    server.close(() => {
      close()
        .then(() => process.exit(0))
        .catch((error: unknown) => {
          context.logger.error({ err: error }, 'error while closing the database');
          process.exit(1);
        });
    });
    server.closeIdleConnections();
  };
  process.on('SIGTERM', () => shutdown('SIGTERM'));
  process.on('SIGINT', () => shutdown('SIGINT'));
}

main().catch((error: unknown) => {
  console.error(error instanceof ConfigError ? error.message : error);
  process.exit(1);
});
