/**
 * Every message the app sends, in plain text and HTML, in our own words. Each names the product,
 * says why the recipient gets it, and links to the page it is about. The HTML has inline styles
 * only: no images, no outside resources, no tracking of any kind. Pure functions (unit-tested).
 */
import type { TeamRole } from '@shared/api/teams';

export const productName = 'Spreadproof';

export interface MailContent {
  subject: string;
  text: string;
  html: string;
}

const roleWords: Record<TeamRole, { article: string; does: string }> = {
  owner: { article: 'an owner', does: 'owners manage members, publishing and archiving' },
  editor: { article: 'an editor', does: 'editors create, save and fork worksheets' },
  reviewer: { article: 'a reviewer', does: 'reviewers comment on, compare and sign off revisions' },
  viewer: { article: 'a viewer', does: 'viewers read worksheets and their results' },
};

export function escapeHtml(value: string): string {
  return value
    .replaceAll('&', '&amp;')
    .replaceAll('<', '&lt;')
    .replaceAll('>', '&gt;')
    .replaceAll('"', '&quot;')
    .replaceAll("'", '&#39;');
}

const months = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];

/** "4 March 2025, 09:12 UTC": unambiguous whatever the reader's locale. */
export function formatUtc(date: Date): string {
  const pad = (n: number) => String(n).padStart(2, '0');
  return `${date.getUTCDate()} ${months[date.getUTCMonth()]} ${date.getUTCFullYear()}, ${pad(date.getUTCHours())}:${pad(date.getUTCMinutes())} UTC`;
}

/** A piece of message text: plain, or plain with emphasis that the HTML shows in bold. */
type Part = string | { strong: string } | { quote: string };
type Paragraph = Part[];

interface Layout {
  /** First line of the message, also the HTML heading. */
  heading: string;
  paragraphs: Paragraph[];
  action: { label: string; url: string };
  /** Small print under the action (validity of a link, what to do if unexpected). */
  notes: string[];
  /** Why the recipient gets this and how to stop it (notifications only). */
  settingsUrl?: string;
  baseUrl: string;
}

function plainPart(part: Part): string {
  if (typeof part === 'string') return part;
  if ('strong' in part) return part.strong;
  return `\n\n    ${part.quote.split('\n').join('\n    ')}\n\n`;
}

function htmlPart(part: Part): string {
  if (typeof part === 'string') return escapeHtml(part);
  if ('strong' in part) return `<strong>${escapeHtml(part.strong)}</strong>`;
  return `</p><blockquote style="margin:12px 0;padding:8px 14px;border-left:3px solid #8fb3ad;color:#2c3b40;white-space:pre-wrap">${escapeHtml(part.quote)}</blockquote><p style="margin:0 0 14px">`;
}

function render(layout: Layout, subject: string): MailContent {
  const settingsLine = layout.settingsUrl
    ? `You get this message because this kind of notification is on for your ${productName} account. Switch it off in your notification settings: ${layout.settingsUrl}`
    : null;
  const signature = `${productName} · reproducible, versioned statistical worksheets · ${layout.baseUrl}`;

  const text = [
    layout.heading,
    '',
    ...layout.paragraphs.flatMap((p) => [p.map(plainPart).join('').replace(/\n{3,}/g, '\n\n').trim(), '']),
    `${layout.action.label}:`,
    layout.action.url,
    '',
    ...layout.notes.flatMap((n) => [n, '']),
    '-- ',
    signature,
    ...(settingsLine ? [settingsLine] : []),
    '',
  ].join('\n');

  const paragraphHtml = layout.paragraphs
    .map((p) => `<p style="margin:0 0 14px">${p.map(htmlPart).join('')}</p>`)
    .join('\n')
    .replaceAll('<p style="margin:0 0 14px"></p>', '');
  const notesHtml = layout.notes
    .map((n) => `<p style="margin:0 0 10px;font-size:13px;color:#4f5f64">${escapeHtml(n)}</p>`)
    .join('\n');
  const url = escapeHtml(layout.action.url);

  const html = `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(subject)}</title>
</head>
<body style="margin:0;padding:0;background:#eef2f1;color:#1b272b;font-family:Roboto,'Segoe UI',Helvetica,Arial,sans-serif;font-size:15px;line-height:1.5">
<div style="max-width:560px;margin:0 auto;padding:24px 16px">
<p style="margin:0 0 16px;font-size:14px;font-weight:700;letter-spacing:0.04em;color:#1f5f5b">${productName.toUpperCase()}</p>
<div style="background:#ffffff;border:1px solid #cfdad8;border-radius:14px;padding:24px">
<h1 style="margin:0 0 16px;font-size:20px;line-height:1.3;font-weight:600">${escapeHtml(layout.heading)}</h1>
${paragraphHtml}
<p style="margin:20px 0"><a href="${url}" style="display:inline-block;padding:10px 18px;border-radius:20px;background:#1f5f5b;color:#ffffff;text-decoration:none;font-weight:600">${escapeHtml(layout.action.label)}</a></p>
<p style="margin:0 0 16px;font-size:13px;color:#4f5f64">Or copy this address into your browser:<br><a href="${url}" style="color:#1f5f5b;word-break:break-all">${url}</a></p>
${notesHtml}
</div>
<p style="margin:16px 0 0;font-size:12px;color:#56666b">${escapeHtml(signature)}</p>
${
  layout.settingsUrl
    ? `<p style="margin:6px 0 0;font-size:12px;color:#56666b">You get this message because this kind of notification is on for your ${productName} account. <a href="${escapeHtml(layout.settingsUrl)}" style="color:#1f5f5b">Switch it off in your notification settings</a>.</p>`
    : ''
}
</div>
</body>
</html>
`;
  return { subject, text, html };
}

const quoteTitle = (title: string) => `“${title}”`;

export interface InvitationMail {
  baseUrl: string;
  link: string;
  teamName: string;
  role: TeamRole;
  invitedByName: string | null;
  expiresAt: Date;
  /** The address already has an account: the link joins the team after signing in. */
  accountExists: boolean;
}

export function invitationMail(m: InvitationMail): MailContent {
  const who = m.invitedByName ?? 'An owner of the team';
  const role = roleWords[m.role];
  return render(
    {
      baseUrl: m.baseUrl,
      heading: `Join ${m.teamName} on ${productName}`,
      paragraphs: [
        [`${who} invites you to join the team `, { strong: quoteTitle(m.teamName) }, ` on ${productName} as ${role.article} (${role.does}).`],
        [`${productName} keeps a team's statistical worksheets as versioned revisions that reproduce exactly, so colleagues can fork them, reviewers can compare and sign them off, and results can be shown read-only to customers and auditors.`],
        m.accountExists
          ? ['You already have an account with this address: open the link, sign in, and you are a member.']
          : ['Open the link to create your account with this address; you join the team as soon as it exists.'],
      ],
      action: { label: m.accountExists ? 'Join the team' : 'Create your account and join', url: m.link },
      notes: [
        `The link works once, until ${formatUtc(m.expiresAt)}.`,
        'If you did not expect this invitation, ignore this message: nothing happens unless the link is opened.',
      ],
    },
    `${who} invites you to ${quoteTitle(m.teamName)} on ${productName}`,
  );
}

export interface PasswordResetMail {
  baseUrl: string;
  link: string;
  email: string;
  expiresAt: Date;
}

export function passwordResetMail(m: PasswordResetMail): MailContent {
  return render(
    {
      baseUrl: m.baseUrl,
      heading: `Choose a new ${productName} password`,
      paragraphs: [
        ['Someone (we hope you) asked to choose a new password for the account ', { strong: m.email }, '.'],
        ['Choosing a new password signs the account out on every other device and browser.'],
      ],
      action: { label: 'Choose a new password', url: m.link },
      notes: [
        `The link works once, until ${formatUtc(m.expiresAt)}.`,
        'If you did not ask for this, ignore this message: your password stays as it is.',
      ],
    },
    `Choose a new ${productName} password`,
  );
}

export interface ReviewRequestedMail {
  baseUrl: string;
  link: string;
  settingsUrl: string;
  requestedByName: string;
  worksheetTitle: string;
  revisionNumber: number;
  teamName: string;
  message: string;
}

export function reviewRequestedMail(m: ReviewRequestedMail): MailContent {
  const paragraphs: Paragraph[] = [
    [
      `${m.requestedByName} asks you to review `,
      { strong: `revision ${m.revisionNumber}` },
      ` of the worksheet `,
      { strong: quoteTitle(m.worksheetTitle) },
      ` in ${m.teamName}.`,
    ],
  ];
  if (m.message.trim()) paragraphs.push([`${m.requestedByName} wrote:`, { quote: m.message.trim() }]);
  paragraphs.push(['Your verdict (approved, or changes requested) names the content hash of the revision you looked at, and applies to that revision only.']);
  return render(
    {
      baseUrl: m.baseUrl,
      heading: `Review requested: ${quoteTitle(m.worksheetTitle)}, revision ${m.revisionNumber}`,
      paragraphs,
      action: { label: `Open revision ${m.revisionNumber}`, url: m.link },
      notes: [],
      settingsUrl: m.settingsUrl,
    },
    `Review requested: ${quoteTitle(m.worksheetTitle)}, revision ${m.revisionNumber}`,
  );
}

export interface ReviewVerdictMail {
  baseUrl: string;
  link: string;
  settingsUrl: string;
  reviewerName: string;
  verdict: 'approved' | 'changes_requested';
  comment: string;
  worksheetTitle: string;
  revisionNumber: number;
  contentHash: string;
}

export function reviewVerdictMail(m: ReviewVerdictMail): MailContent {
  const approved = m.verdict === 'approved';
  const title = quoteTitle(m.worksheetTitle);
  const paragraphs: Paragraph[] = [
    approved
      ? [`${m.reviewerName} `, { strong: 'approved' }, ` revision ${m.revisionNumber} of `, { strong: title }, '.']
      : [`${m.reviewerName} `, { strong: 'requested changes' }, ` to revision ${m.revisionNumber} of `, { strong: title }, '.'],
  ];
  if (m.comment.trim()) paragraphs.push([`${m.reviewerName} wrote:`, { quote: m.comment.trim() }]);
  paragraphs.push([`The verdict is about the content hash ${m.contentHash.slice(0, 12)}… of that revision.`]);
  const subject = approved
    ? `Approved: ${title}, revision ${m.revisionNumber}`
    : `Changes requested: ${title}, revision ${m.revisionNumber}`;
  return render(
    {
      baseUrl: m.baseUrl,
      heading: subject,
      paragraphs,
      action: { label: `Open revision ${m.revisionNumber}`, url: m.link },
      notes: [],
      settingsUrl: m.settingsUrl,
    },
    subject,
  );
}

export interface InvitationAcceptedMail {
  baseUrl: string;
  link: string;
  settingsUrl: string;
  memberName: string;
  memberEmail: string;
  teamName: string;
  role: TeamRole;
}

export function invitationAcceptedMail(m: InvitationAcceptedMail): MailContent {
  return render(
    {
      baseUrl: m.baseUrl,
      heading: `${m.memberName} joined ${m.teamName}`,
      paragraphs: [
        [
          `${m.memberName} (${m.memberEmail}) accepted your invitation and is now `,
          { strong: roleWords[m.role].article },
          ` in the team `,
          { strong: quoteTitle(m.teamName) },
          '.',
        ],
        ['Owners can change the role or remove the member on the team page.'],
      ],
      action: { label: 'Open the team page', url: m.link },
      notes: [],
      settingsUrl: m.settingsUrl,
    },
    `${m.memberName} joined ${quoteTitle(m.teamName)}`,
  );
}
