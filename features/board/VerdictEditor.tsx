/**
 * Recording a verdict on one card: a radio group (pass / fail / unsure, each a word with its icon), an
 * optional note, and Save. The save sends the version the reviewer started from; when someone else
 * saved in between, the server refuses (409) and this shows their verdict beside the reviewer's own,
 * with the choice to keep theirs or to save one's own over it (sending the new version).
 */
import { useEffect, useRef, useState } from 'react';
import { Pressable, View } from 'react-native';
import { VERDICTS, VERDICT_WORDS, type Verdict, type VerdictConflictDetails, type VerdictDto } from '../../shared/review';
import { isApiError, messageOf } from '../api/client';
import { Banner } from '../ui/Banner';
import { Button, ButtonRow } from '../ui/Button';
import { Icon } from '../ui/icons';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { colors } from '../ui/theme';
import { fonts, radius, space, touchTarget } from '../ui/tokens';
import { verdictLook } from './verdictWords';

interface PressState {
  pressed: boolean;
  hovered?: boolean;
  focused?: boolean;
}

function VerdictChoice({ value, onChange, label, disabled }: { value: Verdict | null; onChange: (v: Verdict) => void; label: string; disabled?: boolean }) {
  return (
    <View accessibilityRole="radiogroup" accessibilityLabel={label} style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.s1 }}>
      {VERDICTS.map((v) => {
        const look = verdictLook[v];
        const selected = value === v;
        return (
          <Pressable
            key={v}
            accessibilityRole="radio"
            accessibilityLabel={VERDICT_WORDS[v]}
            accessibilityState={{ checked: selected, disabled: !!disabled }}
            aria-checked={selected}
            disabled={disabled}
            onPress={() => onChange(v)}
            style={(s) => {
              const { hovered, focused } = s as PressState;
              return [
                {
                  minHeight: touchTarget,
                  minWidth: 92,
                  paddingHorizontal: space.s2 - 4,
                  flexDirection: 'row',
                  alignItems: 'center',
                  justifyContent: 'center',
                  gap: space.half + 2,
                  borderRadius: radius.sm,
                  borderWidth: selected ? 2 : 1,
                  borderColor: selected ? look.fg : colors.ruleStrong,
                  backgroundColor: selected ? look.bg : hovered ? colors.surfaceSunk : colors.surface,
                  cursor: disabled ? 'auto' : 'pointer',
                  opacity: disabled ? 0.5 : 1,
                },
                focused ? { outlineColor: colors.focus, outlineWidth: 2, outlineStyle: 'solid' as const, outlineOffset: 2 } : null,
              ];
            }}
          >
            <Icon name={look.icon} size={20} color={selected ? look.fg : colors.muted} />
            <Text style={{ fontFamily: selected ? fonts.textBold : fonts.text, color: selected ? look.fg : colors.ink }}>{VERDICT_WORDS[v]}</Text>
          </Pressable>
        );
      })}
    </View>
  );
}

export interface VerdictEditorProps {
  cardName: string;
  current: VerdictDto | null;
  canReview: boolean;
  save: (verdict: Verdict, note: string, version: number) => Promise<VerdictDto>;
}

export function VerdictEditor({ cardName, current, canReview, save }: VerdictEditorProps) {
  const [choice, setChoice] = useState<Verdict | null>(current?.verdict ?? null);
  const [note, setNote] = useState(current?.note ?? '');
  /** The version this edit started from. */
  const [base, setBase] = useState(current?.version ?? 0);
  const [dirty, setDirty] = useState(false);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [conflict, setConflict] = useState<VerdictDto | null>(null);
  const [saved, setSaved] = useState(false);
  const dirtyRef = useRef(dirty);
  dirtyRef.current = dirty;

  // Someone else's change arrives while this form is untouched: show it.
  useEffect(() => {
    if (!dirtyRef.current) {
      setChoice(current?.verdict ?? null);
      setNote(current?.note ?? '');
      setBase(current?.version ?? 0);
    }
  }, [current?.version, current?.verdict, current?.note]);

  const submit = async (version: number) => {
    if (!choice || busy) return;
    setBusy(true);
    setError(null);
    setSaved(false);
    try {
      const stored = await save(choice, note.trim(), version);
      setBase(stored.version);
      setDirty(false);
      setConflict(null);
      setSaved(true);
    } catch (e) {
      if (isApiError(e) && e.status === 409 && e.code === 'verdict_conflict') {
        const details = e.details as VerdictConflictDetails;
        setConflict(details.current);
      } else {
        setError(messageOf(e));
      }
    } finally {
      setBusy(false);
    }
  };

  if (!canReview) return null;
  const unchanged = !dirty && choice === (current?.verdict ?? null);

  return (
    <View role="form" accessibilityLabel={`Your verdict on ${cardName}`} style={{ gap: space.s1 + 4 }}>
      <VerdictChoice
        label={`Verdict on ${cardName}`}
        value={choice}
        disabled={busy}
        onChange={(v) => {
          setChoice(v);
          setDirty(true);
          setSaved(false);
        }}
      />
      <TextField
        label="Note (optional)"
        hint="Why: what you saw in the chart."
        value={note}
        onChangeText={(t) => {
          setNote(t);
          setDirty(true);
          setSaved(false);
        }}
        multiline
        maxLength={2000}
      />
      {conflict ? (
        <Banner tone="caution" word="Changed meanwhile" testID="verdict-conflict">
          {`${conflict.updatedBy?.name ?? 'Someone'} saved “${VERDICT_WORDS[conflict.verdict]}”${conflict.note ? ` (“${conflict.note}”)` : ''} while you were editing. Your ${choice ? `“${VERDICT_WORDS[choice]}”` : 'choice'} was not saved. Keep theirs, or save yours over it.`}
        </Banner>
      ) : null}
      {error ? <Banner tone="error">{error}</Banner> : null}
      {saved && !conflict ? (
        <Text variant="small" role="status" style={{ color: colors.pass }}>
          Saved (version {base}).
        </Text>
      ) : null}
      <ButtonRow>
        {conflict ? (
          <>
            <Button
              label="Save mine over it"
              accessibilityLabel={`Save my verdict on ${cardName} over theirs`}
              onPress={() => void submit(conflict.version)}
              loading={busy}
            />
            <Button
              label="Keep theirs"
              variant="secondary"
              onPress={() => {
                setChoice(conflict.verdict);
                setNote(conflict.note);
                setBase(conflict.version);
                setDirty(false);
                setConflict(null);
              }}
            />
          </>
        ) : (
          <Button
            label={current ? 'Save verdict' : 'Record verdict'}
            accessibilityLabel={`${current ? 'Save verdict' : 'Record verdict'} on ${cardName}`}
            onPress={() => void submit(base)}
            loading={busy}
            disabled={!choice || unchanged}
          />
        )}
      </ButtonRow>
    </View>
  );
}
