import { useLocalSearchParams, useRouter } from 'expo-router';
import { useState } from 'react';
import { View } from 'react-native';
import { can, inviteBodySchema, type Member, type PendingInvitation, type StudyRole, type StudySummary } from '../../shared/api';
import { messageOf } from '../api/client';
import { useSession } from '../auth/session';
import { fieldErrorsFromApi, validateWith, type FieldErrors } from '../forms/validation';
import { parseStudyId, useStudy } from '../studies/queries';
import { StudyNotFound } from '../studies/StudyNotFound';
import { Badge } from '../ui/Badge';
import { Banner } from '../ui/Banner';
import { Button, ButtonRow } from '../ui/Button';
import { Card } from '../ui/Card';
import { formatDate } from '../ui/format';
import { Loading, LoadError } from '../ui/Loading';
import { Screen, Section } from '../ui/Screen';
import { SegmentedControl } from '../ui/SegmentedControl';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { TextLink } from '../ui/TextLink';
import { colors } from '../ui/theme';
import { space } from '../ui/tokens';
import { useBreakpoint } from '../ui/useBreakpoint';
import { useTeam, useTeamMutations } from './queries';
import { roleLabel, roleOptions, roleTones } from './roles';

type RowMode = { kind: 'view' } | { kind: 'role'; role: StudyRole } | { kind: 'remove' };

function MemberRow({ member, isMe, manage, studyId, first }: { member: Member; isMe: boolean; manage: boolean; studyId: number; first: boolean }) {
  const { compact } = useBreakpoint();
  const router = useRouter();
  const { changeRole, removeMember } = useTeamMutations(studyId);
  const [mode, setMode] = useState<RowMode>({ kind: 'view' });
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);

  const run = async (action: () => Promise<unknown>, after?: () => void) => {
    setBusy(true);
    setError(null);
    try {
      await action();
      setMode({ kind: 'view' });
      after?.();
    } catch (e) {
      setError(messageOf(e));
    } finally {
      setBusy(false);
    }
  };

  return (
    <View
      role="listitem"
      accessibilityLabel={`${member.name}, ${roleLabel(member.role)}`}
      style={{ padding: space.s2, gap: space.s2, borderTopWidth: first ? 0 : 1, borderTopColor: colors.rule }}
    >
      <View style={{ flexDirection: compact ? 'column' : 'row', alignItems: compact ? 'flex-start' : 'center', gap: space.s1 }}>
        <View style={{ flex: compact ? undefined : 3, gap: 2 }}>
          <Text variant="bodyStrong">
            {member.name}
            {isMe ? <Text variant="caption"> (you)</Text> : null}
          </Text>
          <Text variant="caption">{member.email}</Text>
        </View>
        <View style={{ flex: compact ? undefined : 1.2 }}>
          <Badge label={roleLabel(member.role)} tone={roleTones[member.role]} />
        </View>
        <Text variant="figure" style={{ flex: compact ? undefined : 1.2, color: colors.muted }}>
          {`Joined ${formatDate(member.joinedAt)}`}
        </Text>
        {manage && mode.kind === 'view' ? (
          <View style={{ flex: compact ? undefined : 2.2, flexDirection: 'row', gap: space.s1, justifyContent: compact ? 'flex-start' : 'flex-end' }}>
            <Button
              label="Change role"
              variant="secondary"
              accessibilityLabel={`Change the role of ${member.name}`}
              onPress={() => setMode({ kind: 'role', role: member.role })}
            />
            <Button label="Remove" variant="quiet" accessibilityLabel={`Remove ${member.name} from the study`} onPress={() => setMode({ kind: 'remove' })} />
          </View>
        ) : null}
      </View>
      {mode.kind === 'role' ? (
        <View style={{ gap: space.s2, padding: space.s2, backgroundColor: colors.paper, borderRadius: 8 }}>
          <SegmentedControl
            label={`New role for ${member.name}`}
            options={roleOptions}
            value={mode.role}
            onChange={(role) => setMode({ kind: 'role', role })}
            disabled={busy}
          />
          <ButtonRow>
            <Button
              label="Save role"
              loading={busy}
              disabled={mode.role === member.role}
              onPress={() => void run(() => changeRole(member.userId, mode.role))}
            />
            <Button label="Cancel" variant="secondary" disabled={busy} onPress={() => { setMode({ kind: 'view' }); setError(null); }} />
          </ButtonRow>
        </View>
      ) : null}
      {mode.kind === 'remove' ? (
        <View style={{ gap: space.s2, padding: space.s2, backgroundColor: colors.failSoft, borderRadius: 8 }}>
          <Text>
            Remove <Text variant="bodyStrong">{member.name}</Text> from this study? {isMe ? 'You' : 'They'} lose access at once; verdicts
            already given stay on record.
          </Text>
          <ButtonRow>
            <Button
              label={isMe ? 'Leave the study' : `Remove ${member.name}`}
              variant="danger"
              icon="trash"
              loading={busy}
              onPress={() => void run(() => removeMember(member.userId), isMe ? () => router.replace('/') : undefined)}
            />
            <Button label="Keep" variant="secondary" disabled={busy} onPress={() => { setMode({ kind: 'view' }); setError(null); }} />
          </ButtonRow>
        </View>
      ) : null}
      {error ? <Banner tone="error">{error}</Banner> : null}
    </View>
  );
}

function InvitationRow({ invitation, manage, studyId, first }: { invitation: PendingInvitation; manage: boolean; studyId: number; first: boolean }) {
  const { compact } = useBreakpoint();
  const { revokeInvitation } = useTeamMutations(studyId);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  return (
    <View role="listitem" style={{ padding: space.s2, gap: space.s1, borderTopWidth: first ? 0 : 1, borderTopColor: colors.rule }}>
      <View style={{ flexDirection: compact ? 'column' : 'row', alignItems: compact ? 'flex-start' : 'center', gap: space.s1 }}>
        <View style={{ flex: compact ? undefined : 3, gap: 2 }}>
          <Text variant="bodyStrong">{invitation.email}</Text>
          <Text variant="caption">
            Invited by {invitation.invitedBy} on {formatDate(invitation.createdAt)} · expires {formatDate(invitation.expiresAt)}
          </Text>
        </View>
        <View style={{ flex: compact ? undefined : 1.2 }}>
          <Badge label={roleLabel(invitation.role)} tone={roleTones[invitation.role]} />
        </View>
        {manage ? (
          <View style={{ flex: compact ? undefined : 1.5, alignItems: compact ? 'flex-start' : 'flex-end' }}>
            <Button
              label="Revoke"
              variant="quiet"
              loading={busy}
              accessibilityLabel={`Revoke the invitation to ${invitation.email}`}
              onPress={async () => {
                setBusy(true);
                setError(null);
                try {
                  await revokeInvitation(invitation.id);
                } catch (e) {
                  setError(messageOf(e));
                  setBusy(false);
                }
              }}
            />
          </View>
        ) : null}
      </View>
      {error ? <Banner tone="error">{error}</Banner> : null}
    </View>
  );
}

function InviteForm({ studyId }: { studyId: number }) {
  const { invite } = useTeamMutations(studyId);
  const [email, setEmail] = useState('');
  const [role, setRole] = useState<StudyRole | null>('reviewer');
  const [errors, setErrors] = useState<FieldErrors>({});
  const [formError, setFormError] = useState<string | null>(null);
  const [sentTo, setSentTo] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  const submit = async () => {
    if (busy) return;
    setFormError(null);
    setSentTo(null);
    const v = validateWith(inviteBodySchema, { email, role });
    setErrors(v.ok ? {} : { ...v.errors, ...(v.errors.role ? { role: 'Choose a role.' } : {}) });
    if (!v.ok) return;
    setBusy(true);
    try {
      const invitation = await invite(v.data);
      setSentTo(invitation.email);
      setEmail('');
    } catch (e) {
      setErrors(fieldErrorsFromApi(e));
      setFormError(messageOf(e));
    } finally {
      setBusy(false);
    }
  };

  return (
    <Card style={{ maxWidth: 640 }}>
      <View role="form" accessibilityLabel="Invite someone" style={{ gap: space.s2 }}>
        {sentTo ? <Banner tone="success">An invitation is on its way to {sentTo}.</Banner> : null}
        {formError ? <Banner tone="error">{formError}</Banner> : null}
        <TextField
          label="E-mail"
          value={email}
          onChangeText={setEmail}
          error={errors.email}
          autoCapitalize="none"
          autoCorrect={false}
          keyboardType="email-address"
          inputMode="email"
          testID="invite-email"
        />
        <SegmentedControl label="Role" options={roleOptions} value={role} onChange={setRole} error={errors.role} />
        <Button label="Send invitation" icon="mail" onPress={submit} loading={busy} testID="invite-submit" />
      </View>
    </Card>
  );
}

function TeamBody({ study }: { study: StudySummary }) {
  const { user } = useSession();
  const { data, error, isLoading, mutate } = useTeam(study.id);
  const manage = can(study.myRole, 'manageTeam');
  return (
    <>
      {manage ? null : (
        <Banner tone="info" testID="team-read-only">
          Only the study lead can change the team.
        </Banner>
      )}
      {error ? <LoadError message={error.message} onRetry={() => void mutate()} /> : null}
      {isLoading && !data ? <Loading label="Loading the team…" /> : null}
      {data ? (
        <>
          <Section title={`Members (${data.members.length})`}>
            <Card padded={false} style={{ gap: 0 }}>
              <View role="list" accessibilityLabel="Members" testID="team-members">
                {data.members.map((m, i) => (
                  <MemberRow key={m.userId} member={m} isMe={m.userId === user?.id} manage={manage} studyId={study.id} first={i === 0} />
                ))}
              </View>
            </Card>
          </Section>
          {manage ? (
            <Section title="Invite someone" description="They get an e-mail with a link to join this study with the role you choose.">
              <InviteForm studyId={study.id} />
            </Section>
          ) : null}
          {manage || data.invitations.length > 0 ? (
            <Section title={`Pending invitations (${data.invitations.length})`}>
              {data.invitations.length === 0 ? (
                <Text variant="muted">No invitations are waiting for an answer.</Text>
              ) : (
                <Card padded={false} style={{ gap: 0 }}>
                  <View role="list" accessibilityLabel="Pending invitations">
                    {data.invitations.map((inv, i) => (
                      <InvitationRow key={inv.id} invitation={inv} manage={manage} studyId={study.id} first={i === 0} />
                    ))}
                  </View>
                </Card>
              )}
            </Section>
          ) : null}
        </>
      ) : null}
    </>
  );
}

export function TeamScreen() {
  const params = useLocalSearchParams<{ studyId: string }>();
  const studyId = parseStudyId(params.studyId);
  const study = useStudy(studyId);
  if (studyId === null || study.error?.status === 404 || study.error?.status === 403) return <StudyNotFound />;
  const s = study.data?.study;
  return (
    <Screen
      overline={s?.name ?? 'Study'}
      title="Team"
      subtitle="Who works on this study, and what each person may do."
      above={<TextLink href={`/studies/${studyId}`}>{`← ${s?.name ?? 'Study'}`}</TextLink>}
    >
      {study.error ? <LoadError message={study.error.message} onRetry={() => void study.mutate()} /> : null}
      {!s && !study.error ? <Loading label="Loading the study…" /> : null}
      {s ? <TeamBody study={s} /> : null}
    </Screen>
  );
}
