import type { StudyRole } from '../../shared/api';
import { STUDY_ROLES } from '../../shared/api';
import type { BadgeTone } from '../ui/Badge';

export const roleLabels: Record<StudyRole, string> = {
  lead: 'Lead',
  statistician: 'Statistician',
  reviewer: 'Reviewer',
};

export const roleDescriptions: Record<StudyRole, string> = {
  lead: 'runs the study, manages the team and signs the report',
  statistician: 'uploads data, specifies models and runs batches',
  reviewer: 'reviews the fit of each statistic',
};

export const roleTones: Record<StudyRole, BadgeTone> = { lead: 'accent', statistician: 'neutral', reviewer: 'neutral' };

export const roleOptions = STUDY_ROLES.map((r) => ({ value: r, label: roleLabels[r], description: roleDescriptions[r] }));

export function roleLabel(role: StudyRole | null | undefined): string {
  return role ? roleLabels[role] : 'Site admin (not a member)';
}
