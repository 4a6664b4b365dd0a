import type { OutgoingMail } from './mailer.js';

/** The invitation e-mail: a single-use link that lets the person set a password. */
export function invitationMail(to: string, displayName: string, link: string, invitedBy: string): OutgoingMail {
  return {
    to,
    subject: 'You are invited to Holdline',
    text: [
      `Hello ${displayName},`,
      '',
      `${invitedBy} has added you to Holdline, the live board your crane assembly crew uses.`,
      'Open this link to choose your password and sign in. It works once, for 72 hours:',
      '',
      link,
      '',
      'If you did not expect this, you can ignore this e-mail.',
    ].join('\n'),
  };
}

/** The password reset e-mail: a single-use link valid for one hour. */
export function resetMail(to: string, displayName: string, link: string): OutgoingMail {
  return {
    to,
    subject: 'Reset your Holdline password',
    text: [
      `Hello ${displayName},`,
      '',
      'Someone asked to reset the password of your Holdline account.',
      'Open this link to choose a new password. It works once, for 1 hour:',
      '',
      link,
      '',
      'If it was not you, ignore this e-mail: your password stays as it is.',
    ].join('\n'),
  };
}
