import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import {
  type BrowserSession,
  launchBrowser,
  newPage,
  screenshotDir,
  signInThroughForm,
} from '../support/browser';
import { demoEmails, demoPassword } from '../support/http';

let session: BrowserSession;

beforeAll(async () => {
  session = await launchBrowser();
});

afterAll(async () => {
  await session?.close();
});

describe('signed-out visitor', () => {
  it('is sent to sign-in and returned to the page they asked for', async () => {
    const { context, page } = await newPage(session.browser);
    await page.goto('/releases/rel-night-ferries');
    expect(new URL(page.url()).pathname).toBe('/sign-in');
    await expect
      .poll(() => page.getByRole('heading', { name: 'Sign in to Quayside' }).isVisible())
      .toBe(true);

    await page.getByLabel('E-mail').fill(demoEmails.engineer);
    await page.getByLabel('Password').fill(demoPassword);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL('**/releases/rel-night-ferries');
    await expect.poll(() => page.getByTestId('release-title').textContent()).toBe('Night Ferries');
    await context.close();
  });

  it('sees a plain message for a wrong password, and the password never reaches the URL', async () => {
    const { context, page } = await newPage(session.browser);
    await page.goto('/sign-in');
    await page.getByLabel('E-mail').fill(demoEmails.admin);
    await page.getByLabel('Password').fill('wrong-password');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await expect
      .poll(() => page.getByRole('alert').textContent())
      .toBe('That e-mail and password do not match an account.');
    expect(page.url()).not.toContain('password');
    await context.close();
  });
});

describe('each role sees what it may see', () => {
  const cases = [
    {
      role: 'admin',
      name: 'Ada Marlow',
      label: 'Admin',
      titles: ['Night Ferries', 'Signal Hill', 'Tideline'],
      members: true,
    },
    {
      role: 'engineer',
      name: 'Eli Stroud',
      label: 'Engineer',
      titles: ['Night Ferries', 'Signal Hill', 'Tideline'],
      members: false,
    },
    {
      role: 'coordinator',
      name: 'Nora Quist',
      label: 'Coordinator',
      titles: ['Night Ferries', 'Signal Hill', 'Tideline'],
      members: false,
    },
    {
      role: 'distributor',
      name: 'Dev Okafor',
      label: 'Distributor',
      titles: ['Signal Hill'],
      members: false,
    },
  ] as const;

  it.each(cases)('$role', async ({ role, name, label, titles, members }) => {
    const { context, page } = await newPage(session.browser);
    await signInThroughForm(page, demoEmails[role], demoPassword);
    await page.getByTestId('release-row').first().waitFor();

    expect(await page.getByTestId('who-name').textContent()).toBe(name);
    expect(await page.getByTestId('who-org').textContent()).toBe('Brackwater Sound');
    expect(await page.getByTestId('who-role').textContent()).toBe(label);
    const rows = await page
      .getByTestId('release-row')
      .locator('td:first-child a')
      .allTextContents();
    // Other tests add releases of their own; the demo releases are what this role must see.
    const demoTitles = ['Night Ferries', 'Signal Hill', 'Tideline'];
    expect(rows.filter((t) => demoTitles.includes(t)).sort()).toEqual([...titles]);
    expect(await page.getByRole('link', { name: 'Members' }).count()).toBe(members ? 1 : 0);
    await page.screenshot({ path: join(screenshotDir, `releases-${role}.png`), fullPage: true });

    // Open the first visible release and see its tracks.
    await page.getByRole('link', { name: titles[0] }).click();
    await page.getByTestId('track-row').first().waitFor();
    expect(await page.getByTestId('release-title').textContent()).toBe(titles[0]);
    await page.screenshot({ path: join(screenshotDir, `release-${role}.png`), fullPage: true });

    await page.getByRole('button', { name: 'Sign out' }).click();
    await page.waitForURL('**/sign-in');
    await context.close();
  });

  it('a distributor who types the address of an unshared release is told it is not available', async () => {
    const { context, page } = await newPage(session.browser);
    await signInThroughForm(page, demoEmails.distributor, demoPassword);
    await page.goto('/releases/rel-night-ferries');
    await expect
      .poll(() => page.getByRole('alert').locator('p').first().textContent())
      .toBe('This release is not available to you.');
    expect(await page.getByText('Harbour Lights').count()).toBe(0);
    await context.close();
  });
});

describe('joining by invitation, in the browser', () => {
  it('admin invites a coordinator, who opens the mailed link, sets a password and lands signed in', async () => {
    const email = 'new.coordinator@brackwater.test';
    const admin = await newPage(session.browser);
    await signInThroughForm(admin.page, demoEmails.admin, demoPassword);
    await admin.page.getByRole('link', { name: 'Members' }).click();
    await admin.page.getByLabel('E-mail').fill(email);
    await admin.page.getByLabel('Role').selectOption('coordinator');
    await admin.page.getByRole('button', { name: 'Send invitation' }).click();
    await admin.page.getByText('Invitation sent.').waitFor();
    await admin.page.getByTestId('invitation-list').getByText(email).waitFor();
    await admin.page.screenshot({ path: join(screenshotDir, 'members-admin.png'), fullPage: true });

    // The invited person reads the mail in the sent-mail view of the local mail fake.
    const visitor = await newPage(session.browser);
    await visitor.page.goto('/dev/mail');
    const mail = visitor.page.getByTestId('mail-item').filter({ hasText: email });
    await mail.first().waitFor();
    const link = mail.first().getByRole('link', { name: /\/invite\// });
    const href = await link.getAttribute('href');
    expect(href).toMatch(new RegExp(`^${inject('baseUrl')}/invite/`));
    await link.click();
    await visitor.page.getByText('You are invited to').waitFor();
    await visitor.page.getByLabel('Your name').fill('Rowan Tell');
    await visitor.page.getByLabel('Choose a password').fill('harbour-master-2027');
    await visitor.page.getByLabel('Repeat the password').fill('harbour-master-2027');
    await visitor.page.getByRole('button', { name: 'Join and sign in' }).click();
    await visitor.page.waitForURL('**/releases');
    expect(await visitor.page.getByTestId('who-name').textContent()).toBe('Rowan Tell');
    expect(await visitor.page.getByTestId('who-role').textContent()).toBe('Coordinator');

    await admin.page.reload();
    await admin.page.getByTestId('member-table').getByText(email).waitFor();
    await admin.context.close();
    await visitor.context.close();
  });
});
