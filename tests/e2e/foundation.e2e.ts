/**
 * Foundation, end to end in Chromium: person A signs up, creates a bench and invites person B by e-mail;
 * B follows the link from the captured e-mail in a separate browser context, creates an account with the
 * invited address, accepts and sees the bench. Also checks that the page is cross-origin isolated.
 */
import assert from 'node:assert/strict';
import { after, before, test } from 'node:test';
import type { Page } from 'playwright-core';
import { launchBrowser, screenshot, type TestBrowser } from './support/browser';
import { startTestServer, type TestServer } from './support/test-server';

let server: TestServer;
let browser: TestBrowser;

before(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
});

after(async () => {
  await browser?.close();
  await server?.stop();
});

async function signUp(page: Page, name: string, password: string, email?: string): Promise<void> {
  await page.getByLabel('Your name').fill(name);
  if (email !== undefined) await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByLabel('Password again').fill(password);
  await page.getByRole('button', { name: 'Create account' }).click();
}

test('a bench owner invites a newcomer by e-mail and the newcomer joins the bench', async () => {
  const benchName = 'Place-name lab';
  const emailA = 'ada.owner@example.org';
  const emailB = 'ben.newcomer@example.org';

  // Person A: create an account.
  const a = await browser.newPerson(server.url);
  await a.page.goto('/sign-up');
  await a.page.getByRole('heading', { name: 'Create an account' }).waitFor();
  // Inline validation: a short password is refused before anything is sent.
  await a.page.getByLabel('Password', { exact: true }).fill('short');
  await a.page.getByLabel('Password', { exact: true }).blur();
  await a.page.getByText('Use at least 8 characters.').waitFor();
  await screenshot(a.page, 'foundation-01-sign-up');
  await signUp(a.page, 'Ada Owner', 'correct-horse-1', emailA);
  await a.page.waitForURL('**/benches');
  await a.page.getByTestId('no-benches').waitFor();

  // COOP + COEP from the server make the page cross-origin isolated (needed for threaded WASM later).
  assert.equal(await a.page.evaluate(() => globalThis.crossOriginIsolated), true);

  // Create a bench through the dialog.
  await a.page.getByRole('button', { name: 'New bench' }).click();
  const dialog = a.page.getByRole('dialog');
  await dialog.getByLabel('Name').fill(benchName);
  await dialog.getByLabel('Description (optional)').fill('Invented place names for a state-size study.');
  await screenshot(a.page, 'foundation-02-create-bench');
  await dialog.getByRole('button', { name: 'Create bench' }).click();
  await a.page.waitForURL(/\/benches\/[0-9a-f-]{36}$/);
  const benchUrl = new URL(a.page.url()).pathname;
  await a.page.getByTestId('bench-name').filter({ hasText: benchName }).waitFor();
  await screenshot(a.page, 'foundation-03-bench-overview');

  // Invite B as a member.
  await a.page.getByRole('tab', { name: 'Invitations' }).click();
  const invitePanel = a.page.getByRole('tabpanel');
  await invitePanel.getByLabel('E-mail').fill(emailB);
  await invitePanel.getByRole('button', { name: 'Send invitation' }).click();
  await invitePanel.getByRole('cell', { name: emailB }).waitFor();
  await screenshot(a.page, 'foundation-04-invitation-sent');

  // The invitation e-mail, as captured by the local SMTP stand-in.
  assert.ok(server.server.mailbox, 'the mail stand-in should be running');
  const mail = await server.server.mailbox.waitFor((m) => m.to.includes(emailB), 10_000);
  assert.match(mail.text, new RegExp(benchName));
  const link = /https?:\/\/\S+\/invite\/[^\s]+/.exec(mail.text)?.[0];
  assert.ok(link, `the invitation e-mail should contain a link, got:\n${mail.text}`);
  const invitePath = new URL(link).pathname;

  // The first account is the instance admin; in development the admin page lists the captured mail
  // with clickable links, so a newcomer's invitation can be followed without a real mail server.
  await a.page.getByRole('link', { name: 'Admin' }).click();
  await a.page.waitForURL('**/admin');
  const mailPanel = a.page.locator('mat-expansion-panel').filter({ hasText: emailB }).first();
  await mailPanel.getByTestId('mail-text').waitFor();
  const shownHref = await mailPanel.getByRole('link', { name: link }).getAttribute('href');
  assert.equal(shownHref, link, 'the admin mail page shows the same invitation link as the mailbox');
  await screenshot(a.page, 'foundation-05a-admin-captured-mail');
  await a.page.goBack();
  await a.page.waitForURL(`**${benchUrl}`);

  // Person B, in a separate browser context, follows the link.
  const b = await browser.newPerson(server.url);
  await b.page.goto(invitePath);
  const summary = b.page.getByTestId('invitation-summary');
  await summary.waitFor();
  assert.match(await summary.innerText(), new RegExp(`${benchName}.*Member`, 's'));
  await screenshot(b.page, 'foundation-05-invitation-page');
  await b.page.getByRole('link', { name: 'Create account to accept' }).click();
  await b.page.waitForURL('**/sign-up?**');
  // The invited address is filled in.
  assert.equal(await b.page.getByLabel('E-mail').inputValue(), emailB);
  await signUp(b.page, 'Ben Newcomer', 'battery-staple-2');
  await b.page.waitForURL(`**${invitePath}`);
  await b.page.getByRole('button', { name: `Join ${benchName}` }).click();
  await b.page.waitForURL(`**${benchUrl}`);
  await b.page.getByTestId('bench-name').filter({ hasText: benchName }).waitFor();
  await b.page.getByText('Your role here: Member').waitFor();
  // A member sees no invitation or activity tabs.
  assert.equal(await b.page.getByRole('tab', { name: 'Invitations' }).count(), 0);
  await screenshot(b.page, 'foundation-06-newcomer-on-bench');

  // Back to A: B is on the members list and the activity log has entries.
  await a.page.goto(benchUrl);
  await a.page.getByRole('tab', { name: 'Members' }).click();
  await a.page.getByRole('tabpanel').getByRole('cell', { name: emailB }).waitFor();
  await screenshot(a.page, 'foundation-07-members');
  await a.page.getByRole('tab', { name: 'Activity' }).click();
  await a.page.getByRole('tabpanel').getByRole('row').nth(1).waitFor();
  await screenshot(a.page, 'foundation-08-activity');

  // The bench-scoped areas open under the bench's address, with the bench kept in the switcher.
  await a.page.getByRole('navigation').getByRole('link', { name: 'Corpora' }).click();
  await a.page.waitForURL(`**${benchUrl}/corpora`);
  assert.match(await a.page.getByRole('button', { name: 'Switch bench' }).innerText(), new RegExp(benchName));
  await a.page.getByRole('navigation').getByRole('link', { name: 'Compare' }).click();
  await a.page.waitForURL(`**${benchUrl}/compare`);
  await a.page.getByRole('heading', { name: 'Compare' }).waitFor();
  await screenshot(a.page, 'foundation-09-compare-area');

  assert.deepEqual(a.problems, [], 'person A saw no page errors');
  assert.deepEqual(b.problems, [], 'person B saw no page errors');
});
