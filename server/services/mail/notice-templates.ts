import type { OutgoingMail } from './mail'
import { escapeHtml } from './mail-templates'

/**
 * Text + HTML for every e-mail notice. One layout (`layoutNotice`) gives them the same look and the
 * same footer (how to turn notices off in My account). Every value that comes from a person (names,
 * notes, setup names) is escaped in the HTML part.
 */

export interface Recipient {
  email: string
  name: string
}

/** A titled list inside a notice (digest sections, changed fields). */
export interface NoticeSection {
  title: string
  lines: string[]
  empty?: string
}

export interface NoticeBody {
  subject: string
  /** Plain sentences, one paragraph each. */
  paragraphs: string[]
  sections?: NoticeSection[]
  link?: { label: string; url: string }
}

const BRAND = '#1f4e79'

function footer(base: string): { text: string; html: string } {
  const where = base ? `${base}/account` : 'My account'
  const text = `You get this notice from Overtone. To stop these e-mails, turn off "Mail notices" in My account (${where}).`
  const html =
    `You get this notice from Overtone. To stop these e-mails, turn off <b>Mail notices</b> in ` +
    (base ? `<a href="${escapeHtml(where)}">My account</a>.` : 'My account.')
  return { text, html }
}

/** Wrap a notice body in the common layout for one recipient. `base` is the public URL (no trailing slash). */
export function layoutNotice(to: Recipient, body: NoticeBody, base: string): OutgoingMail {
  const foot = footer(base)
  const text = [
    `Hello ${to.name},`,
    '',
    ...body.paragraphs.flatMap((p) => [p, '']),
    ...(body.sections ?? []).flatMap((s) => [
      `${s.title}:`,
      ...(s.lines.length ? s.lines.map((l) => `  - ${l}`) : [`  ${s.empty ?? 'none'}`]),
      '',
    ]),
    ...(body.link ? [`${body.link.label}: ${body.link.url}`, ''] : []),
    '-- ',
    foot.text,
  ].join('\n')
  const sections = (body.sections ?? [])
    .map(
      (s) =>
        `<h3 style="margin:16px 0 4px;font-size:15px;color:${BRAND}">${escapeHtml(s.title)}</h3>` +
        (s.lines.length
          ? `<ul style="margin:0;padding-left:20px">${s.lines.map((l) => `<li>${escapeHtml(l)}</li>`).join('')}</ul>`
          : `<p style="margin:0;color:#666">${escapeHtml(s.empty ?? 'none')}</p>`),
    )
    .join('\n')
  const html = `<div style="font-family:'Roboto Condensed',Arial,sans-serif;font-size:14px;color:#222;max-width:640px">
<div style="border-bottom:3px solid ${BRAND};padding:4px 0;margin-bottom:12px;font-weight:bold;color:${BRAND}">Overtone</div>
<p>Hello ${escapeHtml(to.name)},</p>
${body.paragraphs.map((p) => `<p>${escapeHtml(p)}</p>`).join('\n')}
${sections}
${body.link ? `<p style="margin-top:16px"><a href="${escapeHtml(body.link.url)}" style="color:${BRAND}">${escapeHtml(body.link.label)}</a></p>` : ''}
<hr style="border:none;border-top:1px solid #ddd;margin-top:24px">
<p style="font-size:12px;color:#666">${foot.html}</p>
</div>`
  return { to: to.email, subject: `Overtone: ${body.subject}`, text, html }
}

export interface SetupRef {
  setupId: number
  code: string
  name: string
  actorName: string
}
const setupLink = (base: string, s: SetupRef) => ({ label: `Open ${s.code}`, url: `${base}/laser-setups/${s.setupId}` })

export function setupSubmittedNotice(s: SetupRef, base: string): NoticeBody {
  return {
    subject: `${s.code} ${s.name} waits for sign-off`,
    paragraphs: [
      `${s.actorName} registered the laser setup ${s.code} "${s.name}". It waits for a safety officer's sign-off before it may be used.`,
    ],
    link: setupLink(base, s),
  }
}

export function setupChangedNotice(s: SetupRef & { voided: boolean; fields: string[] }, base: string): NoticeBody {
  return {
    subject: s.voided ? `${s.code} changed: sign-off voided` : `${s.code} ${s.name} changed`,
    paragraphs: [
      `${s.actorName} changed the laser setup ${s.code} "${s.name}".`,
      ...(s.voided
        ? [
            'The change touched its hazard figures, so its sign-off is void: it needs a new sign-off before it may be used again.',
          ]
        : []),
    ],
    sections: [{ title: 'Changed fields', lines: s.fields, empty: 'none listed' }],
    link: setupLink(base, s),
  }
}

const DECISION_WORD = { approved: 'approved', rejected: 'rejected', revoked: 'revoked the sign-off of' } as const

export function signoffDecisionNotice(
  s: SetupRef & { decision: keyof typeof DECISION_WORD; note: string | null; expiresOn: string | null },
  base: string,
): NoticeBody {
  const subject = s.decision === 'revoked' ? `sign-off of ${s.code} revoked` : `${s.code} ${s.name} ${s.decision}`
  return {
    subject,
    paragraphs: [
      `${s.actorName} ${DECISION_WORD[s.decision]} the laser setup ${s.code} "${s.name}".`,
      ...(s.decision === 'approved' && s.expiresOn ? [`The sign-off is valid until ${s.expiresOn}.`] : []),
      ...(s.decision !== 'approved' ? ['The setup may not be used until it is signed off again.'] : []),
      ...(s.note ? [`Note: ${s.note}`] : []),
    ],
    link: setupLink(base, s),
  }
}

export function setupExpiringNotice(
  s: { setupId: number; code: string; name: string; expiresOn: string; daysLeft: number },
  base: string,
): NoticeBody {
  const when = s.daysLeft <= 0 ? 'today' : s.daysLeft === 1 ? 'tomorrow' : `in ${s.daysLeft} days`
  return {
    subject: `sign-off of ${s.code} expires ${when}`,
    paragraphs: [
      `The sign-off of the laser setup ${s.code} "${s.name}" expires on ${s.expiresOn} (${when}). Review it and sign it off again to keep it in use.`,
    ],
    link: { label: `Open ${s.code}`, url: `${base}/laser-setups/${s.setupId}` },
  }
}

export function handOffNotice(
  h: { itemCode: string; actorName: string; path: string; locationCode: string; note: string | null | undefined },
  base: string,
): NoticeBody {
  return {
    subject: `${h.itemCode} was handed to you`,
    paragraphs: [
      `${h.actorName} handed ${h.itemCode} to you; it is now stored at ${h.path} (${h.locationCode}).`,
      ...(h.note ? [`Note: ${h.note}`] : []),
    ],
    link: { label: `Open ${h.itemCode}`, url: `${base}/s/${h.itemCode}` },
  }
}

export interface DigestContent {
  since: Date
  until: Date
  wafers: string[]
  chips: string[]
  sessions: string[]
  anomalies: string[]
  setupsWaiting: string[]
  setupsExpiring: string[]
  counts: { wafers: number; chips: number; sessions: number; anomalies: number }
}

const day = (d: Date) => d.toISOString().slice(0, 10)
const more = (lines: string[], total: number) =>
  total > lines.length ? [...lines, `… and ${total - lines.length} more`] : lines
/** At most 25 lines of a list, then "… and N more". */
const cap = (lines: string[]) => more(lines.slice(0, 25), lines.length)

export function digestNotice(d: DigestContent, base: string): NoticeBody {
  const c = d.counts
  return {
    subject: `lab digest ${day(d.since)} to ${day(d.until)}`,
    paragraphs: [
      `What happened in the lab since ${d.since.toISOString().slice(0, 16).replace('T', ' ')} UTC: ${c.wafers} new wafer(s), ${c.chips} chip(s) diced, ${c.sessions} new measurement session(s), ${c.anomalies} with results that contradict the prediction.`,
    ],
    sections: [
      { title: `New wafers (${c.wafers})`, lines: more(d.wafers, c.wafers) },
      { title: `Chips diced (${c.chips})`, lines: more(d.chips, c.chips) },
      { title: `New sessions (${c.sessions})`, lines: more(d.sessions, c.sessions) },
      { title: `Anomalies (${c.anomalies})`, lines: cap(d.anomalies), empty: 'no contradictions flagged' },
      { title: `Laser setups waiting for sign-off (${d.setupsWaiting.length})`, lines: cap(d.setupsWaiting) },
      { title: `Sign-offs expiring within 14 days (${d.setupsExpiring.length})`, lines: cap(d.setupsExpiring) },
    ],
    link: { label: 'Open Overtone', url: `${base}/` },
  }
}
