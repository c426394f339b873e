import type { OutgoingMail } from './mail'

/** Escape text for the HTML part of a message. */
export function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!)
}

/** A password-reset link an administrator sent. */
export function resetMail(p: { to: string; name: string; actor: string; link: string }): OutgoingMail {
  const text = [
    `Hello ${p.name},`,
    '',
    `${p.actor} has sent you a link to choose a new Overtone password (it works once and expires in 7 days):`,
    '',
    p.link,
    '',
    'Your open sessions have been ended. If you did not ask for this, tell your administrator.',
  ].join('\n')
  const html = `<p>Hello ${escapeHtml(p.name)},</p>
<p>${escapeHtml(p.actor)} has sent you a link to choose a new Overtone password (it works once and expires in 7 days):<br>
<a href="${escapeHtml(p.link)}">Choose a new password</a> <code>${escapeHtml(p.link)}</code></p>
<p>Your open sessions have been ended. If you did not ask for this, tell your administrator.</p>`
  return { to: p.to, subject: 'Choose a new Overtone password', text, html }
}

export function inviteMail(p: { to: string; name: string; inviter: string; link: string }): OutgoingMail {
  const text = [
    `Hello ${p.name},`,
    '',
    `${p.inviter} has invited you to Overtone, the lab's record of wafers, chips, arrays and measurements.`,
    'Open this link to choose your password (it works once and expires in 7 days):',
    '',
    p.link,
    '',
    'If you did not expect this message you can ignore it.',
  ].join('\n')
  const html = `<p>Hello ${escapeHtml(p.name)},</p>
<p>${escapeHtml(p.inviter)} has invited you to Overtone, the lab's record of wafers, chips, arrays and measurements.</p>
<p><a href="${escapeHtml(p.link)}">Choose your password</a> (the link works once and expires in 7 days):<br><code>${escapeHtml(p.link)}</code></p>
<p>If you did not expect this message you can ignore it.</p>`
  return { to: p.to, subject: 'Your invitation to Overtone', text, html }
}
