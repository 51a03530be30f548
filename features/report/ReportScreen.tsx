/**
 * The fit report of a batch: where its review stands (verdict counts, sign-offs, whether anything
 * changed since), the lead's sign-off (who and when are recorded; a fit that did not converge or a
 * batch with few chains needs an acknowledgement with a reason, printed in the report), and the
 * exports: the PDF built on the server, and the numbers as CSV and JSON.
 */
import { useLocalSearchParams, useRouter } from 'expo-router';
import { useState } from 'react';
import { View } from 'react-native';
import { MIN_ACK_REASON } from '../../shared/review';
import { getApiBase, messageOf } from '../api/client';
import { useRefits } from '../refits/queries';
import { useBatches } from '../batches/queries';
import { parseId, parseIds } from '../api/params';
import { useReportMutations, useReportStatus } from './queries';
import { SummaryStrip } from '../board/SummaryStrip';
import { parseStudyId, useStudy } from '../studies/queries';
import { StudyNotFound } from '../studies/StudyNotFound';
import { Banner } from '../ui/Banner';
import { Button, ButtonRow } from '../ui/Button';
import { Card } from '../ui/Card';
import { Checkbox } from '../ui/Checkbox';
import { EmptyState } from '../ui/EmptyState';
import { formatDate } from '../ui/format';
import { Icon } from '../ui/icons';
import { Loading, LoadError } from '../ui/Loading';
import { Screen, Section } from '../ui/Screen';
import { SegmentedControl } from '../ui/SegmentedControl';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { TextLink } from '../ui/TextLink';
import { colors } from '../ui/theme';
import { fonts, space } from '../ui/tokens';
import { DownloadLink } from '../ui/DownloadLink';

const time = (iso: string) => `${formatDate(iso)}, ${new Date(iso).toISOString().slice(11, 16)} UTC`;


export function ReportScreen() {
  const params = useLocalSearchParams<{ studyId: string; batch?: string; compare?: string; refit?: string }>();
  const studyId = parseStudyId(params.studyId);
  const router = useRouter();
  const study = useStudy(studyId);
  const batches = useBatches(studyId);
  const done = (batches.data?.batches ?? []).filter((b) => b.state === 'done');
  const batchId = parseId(params.batch) ?? done[0]?.id ?? null;
  const compare = parseIds(params.compare).filter((id) => id !== batchId);
  const refits = useRefits(studyId);
  const finishedRefits = (refits.data?.refits ?? []).filter((r) => r.state === 'done');
  const refitId = parseId(params.refit);
  const status = useReportStatus(studyId ?? 0, batchId);
  const mutations = useReportMutations(studyId ?? 0, batchId ?? 0);
  const [note, setNote] = useState('');
  const [confirming, setConfirming] = useState(false);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [signed, setSigned] = useState<string | null>(null);
  const [acknowledged, setAcknowledged] = useState(false);
  const [reason, setReason] = useState('');

  if (studyId === null || study.error?.status === 404) return <StudyNotFound />;
  const s = status.data;
  const api = `${getApiBase()}/studies/${studyId}/batches/${batchId}`;
  const compareQuery = (compare.length ? `compare=${compare.join(',')}&` : '') + (refitId !== null ? `refit=${refitId}&` : '');
  const batchName = s?.batchLabel ?? 'this batch';

  const concerns = s?.concerns ?? [];
  const sign = async () => {
    if (concerns.length > 0) {
      if (!acknowledged) {
        setError('Tick the acknowledgement first: this report has concerns (listed above).');
        return;
      }
      if (reason.trim().length < MIN_ACK_REASON) {
        setError(`Give a reason of at least ${MIN_ACK_REASON} characters for signing off despite the concerns.`);
        return;
      }
    }
    setBusy(true);
    setError(null);
    try {
      const signoff = await mutations.signOff(note.trim(), concerns.length > 0 ? reason.trim() : undefined);
      setSigned(`Signed off by ${signoff.signedBy?.name ?? 'you'} on ${time(signoff.signedAt)}. The team has been told by e-mail.`);
      setNote('');
      setReason('');
      setAcknowledged(false);
      setConfirming(false);
    } catch (e) {
      setError(messageOf(e));
    } finally {
      setBusy(false);
    }
  };

  return (
    <Screen overline="Fit report" title="Fit report" subtitle={study.data?.study.name} above={<TextLink href={`/studies/${studyId}/board`}>← Review board</TextLink>}>
      {batches.error ? <LoadError message={batches.error.message} onRetry={() => void batches.mutate()} /> : null}
      {batches.isLoading ? <Loading label="Loading batches…" /> : null}
      {batches.data && done.length === 0 ? <EmptyState title="No finished batch yet" message="A report is built from a finished, reviewed batch." /> : null}
      {done.length > 1 ? (
        <SegmentedControl
          label="Report on"
          options={done.map((b) => ({ value: String(b.id), label: `Batch ${b.id}`, description: b.label }))}
          value={batchId !== null ? String(batchId) : null}
          onChange={(v) => router.setParams({ batch: v, compare: compare.filter((c) => String(c) !== v).join(',') })}
        />
      ) : null}
      {status.error ? <LoadError message={status.error.message} onRetry={() => void status.mutate()} /> : null}
      {s ? (
        <>
          <Section title={s.batchLabel} description="Where the review stands.">
            <SummaryStrip counts={s.counts} />
            {s.counts.awaiting > 0 ? (
              <Banner tone="caution">{`${s.counts.awaiting} of ${s.counts.total} statistics still await a verdict; the report says so.`}</Banner>
            ) : null}
            {s.changedSinceSignoff ? <Banner tone="caution">Verdicts or comments changed after the last sign-off.</Banner> : null}
            {finishedRefits.length > 0 && s.canSign ? (
              <SegmentedControl
                label="Include a re-fit study"
                options={[{ value: 'none', label: 'None' }, ...finishedRefits.map((r) => ({ value: String(r.id), label: `Re-fit study ${r.id}`, description: r.label }))]}
                value={refitId !== null ? String(refitId) : 'none'}
                onChange={(v) => router.setParams({ refit: v === 'none' ? '' : v })}
              />
            ) : null}
            {refitId !== null ? <Text variant="small" testID="report-refit">{`The report includes re-fit study ${refitId}: bias, spread and coverage of the estimates.`}</Text> : null}
            {compare.length ? <Text variant="small">{`The report includes the comparison with batch${compare.length > 1 ? 'es' : ''} ${compare.join(', ')}.`}</Text> : null}
          </Section>

          <Section title="Sign-off">
            {s.signoffs.length === 0 ? <Text variant="muted">Not signed off yet.</Text> : null}
            <View role="list" accessibilityLabel="Sign-offs" style={{ gap: space.s1 }}>
              {s.signoffs.map((so) => (
                <View role="listitem" key={so.id} style={{ flexDirection: 'row', gap: space.s1, alignItems: 'flex-start' }}>
                  <Icon name="pass" size={20} color={colors.pass} />
                  <View style={{ flex: 1, gap: 2 }}>
                    <Text variant="bodyStrong">{`Signed off by ${so.signedBy?.name ?? 'a former member'} on ${time(so.signedAt)}`}</Text>
                    <Text variant="caption">{`At signing: ${so.counts.pass} pass, ${so.counts.fail} fail, ${so.counts.unsure} unsure, ${so.counts.awaiting} awaiting`}</Text>
                    {so.note ? <Text variant="small">{`“${so.note}”`}</Text> : null}
                    {so.acknowledgement ? (
                      <View testID={`signoff-acknowledgement-${so.id}`} style={{ gap: 2 }}>
                        <Text variant="small" style={{ color: colors.unsure, fontFamily: fonts.textBold }}>
                          {`Signed off despite: ${so.acknowledgement.concerns.map((c) => c.message).join(' ')}`}
                        </Text>
                        <Text variant="small">{`Reason given: “${so.acknowledgement.reason}”`}</Text>
                      </View>
                    ) : null}
                  </View>
                </View>
              ))}
            </View>
            {signed ? <Banner tone="success">{signed}</Banner> : null}
            {concerns.length > 0 ? (
              <Banner tone="caution" word="Concerns" testID="signoff-concerns">
                {`${concerns.map((c) => c.message).join(' ')} A sign-off of this report needs an acknowledgement with a reason; both are printed in the report.`}
              </Banner>
            ) : null}
            {s.canSign ? (
              <Card>
                <TextField label="Note with the sign-off (optional)" value={note} onChangeText={setNote} multiline maxLength={2000} />
                {concerns.length > 0 ? (
                  <>
                    <Checkbox label="I have read the concerns above and sign off anyway" checked={acknowledged} onChange={setAcknowledged} />
                    <TextField
                      label="Reason for signing off despite the concerns (required)"
                      value={reason}
                      onChangeText={setReason}
                      multiline
                      maxLength={2000}
                      hint={`At least ${MIN_ACK_REASON} characters; it goes into the report.`}
                    />
                  </>
                ) : null}
                {error ? <Banner tone="error">{error}</Banner> : null}
                {confirming ? (
                  <Banner tone="caution" word="Sign off?">
                    {`Your name and the time are recorded with the report of "${batchName}", and the team is told by e-mail.`}
                  </Banner>
                ) : null}
                <ButtonRow>
                  {confirming ? (
                    <>
                      <Button label="Yes, sign off" onPress={() => void sign()} loading={busy} icon="pass" />
                      <Button label="Not yet" variant="secondary" onPress={() => setConfirming(false)} />
                    </>
                  ) : (
                    <Button label="Sign off the report" icon="pass" onPress={() => setConfirming(true)} />
                  )}
                </ButtonRow>
              </Card>
            ) : (
              <Text variant="caption">Only the study lead signs off the report.</Text>
            )}
          </Section>

          <Section title="Export" description="The PDF has every chart with its verdicts and comments, the estimates, the comparison, the sign-off, and the seeds and versions to reproduce it.">
            <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.s1 }}>
              <DownloadLink href={`${api}/report.pdf?${compareQuery}download=1`} label="Download PDF" accessibilityLabel={`Download the PDF report of ${batchName}`} />
              <DownloadLink href={`${api}/report.csv?table=gof`} label="CSV: statistics" accessibilityLabel="Download the statistics, p-values and verdicts as CSV" />
              <DownloadLink href={`${api}/report.csv?table=estimates`} label="CSV: estimates" accessibilityLabel="Download the estimates as CSV" />
              <DownloadLink href={`${api}/report.json?${compareQuery}`} label="JSON" accessibilityLabel="Download every number of the report as JSON" />
            </View>
          </Section>
        </>
      ) : null}
    </Screen>
  );
}
