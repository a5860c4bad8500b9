/**
 * Runs made in this browser, on the engine workers: the netlists are the
 * demo project's generated adders, uploaded through the API (the e2e
 * database starts empty). Verdicts are checked against BigInt arithmetic
 * and against the engine run once more here in Node, never against numbers
 * copied from the screen.
 */
import path from 'node:path';
import type { Locator, Page } from '@playwright/test';
import { parseDesign } from '../src/engine/json';
import { prepareAdder } from '../src/engine/pipeline';
import { verifyExhaustive } from '../src/engine/verify/bitsliced';
import { DEMO_NETLISTS } from '../src/lib/demo-netlists';
import { expect, test } from './fixtures';

const account = { name: 'Bea Browser', email: `browser-run-${Date.now()}@example.test`, password: 'e2e-password-1' };
/** Netlist id by demo name. */
const netlistIds = new Map<string, string>();
// Signed in once (the server limits sign-ins), every test's page starts with this session.
const sessionFile = path.join(process.env.E2E_DIR!, 'browser-run-session.json');
test.use({ storageState: async ({}, use) => use(sessionFile) });

const demo = (name: string) => DEMO_NETLISTS.find((d) => d.name === name)!;

test.beforeAll(async ({ playwright }, testInfo) => {
  const baseURL = testInfo.project.use.baseURL!;
  // A fresh context: the session file it writes does not exist yet.
  const api = await playwright.request.newContext({ baseURL, extraHTTPHeaders: { origin: baseURL }, storageState: { cookies: [], origins: [] } });
  const ok = async <T = unknown>(res: Awaited<ReturnType<typeof api.post>>): Promise<T> => {
    expect(res.ok(), `${res.url()}: ${res.status()} ${await res.text()}`).toBe(true);
    return (await res.json()) as T;
  };
  await ok(await api.post('/api/auth/sign-up/email', { data: account }));
  const { project } = await ok<{ project: { id: string } }>(await api.post('/api/projects', { data: { name: 'Browser runs' } }));
  for (const name of ['tick-skip-8-fault', 'mac-skip-32-var', 'acc-skip-16']) {
    const d = demo(name);
    const { netlist } = await ok<{ netlist: { id: string } }>(
      await api.post(`/api/projects/${project.id}/netlists`, { data: { name: d.name, width: d.width, kind: d.kind } }),
    );
    await ok(await api.post(`/api/netlists/${netlist.id}/revisions`, { data: { content: d.content(), filename: d.filename } }));
    netlistIds.set(name, netlist.id);
  }
  // Two sum bits, one of them undriven: a lint error.
  const { netlist } = await ok<{ netlist: { id: string } }>(
    await api.post(`/api/projects/${project.id}/netlists`, { data: { name: 'half-done', width: 2, kind: 'other' } }),
  );
  const halfDone = 'module add(a, b, s); input [1:0] a, b; output [1:0] s; assign s[0] = a[0] ^ b[0]; endmodule\n';
  await ok(await api.post(`/api/netlists/${netlist.id}/revisions`, { data: { content: halfDone, filename: 'add.v' } }));
  netlistIds.set('half-done', netlist.id);
  await api.storageState({ path: sessionFile });
  await api.dispose();
});

/** Counts the page's workers as they start and end. */
function watchWorkers(page: Page) {
  const seen = { started: 0, ended: 0 };
  page.on('worker', (w) => {
    seen.started++;
    w.on('close', () => seen.ended++);
  });
  return seen;
}

/** Opens the netlist's latest revision; returns the panel. */
async function openPanel(page: Page, name: string, { runnable = true } = {}): Promise<Locator> {
  await page.goto(`/netlists/${netlistIds.get(name)}`);
  const panel = page.getByRole('region', { name: 'Run in this browser' });
  await expect(panel.getByText("Simulated delays are estimates from the delay table; sign-off follows your team's own flow.")).toBeVisible();
  if (runnable) await expect(panel.getByRole('button', { name: 'Start' })).toBeEnabled();
  return panel;
}

const hexCell = async (table: Locator, column: number) => {
  const text = (await table.locator('tbody td').nth(column).innerText()).trim();
  expect(text).toMatch(/^0x[0-9a-f]+$/);
  return BigInt(text);
};

test('every vector of the faulty 8-bit adder: not equivalent, with the first counterexample', async ({ page }) => {
  const panel = await openPanel(page, 'tick-skip-8-fault');
  await expect(panel.getByLabel('Mode')).toHaveValue('exhaustive');
  await panel.getByRole('button', { name: 'Start' }).click();
  await expect(panel.getByRole('status').filter({ hasText: 'Not equivalent' })).toBeVisible();

  const table = panel.getByRole('table', { name: 'counterexample' });
  const [a, b, cin, expected, actual] = await Promise.all([0, 1, 2, 3, 4].map((k) => hexCell(table, k)));
  const width = 8n;
  // The reference is plain addition, carry-out as bit n; the netlist disagrees with it.
  expect(expected).toBe((a + b + cin) & ((1n << (width + 1n)) - 1n));
  expect(actual).not.toBe(expected);
  const differing = [...Array(9).keys()].filter((i) => ((expected ^ actual) >> BigInt(i)) & 1n);
  const shown = differing.map((i) => (i === 8 ? '8 (carry-out)' : String(i))).join(', ');
  await expect(panel.getByText(`Differing sum bits: ${shown}`)).toBeVisible();
  await expect(panel.getByRole('table', { name: 'sum bits' }).getByText('cout')).toBeVisible();

  // The first mismatch in vector order (index = cin + 2·A + 2^9·B), as one thread finds it here.
  const one = verifyExhaustive(prepareAdder(parseDesign(demo('tick-skip-8-fault').content(), 'tick.v')).adder!);
  expect([a, b, cin]).toEqual([one.counterexample!.a, one.counterexample!.b, one.counterexample!.cin]);
  const index = cin + 2n * a + (b << 9n);
  await expect(panel.getByText(`vector ${(index + 1n).toLocaleString('en-US')} in order`)).toBeVisible();
});

test('every vector of a 16-bit adder, shared out over the workers: equivalent', async ({ page }) => {
  const workers = watchWorkers(page);
  const panel = await openPanel(page, 'acc-skip-16');
  await expect(panel.getByLabel('Mode')).toHaveValue('exhaustive');
  await panel.getByRole('button', { name: 'Start' }).click();
  // 2^33 vectors is past the size where the space is cut into one shard per worker; their counts add up to the whole.
  await expect(panel.getByRole('status').filter({ hasText: 'Equivalent' })).toContainText(`all ${(2 ** 33).toLocaleString('en-US')} vectors tried`, {
    timeout: 45_000,
  });
  const cores = await page.evaluate(() => navigator.hardwareConcurrency);
  expect(workers.started).toBe(Math.min(cores, 4));
});

test('a SAT proof (the solver loads in the worker on first use) finds the planted fault', async ({ page }) => {
  const panel = await openPanel(page, 'tick-skip-8-fault');
  await panel.getByLabel('Mode').selectOption('proof');
  await panel.getByLabel('Method').selectOption('sat');
  await panel.getByRole('button', { name: 'Start' }).click();
  await expect(panel.getByRole('status').filter({ hasText: 'Not equivalent' })).toBeVisible();
  await expect(panel.getByText(/found by a SAT solver/)).toBeVisible();
  const table = panel.getByRole('table', { name: 'counterexample' });
  const [a, b, cin, expected, actual] = await Promise.all([0, 1, 2, 3, 4].map((k) => hexCell(table, k)));
  // BigInt addition on 9 bits is the reference; the solver's vector must really differ from it.
  expect(expected).toBe((a + b + cin) & 0x1ffn);
  expect(actual).not.toBe(expected);
});

test('a proof of the 32-bit carry-skip adder: equivalent', async ({ page }) => {
  const panel = await openPanel(page, 'mac-skip-32-var');
  // 2^65 vectors: trying every one is offered but disabled, with the count shown.
  const mode = panel.getByLabel('Mode');
  await expect(mode).toHaveValue('proof');
  await expect(mode.locator('option[value="exhaustive"]')).toBeDisabled();
  await expect(mode.locator('option[value="exhaustive"]')).toContainText('2^65 vectors');
  await panel.getByRole('button', { name: 'Start' }).click();
  await expect(panel.getByRole('status').filter({ hasText: 'Equivalent' })).toContainText('proved by');
  await expect(panel.getByRole('status').filter({ hasText: 'Not equivalent' })).toHaveCount(0);
});

test('a long random run can be cancelled, and the next run starts afresh', async ({ page }) => {
  const workers = watchWorkers(page);
  const panel = await openPanel(page, 'mac-skip-32-var');
  await panel.getByLabel('Mode').selectOption('random');
  await panel.getByRole('textbox', { name: 'Vectors to try' }).fill('1000000000000');
  await panel.getByLabel('Seed').fill('5');
  await panel.getByRole('button', { name: 'Start' }).click();
  await expect(panel.getByRole('button', { name: 'Start' })).toBeDisabled();
  // Wait for real progress before cancelling.
  await expect(panel.getByText(/^[1-9][\d,]* \/ 1,000,000,000,000 vectors · /)).toBeVisible();
  await panel.getByRole('button', { name: 'Cancel' }).click();
  await expect(panel.getByRole('status').filter({ hasText: 'Cancelled after' })).toContainText('of 1,000,000,000,000 vectors');
  await expect(panel.getByRole('button', { name: 'Cancel' })).toBeDisabled();
  // A real stop: the worker running the vectors is gone.
  expect(workers.started).toBe(1);
  await expect.poll(() => workers.ended).toBe(1);

  // The cancel ended the workers; the pool makes new ones for the next run.
  await panel.getByLabel('Mode').selectOption('proof');
  await panel.getByRole('button', { name: 'Start' }).click();
  await expect(panel.getByRole('status').filter({ hasText: 'Equivalent' })).toBeVisible();
});

test('a slowest-vector search: the worst settle time is at most the topological delay', async ({ page }) => {
  const panel = await openPanel(page, 'acc-skip-16');
  await panel.getByLabel('Check').selectOption('slowest-vector');
  await panel.getByLabel('Vector pairs to time').fill('4000');
  await panel.getByRole('button', { name: 'Start' }).click();
  const valueOf = async (term: string) => {
    const text = await panel.locator(`dt:text-is("${term}") + dd`).innerText();
    expect(text).toMatch(/^\d+ ps$/);
    return Number.parseInt(text, 10);
  };
  await expect(panel.locator('dt:text-is("worst settle time")')).toBeVisible();
  const worst = await valueOf('worst settle time');
  const topological = await valueOf('topological delay');
  expect(worst).toBeGreaterThan(0);
  expect(worst).toBeLessThanOrEqual(topological);
  await expect(panel.locator('dt:text-is("pairs timed") + dd')).toContainText('4,000');
  // The sensitized path ends at the worst settle time.
  const path = panel.getByRole('table', { name: 'sensitized path' });
  await expect(path.locator('tbody tr').last().locator('td').last()).toHaveText(`${worst} ps`);
  await expect(panel.getByRole('table', { name: 'slowest vector pair' }).locator('tbody tr')).toHaveCount(2);
});

test('a revision with lint errors cannot be run, and the panel says why', async ({ page }) => {
  const workers = watchWorkers(page);
  const panel = await openPanel(page, 'half-done', { runnable: false });
  await expect(panel.getByRole('alert')).toContainText('Runs need a netlist that lints clean, and this revision has 1 lint error');
  await expect(panel.getByRole('button', { name: 'Start' })).toHaveCount(0);
  expect(workers.started).toBe(0);
});
