/**
 * Upload: choose files (or paste CSV text), give each a role, read the preview the server builds with
 * the upload's own parser (nothing stored), fix what it points at, then store in one action. Replacing
 * data that models, fits or batches were built on needs a tick that says what becomes stale.
 * Reviewers see the file conventions and a link to the stored data, nothing to change.
 */
import { useLocalSearchParams, useRouter } from 'expo-router';
import { useEffect, useMemo, useRef, useState } from 'react';
import { View } from 'react-native';
import { can } from '../../shared/api';
import { fixedPairsFileTitle, type DataFormat, type DataPreviewResponse, type DataProblem } from '../../shared/data';
import { isApiError, messageOf } from '../api/client';
import { ChoiceChips } from '../consensus/ChoiceChips';
import { parseStudyId, useStudy } from '../studies/queries';
import { StudyNotFound } from '../studies/StudyNotFound';
import { Badge } from '../ui/Badge';
import { Banner } from '../ui/Banner';
import { Button, ButtonRow } from '../ui/Button';
import { Card } from '../ui/Card';
import { Checkbox } from '../ui/Checkbox';
import { Loading } from '../ui/Loading';
import { Screen, Section } from '../ui/Screen';
import { SegmentedControl } from '../ui/SegmentedControl';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { TextLink } from '../ui/TextLink';
import { colors } from '../ui/theme';
import { fonts, radius, space } from '../ui/tokens';
import { useBreakpoint } from '../ui/useBreakpoint';
import { FilePicker } from './FilePicker';
import { FormatGuide } from './FormatGuide';
import { useDataMutations } from './queries';
import { fmtShare, fmtDensity } from './format';
import { addFiles, delimiterOf, fieldsOf, guessFormat, lines, localProblems, newEntry, placeProblems, uploadBody, waveEntries, type FileRole, type UploadEntry } from './upload';

const ROLE_WORDS: Record<Exclude<FileRole, 'wave'>, string> = { actors: 'Actors file', fixed: 'Fixed pairs', skip: 'Leave out' };

function roleValue(e: UploadEntry): string {
  return e.role === 'wave' ? `wave:${e.wave}` : e.role;
}

/** One problem beside the line it names: line number, the line with the column marked, the message. */
function ProblemLine({ entry, problem }: { entry: UploadEntry | null; problem: DataProblem }) {
  const text = entry && problem.line ? (lines(entry.content)[problem.line - 1] ?? null) : null;
  const fields = text !== null && entry ? fieldsOf(text, delimiterOf(entry.content)) : null;
  const place = problem.line ? `Line ${problem.line}${problem.column ? `, column ${problem.column}` : ''}` : entry ? 'The whole file' : problem.file || 'The upload';
  const delim = entry ? delimiterOf(entry.content) : ',';
  return (
    <View
      testID="upload-problem"
      accessibilityLabel={`${problem.file ? `${problem.file}: ` : ''}${place}: ${problem.message}`}
      style={{ gap: space.half, borderLeftWidth: 3, borderLeftColor: colors.fail, paddingLeft: space.s1 }}
    >
      <Text variant="label" style={{ color: colors.fail }}>
        {place}
      </Text>
      {fields ? (
        <View style={{ flexDirection: 'row', backgroundColor: colors.surfaceSunk, borderRadius: radius.sm, paddingHorizontal: space.s1, paddingVertical: space.half }}>
          <Text variant="figure" style={{ color: colors.muted, marginRight: space.s1 }}>
            {String(problem.line).padStart(3, ' ')}
          </Text>
          <Text variant="figure" style={{ flexShrink: 1 }} testID="upload-problem-line">
            {fields.map((f, k) => (
              <Text
                key={k}
                variant="figure"
                style={problem.column === k + 1 ? { backgroundColor: colors.failSoft, color: colors.fail, fontFamily: fonts.monoMedium, textDecorationLine: 'underline' } : null}
              >
                {k > 0 ? (delim === '\t' ? '⇥' : delim) : ''}
                {f === '' && problem.column === k + 1 ? '␣' : f}
              </Text>
            ))}
          </Text>
        </View>
      ) : null}
      <Text>{problem.message}</Text>
    </View>
  );
}

function EntryCard({
  entry,
  waveCount,
  problems,
  localIssues,
  onChange,
  onRemove,
  compact,
}: {
  entry: UploadEntry;
  waveCount: number;
  problems: DataProblem[];
  localIssues: string[];
  onChange: (change: Partial<UploadEntry>) => void;
  onRemove: () => void;
  compact: boolean;
}) {
  const count = lines(entry.content).filter((l) => l.trim() !== '').length;
  const options = [
    ...Array.from({ length: Math.max(waveCount, 1) + (entry.role === 'wave' ? 0 : 1) }, (_, k) => ({ value: `wave:${k + 1}`, label: `Wave ${k + 1}` })),
    ...(['actors', 'fixed', 'skip'] as const).map((r) => ({ value: r, label: ROLE_WORDS[r] })),
  ];
  const bad = problems.length + localIssues.length;
  return (
    <Card testID={`upload-entry-${entry.name}`} style={bad ? { borderColor: colors.fail } : null}>
      <View style={{ flexDirection: compact ? 'column' : 'row', justifyContent: 'space-between', gap: space.s1 }}>
        <View style={{ gap: 2, flexShrink: 1 }}>
          <Text variant="bodyStrong">{entry.name}</Text>
          <Text variant="caption">
            {entry.pasted ? 'Pasted text' : 'File'} · {entry.tooLarge ? 'not read' : `${count} line${count === 1 ? '' : 's'}`}
          </Text>
        </View>
        <View style={{ flexDirection: 'row', alignItems: 'center', gap: space.s1 }}>
          {bad ? <Badge label={`${bad} problem${bad === 1 ? '' : 's'}`} tone="fail" /> : entry.role !== 'skip' ? <Badge label="Readable" tone="pass" /> : null}
          <Button label="Remove" variant="quiet" icon="trash" accessibilityLabel={`Remove ${entry.name}`} onPress={onRemove} />
        </View>
      </View>
      <ChoiceChips
        label={`Role of ${entry.name}`}
        options={options}
        value={roleValue(entry)}
        onChange={(v) => {
          if (v.startsWith('wave:')) onChange({ role: 'wave', wave: Number(v.slice(5)) });
          else onChange({ role: v as FileRole });
        }}
      />
      {entry.role === 'wave' ? (
        <TextField label={`Label of wave ${entry.wave}`} value={entry.label} onChangeText={(label) => onChange({ label })} maxLength={60} />
      ) : null}
      {entry.pasted ? (
        <TextField
          label={`CSV text of ${entry.name}`}
          multiline
          value={entry.content}
          onChangeText={(content) => onChange({ content, bytes: content.length })}
          hint="One record a line, fields separated by commas."
        />
      ) : null}
      {localIssues.map((m, k) => (
        <Banner key={`l${k}`} tone="error">
          {m}
        </Banner>
      ))}
      {problems.length ? (
        <View style={{ gap: space.s2 }} accessibilityLabel={`Problems in ${entry.name}`}>
          {problems.map((p, k) => (
            <ProblemLine key={k} entry={entry} problem={p} />
          ))}
        </View>
      ) : null}
    </Card>
  );
}

function PreviewView({ preview }: { preview: Extract<DataPreviewResponse, { ok: true }>['preview'] }) {
  const n = preview.actors.length;
  return (
    <View style={{ gap: space.s2 }} testID="upload-preview">
      <Text variant="lead">
        {n} actors, {preview.waves.length} waves, {preview.covariates.length} covariate{preview.covariates.length === 1 ? '' : 's'}
        {preview.fixedPairs ? `, ${preview.fixedPairs} fixed pair${preview.fixedPairs === 1 ? '' : 's'}` : ''}.
      </Text>
      <Text variant="caption" numberOfLines={3}>
        Actors: {preview.actors.slice(0, 30).join(', ')}
        {n > 30 ? `, and ${n - 30} more` : ''}
      </Text>
      <View style={{ gap: space.half }} accessibilityLabel="Ties per wave">
        {preview.waves.map((w) => (
          <Text key={w.index} testID={`preview-wave-${w.index}`}>
            <Text variant="bodyStrong">Wave {w.index}</Text> “{w.label}”: <Text variant="figure">{w.ties}</Text> ties, density <Text variant="figure">{fmtDensity(w.density)}</Text>
            {w.missing ? (
              <>
                , <Text variant="figure">{w.missing}</Text> pairs not observed ({fmtShare(w.missing / (w.actors * (w.actors - 1)))})
              </>
            ) : null}
            {w.absent ? (
              <>
                , <Text variant="figure">{w.absent}</Text> actor{w.absent === 1 ? '' : 's'} not present
              </>
            ) : null}
          </Text>
        ))}
      </View>
      {preview.covariates.length ? (
        <View style={{ gap: space.half }} accessibilityLabel="Covariates">
          <Text variant="label">Covariates</Text>
          {preview.covariates.map((c) => (
            <Text key={c.name} testID={`preview-covariate-${c.name}`}>
              <Text variant="bodyStrong">{c.name}</Text>: {c.kind}
              {c.changing ? `, changing per wave (${c.summaries.length} columns)` : ', constant'}
              {c.kind === 'categorical' ? ` — ${c.categories.join(', ')}` : ''}
            </Text>
          ))}
        </View>
      ) : (
        <Text variant="muted">No covariates (no actors file, or it has only the label column).</Text>
      )}
      {preview.changes.map((c) =>
        c.caution ? (
          <Banner key={c.from} tone="caution">
            {c.caution}
          </Banner>
        ) : null,
      )}
    </View>
  );
}

export function UploadScreen() {
  const params = useLocalSearchParams<{ studyId: string }>();
  const studyId = parseStudyId(params.studyId);
  const router = useRouter();
  const study = useStudy(studyId);
  const { preview: askPreview, store } = useDataMutations(studyId ?? 0);
  const { compact, breakpoint } = useBreakpoint();
  const wide = breakpoint === 'wide';
  const [entries, setEntries] = useState<UploadEntry[]>([]);
  const [format, setFormat] = useState<DataFormat | null>(null);
  const [marker, setMarker] = useState('NA');
  const [preview, setPreview] = useState<DataPreviewResponse | null>(null);
  const [checking, setChecking] = useState(false);
  const [previewError, setPreviewError] = useState<string | null>(null);
  const [confirm, setConfirm] = useState(false);
  const [busy, setBusy] = useState(false);
  const [storeError, setStoreError] = useState<string | null>(null);
  const ids = useRef(0);
  const asked = useRef(0);
  const nextId = () => `e${++ids.current}`;

  const waves = waveEntries(entries);
  const chosenFormat: DataFormat = format ?? (waves[0] ? guessFormat(waves[0].content) : 'edgelist');
  const local = useMemo(() => localProblems(entries), [entries]);
  const role = study.data?.study.myRole;
  const mayUpload = can(role, 'editData');

  // Ask for a preview whenever the files, their roles or the settings change (after a short pause).
  useEffect(() => {
    if (!mayUpload || studyId === null) return;
    const active = entries.filter((e) => e.role !== 'skip');
    if (active.length === 0 || local.length > 0) {
      setPreview(null);
      setChecking(false);
      return;
    }
    const ticket = ++asked.current;
    setChecking(true);
    const timer = setTimeout(() => {
      askPreview(uploadBody(entries, chosenFormat, marker))
        .then((result) => {
          if (ticket !== asked.current) return;
          setPreview(result);
          setPreviewError(null);
        })
        .catch((e) => {
          if (ticket !== asked.current) return;
          setPreview(null);
          setPreviewError(messageOf(e));
        })
        .finally(() => {
          if (ticket === asked.current) setChecking(false);
        });
    }, 250);
    return () => clearTimeout(timer);
    // askPreview is stable for a study; the body is what matters
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [entries, chosenFormat, marker, mayUpload, studyId, local.length]);

  if (studyId === null || study.error?.status === 404 || study.error?.status === 403) return <StudyNotFound />;
  const back = <TextLink href={`/studies/${studyId}/data`}>← Data</TextLink>;
  if (!study.data) {
    return (
      <Screen title="Upload data" above={back}>
        <Loading label="Loading the study…" />
      </Screen>
    );
  }
  if (!mayUpload) {
    return (
      <Screen overline={study.data.study.name} title="Upload data" above={back}>
        <Banner tone="info">Only a lead or statistician of this study can upload data; your role is {role ?? 'none'}. You can read the stored waves and download them.</Banner>
        <FormatGuide />
      </Screen>
    );
  }

  const placed = preview && !preview.ok ? placeProblems(entries, preview.problems, fixedPairsFileTitle) : null;
  const replace = preview?.replace;
  const ready = preview?.ok === true && !checking && local.length === 0 && (replace?.running ?? 0) === 0 && (!replace?.needsConfirmation || confirm);
  const update = (id: string, change: Partial<UploadEntry>) => setEntries((prev) => prev.map((e) => (e.id === id ? { ...e, ...change } : e)));

  const doStore = async () => {
    if (!ready || busy) return;
    setBusy(true);
    setStoreError(null);
    try {
      await store(uploadBody(entries, chosenFormat, marker, replace?.needsConfirmation === true && confirm));
      router.replace(`/studies/${studyId}/data?stored=1`);
    } catch (e) {
      setStoreError(isApiError(e) && e.code === 'data_invalid' ? `${e.message} Check the files again.` : messageOf(e));
      setBusy(false);
    }
  };

  return (
    <Screen overline={study.data.study.name} title="Upload data" subtitle="Waves as edge lists or 0/1 matrices, and an actors file with covariates." above={back}>
      <View style={wide ? { flexDirection: 'row', gap: space.s3, alignItems: 'flex-start' } : { gap: space.s3 }}>
        <View style={wide ? { flex: 3, gap: space.s3, minWidth: 0 } : { gap: space.s3 }}>
      <Section title="1. Files">
        <Text variant="muted">
          Choose all files at once or one by one: each wave of the network, the actors file, and if needed a file of fixed pairs. Choosing a file with the same name again
          replaces it. Nothing is stored until you press “Store the data”.
        </Text>
        <ButtonRow>
          <FilePicker label="Choose files" onFiles={(files) => setEntries((prev) => addFiles(prev, files, nextId))} />
          <Button
            label="Paste CSV text"
            variant="secondary"
            onPress={() => setEntries((prev) => [...prev, newEntry(nextId(), { name: `pasted-${ids.current + 1}.csv`, content: '', bytes: 0, tooLarge: false, pasted: true }, prev)])}
          />
          {entries.length > 1 ? <Button label="Remove all files" variant="quiet" icon="trash" onPress={() => setEntries([])} testID="remove-all" /> : null}
        </ButtonRow>
        {entries.length === 0 ? <Text variant="caption">No files yet.</Text> : null}
        {entries.map((e) => (
          <EntryCard
            key={e.id}
            entry={e}
            waveCount={Math.max(waves.length, entries.length)}
            problems={placed?.byEntry.get(e.id) ?? []}
            localIssues={local.filter((l) => l.entryId === e.id).map((l) => l.message)}
            onChange={(c) => update(e.id, c)}
            onRemove={() => setEntries((prev) => prev.filter((x) => x.id !== e.id))}
            compact={compact}
          />
        ))}
        {entries.length ? (
          <View style={{ gap: space.s2 }}>
            <SegmentedControl<DataFormat>
              label="Wave files are"
              options={[
                { value: 'edgelist', label: 'Edge lists', description: 'sender,receiver per line' },
                { value: 'matrix', label: '0/1 matrices', description: 'labels in first row and column' },
              ]}
              value={chosenFormat}
              onChange={setFormat}
            />
            <TextField label="Missing marker" hint="The text that stands for a value not observed." value={marker} onChangeText={setMarker} maxLength={20} />
          </View>
        ) : null}
      </Section>

        </View>
        <View style={wide ? { flex: 2, gap: space.s3, minWidth: 0 } : { gap: space.s3 }} testID="upload-right">
      <Section title="2. Preview">
        {entries.length === 0 ? <Text variant="muted">The preview appears here once files are chosen.</Text> : null}
        {checking ? <Loading label="Reading the files…" /> : null}
        {previewError ? <Banner tone="error">{previewError}</Banner> : null}
        {local.length ? <Banner tone="error">Fix the file roles first: {local.length} problem{local.length === 1 ? '' : 's'} marked beside the files above.</Banner> : null}
        {preview && !preview.ok && !checking ? (
          <View style={{ gap: space.s2 }} testID="upload-problems">
            <Banner tone="error">
              {preview.message} Each problem is shown beside its file above{preview.truncated ? '; only the first ones are listed' : ''}.
            </Banner>
            {placed?.general.map((p, k) => (
              <ProblemLine key={k} entry={null} problem={p} />
            ))}
          </View>
        ) : null}
        {preview?.ok && !checking ? <PreviewView preview={preview.preview} /> : null}
      </Section>

      <Section title="3. Store">
        {replace?.hasData ? (
          <Banner tone="caution" testID="replace-warning">
            Storing replaces the data this study holds now.{replace.stale ? ` ${replace.stale}` : ''}
          </Banner>
        ) : null}
        {replace && replace.running > 0 ? (
          <Banner tone="error">
            {replace.running} fit{replace.running === 1 ? ' or batch is' : 's or batches are'} still running on the stored data; the data can be replaced once {replace.running === 1 ? 'it ends' : 'they end'}.
          </Banner>
        ) : null}
        {replace?.needsConfirmation ? (
          <Checkbox
            label="Replace the data and leave those results stale"
            hint="They stay in the study, but they no longer match its data."
            checked={confirm}
            onChange={setConfirm}
            testID="confirm-replace"
          />
        ) : null}
        {storeError ? <Banner tone="error">{storeError}</Banner> : null}
        <ButtonRow>
          <Button label="Store the data" icon="pass" onPress={() => void doStore()} disabled={!ready} loading={busy} testID="store-data" />
        </ButtonRow>
        {!ready && preview?.ok && replace?.needsConfirmation && !confirm ? <Text variant="caption">Tick the box above to replace the data.</Text> : null}
        {!preview?.ok ? <Text variant="caption">Storing becomes possible when the preview shows no problems.</Text> : null}
      </Section>
        </View>
      </View>
      <FormatGuide />
    </Screen>
  );
}
