// Screenshots of the main screens in both themes, for looking at the design:
//   node scripts/screenshots.mjs http://127.0.0.1:4321 /tmp/shots
import { chromium } from '@playwright/test';
import fs from 'node:fs';

const base = process.argv[2] ?? 'http://127.0.0.1:4321';
const out = process.argv[3] ?? '/tmp/skiplane-shots';
fs.mkdirSync(out, { recursive: true });
const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: ['--headless', '--no-sandbox', '--disable-gpu'] });
for (const theme of ['light', 'dark']) {
  const page = await browser.newPage({ viewport: { width: 1360, height: 860 } });
  page.on('console', (m) => m.type() === 'error' && console.log('console error:', m.text()));
  await page.addInitScript((t) => localStorage.setItem('skiplane-theme', t), theme);
  for (const [name, path] of [['forgot', '/forgot-password'], ['reset-bad', '/reset-password?error=INVALID_TOKEN'], ['verified', '/verify-email'], ['sign-up', '/sign-up']]) {
    await page.goto(base + path);
    await page.screenshot({ path: `${out}/${theme}-${name}.png` });
  }
  await page.goto(base + '/sign-in');
  await page.screenshot({ path: `${out}/${theme}-sign-in.png` });
  await page.getByLabel('E-mail').fill('owner@heronbay.test');
  await page.getByLabel('Password').fill('skiplane-demo');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL(base + '/');
  await page.getByRole('link', { name: /Heron Bay/ }).waitFor();
  await page.screenshot({ path: `${out}/${theme}-projects.png` });
  await page.getByRole('link', { name: /Heron Bay/ }).click();
  await page.getByRole('link', { name: 'acc-skip-16' }).waitFor();
  await page.waitForTimeout(300);
  await page.screenshot({ path: `${out}/${theme}-project.png`, fullPage: true });
  await page.getByRole('link', { name: 'acc-skip-16' }).click();
  await page.getByText('Runs of r1').waitFor();
  await page.waitForTimeout(300);
  await page.screenshot({ path: `${out}/${theme}-netlist.png` });
  await page.goto(base + '/settings');
  await page.screenshot({ path: `${out}/${theme}-settings.png` });
  await page.goto(base + '/dev/outbox');
  await page.waitForTimeout(500);
  await page.screenshot({ path: `${out}/${theme}-outbox.png` });
  await page.close();
}
await browser.close();
console.log('screenshots in', out);
