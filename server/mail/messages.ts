// The words of Ringwell's e-mail: plain, exact, calm; what happened and what to do, with the link.
// Each message has a plain-text body and a small HTML body with the same content.
export interface ComposedMail {
  subject: string;
  text: string;
  html: string;
}

interface RevisionRef {
  designName: string;
  projectName: string;
  sequence: number;
  sha256: string;
}

const escapeHtml = (text: string) =>
  text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;');

function compose(subject: string, paragraphs: string[], link: { label: string; url: string }, footer: string): ComposedMail {
  const text = [...paragraphs, `${link.label}: ${link.url}`, '--', footer].join('\n\n') + '\n';
  const html = [
    '<!doctype html><html><body style="font-family: Inter, Arial, sans-serif; color: #1B2430; background: #F7F5F0; padding: 16px;">',
    ...paragraphs.map((p) => `<p style="white-space: pre-line; margin: 0 0 12px;">${escapeHtml(p)}</p>`),
    `<p style="margin: 16px 0;"><a href="${escapeHtml(link.url)}" style="color: #2F5D8A;">${escapeHtml(link.label)}</a></p>`,
    `<p style="color: #5A6473; font-size: 12px; margin-top: 24px;">${escapeHtml(footer)}</p>`,
    '</body></html>',
  ].join('\n');
  return { subject, text, html };
}

const revisionTitle = (r: RevisionRef) => `${r.designName}, revision ${r.sequence}`;
const shortHash = (sha: string) => sha.slice(0, 12);

export function reviewRequestedMail(input: {
  requester: string;
  reviewer: string;
  teamName: string;
  revision: RevisionRef;
  counts: { fail: number; warn: number; notChecked: number; pass: number };
  note: string;
  url: string;
}): ComposedMail {
  const { revision, counts } = input;
  const paragraphs = [
    `${input.reviewer},`,
    `${input.requester} asks you to review ${revisionTitle(revision)} in the project ${revision.projectName}.`,
    `Margins: ${counts.fail} fail, ${counts.warn} warn, ${counts.notChecked} not checked, ${counts.pass} pass. Revision hash ${shortHash(revision.sha256)}.`,
  ];
  if (input.note.trim()) paragraphs.push(`Note from ${input.requester}:\n${input.note.trim()}`);
  paragraphs.push('Approve the revision or request changes from the review page. Failures and warnings are listed first.');
  return compose(
    `Review requested: ${revisionTitle(revision)}`,
    paragraphs,
    { label: 'Open the review', url: input.url },
    footerFor(input.teamName, 'a reviewer'),
  );
}

export function commentAddedMail(input: {
  commenter: string;
  recipient: string;
  teamName: string;
  revision: RevisionRef;
  checkLabel: string | null;
  body: string;
  url: string;
}): ComposedMail {
  const about = input.checkLabel ? `the check "${input.checkLabel}"` : 'the revision';
  return compose(
    `Comment on ${revisionTitle(input.revision)}`,
    [`${input.recipient},`, `${input.commenter} commented on ${about} of ${revisionTitle(input.revision)}:`, input.body.trim()],
    { label: 'Open the review', url: input.url },
    footerFor(input.teamName, 'taking part in this review'),
  );
}

export function reviewDecidedMail(input: {
  decision: 'approved' | 'changes-requested';
  reviewer: string;
  recipient: string;
  teamName: string;
  revision: RevisionRef;
  reason: string;
  url: string;
}): ComposedMail {
  const title = revisionTitle(input.revision);
  const approved = input.decision === 'approved';
  const paragraphs = [
    `${input.recipient},`,
    approved
      ? `${input.reviewer} approved ${title}. The approval records the revision hash ${shortHash(input.revision.sha256)} and the margins as approved.`
      : `${input.reviewer} requested changes to ${title}.`,
  ];
  if (input.reason.trim()) paragraphs.push(`${approved ? 'Comment' : 'Reason'}:\n${input.reason.trim()}`);
  if (!approved) paragraphs.push('Save a new revision with the changes and request a review of it.');
  return compose(
    `${approved ? 'Approved' : 'Changes requested'}: ${title}`,
    paragraphs,
    { label: 'Open the review', url: input.url },
    footerFor(input.teamName, 'the author of this revision'),
  );
}

export function invitationMail(input: {
  inviter: string;
  teamName: string;
  role: string;
  expiresAt: Date;
  url: string;
}): ComposedMail {
  const expires = input.expiresAt.toISOString().slice(0, 10);
  return compose(
    `Join ${input.teamName} on Ringwell`,
    [
      `${input.inviter} invites you to join the team ${input.teamName} on Ringwell as ${articleFor(input.role)} ${input.role}.`,
      'Ringwell checks power-up and switching transients against component ratings, and keeps the record of reviews.',
      `The invitation expires on ${expires}. If you did not expect it, ignore this message.`,
    ],
    { label: 'Accept the invitation', url: input.url },
    'Sent by Ringwell on behalf of ' + input.inviter + '.',
  );
}

function footerFor(teamName: string, because: string): string {
  return `You receive this because you are ${because} in ${teamName} on Ringwell.`;
}

function articleFor(word: string): string {
  return /^[aeiou]/i.test(word) ? 'an' : 'a';
}
