import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startHarness, type Harness } from './harness.ts';

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(() => h?.stop());

describe('invitation journey', () => {
  it('when an admin invites through the page, then the invitee opens the link from the outbox, sets a password and lands on their home', async () => {
    const admin = await h.newPage();
    await h.signIn(admin.page, 'admin');
    await admin.page.waitForURL((u) => u.pathname === '/admin');
    await admin.page.locator('#invite-name').fill('Odile Farrant');
    await admin.page.locator('#invite-email').fill('odile@harrowvale.test');
    // Field surveyor is ticked by default; the invitee lands on the field home.
    expect(await admin.page.getByRole('checkbox', { name: 'Field surveyor' }).first().isChecked()).toBe(true);
    await admin.page.getByRole('button', { name: 'Send invitation' }).click();
    await admin.page.getByText('Invitation sent to odile@harrowvale.test.').waitFor();
    await admin.page.getByRole('heading', { name: 'Waiting for a password' }).waitFor();
    await admin.page.getByText('odile@harrowvale.test').first().waitFor();

    await admin.page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Outbox' }).click();
    await admin.page.waitForURL((u) => u.pathname === '/admin/outbox');
    // The newest message leads with what it is for and the link to act on.
    const letter = admin.page.getByRole('article', { name: /Your Roostline account is ready/ }).first();
    await letter.getByText('Invitation', { exact: true }).waitFor();
    const link = letter.getByRole('link', { name: 'Open the invitation link' });
    const href = await link.getAttribute('href');
    expect(href).toMatch(new RegExp(`^${h.baseUrl}/accept-invitation\\?token=`));
    await letter.getByRole('button', { name: 'Read the message' }).click();
    await letter.getByText(/Odile Farrant/).first().waitFor();
    // The formatted version is shown in a frame without permissions.
    await letter.getByRole('button', { name: 'Show it as the recipient sees it' }).click();
    expect(await letter.locator('iframe').getAttribute('sandbox')).toBe('');

    const invitee = await h.newPage();
    await invitee.page.goto(href!);
    await invitee.page.getByRole('heading', { name: 'Welcome, Odile Farrant' }).waitFor();
    await invitee.page.getByLabel('New password').fill('short');
    await invitee.page.getByLabel('Repeat the password').fill('short');
    await invitee.page.getByRole('button', { name: 'Set password and sign in' }).click();
    await invitee.page.getByText('Use at least 10 characters').waitFor();
    await invitee.page.getByLabel('New password').fill('otters-under-the-weir');
    await invitee.page.getByLabel('Repeat the password').fill('otters-under-the-weir');
    await invitee.page.getByRole('button', { name: 'Set password and sign in' }).click();
    await invitee.page.waitForURL((u) => u.pathname === '/field');
    await invitee.page.getByRole('heading', { level: 1, name: 'Field queue' }).waitFor();
    expect(await invitee.page.getByTestId('who').innerText()).toContain('Odile Farrant');

    // The link is spent: opening it again says so.
    const again = await h.newPage();
    await again.page.goto(href!);
    await again.page.getByRole('heading', { name: 'This link does not work' }).waitFor();

    // The admin sees the new account in the people table.
    await admin.page.goto('/admin');
    await admin.page.getByLabel('Search').fill('odile');
    await admin.page.getByRole('cell', { name: /^Odile Farrant/ }).waitFor();
    await expect.poll(() => admin.page.getByRole('button', { name: /^Deactivate / }).count(), { timeout: 5000 }).toBe(1);
    for (const p of [admin, invitee, again]) await p.context.close();
  });

  it('when a user forgets the password, then the sign-in page leads to a reset link by e-mail and the new password signs in', async () => {
    const user = await h.newPage();
    await user.page.goto('/sign-in');
    await user.page.getByRole('link', { name: 'Forgot password?' }).click();
    await user.page.waitForURL((u) => u.pathname === '/forgot-password');
    await user.page.getByLabel('E-mail').fill('planner@roostline.test');
    await user.page.getByRole('button', { name: 'Send the link' }).click();
    await user.page.getByText('If an account uses that e-mail').waitFor();

    const admin = await h.newPage();
    await h.signIn(admin.page, 'admin');
    await admin.page.waitForURL((u) => u.pathname === '/admin');
    await admin.page.goto('/admin/outbox');
    const message = admin.page.getByRole('article', { name: /Reset your Roostline password/ }).filter({ hasText: 'planner@roostline.test' }).first();
    await message.waitFor({ timeout: 15_000 });
    const href = await message.getByRole('link', { name: 'Open the reset link' }).getAttribute('href');
    expect(href).toBeTruthy();

    await user.page.goto(href!);
    await user.page.getByLabel('New password').fill('kingfisher-at-the-ford');
    await user.page.getByLabel('Repeat the password').fill('kingfisher-at-the-fjord');
    await user.page.getByRole('button', { name: 'Change password' }).click();
    await user.page.getByText('The two passwords differ').waitFor();
    await user.page.getByLabel('Repeat the password').fill('kingfisher-at-the-ford');
    await user.page.getByRole('button', { name: 'Change password' }).click();
    await user.page.getByText('Your password is changed').waitFor();
    await h.signIn(user.page, 'planner', 'kingfisher-at-the-ford');
    await user.page.waitForURL((u) => u.pathname === '/planning');
    for (const p of [admin, user]) await p.context.close();
  });
});
