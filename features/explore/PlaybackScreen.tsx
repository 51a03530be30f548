/**
 * How one chain travels from one wave to the next: a batch's chain re-simulated from its seed and
 * played on the period's continuous-time axis (play, pause, step, back, scrub), with the network
 * drawing, the counts so far and the distance to the observed next wave; up to three chains side by
 * side on a wide screen, on one shared clock. Below, tie timelines: the share of chains holding chosen
 * ties over the period, against the observed start and end.
 */
import { useLocalSearchParams } from 'expo-router';
import { useEffect, useMemo, useRef, useState } from 'react';
import { View, type GestureResponderEvent, type LayoutChangeEvent } from 'react-native';
import Svg, { Line, Rect } from 'react-native-svg';
import { VictoryAxis, VictoryChart, VictoryLine, VictoryScatter } from 'victory-native';
import type { ReplayResponse, TimelinesResponse } from '../../shared/explore';
import { useBatch } from '../batches/queries';
import { parseId } from '../api/params';
import { parseStudyId, useStudy } from '../studies/queries';
import { StudyNotFound } from '../studies/StudyNotFound';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Loading, LoadError } from '../ui/Loading';
import { Screen } from '../ui/Screen';
import { SegmentedControl } from '../ui/SegmentedControl';
import { Text } from '../ui/Text';
import { TextLink } from '../ui/TextLink';
import { colors } from '../ui/theme';
import { fonts, space } from '../ui/tokens';
import { useBreakpoint } from '../ui/useBreakpoint';
import { ChainDrawing } from './ChainDrawing';
import { frameOf, mergedTimes, stepBack, stepForward, stepsAtTime, trackOf, type ChainTrack } from './playback';
import { useReplay, useTimelines } from './queries';

/** Seconds for the whole period at normal speed. */
const PERIOD_SECONDS = 24;

function Figure({ label, value, hint, testID }: { label: string; value: string; hint?: string; testID?: string }) {
  return (
    <View style={{ minWidth: 92, gap: 0 }} accessibilityLabel={`${label}: ${value}${hint ? `, ${hint}` : ''}`} testID={testID}>
      <Text variant="figureLarge" style={{ fontSize: 22 }}>
        {value}
      </Text>
      <Text variant="label">{label}</Text>
      {hint ? <Text variant="caption">{hint}</Text> : null}
    </View>
  );
}

/** The time axis: a track to press or drag, the ministeps of the first chain as a rug (created up, dissolved down, no change as a dot). */
function TimeAxis({ t, onScrub, track }: { t: number; onScrub: (t: number) => void; track: ChainTrack | null }) {
  const [w, setW] = useState(0);
  const H = 44;
  const at = (e: GestureResponderEvent) => {
    if (w > 0) onScrub(Math.max(0, Math.min(1, e.nativeEvent.locationX / w)));
  };
  return (
    <View
      onLayout={(e: LayoutChangeEvent) => setW(e.nativeEvent.layout.width)}
      onStartShouldSetResponder={() => true}
      onMoveShouldSetResponder={() => true}
      onResponderGrant={at}
      onResponderMove={at}
      accessible
      accessibilityRole="adjustable"
      accessibilityLabel={`Time in the period: ${t.toFixed(3)} of 1`}
      accessibilityActions={[{ name: 'increment' }, { name: 'decrement' }]}
      onAccessibilityAction={(e) => onScrub(Math.max(0, Math.min(1, t + (e.nativeEvent.actionName === 'increment' ? 0.05 : -0.05))))}
      style={{ height: H + 18, cursor: 'pointer' } as object}
      testID="time-axis"
    >
      {w > 0 ? (
        <View pointerEvents="none">
          <Svg width={w} height={H}>
            <Rect x={0} y={H / 2 - 3} width={w} height={6} fill={colors.surfaceSunk} />
            <Rect x={0} y={H / 2 - 3} width={w * t} height={6} fill={colors.accentSoft} />
            {track
              ? track.times.map((s, k) => {
                  const x = s * w;
                  const sign = track.replay.steps.sign[k];
                  if (sign === 0) return <Rect key={k} x={x - 0.5} y={H / 2 - 1} width={1} height={2} fill={colors.muted} />;
                  return <Line key={k} x1={x} x2={x} y1={H / 2} y2={sign > 0 ? 4 : H - 4} stroke={sign > 0 ? colors.accent : colors.fail} strokeWidth={1.5} />;
                })
              : null}
            <Rect x={Math.max(0, Math.min(w - 4, w * t - 2))} y={0} width={4} height={H} fill={colors.ink} />
          </Svg>
          <View style={{ flexDirection: 'row', justifyContent: 'space-between' }}>
            {['0 (wave start)', '0.25', '0.5', '0.75', '1 (next wave)'].map((l) => (
              <Text key={l} variant="caption" style={{ fontFamily: fonts.mono, fontSize: 11 }}>
                {l}
              </Text>
            ))}
          </View>
        </View>
      ) : null}
    </View>
  );
}

function ChainPanel({ replay, track, t, width, index, picker, explainHref }: {
  replay: ReplayResponse;
  track: ChainTrack;
  t: number;
  width: number;
  index: number;
  picker: React.ReactNode;
  /** Link to the fit's choice explanation of an actor, when the batch simulates a stored fit. */
  explainHref?: (actor: number) => string;
}) {
  const frame = useMemo(() => frameOf(track, stepsAtTime(track, t)), [track, t]);
  const last = frame.last;
  const who = last ? replay.actors[last.actor] : null;
  const lastWords = !last
    ? 'No ministep yet.'
    : last.alter < 0
      ? `Latest: ${who} had a chance and changed nothing.`
      : `Latest: ${who} ${replay.steps.sign[frame.done - 1] > 0 ? 'created' : 'dissolved'} the tie to ${replay.actors[last.alter]}.`;
  return (
    <View style={{ width, gap: space.s1 }} testID={`chain-panel-${index}`}>
      {picker}
      <ChainDrawing
        actors={replay.actors}
        positions={replay.positions}
        frame={frame}
        width={width}
        showNames={width >= 340 && replay.actors.length <= 30}
        label={`Chain ${replay.chain} at time ${t.toFixed(2)}: ${frame.done} ministeps, ${frame.changes} changes. ${lastWords}`}
      />
      <Text variant="small" testID={`chain-latest-${index}`}>
        {lastWords}
      </Text>
      {last && explainHref ? (
        <TextLink href={explainHref(last.actor)}>{`How ${who} weighs the options at the start of the period →`}</TextLink>
      ) : null}
      <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.s2 }} testID={`chain-counts-${index}`}>
        <Figure label="Ministeps" value={String(frame.done)} hint={`of ${replay.ministeps}`} testID={`count-ministeps-${index}`} />
        <Figure label="Changes" value={String(frame.changes)} />
        <Figure label="No change" value={String(frame.noChange)} />
        <Figure label="Distance" value={String(frame.distance)} hint={`to wave ${replay.period + 1} (start ${track.distance[0]})`} testID={`count-distance-${index}`} />
      </View>
      <Text variant="caption">
        {replay.matchesStored
          ? 'Re-simulated from its seed; its end statistics equal the ones the batch stored for this chain.'
          : 'Caution: re-simulated from its seed, but its end statistics differ from the stored ones (the data or the program changed since the batch ran).'}
      </Text>
    </View>
  );
}

const LINE_STYLES = [
  { colour: colors.accent, dash: undefined },
  { colour: colors.envelopeNarrow, dash: '6,4' },
  { colour: colors.unsure, dash: '2,3' },
  { colour: colors.fail, dash: '10,3,2,3' },
  { colour: colors.pass, dash: '12,6' },
  { colour: colors.ink, dash: '1,5' },
];

function TimelineChart({ data, t, width }: { data: TimelinesResponse; t: number; width: number }) {
  const axisText = { fontFamily: fonts.mono, fontSize: 11, fill: colors.muted };
  const name = (i: number) => data.actors[i] ?? String(i);
  return (
    <View accessible accessibilityRole="image" accessibilityLabel={data.pairs.map((p) => `${name(p.from)} to ${name(p.to)}: ${Math.round(p.shares[0] * 100)}% at the start, ${Math.round(p.shares[p.shares.length - 1] * 100)}% at the end`).join('; ')} testID="timeline-chart">
      <VictoryChart width={width} height={240} padding={{ top: 12, bottom: 36, left: 48, right: 16 }} domain={{ x: [0, 1], y: [0, 1] }}>
        <VictoryAxis tickValues={[0, 0.25, 0.5, 0.75, 1]} style={{ tickLabels: axisText, axis: { stroke: colors.ruleStrong } }} />
        <VictoryAxis dependentAxis tickValues={[0, 0.25, 0.5, 0.75, 1]} tickFormat={(v: number) => `${Math.round(v * 100)}%`} style={{ tickLabels: axisText, axis: { stroke: colors.ruleStrong }, grid: { stroke: colors.rule } }} />
        <VictoryLine data={[{ x: t, y: 0 }, { x: t, y: 1 }]} style={{ data: { stroke: colors.ink, strokeWidth: 1, strokeDasharray: '3,3' } }} />
        {data.pairs.map((p, k) => {
          const look = LINE_STYLES[k % LINE_STYLES.length];
          return <VictoryLine key={`l${k}`} data={data.grid.map((x, g) => ({ x, y: p.shares[g] }))} style={{ data: { stroke: look.colour, strokeWidth: 2.5, strokeDasharray: look.dash } }} />;
        })}
        {data.pairs.map((p, k) => {
          const look = LINE_STYLES[k % LINE_STYLES.length];
          const pts = [{ x: 0, y: p.observedStart }, ...(p.observedEnd === null ? [] : [{ x: 1, y: p.observedEnd }])];
          return <VictoryScatter key={`o${k}`} data={pts} symbol="square" size={5} style={{ data: { fill: colors.surface, stroke: look.colour, strokeWidth: 2 } }} />;
        })}
      </VictoryChart>
    </View>
  );
}

function Timelines({ studyId, batchId, period, candidates, actors, batchChains, t, width }: {
  studyId: number;
  batchId: number;
  period: number;
  candidates: Array<[number, number]>;
  actors: string[];
  batchChains: number;
  t: number;
  width: number;
}) {
  const [picked, setPicked] = useState<string[]>([]);
  const [scope, setScope] = useState<'some' | 'all'>('some');
  const keys = candidates.map(([i, j]) => `${i}-${j}`);
  const chosen = (picked.length ? picked : keys.slice(0, 3)).filter((k) => keys.includes(k));
  const pairs = chosen.map((k) => k.split('-').map(Number) as [number, number]);
  const few = Math.min(100, batchChains);
  const tl = useTimelines(studyId, batchId, period, pairs, scope === 'all' ? null : few);
  const toggle = (k: string) => {
    const base = picked.length ? picked : keys.slice(0, 3);
    setPicked(base.includes(k) ? base.filter((x) => x !== k) : base.length >= 6 ? base : [...base, k]);
  };
  const name = (i: number) => actors[i] ?? String(i);
  if (!candidates.length) return <Text variant="muted">This chain changed no tie, so there is no pair to follow yet; choose another chain.</Text>;
  return (
    <Card title="Tie timelines" subtitle="Share of chains holding a tie over the period's time. Squares: the observed value at the start and at the next wave." testID="timelines">
      <Text variant="label">Pairs this chain changed (choose up to 6)</Text>
      <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.s1 }}>
        {candidates.slice(0, 12).map(([i, j], k) => {
          const key = keys[k];
          const on = chosen.includes(key);
          return <Button key={key} label={`${on ? '✓ ' : ''}${name(i)} → ${name(j)}`} variant={on ? 'primary' : 'secondary'} onPress={() => toggle(key)} accessibilityLabel={`${on ? 'Stop following' : 'Follow'} the tie ${name(i)} to ${name(j)}`} testID={`pair-${key}`} />;
        })}
      </View>
      {batchChains > few ? (
        <SegmentedControl
          label="Chains re-simulated"
          options={[
            { value: 'some', label: `First ${few}` },
            { value: 'all', label: `All ${batchChains}` },
          ]}
          value={scope}
          onChange={(v) => setScope(v)}
        />
      ) : null}
      {tl.error ? <LoadError message={tl.error.message} onRetry={() => void tl.mutate()} /> : null}
      {tl.isLoading && !tl.data ? <Loading label="Re-simulating the chains…" /> : null}
      {tl.data && pairs.length ? (
        <>
          <TimelineChart data={tl.data} t={t} width={width} />
          <View style={{ gap: 2 }}>
            {tl.data.pairs.map((p, k) => {
              const look = LINE_STYLES[k % LINE_STYLES.length];
              const end = p.shares[p.shares.length - 1];
              return (
                <View key={`${p.from}-${p.to}`} style={{ flexDirection: 'row', alignItems: 'center', gap: space.s1 }}>
                  <Svg width={28} height={10}>
                    <Line x1={0} y1={5} x2={28} y2={5} stroke={look.colour} strokeWidth={2.5} strokeDasharray={look.dash} />
                  </Svg>
                  <Text variant="small" style={{ flexShrink: 1 }}>
                    {`${name(p.from)} → ${name(p.to)}: observed ${p.observedStart ? 'tie' : 'no tie'} at the start, ${p.observedEnd === null ? 'not observed' : p.observedEnd ? 'tie' : 'no tie'} at the next wave; ${Math.round(end * 100)}% of chains end with it${tl.data!.chains === tl.data!.batchChains ? '' : ` (all ${tl.data!.batchChains} chains: ${Math.round(p.storedEndShare * 100)}%)`}.`}
                  </Text>
                </View>
              );
            })}
          </View>
          <Text variant="caption">
            {`From ${tl.data.chains} of ${tl.data.batchChains} chains re-simulated from their seeds${tl.data.chains < 200 ? '; with this few chains each share is uncertain by several percentage points' : ''}. The dashed vertical line is the playback clock.`}
          </Text>
        </>
      ) : null}
    </Card>
  );
}

export function PlaybackScreen() {
  const params = useLocalSearchParams<{ studyId: string; batchId: string; chain?: string }>();
  const studyId = parseStudyId(params.studyId);
  const batchId = parseId(params.batchId);
  const study = useStudy(studyId);
  const batch = useBatch(studyId, batchId);
  const b = batch.data?.batch;
  const [periodChoice, setPeriodChoice] = useState<number | null>(null);
  const period = periodChoice ?? b?.periods[0] ?? null;
  const [chains, setChains] = useState<number[]>(() => [parseId(params.chain) ?? 1]);
  const [t, setT] = useState(0);
  const [playing, setPlaying] = useState(false);
  const [speed, setSpeed] = useState<'1' | '4'>('1');
  const { width, gutter, breakpoint, compact } = useBreakpoint();
  const wide = breakpoint === 'wide';
  const inner = Math.min(width - (breakpoint === 'compact' ? 0 : 232), 1100) - 2 * gutter;
  const shown = wide ? chains : chains.slice(0, 1);
  const r0 = useReplay(studyId, b?.state === 'done' ? batchId : null, period, shown[0] ?? null);
  const r1 = useReplay(studyId, b?.state === 'done' ? batchId : null, period, shown[1] ?? null);
  const r2 = useReplay(studyId, b?.state === 'done' ? batchId : null, period, shown[2] ?? null);
  const replays = [r0, r1, r2].slice(0, shown.length);
  const tracks = useMemo(() => replays.map((r) => (r.data ? trackOf(r.data) : null)), [r0.data, r1.data, r2.data, shown.length]); // eslint-disable-line react-hooks/exhaustive-deps
  const ready = tracks.filter((x): x is ChainTrack => x !== null);
  const stops = useMemo(() => mergedTimes(ready), [tracks]); // eslint-disable-line react-hooks/exhaustive-deps
  const tRef = useRef(t);
  tRef.current = t;

  useEffect(() => {
    if (!playing) return;
    let last = Date.now();
    const id = setInterval(() => {
      const now = Date.now();
      const next = tRef.current + ((now - last) / 1000 / PERIOD_SECONDS) * Number(speed);
      last = now;
      if (next >= 1) {
        setT(1);
        setPlaying(false);
      } else setT(next);
    }, 50);
    return () => clearInterval(id);
  }, [playing, speed]);

  const first = r0.data;
  const candidates = useMemoCandidates(first);

  if (studyId === null || batchId === null || study.error?.status === 404 || batch.error?.status === 404) return <StudyNotFound />;

  const total = b?.chains ?? 1;
  const setChain = (slot: number, c: number) => {
    const v = Math.max(1, Math.min(total, c));
    setChains((cs) => cs.map((x, k) => (k === slot ? v : x)));
    setT(0);
    setPlaying(false);
  };
  const randomChain = () => 1 + Math.floor(Math.random() * total);
  const panelGap = space.s3;
  const panelWidth = Math.floor(Math.min(wide ? 520 : 560, (inner - panelGap * (shown.length - 1)) / shown.length));

  const stop = () => setPlaying(false);
  const controls =
    b?.state === 'done' ? (
      <Card testID="controls">
        <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.s1, alignItems: 'center' }}>
          <Button label="Back" icon="back" variant="secondary" onPress={() => { stop(); setT(stepBack(stops, t)); }} disabled={t <= 0} testID="step-back" />
          <Button label={playing ? 'Pause' : t >= 1 ? 'Play again' : 'Play'} onPress={() => { if (t >= 1) setT(0); setPlaying((p) => !p); }} testID="play" />
          <Button label="Step" variant="secondary" onPress={() => { stop(); setT(stepForward(stops, t)); }} disabled={t >= 1} testID="step-forward" />
          <Button label="Start" variant="quiet" onPress={() => { stop(); setT(0); }} accessibilityLabel="To the start of the period" />
          <Button label="End" variant="quiet" onPress={() => { stop(); setT(1); }} accessibilityLabel="To the end of the period" />
          <SegmentedControl label="Speed" hideLabel options={[{ value: '1', label: `${PERIOD_SECONDS} s` }, { value: '4', label: `${PERIOD_SECONDS / 4} s` }]} value={speed} onChange={setSpeed} />
          {wide && chains.length < 3 ? (
            <Button label="Add a chain beside it" icon="plus" variant="secondary" onPress={() => setChains((cs) => [...cs, randomChain()])} testID="chain-add" />
          ) : null}
        </View>
        <TimeAxis t={t} onScrub={(v) => { setT(v); stop(); }} track={ready[0] ?? null} />
        <Text variant="caption" testID="clock">{`Time ${t.toFixed(3)} of the period (the whole period plays in ${Number(speed) === 1 ? PERIOD_SECONDS : PERIOD_SECONDS / 4} s). Marks on the axis: ties created (up), dissolved (down), no change (dots)${shown.length > 1 ? ', of the first chain' : ''}. Press or drag on the axis to move.`}</Text>
      </Card>
    ) : null;
  const panels = (
    <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: panelGap, alignItems: 'flex-start' }}>
      {replays.map((r, k) =>
        r.data && tracks[k] ? (
          <ChainPanel
            key={`${k}-${r.data.chain}`}
            replay={r.data}
            track={tracks[k]!}
            t={t}
            width={panelWidth}
            index={k}
            explainHref={b?.fitId ? (a) => `/studies/${studyId}/explore/fits/${b.fitId}?actor=${a}&period=${period}` : undefined}
            picker={
              <ChainPicker
                chain={shown[k]}
                total={total}
                index={k}
                onChange={(c) => setChain(k, c)}
                onRandom={() => setChain(k, randomChain())}
                onRemove={k > 0 ? () => setChains((cs) => cs.filter((_, x) => x !== k)) : undefined}
              />
            }
          />
        ) : null,
      )}
    </View>
  );

  return (
    <Screen
      overline="Explore the process · chain playback"
      title={b?.label ?? 'Chain playback'}
      subtitle={period !== null ? `One possible path from wave ${period} to wave ${period + 1}, re-simulated from its seed: not a prediction.` : study.data?.study.name}
      above={<TextLink href={`/studies/${studyId}/batches/${batchId}`}>← Batch</TextLink>}
      testID="playback-page"
    >
      {batch.error ? <LoadError message={batch.error.message} onRetry={() => void batch.mutate()} /> : null}
      {b && b.state !== 'done' ? <Text variant="muted">Chains can be replayed once the batch is done.</Text> : null}
      {b && b.periods.length > 1 ? (
        <SegmentedControl
          label="Period"
          hideLabel
          options={b.periods.map((p) => ({ value: String(p), label: `Period ${p}` }))}
          value={String(period)}
          onChange={(v) => {
            setPeriodChoice(Number(v));
            setT(0);
            stop();
          }}
        />
      ) : null}
      {replays.some((r) => r.error) ? <LoadError message={replays.find((r) => r.error)!.error!.message} /> : null}
      {replays.some((r) => r.isLoading) && !ready.length ? <Loading label="Re-simulating the chain…" /> : null}
      {compact ? (
        <>
          {panels}
          {controls}
        </>
      ) : (
        <>
          {controls}
          {panels}
        </>
      )}
      {!wide && chains.length > 1 ? <Text variant="caption">On a wider screen up to three chains show side by side.</Text> : null}
      {first ? (
        <Text variant="caption">
          {`How to read it: each ministep gives one actor a chance to change one tie (or none). Thin grey arrows are the ties at this moment; a thick teal line with "+" is a tie just created, a dashed red line with "−" one just dissolved (the latest change is the boldest); the dashed ring marks the actor of the latest ministep. Distance counts ordered pairs that differ from the observed wave ${first.period + 1}${first.unobservedEnd.length ? ', leaving out pairs not observed there' : ''}. Node positions are fixed (a seeded force layout of both waves).`}
        </Text>
      ) : null}
      {first && period !== null && b ? (
        <Timelines studyId={studyId} batchId={batchId} period={period} candidates={candidates} actors={first.actors} batchChains={b.chains} t={t} width={Math.min(inner - 34, 720)} />
      ) : null}
    </Screen>
  );
}

function ChainPicker({ chain, total, index, onChange, onRandom, onRemove }: { chain: number; total: number; index: number; onChange: (c: number) => void; onRandom: () => void; onRemove?: () => void }) {
  return (
    <View style={{ flexDirection: 'row', alignItems: 'center', gap: 4, flexWrap: 'wrap' }}>
      <Button label="−" variant="secondary" onPress={() => onChange(chain - 1)} disabled={chain <= 1} accessibilityLabel={`Chain before ${chain}`} testID={`chain-minus-${index}`} />
      <Text variant="bodyStrong" style={{ minWidth: 120, textAlign: 'center' }} testID={`chain-number-${index}`}>{`Chain ${chain} of ${total}`}</Text>
      <Button label="+" variant="secondary" onPress={() => onChange(chain + 1)} disabled={chain >= total} accessibilityLabel={`Chain after ${chain}`} testID={`chain-plus-${index}`} />
      <Button label="Random" variant="quiet" onPress={onRandom} accessibilityLabel={`A random chain in place of chain ${chain}`} />
      {onRemove ? <Button label="Remove" variant="quiet" onPress={onRemove} accessibilityLabel={`Remove chain ${chain}`} /> : null}
    </View>
  );
}

/** Distinct pairs the chain changed, in order of their first change. */
function useMemoCandidates(replay: ReplayResponse | undefined): Array<[number, number]> {
  return useMemo(() => {
    if (!replay) return [];
    const seen = new Set<string>();
    const out: Array<[number, number]> = [];
    for (let s = 0; s < replay.steps.t.length; s++) {
      const j = replay.steps.alter[s];
      if (j < 0) continue;
      const key = `${replay.steps.actor[s]}-${j}`;
      if (!seen.has(key)) {
        seen.add(key);
        out.push([replay.steps.actor[s], j]);
      }
    }
    return out;
  }, [replay]);
}

