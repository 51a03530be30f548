import { Button } from '../ui/Button';
import { EmptyState } from '../ui/EmptyState';
import { Screen } from '../ui/Screen';

/** One answer for "no such study" and "not your study", so ids of other teams' studies stay private. */
export function StudyNotFound() {
  return (
    <Screen title="Study not found">
      <EmptyState
        title="This study is not here"
        message="It may have been removed, or you are not a member of it. A study lead can invite you."
        action={<Button label="Back to your studies" href="/" variant="secondary" />}
      />
    </Screen>
  );
}
