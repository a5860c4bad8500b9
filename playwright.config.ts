import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { defineConfig } from '@playwright/test';

// The tests drive the BUILT server (`npm run build` first) on a free port and a
// throw-away database. Values go through the environment so that Playwright's
// worker processes, which load this file again, agree with the main process.
if (!fs.existsSync('dist/server/entry.mjs')) {
  throw new Error('dist/server/entry.mjs is missing: run `npm run build` before `npx playwright test`.');
}
process.env.E2E_PORT ??= execFileSync(process.execPath, [
  '-e',
  "const s=require('net').createServer();s.listen(0,'127.0.0.1',()=>{process.stdout.write(String(s.address().port));s.close()})",
]).toString();
process.env.E2E_DIR ??= fs.mkdtempSync(path.join(os.tmpdir(), 'skiplane-e2e-'));

const port = Number(process.env.E2E_PORT);
const dir = process.env.E2E_DIR;
const baseURL = `http://127.0.0.1:${port}`;

export default defineConfig({
  testDir: 'e2e',
  globalTeardown: './e2e/teardown.ts',
  timeout: 60_000,
  expect: { timeout: 10_000 },
  fullyParallel: false,
  workers: 1,
  retries: 0,
  reporter: [['list']],
  use: {
    baseURL,
    trace: 'retain-on-failure',
    actionTimeout: 15_000,
    launchOptions: {
      executablePath: '/usr/bin/chromium',
      args: [
        '--headless',
        '--no-sandbox',
        '--disable-gpu',
        '--disable-quic',
        '--no-first-run',
        '--disable-background-networking',
        '--disable-component-update',
        '--disable-sync',
      ],
    },
  },
  webServer: {
    command: 'node dist/server/entry.mjs',
    url: `${baseURL}/sign-in`,
    reuseExistingServer: false,
    timeout: 60_000,
    stdout: 'pipe',
    stderr: 'pipe',
    env: {
      HOST: '127.0.0.1',
      PORT: String(port),
      NODE_ENV: 'production',
      DATA_DIR: dir,
      DATABASE_URL: `file:${path.join(dir, 'e2e.db')}`,
      OUTBOX_DIR: path.join(dir, 'outbox'),
      BETTER_AUTH_SECRET: 'e2e-secret-0123456789abcdef0123456789abcdef',
      SMTP_URL: '',
    },
  },
});
