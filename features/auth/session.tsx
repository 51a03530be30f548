/**
 * The session: who is signed in, read from GET /api/auth/me through swr. A 401 means signed
 * out. Signing in or accepting an invitation writes the session into the cache; signing out
 * clears every cached resource so the next user sees nothing of the last one.
 *
 * When any request answers 401 session_ended or token_expired (signed out elsewhere, password
 * changed, session too old) the cache is cleared, the gate returns to sign-in, and the sign-in
 * screen says why in a plain sentence (endedMessage).
 */
import { createContext, useCallback, useContext, useEffect, useMemo, useState } from 'react';
import useSWR, { useSWRConfig } from 'swr';
import { api, ApiError, onSessionEnded } from '../api/client';
import type { ChangePasswordBody, LoginBody, SessionResponse, UserInfo } from '../../shared/api';

export const sessionKey = '/auth/me';

export type SessionStatus = 'loading' | 'signed-in' | 'signed-out' | 'error';

export interface Session {
  status: SessionStatus;
  user: UserInfo | null;
  error: ApiError | null;
  signIn: (body: LoginBody) => Promise<UserInfo>;
  signOut: () => Promise<void>;
  /** Ends every session of this account, on every device, this one included. */
  signOutEverywhere: () => Promise<void>;
  /** Why the last session ended, when it was not this browser's own sign-out; shown on sign-in. */
  endedMessage: string | null;
  /** Store a session the server just created (invitation accepted). */
  adopt: (session: SessionResponse) => Promise<void>;
  changePassword: (body: ChangePasswordBody) => Promise<void>;
  refresh: () => Promise<unknown>;
}

const SessionContext = createContext<Session | null>(null);

export function SessionProvider({ children }: { children: React.ReactNode }) {
  const { mutate: mutateAny } = useSWRConfig();
  const me = useSWR<SessionResponse, ApiError>(sessionKey, {
    shouldRetryOnError: false,
    revalidateOnFocus: true,
  });

  const [endedMessage, setEndedMessage] = useState<string | null>(null);

  useEffect(
    () =>
      onSessionEnded((message) => {
        setEndedMessage(message);
        // Forget everything the ended session could read (the session itself too: swr would keep
        // stale data beside the 401), then learn that we are signed out.
        void mutateAny(() => true, undefined, { revalidate: false }).then(() => me.mutate());
      }),
    [me, mutateAny],
  );

  const adopt = useCallback(
    async (session: SessionResponse) => {
      setEndedMessage(null);
      // Drop whatever another account may have left in the cache, then store the new session.
      await mutateAny((key) => key !== sessionKey, undefined, { revalidate: false });
      await me.mutate(session, { revalidate: false });
    },
    [me, mutateAny],
  );

  const signIn = useCallback(
    async (body: LoginBody) => {
      const session = await api.post<SessionResponse>('/auth/login', body);
      await adopt(session);
      return session.user;
    },
    [adopt],
  );

  const signOut = useCallback(async () => {
    setEndedMessage(null);
    try {
      await api.post<void>('/auth/logout');
    } finally {
      await mutateAny(() => true, undefined, { revalidate: false });
      await me.mutate();
    }
  }, [me, mutateAny]);

  const signOutEverywhere = useCallback(async () => {
    await api.post<void>('/auth/logout-everywhere');
    await mutateAny(() => true, undefined, { revalidate: false });
    setEndedMessage('You are signed out on every device and browser.');
    await me.mutate();
  }, [me, mutateAny]);

  const changePassword = useCallback(
    async (body: ChangePasswordBody) => {
      // The server ends every other session and hands this one a fresh token (cookie).
      const session = await api.post<SessionResponse>('/auth/password', body);
      await me.mutate(session, { revalidate: false });
    },
    [me],
  );

  const value = useMemo<Session>(() => {
    let status: SessionStatus;
    if (me.data) status = 'signed-in';
    else if (me.error && me.error.status === 401) status = 'signed-out';
    else if (me.error) status = 'error';
    else status = 'loading';
    return {
      status,
      user: me.data?.user ?? null,
      error: me.error ?? null,
      signIn,
      signOut,
      signOutEverywhere,
      endedMessage: endedMessage ?? (me.error?.code === 'session_ended' ? me.error.message : null),
      adopt,
      changePassword,
      refresh: () => me.mutate(),
    };
  }, [me, signIn, signOut, signOutEverywhere, endedMessage, adopt, changePassword]);

  return <SessionContext.Provider value={value}>{children}</SessionContext.Provider>;
}

export function useSession(): Session {
  const s = useContext(SessionContext);
  if (!s) throw new Error('session: useSession must be used inside <SessionProvider>');
  return s;
}

/**
 * Where to go after signing in. The guard remembers the page a signed-out visitor asked for
 * here (kept in memory: a query parameter does not survive the router's replace across route
 * groups), and sign-in also accepts ?next=.
 */
let returnPath: string | null = null;
export function rememberReturnPath(path: string): void {
  returnPath = path;
}
export function afterSignInPath(next: unknown): string {
  const target = safeNext(next ?? returnPath);
  return target;
}
export function forgetReturnPath(): void {
  returnPath = null;
}

/** Only in-app paths are followed after sign-in (no open redirects to other sites). */
export function safeNext(next: unknown): string {
  const value = Array.isArray(next) ? next[0] : next;
  if (typeof value !== 'string' || !value.startsWith('/') || value.startsWith('//') || value.startsWith('/\\')) return '/';
  if (value.startsWith('/sign-in')) return '/';
  return value;
}
