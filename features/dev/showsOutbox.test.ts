/** Who sees the Outbox entry: a site admin, on a server whose health answer says devOutbox: true (a missing field is false; contract with issue 12). */
import { describe, expect, it } from 'vitest';
import { showsOutbox } from './queries';

const admin = { id: 1, email: 'admin@harbourside.example', name: 'Admin', isAdmin: true };
const lead = { ...admin, id: 2, isAdmin: false };

describe('the Outbox entry', () => {
  it('shows only to a site admin when the server mounts the dev outbox', () => {
    expect(showsOutbox(admin, { ok: true, version: '1', devOutbox: true })).toBe(true);
    expect(showsOutbox(lead, { ok: true, version: '1', devOutbox: true })).toBe(false);
    expect(showsOutbox(admin, { ok: true, version: '1', devOutbox: false })).toBe(false);
    expect(showsOutbox(admin, { ok: true, version: '1' })).toBe(false);
    expect(showsOutbox(admin, undefined)).toBe(false);
    expect(showsOutbox(null, { ok: true, version: '1', devOutbox: true })).toBe(false);
  });
});
