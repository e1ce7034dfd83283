/** Development: the API in watch mode on PORT (default 3000) and `ng serve` proxying /api to it. */
import { execSync, spawn, type ChildProcess } from 'node:child_process';

// The icon font is cut to the icons the app names before the web app is served (see subset-icons.ts).
execSync('npx tsx scripts/subset-icons.ts', { stdio: 'inherit' });

const children: ChildProcess[] = [
  spawn('npx', ['tsx', 'watch', '--clear-screen=false', 'api/src/server.ts'], { stdio: 'inherit', env: { ...process.env, NODE_ENV: 'development' } }),
  spawn('npx', ['ng', 'serve', '--port', process.env['WEB_PORT'] ?? '4200'], { stdio: 'inherit' }),
];

let stopping = false;
function stopAll(code: number): void {
  if (stopping) return;
  stopping = true;
  for (const child of children) child.kill('SIGTERM');
  process.exitCode = code;
}
for (const child of children) child.on('exit', (code) => stopAll(code ?? 0));
process.on('SIGINT', () => stopAll(0));
process.on('SIGTERM', () => stopAll(0));
