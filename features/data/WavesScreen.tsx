/**
 * Data: the stored waves of a study. Per wave actors, ties, density, reciprocity, mean degree and the
 * share of pairs not observed; between waves the ties created, dissolved and kept, the Hamming
 * distance and the Jaccard index with a plain caution below 0.2; one small drawing per wave on one
 * shared seeded layout; the covariates; fixed pairs and who is present when; downloads in the upload
 * format. Phone first: everything stacks; on a wide screen the drawings stand side by side.
 */
import { useLocalSearchParams } from 'expo-router';
import { useState } from 'react';
import { View } from 'react-native';
import { can } from '../../shared/api';
import { JACCARD_CAUTION, type CovariateInfo, type FixedPairInfo, type StudyDataResponse, type WaveChange, type WaveSummary } from '../../shared/data';
import { parseStudyId, useStudy } from '../studies/queries';
import { StudyNotFound } from '../studies/StudyNotFound';
import { Badge } from '../ui/Badge';
import { Banner } from '../ui/Banner';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { DownloadLink } from '../ui/DownloadLink';
import { EmptyState } from '../ui/EmptyState';
import { formatDate } from '../ui/format';
import { Loading, LoadError } from '../ui/Loading';
import { Screen, Section } from '../ui/Screen';
import { Table, type Column } from '../ui/Table';
import { Text } from '../ui/Text';
import { TextLink } from '../ui/TextLink';
import { space } from '../ui/tokens';
import { useBreakpoint } from '../ui/useBreakpoint';
import { fmtDensity, fmtMean, fmtRatio, fmtShare } from './format';
import { dataDownloads, useDataLayout, useStudyData, useWaveTies } from './queries';
import { WaveDrawing, WaveLegend } from './WaveDrawing';

const Fig = ({ children }: { children: React.ReactNode }) => <Text variant="figure">{children}</Text>;

const waveColumns: Column<WaveSummary>[] = [
  { key: 'wave', title: 'Wave', render: (w) => <Text variant="bodyStrong">{`${w.index} · ${w.label}`}</Text>, sortValue: (w) => w.index },
  { key: 'actors', title: 'Actors', numeric: true, render: (w) => <Fig>{w.actors - (w.absent ?? 0)}</Fig>, sortValue: (w) => w.actors - (w.absent ?? 0) },
  { key: 'ties', title: 'Ties', numeric: true, render: (w) => <Fig>{w.ties}</Fig>, sortValue: (w) => w.ties },
  { key: 'density', title: 'Density', numeric: true, render: (w) => <Fig>{fmtDensity(w.density)}</Fig>, sortValue: (w) => w.density },
  { key: 'reciprocity', title: 'Reciprocity', numeric: true, render: (w) => <Fig>{fmtRatio(w.reciprocity)}</Fig>, sortValue: (w) => w.reciprocity },
  { key: 'degree', title: 'Mean degree', numeric: true, render: (w) => <Fig>{(w.ties / Math.max(1, w.actors - (w.absent ?? 0))).toFixed(2)}</Fig> },
  {
    key: 'missing',
    title: 'Not observed',
    numeric: true,
    render: (w) => <Fig>{fmtShare(w.missing / Math.max(1, w.actors * (w.actors - 1)))}</Fig>,
    sortValue: (w) => w.missing,
  },
];

const changeColumns: Column<WaveChange>[] = [
  { key: 'period', title: 'Between', render: (c) => <Text variant="bodyStrong">{`waves ${c.from} and ${c.to}`}</Text>, sortValue: (c) => c.from },
  { key: 'created', title: 'Created', numeric: true, render: (c) => <Fig>{c.created}</Fig>, sortValue: (c) => c.created },
  { key: 'dissolved', title: 'Dissolved', numeric: true, render: (c) => <Fig>{c.dissolved}</Fig>, sortValue: (c) => c.dissolved },
  { key: 'kept', title: 'Kept', numeric: true, render: (c) => <Fig>{c.stable}</Fig>, sortValue: (c) => c.stable },
  { key: 'hamming', title: 'Hamming', numeric: true, render: (c) => <Fig>{c.hamming}</Fig>, sortValue: (c) => c.hamming },
  {
    key: 'jaccard',
    title: 'Jaccard',
    numeric: true,
    render: (c) => (
      <View style={{ flexDirection: 'row', gap: space.half, alignItems: 'center', justifyContent: 'flex-end' }}>
        <Fig>{fmtRatio(c.jaccard)}</Fig>
        {c.jaccard !== null && c.jaccard < JACCARD_CAUTION ? <Badge label="low" tone="unsure" icon="caution" /> : null}
      </View>
    ),
    sortValue: (c) => c.jaccard,
  },
];

function covariateSummary(c: CovariateInfo): string {
  return c.summaries
    .map((s) => {
      const at = s.wave !== null ? `wave ${s.wave}: ` : '';
      if (s.kind === 'numeric') return `${at}${fmtMean(s.min)} to ${fmtMean(s.max)}, mean ${fmtMean(s.mean)}`;
      return `${at}${Object.entries(s.counts).map(([k, v]) => `${k} ${v}`).join(', ')}`;
    })
    .join('; ');
}

const covariateColumns: Column<CovariateInfo>[] = [
  { key: 'name', title: 'Covariate', render: (c) => <Text variant="bodyStrong">{c.name}</Text>, sortValue: (c) => c.name, flex: 1 },
  { key: 'kind', title: 'Kind', render: (c) => <Text>{c.kind}</Text>, sortValue: (c) => c.kind, flex: 1 },
  { key: 'changing', title: 'Over waves', render: (c) => <Text>{c.changing ? 'changes per wave' : 'constant'}</Text>, flex: 1 },
  { key: 'values', title: 'Values', render: (c) => <Text variant="small">{covariateSummary(c)}</Text>, flex: 3 },
  {
    key: 'missing',
    title: 'Missing',
    numeric: true,
    render: (c) => <Fig>{c.summaries.reduce((s, x) => s + x.missing, 0)}</Fig>,
    sortValue: (c) => c.summaries.reduce((s, x) => s + x.missing, 0),
  },
];

function DrawingCard({
  studyId,
  wave,
  data,
  positions,
  flexBasis,
}: {
  studyId: number;
  wave: WaveSummary;
  data: StudyDataResponse;
  positions: Array<[number, number]>;
  flexBasis: string;
}) {
  const current = useWaveTies(studyId, wave.index);
  const previous = useWaveTies(studyId, wave.index > 1 ? wave.index - 1 : null);
  const [width, setWidth] = useState(0);
  const before = new Set((previous.data?.ties ?? []).map(([a, b]) => `${a}-${b}`));
  const ties = (current.data?.ties ?? []).map(([from, to]) => ({ from, to, created: wave.index > 1 && before.has(`${from}-${to}`) === false }));
  const absent = data.actors.map((_, i) => data.presence?.[i]?.[wave.index - 1] === false);
  const created = ties.filter((t) => t.created).length;
  return (
    <Card style={{ flexBasis: flexBasis as never, flexGrow: 1, minWidth: 0 }} title={`Wave ${wave.index} · ${wave.label}`} subtitle={`${wave.ties} ties${wave.index > 1 ? `, ${created} new` : ''}`}>
      <View onLayout={(e) => setWidth(Math.floor(e.nativeEvent.layout.width))}>
        {width > 0 && current.data && (wave.index === 1 || previous.data) ? (
          <WaveDrawing
            actors={data.actors}
            positions={positions}
            ties={ties}
            absent={absent}
            width={width}
            label={`Wave ${wave.index} (${wave.label}): ${wave.ties} ties among ${wave.actors} actors${wave.index > 1 ? `, ${created} of them new since wave ${wave.index - 1}` : ''}.`}
            testID={`wave-drawing-${wave.index}`}
          />
        ) : current.error ? (
          <Text variant="muted">{current.error.message}</Text>
        ) : (
          <Loading label="Drawing…" />
        )}
      </View>
    </Card>
  );
}

function FixedPairs({ fixed }: { fixed: FixedPairInfo[] }) {
  const shown = fixed.slice(0, 40);
  return (
    <Card title="Fixed pairs" subtitle="Ties that cannot change; fits and batches never toggle them." testID="fixed-pairs">
      {shown.map((f, k) => (
        <Text key={k}>
          <Text variant="bodyStrong">{f.sender}</Text> → <Text variant="bodyStrong">{f.receiver}</Text>: {f.value === 0 ? 'never a tie' : 'always a tie'} at wave
          {f.waves.length === 1 ? '' : 's'} {f.waves.join(', ')}
        </Text>
      ))}
      {fixed.length > shown.length ? <Text variant="caption">and {fixed.length - shown.length} more (in the download).</Text> : null}
    </Card>
  );
}

function Presence({ data }: { data: StudyDataResponse }) {
  const rows = data.actors.map((a, i) => ({ a, p: data.presence![i] })).filter((r) => r.p.some((x) => !x));
  return (
    <Card title="Who is present when" subtitle="Actors who join or leave; an absent actor has no ties and does not act in that period." testID="presence">
      {rows.length === 0 ? <Text variant="muted">Every actor is present at every wave.</Text> : null}
      {rows.map((r) => (
        <Text key={r.a}>
          <Text variant="bodyStrong">{r.a}</Text>: present at wave{r.p.filter(Boolean).length === 1 ? '' : 's'}{' '}
          {r.p.map((x, k) => (x ? k + 1 : null)).filter((x) => x !== null).join(', ') || 'none'}
        </Text>
      ))}
    </Card>
  );
}

export function WavesScreen() {
  const params = useLocalSearchParams<{ studyId: string; stored?: string }>();
  const studyId = parseStudyId(params.studyId);
  const study = useStudy(studyId);
  const data = useStudyData(studyId);
  const layout = useDataLayout(studyId, data.data?.hasData === true);
  const { compact, breakpoint } = useBreakpoint();

  if (studyId === null || study.error?.status === 404 || study.error?.status === 403) return <StudyNotFound />;
  const role = study.data?.study.myRole;
  const mayUpload = can(role, 'editData');
  const d = data.data;
  const uploadButton = mayUpload ? (
    <Button label={d?.hasData ? 'Upload new data' : 'Upload data'} icon="plus" href={`/studies/${studyId}/data/upload`} variant={d?.hasData ? 'secondary' : 'primary'} />
  ) : undefined;
  const cautions = d?.changes.filter((c) => c.caution) ?? [];
  const perRow = compact ? 1 : breakpoint === 'wide' ? 3 : 2;

  return (
    <Screen
      overline={study.data?.study.name ?? 'Study'}
      title="Data"
      subtitle={d?.hasData && d.uploadedAt ? `${d.waves.length} waves of ${d.actors.length} actors, uploaded ${formatDate(d.uploadedAt)}` : undefined}
      above={<TextLink href={`/studies/${studyId}`}>← Study</TextLink>}
      actions={uploadButton}
    >
      {data.error ? <LoadError message={data.error.message} onRetry={() => void data.mutate()} /> : null}
      {!d && !data.error ? <Loading label="Loading the data…" /> : null}
      {params.stored && d?.hasData ? (
        <Banner tone="success" testID="stored-banner">
          Stored {d.waves.length} waves of {d.actors.length} actors and {d.covariates.length} covariate{d.covariates.length === 1 ? '' : 's'}.
        </Banner>
      ) : null}
      {d && !d.hasData ? (
        <EmptyState
          title="No data yet"
          message={mayUpload ? 'Upload the waves of the network and an actors file with covariates to start.' : 'A lead or statistician of this study uploads the data.'}
          action={uploadButton}
        />
      ) : null}
      {d?.hasData ? (
        <>
          <Section title="Waves" description="Density counts observed pairs only; reciprocity is the share of ties that are returned.">
            <Table label="Waves" columns={waveColumns} rows={d.waves} rowKey={(w) => w.index} testID="waves-table" />
          </Section>
          <Section title="Change between waves" description="Over the pairs observed in both waves. Hamming distance: ties created plus dissolved. Jaccard index: kept ties over all ties of either wave.">
            <Table label="Change between waves" columns={changeColumns} rows={d.changes} rowKey={(c) => c.from} testID="changes-table" />
            {cautions.map((c) => (
              <Banner key={c.from} tone="caution" testID={`caution-${c.from}`}>
                {c.caution}
              </Banner>
            ))}
            {cautions.length === 0 ? (
              <Text variant="caption">Every Jaccard index is at least {JACCARD_CAUTION}: the change between waves is gradual enough for the model (common practice).</Text>
            ) : null}
          </Section>
          <Section title="The waves drawn" description="Every drawing puts each actor in the same place, so you can follow people from wave to wave.">
            <WaveLegend withAbsent={Boolean(d.presence)} />
            {layout.data ? (
              <View style={compact ? { gap: space.s2 } : { flexDirection: 'row', flexWrap: 'wrap', gap: space.s2 }} testID="wave-drawings">
                {d.waves.map((w) => (
                  <DrawingCard key={w.index} studyId={studyId} wave={w} data={d} positions={layout.data!.positions} flexBasis={compact ? 'auto' : `${Math.floor(100 / perRow) - 2}%`} />
                ))}
              </View>
            ) : layout.error ? (
              <Text variant="muted">{layout.error.message}</Text>
            ) : (
              <Loading label="Placing the actors…" />
            )}
          </Section>
          <Section title="Covariates">
            {d.covariates.length ? (
              <Table label="Covariates" columns={covariateColumns} rows={d.covariates} rowKey={(c) => c.name} testID="covariates-table" />
            ) : (
              <Text variant="muted">This study has no covariates.</Text>
            )}
          </Section>
          {d.fixed?.length || d.presence ? (
            <Section title="Fixed pairs and composition">
              <View style={compact ? { gap: space.s2 } : { flexDirection: 'row', gap: space.s2, flexWrap: 'wrap' }}>
                {d.fixed?.length ? <FixedPairs fixed={d.fixed} /> : null}
                {d.presence ? <Presence data={d} /> : null}
              </View>
            </Section>
          ) : null}
          <Section title="Downloads" description="The stored data in the format the upload reads, so a downloaded set uploads again unchanged.">
            <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.s1 }}>
              {d.waves.map((w) => (
                <DownloadLink key={w.index} href={dataDownloads.wave(studyId, w.index)} label={`Wave ${w.index}`} accessibilityLabel={`Download wave ${w.index} (${w.label}) as CSV`} />
              ))}
              <DownloadLink href={dataDownloads.actors(studyId)} label="Actors" accessibilityLabel="Download the actors file with covariates as CSV" />
              {d.fixed?.length ? <DownloadLink href={dataDownloads.fixed(studyId)} label="Fixed pairs" accessibilityLabel="Download the fixed pairs as CSV" /> : null}
            </View>
          </Section>
        </>
      ) : null}
    </Screen>
  );
}
