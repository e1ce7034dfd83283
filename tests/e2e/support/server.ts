/** Starts the real app (built web + API, in-memory database) on an ephemeral loopback port for browser suites. */
import fs from 'node:fs';
import path from 'node:path';
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { createApp, type CreatedApp } from '../../../api/src/app';
import { loadConfig, REPO_ROOT } from '../../../api/src/config';

export interface RunningApp {
  baseUrl: string;
  created: CreatedApp;
  stop(): Promise<void>;
}

export const WEB_ROOT = path.join(REPO_ROOT, 'dist/web');

export async function startBuiltApp(env: Record<string, string> = {}): Promise<RunningApp> {
  if (!fs.existsSync(path.join(WEB_ROOT, 'index.html'))) {
    throw new Error(`The web app is not built (${WEB_ROOT}/index.html missing): run "npm run build" first.`);
  }
  const created = await createApp(loadConfig({ NODE_ENV: 'test', WEB_ROOT, ...env }));
  const server: Server = await new Promise((resolve) => {
    const listening = created.app.listen(0, '127.0.0.1', () => resolve(listening));
  });
  const { port } = server.address() as AddressInfo;
  return {
    baseUrl: `http://localhost:${port}`,
    created,
    async stop() {
      await new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      });
      await created.close();
    },
  };
}

/** Screenshots from browser suites go here (git-ignored); look at them after a run. */
export const SCREENSHOT_DIR = path.join(REPO_ROOT, 'test-results/screenshots');
