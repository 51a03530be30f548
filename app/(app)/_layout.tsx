import { Slot } from 'expo-router';
import { SignedInGate } from '../../features/shell/SignedInGate';

export default function SignedInLayout() {
  return (
    <SignedInGate>
      <Slot />
    </SignedInGate>
  );
}
