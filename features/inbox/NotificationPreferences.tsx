/** The account page's notification section: which e-mails to receive (each on by default). */
import { useState } from 'react';
import { View } from 'react-native';
import type { NotificationPreferences as Prefs } from '../../shared/review';
import { messageOf } from '../api/client';
import { Checkbox } from '../ui/Checkbox';
import { Banner } from '../ui/Banner';
import { Card } from '../ui/Card';
import { Loading, LoadError } from '../ui/Loading';
import { usePreferenceMutations, usePreferences } from './queries';

const ITEMS: { key: keyof Prefs; label: string; hint: string }[] = [
  { key: 'batchEnded', label: 'A batch finished or failed', hint: 'In any study you belong to.' },
  { key: 'reviewRequested', label: 'A lead asks me to review', hint: 'The batch also waits in your inbox.' },
  { key: 'reportSigned', label: 'A fit report was signed off', hint: 'With the verdict counts at signing.' },
];

export function NotificationPreferences() {
  const prefs = usePreferences();
  const { update } = usePreferenceMutations();
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState<keyof Prefs | null>(null);
  return (
    <Card title="E-mail notifications" subtitle="Choose which messages Wavefit sends you.">
      {prefs.error ? <LoadError message={prefs.error.message} onRetry={() => void prefs.mutate()} /> : null}
      {prefs.isLoading ? <Loading label="Loading your preferences…" /> : null}
      {prefs.data ? (
        <View role="group" accessibilityLabel="E-mail notifications">
          {ITEMS.map((it) => (
            <Checkbox
              key={it.key}
              label={it.label}
              hint={it.hint}
              checked={prefs.data!.preferences[it.key]}
              disabled={busy !== null}
              onChange={async (on) => {
                setBusy(it.key);
                setError(null);
                try {
                  await update({ [it.key]: on });
                } catch (e) {
                  setError(messageOf(e));
                } finally {
                  setBusy(null);
                }
              }}
            />
          ))}
        </View>
      ) : null}
      {error ? <Banner tone="error">{error}</Banner> : null}
    </Card>
  );
}
