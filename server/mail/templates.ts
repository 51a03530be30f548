/** The texts of Wavefit's e-mails (plain text first; the HTML repeats it with a link). */
import type { StudyRole } from '../../shared/api';
import type { MailMessage } from './mailer';

const ROLE_DUTIES: Record<StudyRole, string> = {
  lead: 'lead the study: manage the team and sign off the fit report',
  statistician: 'upload data, specify models and run fits and simulation batches',
  reviewer: 'review how well each statistic is reproduced and leave verdicts',
};

function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

export function invitationMail(input: {
  to: string;
  studyName: string;
  role: StudyRole;
  invitedBy: string;
  link: string;
  expiresAt: Date;
}): MailMessage {
  const expires = input.expiresAt.toISOString().slice(0, 10);
  const text = [
    `${input.invitedBy} invites you to join the study "${input.studyName}" on Wavefit as ${input.role}.`,
    `As ${input.role} you can ${ROLE_DUTIES[input.role]}.`,
    '',
    `Accept the invitation here (the link works until ${expires}):`,
    input.link,
    '',
    'If you did not expect this message, you can ignore it.',
  ].join('\n');
  const html = [
    `<p>${escapeHtml(input.invitedBy)} invites you to join the study <strong>${escapeHtml(input.studyName)}</strong> on Wavefit as ${input.role}.</p>`,
    `<p>As ${input.role} you can ${ROLE_DUTIES[input.role]}.</p>`,
    `<p><a href="${escapeHtml(input.link)}">Accept the invitation</a> (the link works until ${expires}).</p>`,
    '<p>If you did not expect this message, you can ignore it.</p>',
  ].join('\n');
  return { to: input.to, subject: `Invitation to "${input.studyName}" on Wavefit`, text, html };
}
