/**
 * Account basics in Chromium on a development server with the demo seed: the sign-in page offers the demo
 * account, a signed-out visitor is sent to sign-in and back, the password can be changed (a wrong current
 * password is reported on its field), sign-out ends the session, and a forgotten password is reset through
 * the link in the captured e-mail (once only). A person deletes their own account: the form asks for the
 * password and the typed e-mail address, and afterwards the address no longer signs in.
 */
import assert from 'node:assert/strict';
import { after, before, test } from 'node:test';
import { launchBrowser, screenshot, type TestBrowser } from './support/browser';
import { startTestServer, type TestServer } from './support/test-server';
import { signUpThroughUi } from './support/workbench';

let server: TestServer;
let browser: TestBrowser;

before(async () => {
  server = await startTestServer({ SEED_DEMO: 'true' });
  browser = await launchBrowser();
});

after(async () => {
  await browser?.close();
  await server?.stop();
});

test('demo sign-in, return to the asked page, password change, sign-out and password reset by e-mail', async () => {
  const { page, problems } = await browser.newPerson(server.url);
  const demo = { email: server.server.config.demoEmail, password: server.server.config.demoPassword };

  // A signed-out visitor asking for /account lands on sign-in, which shows the demo account.
  await page.goto('/account');
  await page.waitForURL('**/sign-in?returnUrl=%2Faccount');
  await page.getByTestId('demo-sign-in').filter({ hasText: demo.email }).waitFor();
  await screenshot(page, 'account-01-sign-in-with-demo');

  // A wrong password gets one sentence that says what to do; nothing about whether the account exists.
  await page.getByLabel('E-mail').fill(demo.email);
  await page.getByLabel('Password').fill('not-the-password');
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.getByRole('alert').filter({ hasText: 'E-mail or password is wrong' }).waitFor();

  await page.getByRole('button', { name: 'Fill in the demo account' }).click();
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.waitForURL('**/account');
  await page.getByText(demo.email).first().waitFor();

  // Wrong current password: reported on that field, nothing changes.
  const newPassword = 'a-brand-new-passphrase';
  await page.getByLabel('Current password').fill('wrong-current-one');
  await page.getByLabel('New password', { exact: true }).fill(newPassword);
  await page.getByLabel('New password again').fill(newPassword);
  await page.getByRole('button', { name: 'Change password' }).click();
  await page.getByText('The current password is wrong: type it again.', { exact: true }).waitFor();
  await screenshot(page, 'account-02-wrong-current-password');

  await page.getByLabel('Current password').fill(demo.password);
  await page.getByRole('button', { name: 'Change password' }).click();
  await page.getByText('Password changed.').waitFor();
  // The session continues with the new token.
  await page.reload();
  await page.getByRole('heading', { name: 'Account', exact: true }).waitFor();
  assert.equal(page.url(), `${server.url}/account`);

  // The benches page lists the demo bench.
  await page.getByRole('navigation').getByRole('link', { name: 'Benches' }).click();
  await page.getByRole('table', { name: 'Your benches' }).getByRole('row').nth(1).waitFor();
  await screenshot(page, 'account-03-benches');

  // On a phone-sized screen the navigation hides behind a menu button.
  await page.setViewportSize({ width: 390, height: 820 });
  await page.getByRole('button', { name: 'Show or hide navigation' }).click();
  await page.getByRole('navigation').getByRole('link', { name: 'Account' }).waitFor();
  await page.waitForTimeout(500); // let the slide-in finish so the screenshot shows the final layout
  await screenshot(page, 'account-04-narrow-navigation');
  await page.getByRole('navigation').getByRole('link', { name: 'Benches' }).click();
  await page.setViewportSize({ width: 1280, height: 860 });

  // Sign out from the user menu; the old password no longer works, the new one does.
  await page.getByRole('button', { name: 'Account menu of Demo Admin' }).click();
  await page.getByRole('menuitem', { name: 'Sign out' }).click();
  await page.waitForURL('**/sign-in');
  assert.equal(await page.evaluate(() => localStorage.getItem('noisewright.token')), null);
  await page.getByLabel('E-mail').fill(demo.email);
  await page.getByLabel('Password').fill(demo.password);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.getByRole('alert').filter({ hasText: 'E-mail or password is wrong' }).waitFor();
  await page.getByLabel('Password').fill(newPassword);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.waitForURL('**/benches');

  // Forgotten password: ask for a link, follow it from the captured mail, choose a new password.
  await page.getByRole('button', { name: 'Account menu of Demo Admin' }).click();
  await page.getByRole('menuitem', { name: 'Sign out' }).click();
  await page.getByRole('link', { name: 'Forgot your password?' }).click();
  // Wait for the new page: the sign-in page's own E-mail field is still there while the route changes.
  await page.getByRole('heading', { name: 'Forgot your password?' }).waitFor();
  await page.getByLabel('E-mail').fill(demo.email);
  await page.getByRole('button', { name: 'Send the link' }).click();
  await page.getByRole('status').filter({ hasText: demo.email }).waitFor();
  assert.ok(server.server.mailbox, 'the mail stand-in should be running');
  const mail = await server.server.mailbox.waitFor((m) => m.to.includes(demo.email) && m.text.includes('/reset-password/'));
  const link = /https?:\/\/\S+\/reset-password\/\S+/.exec(mail.text)?.[0];
  assert.ok(link, `the reset e-mail should contain a link, got:\n${mail.text}`);
  await page.goto(new URL(link).pathname);
  const thirdPassword = 'third-time-lucky-pass';
  await page.getByLabel('New password', { exact: true }).fill(thirdPassword);
  await page.getByLabel('New password again').fill(thirdPassword);
  await screenshot(page, 'account-05-reset-password');
  await page.getByRole('button', { name: 'Save the new password' }).click();
  await page.waitForURL('**/sign-in');
  await page.getByLabel('E-mail').fill(demo.email);
  await page.getByLabel('Password').fill(thirdPassword);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.waitForURL('**/benches');

  // The link works once.
  await page.goto(new URL(link).pathname);
  await page.getByLabel('New password', { exact: true }).fill('yet-another-password');
  await page.getByLabel('New password again').fill('yet-another-password');
  await page.getByRole('button', { name: 'Save the new password' }).click();
  await page.getByRole('alert').filter({ hasText: 'Ask for a new link' }).waitFor();

  assert.deepEqual(problems, [], 'the page threw no errors');
});

test('a person deletes their own account and can no longer sign in', async () => {
  const { page, problems } = await browser.newPerson(server.url);
  const email = 'leaving@example.org';
  await signUpThroughUi(page, 'Lee Leaving', email);
  await page.goto('/account');
  const section = page.getByTestId('delete-account');
  await section.getByRole('heading', { name: 'Delete account' }).waitFor();
  const button = section.getByRole('button', { name: 'Delete my account' });
  // A wrong password is refused on its field; nothing is deleted.
  await section.getByLabel('Your password').fill('not-my-password');
  await section.getByLabel('Your e-mail address, to confirm').fill(email);
  await button.click();
  await section.getByText(/password/i).filter({ hasText: /wrong|does not match|not right/i }).first().waitFor();
  await screenshot(page, 'account-06-delete-wrong-password');
  await section.getByLabel('Your password').fill('long-enough-1');
  await button.click();
  await page.waitForURL('**/sign-in');
  assert.equal(await page.evaluate(() => localStorage.getItem('noisewright.token')), null);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill('long-enough-1');
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.getByRole('alert').filter({ hasText: 'E-mail or password is wrong' }).waitFor();
  assert.deepEqual(problems, [], 'the page threw no errors');
});
