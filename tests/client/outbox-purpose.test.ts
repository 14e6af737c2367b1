import { describe, expect, it } from 'vitest';
import { mailPurpose } from '../../src/features/admin/outbox-page.tsx';

describe('outbox: what a sent message is for', () => {
  it('when a message carries an invitation link, then it is an invitation with that link to open', () => {
    const p = mailPurpose('Hello,\n\nOpen this link:\n\nhttp://localhost:5173/accept-invitation?token=abc123\n\n— Roostline');
    expect(p).toEqual({ label: 'Invitation', action: 'Open the invitation link', href: 'http://localhost:5173/accept-invitation?token=abc123' });
  });
  it('when a message carries a reset link, then it is a password reset', () => {
    expect(mailPurpose('Reset here: https://roost.example/reset-password?token=x9').label).toBe('Password reset');
  });
  it('when a message has no one-time link (or it was taken out), then it is a notice with nothing to open', () => {
    expect(mailPurpose('Your span was approved. [link removed]')).toEqual({ label: 'Notice', action: null, href: null });
  });
});
