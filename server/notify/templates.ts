/** The texts of Wavefit's notification e-mails (plain text first; the HTML repeats it with a link). */
import { palette } from '../../shared/palette';
import type { MailMessage } from '../mail/mailer';

function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

const footer = 'You receive this because you are a member of the study. Turn these messages off on your account page in Wavefit.';

function message(to: string, subject: string, paragraphs: string[], link: { href: string; words: string }): MailMessage {
  const text = [...paragraphs, '', `${link.words}: ${link.href}`, '', footer].join('\n');
  const html = [
    ...paragraphs.map((p) => `<p>${escapeHtml(p)}</p>`),
    `<p><a href="${escapeHtml(link.href)}">${escapeHtml(link.words)}</a></p>`,
    `<p style="color:${palette.muted}">${escapeHtml(footer)}</p>`,
  ].join('\n');
  return { to, subject, text, html };
}

export function batchFinishedMail(input: { to: string; studyName: string; batchLabel: string; chains: number; link: string }): MailMessage {
  return message(
    input.to,
    `Batch finished: ${input.batchLabel} (${input.studyName})`,
    [
      `The simulation batch "${input.batchLabel}" of the study "${input.studyName}" has finished (${input.chains} chains).`,
      'Its envelopes and goodness-of-fit tests are ready on the review board.',
    ],
    { href: input.link, words: 'Open the review board' },
  );
}

export function batchFailedMail(input: { to: string; studyName: string; batchLabel: string; reason: string; link: string }): MailMessage {
  return message(
    input.to,
    `Batch failed: ${input.batchLabel} (${input.studyName})`,
    [`The simulation batch "${input.batchLabel}" of the study "${input.studyName}" failed.`, `Reason: ${input.reason}`],
    { href: input.link, words: 'See the batch' },
  );
}

export function reviewRequestedMail(input: {
  to: string;
  studyName: string;
  batchLabel: string;
  requestedBy: string;
  message: string;
  link: string;
}): MailMessage {
  const paragraphs = [
    `${input.requestedBy} asks you to review the goodness of fit of "${input.batchLabel}" in the study "${input.studyName}".`,
    'Give each statistic a verdict (pass, fail or unsure) and add a comment where it helps.',
  ];
  if (input.message) paragraphs.push(`Message from ${input.requestedBy}: ${input.message}`);
  return message(input.to, `Review requested: ${input.batchLabel} (${input.studyName})`, paragraphs, {
    href: input.link,
    words: 'Start the review',
  });
}

export function reportSignedMail(input: {
  to: string;
  studyName: string;
  batchLabel: string;
  signedBy: string;
  signedAt: string;
  counts: { pass: number; fail: number; unsure: number; awaiting: number };
  link: string;
}): MailMessage {
  const c = input.counts;
  return message(
    input.to,
    `Fit report signed off: ${input.batchLabel} (${input.studyName})`,
    [
      `${input.signedBy} signed off the fit report of "${input.batchLabel}" in the study "${input.studyName}" on ${input.signedAt.slice(0, 16).replace('T', ' ')} UTC.`,
      `Verdicts at signing: ${c.pass} pass, ${c.fail} fail, ${c.unsure} unsure, ${c.awaiting} awaiting review.`,
    ],
    { href: input.link, words: 'Open the report' },
  );
}

export function lineupInvitedMail(input: {
  to: string;
  studyName: string;
  batchLabel: string;
  invitedBy: string;
  statisticLabel: string;
  panels: number;
  message: string;
  link: string;
}): MailMessage {
  const paragraphs = [
    `${input.invitedBy} invites you to a lineup test in the study "${input.studyName}" (batch "${input.batchLabel}").`,
    `You will see ${input.panels} small charts of the ${input.statisticLabel.toLowerCase()}, drawn alike. One is the observed wave, the others come from the model. Pick the one that looks different and say why in a few words.`,
    'Please take it before you look at this statistic on the review board, and without asking anyone which panel they chose.',
  ];
  if (input.message) paragraphs.push(`Message from ${input.invitedBy}: ${input.message}`);
  return message(input.to, `Lineup test: ${input.statisticLabel} (${input.studyName})`, paragraphs, { href: input.link, words: 'Take the lineup' });
}
