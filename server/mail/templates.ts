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

/** A time in an e-mail: UTC, to the minute, so a reader anywhere reads the same moment. */
export function utcWords(at: string): string {
  return `${at.slice(0, 10)} at ${at.slice(11, 16)} UTC`;
}

/** The one reminder a crew member gets when a hold has waited for them while they are not on the board. */
export function holdReminderMail(
  to: string,
  person: { displayName: string; roles: string[] },
  hold: { title: string; waitedMinutes: number },
  job: { name: string; site: string; craneFleetNumber: string },
  link: string,
): OutgoingMail {
  return {
    to,
    subject: `Hold point waiting for you: ${hold.title} (${job.name})`,
    text: [
      `Hello ${person.displayName},`,
      '',
      `The hold point “${hold.title}” on ${job.name} at ${job.site} (crane ${job.craneFleetNumber}) has waited ${hold.waitedMinutes} minutes for the ${person.roles.join(' and ')}, and you are not on the board.`,
      '',
      'Open the hold:',
      link,
      '',
      'Acknowledge it only for what you have checked yourself on site. If you cannot come, tell the supervisor so the crew can be changed.',
      'This is the only reminder for this wait of the hold.',
    ].join('\n'),
  };
}
