/**
 * Why an actor chooses: for a fit and a period, at the observed start wave, every option of one
 * actor's ministep (each alter and "no change") with its probability and what each effect adds to it,
 * in plain words; above it the grid of first-ministep probabilities of every actor and alter, with
 * the actors ordered so that structure shows. Exact multinomial-logit probabilities from the server,
 * not sampled.
 */
import { useLocalSearchParams, useRouter } from 'expo-router';
import { useMemo, useState } from 'react';
import { Pressable, ScrollView, View } from 'react-native';
import Svg, { Circle, G, Line, Rect, Text as SvgText } from 'react-native-svg';
import type { ChoiceOptionDto, ChoiceResponse, OverviewResponse } from '../../shared/explore';
import { parseId } from '../api/params';
import { ChoiceChips } from '../consensus/ChoiceChips';
import { parseStudyId, useStudy } from '../studies/queries';
import { StudyNotFound } from '../studies/StudyNotFound';
import { Banner } from '../ui/Banner';
import { Button, ButtonRow } from '../ui/Button';
import { Card } from '../ui/Card';
import { Loading, LoadError } from '../ui/Loading';
import { Screen } from '../ui/Screen';
import { SegmentedControl } from '../ui/SegmentedControl';
import { Text } from '../ui/Text';
import { TextLink } from '../ui/TextLink';
import { colors } from '../ui/theme';
import { fonts, space } from '../ui/tokens';
import { useBreakpoint } from '../ui/useBreakpoint';
import { useChoices, useOverview } from './queries';
import { optionSentences, optionWords, pct } from './words';

/** Cell shade: teal with opacity rising with the square root of p (small probabilities stay visible). */
const shade = (p: number) => Math.min(1, Math.sqrt(p / 0.5));

function OverviewGrid({ data, selected, onSelect, width }: { data: OverviewResponse; selected: number; onSelect: (actor: number) => void; width: number }) {
  const { compact } = useBreakpoint();
  const n = data.actors.length;
  const labelWidth = compact ? 84 : 120;
  const fitCell = Math.floor((width - labelWidth - 36) / Math.max(1, n));
  const cell = compact ? Math.max(14, Math.min(22, fitCell)) : Math.max(8, Math.min(24, fitCell));
  const ties = useMemo(() => {
    const s = new Set<number>();
    for (const [i, j] of data.startTies) s.add(i * n + j);
    return s;
  }, [data, n]);
  const gridWidth = labelWidth + cell * n + 36;
  const body = (
    <View style={{ width: gridWidth }} accessibilityLabel={`Grid of first-ministep probabilities: ${n} actors by ${n} alters, ordered ${data.orderChoices.find((c) => c.value === data.orderBy)?.label ?? data.orderBy}. Choose a row to explain that actor.`}>
      {cell >= 12 ? (
        <View style={{ flexDirection: 'row' }} accessibilityElementsHidden importantForAccessibility="no-hide-descendants">
          <View style={{ width: labelWidth }} />
          <Svg width={cell * n + 30} height={64}>
            {data.order.map((j, c) => (
              <SvgText
                key={j}
                x={c * cell + cell / 2 + 4}
                y={60}
                fontSize={Math.min(12, cell - 2)}
                fontFamily={fonts.text}
                fill={colors.muted}
                transform={`rotate(-60 ${c * cell + cell / 2 + 4} 60)`}
              >
                {data.actors[j].slice(0, 8)}
              </SvgText>
            ))}
          </Svg>
        </View>
      ) : null}
      {data.order.map((i, r) => (
        <Pressable
          key={i}
          onPress={() => onSelect(i)}
          accessibilityRole="button"
          accessibilityLabel={`Explain ${data.actors[i]}`}
          testID={`overview-row-${i}`}
          style={{ flexDirection: 'row', alignItems: 'center', height: cell, backgroundColor: i === selected ? colors.accentSoft : r % 2 ? colors.surface : 'transparent' }}
        >
          <Text variant="caption" numberOfLines={1} style={{ width: labelWidth, paddingRight: 4, fontSize: Math.min(13, cell - 2), lineHeight: cell, color: i === selected ? colors.ink : colors.muted }}>
            {data.actors[i]}
          </Text>
          <Svg width={cell * n} height={cell}>
            {data.order.map((j, c) => {
              const p = data.probabilities[i][j];
              const x = c * cell;
              if (i === j) {
                return (
                  <G key={j}>
                    <Rect x={x + 0.5} y={0.5} width={cell - 1} height={cell - 1} fill={colors.surfaceSunk} stroke={colors.envelopeNarrow} strokeWidth={1} />
                    <Line x1={x + 2} y1={cell - 2} x2={x + cell - 2} y2={2} stroke={colors.envelopeNarrow} strokeWidth={1} opacity={0.3 + 0.7 * shade(p)} />
                  </G>
                );
              }
              return (
                <G key={j}>
                  <Rect x={x + 0.5} y={0.5} width={cell - 1} height={cell - 1} fill={colors.accent} fillOpacity={shade(p)} stroke={colors.rule} strokeWidth={0.5} />
                  {ties.has(i * n + j) ? <Circle cx={x + cell / 2} cy={cell / 2} r={Math.max(1.5, cell / 7)} fill={shade(p) > 0.55 ? colors.surface : colors.ink} /> : null}
                </G>
              );
            })}
          </Svg>
        </Pressable>
      ))}
    </View>
  );
  return gridWidth > width ? (
    <ScrollView horizontal testID="overview-scroll" style={{ maxWidth: width }}>
      {body}
    </ScrollView>
  ) : (
    body
  );
}

function GridLegend() {
  const swatch = (p: number) => <View style={{ width: 16, height: 16, backgroundColor: colors.accent, opacity: shade(p), borderWidth: 0.5, borderColor: colors.rule }} />;
  return (
    <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.s2, alignItems: 'center' }}>
      <View style={{ flexDirection: 'row', alignItems: 'center', gap: 4 }}>
        {swatch(0.01)}
        {swatch(0.1)}
        {swatch(0.3)}
        {swatch(0.6)}
        <Text variant="caption">darker: more likely (1%, 10%, 30%, 60%)</Text>
      </View>
      <Text variant="caption">● a tie at the start (choosing it dissolves it)</Text>
      <Text variant="caption">grey cell with a stroke on the diagonal: "no change"</Text>
    </View>
  );
}

/** A bar from a centre line: right for a part that raises the option's weight, left for one that lowers it. */
function PartBar({ value, scale, width }: { value: number; scale: number; width: number }) {
  const half = width / 2;
  const len = Math.min(half, (Math.abs(value) / scale) * half);
  return (
    <Svg width={width} height={12}>
      <Line x1={half} y1={0} x2={half} y2={12} stroke={colors.ruleStrong} strokeWidth={1} />
      <Rect x={value >= 0 ? half : half - len} y={2} width={len} height={8} fill={value >= 0 ? colors.accent : colors.fail} />
    </Svg>
  );
}

function OptionRow({ option, data, scale, explain }: { option: ChoiceOptionDto; data: ChoiceResponse; scale: number; explain: boolean }) {
  const { compact } = useBreakpoint();
  const name = option.alter === null ? 'No change' : data.actors[option.alter];
  const what = option.alter === null ? 'keeps every tie as it is' : option.tie ? 'drop the tie' : option.tieBack ? 'create a tie (back)' : 'create a tie';
  const sentences = explain ? optionSentences(option, data.effects, data.actors) : [];
  return (
    <View style={{ paddingVertical: space.s1, borderTopWidth: 1, borderTopColor: colors.rule, gap: 4 }} testID={`option-${option.alter ?? 'none'}`}>
      <View style={{ flexDirection: 'row', alignItems: 'center', gap: space.s1 }}>
        <Text variant="figure" style={{ width: 52, textAlign: 'right' }}>
          {pct(option.probability)}
        </Text>
        <View style={{ width: compact ? 60 : 120, height: 10, backgroundColor: colors.surfaceSunk }}>
          <View style={{ width: `${Math.max(1, option.probability * 100)}%`, height: 10, backgroundColor: option.alter === null ? colors.envelopeNarrow : colors.accent }} />
        </View>
        <Text variant="bodyStrong" style={{ flexShrink: 1 }}>
          {name}
        </Text>
        <Text variant="caption">{what}</Text>
      </View>
      {option.alter !== null ? (
        <View style={{ flexDirection: 'row', flexWrap: 'wrap', columnGap: space.s2, rowGap: 2, paddingLeft: compact ? 0 : 60 }}>
          {data.effects.map((e, k) => Math.abs(option.contributions[k]) < 0.005 ? null : (
            <View key={e.key} style={{ flexDirection: 'row', alignItems: 'center', gap: 4, minWidth: compact ? 150 : 200 }}>
              <PartBar value={option.contributions[k]} scale={scale} width={48} />
              <Text variant="caption" numberOfLines={1}>
                {`${e.label} ${option.contributions[k] >= 0 ? '+' : '−'}${Math.abs(option.contributions[k]).toFixed(2)}`}
              </Text>
            </View>
          ))}
        </View>
      ) : null}
      {option.alter !== null && option.contributions.some((c) => Math.abs(c) < 0.005) ? (
        <Text variant="caption" style={{ paddingLeft: compact ? 0 : 60 }}>
          {`No part for this option: ${data.effects.filter((_, k) => Math.abs(option.contributions[k]) < 0.005).map((e) => e.label).join(', ')}.`}
        </Text>
      ) : null}
      {sentences.length ? (
        <View style={{ paddingLeft: compact ? 0 : 60 }}>
          {sentences.slice(0, 2).map((s) => (
            <Text key={s} variant="small">
              {s}
            </Text>
          ))}
        </View>
      ) : null}
    </View>
  );
}

function Explanation({ data }: { data: ChoiceResponse }) {
  const [all, setAll] = useState(false);
  const name = data.actors[data.actor];
  const scale = Math.max(0.5, ...data.options.flatMap((o) => o.contributions.map(Math.abs)));
  const shown = all ? data.options : data.options.slice(0, 8);
  const stay = data.options.find((o) => o.alter === null)!;
  const top = data.options[0];
  const summary =
    top.alter === null
      ? `${name} most likely keeps every tie (${pct(top.probability)}).`
      : `${name}'s most likely move is ${optionWords(top, data.actors)} (${pct(top.probability)}); changing nothing has ${pct(stay.probability)}.`;
  return (
    <Card title={`${name}: every option of one ministep`} subtitle={summary} testID="choice-explanation">
      <Text variant="caption">
        {`Bars beside each option show what each effect adds to its utility (β × change statistic): right raises its weight, left lowers it. An effect's part c multiplies the option's weight by e^c, which is what "times more likely" means, against all other options, the other effects held as they are.`}
      </Text>
      {data.fixedLeftOut ? <Text variant="small">{`${data.fixedLeftOut} alter${data.fixedLeftOut === 1 ? ' is' : 's are'} not offered to ${name} in this period (a fixed pair or an absent actor).`}</Text> : null}
      {shown.map((o, k) => (
        <OptionRow key={o.alter ?? -1} option={o} data={data} scale={scale} explain={k < 4} />
      ))}
      {data.options.length > 8 ? (
        <ButtonRow>
          <Button label={all ? 'Show the 8 most likely' : `Show all ${data.options.length} options`} variant="quiet" onPress={() => setAll((a) => !a)} testID="options-all" />
        </ButtonRow>
      ) : null}
    </Card>
  );
}

export function ChoiceScreen() {
  const params = useLocalSearchParams<{ studyId: string; fitId: string; model?: string; period?: string; actor?: string }>();
  const router = useRouter();
  const studyId = parseStudyId(params.studyId);
  const fitId = parseId(params.fitId);
  const modelId = parseId(params.model);
  const study = useStudy(studyId);
  const [period, setPeriod] = useState<number>(() => parseId(params.period) ?? 1);
  const [actor, setActorState] = useState<number>(() => (params.actor && /^[0-9]+$/.test(params.actor) ? Number(params.actor) : 0));
  const [order, setOrder] = useState('cluster');
  const overview = useOverview(studyId, fitId, period, order);
  const choices = useChoices(studyId, fitId, period, actor);
  const { width, gutter, compact } = useBreakpoint();
  const inner = Math.min(width - (compact ? 0 : 232), 1100) - 2 * gutter - 34;

  if (studyId === null || fitId === null || study.error?.status === 404) return <StudyNotFound />;
  const ov = overview.data;
  const n = ov?.actors.length ?? 0;
  const setActor = (a: number) => {
    setActorState(a);
    router.setParams({ actor: String(a) });
  };
  const pos = ov ? ov.order.indexOf(actor) : -1;
  const converged = ov?.converged ?? choices.data?.converged ?? null;

  return (
    <Screen
      overline="Explore the process"
      title={`Why actors choose · fit ${fitId}`}
      subtitle={study.data?.study.name}
      above={
        <TextLink href={modelId ? `/studies/${studyId}/models/${modelId}/fits/${fitId}` : `/studies/${studyId}/models`}>{modelId ? `← Fit ${fitId}` : '← Models'}</TextLink>
      }
      testID="choice-page"
    >
      <Banner tone="info" word="What this shows">
        {`Probabilities of the first ministep at the observed start of period ${period} (wave ${period}), from the fit's values. They change as the network changes during the period; the chain playback of a batch shows that.`}
      </Banner>
      {converged === false ? (
        <Banner tone="caution" word="Not converged">
          This fit did not converge, so these values may not describe the data; read the probabilities as a sketch only.
        </Banner>
      ) : null}
      {ov && ov.coveredPeriods.length > 1 ? (
        <SegmentedControl label="Period" options={ov.coveredPeriods.map((p) => ({ value: String(p), label: `Period ${p}` }))} value={String(period)} onChange={(v) => setPeriod(Number(v))} />
      ) : null}
      {overview.error ? <LoadError message={overview.error.message} onRetry={() => void overview.mutate()} /> : null}
      {overview.isLoading && !ov ? <Loading label="Computing the probabilities…" /> : null}
      {ov ? (
        <Card title="Every actor's first ministep" subtitle={`${n} actors (rows) × ${n} alters (columns), same order both ways. Choose a row to explain it below.`} testID="overview">
          <ChoiceChips label="Order the actors" options={ov.orderChoices} value={order} onChange={setOrder} />
          <OverviewGrid data={ov} selected={actor} onSelect={setActor} width={inner} />
          <GridLegend />
          {ov.absent.length || ov.fixedPairs ? (
            <Text variant="small" testID="overview-fixed">
              {[
                ov.absent.length ? `Not present at both waves of this period: ${ov.absent.map((i) => ov.actors[i]).join(', ')} (no ministeps; nobody may choose them).` : '',
                ov.fixedPairs ? `${ov.fixedPairs} pairs are fixed in this period and never offered (shown as 0%).` : '',
              ].join(' ').trim()}
            </Text>
          ) : null}
          <Text variant="caption">
            {ov.orderBy === 'cluster'
              ? 'Ordered so that actors with similar ties at the start sit together (average-linkage clustering of their tie profiles); blocks of dark cells show groups that tend to choose each other.'
              : 'Each row sums to 100% (the alters and "no change").'}
          </Text>
        </Card>
      ) : null}
      {ov ? (
        <ButtonRow>
          <Button label="Previous actor" icon="back" variant="secondary" disabled={pos <= 0} onPress={() => setActor(ov.order[pos - 1])} testID="actor-prev" />
          <Button label="Next actor" variant="secondary" disabled={pos < 0 || pos >= n - 1} onPress={() => setActor(ov.order[pos + 1])} testID="actor-next" />
        </ButtonRow>
      ) : null}
      {choices.error ? <LoadError message={choices.error.message} onRetry={() => void choices.mutate()} /> : null}
      {choices.data ? <Explanation data={choices.data} /> : choices.isLoading ? <Loading label="Explaining…" /> : null}
    </Screen>
  );
}
