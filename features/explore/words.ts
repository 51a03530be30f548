/**
 * Plain words for a choice: how much each effect changes the weight of one option. In the
 * multinomial logit, an effect's part c = beta_k * delta_ijk multiplies the option's weight by e^c
 * (common practice: odds ratio of a logit term), so e^c > 1 reads "c times more likely" and e^c < 1
 * "1 / e^c times less likely", other effects held as they are.
 */
import type { ChoiceOptionDto } from '../../shared/explore';

/** Below this size a part is called negligible (a factor between 0.95 and 1.05). */
export const NEGLIGIBLE = Math.log(1.05);

export function factorWords(c: number): string {
  const f = Math.exp(Math.abs(c));
  const shown = f >= 10 ? f.toFixed(0) : f.toFixed(1);
  return c > 0 ? `${shown} times more likely` : `${shown} times less likely`;
}

/** "choosing Mira", "choosing Mira back", "dropping Mira", "changing nothing". */
export function optionWords(option: ChoiceOptionDto, actors: string[]): string {
  if (option.alter === null) return 'changing nothing';
  const name = actors[option.alter] ?? `actor ${option.alter}`;
  if (option.tie) return `dropping ${name}`;
  return option.tieBack ? `choosing ${name} back` : `choosing ${name}`;
}

/** One sentence per effect that matters for this option, largest first. */
export function optionSentences(
  option: ChoiceOptionDto,
  effects: { key: string; label: string }[],
  actors: string[],
): string[] {
  if (option.alter === null) return [];
  const what = optionWords(option, actors);
  return option.contributions
    .map((c, k) => ({ c, k }))
    .filter(({ c }) => Math.abs(c) >= NEGLIGIBLE)
    .sort((a, b) => Math.abs(b.c) - Math.abs(a.c))
    .map(({ c, k }) => `${effects[k].label} makes ${what} ${factorWords(c)}.`);
}

export const pct = (p: number) => (p >= 0.995 ? '>99%' : p < 0.001 ? '<0.1%' : p < 0.1 ? `${(p * 100).toFixed(1)}%` : `${Math.round(p * 100)}%`);
