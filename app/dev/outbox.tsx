import { OutboxScreen } from '../../features/dev/OutboxScreen';
import { useSession } from '../../features/auth/session';
import { AppShell } from '../../features/shell/AppShell';

/**
 * Development only. Outside the signed-in group on purpose: a developer who has signed out can
 * still open an invitation link sent to someone else.
 */
export default function OutboxRoute() {
  const { status } = useSession();
  if (status === 'signed-in') {
    return (
      <AppShell>
        <OutboxScreen />
      </AppShell>
    );
  }
  return <OutboxScreen />;
}
