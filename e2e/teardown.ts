import fs from 'node:fs';
import os from 'node:os';

// Remove the throw-away data folder made in playwright.config.ts.
export default function teardown() {
  const dir = process.env.E2E_DIR;
  if (dir && dir.startsWith(os.tmpdir()) && dir.includes('skiplane-e2e-')) fs.rmSync(dir, { recursive: true, force: true });
}
