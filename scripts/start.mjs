// `npm start`: build when dist/ is missing or stale, apply migrations, seed an
// empty database with the demo project, then serve (PORT/HOST honoured).
import { spawn, spawnSync } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
process.chdir(root);
process.env.HOST ??= 'localhost';
process.env.PORT ??= '4321';

const STAMP = path.join(root, 'dist', '.build-stamp');
const INPUTS = ['src', 'public', 'astro.config.mjs', 'package-lock.json', 'tsconfig.json'];

function* walk(p) {
  const st = fs.statSync(p, { throwIfNoEntry: false });
  if (!st) return;
  if (st.isDirectory()) for (const n of fs.readdirSync(p).sort()) yield* walk(path.join(p, n));
  else yield [p, st];
}

/** What the build depends on: every input file's path, size and mtime, plus the env baked into the config. */
function fingerprint() {
  const h = crypto.createHash('sha256');
  for (const input of INPUTS) for (const [p, st] of walk(input)) h.update(`${p}\0${st.size}\0${st.mtimeMs}\n`);
  h.update(`HOST=${process.env.HOST}\nPUBLIC_ORIGIN=${process.env.PUBLIC_ORIGIN ?? ''}\n`);
  return h.digest('hex');
}

function run(args, what) {
  const r = spawnSync(process.execPath, args, { stdio: 'inherit', env: process.env });
  if (r.status !== 0) {
    console.error(`[skiplane] ${what} failed (exit ${r.status ?? r.signal}).`);
    process.exit(r.status || 1);
  }
}

const fp = fingerprint();
const built = fs.existsSync('dist/server/entry.mjs') && fs.readFileSync(STAMP, { encoding: 'utf8', flag: 'a+' }).trim() === fp;
if (!built) {
  console.log('[skiplane] building (dist/ is missing or older than the sources)…');
  run(['node_modules/astro/astro.js', 'build'], 'astro build');
  fs.writeFileSync(STAMP, fp + '\n');
}

run(['--import', 'tsx', 'scripts/prepare-db.ts'], 'database preparation');

const shown = process.env.PUBLIC_ORIGIN ?? `http://${process.env.HOST === '0.0.0.0' ? 'localhost' : process.env.HOST}:${process.env.PORT}`;
console.log(`[skiplane] serving on ${shown}`);
const server = spawn(process.execPath, ['dist/server/entry.mjs'], { stdio: 'inherit', env: { ...process.env, NODE_ENV: 'production' } });
for (const sig of ['SIGINT', 'SIGTERM']) process.on(sig, () => server.kill(sig));
server.on('exit', (code, signal) => process.exit(code ?? (signal ? 0 : 1)));
