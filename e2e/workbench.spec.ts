/**
 * The path a new team takes: sign up, sign in, create a project, invite a
 * member and find the e-mail in the outbox, upload a .v file as a revision,
 * sign out; then the invitee accepts the invitation.
 */
import { expect, test } from './fixtures';

const VERILOG = `// 2-bit ripple-carry adder
module add2 (input [1:0] a, input [1:0] b, input cin, output [1:0] s, output cout);
  wire c1;
  assign s[0] = a[0] ^ b[0] ^ cin;
  assign c1 = (a[0] & b[0]) | (cin & (a[0] ^ b[0]));
  assign s[1] = a[1] ^ b[1] ^ c1;
  assign cout = (a[1] & b[1]) | (c1 & (a[1] ^ b[1]));
endmodule
`;

test('a new owner sets up a project end to end', async ({ page }) => {
  const email = `owner-${Date.now()}@example.test`;
  const password = 'e2e-password-1';

  // Sign up (which signs in), then sign out and in again.
  await page.goto('/');
  await expect(page).toHaveURL(/\/sign-in/);
  await page.getByRole('link', { name: 'Create an account' }).click();
  await page.getByLabel('Name').fill('Ellis Owner');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByLabel('Password again').fill(password);
  await page.getByRole('button', { name: 'Create account' }).click();
  await expect(page.getByRole('heading', { name: 'Projects', exact: true })).toBeVisible();
  await page.getByRole('button', { name: 'Sign out' }).click();
  await expect(page).toHaveURL(/\/sign-in/);

  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByRole('heading', { name: 'Projects', exact: true })).toBeVisible();
  await expect(page.getByText('No projects yet')).toBeVisible();

  // Create a project.
  await page.getByRole('button', { name: '+ New project' }).click();
  await page.getByLabel('Project name').fill('Kestrel counter');
  await page.getByLabel('Description (optional)').fill('E2E test project');
  await page.getByRole('button', { name: 'Create project' }).click();
  await expect(page.getByRole('heading', { name: 'Kestrel counter' })).toBeVisible();

  // Invite a member; the invitation arrives in the outbox.
  const invitee = `designer-${Date.now()}@example.test`;
  const invite = page.getByRole('form', { name: 'Invite a member' });
  await invite.getByLabel('Invite by e-mail').fill(invitee);
  await invite.getByLabel('Role').selectOption('designer');
  await invite.getByRole('button', { name: 'Invite' }).click();
  await expect(page.getByText(`Invitation sent to ${invitee}.`)).toBeVisible();
  await expect(page.getByText('Pending invitations')).toBeVisible();
  const projectUrl = page.url();

  await page.getByRole('link', { name: 'Outbox' }).click();
  const mail = page.getByRole('button', { name: new RegExp(`${invitee}.*invites you to "Kestrel counter"`) });
  await expect(mail).toBeVisible();
  const inviteLink = page.getByRole('link', { name: /\/invite\// }).first();
  await expect(inviteLink).toBeVisible();
  const invitePath = new URL((await inviteLink.getAttribute('href'))!).pathname;

  // Create a netlist and upload a small .v file as its first revision.
  await page.goto(projectUrl);
  await page.getByRole('button', { name: '+ New netlist' }).click();
  await page.getByLabel('Name').fill('add2');
  await page.getByLabel('Width (bits)').fill('2');
  await page.getByLabel('Architecture').selectOption('ripple-carry');
  await page.getByRole('button', { name: 'Create netlist' }).click();
  await page.getByRole('link', { name: 'add2' }).click();
  await expect(page.getByRole('heading', { name: 'add2' })).toBeVisible();
  await page.getByLabel(/Netlist file/).setInputFiles({ name: 'add2.v', mimeType: 'text/plain', buffer: Buffer.from(VERILOG) });
  await page.getByLabel('What changed (optional)').fill('first cut');
  await page.getByRole('button', { name: 'Add revision' }).click();
  const revisions = page.getByRole('table', { name: 'revisions' });
  await expect(revisions.getByRole('button', { name: 'r1' })).toBeVisible();
  await expect(revisions.getByText('add2.v')).toBeVisible();
  // The engine read the upload: a lint-clean 2-bit adder, and the text itself below.
  await expect(page.getByText('✓ lint clean')).toBeVisible();
  await expect(page.getByText('2-bit adder')).toBeVisible();
  await expect(page.locator('pre').getByText('module add2')).toBeVisible();

  // The project table shows it as the latest revision.
  await page.goto(projectUrl);
  await expect(page.getByRole('table', { name: 'netlists' }).getByText('r1')).toBeVisible();

  // Sign out.
  await page.getByRole('button', { name: 'Sign out' }).click();
  await expect(page).toHaveURL(/\/sign-in/);
  await page.goto(projectUrl);
  await expect(page).toHaveURL(/\/sign-in\?next=/);

  // The invitee follows the link, creates an account with the invited address and joins as designer.
  await page.goto(invitePath);
  await expect(page).toHaveURL(/\/sign-in\?next=%2Finvite%2F/);
  await page.getByRole('link', { name: 'Create an account' }).click();
  await page.getByLabel('Name').fill('Dana Designer');
  await page.getByLabel('E-mail').fill(invitee);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByLabel('Password again').fill(password);
  await page.getByRole('button', { name: 'Create account' }).click();
  await expect(page.getByText('invites')).toContainText('Kestrel counter');
  await page.getByRole('button', { name: 'Accept and open the project' }).click();
  await expect(page.getByRole('heading', { name: 'Kestrel counter' })).toBeVisible();
  await expect(page.getByText('your role')).toContainText('designer');
  await expect(page.getByRole('table', { name: 'netlists' }).getByText('add2')).toBeVisible();
  await page.getByRole('button', { name: 'Sign out' }).click();
  await expect(page).toHaveURL(/\/sign-in/);
});

test('the theme toggle switches and is remembered', async ({ page }) => {
  await page.goto('/sign-in');
  const before = await page.locator('html').getAttribute('data-theme');
  await page.getByRole('button', { name: /Switch between light and dark/ }).click();
  const after = await page.locator('html').getAttribute('data-theme');
  expect(after).not.toBe(before);
  await page.reload();
  await expect(page.locator('html')).toHaveAttribute('data-theme', after!);
});

test('favicon is served', async ({ request }) => {
  expect((await request.get('/favicon.ico')).status()).toBe(200);
  expect((await request.get('/favicon.svg')).status()).toBe(200);
});
